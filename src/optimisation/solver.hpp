#pragma once
// A bounded, constrained, derivative-free minimiser over NLopt's COBYLA.
// The problem only says how to evaluate a point; the solver tracks the best feasible point it has
// seen, so a stop for any reason (evaluation budget, round-off, forced stop) still returns it.

#include <cstddef>
#include <functional>
#include <span>
#include <string>
#include <vector>

namespace coilsieve::optimisation {

// What one evaluation says: the objective and the constraints, each feasible when <= 0.
// `feasible` is the problem's own verdict (it may know limits the constraint vector only guides).
struct PointValue {
    double objective = 0.0;
    std::vector<double> constraints;
    bool feasible = false;
};

struct Problem {
    std::vector<double> lower;
    std::vector<double> upper;
    std::size_t constraint_count = 0;
    std::function<PointValue(std::span<const double>)> evaluate;
};

struct SolverOptions {
    double relative_tolerance = 1e-4; // on x and on the objective
    int max_evaluations = 60;
    double initial_step = 0.0; // 0: NLopt's heuristic
};

enum class SolverStatus { converged, max_evaluations, roundoff_limited, forced_stop, failure };
const char* to_string(SolverStatus s);

struct Evaluated {
    std::vector<double> x;
    PointValue value;
    double violation = 0.0; // largest constraint value clipped at 0 (0 when all hold)
};

struct Solution {
    bool has_feasible = false;
    Evaluated best_feasible;  // the lowest objective among feasible points seen
    Evaluated least_violated; // the point with the smallest violation (ties: lower objective)
    SolverStatus status = SolverStatus::failure;
    int evaluations = 0;
    std::string message; // NLopt's own words when it failed
};

// Minimise from `start` (clamped into the bounds). Exceptions thrown by `evaluate` never cross the
// C callback: they are stored, NLopt is force-stopped, and the exception is rethrown here.
Solution minimise_cobyla(const Problem& problem, std::vector<double> start,
                         const SolverOptions& options = {});

// Violation of a value: max(0, max constraint).
double violation_of(const PointValue& v);

// Is `a` better than `b` for tracking: feasible beats infeasible, then lower objective among
// feasible, smaller violation among infeasible (then lower objective).
bool better_point(const Evaluated& a, const Evaluated& b);

} // namespace coilsieve::optimisation
