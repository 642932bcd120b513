// On the starter catalog, for both example designs: pruning never changes the answer (identical
// top N and Pareto set with and without --exhaustive), the score bounds hold for every pair tuned,
// and one or two threads give identical results. An exhaustive run of the charger over the whole
// catalog takes many minutes on two cores, so the catalog is thinned deterministically (every
// third inductor and diode, about 80,000 pairs before screening) to keep CI within its budget.
#include "catalog/store.hpp"
#include "design/design_json.hpp"
#include "studies/pareto.hpp"
#include "studies/rank.hpp"
#include "studies/result_json.hpp"

#include <algorithm>
#include <fstream>
#include <gtest/gtest.h>
#include <map>
#include <set>
#include <sstream>

using namespace coilsieve;

namespace {

const catalog::PartLists& starter() {
    static const catalog::PartLists s = [] {
        catalog::PartLists k = catalog::starter_parts();
        const auto thin = [](auto& parts) {
            std::remove_reference_t<decltype(parts)> kept;
            for (std::size_t i = 0; i < parts.size(); i += 3) kept.push_back(parts[i]);
            parts = std::move(kept);
        };
        thin(k.inductors);
        thin(k.diodes);
        return k;
    }();
    return s;
}

std::vector<std::pair<std::string, double>> listed(const std::vector<studies::PairResult>& v) {
    std::vector<std::pair<std::string, double>> out;
    for (const auto& p : v)
        out.emplace_back(studies::pair_key(p, starter().inductors, starter().diodes),
                         p.tune.best.score);
    return out;
}

design::Design example(const std::string& file) {
    return design::load_design_file(std::string(COILSIEVE_SOURCE_DIR) + "/data/examples/" + file);
}

// A pruned ranking and an exhaustive one that keeps every tuned pair, on the thinned catalog.
struct PrunedAndExhaustive {
    studies::RankResult pruned, full;
};
PrunedAndExhaustive rank_both_ways(const design::Design& d) {
    studies::RankOptions pruned, full;
    full.exhaustive = true;
    full.keep_all = true;
    const auto& s = starter();
    return {studies::rank_pairs(d, s.inductors, s.diodes, pruned, studies::default_evaluator()),
            studies::rank_pairs(d, s.inductors, s.diodes, full, studies::default_evaluator())};
}

class StarterCatalog : public ::testing::TestWithParam<std::string> {};

} // namespace

TEST_P(StarterCatalog, PrunedEqualsExhaustiveAndBoundsHold) {
    const auto d = example(GetParam());
    const auto& s = starter();
    ASSERT_GE(s.inductors.size(), 600u);
    ASSERT_GE(s.diodes.size(), 100u);
    const auto [rp, rf] = rank_both_ways(d);
    EXPECT_EQ(listed(rp.top), listed(rf.top));
    EXPECT_EQ(listed(rp.pareto), listed(rf.pareto));
    for (const auto& p : rf.all) {
        if (p.tune.feasible) {
            EXPECT_LE(p.bound, p.tune.best.score) << studies::pair_key(p, s.inductors, s.diodes);
        }
    }
    // How many pairs pruning saves is a speed matter, reported by tests/bench/bench_rank.cpp.
    EXPECT_LE(rp.counts.pairs_tuned, rf.counts.pairs_tuned);

    // One row per inductor: the best pair of each inductor from the exhaustive run, by score.
    studies::RankOptions distinct;
    distinct.distinct_inductors = true;
    const auto rd =
        studies::rank_pairs(d, s.inductors, s.diodes, distinct, studies::default_evaluator());
    auto before = [&](const studies::PairResult& a, const studies::PairResult& b) {
        if (a.tune.best.score != b.tune.best.score) return a.tune.best.score < b.tune.best.score;
        return studies::pair_before(a, b, s.inductors, s.diodes);
    };
    std::map<std::size_t, studies::PairResult> best;
    for (const auto& p : rf.all) {
        if (!p.tune.feasible) continue;
        auto it = best.find(p.inductor);
        if (it == best.end() || before(p, it->second)) best[p.inductor] = p;
    }
    std::vector<studies::PairResult> expected;
    for (const auto& [i, p] : best) expected.push_back(p);
    std::sort(expected.begin(), expected.end(), before);
    if (expected.size() > rd.top.size()) expected.resize(rd.top.size());
    EXPECT_EQ(rd.top.size(), std::min<std::size_t>(10, best.size()));
    EXPECT_EQ(listed(rd.top), listed(expected));
}

namespace {

// Two rankings that may differ only in their time: the same lists, and the same pairs probed,
// tuned and pruned with the same evaluations (batches are fixed, so the work is too).
void expect_same_work(const design::Design& d, const studies::RankOptions& a,
                      const studies::RankOptions& b) {
    const auto& s = starter();
    const auto ra = studies::rank_pairs(d, s.inductors, s.diodes, a, studies::default_evaluator());
    const auto rb = studies::rank_pairs(d, s.inductors, s.diodes, b, studies::default_evaluator());
    EXPECT_EQ(listed(ra.top), listed(rb.top));
    EXPECT_EQ(listed(ra.pareto), listed(rb.pareto));
    EXPECT_EQ(ra.counts.pairs_tuned, rb.counts.pairs_tuned);
    EXPECT_EQ(ra.counts.pairs_probed, rb.counts.pairs_probed);
    EXPECT_EQ(ra.counts.pairs_pruned, rb.counts.pairs_pruned);
    EXPECT_EQ(ra.counts.evaluations, rb.counts.evaluations);
    EXPECT_GT(ra.counts.pairs_probed, 0u); // the Pareto phase ran
}

} // namespace

TEST_P(StarterCatalog, OneAndTwoThreadsAgree) {
    studies::RankOptions one, two;
    one.threads = 1;
    two.threads = 2;
    expect_same_work(example(GetParam()), one, two);
}

// Taking the next batch's pairs out of the queue while a batch runs must change nothing but the
// time.
TEST_P(StarterCatalog, LookingAheadChangesOnlyTheTime) {
    studies::RankOptions ahead, plain;
    plain.look_ahead = false;
    expect_same_work(example(GetParam()), ahead, plain);
}

// More Pareto objectives weaken the pruning (ripple and margin bounds are per inductor) but must
// not change the answer: the pruned set equals the non-dominated set of every pair tuned
// exhaustively.
TEST(StarterCatalogPareto, FourObjectiveSetEqualsBruteForce) {
    auto d = example("reading-lamp.json");
    d.pareto = {design::Objective::loss, design::Objective::size, design::Objective::ripple,
                design::Objective::margin};
    const auto& s = starter();
    const auto [rp, rf] = rank_both_ways(d);
    EXPECT_EQ(rp.pareto_axes, (std::vector<std::string>{"loss", "size", "ripple", "margin"}));
    std::vector<studies::PairResult> feasible;
    std::vector<std::vector<double>> points;
    const auto axes = studies::pareto_objectives(d);
    for (const auto& p : rf.all)
        if (p.tune.feasible) {
            feasible.push_back(p);
            points.push_back(studies::pareto_vector(p.tune.best.objectives, axes));
        }
    std::set<std::string> brute, got;
    for (const std::size_t i : studies::pareto_front(points))
        brute.insert(studies::pair_key(feasible[i], s.inductors, s.diodes));
    for (const auto& p : rp.pareto) got.insert(studies::pair_key(p, s.inductors, s.diodes));
    EXPECT_EQ(got, brute);
    EXPECT_GT(brute.size(), 8u); // more objectives, a larger set than loss and size alone
}

INSTANTIATE_TEST_SUITE_P(Examples, StarterCatalog,
                         ::testing::Values("reading-lamp.json", "two-cell-charger.json",
                                           "workshop-floodlight.json"));
