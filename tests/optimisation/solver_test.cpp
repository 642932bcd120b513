// The COBYLA wrapper: bounds, constraints, best-feasible tracking, exception safety.
#include "optimisation/solver.hpp"

#include <cmath>
#include <gtest/gtest.h>
#include <stdexcept>

using namespace coilsieve::optimisation;

TEST(Solver, FindsConstrainedMinimumOfAParabola) {
    // minimise (x - 0.2)^2 subject to x >= 0.5: the optimum sits on the constraint at 0.5.
    Problem p;
    p.lower = {0.0};
    p.upper = {1.0};
    p.constraint_count = 1;
    p.evaluate = [](std::span<const double> x) {
        PointValue v;
        v.objective = (x[0] - 0.2) * (x[0] - 0.2);
        v.constraints = {0.5 - x[0]};
        v.feasible = x[0] >= 0.5;
        return v;
    };
    Solution s = minimise_cobyla(p, {0.9}, {1e-6, 200, 0.1});
    ASSERT_TRUE(s.has_feasible);
    EXPECT_NEAR(s.best_feasible.x[0], 0.5, 1e-4);
    EXPECT_GE(s.best_feasible.x[0], 0.5); // the tracked point is one the problem called feasible
    EXPECT_GT(s.evaluations, 1);
}

TEST(Solver, StaysWithinBounds) {
    Problem p;
    p.lower = {0.0};
    p.upper = {1.0};
    p.evaluate = [](std::span<const double> x) {
        EXPECT_GE(x[0], 0.0);
        EXPECT_LE(x[0], 1.0);
        return PointValue{-x[0], {}, true};
    };
    Solution s = minimise_cobyla(p, {0.5}, {1e-6, 100, 0.2});
    ASSERT_TRUE(s.has_feasible);
    EXPECT_NEAR(s.best_feasible.x[0], 1.0, 1e-6);
}

TEST(Solver, ExceptionFromTheProblemIsRethrownAfterTheSolverStops) {
    Problem p;
    p.lower = {0.0};
    p.upper = {1.0};
    int calls = 0;
    p.evaluate = [&](std::span<const double> x) -> PointValue {
        if (++calls == 3) throw std::domain_error("bad point");
        return PointValue{x[0] * x[0], {}, true};
    };
    EXPECT_THROW(minimise_cobyla(p, {0.7}, {1e-8, 100, 0.1}), std::domain_error);
    EXPECT_EQ(calls, 3); // no evaluation after the failing one
}

TEST(Solver, BudgetExhaustionStillReturnsTheBestFeasiblePointSeen) {
    Problem p;
    p.lower = {-5.0, -5.0};
    p.upper = {5.0, 5.0};
    p.evaluate = [](std::span<const double> x) {
        // Rosenbrock: far from converged after 8 evaluations.
        double f = 100 * std::pow(x[1] - x[0] * x[0], 2) + std::pow(1 - x[0], 2);
        return PointValue{f, {}, true};
    };
    Solution s = minimise_cobyla(p, {-3.0, 4.0}, {1e-10, 8, 0.5});
    EXPECT_EQ(s.status, SolverStatus::max_evaluations);
    EXPECT_EQ(s.evaluations, 8);
    ASSERT_TRUE(s.has_feasible);
    // The start point's value is an upper bound for the best seen.
    EXPECT_LE(s.best_feasible.value.objective, 100 * std::pow(4.0 - 9.0, 2) + 16.0);
}

TEST(Solver, InfeasibleEverywhereReportsTheLeastViolatedPoint) {
    Problem p;
    p.lower = {0.0};
    p.upper = {1.0};
    p.constraint_count = 1;
    p.evaluate = [](std::span<const double> x) {
        // x >= 2 is impossible in [0, 1]; the violation 2 - x is least at x = 1.
        return PointValue{x[0], {2.0 - x[0]}, false};
    };
    Solution s = minimise_cobyla(p, {0.1}, {1e-6, 60, 0.2});
    EXPECT_FALSE(s.has_feasible);
    EXPECT_NEAR(s.least_violated.x[0], 1.0, 1e-3);
    EXPECT_NEAR(s.least_violated.violation, 1.0, 1e-3);
}

TEST(Solver, RejectsBadBounds) {
    Problem p;
    p.lower = {1.0};
    p.upper = {0.0};
    p.evaluate = [](std::span<const double>) { return PointValue{}; };
    EXPECT_THROW(minimise_cobyla(p, {0.5}), std::invalid_argument);
}
