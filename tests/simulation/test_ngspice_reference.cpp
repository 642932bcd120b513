// The analytical engine and the cycle simulator against ngspice (the reference simulator, see
// domain notes): the same circuit as a SPICE netlist, run to steady state, measured over whole
// periods. Bounds: average load current 1 %, inductor ripple and switching frequency 2 %, each
// loss component both can compute (diode conduction, copper, switch conduction, sense) that is
// above 1 % of the total within 5 %.

#include "design_cases.hpp"
#include "simulation/cycle_simulator.hpp"
#include "simulation/netlist.hpp"
#include "simulation/ngspice.hpp"

#include <cmath>
#include <gtest/gtest.h>
#include <string>

namespace coilsieve::simulation {
namespace {

using testing::design_case;
using testing::DesignCase;

void expect_rel(double value, double reference, double tol, const std::string& what) {
    EXPECT_LE(std::abs(value - reference), tol * std::abs(reference))
        << what << ": " << value << " vs ngspice " << reference;
}

// Compare one set of figures (engine or simulator) with an ngspice measurement.
void compare(const converter::CornerResult& r, const SpiceMeasurement& m, const std::string& who) {
    SCOPED_TRACE(who);
    expect_rel(r.load_i_avg, m.load_i_avg, 0.01, "average load current");
    expect_rel(r.il_ripple_pp, m.il_ripple_pp, 0.02, "inductor ripple p-p");
    expect_rel(r.f_sw, m.f_sw, 0.02, "switching frequency");
    const double total = r.losses.total;
    struct Item {
        const char* name;
        double mine, spice;
    };
    for (const Item& it :
         {Item{"diode conduction", r.losses.diode_conduction, m.diode_conduction},
          Item{"inductor copper", r.losses.inductor_copper, m.copper_dc},
          Item{"switch conduction", r.losses.switch_conduction, m.switch_conduction},
          Item{"sense", r.losses.sense, m.sense}}) {
        if (it.spice > 0.01 * total) {
            expect_rel(it.mine, it.spice, 0.05, it.name);
        }
    }
}

class NgspiceReference : public ::testing::TestWithParam<int> {};

DesignCase case_for(int n) {
    switch (n) {
    case 0:
        return design_case("led-hysteretic", testing::led_hysteretic(0.0));
    case 1:
        return design_case("led-hysteretic-delay", testing::led_hysteretic(150e-9));
    case 2:
        return design_case("led-pwm-capacitor", testing::led_pwm_cap());
    case 3:
        return design_case("battery-pwm", testing::battery_pwm());
    case 4:
        return design_case("discontinuous-pwm", testing::dcm_pwm());
    case 5:
        return design_case("large-dcr-pwm", testing::large_dcr_pwm());
    default:
        return design_case("saturating-pwm", testing::saturating_pwm());
    }
}

TEST_P(NgspiceReference, EngineAndSimulatorAgreeWithNgspice) {
    if (!ngspice_available()) GTEST_SKIP() << "ngspice not installed";
    const DesignCase x = case_for(GetParam());
    SCOPED_TRACE(x.name);
    const converter::CornerResult engine = converter::evaluate_corner(x.d, x.l, x.diode, x.c, x.s);
    ASSERT_EQ(engine.status, converter::CornerStatus::ok) << engine.reason;
    // The simulator at the engine's temperatures: both are electrical solutions at one state.
    const SimulationResult sim = simulate_corner(x.d, x.l, x.diode, x.c, x.s, engine);
    ASSERT_EQ(sim.steady.status, converter::CornerStatus::ok) << sim.steady.reason;
    const Circuit k = make_circuit(x.d, x.l, x.diode, x.c, x.s, temperatures_from(engine));

    NetlistOptions o;
    o.duty = sim.steady.duty;
    o.i_initial = sim.steady.il_valley;
    const SpiceMeasurement m = simulate_ngspice(k, o);
    compare(sim.steady, m, "cycle simulator");
    if (k.mode == design::ControlMode::pwm) {
        // The engine's own duty in ngspice must give the target current.
        NetlistOptions oe;
        oe.duty = engine.duty;
        oe.i_initial = engine.il_valley;
        const SpiceMeasurement me = simulate_ngspice(k, oe);
        compare(engine, me, "analytical engine (its duty in ngspice)");
        expect_rel(k.i_target, me.load_i_avg, 0.01, "target current at the engine's duty");
        expect_rel(k.i_target, m.load_i_avg, 0.01, "target current at the simulator's duty");
    } else {
        compare(engine, m, "analytical engine");
    }
    EXPECT_EQ(sim.steady.dcm, GetParam() == 4);
    EXPECT_EQ(engine.dcm, GetParam() == 4);
    // Common practice: the freewheeling diode clamps the switch node about one drop below
    // ground when the switch opens (ngspice waveform).
    EXPECT_LT(m.v_sw_min, -0.2);
    EXPECT_GT(m.v_sw_min, -1.0);
}

INSTANTIATE_TEST_SUITE_P(Circuits, NgspiceReference, ::testing::Range(0, 7));

TEST(Ngspice, MissingExecutableGivesAClearError) {
    EXPECT_FALSE(ngspice_available("coilsieve-no-such-ngspice"));
    try {
        run_ngspice("* empty\n.end\n", "x.txt", "coilsieve-no-such-ngspice");
        FAIL() << "expected an error";
    } catch (const std::runtime_error& e) {
        EXPECT_NE(std::string(e.what()).find("not found"), std::string::npos) << e.what();
    }
}

TEST(Ngspice, BrokenNetlistReportsNgspicesWords) {
    if (!ngspice_available()) GTEST_SKIP() << "ngspice not installed";
    EXPECT_THROW(run_ngspice("* broken\nR1 a\n.tran 1n 1u\n.end\n", "x.txt"), std::runtime_error);
}

TEST(Netlist, PwmNeedsADutyAndHystereticUsesTheSwitchHysteresis) {
    const Circuit p = testing::battery_pwm();
    EXPECT_THROW(write_netlist(p, {}), std::invalid_argument);
    const Circuit h = testing::led_hysteretic(100e-9);
    const std::string n = write_netlist(h, {});
    // Thresholds on −i: VT = −centre, VH = half band (ngspice SW model).
    EXPECT_NE(n.find("VT=-1 VH=0.1"), std::string::npos) << n;
    EXPECT_NE(n.find("TD=1e-07"), std::string::npos) << n;
    EXPECT_NE(n.find(".model DMOD D(IS="), std::string::npos);
    EXPECT_NE(n.find("uic"), std::string::npos);
}

TEST(Netlist, DesignOverloadTakesDutyTemperatureAndRollOffFromTheCorner) {
    const DesignCase x = design_case("battery-pwm", testing::saturating_pwm());
    converter::CornerResult at;
    at.duty = 0.6875;
    at.il_valley = 1.6;
    at.ambient = 313.15;
    at.t_inductor = 330.0;
    at.tj_diode = 348.15; // 75 °C
    at.t_switch = 343.15;
    const std::string n = write_netlist(x.d, x.l, x.diode, x.c, x.s, at);
    EXPECT_NE(n.find("D1 dan sw DMOD temp=75"), std::string::npos) << n;
    EXPECT_NE(n.find(".ic V(ni)=1.6"), std::string::npos) << n;
    EXPECT_NE(n.find("pow(abs(V(ni))/2,6)"), std::string::npos) << n; // L(i) kept nonlinear
    EXPECT_NE(n.find("PULSE(0 1 0"), std::string::npos) << n;
}

} // namespace
} // namespace coilsieve::simulation
