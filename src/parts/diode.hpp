#pragma once
// A freewheeling diode as a catalog stores it: plain data in SI units, no behaviour.
// Its electrical model (Vf(I,T), capacitance, recovery, leakage) is parts/diode_model.hpp.

#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace coilsieve::parts {

enum class DiodeTechnology { schottky, sic_schottky, ultrafast, fast, standard };

// One datasheet point of the forward characteristic.
struct ForwardPoint {
    double vf = 0.0;             // V
    double current = 0.0;        // A
    double temperature = 298.15; // K
};

// SPICE diode-model parameters (open SPICE names, ngspice conventions).
struct SpiceForward {
    double is = 0.0; // A
    double n = 1.0;
    double rs = 0.0;  // Ω
    double eg = 1.11; // eV
    double xti = 3.0;
};

struct SpiceCapacitance {
    double cjo = 0.0; // F
    double vj = 1.0;  // V
    double m = 0.5;
};

struct Diode {
    std::string id;
    std::string source;
    DiodeTechnology technology = DiodeTechnology::schottky;
    double vrrm = 0.0;                 // V
    double if_avg = 0.0;               // A, average forward current rating
    std::optional<double> ifsm;        // A, surge rating
    std::vector<ForwardPoint> forward; // datasheet points (at least one, or `spice`)
    std::optional<SpiceForward> spice; // fitted or given
    // Junction capacitance: a datasheet point (cj at cj_vr) and/or SPICE CJO/VJ/M.
    std::optional<double> cj;    // F
    std::optional<double> cj_vr; // V
    std::optional<SpiceCapacitance> spice_cap;
    // Reverse recovery (PN parts; zero for Schottky).
    std::optional<double> trr;         // s
    std::optional<double> qrr;         // C, at `recovery_if`
    std::optional<double> recovery_if; // A, test forward current of trr/qrr
    std::optional<double> tt;          // s, SPICE transit time
    // Reverse leakage at a stated voltage and temperature.
    std::optional<double> ir;             // A
    std::optional<double> ir_vr;          // V
    std::optional<double> ir_temperature; // K
    double rth_ja = 0.0;                  // K/W, junction to ambient on the stated board
    double tj_max = 423.15;               // K
    std::string package; // JEDEC outline name where one exists ("SMA", "SOD-123", ...)
    double length = 0.0; // m
    double width = 0.0;  // m
    double height = 0.0; // m
    std::optional<double> price;
    std::string currency;
    std::string notes;
    std::vector<std::string> assumed; // fields that took a default

    double volume() const { return length * width * height; }
    double footprint() const { return length * width; }
    bool is_assumed(std::string_view field) const;
};

std::string_view to_string(DiodeTechnology t);
std::optional<DiodeTechnology> technology_from_string(std::string_view s);
std::vector<std::string_view> technology_names();

// Body dimensions (m) of a known package outline; nullopt if the name is not known.
struct PackageOutline {
    std::string_view name;
    double length, width, height; // m
    double rth_ja;                // K/W typical on a minimum pad (common practice)
    bool smd;
};
std::optional<PackageOutline> package_outline(std::string_view name);

} // namespace coilsieve::parts
