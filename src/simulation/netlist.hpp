#pragma once
// The converter written as an ngspice netlist: the same circuit the cycle simulator solves
// (simulation/circuit.hpp), for an independent check with a general-purpose simulator.
//
// Switch: voltage-controlled switch `S` (model SW, RON = R_on). Hysteretic control: the SW
// model's own hysteresis (VT, VH) on a control voltage equal to minus the inductor current,
// delayed by a lossless transmission line (TD = comparator delay). PWM: a PULSE source.
// Inductor: an integrator equivalent that keeps the nonlinear L(i): a 1 F capacitor holds the
// current (1 V = 1 A), charged by v_L / L(i); a B-source forces that current through the
// inductor branch. DCR, sense, load resistance as resistors; the diode as a SPICE `D` model
// (IS N RS CJO VJ M TT EG XTI, TNOM) at its junction temperature.

#include "simulation/circuit.hpp"

#include <optional>
#include <string>

namespace coilsieve::simulation {

struct NetlistOptions {
    double duty = 0.0;                // PWM duty (required for PWM)
    std::optional<double> i_initial;  // A, inductor current at t = 0 (default: an estimate)
    std::optional<double> vc_initial; // V, output-capacitor voltage at t = 0
    int measure_periods = 10;         // whole periods saved at the end
    int settle_periods = 0;           // periods before those (0: from the time constants)
    double steps_per_period = 500.0;  // maximum time step = period / this
    std::string data_file = "coilsieve_wave.txt"; // wrdata output, relative to the run folder
};

// Period the netlist assumes for its time axis (PWM: 1/f; hysteretic: straight-line estimate).
double estimated_period(const Circuit& k);

// Netlist text for a resolved circuit. Throws std::invalid_argument for PWM without a duty.
std::string write_netlist(const Circuit& k, const NetlistOptions& o = {});

// Netlist of a design corner at the temperatures, duty and valley current of an analytical
// result (used by `coilsieve check --netlist`).
std::string write_netlist(const design::Design& d, const parts::InductorModel& l,
                          const parts::DiodeModel& diode, const converter::Corner& c,
                          const converter::Setting& s, const converter::CornerResult& at,
                          NetlistOptions o = {});

} // namespace coilsieve::simulation
