#pragma once
// The converter as one electrical circuit with every value resolved to a number: the common
// ground of the cycle simulator and the SPICE netlist, so both simulate the very same circuit.

#include "converter/operating_point.hpp"
#include "design/design.hpp"
#include "parts/diode_model.hpp"
#include "parts/inductor_model.hpp"

#include <optional>

namespace coilsieve::simulation {

// Part temperatures (K) the electrical simulation runs at. The simulators are electrical
// checks: they take temperatures from the analytical thermal solution (or a fixed value) and
// do not solve the thermal problem themselves.
struct Temperatures {
    double inductor = 298.15; // copper hot spot (DCR)
    double diode = 298.15;    // junction (Vf)
    double sw = 298.15;       // switch (R_on)
};

// Temperatures of an analytical corner result (inductor hot spot, junction, switch).
Temperatures temperatures_from(const converter::CornerResult& r);

struct Circuit {
    double vin = 0.0;     // V
    double r_on = 0.0;    // Ω at the switch temperature
    double r_sense = 0.0; // Ω
    double dcr = 0.0;     // Ω at the inductor temperature
    // Inductor: L(i) = l0 / (1 + a·|i/isat|^p); l0 already includes the tolerance scale.
    double l0 = 0.0, isat = 1.0, rolloff_a = 0.0, rolloff_p = 6.0;
    // Diode (SPICE): IS at tnom, N, RS, EG, XTI; evaluated at `diode_temperature`.
    parts::SpiceForward diode;
    double diode_tnom = 300.15;
    double diode_temperature = 298.15;
    parts::SpiceCapacitance diode_cap; // netlist only (the cycle simulator has no capacitance)
    double diode_tt = 0.0;             // netlist only
    // Load: V = v0 + r·i, optional C with ESR across it.
    double v0 = 0.0, r_load = 0.0;
    double cap = 0.0, cap_esr = 0.0; // cap = 0: no capacitor
    // Control.
    design::ControlMode mode = design::ControlMode::hysteretic;
    double i_target = 0.0;
    double i_lo = 0.0, i_hi = 0.0; // hysteretic thresholds (A)
    double delay = 0.0;            // s, comparator + driver delay (hysteretic)
    double frequency = 0.0;        // Hz (PWM)

    double inductance(double i) const;
    // Saturation current IS(T) at the diode temperature (ngspice temperature law).
    double diode_is() const;
    // Forward voltage at current i >= 0 (SPICE: N·Vt·ln(1 + i/IS(T)) + i·RS).
    double vf(double i) const;
    // True when the output capacitor changes anything (a capacitor across r = 0 does not).
    bool has_capacitor() const { return cap > 0.0 && r_load > 0.0; }
};

// Resolve a design, parts, corner and setting into a circuit. Throws std::invalid_argument when
// the circuit cannot switch (non-positive inductance, lower threshold <= 0, missing frequency).
Circuit make_circuit(const design::Design& d, const parts::InductorModel& l,
                     const parts::DiodeModel& diode, const converter::Corner& c,
                     const converter::Setting& s, const Temperatures& t);

} // namespace coilsieve::simulation
