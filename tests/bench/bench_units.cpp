// Speed of units::parse and units::format: the catalog import parses every cell of files with
// 100,000 rows, and reports format every number they print.

#include "units/quantity.hpp"

#include <array>
#include <benchmark/benchmark.h>
#include <string_view>

namespace {

using coilsieve::units::Dimension;

struct Cell {
    std::string_view text;
    Dimension dim;
};

// A mix like an inductor catalog row.
constexpr std::array<Cell, 12> cells{{
    {"4.7uH", Dimension::inductance},
    {"35 m\u03A9", Dimension::resistance},
    {"2.3A", Dimension::current},
    {"4R7", Dimension::resistance},
    {"20%", Dimension::ratio},
    {"125C", Dimension::temperature},
    {"12.5 MHz", Dimension::frequency},
    {"4.3mm", Dimension::length},
    {"0.047", Dimension::resistance},
    {"2k2", Dimension::resistance},
    {"4.7e-6", Dimension::inductance},
    {"40K", Dimension::temperature_difference},
}};

void BM_parse_mix(benchmark::State& state) {
    for (auto _ : state) {
        for (const Cell& c : cells)
            benchmark::DoNotOptimize(coilsieve::units::parse(c.text, c.dim));
    }
    state.SetItemsProcessed(state.iterations() * static_cast<int64_t>(cells.size()));
}
BENCHMARK(BM_parse_mix);

void BM_parse_with_default_unit(benchmark::State& state) {
    for (auto _ : state) {
        benchmark::DoNotOptimize(coilsieve::units::parse("4.7", Dimension::inductance, "uH"));
    }
    state.SetItemsProcessed(state.iterations());
}
BENCHMARK(BM_parse_with_default_unit);

// The error path (unknown unit, diagnosis across dimensions) should stay cheap enough for a file
// full of bad cells.
void BM_parse_rejected(benchmark::State& state) {
    for (auto _ : state) {
        try {
            benchmark::DoNotOptimize(coilsieve::units::parse("4.7uF", Dimension::inductance));
        } catch (const coilsieve::units::ParseError& e) {
            benchmark::DoNotOptimize(e.what());
        }
    }
    state.SetItemsProcessed(state.iterations());
}
BENCHMARK(BM_parse_rejected);

void BM_format(benchmark::State& state) {
    constexpr std::array<double, 6> values{4.7e-6, 0.035, 1.2, 215e3, 328.15, 0.2};
    constexpr std::array<Dimension, 6> dims{Dimension::inductance,  Dimension::resistance,
                                            Dimension::current,     Dimension::frequency,
                                            Dimension::temperature, Dimension::ratio};
    for (auto _ : state) {
        for (std::size_t i = 0; i < values.size(); ++i) {
            benchmark::DoNotOptimize(coilsieve::units::format(values[i], dims[i]));
        }
    }
    state.SetItemsProcessed(state.iterations() * static_cast<int64_t>(values.size()));
}
BENCHMARK(BM_format);

void BM_format_in(benchmark::State& state) {
    for (auto _ : state) {
        benchmark::DoNotOptimize(coilsieve::units::format_in(4.7e-6, Dimension::inductance, "uH"));
    }
    state.SetItemsProcessed(state.iterations());
}
BENCHMARK(BM_format_in);

} // namespace

BENCHMARK_MAIN();
