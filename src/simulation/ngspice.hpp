#pragma once
// Run ngspice in batch mode on a netlist from simulation/netlist.hpp and measure the converter's
// steady state over whole periods at the end of the run.

#include "simulation/circuit.hpp"
#include "simulation/netlist.hpp"

#include <string>
#include <vector>

namespace coilsieve::simulation {

// True when `executable` can be run (found on PATH or as a path).
bool ngspice_available(const std::string& executable = "ngspice");

struct NgspiceRun {
    int exit_status = 0;
    std::string log;                          // ngspice's stdout + stderr
    std::vector<std::vector<double>> columns; // time, then each saved vector
};

// Run `ngspice -b` on the netlist in a fresh temporary folder (removed afterwards) and read the
// wrdata file `data_file`. Throws std::runtime_error with ngspice's own words when ngspice is
// missing, fails, or writes no data.
NgspiceRun run_ngspice(const std::string& netlist, const std::string& data_file,
                       const std::string& executable = "ngspice");

// What ngspice says about the steady state, over whole periods (the same definitions as
// converter::CornerResult; losses computed from the waveforms: ∫ i²R dt, ∫ v_d·i_d dt).
struct SpiceMeasurement {
    int periods = 0;
    double f_sw = 0.0, t_on = 0.0, duty = 0.0;
    double il_avg = 0.0, il_peak = 0.0, il_valley = 0.0, il_ripple_pp = 0.0, il_rms = 0.0;
    double load_i_avg = 0.0, load_ripple_pp = 0.0;
    double id_avg = 0.0, id_rms = 0.0, isw_rms = 0.0;
    double copper_dc = 0.0;         // DCR·<i²>
    double diode_conduction = 0.0;  // <v_d·i_d>
    double switch_conduction = 0.0; // R_on·<i_sw²>
    double sense = 0.0;             // R_sense·<i²>
    double p_in = 0.0, p_out = 0.0;
    double v_sw_min = 0.0; // V, lowest switch-node voltage (diode clamp)
};

// Measure the last `periods` whole periods of a run of write_netlist(k, ...).
SpiceMeasurement measure(const Circuit& k, const NgspiceRun& run, int periods);

// Netlist, run and measurement in one call.
SpiceMeasurement simulate_ngspice(const Circuit& k, const NetlistOptions& o = {},
                                  const std::string& executable = "ngspice");

} // namespace coilsieve::simulation
