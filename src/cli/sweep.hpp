#pragma once
// `coilsieve sweep DESIGN.json --vary PATH=FROM..TO:STEPS`: rank at each value of one numeric
// design field and show how the best pair changes.

#include "cli/context.hpp"
#include "cli/rank.hpp"
#include "units/quantity.hpp"

#include <string>
#include <vector>

namespace coilsieve::cli {

struct SweepOptions {
    std::string vary;    // "load.current=0.35A..1.5A:8"
    RankCliOptions rank; // design file, limits, weights, sources, locks, --json/--csv
};

struct SweepSpec {
    std::vector<std::string> path; // JSON path into the design file, e.g. {"load", "current"}
    units::Dimension dimension = units::Dimension::dimensionless;
    double from = 0.0, to = 0.0; // SI
    int steps = 2;
};

// Parses the --vary text against a design (the field must exist and be numeric).
SweepSpec parse_sweep(std::string_view text, const design::Design& d);
// The value of step `i` (0-based): FROM and TO included, evenly spaced.
double step_value(const SweepSpec& s, int i);
// The design with the field at `value` (SI). Throws UsageError when the design rejects it.
design::Design with_value(const design::Design& d, const SweepSpec& s, double value);

int run_sweep(const SweepOptions& o, Context& ctx);
std::vector<Command> setup_sweep(CLI::App& root);

} // namespace coilsieve::cli
