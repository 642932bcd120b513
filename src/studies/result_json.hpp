#pragma once
// JSON form of a ranking: the `rank --json` output and the results stored with each study.
// SI numbers throughout (temperatures in kelvin, as `check --json`).

#include "studies/rank.hpp"

#include <nlohmann/json.hpp>
#include <string>

namespace coilsieve::studies {

struct PairFigures {
    double f_sw_min = 0.0, f_sw_max = 0.0; // Hz over the corners
    double t_hottest = 0.0;                // K, the hotter of inductor hot spot and diode junction
};
PairFigures figures_of(const converter::PairEvaluation& e);

// "SOURCE:ID" of each part of a pair: the key studies compare pairs by.
std::string pair_key(const PairResult& p, const std::vector<parts::Inductor>& inductors,
                     const std::vector<parts::Diode>& diodes);

nlohmann::json pair_to_json(const PairResult& p, const RankResult& r,
                            const std::vector<parts::Inductor>& inductors,
                            const std::vector<parts::Diode>& diodes, bool with_corners);
nlohmann::json counts_to_json(const RankCounts& c);
// {results: [...top N...], pareto: [...], counts: {...}, elapsed_s, pareto_axes, screened: [...]}
nlohmann::json results_to_json(const RankResult& r, const std::vector<parts::Inductor>& inductors,
                               const std::vector<parts::Diode>& diodes, bool with_corners);

} // namespace coilsieve::studies
