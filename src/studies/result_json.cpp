#include "studies/result_json.hpp"

#include "converter/json.hpp"

#include <algorithm>
#include <cmath>

namespace coilsieve::studies {

PairFigures figures_of(const converter::PairEvaluation& e) {
    PairFigures f;
    bool first = true;
    for (const auto& c : e.corners) {
        if (c.status != converter::CornerStatus::ok) continue;
        f.f_sw_min = first ? c.f_sw : std::min(f.f_sw_min, c.f_sw);
        f.f_sw_max = first ? c.f_sw : std::max(f.f_sw_max, c.f_sw);
        f.t_hottest = std::max({f.t_hottest, c.t_inductor, c.tj_diode});
        first = false;
    }
    return f;
}

std::string pair_key(const PairResult& p, const std::vector<parts::Inductor>& inductors,
                     const std::vector<parts::Diode>& diodes) {
    const auto& l = inductors[p.inductor];
    const auto& d = diodes[p.diode];
    return l.source + ":" + l.id + " + " + d.source + ":" + d.id;
}

namespace {
nlohmann::json finite_or_null(double v) {
    return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr);
}
} // namespace

nlohmann::json pair_to_json(const PairResult& p, const RankResult& r,
                            const std::vector<parts::Inductor>& inductors,
                            const std::vector<parts::Diode>& diodes, bool with_corners) {
    const auto& l = inductors[p.inductor];
    const auto& d = diodes[p.diode];
    const auto& best = p.tune.best;
    const auto& o = best.objectives;
    nlohmann::json j;
    j["key"] = pair_key(p, inductors, diodes);
    if (p.rank > 0) j["rank"] = p.rank;
    else j["rank"] = nullptr;
    // The part ids, as `check --json` gives them; the figures beside them.
    j["inductor"] = l.id;
    j["diode"] = d.id;
    j["inductor_part"] = {{"id", l.id},
                          {"source", l.source},
                          {"inductance", l.inductance},
                          {"dcr", l.dcr_typ},
                          {"isat", l.isat},
                          {"irms", l.irms},
                          {"length", l.length},
                          {"width", l.width},
                          {"height", l.height},
                          {"price", l.price ? nlohmann::json(*l.price) : nlohmann::json(nullptr)}};
    // At the design's target current and 25 °C (PairResult::diode_vf); the datasheet's first
    // forward point when it was not computed.
    double vf = p.diode_vf;
    if (!(vf > 0.0) && !d.forward.empty()) vf = d.forward.front().vf;
    j["diode_part"] = {{"id", d.id},
                       {"source", d.source},
                       {"technology", std::string(parts::to_string(d.technology))},
                       {"vrrm", d.vrrm},
                       {"if_avg", d.if_avg},
                       {"vf", vf},
                       {"package", d.package},
                       {"price", d.price ? nlohmann::json(*d.price) : nlohmann::json(nullptr)}};
    nlohmann::json setting;
    if (r.range.variable == optimisation::Variable::band) setting["band"] = best.setting.band;
    else setting["frequency"] = best.setting.frequency;
    setting["capacitance"] = best.setting.capacitance ? nlohmann::json(*best.setting.capacitance)
                                                      : nlohmann::json(nullptr);
    j["setting"] = setting;
    j["objectives"] = {{"loss", finite_or_null(o.loss)},
                       {"efficiency", finite_or_null(o.efficiency)},
                       {"ripple", finite_or_null(o.ripple)},
                       {"size", o.size},
                       {"footprint", o.footprint},
                       {"margin", finite_or_null(o.margin)},
                       {"cost", o.cost ? nlohmann::json(*o.cost) : nlohmann::json(nullptr)}};
    j["score"] = finite_or_null(best.score);
    j["feasible"] = p.tune.feasible;
    j["pareto"] = p.pareto;
    const auto fig = figures_of(best.evaluation);
    j["f_sw"] = {{"min", fig.f_sw_min}, {"max", fig.f_sw_max}};
    j["t_hottest"] = fig.t_hottest;
    if (p.tune.has_binding)
        j["binding_limit"] = {{"limit", p.tune.binding.limit},
                              {"corner", p.tune.binding.corner},
                              {"value", p.tune.binding.value},
                              {"bound", p.tune.binding.bound},
                              {"margin", p.tune.binding.margin}};
    else j["binding_limit"] = nullptr;
    j["solver"] = {{"status", p.tune.solver_ran ? optimisation::to_string(p.tune.status) : "fixed"},
                   {"evaluations", p.tune.evaluations}};
    if (with_corners) j["corners"] = best.evaluation.corners;
    return j;
}

nlohmann::json counts_to_json(const RankCounts& c) {
    nlohmann::json screened = nlohmann::json::object();
    for (const auto& [k, v] : c.screened_by_limit) screened[k] = v;
    nlohmann::json infeasible = nlohmann::json::object();
    for (const auto& [k, v] : c.infeasible_by_limit) infeasible[k] = v;
    return {{"inductors", c.inductors},
            {"diodes", c.diodes},
            {"inductors_screened", c.inductors_screened},
            {"diodes_screened", c.diodes_screened},
            {"screened_by_limit", screened},
            {"pairs_total", c.pairs_total},
            {"pairs_considered", c.pairs_considered},
            {"pairs_pruned", c.pairs_pruned},
            {"pairs_probed", c.pairs_probed},
            {"pairs_tuned", c.pairs_tuned},
            {"pairs_feasible", c.pairs_feasible},
            {"pairs_infeasible", c.pairs_infeasible},
            {"infeasible_by_limit", infeasible},
            {"pareto", c.pareto},
            {"evaluations", c.evaluations},
            {"errors", c.errors}};
}

nlohmann::json results_to_json(const RankResult& r, const std::vector<parts::Inductor>& inductors,
                               const std::vector<parts::Diode>& diodes, bool with_corners) {
    nlohmann::json j;
    j["results"] = nlohmann::json::array();
    for (const auto& p : r.top)
        j["results"].push_back(pair_to_json(p, r, inductors, diodes, with_corners));
    j["pareto"] = nlohmann::json::array();
    for (const auto& p : r.pareto)
        j["pareto"].push_back(pair_to_json(p, r, inductors, diodes, false));
    j["pareto_axes"] = r.pareto_axes;
    j["counts"] = counts_to_json(r.counts);
    j["elapsed_s"] = r.elapsed_s;
    return j;
}

} // namespace coilsieve::studies
