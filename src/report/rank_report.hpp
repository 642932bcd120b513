#pragma once
// The ranked shortlist as text (aligned table with a footer), JSON and CSV.

#include "design/design.hpp"
#include "studies/rank.hpp"

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

namespace coilsieve::report {

struct RankReportInput {
    const design::Design& design;
    const std::vector<parts::Inductor>& inductors;
    const std::vector<parts::Diode>& diodes;
    const studies::RankResult& result;
    std::string study_name; // "" when not saved
};

// Table of the top N, then the counts footer and the cautions line.
std::string rank_text(const RankReportInput& in);
// {results: [...with corners...], pareto, counts, elapsed_s, study}
nlohmann::json rank_json(const RankReportInput& in);
// One row per listed pair with every objective (SI units in the headers).
std::string rank_csv(const RankReportInput& in);

// Counts footer alone (also used when nothing is feasible).
std::string rank_footer(const studies::RankResult& r);
// "No pair meets every limit ..." with which limits removed everything.
std::string no_feasible_text(const studies::RankResult& r);

// The cautions printed under every ranking.
std::string cautions(const design::Design& d);

} // namespace coilsieve::report
