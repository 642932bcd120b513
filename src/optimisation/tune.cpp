#include "optimisation/tune.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <utility>

namespace coilsieve::optimisation {

SettingRange fixed_range(Variable v, double value) { return SettingRange{v, value, value, false}; }

converter::Setting make_setting(const SettingRange& r, const converter::Setting& base,
                                double value) {
    converter::Setting s = base;
    if (r.variable == Variable::band) s.band = value;
    else s.frequency = value;
    return s;
}

const converter::LimitCheck* least_margin(const converter::PairEvaluation& e) {
    const converter::LimitCheck* best = nullptr;
    for (const auto& c : e.checks)
        if (best == nullptr || c.margin < best->margin) best = &c;
    if (best == nullptr)
        for (const auto& c : e.violations)
            if (best == nullptr || c.margin < best->margin) best = &c;
    return best;
}

Scorer make_scorer(const parts::Inductor& l, const parts::Diode& diode, const design::Weights& w,
                   const Scales& s) {
    return [&l, &diode, w, s](const converter::Setting& setting, converter::PairEvaluation&& e) {
        TunedPoint p;
        p.setting = setting;
        p.objectives = objectives_of(e, l, diode);
        p.score = score(p.objectives, w, s);
        p.evaluation = std::move(e);
        return p;
    };
}

namespace {

constexpr double broken_nan_margin = -1e3; // a NaN margin counts as badly broken
// COBYLA accepts a constraint met to within its own round-off; aiming at a margin of 1e-6 keeps
// the points it converges to strictly inside every limit (the evaluation's verdict is strict).
constexpr double margin_target = 1e-6;

double safe_margin(double m) { return std::isnan(m) ? broken_nan_margin : m; }

// Maps u in [0, 1] to the setting value.
double from_unit(const SettingRange& r, double u) {
    u = std::clamp(u, 0.0, 1.0);
    if (r.log_scale) return r.lo * std::pow(r.hi / r.lo, u);
    return r.lo + (r.hi - r.lo) * u;
}

double to_unit(const SettingRange& r, double x) {
    if (r.log_scale) return std::clamp(std::log(x / r.lo) / std::log(r.hi / r.lo), 0.0, 1.0);
    return std::clamp((x - r.lo) / (r.hi - r.lo), 0.0, 1.0);
}

// Constraint vector: one entry per limit name seen in the pre-scan (its worst margin, negated)
// plus one for any other limit. Feasibility itself is the evaluation's own verdict.
struct ConstraintMap {
    std::map<std::string, std::size_t> index;
    std::vector<const std::string*> names; // by slot (keys of `index`, which stay put)
    // A pair's checks come in the same order at every setting: each position remembers its slot,
    // confirmed by one name comparison instead of a map search per check.
    std::vector<std::size_t> slot_at;

    void learn(const converter::PairEvaluation& e) {
        bool added = false;
        for (const auto& c : e.checks) added = index.try_emplace(c.limit, 0).second || added;
        for (const auto& c : e.violations) added = index.try_emplace(c.limit, 0).second || added;
        if (!added) return;
        names.clear();
        for (auto& [name, k] : index) {
            k = names.size();
            names.push_back(&name);
        }
        slot_at.clear();
    }
    std::size_t size() const { return index.size() + 1; }

    std::size_t slot(const converter::LimitCheck& c, std::size_t pos) {
        if (pos < slot_at.size() && slot_at[pos] < names.size() && *names[slot_at[pos]] == c.limit)
            return slot_at[pos];
        const auto it = index.find(c.limit);
        const std::size_t k = it == index.end() ? index.size() : it->second;
        if (pos >= slot_at.size()) slot_at.resize(pos + 1, names.size());
        slot_at[pos] = k;
        return k;
    }

    std::vector<double> constraints(const converter::PairEvaluation& e) {
        std::vector<double> g(size(), -1.0);
        std::size_t pos = 0;
        auto apply = [&](const converter::LimitCheck& c) {
            const std::size_t k = slot(c, pos++);
            // A limit the setting cannot move is no constraint for the solver: met, it stays
            // met; broken, the evaluation's verdict holds the pair infeasible anyway. Passed on
            // with the margin target, a part exactly at its limit (a 5 mm part under a 5 mm
            // ceiling) would look broken everywhere and mislead the solve.
            if (c.fixed) return;
            g[k] = std::max(g[k], margin_target - safe_margin(c.margin));
        };
        for (const auto& c : e.checks) apply(c);
        for (const auto& c : e.violations) apply(c);
        return g;
    }
};

double violation(const converter::PairEvaluation& e) {
    double v = 0.0;
    for (const auto& c : e.checks) v = std::max(v, -safe_margin(c.margin));
    for (const auto& c : e.violations) v = std::max(v, -safe_margin(c.margin));
    if (!e.feasible && v <= 0.0)
        v = std::numeric_limits<double>::min(); // infeasible for another reason
    return v;
}

bool better(const TunedPoint& a, const TunedPoint& b) {
    if (a.evaluation.feasible != b.evaluation.feasible) return a.evaluation.feasible;
    if (!a.evaluation.feasible && a.violation != b.violation) return a.violation < b.violation;
    return a.score < b.score;
}

} // namespace

std::vector<double> prescan_values(const SettingRange& range, const TuneOptions& options) {
    if (!(range.hi > range.lo)) return {range.lo};
    const int k = std::max(2, options.prescan_points);
    std::vector<double> v;
    v.reserve(static_cast<std::size_t>(k));
    for (int i = 0; i < k; ++i) v.push_back(from_unit(range, static_cast<double>(i) / (k - 1)));
    return v;
}

std::vector<TunedPoint> walk_hint(const SettingRange& range, const converter::Setting& base,
                                  const PairEvaluator& evaluate, const Scorer& scorer, double start,
                                  double toward) {
    std::vector<TunedPoint> out;
    if (!(range.hi > range.lo) || !(start >= range.lo && start <= range.hi)) return out;
    constexpr double step = 0.02; // of the range, in the tuner's unit coordinate
    auto eval_at = [&](double u) {
        const converter::Setting s = make_setting(range, base, from_unit(range, u));
        TunedPoint p = scorer(s, evaluate(s));
        p.violation = p.evaluation.feasible ? 0.0 : violation(p.evaluation);
        return p;
    };
    auto worst = [](const converter::PairEvaluation& e) {
        const converter::LimitCheck* w = nullptr;
        for (const auto& c : e.violations)
            if (w == nullptr || safe_margin(c.margin) < safe_margin(w->margin)) w = &c;
        return w;
    };
    auto margin_of = [](const converter::PairEvaluation& e, const converter::LimitCheck& like) {
        for (const auto& c : e.checks)
            if (c.limit == like.limit && c.corner == like.corner) return safe_margin(c.margin);
        return broken_nan_margin;
    };
    const double u0 = to_unit(range, start);
    out.push_back(eval_at(u0));
    const double dir = to_unit(range, toward) - u0;
    if (out.back().evaluation.feasible || !(std::abs(dir) > 0.0)) return out;
    const double sign = dir > 0.0 ? 1.0 : -1.0;
    const double u1 = std::clamp(u0 + sign * step, 0.0, 1.0);
    out.push_back(eval_at(u1));
    if (out.back().evaluation.feasible) return out;
    double u2 = u1 + 2.0 * sign * step;
    if (const auto* w0 = worst(out.front().evaluation)) {
        const double m0 = safe_margin(w0->margin);
        const double m1 = margin_of(out.back().evaluation, *w0);
        // Aim a little inside the limit: margins are not quite linear in the setting.
        if (m1 > m0 && m1 < 0.0) {
            const double target = 0.1 * std::abs(m0);
            const double u = u1 + (target - m1) * (u1 - u0) / (m1 - m0);
            // A secant through a nearly flat margin can aim far off: no further than eight
            // steps (a sixth of the range), a numerical choice.
            u2 = std::clamp(u, std::min(u1, u1 + 8.0 * sign * step),
                            std::max(u1, u1 + 8.0 * sign * step));
        }
    }
    out.push_back(eval_at(std::clamp(u2, 0.0, 1.0)));
    return out;
}

PrintedValue printed_value(const SettingRange& range, const converter::Setting& base,
                           const PairEvaluator& evaluate, double value) {
    if (!(value > 0.0) || !std::isfinite(value)) return {value, 0};
    auto rounded = [value](int digits) {
        const double step = std::pow(10.0, std::floor(std::log10(value)) - (digits - 1));
        return std::round(value / step) * step;
    };
    if (!(range.hi > range.lo)) { // a value given, not tuned: as few digits as show it
        for (int digits = 3; digits <= 8; ++digits)
            if (std::abs(rounded(digits) - value) <= 1e-9 * value) return {value, digits};
        return {value, 0};
    }
    for (int digits = 4; digits <= 6; ++digits) {
        const double nearest = rounded(digits);
        const double step = std::pow(10.0, std::floor(std::log10(value)) - (digits - 1));
        const double other = nearest >= value ? nearest - step : nearest + step;
        for (const double v : {nearest, other}) {
            if (v < range.lo || v > range.hi) continue;
            if (evaluate(make_setting(range, base, v)).feasible) return {v, digits};
        }
    }
    return {value, 0};
}

TuneResult tune(const SettingRange& range, const converter::Setting& base,
                const PairEvaluator& evaluate, const Scorer& scorer, const TuneOptions& options,
                std::span<const double> hints, std::span<const TunedPoint> visited) {
    TuneResult result;
    bool have_best = false;
    auto consider = [&](TunedPoint&& p) {
        ++result.evaluations;
        if (!std::isfinite(p.score)) p.evaluation.feasible = false;
        if (!have_best || better(p, result.best)) {
            result.best = std::move(p);
            have_best = true;
        }
    };
    auto eval_at = [&](double value) {
        converter::Setting s = make_setting(range, base, value);
        TunedPoint p = scorer(s, evaluate(s));
        p.violation = p.evaluation.feasible ? 0.0 : violation(p.evaluation);
        return p;
    };

    const bool fixed = !(range.hi > range.lo);
    const std::vector<double> values = prescan_values(range, options);
    const int k = static_cast<int>(values.size());
    ConstraintMap cmap;
    double best_u = 0.0;
    for (int i = 0; i < k; ++i) {
        const double u = fixed ? 0.0 : static_cast<double>(i) / (k - 1);
        TunedPoint p = eval_at(values[static_cast<std::size_t>(i)]);
        cmap.learn(p.evaluation);
        const bool improves = !have_best || better(p, result.best);
        consider(std::move(p));
        if (improves) best_u = u;
    }
    if (!fixed)
        for (double x : hints) {
            if (!(x >= range.lo && x <= range.hi)) continue;
            TunedPoint p = eval_at(x);
            cmap.learn(p.evaluation);
            const bool improves = better(p, result.best);
            consider(std::move(p));
            if (improves) best_u = to_unit(range, x);
        }
    if (!fixed)
        for (const TunedPoint& v : visited) {
            TunedPoint p = v;
            cmap.learn(p.evaluation);
            const bool improves = better(p, result.best);
            const double x =
                range.variable == Variable::band ? p.setting.band : p.setting.frequency;
            consider(std::move(p));
            if (improves) best_u = to_unit(range, x);
        }

    if (!fixed && options.solver.max_evaluations > 0) {
        Problem problem;
        problem.lower = {0.0};
        problem.upper = {1.0};
        problem.constraint_count = cmap.size();
        // COBYLA starts where the best point so far is: its value is known, not evaluated again
        // (when the setting comes out bit for bit the same).
        bool first = true;
        problem.evaluate = [&](std::span<const double> x) {
            const double value = from_unit(range, x[0]);
            if (std::exchange(first, false) && std::isfinite(result.best.score) &&
                make_setting(range, base, value) == result.best.setting) {
                PointValue v;
                v.objective = result.best.score;
                v.constraints = cmap.constraints(result.best.evaluation);
                v.feasible = result.best.evaluation.feasible;
                return v;
            }
            TunedPoint p = eval_at(value);
            PointValue v;
            v.objective = std::isfinite(p.score) ? p.score : 1e30;
            v.constraints = cmap.constraints(p.evaluation);
            v.feasible = p.evaluation.feasible;
            consider(std::move(p));
            return v;
        };
        SolverOptions so = options.solver;
        if (so.initial_step <= 0.0) so.initial_step = 0.5 / (k - 1);
        Solution sol = minimise_cobyla(problem, {best_u}, so);
        result.status = sol.status;
        result.solver_ran = true;
    }

    result.feasible = result.best.evaluation.feasible;
    if (result.feasible) {
        if (const auto* b = least_margin(result.best.evaluation)) {
            result.binding = *b;
            result.has_binding = true;
        }
    } else {
        const converter::LimitCheck* worst = nullptr;
        for (const auto& c : result.best.evaluation.violations)
            if (worst == nullptr || safe_margin(c.margin) < safe_margin(worst->margin)) worst = &c;
        if (worst == nullptr) worst = least_margin(result.best.evaluation);
        if (worst != nullptr) {
            result.binding = *worst;
            result.has_binding = true;
        }
    }
    return result;
}

} // namespace coilsieve::optimisation
