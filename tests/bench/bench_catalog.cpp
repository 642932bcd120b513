// Catalog speed: importing a generated 100,000-row inductor CSV into a temporary database, and a
// range query over it. Targets: import <= 2 s, query <= 20 ms.
#include "catalog/store.hpp"

#include <benchmark/benchmark.h>
#include <cmath>
#include <filesystem>
#include <unistd.h>

using namespace coilsieve::catalog;
namespace fs = std::filesystem;

namespace {

constexpr int rows = 100000;

std::string generated_csv() {
    std::string text = "id,family,inductance (uH),dcr_typ (mOhm),isat (A),irms (A),length (mm),"
                       "width (mm),height (mm),price,currency\n";
    const char* families[] = {"shielded-drum-ferrite", "metal-composite", "unshielded-drum",
                              "powder-toroid"};
    static constexpr double e12[] = {1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2};
    for (int i = 0; i < rows; ++i) {
        const double l = e12[i % 12] * (i % 3 == 0 ? 1.0 : i % 3 == 1 ? 10.0 : 100.0);
        const double size = 3.0 + (i / 12) % 10;
        text += "BENCH-" + std::to_string(i) + "," + families[i % 4] + "," + std::to_string(l) +
                "," + std::to_string(5.0 + l * 4.0 / size) + "," +
                std::to_string(size * size * 0.3 / std::sqrt(l)) + "," +
                std::to_string(size * 0.35) + "," + std::to_string(size) + "," +
                std::to_string(size) + "," + std::to_string(1.0 + (i % 5)) + ",0.25,USD\n";
    }
    return text;
}

fs::path temp_db(const char* name) {
    const fs::path p = fs::temp_directory_path() /
                       ("coilsieve-bench-" + std::to_string(::getpid()) + "-" + name + ".db");
    for (const char* suffix : {"", "-wal", "-shm"}) fs::remove(p.string() + suffix);
    return p;
}

void BM_Import100k(benchmark::State& state) {
    const std::string text = generated_csv();
    for (auto _ : state) {
        state.PauseTiming();
        const fs::path path = temp_db("import");
        state.ResumeTiming();
        {
            Store store(path, OpenOptions{.load_starter = false});
            ImportRequest req;
            req.kind = PartKind::inductor;
            req.source = "bench";
            req.file_name = "bench.csv";
            req.text = text;
            const ImportSummary s = store.import(req);
            if (s.accepted != rows) state.SkipWithError("not every generated row was accepted");
        }
        state.PauseTiming();
        for (const char* suffix : {"", "-wal", "-shm"}) fs::remove(path.string() + suffix);
        state.ResumeTiming();
    }
    state.counters["rows"] = rows;
    state.counters["rows/s"] =
        benchmark::Counter(rows, benchmark::Counter::kIsIterationInvariantRate);
}
BENCHMARK(BM_Import100k)->Unit(benchmark::kMillisecond)->Iterations(3);

void BM_RangeQuery(benchmark::State& state) {
    const fs::path path = temp_db("query");
    Store store(path, OpenOptions{.load_starter = false});
    ImportRequest req;
    req.kind = PartKind::inductor;
    req.source = "bench";
    req.file_name = "bench.csv";
    req.text = generated_csv();
    store.import(req);
    std::size_t found = 0;
    for (auto _ : state) {
        InductorQuery q;
        q.inductance = {10e-6, 22e-6};
        q.isat_min = 2.0;
        q.height_max = 4e-3;
        const auto parts = store.query(q);
        found = parts.size();
        benchmark::DoNotOptimize(parts.data());
    }
    state.counters["matches"] = static_cast<double>(found);
    for (const char* suffix : {"", "-wal", "-shm"}) fs::remove(path.string() + suffix);
}
BENCHMARK(BM_RangeQuery)->Unit(benchmark::kMillisecond);

} // namespace

BENCHMARK_MAIN();
