// units::format and format_in, and the format -> parse round trip. Expected strings are written by
// hand from the rule: engineering notation, `significant` digits, trailing zeros kept.

#include "units/quantity.hpp"

#include <cmath>
#include <gtest/gtest.h>
#include <limits>
#include <string>
#include <vector>

namespace {

using coilsieve::units::Dimension;
using coilsieve::units::format;
using coilsieve::units::format_in;
using coilsieve::units::FormatOptions;
using coilsieve::units::parse;

FormatOptions ascii() {
    FormatOptions o;
    o.ascii = true;
    return o;
}

FormatOptions sig(int n) {
    FormatOptions o;
    o.significant = n;
    return o;
}

FormatOptions no_unit() {
    FormatOptions o;
    o.unit = false;
    return o;
}

TEST(Format, EngineeringNotationKeepsTrailingZeros) {
    EXPECT_EQ(format(1.2, Dimension::current), "1.20 A");
    EXPECT_EQ(format(4.7e-6, Dimension::inductance), "4.70 \u00B5H");
    EXPECT_EQ(format(0.035, Dimension::resistance), "35.0 m\u03A9");
    EXPECT_EQ(format(215e3, Dimension::frequency), "215 kHz");
    EXPECT_EQ(format(47.0, Dimension::resistance), "47.0 \u03A9");
    EXPECT_EQ(format(2.2e3, Dimension::resistance), "2.20 k\u03A9");
    EXPECT_EQ(format(100e-9, Dimension::capacitance), "100 nF");
    EXPECT_EQ(format(22e-12, Dimension::capacitance), "22.0 pF");
    EXPECT_EQ(format(25e-9, Dimension::charge), "25.0 nC");
    EXPECT_EQ(format(3.5e-6, Dimension::energy), "3.50 \u00B5J");
    EXPECT_EQ(format(1.5e6, Dimension::frequency), "1.50 MHz");
    EXPECT_EQ(format(2.5e9, Dimension::frequency), "2.50 GHz");
    EXPECT_EQ(format(1e-3, Dimension::time), "1.00 ms");
    EXPECT_EQ(format(0.5, Dimension::power), "500 mW");
}

TEST(Format, SignificantDigits) {
    EXPECT_EQ(format(4.7e-6, Dimension::inductance, sig(2)), "4.7 \u00B5H");
    EXPECT_EQ(format(1.2, Dimension::current, sig(4)), "1.200 A");
    EXPECT_EQ(format(1.23456, Dimension::current, sig(1)), "1 A");
    EXPECT_EQ(format(160.0, Dimension::voltage, sig(1)), "200 V"); // zeros pad to the point
    EXPECT_EQ(format(123456.0, Dimension::frequency, sig(5)), "123.46 kHz");
}

TEST(Format, RoundingAcrossAPrefix) {
    EXPECT_EQ(format(999.6, Dimension::frequency), "1.00 kHz");
    EXPECT_EQ(format(0.9996, Dimension::current), "1.00 A");
    EXPECT_EQ(format(0.9994, Dimension::current), "999 mA");
    EXPECT_EQ(format(9.996e-6, Dimension::inductance), "10.0 \u00B5H");
}

TEST(Format, ZeroNegativeAndNonFinite) {
    EXPECT_EQ(format(0.0, Dimension::current), "0 A");
    EXPECT_EQ(format(-0.0, Dimension::current), "0 A");
    EXPECT_EQ(format(0.0, Dimension::length), "0 mm");
    EXPECT_EQ(format(-1.2, Dimension::current), "-1.20 A");
    EXPECT_EQ(format(-2e-3, Dimension::voltage_per_kelvin), "-2.00 mV/K");
    EXPECT_EQ(format(std::numeric_limits<double>::quiet_NaN(), Dimension::current), "n/a");
    EXPECT_EQ(format(std::numeric_limits<double>::infinity(), Dimension::current), "n/a");
    EXPECT_EQ(format(-std::numeric_limits<double>::infinity(), Dimension::voltage), "n/a");
    EXPECT_EQ(format(std::numeric_limits<double>::max(), Dimension::volume), "n/a"); // * 1e9
}

TEST(Format, DisplayUnitsPerDimension) {
    EXPECT_EQ(format(328.15, Dimension::temperature), "55.0 \u00B0C");
    EXPECT_EQ(format(233.15, Dimension::temperature), "-40.0 \u00B0C");
    EXPECT_EQ(format(273.15, Dimension::temperature), "0 \u00B0C");
    EXPECT_EQ(format(398.15, Dimension::temperature), "125 \u00B0C");
    EXPECT_EQ(format(40.0, Dimension::temperature_difference), "40.0 K");
    EXPECT_EQ(format(0.2, Dimension::ratio), "20.0 %");
    EXPECT_EQ(format(0.025, Dimension::ratio), "2.50 %");
    EXPECT_EQ(format(4.3e-3, Dimension::length), "4.30 mm");
    EXPECT_EQ(format(2.0, Dimension::length), "2000 mm");
    EXPECT_EQ(format(12e-6, Dimension::area), "12.0 mm\u00B2");
    EXPECT_EQ(format(150e-9, Dimension::volume), "150 mm\u00B3");
    EXPECT_EQ(format(7920.0, Dimension::battery_capacity), "2.20 Ah"); // 7920 C / 3600
    EXPECT_EQ(format(1800.0, Dimension::battery_capacity), "500 mAh");
    EXPECT_EQ(format(35.0, Dimension::thermal_resistance), "35.0 K/W");
    EXPECT_EQ(format(1.2e-3, Dimension::mass), "1.20 g");
    EXPECT_EQ(format(2.0, Dimension::mass), "2.00 kg");
    EXPECT_EQ(format(1.5, Dimension::dimensionless), "1.50");
}

TEST(Format, Ascii) {
    EXPECT_EQ(format(4.7e-6, Dimension::inductance, ascii()), "4.70 uH");
    EXPECT_EQ(format(0.035, Dimension::resistance, ascii()), "35.0 mOhm");
    EXPECT_EQ(format(328.15, Dimension::temperature, ascii()), "55.0 degC");
    EXPECT_EQ(format(12e-6, Dimension::area, ascii()), "12.0 mm^2");
    EXPECT_EQ(format(150e-9, Dimension::volume, ascii()), "150 mm^3");
}

TEST(Format, OutsideThePrefixRange) {
    EXPECT_EQ(format(1e12, Dimension::frequency), "1000 GHz");
    EXPECT_EQ(format(3600.0, Dimension::time), "3600 s"); // no "ks"
    EXPECT_EQ(format(1e20, Dimension::dimensionless), "1.00e20");
    EXPECT_EQ(format(1.5e-20, Dimension::charge), "0.0000150 fC");
    EXPECT_EQ(format(1.5e-22, Dimension::charge), "1.50e-7 fC");
}

TEST(Format, WithoutUnitIsInUnitSymbol) {
    EXPECT_EQ(format(4.7e-6, Dimension::inductance, no_unit()), "4.70e-6");
    EXPECT_EQ(format(0.2, Dimension::ratio, no_unit()), "20.0");
    EXPECT_EQ(format(328.15, Dimension::temperature, no_unit()), "55.0");
    EXPECT_EQ(format(4.3e-3, Dimension::length, no_unit()), "4.30");
    EXPECT_EQ(format(7920.0, Dimension::battery_capacity, no_unit()), "2200");
}

TEST(FormatIn, GivenUnit) {
    EXPECT_EQ(format_in(4.7e-6, Dimension::inductance, "uH"), "4.70");
    EXPECT_EQ(format_in(0.035, Dimension::resistance, "mOhm"), "35.0");
    EXPECT_EQ(format_in(7920.0, Dimension::battery_capacity, "mAh"), "2200");
    EXPECT_EQ(format_in(328.15, Dimension::temperature, "K", 5), "328.15");
    EXPECT_EQ(format_in(328.15, Dimension::temperature, "C"), "55.0");
    EXPECT_EQ(format_in(328.15, Dimension::temperature, ""), "55.0"); // bare: °C
    EXPECT_EQ(format_in(0.2, Dimension::ratio, "%"), "20.0");
    EXPECT_EQ(format_in(2200.0, Dimension::resistance, "k"), "2.20");
    EXPECT_THROW(format_in(1.0, Dimension::inductance, "uF"), coilsieve::units::ParseError);
}

struct Sample {
    double value;
    Dimension dim;
};

std::vector<Sample> samples() {
    std::vector<Sample> s;
    const double mantissas[] = {1.0, 1.5, 2.2, 3.3, 4.7, 6.8, 9.99, 123.4, 0.5};
    const struct {
        Dimension d;
        double lo, hi;
    } spans[] = {
        {Dimension::inductance, 1e-9, 1.0},
        {Dimension::resistance, 1e-4, 1e7},
        {Dimension::current, 1e-6, 100.0},
        {Dimension::voltage, 1e-3, 1000.0},
        {Dimension::capacitance, 1e-13, 1e-2},
        {Dimension::frequency, 1.0, 1e9},
        {Dimension::power, 1e-6, 1e3},
        {Dimension::time, 1e-12, 10.0},
        {Dimension::temperature, 1.0, 1000.0},
        {Dimension::temperature_difference, 0.1, 300.0},
        {Dimension::length, 1e-5, 1.0},
        {Dimension::area, 1e-8, 1e-2},
        {Dimension::volume, 1e-10, 1e-3},
        {Dimension::charge, 1e-12, 1e4},
        {Dimension::energy, 1e-9, 1e3},
        {Dimension::thermal_resistance, 0.1, 500.0},
        {Dimension::mass, 1e-6, 10.0},
        {Dimension::battery_capacity, 36.0, 3.6e6},
        {Dimension::voltage_per_kelvin, 1e-5, 1e-1},
        {Dimension::ratio, 1e-3, 1.0},
        {Dimension::dimensionless, 1e-3, 1e6},
    };
    for (const auto& sp : spans) {
        for (double decade = sp.lo; decade <= sp.hi; decade *= 10.0) {
            for (const double m : mantissas) {
                s.push_back({m * decade, sp.d});
                if (sp.d != Dimension::temperature) s.push_back({-m * decade, sp.d});
            }
        }
    }
    return s;
}

TEST(RoundTrip, FullPrecisionIsExactToRounding) {
    FormatOptions o;
    o.significant = 17;
    for (const bool use_ascii : {false, true}) {
        o.ascii = use_ascii;
        for (const Sample& s : samples()) {
            const std::string text = format(s.value, s.dim, o);
            const double back = parse(text, s.dim);
            // 17 digits identify a double; the display scaling may add a few ulps.
            EXPECT_NEAR(back, s.value, 1e-13 * std::abs(s.value)) << text;
        }
    }
}

TEST(RoundTrip, ThreeDigitsIsStable) {
    for (const Sample& s : samples()) {
        const std::string text = format(s.value, s.dim);
        const double back = parse(text, s.dim);
        // Half a unit in the third digit of a mantissa >= 1: at most 0.5 % relative, measured
        // where it is printed (°C for a temperature).
        const double offset = s.dim == Dimension::temperature ? 273.15 : 0.0;
        EXPECT_LE(std::abs(back - s.value), 5e-3 * std::abs(s.value - offset) + 1e-12) << text;
        EXPECT_EQ(format(back, s.dim), text) << "format is not idempotent through parse";
        const std::string a = format(s.value, s.dim, ascii());
        EXPECT_EQ(format(parse(a, s.dim), s.dim, ascii()), a);
    }
}

TEST(RoundTrip, WithoutUnitThroughUnitSymbol) {
    FormatOptions o = no_unit();
    o.significant = 17;
    for (const Sample& s : samples()) {
        const std::string text = format(s.value, s.dim, o);
        const double back = parse(text, s.dim, coilsieve::units::unit_symbol(s.dim));
        EXPECT_NEAR(back, s.value, 1e-13 * std::abs(s.value)) << text;
    }
}

TEST(RoundTrip, FormatInThroughDefaultUnit) {
    const struct {
        Dimension d;
        const char* unit;
    } columns[] = {{Dimension::inductance, "uH"},
                   {Dimension::resistance, "mOhm"},
                   {Dimension::temperature, "C"},
                   {Dimension::temperature, "K"},
                   {Dimension::ratio, "%"},
                   {Dimension::length, "mm"},
                   {Dimension::battery_capacity, "mAh"},
                   {Dimension::mass, "g"}};
    for (const auto& c : columns) {
        for (const Sample& s : samples()) {
            if (s.dim != c.d) continue;
            const std::string text = format_in(s.value, c.d, c.unit, 17);
            EXPECT_NEAR(parse(text, c.d, c.unit), s.value, 1e-13 * std::abs(s.value)) << text;
        }
    }
}

} // namespace
