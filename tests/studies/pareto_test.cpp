// Exact Pareto sets on small hand-made sets, ties included.
#include "studies/pareto.hpp"

#include <gtest/gtest.h>
#include <random>

using namespace coilsieve::studies;
using V = std::vector<std::vector<double>>;
using I = std::vector<std::size_t>;

TEST(Pareto, Dominance) {
    std::vector<double> a{1, 2}, b{2, 2}, c{1, 2};
    EXPECT_TRUE(dominates(a, b));
    EXPECT_FALSE(dominates(b, a));
    EXPECT_FALSE(dominates(a, c)); // equal vectors: neither dominates
}

TEST(Pareto, TwoObjectiveStaircase) {
    // (1,5) (2,3) (4,1) form the staircase; (3,4) is dominated by (2,3); (5,5) by all.
    V p{{3, 4}, {1, 5}, {5, 5}, {2, 3}, {4, 1}};
    EXPECT_EQ(pareto_front(p), (I{1, 3, 4}));
}

TEST(Pareto, TiesStayTogether) {
    V p{{1, 1}, {1, 1}, {2, 0.5}, {1, 2}};
    EXPECT_EQ(pareto_front(p), (I{0, 1, 2}));
}

TEST(Pareto, EqualInOneObjectiveBetterInOther) {
    V p{{1, 3}, {1, 2}, {0, 4}};
    EXPECT_EQ(pareto_front(p), (I{1, 2}));
}

TEST(Pareto, ThreeObjectives) {
    V p{{1, 2, 3}, {3, 2, 1}, {2, 2, 2}, {2, 3, 3}, {1, 2, 3.5}};
    EXPECT_EQ(pareto_front(p), (I{0, 1, 2}));
}

TEST(Pareto, EmptyAndSingle) {
    EXPECT_TRUE(pareto_front({}).empty());
    EXPECT_EQ(pareto_front(V{{7, 7}}), (I{0}));
}

TEST(Pareto, MatchesBruteForceOnRandomSets) {
    std::mt19937 rng(7);
    std::uniform_int_distribution<int> u(0, 5); // small range: many ties
    for (int k = 0; k < 200; ++k) {
        V p(30, std::vector<double>(3));
        for (auto& v : p)
            for (auto& x : v) x = u(rng);
        I brute;
        for (std::size_t i = 0; i < p.size(); ++i) {
            bool dom = false;
            for (std::size_t j = 0; j < p.size(); ++j)
                if (j != i && dominates(p[j], p[i])) dom = true;
            if (!dom) brute.push_back(i);
        }
        EXPECT_EQ(pareto_front(p), brute);
    }
}

TEST(Pareto, CostAxisOnlyWhenWeighted) {
    coilsieve::design::Design d;
    EXPECT_EQ(pareto_axes(pareto_objectives(d)), (std::vector<std::string>{"loss", "size"}));
    d.weights.cost = 1.0;
    const auto axes = pareto_objectives(d);
    EXPECT_EQ(pareto_axes(axes), (std::vector<std::string>{"loss", "size", "cost"}));
    coilsieve::optimisation::Objectives o;
    EXPECT_TRUE(std::isinf(pareto_vector(o, axes)[2])); // unpriced counts as most expensive
}

TEST(Pareto, DesignListIsUsedAndMarginIsMinimisedAsItsComplement) {
    using coilsieve::design::Objective;
    coilsieve::design::Design d;
    d.pareto = {Objective::ripple, Objective::margin};
    const auto axes = pareto_objectives(d);
    EXPECT_EQ(pareto_axes(axes), (std::vector<std::string>{"ripple", "margin"}));
    coilsieve::optimisation::Objectives a, b;
    a.ripple = 0.1;
    a.margin = 0.6; // more margin is better
    b.ripple = 0.1;
    b.margin = 0.4;
    EXPECT_TRUE(dominates(pareto_vector(a, axes), pareto_vector(b, axes)));
    EXPECT_FALSE(dominates(pareto_vector(b, axes), pareto_vector(a, axes)));
}

TEST(Pareto, InlinePointHoldsEveryObjectiveOnceAndRefusesMore) {
    using coilsieve::design::Objective;
    const std::vector<Objective> all{Objective::loss, Objective::size, Objective::ripple,
                                     Objective::margin, Objective::cost};
    coilsieve::optimisation::Objectives o;
    o.loss = 1.5;
    o.size = 2e-7;
    o.ripple = 0.1;
    o.margin = 0.3;
    o.cost = 0.42;
    const auto p = pareto_point(o, all);
    EXPECT_EQ(std::vector<double>(p.values().begin(), p.values().end()),
              (std::vector<double>{1.5, 2e-7, 0.1, 0.7, 0.42}));
    auto six = all;
    six.push_back(Objective::loss);
    EXPECT_THROW(pareto_point(o, six), std::invalid_argument);
}
