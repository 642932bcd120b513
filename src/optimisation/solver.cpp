#include "optimisation/solver.hpp"

#include <algorithm>
#include <cmath>
#include <exception>
#include <memory>
#include <nlopt.h>
#include <stdexcept>

namespace coilsieve::optimisation {

const char* to_string(SolverStatus s) {
    switch (s) {
    case SolverStatus::converged:
        return "converged";
    case SolverStatus::max_evaluations:
        return "evaluation budget reached";
    case SolverStatus::roundoff_limited:
        return "round-off limited";
    case SolverStatus::forced_stop:
        return "forced stop";
    case SolverStatus::failure:
        return "failure";
    }
    return "failure";
}

double violation_of(const PointValue& v) {
    double worst = 0.0;
    for (double c : v.constraints) {
        if (std::isnan(c)) return INFINITY;
        worst = std::max(worst, c);
    }
    return worst;
}

bool better_point(const Evaluated& a, const Evaluated& b) {
    if (a.value.feasible != b.value.feasible) return a.value.feasible;
    if (!a.value.feasible && a.violation != b.violation) return a.violation < b.violation;
    return a.value.objective < b.value.objective;
}

namespace {

struct OptDeleter {
    void operator()(nlopt_opt o) const { nlopt_destroy(o); }
};
using OptHandle = std::unique_ptr<std::remove_pointer_t<nlopt_opt>, OptDeleter>;

// State shared by the two C callbacks; one evaluation serves both at the same x.
struct CallbackState {
    const Problem* problem = nullptr;
    nlopt_opt opt = nullptr;
    std::vector<double> last_x;
    PointValue last;
    bool has_last = false;
    std::exception_ptr error;
    Solution* solution = nullptr;

    const PointValue* at(unsigned n, const double* x) {
        if (error) return nullptr;
        if (has_last && std::equal(last_x.begin(), last_x.end(), x, x + n)) return &last;
        try {
            last_x.assign(x, x + n);
            last = problem->evaluate(std::span<const double>(last_x));
            if (last.constraints.size() != problem->constraint_count)
                throw std::logic_error(
                    "optimisation problem returned " + std::to_string(last.constraints.size()) +
                    " constraints, declared " + std::to_string(problem->constraint_count));
            has_last = true;
            ++solution->evaluations;
            Evaluated e{last_x, last, violation_of(last)};
            if (!std::isfinite(e.value.objective)) e.value.feasible = false;
            if (e.value.feasible &&
                (!solution->has_feasible || better_point(e, solution->best_feasible))) {
                solution->best_feasible = e;
                solution->has_feasible = true;
            }
            if (solution->evaluations == 1 || better_point(e, solution->least_violated))
                solution->least_violated = e;
            return &last;
        } catch (...) {
            error = std::current_exception();
            has_last = false;
            nlopt_force_stop(opt);
            return nullptr;
        }
    }
};

double objective_cb(unsigned n, const double* x, double* grad, void* data) {
    (void)grad; // COBYLA is derivative-free
    auto* st = static_cast<CallbackState*>(data);
    const PointValue* v = st->at(n, x);
    if (v == nullptr || !std::isfinite(v->objective)) return HUGE_VAL;
    return v->objective;
}

void constraints_cb(unsigned m, double* result, unsigned n, const double* x, double* grad,
                    void* data) {
    (void)grad;
    auto* st = static_cast<CallbackState*>(data);
    const PointValue* v = st->at(n, x);
    for (unsigned i = 0; i < m; ++i) {
        double c = v == nullptr ? HUGE_VAL : v->constraints[i];
        result[i] = std::isnan(c) ? HUGE_VAL : c;
    }
}

} // namespace

Solution minimise_cobyla(const Problem& problem, std::vector<double> start,
                         const SolverOptions& options) {
    const std::size_t n = problem.lower.size();
    if (n == 0 || problem.upper.size() != n || start.size() != n)
        throw std::invalid_argument("minimise_cobyla: bounds and start must have the same, "
                                    "non-zero size");
    for (std::size_t i = 0; i < n; ++i) {
        if (!(problem.lower[i] <= problem.upper[i]))
            throw std::invalid_argument("minimise_cobyla: lower bound above upper bound");
        start[i] = std::clamp(start[i], problem.lower[i], problem.upper[i]);
    }

    Solution solution;
    OptHandle opt(nlopt_create(NLOPT_LN_COBYLA, static_cast<unsigned>(n)));
    if (!opt) throw std::runtime_error("NLopt could not create a COBYLA optimiser");

    CallbackState st;
    st.problem = &problem;
    st.opt = opt.get();
    st.solution = &solution;

    nlopt_set_lower_bounds(opt.get(), problem.lower.data());
    nlopt_set_upper_bounds(opt.get(), problem.upper.data());
    nlopt_set_min_objective(opt.get(), objective_cb, &st);
    if (problem.constraint_count > 0) {
        std::vector<double> tol(problem.constraint_count, 0.0);
        nlopt_add_inequality_mconstraint(opt.get(), static_cast<unsigned>(problem.constraint_count),
                                         constraints_cb, &st, tol.data());
    }
    nlopt_set_xtol_rel(opt.get(), options.relative_tolerance);
    nlopt_set_ftol_rel(opt.get(), options.relative_tolerance);
    nlopt_set_maxeval(opt.get(), options.max_evaluations);
    if (options.initial_step > 0.0) nlopt_set_initial_step1(opt.get(), options.initial_step);

    double f = 0.0;
    nlopt_result r = nlopt_optimize(opt.get(), start.data(), &f);
    if (st.error) std::rethrow_exception(st.error);

    switch (r) {
    case NLOPT_SUCCESS:
    case NLOPT_STOPVAL_REACHED:
    case NLOPT_FTOL_REACHED:
    case NLOPT_XTOL_REACHED:
        solution.status = SolverStatus::converged;
        break;
    case NLOPT_MAXEVAL_REACHED:
    case NLOPT_MAXTIME_REACHED:
        solution.status = SolverStatus::max_evaluations;
        break;
    case NLOPT_ROUNDOFF_LIMITED:
        solution.status = SolverStatus::roundoff_limited;
        break;
    case NLOPT_FORCED_STOP:
        solution.status = SolverStatus::forced_stop;
        break;
    default:
        solution.status = SolverStatus::failure;
        if (const char* msg = nlopt_get_errmsg(opt.get())) solution.message = msg;
        else solution.message = nlopt_result_to_string(r);
        break;
    }
    return solution;
}

} // namespace coilsieve::optimisation
