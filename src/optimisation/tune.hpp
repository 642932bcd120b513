#pragma once
// Tuning the free setting of one inductor-diode pair: the hysteresis band (hysteretic control) or
// the switching frequency (PWM, on a log scale). A coarse 1-D pre-scan picks the start, then
// COBYLA refines it with every limit's worst-corner margin as an inequality constraint.

#include "converter/evaluate.hpp"
#include "design/design.hpp"
#include "optimisation/objectives.hpp"
#include "optimisation/solver.hpp"

#include <functional>
#include <span>
#include <string>
#include <vector>

namespace coilsieve::optimisation {

enum class Variable { band, frequency };

// The interval the free setting may take. lo == hi fixes it (no tuning).
struct SettingRange {
    Variable variable = Variable::band;
    double lo = 0.0; // A (band) or Hz (frequency)
    double hi = 0.0;
    bool log_scale = false;
};

// From the design's control range (band converted to amperes at the target current).
SettingRange setting_range(const design::Design& d);
// A fixed setting (a --band or --frequency from the command line).
SettingRange fixed_range(Variable v, double value);

// The setting the tuner evaluates for a value of the free variable.
converter::Setting make_setting(const SettingRange& r, const converter::Setting& base,
                                double value);

struct TuneOptions {
    int prescan_points = 8;
    SolverOptions solver{1e-4, 60, 0.0};
};

// One evaluated setting of a pair.
struct TunedPoint {
    converter::Setting setting;
    converter::PairEvaluation evaluation;
    Objectives objectives;
    double score = 0.0;
    double violation = 0.0; // largest broken margin as a positive number (0 when feasible)
};

struct TuneResult {
    bool feasible = false;
    TunedPoint best; // feasible: the best point; infeasible: the least-violated one
    SolverStatus status = SolverStatus::converged;
    bool solver_ran = false;
    int evaluations = 0;
    // Feasible: the limit with the least margin (binding). Infeasible: the most broken limit at
    // the least-violated setting.
    converter::LimitCheck binding;
    bool has_binding = false;
};

using PairEvaluator = std::function<converter::PairEvaluation(const converter::Setting&)>;
using Scorer = std::function<TunedPoint(const converter::Setting&, converter::PairEvaluation&&)>;

// A scorer from the parts, weights and scales.
Scorer make_scorer(const parts::Inductor& l, const parts::Diode& diode, const design::Weights& w,
                   const Scales& s);

// The values of the free variable the pre-scan visits, in order (one when the range is fixed).
// The tuned result is never worse than the best feasible one of them.
std::vector<double> prescan_values(const SettingRange& range, const TuneOptions& options = {});

// `hints`: extra values of the free variable evaluated after the pre-scan (e.g. where a bound
// puts the optimum); `visited`: points already evaluated for this pair (walk_hint), taken as if
// evaluated here. The best of all of them starts the local solve.
TuneResult tune(const SettingRange& range, const converter::Setting& base,
                const PairEvaluator& evaluate, const Scorer& scorer,
                const TuneOptions& options = {}, std::span<const double> hints = {},
                std::span<const TunedPoint> visited = {});

// From `start` (e.g. where a bound puts the optimum) towards `toward` (e.g. the middle of the
// window the bound leaves open) until a point meets every limit, at most three evaluations:
// `start`; a small step towards `toward`; then, if the most broken limit's margin improved, the
// secant estimate of where it turns positive, else a larger step. Points in order of evaluation;
// none when the range is fixed. Deterministic, so a ranking may evaluate it once to bound a pair
// and hand the points to tune().
std::vector<TunedPoint> walk_hint(const SettingRange& range, const converter::Setting& base,
                                  const PairEvaluator& evaluate, const Scorer& scorer, double start,
                                  double toward);

// A tuned value as a person can type it back. A tuned optimum usually sits on a limit, so the
// value rounded for print can break it (a band shown as 46.9 mA where 46.94 mA was tuned puts the
// frequency above its maximum). The value rounded to `digits` significant digits, nearest first
// and then the other way, for digits = 4, 5, 6, is evaluated until one meets every limit. A fixed
// range (a value the user gave) is printed as given, with as few digits as show it.
struct PrintedValue {
    double value = 0.0;
    int digits = 0; // significant digits that show `value` exactly; 0: none found, print in full
};
PrintedValue printed_value(const SettingRange& range, const converter::Setting& base,
                           const PairEvaluator& evaluate, double value);

// The check with the smallest margin in an evaluation (nullptr when there are none).
const converter::LimitCheck* least_margin(const converter::PairEvaluation& e);

} // namespace coilsieve::optimisation
