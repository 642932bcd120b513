// Speed of the analytical steady state: one corner (thermal fixed point included) and one pair.
// Target: <= 5 µs per corner.

#include "converter/evaluate.hpp"

#include <benchmark/benchmark.h>

namespace {

using namespace coilsieve;

parts::Inductor bench_inductor(double isat) {
    parts::Inductor l;
    l.id = "L-BENCH";
    l.inductance = 47e-6;
    l.tolerance = 0.2;
    l.dcr_typ = 0.08;
    l.dcr_max = 0.1;
    l.isat = isat;
    l.sat_drop = 0.3;
    l.irms = 1.8;
    l.shape = parts::SaturationShape::hard;
    l.core = {1.5, 1.4, 2.6};
    l.core_volume = 0.3e-6;
    l.length = l.width = 6e-3;
    l.height = 3e-3;
    return l;
}

parts::Diode bench_diode() {
    parts::Diode d;
    d.id = "D-BENCH";
    d.technology = parts::DiodeTechnology::schottky;
    d.vrrm = 40.0;
    d.if_avg = 2.0;
    d.spice = parts::SpiceForward{2e-6, 1.05, 0.04, 0.69, 2.0};
    d.spice_cap = parts::SpiceCapacitance{150e-12, 0.6, 0.5};
    d.ir = 20e-6;
    d.ir_vr = 40.0;
    d.rth_ja = 100.0;
    d.package = "SMA";
    d.length = 4.3e-3;
    d.width = 2.6e-3;
    d.height = 2.4e-3;
    return d;
}

design::Design bench_design(design::ControlMode mode) {
    design::Design d;
    d.name = "bench";
    d.supply = {20.0, 24.0, 28.0};
    d.load = loads::LedString{3, 3.0, 0.5, 0.7, -2e-3};
    d.sense_resistor = 0.3;
    d.control.mode = mode;
    d.control.band = 0.3;
    d.control.delay = 50e-9;
    d.control.frequency = 300e3;
    d.ambient.max = 328.15;
    d.ambient.min = 273.15;
    return d;
}

void corner_bench(benchmark::State& state, design::ControlMode mode, double isat, bool cap) {
    auto d = bench_design(mode);
    if (cap) d.output_capacitor = design::OutputCapacitor{2.2e-6, 0.02};
    const auto lm = parts::make_model(bench_inductor(isat));
    const auto dm = parts::make_model(bench_diode());
    const auto corners = converter::make_corners(d, 0.2);
    const auto& c = corners[1]; // a tolerance corner, max DCR
    const auto s = converter::corner_setting(d, c, converter::default_setting(d));
    for (auto _ : state) {
        auto r = converter::evaluate_corner(d, lm, dm, c, s);
        benchmark::DoNotOptimize(r.losses.total);
    }
}

void BM_CornerHystereticFlatL(benchmark::State& s) {
    corner_bench(s, design::ControlMode::hysteretic, 4.0, false);
}
void BM_CornerHystereticRollOff(benchmark::State& s) {
    corner_bench(s, design::ControlMode::hysteretic, 0.9, false);
}
void BM_CornerHystereticCapacitor(benchmark::State& s) {
    corner_bench(s, design::ControlMode::hysteretic, 4.0, true);
}
void BM_CornerPwm(benchmark::State& s) { corner_bench(s, design::ControlMode::pwm, 4.0, false); }
void BM_CornerPwmRollOff(benchmark::State& s) {
    corner_bench(s, design::ControlMode::pwm, 0.9, false);
}
void BM_CornerPwmCapacitor(benchmark::State& s) {
    corner_bench(s, design::ControlMode::pwm, 4.0, true);
}

void BM_PairHysteretic(benchmark::State& state) {
    const auto d = bench_design(design::ControlMode::hysteretic);
    const auto l = bench_inductor(2.0);
    const auto diode = bench_diode();
    const auto s = converter::default_setting(d);
    for (auto _ : state) {
        auto e = converter::evaluate_pair(d, l, diode, s);
        benchmark::DoNotOptimize(e.loss_nominal);
    }
}

BENCHMARK(BM_CornerHystereticFlatL);
BENCHMARK(BM_CornerHystereticRollOff);
BENCHMARK(BM_CornerHystereticCapacitor);
BENCHMARK(BM_CornerPwm);
BENCHMARK(BM_CornerPwmRollOff);
BENCHMARK(BM_CornerPwmCapacitor);
BENCHMARK(BM_PairHysteretic);

} // namespace

BENCHMARK_MAIN();
