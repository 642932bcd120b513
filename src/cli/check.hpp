#pragma once
// `coilsieve check DESIGN.json --inductor ID --diode ID`: one pair on one design, every corner and
// every limit, optionally compared with the time-domain simulator and written out as a waveform
// or an ngspice netlist.

#include "cli/context.hpp"

#include <string>
#include <vector>

namespace CLI {
class App;
}

namespace coilsieve::cli {

struct CheckOptions {
    std::string design_file;
    std::string inductor;  // ID or SOURCE:ID
    std::string diode;     // ID or SOURCE:ID
    std::string band;      // "25%" (of the target current) or "175mA"; "" = the design's
    std::string frequency; // "300kHz"; "" = the design's (PWM)
    bool simulate = false;
    std::string waveform; // CSV path for the nominal corner's steady-state waveform
    std::string netlist;  // ngspice netlist path for the nominal corner
    bool json = false;
};

// Exit code 0 when the pair meets every limit, 1 when it breaks one (or on a data error).
int run_check(const CheckOptions& o, Context& ctx);

std::vector<Command> setup_check(CLI::App& root);

} // namespace coilsieve::cli
