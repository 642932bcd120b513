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
    dimensionless,        // plain number, no unit allowed (except none)
    ratio,                // "20%" -> 0.2, "0.2" -> 0.2
    inductance,           // H
    resistance,           // Ω, ohm, R (IEC 60062 "4R7")
    current,              // A
    voltage,              // V
    capacitance,          // F
    frequency,            // Hz
    power,                // W
    time,                 // s
    temperature,          // absolute: "55C", "55 °C", "328.15K"; bare numbers are °C
    temperature_difference, // K (or °C as a difference)
    length,               // m, mm
    area,                 // m², mm²
    volume,               // m³, mm³
    charge,               // C (coulomb): gate charge, Qrr, battery charge
    energy,               // J
    thermal_resistance,   // K/W
    mass,                 // g, kg
    battery_capacity,     // Ah, mAh -> stored in coulomb
    voltage_per_kelvin,   // V/K, mV/K
};

// Name of a dimension for messages ("inductance").
std::string_view dimension_name(Dimension d);
// The SI unit symbol printed for a dimension ("H", "Ω", "°C").
std::string_view unit_symbol(Dimension d, bool ascii = false);

// Thrown for text that is not a valid quantity; what() quotes the input and says what would be right.
class ParseError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

// Parse "4.7uH", "4u7", "4R7", "2k2", "R047", "35 mΩ", "4.7e-6", "20%", "55C".
// A bare number is in SI base units (temperatures: °C). Throws ParseError.
double parse(std::string_view text, Dimension expected);

// Parse with a default unit for bare numbers, e.g. a CSV column headed "L (uH)": parse("4.7",
// inductance, "uH") = 4.7e-6. A unit written in the cell wins over the column's.
double parse(std::string_view text, Dimension expected, std::string_view default_unit);

struct FormatOptions {
    int significant = 3;  // significant digits
    bool ascii = false;   // "uH", "mOhm", "degC" instead of "µH", "mΩ", "°C"
    bool unit = true;     // append the unit
};

// Engineering notation: 4.7e-6 H -> "4.7 µH", 0.035 Ω -> "35 mΩ", 1.2 A -> "1.20 A",
// 215e3 Hz -> "215 kHz", 328.15 K -> "55.0 °C", 0.2 ratio -> "20.0 %".
std::string format(double si_value, Dimension d, FormatOptions options = {});

// Absolute temperature helpers.
constexpr double zero_celsius = 273.15;
constexpr double celsius(double c) { return c + zero_celsius; }
constexpr double to_celsius(double kelvin) { return kelvin - zero_celsius; }

// IEC 60063 preferred-number series (E6, E12, E24), mantissas in [1, 10), hard-coded from the
// standard because rounding 10^(i/n) does not reproduce them. Throws for other n.
std::span<const double> e_series(int n);

} // namespace coilsieve::units
