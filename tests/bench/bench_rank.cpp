// Ranking speed: each example design on the starter catalog (target <= 1 s), a generated catalog
// of 20,000 inductors x 3,000 diodes (target <= 20 s), exhaustive / pruned on the starter catalog
// (target >= 50x), pairs per second and peak memory. Figures are printed as benchmark counters.
#include "catalog/store.hpp"
#include "design/design_json.hpp"
#include "studies/rank.hpp"

#include <benchmark/benchmark.h>
#include <chrono>
#include <cmath>
#include <fstream>
#include <iostream>
#include <random>
#include <sstream>
#include <sys/resource.h>

using namespace coilsieve;

namespace {

struct Catalog {
    std::vector<parts::Inductor> inductors;
    std::vector<parts::Diode> diodes;
};

const Catalog& starter() {
    static const Catalog c = [] {
        auto k = catalog::starter_parts();
        return Catalog{std::move(k.inductors), std::move(k.diodes)};
    }();
    return c;
}

// 20,000 x 3,000 parts made by perturbing starter parts (values within ±10 %, from a fixed
// generator state, so every run is the same).
const Catalog& generated() {
    static const Catalog c = [] {
        const auto& s = starter();
        Catalog k;
        std::mt19937 rng(2024);
        std::uniform_real_distribution<double> p(0.9, 1.1);
        for (std::size_t i = 0; i < 20000; ++i) {
            auto l = s.inductors[i % s.inductors.size()];
            l.id += "-g" + std::to_string(i);
            l.inductance *= p(rng);
            const double r = p(rng);
            l.dcr_typ *= r;
            l.dcr_max *= r;
            l.isat *= p(rng);
            l.irms *= p(rng);
            if (l.price) *l.price *= p(rng);
            k.inductors.push_back(std::move(l));
        }
        for (std::size_t i = 0; i < 3000; ++i) {
            auto d = s.diodes[i % s.diodes.size()];
            d.id += "-g" + std::to_string(i);
            d.if_avg *= p(rng);
            if (d.spice) d.spice->rs *= p(rng);
            for (auto& pt : d.forward) pt.vf *= p(rng);
            if (d.price) *d.price *= p(rng);
            k.diodes.push_back(std::move(d));
        }
        return k;
    }();
    return c;
}

design::Design example(const std::string& name) {
    return design::load_design_file(std::string(COILSIEVE_SOURCE_DIR) + "/data/examples/" + name);
}

double peak_mb() {
    rusage u{};
    getrusage(RUSAGE_SELF, &u);
    return static_cast<double>(u.ru_maxrss) / 1024.0; // ru_maxrss is in KiB on Linux
}

void report(benchmark::State& state, const studies::RankResult& r) {
    state.counters["pairs"] = static_cast<double>(r.counts.pairs_total);
    state.counters["tuned"] = static_cast<double>(r.counts.pairs_tuned);
    state.counters["pruned"] = static_cast<double>(r.counts.pairs_pruned);
    state.counters["probed"] = static_cast<double>(r.counts.pairs_probed);
    state.counters["screened_in"] = static_cast<double>(r.counts.pairs_considered);
    state.counters["pareto"] = static_cast<double>(r.counts.pareto);
    state.counters["infeasible"] = static_cast<double>(r.counts.pairs_infeasible);
    state.counters["evaluations"] = static_cast<double>(r.counts.evaluations);
    state.counters["seconds"] = r.elapsed_s;
    state.counters["pairs_per_s"] = static_cast<double>(r.counts.pairs_total) / r.elapsed_s;
    state.counters["peak_MB"] = peak_mb();
}

void rank_example(benchmark::State& state, const std::string& file, bool big, bool exhaustive) {
    const auto d = example(file);
    const auto& cat = big ? generated() : starter();
    studies::RankOptions o;
    o.exhaustive = exhaustive;
    studies::RankResult r;
    for (auto _ : state) {
        r = studies::rank_pairs(d, cat.inductors, cat.diodes, o, studies::default_evaluator());
        benchmark::DoNotOptimize(r.top.data());
    }
    report(state, r);
}

// Exhaustive and pruned in the same run, for the ratio.
void ratio(benchmark::State& state, const std::string& file) {
    const auto d = example(file);
    const auto& cat = starter();
    double t_pruned = 0.0, t_full = 0.0;
    for (auto _ : state) {
        studies::RankOptions o;
        t_pruned =
            studies::rank_pairs(d, cat.inductors, cat.diodes, o, studies::default_evaluator())
                .elapsed_s;
        o.exhaustive = true;
        t_full = studies::rank_pairs(d, cat.inductors, cat.diodes, o, studies::default_evaluator())
                     .elapsed_s;
    }
    state.counters["pruned_s"] = t_pruned;
    state.counters["exhaustive_s"] = t_full;
    state.counters["ratio"] = t_full / t_pruned;
    state.counters["peak_MB"] = peak_mb();
}

} // namespace

BENCHMARK_CAPTURE(rank_example, lamp_starter, "reading-lamp.json", false, false)
    ->Iterations(1)
    ->Unit(benchmark::kSecond)
    ->UseRealTime();
BENCHMARK_CAPTURE(rank_example, charger_starter, "two-cell-charger.json", false, false)
    ->Iterations(1)
    ->Unit(benchmark::kSecond)
    ->UseRealTime();
BENCHMARK_CAPTURE(rank_example, floodlight_starter, "workshop-floodlight.json", false, false)
    ->Iterations(1)
    ->Unit(benchmark::kSecond)
    ->UseRealTime();
BENCHMARK_CAPTURE(rank_example, lamp_generated_20000x3000, "reading-lamp.json", true, false)
    ->Iterations(1)
    ->Unit(benchmark::kSecond)
    ->UseRealTime();
BENCHMARK_CAPTURE(rank_example, charger_generated_20000x3000, "two-cell-charger.json", true, false)
    ->Iterations(1)
    ->Unit(benchmark::kSecond)
    ->UseRealTime();
BENCHMARK_CAPTURE(ratio, lamp_exhaustive_over_pruned, "reading-lamp.json")
    ->Iterations(1)
    ->Unit(benchmark::kSecond)
    ->UseRealTime();
BENCHMARK_CAPTURE(ratio, charger_exhaustive_over_pruned, "two-cell-charger.json")
    ->Iterations(1)
    ->Unit(benchmark::kSecond)
    ->UseRealTime();

BENCHMARK_MAIN();
