// The ranking on a hand-made catalog whose answer is known by construction.
#include "fixtures.hpp"
#include "optimisation/tune.hpp"
#include "studies/rank.hpp"
#include "studies/screen.hpp"
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
            // The peak reaches the upper threshold at least: 0.7 A + 0.05·0.7 A/2 = 0.7175 A >
            // 0.8·0.6 A = 0.48 A (by construction).
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

// A missing price must never be an advantage: the Pareto set counts an unpriced pair as the most
// expensive, and the score charges it the dearest priced inductor and diode of the catalog.
TEST(Rank, AnUnpricedPairIsScoredAsTheDearestNotAsFree) {
    auto d = fixtures::lamp();
    d.weights = {1.0, 0.0, 0.0, 0.0, 1.0}; // loss and cost
    auto ls = fixtures::inductors();
    for (auto& l : ls) {
        l.price = 0.5;
        l.currency = "USD";
    }
    auto priced = fixtures::schottky("D-PRICED", 40.0, 2.0);
    priced.price = 0.001;
    priced.currency = "USD";
    auto dear = fixtures::schottky("D-DEAR", 40.0, 2.0);
    dear.price = 3.0;
    dear.currency = "USD";
    dear.rth_ja = 1000.0; // too hot to be feasible: its price still sets the charge
    const auto unpriced = fixtures::schottky("D-UNPRICED", 40.0, 2.0); // same part, no price
    const std::vector<parts::Diode> ds{unpriced, priced, dear};
    const auto r = rank_pairs(d, ls, ds, {}, default_evaluator());
    ASSERT_TRUE(r.scales.cost_unpriced.has_value());
    EXPECT_DOUBLE_EQ(*r.scales.cost_unpriced, 0.5 + 3.0);
    const PairResult* with_price = nullptr;
    const PairResult* without = nullptr;
    for (const auto& p : r.top) {
        if (ls[p.inductor].id != "L-BIG") continue;
        if (ds[p.diode].id == "D-PRICED") with_price = &p;
        if (ds[p.diode].id == "D-UNPRICED") without = &p;
    }
    ASSERT_NE(with_price, nullptr);
    ASSERT_NE(without, nullptr);
    // The same electrical pair: the same tuned loss, and a score higher by the charge.
    EXPECT_DOUBLE_EQ(without->tune.best.objectives.loss, with_price->tune.best.objectives.loss);
    EXPECT_NEAR(without->tune.best.score - with_price->tune.best.score, (3.5 - 0.501) / 1.0, 1e-12);
    EXPECT_LT(with_price->rank, without->rank);
    EXPECT_TRUE(with_price->pareto);
    EXPECT_FALSE(without->pareto);
}

TEST(Rank, NoPriceAnywhereChargesNoPair) {
    auto d = fixtures::lamp();
    d.weights = {1.0, 0.0, 0.0, 0.0, 1.0};
    const auto r = run(d); // the hand-made catalog prices nothing
    EXPECT_FALSE(r.scales.cost_unpriced.has_value());
    ASSERT_FALSE(r.top.empty());
    EXPECT_DOUBLE_EQ(optimisation::cost_term(std::nullopt, d.weights, r.scales), 0.0);
}

// A catalog row without a body size (0 = unknown) must not pass a height limit or win on size
// and core loss for want of data: it is screened out with the reason named.
TEST(Rank, AnInductorWithoutABodySizeIsScreenedOutNotFavoured) {
    auto ls = fixtures::inductors();
    auto no_size = ls[0]; // L-BIG's electrical data, dimensions unknown
    no_size.id = "L-NO-SIZE";
    no_size.length = no_size.width = no_size.height = 0.0;
    no_size.core_volume = 0.0;
    ls.push_back(no_size);
    const auto r = rank_pairs(fixtures::lamp(), ls, fixtures::diodes(), {}, default_evaluator());
    bool seen = false;
    for (const auto& s : r.screened) {
        if (!s.inductor || ls[s.index].id != "L-NO-SIZE") continue;
        seen = true;
        ASSERT_EQ(s.reasons.size(), 1u);
        EXPECT_EQ(s.reasons.front().limit, "body_size");
    }
    EXPECT_TRUE(seen);
    EXPECT_EQ(r.counts.screened_by_limit.at("body_size"), 1u);
    for (const auto& p : r.top) EXPECT_NE(ls[p.inductor].id, "L-NO-SIZE");
    for (const auto& p : r.pareto) EXPECT_NE(ls[p.inductor].id, "L-NO-SIZE");
}

// The regulation screen claims a part can never hold the current: the engine, the reference here,
// must agree at every setting of a scan.
TEST(Rank, RegulationScreenAgreesWithTheEngine) {
    const auto ls = fixtures::inductors();
    const auto ds = fixtures::diodes();
    auto regulation_reason = [](const std::vector<studies::ScreenReason>& v) {
        return std::any_of(v.begin(), v.end(),
                           [](const auto& r) { return r.limit == "regulation"; });
    };
    // L-SMALL's DCR is four times L-BIG's: find a minimum supply where only L-SMALL is refused.
    std::optional<design::Design> found;
    for (double vmin = 12.0; vmin < 16.0 && !found; vmin += 0.02) {
        auto d = fixtures::lamp();
        d.supply.min = vmin;
        const auto ctx = studies::make_screen_context(d, optimisation::setting_range(d));
        const bool big =
            regulation_reason(studies::screen_inductor(ctx, ls[0], parts::make_model(ls[0])));
        const bool small =
            regulation_reason(studies::screen_inductor(ctx, ls[1], parts::make_model(ls[1])));
        if (small && !big) found = d;
    }
    ASSERT_TRUE(found.has_value());
    const auto& d = *found;
    const auto range = optimisation::setting_range(d);
    for (int k = 0; k <= 20; ++k) {
        converter::Setting s;
        s.band = range.lo + (range.hi - range.lo) * k / 20.0;
        const auto e = converter::evaluate_pair(d, ls[1], ds[0], s);
        EXPECT_TRUE(std::any_of(e.violations.begin(), e.violations.end(),
                                [](const auto& v) { return v.limit == "regulation"; }))
            << "band " << s.band;
    }
    const auto r = rank_pairs(d, ls, ds, {}, default_evaluator());
    const auto small = std::find_if(r.screened.begin(), r.screened.end(), [&](const auto& x) {
        return x.inductor && ls[x.index].id == "L-SMALL";
    });
    ASSERT_NE(small, r.screened.end());
    EXPECT_TRUE(regulation_reason(small->reasons));
}

// The screen's threshold by construction: a sink of 10 V behind 0.5 Ω at 1 A, a 0.1 Ω switch with
// no temperature coefficient, 0.2 Ω of sense resistor and L-BIG's winding at its DCR reference
// temperature (0.08 Ω typical, 0.096 Ω maximum) need 10 + (0.5 + 0.1 + 0.2 + 0.096)·1 = 10.896 V
// with the switch on (Kirchhoff's voltage law around the on-state loop).
TEST(Rank, RegulationScreenThresholdIsTheOnStateLoopVoltage) {
    auto d = fixtures::lamp();
    d.load = loads::Sink{10.0, 0.5, 1.0};
    d.sw.on_resistance = 0.1;
    d.sw.on_resistance_tempco = 0.0;
    d.sense_resistor = 0.2;
    d.ambient.max = 293.15; // the winding's DCR reference temperature
    d.ambient.min.reset();
    d.supply = {10.0, 12.0, 14.0};
    const auto l = fixtures::inductors()[0];
    auto regulation_screened = [&](double vmin) {
        d.supply.min = vmin;
        const auto ctx = studies::make_screen_context(d, optimisation::setting_range(d));
        const auto v = studies::screen_inductor(ctx, l, parts::make_model(l));
        return std::any_of(v.begin(), v.end(),
                           [](const auto& r) { return r.limit == "regulation"; });
    };
    EXPECT_TRUE(regulation_screened(10.8955));
    EXPECT_FALSE(regulation_screened(10.8965));
}

// What the table prints must pass `check` as typed: the engine, at the printed band, meets every
// limit, and the printed value is the tuned one to its digits.
TEST(Rank, PrintedSettingsMeetTheLimitsAsTyped) {
    const auto d = fixtures::lamp();
    const auto r = run(d);
    ASSERT_FALSE(r.top.empty());
    for (const auto& p : r.top) {
        ASSERT_GE(p.printed.digits, 4);
        const double tuned = p.tune.best.setting.band;
        EXPECT_LE(std::abs(p.printed.value - tuned),
                  std::pow(10.0, std::floor(std::log10(tuned)) - p.printed.digits + 1));
        converter::Setting s = p.tune.best.setting;
        s.band = p.printed.value;
        EXPECT_TRUE(converter::evaluate_pair(d, L()[p.inductor], D()[p.diode], s).feasible);
    }
}

// The Vf a listing shows is the diode's drop at the design's target current, 25 °C: for the
// hand-made Schottky (SPICE IS = 2 µA at TNOM 27 °C, N = 1.05, RS = 50 mΩ, EG = 0.69 eV, XTI = 2)
// the ngspice diode equations (manual, diode model, temperature dependence) give at 298.15 K
// IS(T) = IS·(T/TNOM)^(XTI/N)·exp((T/TNOM − 1)·EG/(N·kT/q)) = 1.665 µA, and at 0.7 A
// N·kT/q·ln(1 + I/IS(T)) + I·RS = 26.978 mV · 12.949 + 35 mV = 384.3 mV (kT/q from CODATA
// constants) - not the datasheet point (450 mV at 1 A).
TEST(Rank, ListedDiodeVfIsAtTheTargetCurrent) {
    const auto r = run(fixtures::lamp());
    ASSERT_FALSE(r.top.empty());
    for (const auto& p : r.top) EXPECT_NEAR(p.diode_vf, 0.3843, 0.0005);
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
