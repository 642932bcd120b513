#pragma once
// Loads a constant-current stage drives, as plain data, and their voltage at a current.

#include <string>
#include <variant>
#include <vector>

namespace coilsieve::loads {

// A string of `count` LEDs: V(I, T) = count * (vf + rd * (I - current) + vf_tempco * (T - 298.15
// K)).
struct LedString {
    int count = 1;
    double vf = 3.0;          // V per LED at `current`, 25 °C
    double rd = 0.0;          // Ω per LED, dynamic resistance
    double current = 0.0;     // A, target (rated) current
    double vf_tempco = -2e-3; // V/K per LED (common practice default)
};

enum class Chemistry { li_ion, li_ion_hv, lifepo4, lead_acid };

struct Battery {
    Chemistry chemistry = Chemistry::li_ion;
    int cells = 1;                    // in series
    double capacity = 0.0;            // C (coulomb; 1 Ah = 3600 C)
    double charge_current = 0.0;      // A, constant-current phase
    double termination_current = 0.0; // A (preset fraction of capacity when not given)
    double internal_resistance = 0.0; // Ω, whole pack
    double precharge_current = 0.0;   // A (preset when not given)
};

// A constant-voltage sink with series resistance driven at a target current.
struct Sink {
    double voltage = 0.0;    // V
    double resistance = 0.0; // Ω
    double current = 0.0;    // A, target
};

using Load = std::variant<LedString, Battery, Sink>;

// Per-cell voltages of a chemistry's charge profile, each with its source in load.cpp.
struct ChemistryPreset {
    double charge_voltage;       // V/cell, end of constant current (CV setpoint)
    double precharge_threshold;  // V/cell, below which pre-charge applies
    double precharge_fraction;   // of charge current
    double termination_fraction; // of capacity in A per Ah (C-rate), e.g. 0.05
    double empty_voltage;        // V/cell where a normal charge starts
    double tempco;               // V/K per cell applied to the charge voltage (lead-acid)
};
const ChemistryPreset& preset(Chemistry c);

// One point a charger (or lamp) runs at: the load seen as a voltage source with series resistance
// and the target average current there. `weight` is the fraction of time spent there.
struct LoadPoint {
    std::string name;     // "cc-start", "precharge", "nominal", ...
    double v0 = 0.0;      // V, EMF / knee voltage at the point's temperature
    double r = 0.0;       // Ω, series (dynamic or internal) resistance
    double current = 0.0; // A, target average current
    double weight = 1.0;  // fraction of time (battery charge profile); sums to 1 over points
};

// The load points of a load at a temperature (K). An LED string gives one point; a battery
// gives its charge profile (pre-charge, start and end of constant current, constant voltage).
std::vector<LoadPoint> load_points(const Load& load, double temperature);

// Target (nominal) average current of a load.
double target_current(const Load& load);

} // namespace coilsieve::loads
