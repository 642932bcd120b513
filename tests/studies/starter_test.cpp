// On the starter catalog, for both example designs: pruning never changes the answer (identical
// top N and Pareto set with and without --exhaustive), the score bounds hold for every pair tuned,
// and one or two threads give identical results. An exhaustive run of the charger over the whole
// catalog takes many minutes on two cores, so the catalog is thinned deterministically (every
// third inductor and diode, about 80,000 pairs before screening) to keep CI within its budget.
#include "catalog/store.hpp"
#include "design/design_json.hpp"
#include "studies/rank.hpp"
#include "studies/result_json.hpp"

#include <gtest/gtest.h>

#include <fstream>
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

class StarterCatalog : public ::testing::TestWithParam<std::string> {};

} // namespace

TEST_P(StarterCatalog, PrunedEqualsExhaustiveAndBoundsHold) {
    const auto d = design::load_design_file(std::string(COILSIEVE_SOURCE_DIR) +
                                            "/data/examples/" + GetParam());
    const auto& s = starter();
    ASSERT_GE(s.inductors.size(), 600u);
    ASSERT_GE(s.diodes.size(), 100u);
    studies::RankOptions pruned, full;
    full.exhaustive = true;
    full.keep_all = true;
    const auto rp = studies::rank_pairs(d, s.inductors, s.diodes, pruned, studies::default_evaluator());
    const auto rf = studies::rank_pairs(d, s.inductors, s.diodes, full, studies::default_evaluator());
    EXPECT_EQ(listed(rp.top), listed(rf.top));
    EXPECT_EQ(listed(rp.pareto), listed(rf.pareto));
    for (const auto& p : rf.all) {
        if (p.tune.feasible) {
            EXPECT_LE(p.bound, p.tune.best.score) << studies::pair_key(p, s.inductors, s.diodes);
        }
    }
    // How many pairs pruning saves is a speed matter, reported by tests/bench/bench_rank.cpp.
    EXPECT_LE(rp.counts.pairs_tuned, rf.counts.pairs_tuned);
}

TEST_P(StarterCatalog, OneAndTwoThreadsAgree) {
    const auto d = design::load_design_file(std::string(COILSIEVE_SOURCE_DIR) +
                                            "/data/examples/" + GetParam());
    const auto& s = starter();
    studies::RankOptions one, two;
    one.threads = 1;
    two.threads = 2;
    const auto r1 = studies::rank_pairs(d, s.inductors, s.diodes, one, studies::default_evaluator());
    const auto r2 = studies::rank_pairs(d, s.inductors, s.diodes, two, studies::default_evaluator());
    EXPECT_EQ(listed(r1.top), listed(r2.top));
    EXPECT_EQ(listed(r1.pareto), listed(r2.pareto));
    EXPECT_EQ(r1.counts.pairs_tuned, r2.counts.pairs_tuned); // fixed batches: same pairs tuned
}

INSTANTIATE_TEST_SUITE_P(Examples, StarterCatalog,
                         ::testing::Values("reading-lamp.json", "two-cell-charger.json"));
