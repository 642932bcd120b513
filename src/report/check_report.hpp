#pragma once
// The report of `coilsieve check`: one pair on one design, every corner, every limit, as text
// (aligned tables, notes, verdict) or JSON (SI units).

#include "converter/evaluate.hpp"
#include "design/design.hpp"
#include "parts/diode.hpp"
#include "parts/inductor.hpp"

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

namespace coilsieve::report {

// A corner as the time-domain simulator saw it, for the side-by-side comparison (--simulate).
struct SimulatedCorner {
    std::string corner;
    converter::CornerResult steady; // simulator's figures (same fields as the analytical record)
    double energy_balance = 0.0;    // simulator's (p_in − p_out − losses)/p_in
    std::string error;              // non-empty: the simulation failed with this message
};

struct CheckReportInput {
    const design::Design& design;
    const parts::Inductor& inductor;
    const parts::Diode& diode;
    const converter::Setting& setting;
    const converter::PairEvaluation& evaluation;
    std::vector<std::string> switch_defaults; // "rise_time = 20 ns (default)", ...
    std::vector<SimulatedCorner> simulated;   // empty without --simulate
    std::vector<std::string> notes;           // extra lines ("waveform written to ...")
};

// Tables of operating points, losses and temperatures, the limits with their worst margins,
// notes (defaults, assumed part values, estimated core loss), the verdict with one sentence per
// broken limit, and the cautions line.
std::string check_text(const CheckReportInput& in);

// {"design", "inductor", "diode", "setting", "corners", "feasible", "violations", "checks",
//  "loss_nominal", "efficiency_nominal", "switch_defaults", "assumed", "notes", "cautions"
//  [, "simulated"]}, numbers in SI units (temperatures in kelvin).
nlohmann::json check_json(const CheckReportInput& in);

// The caution printed under every check.
std::string check_caution(const design::Design& d);

} // namespace coilsieve::report
