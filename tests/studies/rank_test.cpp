// The ranking on a hand-made catalog whose answer is known by construction.
#include "fixtures.hpp"
#include "studies/rank.hpp"
#include "studies/why.hpp"

#include <gtest/gtest.h>

using namespace coilsieve;
using namespace coilsieve::studies;

namespace {

RankResult run(const design::Design& d, RankOptions o = {}) {
    static const auto ls = fixtures::inductors();
    static const auto ds = fixtures::diodes();
    return rank_pairs(d, ls, ds, o, default_evaluator());
}

const std::vector<parts::Inductor>& L() {
    static const auto v = fixtures::inductors();
    return v;
}
const std::vector<parts::Diode>& D() {
    static const auto v = fixtures::diodes();
    return v;
}

std::string id_of(const PairResult& p) { return L()[p.inductor].id + "+" + D()[p.diode].id; }

} // namespace

TEST(Rank, ScreeningRemovesTheSaturatingInductorAndTheLowVoltageDiode) {
    const auto r = run(fixtures::lamp());
    ASSERT_EQ(r.screened.size(), 2u);
    for (const auto& s : r.screened) {
        ASSERT_FALSE(s.reasons.empty());
        if (s.inductor) {
            EXPECT_EQ(L()[s.index].id, "L-SAT");
            // 0.97·(0.7 A + 0.05·0.7 A/2) = 0.696 A > 0.8·0.6 A = 0.48 A (by construction).
            EXPECT_EQ(s.reasons.front().limit, "isat");
            EXPECT_NEAR(s.reasons.front().bound, 0.48, 1e-12);
        } else {
            EXPECT_EQ(D()[s.index].id, "D-15V");
            EXPECT_EQ(s.reasons.front().limit, "vrrm");
            EXPECT_DOUBLE_EQ(s.reasons.front().value, 28.0); // Vin max
            EXPECT_DOUBLE_EQ(s.reasons.front().bound, 12.0); // 0.8 · 15 V
        }
    }
    EXPECT_EQ(r.counts.screened_by_limit.at("isat"), 1u);
    EXPECT_EQ(r.counts.screened_by_limit.at("vrrm"), 1u);
    EXPECT_EQ(r.counts.pairs_total, 6u);
    EXPECT_EQ(r.counts.pairs_considered, 2u);
}

TEST(Rank, LossAndSizeWinnersBothOnTheParetoSet) {
    const auto r = run(fixtures::lamp());
    ASSERT_EQ(r.pareto.size(), 2u);
    std::vector<std::string> ids{id_of(r.pareto[0]), id_of(r.pareto[1])};
    std::sort(ids.begin(), ids.end());
    EXPECT_EQ(ids, (std::vector<std::string>{"L-BIG+D-40V", "L-SMALL+D-40V"}));
    // L-BIG has the lower loss, L-SMALL the smaller volume (by construction).
    const PairResult* big = &r.pareto[0];
    const PairResult* small = &r.pareto[1];
    if (L()[big->inductor].id != "L-BIG") std::swap(big, small);
    EXPECT_LT(big->tune.best.objectives.loss, small->tune.best.objectives.loss);
    EXPECT_LT(small->tune.best.objectives.size, big->tune.best.objectives.size);
    for (const auto& p : r.pareto) {
        EXPECT_TRUE(p.tune.feasible);
        for (const auto& c : p.tune.best.evaluation.checks) EXPECT_GE(c.margin, 0.0) << c.limit;
    }
}

TEST(Rank, WeightsDecideTheOrder) {
    auto d = fixtures::lamp();
    d.weights = {1.0, 0.0, 0.0, 0.0, 0.0}; // loss only
    auto r = run(d);
    ASSERT_EQ(r.top.size(), 2u);
    EXPECT_EQ(id_of(r.top[0]), "L-BIG+D-40V");
    EXPECT_EQ(r.top[0].rank, 1);
    d.weights = {0.0, 1.0, 0.0, 0.0, 0.0}; // size only
    r = run(d);
    ASSERT_EQ(r.top.size(), 2u);
    EXPECT_EQ(id_of(r.top[0]), "L-SMALL+D-40V");
}

TEST(Rank, WhyExplainsScreenedAndOutrankedParts) {
    auto d = fixtures::lamp();
    d.weights = {1.0, 0.0, 0.0, 0.0, 0.0};
    RankOptions o;
    o.top = 1;
    const auto r = rank_pairs(d, L(), D(), o, default_evaluator());
    auto w = explain_part(d, L(), D(), r, o, default_evaluator(), "L-SAT");
    EXPECT_EQ(w.verdict, "screened");
    EXPECT_NE(w.text.find("isat"), std::string::npos) << w.text;
    w = explain_part(d, L(), D(), r, o, default_evaluator(), "D-15V");
    EXPECT_EQ(w.verdict, "screened");
    EXPECT_NE(w.text.find("vrrm"), std::string::npos) << w.text;
    w = explain_part(d, L(), D(), r, o, default_evaluator(), "L-SMALL");
    EXPECT_EQ(w.verdict, "pareto-only"); // outranked on loss but the smallest pair
    EXPECT_NE(w.text.find("L-BIG"), std::string::npos) << w.text;
    EXPECT_NE(w.text.find("lower loss"), std::string::npos) << w.text;
    w = explain_part(d, L(), D(), r, o, default_evaluator(), "L-BIG");
    EXPECT_EQ(w.verdict, "listed");
    EXPECT_THROW(explain_part(d, L(), D(), r, o, default_evaluator(), "NOPE"), RankError);
}

TEST(Rank, UnknownLockIdIsNamed) {
    RankOptions o;
    o.lock_inductor = "L-MISSING";
    try {
        run(fixtures::lamp(), o);
        FAIL() << "expected RankError";
    } catch (const RankError& e) {
        EXPECT_NE(std::string(e.what()).find("L-MISSING"), std::string::npos);
    }
    o = {};
    o.lock_diode = "hand:D-40V";
    const auto r = run(fixtures::lamp(), o);
    EXPECT_EQ(r.counts.diodes, 1u);
    EXPECT_EQ(r.top.size(), 2u);
}

TEST(Rank, NoFeasiblePairReportsTheLimit) {
    auto d = fixtures::lamp();
    d.limits.efficiency_min = 0.999; // no buck stage with a sense resistor reaches this
    const auto r = run(d);
    EXPECT_TRUE(r.top.empty());
    EXPECT_TRUE(r.pareto.empty());
    EXPECT_EQ(r.counts.pairs_infeasible, 2u);
    EXPECT_EQ(r.counts.infeasible_by_limit.at("efficiency_min"), 2u);
}

TEST(Rank, FixedBandIsUsedAsGiven) {
    RankOptions o;
    o.band = 0.15;
    const auto r = run(fixtures::lamp(), o);
    ASSERT_FALSE(r.top.empty());
    for (const auto& p : r.top) EXPECT_DOUBLE_EQ(p.tune.best.setting.band, 0.15);
    o = {};
    o.frequency = 1e5;
    EXPECT_THROW(run(fixtures::lamp(), o), RankError); // hysteretic design: no frequency
}

TEST(Rank, SameAnswerWithOneAndTwoThreadsAndExhaustive) {
    RankOptions a, b, c;
    a.threads = 1;
    b.threads = 2;
    c.exhaustive = true;
    const auto ra = run(fixtures::lamp(), a), rb = run(fixtures::lamp(), b),
               rc = run(fixtures::lamp(), c);
    ASSERT_EQ(ra.top.size(), rb.top.size());
    ASSERT_EQ(ra.top.size(), rc.top.size());
    for (std::size_t k = 0; k < ra.top.size(); ++k) {
        EXPECT_EQ(id_of(ra.top[k]), id_of(rb.top[k]));
        EXPECT_EQ(id_of(ra.top[k]), id_of(rc.top[k]));
        EXPECT_EQ(ra.top[k].tune.best.score, rb.top[k].tune.best.score);
    }
}

TEST(Rank, WhyNamesOnlyTheObjectivesInUse) {
    optimisation::Objectives better, worse;
    better.loss = 0.5;
    worse.loss = 0.8;
    better.size = 1e-7;
    worse.size = 2e-7;
    better.ripple = 0.3; // worse on ripple: never an advantage
    worse.ripple = 0.1;
    better.cost = 0.4;
    worse.cost = 0.6;
    using design::Objective;
    // The default Pareto axes without a cost weight: loss and size.
    std::string s = advantages(better, worse, {Objective::loss, Objective::size});
    EXPECT_NE(s.find("lower loss"), std::string::npos) << s;
    EXPECT_NE(s.find("smaller"), std::string::npos) << s;
    EXPECT_EQ(s.find("cheaper"), std::string::npos) << s;
    EXPECT_EQ(s.find("ripple"), std::string::npos) << s;
    s = advantages(better, worse, {Objective::size, Objective::cost});
    EXPECT_EQ(s.find("loss"), std::string::npos) << s;
    EXPECT_NE(s.find("cheaper (0.4"), std::string::npos) << s;
    EXPECT_EQ(advantages(better, worse, {Objective::ripple}), "a lower weighted score");
}
