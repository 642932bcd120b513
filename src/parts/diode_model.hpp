#pragma once
// The electrical and thermal behaviour of one diode, prepared once from its catalog record.
// SPICE diode equations as in ngspice (IS, N, RS, EG, XTI, CJO, VJ, M, TT).

#include "parts/diode.hpp"

namespace coilsieve::parts {

// Thermal voltage kT/q from the exact SI constants (k = 1.380649e-23 J/K, q = 1.602176634e-19 C).
double thermal_voltage(double temperature);

// The forward law at one junction temperature, IS(T) and N·Vt(T) evaluated once: for callers that
// need V_f at many currents and few temperatures. DiodeModel::vf gives the same numbers.
struct ForwardLaw {
    double nvt = 0.0; // V, N·Vt(T)
    double is = 1.0;  // A, IS(T)
    double rs = 0.0;  // Ω
    // Forward voltage at current i (A), including RS; 0 at i <= 0.
    double vf(double current) const;
};

struct DiodeModel {
    SpiceForward fwd;     // at tnom
    double tnom = 300.15; // K, ngspice default TNOM 27 °C
    SpiceCapacitance cap;
    double tt = 0.0;                // s
    double qrr_ref = 0.0;           // C at if_ref (0 for Schottky)
    double if_ref = 0.0;            // A
    double ir_ref = 0.0;            // A leakage at vr_ref, t_ref
    double vr_ref = 0.0;            // V
    double t_ref = 298.15;          // K
    double leakage_doubling = 10.0; // K per doubling (common practice for Schottky)
    double rth_ja = 0.0;            // K/W
    double tj_max = 423.15;         // K
    DiodeTechnology technology = DiodeTechnology::schottky;

    // IS at temperature T (ngspice temperature law).
    double saturation_current(double temperature) const;
    // Forward voltage at current i (A, > 0) and junction temperature T, including RS.
    double vf(double current, double temperature) const;
    ForwardLaw forward_at(double temperature) const;
    // Charge (C) the junction capacitance holds at reverse voltage vr (>= 0).
    double junction_charge(double vr) const;
    // Energy (J) ∫ v·C(v) dv from 0 to vr, lost per cycle when the junction is charged hard.
    double capacitive_energy(double vr) const;
    // Reverse-recovery charge (C) after conducting i_f (0 for Schottky).
    double recovery_charge(double i_f) const;
    // Reverse leakage (A) at vr and junction temperature T.
    double leakage(double vr, double temperature) const;
};

// Fit IS, N, RS (and EG when a hot point is given) to datasheet points, with technology defaults
// for what the points cannot fix. Throws std::invalid_argument naming the part when impossible.
SpiceForward fit_forward(const Diode& part);

DiodeModel make_model(const Diode& part);

} // namespace coilsieve::parts
