#pragma once
// `--why ID`: why an inductor or diode is not (or is) in the shortlist: screened out (limit,
// corner, numbers), infeasible with every partner (the most common broken limit), or feasible
// but outranked (by which pair, on which objectives).

#include "studies/rank.hpp"

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

namespace coilsieve::studies {

struct WhyReport {
    std::string verdict; // "screened", "infeasible", "outranked", "listed", "pareto-only"
    std::string text;    // plain sentences, one per line
    nlohmann::json json;
};

// Where `better` beats `worse`, in words, on the given objectives only (e.g. the Pareto axes when
// `better` dominates `worse`); "a lower weighted score" when on none.
std::string advantages(const optimisation::Objectives& better,
                       const optimisation::Objectives& worse,
                       const std::vector<design::Objective>& objectives);

// `main` is the ranking the question is about (run with `options`). Throws RankError for an id
// that is neither an inductor nor a diode of the catalog.
WhyReport explain_part(const design::Design& d, const std::vector<parts::Inductor>& inductors,
                       const std::vector<parts::Diode>& diodes, const RankResult& main,
                       const RankOptions& options, const PairEvaluatorFn& evaluate,
                       const std::string& id);

} // namespace coilsieve::studies
