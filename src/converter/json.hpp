#pragma once
// JSON form of the converter's result records (SI units, temperatures in kelvin), the same keys
// as the C++ fields. Used by `check --json` and by the ranking's output.

#include "converter/evaluate.hpp"

#include <nlohmann/json.hpp>
#include <string_view>

namespace coilsieve::converter {

std::string_view to_string(CornerStatus s); // "ok", "no_regulation", ...

void to_json(nlohmann::json& j, const Setting& s);
void to_json(nlohmann::json& j, const Losses& l);
void to_json(nlohmann::json& j, const CornerResult& r);
void to_json(nlohmann::json& j, const LimitCheck& k);
// {"corners": [...], "checks": [...], "violations": [...], "feasible", "loss_nominal",
//  "efficiency_nominal"}
void to_json(nlohmann::json& j, const PairEvaluation& e);

} // namespace coilsieve::converter
