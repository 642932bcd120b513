#include "studies/why.hpp"

#include "studies/pareto.hpp"
#include "studies/result_json.hpp"
#include "units/quantity.hpp"

#include <algorithm>
#include <map>
#include <sstream>

namespace coilsieve::studies {

namespace u = coilsieve::units;

namespace {

std::string objective_line(const optimisation::Objectives& o) {
    std::string s = "loss " + u::format(o.loss, u::Dimension::power) + ", size " +
                    u::format(o.size, u::Dimension::volume) + ", ripple " +
                    u::format(o.ripple, u::Dimension::ratio) + ", Isat margin " +
                    u::format(o.margin, u::Dimension::ratio);
    if (o.cost) s += ", cost " + u::format(*o.cost, u::Dimension::dimensionless);
    return s;
}

} // namespace

std::string advantages(const optimisation::Objectives& better,
                       const optimisation::Objectives& worse,
                       const std::vector<design::Objective>& objectives) {
    const auto counts = [&](design::Objective o) {
        return std::find(objectives.begin(), objectives.end(), o) != objectives.end();
    };
    std::vector<std::string> v;
    if (counts(design::Objective::loss) && better.loss < worse.loss)
        v.push_back("lower loss (" + u::format(better.loss, u::Dimension::power) + " vs " +
                    u::format(worse.loss, u::Dimension::power) + ")");
    if (counts(design::Objective::size) && better.size < worse.size)
        v.push_back("smaller (" + u::format(better.size, u::Dimension::volume) + " vs " +
                    u::format(worse.size, u::Dimension::volume) + ")");
    if (counts(design::Objective::ripple) && better.ripple < worse.ripple)
        v.push_back("less ripple (" + u::format(better.ripple, u::Dimension::ratio) + " vs " +
                    u::format(worse.ripple, u::Dimension::ratio) + ")");
    if (counts(design::Objective::margin) && better.margin > worse.margin)
        v.push_back("more Isat margin (" + u::format(better.margin, u::Dimension::ratio) + " vs " +
                    u::format(worse.margin, u::Dimension::ratio) + ")");
    if (counts(design::Objective::cost) && better.cost && worse.cost && *better.cost < *worse.cost)
        v.push_back("cheaper (" + u::format(*better.cost, u::Dimension::dimensionless) + " vs " +
                    u::format(*worse.cost, u::Dimension::dimensionless) + ")");
    std::string s;
    for (std::size_t i = 0; i < v.size(); ++i) s += (i ? ", " : "") + v[i];
    return s.empty() ? "a lower weighted score" : s;
}

namespace {

// The objectives the weighted score counts.
std::vector<design::Objective> weighted(const design::Design& d) {
    std::vector<design::Objective> out;
    for (const auto o : design::all_objectives())
        if (design::weight_of(d.weights, o) > 0.0) out.push_back(o);
    return out;
}

} // namespace

WhyReport explain_part(const design::Design& d, const std::vector<parts::Inductor>& inductors,
                       const std::vector<parts::Diode>& diodes, const RankResult& main,
                       const RankOptions& options, const PairEvaluatorFn& evaluate,
                       const std::string& id) {
    WhyReport w;
    std::ostringstream os;
    const auto li = find_inductor(inductors, id);
    const auto di = find_diode(diodes, id);
    if (li.empty() && di.empty())
        throw RankError("--why " + id + ": no inductor or diode with this id in the catalog");
    const bool is_inductor = !li.empty();
    const std::size_t index = is_inductor ? li.front() : di.front();
    const std::string kind = is_inductor ? "inductor" : "diode";
    const std::string full = is_inductor ? inductors[index].source + ":" + inductors[index].id
                                         : diodes[index].source + ":" + diodes[index].id;
    w.json["part"] = full;
    w.json["kind"] = kind;

    // Screened out?
    for (const auto& s : main.screened)
        if (s.inductor == is_inductor && s.index == index) {
            w.verdict = "screened";
            os << kind << " " << full << " was screened out before pairing:\n";
            nlohmann::json reasons = nlohmann::json::array();
            for (const auto& r : s.reasons) {
                os << "  " << r.limit << (r.corner.empty() ? "" : " at corner " + r.corner) << ": "
                   << r.message << "\n";
                reasons.push_back({{"limit", r.limit},
                                   {"corner", r.corner},
                                   {"value", r.value},
                                   {"bound", r.bound},
                                   {"message", r.message}});
            }
            w.json["verdict"] = w.verdict;
            w.json["reasons"] = reasons;
            w.text = os.str();
            return w;
        }
    const auto& used = is_inductor ? main.inductors_used : main.diodes_used;
    if (std::find(used.begin(), used.end(), index) == used.end()) {
        w.verdict = "excluded";
        os << kind << " " << full << " was not considered: a --lock option excluded it.\n";
        w.json["verdict"] = w.verdict;
        w.text = os.str();
        return w;
    }

    // Every pair of this part, tuned.
    RankOptions o = options;
    o.exhaustive = true;
    o.keep_all = true;
    o.progress = nullptr;
    if (is_inductor) o.lock_inductor = full;
    else o.lock_diode = full;
    const RankResult row = rank_pairs(d, inductors, diodes, o, evaluate);
    std::size_t feasible = 0;
    std::map<std::string, std::size_t> broken;
    std::map<std::string, std::string> example;
    const PairResult* best = nullptr;
    for (const auto& p : row.all) {
        if (p.tune.feasible) {
            ++feasible;
            if (best == nullptr || p.tune.best.score < best->tune.best.score ||
                (p.tune.best.score == best->tune.best.score &&
                 pair_before(p, *best, inductors, diodes)))
                best = &p;
        } else if (p.tune.has_binding) {
            ++broken[p.tune.binding.limit];
            if (!example.count(p.tune.binding.limit))
                example[p.tune.binding.limit] = p.tune.binding.message;
        }
    }
    w.json["partners_tuned"] = row.all.size();
    w.json["partners_feasible"] = feasible;
    if (best == nullptr) {
        w.verdict = "infeasible";
        os << kind << " " << full << " is infeasible with every partner (" << row.all.size()
           << " tuned";
        if (row.counts.diodes_screened + row.counts.inductors_screened > 0)
            os << "; partners screened out before pairing: "
               << row.counts.diodes_screened + row.counts.inductors_screened;
        os << ").\n";
        if (!broken.empty()) {
            auto top = std::max_element(broken.begin(), broken.end(),
                                        [](auto& a, auto& b) { return a.second < b.second; });
            os << "  Most common broken limit: " << top->first << " (" << top->second
               << " pairs), e.g. " << example[top->first] << "\n";
            nlohmann::json b = nlohmann::json::object();
            for (auto& [k, n] : broken) b[k] = n;
            w.json["broken_limits"] = b;
            w.json["most_common"] = top->first;
        }
        w.json["verdict"] = w.verdict;
        w.text = os.str();
        return w;
    }

    const auto& bo = best->tune.best.objectives;
    const std::string best_key = pair_key(*best, inductors, diodes);
    w.json["best_pair"] = {{"key", best_key}, {"score", best->tune.best.score}};
    auto in_top = std::find_if(main.top.begin(), main.top.end(), [&](const PairResult& p) {
        return p.inductor == best->inductor && p.diode == best->diode;
    });
    bool on_front = false;
    for (const auto& p : main.pareto)
        if (p.inductor == best->inductor && p.diode == best->diode) on_front = true;
    if (in_top != main.top.end()) {
        w.verdict = "listed";
        os << kind << " " << full << " is listed: its best pair " << best_key << " is rank "
           << in_top->rank << " (score " << best->tune.best.score << ")"
           << (on_front ? ", on the Pareto set" : "") << ".\n";
    } else {
        w.verdict = on_front ? "pareto-only" : "outranked";
        os << kind << " " << full << " is feasible with " << feasible << " of " << row.all.size()
           << " partners; its best pair " << best_key << " scores " << best->tune.best.score << " ("
           << objective_line(bo) << ").\n";
        if (!main.top.empty()) {
            const auto& last = main.top.back();
            os << "  Outranked: the last listed pair, rank " << last.rank << " "
               << pair_key(last, inductors, diodes) << ", scores " << last.tune.best.score
               << " with " << advantages(last.tune.best.objectives, bo, weighted(d)) << ".\n";
            const auto& first = main.top.front();
            os << "  The best pair " << pair_key(first, inductors, diodes) << " scores "
               << first.tune.best.score << " with "
               << advantages(first.tune.best.objectives, bo, weighted(d)) << ".\n";
            w.json["outranked_by"] = pair_key(last, inductors, diodes);
        }
    }
    if (!on_front) {
        const auto v = pareto_vector(bo, pareto_objectives(d));
        for (const auto& p : main.pareto)
            if (dominates(pareto_vector(p.tune.best.objectives, pareto_objectives(d)), v)) {
                os << "  Not on the Pareto set: " << pair_key(p, inductors, diodes)
                   << " is at least as good on every axis, with "
                   << advantages(p.tune.best.objectives, bo, pareto_objectives(d)) << ".\n";
                w.json["dominated_by"] = pair_key(p, inductors, diodes);
                break;
            }
    } else if (w.verdict != "listed") {
        os << "  It is on the Pareto set: no pair beats it on every axis.\n";
    }
    w.json["verdict"] = w.verdict;
    w.text = os.str();
    return w;
}

} // namespace coilsieve::studies
