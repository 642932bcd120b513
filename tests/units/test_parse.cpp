// units::parse: every accepted form and every rejection. Expected SI values are worked out by hand
// from the SI prefix and unit definitions (SI Brochure, 9th ed., 2019, tables 7 and 8).

#include "units/quantity.hpp"

#include <cmath>
#include <cstdint>
#include <gtest/gtest.h>
#include <string>

namespace {

using coilsieve::units::Dimension;
using coilsieve::units::parse;
using coilsieve::units::ParseError;

// Asserts that parse() rejects `text` with a message quoting it and containing `why`.
void expect_rejected(std::string_view text, Dimension d, std::string_view why) {
    try {
        const double v = parse(text, d);
        ADD_FAILURE() << "\"" << text << "\" was accepted as " << v;
    } catch (const ParseError& e) {
        const std::string msg = e.what();
        EXPECT_NE(msg.find("\"" + std::string(text) + "\""), std::string::npos)
            << "message does not quote the input: " << msg;
        EXPECT_NE(msg.find(why), std::string::npos) << "message lacks \"" << why << "\": " << msg;
    }
}

TEST(Parse, PlainNumbers) {
    EXPECT_EQ(parse("4.7", Dimension::voltage), 4.7);
    EXPECT_EQ(parse("12", Dimension::voltage), 12.0);
    EXPECT_EQ(parse("-3.5", Dimension::current), -3.5);
    EXPECT_EQ(parse("+2", Dimension::current), 2.0);
    EXPECT_EQ(parse(".5", Dimension::current), 0.5);
    EXPECT_EQ(parse("5.", Dimension::current), 5.0);
    EXPECT_EQ(parse("0", Dimension::current), 0.0);
    EXPECT_EQ(parse("1.5", Dimension::dimensionless), 1.5);
    // U+2212 MINUS SIGN, as typeset in data sheets.
    EXPECT_EQ(parse("\u22122.5 mV/K", Dimension::voltage_per_kelvin), -2.5e-3);
}

TEST(Parse, Exponents) {
    EXPECT_EQ(parse("4.7e-6", Dimension::inductance), 4.7e-6);
    EXPECT_EQ(parse("1E3", Dimension::frequency), 1000.0);
    EXPECT_EQ(parse("2.2e+3", Dimension::resistance), 2200.0);
    EXPECT_EQ(parse("1e-3 H", Dimension::inductance), 1e-3);
    // Exponent and prefix combine: 1e3 mA = 1 A.
    EXPECT_EQ(parse("1e3mA", Dimension::current), 1.0);
}

TEST(Parse, SiPrefixes) {
    EXPECT_EQ(parse("1fF", Dimension::capacitance), 1e-15);
    EXPECT_EQ(parse("22pF", Dimension::capacitance), 22e-12);
    EXPECT_EQ(parse("100nF", Dimension::capacitance), 100e-9);
    EXPECT_EQ(parse("4.7uH", Dimension::inductance), 4.7e-6);
    EXPECT_EQ(parse("4.7\u00B5H", Dimension::inductance), 4.7e-6); // U+00B5 MICRO SIGN
    EXPECT_EQ(parse("4.7\u03BCH", Dimension::inductance), 4.7e-6); // U+03BC GREEK SMALL MU
    EXPECT_EQ(parse("35mOhm", Dimension::resistance), 35e-3);
    EXPECT_EQ(parse("2.2kOhm", Dimension::resistance), 2200.0);
    EXPECT_EQ(parse("1.5MHz", Dimension::frequency), 1.5e6);
    EXPECT_EQ(parse("1GHz", Dimension::frequency), 1e9);
    // Case matters: m is milli, M is mega.
    EXPECT_EQ(parse("1mA", Dimension::current), 1e-3);
    EXPECT_EQ(parse("1MA", Dimension::current), 1e6);
    // A bare prefix is a prefix on the SI unit.
    EXPECT_EQ(parse("10k", Dimension::resistance), 10e3);
    EXPECT_EQ(parse("4.7u", Dimension::inductance), 4.7e-6);
    EXPECT_EQ(parse("100 n", Dimension::capacitance), 100e-9);
}

TEST(Parse, UnitsPerDimension) {
    EXPECT_EQ(parse("10H", Dimension::inductance), 10.0);
    EXPECT_EQ(parse("4.7\u03A9", Dimension::resistance), 4.7); // U+03A9 GREEK CAPITAL OMEGA
    EXPECT_EQ(parse("4.7\u2126", Dimension::resistance), 4.7); // U+2126 OHM SIGN
    EXPECT_EQ(parse("4.7k\u2126", Dimension::resistance), 4700.0);
    EXPECT_EQ(parse("4.7ohm", Dimension::resistance), 4.7);
    EXPECT_EQ(parse("4.7 ohms", Dimension::resistance), 4.7);
    EXPECT_EQ(parse("4.7Ohm", Dimension::resistance), 4.7);
    EXPECT_EQ(parse("47R", Dimension::resistance), 47.0);
    EXPECT_EQ(parse("50mR", Dimension::resistance), 50e-3);
    EXPECT_EQ(parse("1.2A", Dimension::current), 1.2);
    EXPECT_EQ(parse("24V", Dimension::voltage), 24.0);
    EXPECT_EQ(parse("10uF", Dimension::capacitance), 10e-6);
    EXPECT_EQ(parse("215kHz", Dimension::frequency), 215e3);
    EXPECT_EQ(parse("1.5W", Dimension::power), 1.5);
    EXPECT_EQ(parse("35ns", Dimension::time), 35e-9);
    EXPECT_EQ(parse("2 s", Dimension::time), 2.0);
    EXPECT_EQ(parse("3.5uJ", Dimension::energy), 3.5e-6);
    EXPECT_EQ(parse("1Wh", Dimension::energy), 3600.0); // 1 W * 3600 s
    EXPECT_EQ(parse("35K/W", Dimension::thermal_resistance), 35.0);
    EXPECT_EQ(parse("35 \u00B0C/W", Dimension::thermal_resistance), 35.0);
    EXPECT_EQ(parse("1.2g", Dimension::mass), 1.2e-3);
    EXPECT_EQ(parse("2kg", Dimension::mass), 2.0);
    EXPECT_EQ(parse("350mg", Dimension::mass), 350e-6);
    EXPECT_EQ(parse("-2mV/K", Dimension::voltage_per_kelvin), -2e-3);
    EXPECT_EQ(parse("-0.004V/K", Dimension::voltage_per_kelvin), -0.004);
    EXPECT_EQ(parse("-3 mV/\u00B0C", Dimension::voltage_per_kelvin), -3e-3);
}

TEST(Parse, LengthAreaVolume) {
    EXPECT_EQ(parse("4.3mm", Dimension::length), 4.3e-3);
    EXPECT_EQ(parse("0.5m", Dimension::length), 0.5);
    EXPECT_EQ(parse("1.2cm", Dimension::length), 1.2e-2);
    EXPECT_EQ(parse("250um", Dimension::length), 250e-6);
    EXPECT_EQ(parse("12mm2", Dimension::area), 12e-6);
    EXPECT_EQ(parse("12mm\u00B2", Dimension::area), 12e-6);
    EXPECT_EQ(parse("12 mm^2", Dimension::area), 12e-6);
    EXPECT_EQ(parse("0.5m2", Dimension::area), 0.5);
    EXPECT_EQ(parse("150mm3", Dimension::volume), 150e-9);
    EXPECT_EQ(parse("150mm\u00B3", Dimension::volume), 150e-9);
    EXPECT_EQ(parse("150 mm^3", Dimension::volume), 150e-9);
    EXPECT_EQ(parse("2m3", Dimension::volume), 2.0); // a unit, not an IEC 60062 code
    EXPECT_EQ(parse("3m2", Dimension::area), 3.0);
}

TEST(Parse, Spaces) {
    EXPECT_EQ(parse("4.7 uH", Dimension::inductance), 4.7e-6);
    EXPECT_EQ(parse("  4.7uH  ", Dimension::inductance), 4.7e-6);
    EXPECT_EQ(parse("4.7\tuH", Dimension::inductance), 4.7e-6);
    EXPECT_EQ(parse("4.7\u00A0\u00B5H", Dimension::inductance), 4.7e-6);  // no-break space
    EXPECT_EQ(parse("4.7\u202FuH\u00A0", Dimension::inductance), 4.7e-6); // narrow NBSP
    EXPECT_EQ(parse("55 \u00B0C\r\n", Dimension::temperature), 328.15);
}

TEST(Parse, RatioPercentAndFraction) {
    EXPECT_EQ(parse("20%", Dimension::ratio), 0.2);
    EXPECT_EQ(parse("20 %", Dimension::ratio), 0.2);
    EXPECT_EQ(parse("0.2", Dimension::ratio), 0.2);
    EXPECT_EQ(parse("2.5%", Dimension::ratio), 0.025);
}

TEST(Parse, TemperatureIsKelvinInside) {
    // 0 °C = 273.15 K by definition of the Celsius scale (SI Brochure, 9th ed., 2.3.1).
    EXPECT_DOUBLE_EQ(parse("55C", Dimension::temperature), 328.15);
    EXPECT_DOUBLE_EQ(parse("55 \u00B0C", Dimension::temperature), 328.15);
    EXPECT_DOUBLE_EQ(parse("55\u2103", Dimension::temperature), 328.15); // DEGREE CELSIUS sign
    EXPECT_DOUBLE_EQ(parse("55degC", Dimension::temperature), 328.15);
    EXPECT_DOUBLE_EQ(parse("328.15K", Dimension::temperature), 328.15);
    EXPECT_DOUBLE_EQ(parse("-40C", Dimension::temperature), 233.15);
    EXPECT_EQ(parse("0K", Dimension::temperature), 0.0);
    EXPECT_EQ(parse("-273.15C", Dimension::temperature), 0.0);
    // A bare temperature is in degrees Celsius (documented in quantity.hpp).
    EXPECT_DOUBLE_EQ(parse("25", Dimension::temperature), 298.15);
    // Differences take K or °C without the offset.
    EXPECT_EQ(parse("40K", Dimension::temperature_difference), 40.0);
    EXPECT_EQ(parse("40 \u00B0C", Dimension::temperature_difference), 40.0);
    EXPECT_EQ(parse("40C", Dimension::temperature_difference), 40.0);
    EXPECT_EQ(parse("40", Dimension::temperature_difference), 40.0);
}

TEST(Parse, ChargeAndBatteryCapacity) {
    EXPECT_EQ(parse("25nC", Dimension::charge), 25e-9); // C is coulomb for a charge
    EXPECT_EQ(parse("1C", Dimension::charge), 1.0);
    // 1 Ah = 1 A * 3600 s = 3600 C.
    EXPECT_EQ(parse("1Ah", Dimension::battery_capacity), 3600.0);
    EXPECT_DOUBLE_EQ(parse("2200mAh", Dimension::battery_capacity), 7920.0);
    EXPECT_DOUBLE_EQ(parse("2.2Ah", Dimension::battery_capacity), 7920.0);
    EXPECT_EQ(parse("3600", Dimension::battery_capacity), 3600.0); // bare: SI (coulomb)
    EXPECT_EQ(parse("2Ah", Dimension::charge), 7200.0);
}

// IEC 60062: a letter in place of the decimal point carries the multiplier.
TEST(Parse, Iec60062LetterCodes) {
    EXPECT_EQ(parse("4R7", Dimension::resistance), 4.7);    // IEC 60062: 4R7 = 4.7 Ω
    EXPECT_EQ(parse("R047", Dimension::resistance), 0.047); // IEC 60062: R047 = 0.047 Ω
    EXPECT_EQ(parse("R47", Dimension::resistance), 0.47);   // IEC 60062: R47 = 0.47 Ω
    EXPECT_EQ(parse("2k2", Dimension::resistance), 2200.0); // common practice lower-case k
    EXPECT_EQ(parse("4K7", Dimension::resistance), 4700.0); // IEC 60062 capital K (from memory)
    EXPECT_EQ(parse("1M0", Dimension::resistance), 1e6);    // IEC 60062: 1M0 = 1 MΩ
    EXPECT_EQ(parse("2M2", Dimension::resistance), 2.2e6);
    EXPECT_EQ(parse("10K", Dimension::resistance), 10e3);
    EXPECT_EQ(parse("4n7", Dimension::capacitance), 4.7e-9);  // IEC 60062: 4n7 = 4.7 nF
    EXPECT_EQ(parse("4p7", Dimension::capacitance), 4.7e-12); // IEC 60062: 4p7 = 4.7 pF
    EXPECT_EQ(parse("n47", Dimension::capacitance), 0.47e-9);
    EXPECT_EQ(parse("4u7", Dimension::inductance), 4.7e-6); // unit implied by the field
    EXPECT_EQ(parse("4\u00B57", Dimension::inductance), 4.7e-6);
    EXPECT_EQ(parse("4u7H", Dimension::inductance), 4.7e-6); // unit written as well
    EXPECT_EQ(parse("2k2\u03A9", Dimension::resistance), 2200.0);
    EXPECT_EQ(parse("1m5", Dimension::length), 1.5e-3);
    EXPECT_EQ(parse("-4R7", Dimension::resistance), -4.7);
    // R as a decimal point for any dimension; the unit may follow.
    EXPECT_EQ(parse("4R7", Dimension::voltage), 4.7);
    EXPECT_EQ(parse("4R7V", Dimension::voltage), 4.7);
    EXPECT_EQ(parse("0R2", Dimension::ratio), 0.2);
}

TEST(Parse, DefaultUnitForBareNumbers) {
    EXPECT_EQ(parse("4.7", Dimension::inductance, "uH"), 4.7e-6);
    EXPECT_EQ(parse("4.7", Dimension::inductance, "\u00B5H"), 4.7e-6);
    EXPECT_EQ(parse("35", Dimension::resistance, "mOhm"), 35e-3);
    EXPECT_DOUBLE_EQ(parse("55", Dimension::temperature, "C"), 328.15);
    EXPECT_EQ(parse("300", Dimension::temperature, "K"), 300.0);
    EXPECT_EQ(parse("20", Dimension::ratio, "%"), 0.2);
    EXPECT_EQ(parse("4.3", Dimension::length, "mm"), 4.3e-3);
    EXPECT_DOUBLE_EQ(parse("2200", Dimension::battery_capacity, "mAh"), 7920.0);
    EXPECT_EQ(parse("12", Dimension::area, "mm2"), 12e-6);
    EXPECT_EQ(parse("4.7", Dimension::inductance, ""), 4.7); // no default: SI
    // A unit written in the cell wins over the column's.
    EXPECT_EQ(parse("10nH", Dimension::inductance, "uH"), 10e-9);
    EXPECT_EQ(parse("0.2A", Dimension::current, "mA"), 0.2);
    EXPECT_EQ(parse("300K", Dimension::temperature, "C"), 300.0);
    EXPECT_EQ(parse("4u7", Dimension::inductance, "mH"), 4.7e-6); // the code's prefix is a unit
    EXPECT_EQ(parse("4R7", Dimension::resistance, "mOhm"), 4.7);  // IEC 60062: R means ohm
    // On an inductor "R" marks the point in microhenries (marking practice, from memory), whatever
    // the column's unit: a bare "4R7" is 4.7 µH, not 4.7 H.
    EXPECT_EQ(parse("4R7", Dimension::inductance, "uH"), 4.7e-6);
    EXPECT_EQ(parse("4R7", Dimension::inductance), 4.7e-6);
    EXPECT_EQ(parse("R47", Dimension::inductance), 0.47e-6);
    EXPECT_EQ(parse("4R7", Dimension::inductance, "mH"), 4.7e-6);
    EXPECT_EQ(parse("4R7uH", Dimension::inductance), 4.7e-6);
}

TEST(Parse, BadDefaultUnitIsReported) {
    try {
        parse("4.7", Dimension::inductance, "uF");
        ADD_FAILURE() << "accepted a capacitance unit as default for an inductance";
    } catch (const ParseError& e) {
        EXPECT_NE(std::string(e.what()).find("\"uF\""), std::string::npos) << e.what();
    }
}

TEST(ParseRejects, Empty) {
    expect_rejected("", Dimension::inductance, "empty");
    expect_rejected("   ", Dimension::inductance, "empty");
}

TEST(ParseRejects, TwoNumbers) {
    expect_rejected("4.7 3.3", Dimension::inductance, "two numbers");
    expect_rejected("4.7uH 3.3", Dimension::inductance, "two numbers");
    expect_rejected("4.7-3", Dimension::inductance, "two numbers");
}

TEST(ParseRejects, UnknownUnitOrPrefix) {
    expect_rejected("4.7uX", Dimension::inductance, "unknown unit \"uX\"");
    expect_rejected("4.7 furlongs", Dimension::length, "unknown unit");
    expect_rejected("4.7xH", Dimension::inductance, "unknown prefix \"x\"");
    expect_rejected("4.7UH", Dimension::inductance, "unknown prefix \"U\"");
    expect_rejected("4.7mh", Dimension::inductance, "unknown unit");
    expect_rejected("4.7kK", Dimension::temperature, "takes no prefix");
    expect_rejected("12kmm2", Dimension::area, "takes no prefix");
    expect_rejected("4u7uH", Dimension::inductance, "prefix twice");
    expect_rejected("abc", Dimension::inductance, "does not start with a number");
    expect_rejected("uH", Dimension::inductance, "does not start with a number");
    expect_rejected("-", Dimension::current, "does not start with a number");
    // Each message also says what would be right.
    expect_rejected("4.7uX", Dimension::inductance, "expected an inductance (H)");
}

TEST(ParseRejects, WrongDimension) {
    try {
        parse("4.7uF", Dimension::inductance);
        ADD_FAILURE() << "accepted a capacitance as an inductance";
    } catch (const ParseError& e) {
        EXPECT_STREQ(e.what(), "\"4.7uF\" is a capacitance, expected an inductance (H)");
    }
    expect_rejected("4.7mm", Dimension::current, "is a length, expected a current (A)");
    expect_rejected("20%", Dimension::inductance, "is a ratio");
    expect_rejected("5nC", Dimension::temperature, "is a charge, expected a temperature");
    expect_rejected("4u7F", Dimension::inductance, "is a capacitance");
    expect_rejected("2200mAh", Dimension::current, "is a battery capacity");
    expect_rejected("12mm2", Dimension::length, "is an area");
    expect_rejected("4.7V", Dimension::dimensionless, "has a unit");
    expect_rejected("4k7", Dimension::temperature, "decimal point");
    expect_rejected("2k2", Dimension::battery_capacity, "decimal point");
}

TEST(ParseRejects, NotFinite) {
    expect_rejected("nan", Dimension::voltage, "finite");
    expect_rejected("NaN", Dimension::voltage, "finite");
    expect_rejected("inf", Dimension::voltage, "finite");
    expect_rejected("-inf V", Dimension::voltage, "finite");
    expect_rejected("Infinity", Dimension::voltage, "finite");
    expect_rejected("1e400", Dimension::voltage, "range");
    expect_rejected("1e99999999999", Dimension::voltage, "range");
    expect_rejected("1e308 Ah", Dimension::battery_capacity, "finite"); // overflows times 3600
}

TEST(ParseRejects, TextAfterTheUnit) {
    expect_rejected("4.7uH foo", Dimension::inductance, "after the unit");
    expect_rejected("4.7 uH H", Dimension::inductance, "after the unit");
    expect_rejected("55 C hot", Dimension::temperature, "after the unit");
}

TEST(ParseRejects, BelowAbsoluteZero) {
    expect_rejected("-300C", Dimension::temperature, "absolute zero");
    expect_rejected("-1K", Dimension::temperature, "absolute zero");
    expect_rejected("-273.16C", Dimension::temperature, "absolute zero");
    expect_rejected("-274", Dimension::temperature, "absolute zero");
    // A negative temperature difference is fine.
    EXPECT_EQ(parse("-5K", Dimension::temperature_difference), -5.0);
}

TEST(ParseRejects, TooManyDigits) {
    expect_rejected(std::string(70, '1'), Dimension::voltage, "too many digits");
}

// Deterministic garbage (a fixed linear congruential sequence over pieces of real input, including
// truncated UTF-8): parse returns a finite value or throws ParseError, nothing else.
TEST(ParseRejects, GarbageNeverCrashesOrReturnsNaN) {
    const std::string_view pieces[] = {
        "4", "7", ".", "e",  "E",  "-",   "+",      " ",      "R",    "k",     "K",
        "u", "m", "M", "H",  "C",  "%",   "\u00B5", "\u03A9", "\xC2", "\xE2",  "\u00B0",
        "/", "W", "2", "mm", "Ah", "nan", "inf",    "0",      "\t",   "\u00A0"};
    constexpr std::size_t n_pieces = sizeof(pieces) / sizeof(pieces[0]);
    std::uint32_t state = 12345u;
    auto next = [&] {
        state = state * 1664525u + 1013904223u;
        return state >> 8;
    };
    int accepted = 0;
    for (int round = 0; round < 20000; ++round) {
        std::string text;
        const std::uint32_t len = next() % 7;
        for (std::uint32_t k = 0; k < len; ++k) text += pieces[next() % n_pieces];
        const auto d = static_cast<Dimension>(next() % 21);
        try {
            const double v = parse(text, d);
            EXPECT_TRUE(std::isfinite(v)) << text;
            ++accepted;
        } catch (const ParseError&) {
        }
    }
    EXPECT_GT(accepted, 0); // the generator does produce valid quantities too
}

TEST(DimensionInfo, NamesAndSymbols) {
    using coilsieve::units::dimension_name;
    using coilsieve::units::unit_symbol;
    EXPECT_EQ(dimension_name(Dimension::inductance), "inductance");
    EXPECT_EQ(dimension_name(Dimension::voltage_per_kelvin), "voltage per kelvin");
    EXPECT_EQ(unit_symbol(Dimension::inductance), "H");
    EXPECT_EQ(unit_symbol(Dimension::resistance), "\u03A9");
    EXPECT_EQ(unit_symbol(Dimension::resistance, true), "Ohm");
    EXPECT_EQ(unit_symbol(Dimension::temperature), "\u00B0C");
    EXPECT_EQ(unit_symbol(Dimension::temperature, true), "degC");
    EXPECT_EQ(unit_symbol(Dimension::length), "mm");
    EXPECT_EQ(unit_symbol(Dimension::area, true), "mm^2");
}

} // namespace
