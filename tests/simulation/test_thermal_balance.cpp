// The engine's junction temperature against a plain warm-up from cold run on the independent
// cycle simulator: T(n+1) = Ta + R_th·P(T(n)) from the ambient, with P the diode's conduction
// (time-domain, nothing linearised) and leakage at T(n) and the other temperatures taken from the
// engine. Iterated from below without acceleration, the temperatures rise monotonically to the
// least balance (a monotone map's iterates from below converge to its least fixed point), which
// is where a part warming from cold settles. A leaky Schottky can also have an unstable balance
// above it; the engine must report the stable one. The parts are starter-catalog inputs; the
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
    std::string inductor, diode, corner;
    double band; // A
};

void check_warm_up(const Case& k) {
    const auto d = design::load_design_file(std::string(COILSIEVE_SOURCE_DIR) +
                                            "/data/examples/reading-lamp.json");
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
    s.band = k.band;
    s = converter::corner_setting(d, *c, s);
    const auto engine = converter::evaluate_corner(d, prepared.inductor, prepared.diode, *c, s);
    ASSERT_EQ(engine.status, converter::CornerStatus::ok) << engine.reason;

    simulation::Temperatures t = simulation::temperatures_from(engine);
    t.diode = c->ambient;
    double t_next = t.diode;
    for (int n = 0; n < 300; ++n) {
        const auto sim = simulation::simulate_corner(d, prepared.inductor, prepared.diode, *c, s, t,
                                                     {}, &engine);
        const auto& p = sim.steady.losses;
        t_next = c->ambient + prepared.diode.rth_ja * (p.diode_conduction + p.diode_leakage);
        ASSERT_GE(t_next, t.diode - 1e-6) << "warming from cold never cools (pass " << n << ")";
        if (std::abs(t_next - t.diode) < 1e-3) break;
        t.diode = t_next;
    }
    // The engine stops within 0.05 K of its balance; the two diode-conduction integrals differ
    // slightly (fitted line vs the SPICE curve).
    EXPECT_NEAR(engine.tj_diode, t_next, 0.5)
        << k.inductor << " with " << k.diode << " at " << k.corner;
}

} // namespace

TEST(ThermalBalance, LeakySchottkySettlesWhereItWarmsUpToFromCold) {
    check_warm_up(
        {"GEN-L-MCP-5.4x5.2x3-56u", "GEN-D-SCH-45V-2A-SOD-123F", "vin-max hot L-20%", 0.12642});
    check_warm_up({"GEN-L-SDF-4x4x3-22u", "GEN-D-SCH-30V-2A-SMA", "vin-nom hot", 0.189});
}
