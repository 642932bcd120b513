#pragma once
// Quantities at the edges: text an engineer writes -> SI double, and back.
// Inside the core every value is a double in SI base units; absolute temperatures are kelvin.

#include <span>
#include <stdexcept>
#include <string>
#include <string_view>

namespace coilsieve::units {

// What a field holds; decides which unit symbols are accepted and how a value prints.
enum class Dimension {
    dimensionless,          // plain number, no unit allowed (except none)
    ratio,                  // "20%" -> 0.2, "0.2" -> 0.2
    inductance,             // H
    resistance,             // Ω, ohm, R (IEC 60062 "4R7")
    current,                // A
    voltage,                // V
    capacitance,            // F
    frequency,              // Hz
    power,                  // W
    time,                   // s
    temperature,            // absolute: "55C", "55 °C", "328.15K"; bare numbers are °C
    temperature_difference, // K (or °C as a difference)
    length,                 // m, mm
    area,                   // m², mm²
    volume,                 // m³, mm³
    charge,                 // C (coulomb): gate charge, Qrr, battery charge
    energy,                 // J
    thermal_resistance,     // K/W
    mass,                   // g, kg
    battery_capacity,       // Ah, mAh -> stored in coulomb
    voltage_per_kelvin,     // V/K, mV/K
};

// Name of a dimension for messages ("inductance").
std::string_view dimension_name(Dimension d);
// The SI unit symbol printed for a dimension ("H", "Ω", "°C").
std::string_view unit_symbol(Dimension d, bool ascii = false);

// Thrown for text that is not a valid quantity; what() quotes the input and says what would be
// right.
class ParseError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

// Parse "4.7uH", "4u7", "4R7", "2k2", "R047", "35 mΩ", "4.7e-6", "20%", "55C".
// A bare number is in SI base units (temperatures: °C, ratios: a fraction). Prefixes f p n u µ μ
// m k M G are case-sensitive. IEC 60062 codes: a prefix letter as decimal point ("4u7", "2k2")
// implies the field's SI unit; "R" as decimal point ("4R7", "R047") is a plain decimal point,
// meaning ohm for a resistance (where the capital "K" of "4K7" is kilo) and µH for an inductance
// ("4R7" = 4.7 µH, as inductors are marked). A bare prefix ("10k",
// "4.7u") is a prefix on the SI unit. Throws ParseError (empty, two numbers, unknown unit or
// prefix, unit of another dimension, NaN/inf/overflow, text after the unit, below 0 K).
double parse(std::string_view text, Dimension expected);

// Parse with a default unit for bare numbers, e.g. a CSV column headed "L (uH)": parse("4.7",
// inductance, "uH") = 4.7e-6. A unit written in the cell wins over the column's.
double parse(std::string_view text, Dimension expected, std::string_view default_unit);

struct FormatOptions {
    int significant = 3; // significant digits
    bool ascii = false;  // "uH", "mOhm", "degC" instead of "µH", "mΩ", "°C"
    bool unit = true;    // append the unit
};

// Engineering notation: 4.7e-6 H -> "4.70 µH", 0.035 Ω -> "35.0 mΩ", 1.2 A -> "1.20 A",
// 215e3 Hz -> "215 kHz", 328.15 K -> "55.0 °C", 0.2 ratio -> "20.0 %".
// Non-finite values print "n/a". Lengths print in mm, areas in mm², volumes in mm³, battery
// capacities in mAh/Ah. With unit = false the number is printed without prefix in unit_symbol(d),
// so parse(format(x, d, {.unit = false}), d, unit_symbol(d)) recovers x to the digits printed.
std::string format(double value, Dimension d, FormatOptions options = {});

// The number alone in a given unit, e.g. for a CSV column headed "L (uH)": format_in(4.7e-6,
// inductance, "uH") = "4.70"; the inverse of parse(text, d, unit). Throws ParseError for a unit
// that does not belong to the dimension.
std::string format_in(double value, Dimension d, std::string_view unit, int significant = 3);

// Absolute temperature helpers.
constexpr double zero_celsius = 273.15;
constexpr double celsius(double c) { return c + zero_celsius; }
constexpr double to_celsius(double kelvin) { return kelvin - zero_celsius; }

// IEC 60063 preferred-number series (E6, E12, E24), mantissas in [1, 10), hard-coded from the
// standard because rounding 10^(i/n) does not reproduce them. Throws for other n.
std::span<const double> e_series(int n);

} // namespace coilsieve::units
