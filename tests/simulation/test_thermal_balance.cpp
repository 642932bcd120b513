// The engine's junction temperature against a warm-up from cold run on the independent cycle
// simulator. The junction follows C·dT/dt = P(T) - (T - Ta)/R_th (lumped thermal model, as the
// engine's T = Ta + R_th·P), with P the diode's conduction (time-domain, nothing linearised) and
// leakage at T and the other temperatures taken from the engine. From the ambient, where the
// right-hand side is positive, T rises until it first meets a balance: the first T above Ta with
// Ta + R_th·P(T) = T is where a part warming from cold settles. Half steps T <- T + (g(T) - T)/2
// (explicit Euler on that equation) follow the warm-up without overshoot even where V_f's fall
// with temperature makes g decreasing. A leaky Schottky can also have an unstable balance above;
// the engine must report the one the warm-up reaches. The parts are starter-catalog inputs; the
// reference is the simulator.
#include "catalog/store.hpp"
#include "converter/evaluate.hpp"
#include "design/design_json.hpp"
#include "simulation/cycle_simulator.hpp"

#include <cmath>
#include <gtest/gtest.h>
#include <string>

using namespace coilsieve;

namespace {

struct Case {
    std::string design; // file in data/examples
    std::string inductor, diode, corner;
    double setting; // A (band, hysteretic) or Hz (frequency, PWM)
};

void check_warm_up(const Case& k) {
    const auto d =
        design::load_design_file(std::string(COILSIEVE_SOURCE_DIR) + "/data/examples/" + k.design);
    const auto parts = catalog::starter_parts();
    const parts::Inductor* l = nullptr;
    const parts::Diode* di = nullptr;
    for (const auto& x : parts.inductors)
        if (x.id == k.inductor) l = &x;
    for (const auto& x : parts.diodes)
        if (x.id == k.diode) di = &x;
    ASSERT_NE(l, nullptr) << k.inductor;
    ASSERT_NE(di, nullptr) << k.diode;
    const auto prepared = converter::prepare_pair(d, *l, *di);
    const converter::Corner* c = nullptr;
    for (const auto& x : prepared.corners)
        if (x.name == k.corner) c = &x;
    ASSERT_NE(c, nullptr) << k.corner;
    converter::Setting s = converter::default_setting(d);
    if (d.control.mode == design::ControlMode::hysteretic) s.band = k.setting;
    else s.frequency = k.setting;
    s = converter::corner_setting(d, *c, s);
    const auto engine = converter::evaluate_corner(d, prepared.inductor, prepared.diode, *c, s);
    ASSERT_EQ(engine.status, converter::CornerStatus::ok) << engine.reason;

    simulation::Temperatures t = simulation::temperatures_from(engine);
    t.diode = c->ambient;
    double t_next = t.diode;
    for (int n = 0; n < 600; ++n) {
        const auto sim = simulation::simulate_corner(d, prepared.inductor, prepared.diode, *c, s, t,
                                                     {}, &engine);
        const auto& p = sim.steady.losses;
        const double g =
            c->ambient + prepared.diode.rth_ja * (p.diode_conduction + p.diode_leakage);
        ASSERT_GE(g, t.diode - 1e-6) << "warming from cold never cools (step " << n << ")";
        t_next = t.diode + 0.5 * (g - t.diode);
        if (std::abs(g - t.diode) < 1e-3) break;
        t.diode = t_next;
    }
    // The engine stops within 0.05 K of its balance; the two diode-conduction integrals differ
    // slightly (fitted line vs the SPICE curve).
    EXPECT_NEAR(engine.tj_diode, t_next, 0.5)
        << k.inductor << " with " << k.diode << " at " << k.corner;
}

} // namespace

TEST(ThermalBalance, LeakySchottkySettlesWhereItWarmsUpToFromCold) {
    check_warm_up({"reading-lamp.json", "GEN-L-MCP-5.4x5.2x3-56u", "GEN-D-SCH-45V-2A-SOD-123F",
                   "vin-max hot L-20%", 0.12642});
    check_warm_up(
        {"reading-lamp.json", "GEN-L-SDF-4x4x3-22u", "GEN-D-SCH-30V-2A-SMA", "vin-nom hot", 0.189});
}

// PWM with an output capacitor: the first pass runs on a guessed ripple (twice the true one here),
// which overstates the diode's conduction time; its step took the junction from 45 °C to 137 °C,
// past the unstable balance, and the engine reported a runaway where the part settles near 86 °C.
TEST(ThermalBalance, FirstPassOnAGuessedRippleDoesNotCarryTheJunctionPastItsBalance) {
    for (const double f : {741135.0, 779056.0, 964961.0})
        check_warm_up({"two-cell-charger.json", "GEN-L-MCP-7.2x7x4-22u", "GEN-D-SCH-45V-2A-SMA",
                       f < 9e5 ? "cc-start vin-max hot L+20%" : "cc-start vin-nom hot", f});
}
