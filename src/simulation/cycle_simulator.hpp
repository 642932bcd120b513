#pragma once
// Independent time-domain simulation of the buck constant-current stage, switching cycle by
// switching cycle: a check of the analytical engine (converter/evaluate.hpp), not a replacement.
//
// State: inductor current (and the output-capacitor voltage when a capacitor is present). Each
// interval is integrated with an error-controlled Dormand–Prince RK5(4) on di/dt = v_L / L(i)
// with the nonlinear L(i) and the SPICE diode Vf(i, T) (nothing linearised); switching events
// (thresholds, delay expiry, clock edges, diode current reaching zero) are located on the dense
// output. The periodic steady state is found by Newton shooting on the cycle map (with the PWM
// duty as an extra unknown), with brute-force cycling as the fallback.
//
// Temperatures are inputs (see circuit.hpp): this is an electrical check. Core loss, switching,
// recovery, capacitive and leakage losses are not a time-domain matter and use the same
// closed forms as the analytical engine (part models and domain-notes formulas).

#include "converter/operating_point.hpp"
#include "simulation/circuit.hpp"

#include <filesystem>
#include <iosfwd>
#include <optional>
#include <vector>

namespace coilsieve::simulation {

struct WaveformSample {
    double t = 0.0;      // s from the start of the recorded cycle(s)
    double i_l = 0.0;    // A, inductor current
    double v_sw = 0.0;   // V, switch node (diode cathode) to ground
    double i_d = 0.0;    // A, diode forward current
    double i_load = 0.0; // A, current into the load (after the output capacitor)
};
using Waveform = std::vector<WaveformSample>;

struct SimulationOptions {
    double rtol = 1e-9;         // relative error per step on the state
    int waveform_cycles = 1;    // steady-state cycles recorded (0: none)
    double shooting_tol = 1e-9; // relative residual of the periodic steady state
    int max_newton = 40;
    int max_brute_cycles = 200000;
};

struct SimulationResult {
    converter::CornerResult steady;  // same figures as the analytical engine's record
    double p_in = 0.0;               // W from the supply into the simulated circuit (vin·<i_sw>)
    double p_circuit_loss = 0.0;     // W dissipated in the circuit's resistances, diode and ESR
    double capacitor_esr_loss = 0.0; // W (also steady.losses.capacitor)
    double energy_balance = 0.0;     // (p_in − p_out − p_circuit_loss)/p_in of the waveform
    int newton_iterations = 0;
    int cycles_simulated = 0;
    bool used_fallback = false;
    Waveform waveform; // steady-state cycle(s), starting at a switch turn-on
};

// Steady state of a resolved circuit. `guess` (an analytical result) starts the shooting.
// The target duty for PWM is found by the simulator itself.
SimulationResult simulate(const Circuit& k, const SimulationOptions& opt = {},
                          const converter::CornerResult* guess = nullptr);

// Steady state of a design corner at given part temperatures; losses that are not a time-domain
// matter (core, switching, recovery, capacitive, leakage) come from the part models.
SimulationResult simulate_corner(const design::Design& d, const parts::InductorModel& l,
                                 const parts::DiodeModel& diode, const converter::Corner& c,
                                 const converter::Setting& s, const Temperatures& t,
                                 const SimulationOptions& opt = {},
                                 const converter::CornerResult* guess = nullptr);

// Same, at the temperatures of an analytical result, started from it.
SimulationResult simulate_corner(const design::Design& d, const parts::InductorModel& l,
                                 const parts::DiodeModel& diode, const converter::Corner& c,
                                 const converter::Setting& s,
                                 const converter::CornerResult& analytical,
                                 const SimulationOptions& opt = {});

// Start-up from rest: inductor current zero, output capacitor at the load's knee voltage v0
// (a battery holds it there; for an LED string it is the state once the capacitor has charged to
// the knee). PWM runs open loop at the steady-state duty (`duty`, 0 = find it first).
struct StartupResult {
    double time_to_regulation = 0.0; // s, end of the first cycle whose average load current is
                                     // within 2 % of the target
    double first_peak = 0.0;         // A, peak inductor current of the first cycle
    double first_peak_over_isat = 0.0;
    int cycles = 0;
    bool regulated = false; // false: not within 2 % after the cycle limit
    Waveform waveform;      // the first cycles (up to `record_cycles`)
};
StartupResult simulate_startup(const Circuit& k, double duty = 0.0, int max_cycles = 20000,
                               int record_cycles = 0);

// Waveform as CSV: header "t_s,i_l_A,v_sw_V,i_d_A,i_load_A", one sample per line.
void write_waveform_csv(std::ostream& out, const Waveform& w);
// Throws std::runtime_error naming the path when it cannot be written.
void write_waveform_csv(const std::filesystem::path& path, const Waveform& w);

} // namespace coilsieve::simulation
