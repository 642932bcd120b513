// Speed of the cycle simulator to the periodic steady state (target: <= 2 ms per corner), and of
// ngspice on the same circuit in the same run, with the ratio as a counter.

#include "../simulation/design_cases.hpp"
#include "simulation/cycle_simulator.hpp"
#include "simulation/ngspice.hpp"

#include <benchmark/benchmark.h>
#include <chrono>

namespace {

using namespace coilsieve;
using namespace coilsieve::simulation;

Circuit circuit(int n) {
    switch (n) {
    case 0:
        return testing::led_hysteretic(0.0);
    case 1:
        return testing::led_hysteretic(150e-9);
    case 2:
        return testing::led_pwm_cap();
    case 3:
        return testing::battery_pwm();
    case 4:
        return testing::dcm_pwm();
    default:
        return testing::large_dcr_pwm();
    }
}

const char* const names[] = {"led-hysteretic", "led-hysteretic-delay", "led-pwm-capacitor",
                             "battery-pwm",    "discontinuous-pwm",    "large-dcr-pwm"};

SimulationOptions no_waveform() {
    SimulationOptions o;
    o.waveform_cycles = 0;
    return o;
}

// Periodic steady state from the simulator's own estimate (no analytical start).
void BM_SimulateCircuit(benchmark::State& state) {
    const Circuit k = circuit(static_cast<int>(state.range(0)));
    state.SetLabel(names[state.range(0)]);
    int cycles = 0;
    for (auto _ : state) {
        const SimulationResult r = simulate(k, no_waveform());
        cycles = r.cycles_simulated;
        benchmark::DoNotOptimize(r.steady.il_avg);
    }
    state.counters["cycles"] = cycles;
}
BENCHMARK(BM_SimulateCircuit)->DenseRange(0, 5)->Unit(benchmark::kMicrosecond);

// A whole corner as the check command runs it: engine first, simulator started from it.
void BM_SimulateCornerFromEngine(benchmark::State& state) {
    const testing::DesignCase x =
        testing::design_case(names[state.range(0)], circuit(static_cast<int>(state.range(0))));
    state.SetLabel(names[state.range(0)]);
    const converter::CornerResult e = converter::evaluate_corner(x.d, x.l, x.diode, x.c, x.s);
    for (auto _ : state) {
        const SimulationResult r = simulate_corner(x.d, x.l, x.diode, x.c, x.s, e, no_waveform());
        benchmark::DoNotOptimize(r.steady.il_avg);
    }
}
BENCHMARK(BM_SimulateCornerFromEngine)->DenseRange(0, 5)->Unit(benchmark::kMicrosecond);

// ngspice on the same circuit (netlist, batch run, measurement), with the simulator's time on it
// measured alongside: counter ngspice_over_simulator.
void BM_NgspiceSameCircuit(benchmark::State& state) {
    if (!ngspice_available()) {
        state.SkipWithError("ngspice not installed");
        return;
    }
    const Circuit k = circuit(static_cast<int>(state.range(0)));
    state.SetLabel(names[state.range(0)]);
    const SimulationResult r = simulate(k, no_waveform());
    NetlistOptions o;
    o.duty = r.steady.duty;
    o.i_initial = r.steady.il_valley;
    double spice_s = 0.0;
    int runs = 0;
    for (auto _ : state) {
        const auto t0 = std::chrono::steady_clock::now();
        const SpiceMeasurement m = simulate_ngspice(k, o);
        spice_s += std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
        ++runs;
        benchmark::DoNotOptimize(m.il_avg);
    }
    const int n_sim = 50;
    const auto t0 = std::chrono::steady_clock::now();
    for (int i = 0; i < n_sim; ++i) {
        benchmark::DoNotOptimize(simulate(k, no_waveform()).steady.il_avg);
    }
    const double sim_s =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count() / n_sim;
    state.counters["simulator_ms"] = sim_s * 1e3;
    state.counters["ngspice_ms"] = spice_s / runs * 1e3;
    state.counters["ngspice_over_simulator"] = spice_s / runs / sim_s;
}
BENCHMARK(BM_NgspiceSameCircuit)->DenseRange(0, 5)->Iterations(1)->Unit(benchmark::kMillisecond);

} // namespace

BENCHMARK_MAIN();
