// Cycle simulator against closed forms: straight-line and R–L buck relations, the exact flux
// integral of a nonlinear inductor, discontinuous conduction, energy balance, start-up, CSV.

#include "circuits.hpp"
#include "simulation/cycle_simulator.hpp"

#include <cmath>
#include <gtest/gtest.h>
#include <sstream>
#include <string>

namespace coilsieve::simulation {
namespace {

using testing::ideal_diode;

// Lossless circuit: no resistances, linear L, near-ideal diode.
Circuit lossless(design::ControlMode mode) {
    Circuit k;
    k.vin = 24.0;
    k.l0 = 47e-6;
    k.diode = ideal_diode();
    k.v0 = 9.0;
    k.mode = mode;
    k.i_target = 1.0;
    k.i_lo = 0.9;
    k.i_hi = 1.1;
    k.frequency = 200e3;
    return k;
}

TEST(CycleSimulator, HystereticStraightLineMatchesVoltSecondBalance) {
    const Circuit k = lossless(design::ControlMode::hysteretic);
    const SimulationResult r = simulate(k);
    ASSERT_EQ(r.steady.status, converter::CornerStatus::ok);
    // Volt-second balance (domain notes, "Control"): t_on = L·ΔI/(Vin − Vo), t_off = L·ΔI/Vo,
    // f = Vo·(Vin − Vo)/(Vin·L·ΔI).
    const double dI = 0.2, L = 47e-6, vin = 24.0, vo = 9.0;
    EXPECT_NEAR(r.steady.t_on, L * dI / (vin - vo), 1e-4 * L * dI / (vin - vo));
    EXPECT_NEAR(r.steady.t_off, L * dI / vo, 1e-4 * L * dI / vo);
    EXPECT_NEAR(r.steady.f_sw, vo * (vin - vo) / (vin * L * dI), 1e-4 * r.steady.f_sw);
    EXPECT_NEAR(r.steady.il_avg, 1.0, 1e-6);
    EXPECT_NEAR(r.steady.il_ripple_pp, dI, 1e-7);
    // Triangular current: I_rms = √(I² + ΔI²/12) (Erickson & Maksimović, 2nd ed., app. A).
    EXPECT_NEAR(r.steady.il_rms, std::sqrt(1.0 + dI * dI / 12.0), 1e-6);
    EXPECT_FALSE(r.steady.dcm);
}

TEST(CycleSimulator, HystereticDelayWidensTheBandAndShiftsTheAverage) {
    Circuit k = lossless(design::ControlMode::hysteretic);
    k.delay = 100e-9;
    const SimulationResult r = simulate(k);
    ASSERT_EQ(r.steady.status, converter::CornerStatus::ok);
    const double L = 47e-6, vin = 24.0, vo = 9.0, td = 100e-9;
    // Domain notes, "Control": peak = I_hi + t_d·slope_on, valley = I_lo − t_d·|slope_off|,
    // average shifts by t_d·(Vin − 2·Vo)/(2L).
    EXPECT_NEAR(r.steady.il_peak, 1.1 + td * (vin - vo) / L, 1e-6);
    EXPECT_NEAR(r.steady.il_valley, 0.9 - td * vo / L, 1e-6);
    EXPECT_NEAR(r.steady.il_avg, 1.0 + td * (vin - 2.0 * vo) / (2.0 * L), 1e-6);
    const double dI_eff = 0.2 + td * vin / L;
    EXPECT_NEAR(r.steady.f_sw, vo * (vin - vo) / (vin * L * dI_eff), 1e-4 * r.steady.f_sw);
}

TEST(CycleSimulator, NonlinearInductorFollowsTheFluxIntegral) {
    // L(i) = l0/(1 + a·(i/isat)²) has the flux ψ(i) = l0·isat/√a·atan(√a·i/isat) (calculus);
    // lossless, t_on = Δψ/(Vin − Vo) and t_off = Δψ/Vo exactly.
    Circuit k = lossless(design::ControlMode::hysteretic);
    k.isat = 1.0;
    k.rolloff_a = 0.5;
    k.rolloff_p = 2.0;
    const SimulationResult r = simulate(k);
    ASSERT_EQ(r.steady.status, converter::CornerStatus::ok);
    const double sa = std::sqrt(0.5);
    auto psi = [&](double i) { return 47e-6 / sa * std::atan(sa * i); };
    const double dpsi = psi(1.1) - psi(0.9);
    EXPECT_NEAR(r.steady.t_on, dpsi / 15.0, 1e-6 * dpsi / 15.0);
    EXPECT_NEAR(r.steady.t_off, dpsi / 9.0, 1e-6 * dpsi / 9.0);
    // Linearising at the target current would give L(1) = l0/1.5: a different on-time.
    EXPECT_GT(std::abs(r.steady.t_on - 47e-6 / 1.5 * 0.2 / 15.0), 1e-4 * r.steady.t_on);
}

TEST(CycleSimulator, PwmWithResistanceSolvesExactRlSegments) {
    // Same resistance R in both intervals, ideal diode: each interval is an exact R–L
    // exponential (domain notes, "The circuit"), and the average of v_L being zero gives
    // D = (v0 + R·I)/Vin exactly (volt-second balance, Erickson & Maksimović ch. 2).
    Circuit k = lossless(design::ControlMode::pwm);
    k.r_load = 2.0;
    k.dcr = 1.0;
    k.l0 = 470e-6;
    k.frequency = 20e3;
    const double R = 3.0, L = 470e-6, T = 1.0 / 20e3, I = 1.0;
    const SimulationResult r = simulate(k);
    ASSERT_EQ(r.steady.status, converter::CornerStatus::ok);
    const double D = (9.0 + R * I) / 24.0;
    EXPECT_NEAR(r.steady.duty, D, 1e-6);
    EXPECT_NEAR(r.steady.load_i_avg, I, 1e-8);
    // Periodic exponential: i1 = A + (i0 − A)e^{−DT/τ}, i0 = B + (i1 − B)e^{−(1−D)T/τ}.
    const double tau = L / R, A = (24.0 - 9.0) / R, B = -9.0 / R;
    const double e1 = std::exp(-D * T / tau), e2 = std::exp(-(1 - D) * T / tau);
    const double i0 = (B * (1 - e2) + A * (1 - e1) * e2) / (1 - e1 * e2);
    const double i1 = A + (i0 - A) * e1;
    EXPECT_NEAR(r.steady.il_valley, i0, 1e-6);
    EXPECT_NEAR(r.steady.il_peak, i1, 1e-6);
    // The straight-line ripple (Vin − Vo)·D/(L·f) overstates the curved one.
    EXPECT_LT(r.steady.il_ripple_pp, (24.0 - 12.0) * D * T / L);
}

TEST(CycleSimulator, DiscontinuousConductionMatchesTriangleArea) {
    // Lossless DCM: peak = (Vin − Vo)·t_on/L, the diode conducts L·peak/Vo, average
    // = peak·(t_on + t_diode)/(2T) (Erickson & Maksimović ch. 5, derived from the waveform).
    Circuit k = lossless(design::ControlMode::pwm);
    k.vin = 20.0;
    k.v0 = 6.0;
    k.l0 = 10e-6;
    k.frequency = 100e3;
    k.i_target = 0.15;
    const SimulationResult r = simulate(k);
    ASSERT_EQ(r.steady.status, converter::CornerStatus::ok);
    EXPECT_TRUE(r.steady.dcm);
    const double T = 1e-5, L = 10e-6;
    const double peak = std::sqrt(2.0 * 0.15 * T / (L * (1.0 / 14.0 + 1.0 / 6.0)));
    EXPECT_NEAR(r.steady.il_peak, peak, 1e-6 * peak);
    EXPECT_NEAR(r.steady.t_off, L * peak / 6.0, 1e-6 * L * peak / 6.0);
    EXPECT_NEAR(r.steady.duty, L * peak / 14.0 / T, 1e-6);
    EXPECT_NEAR(r.steady.il_valley, 0.0, 1e-12);
}

TEST(CycleSimulator, EnergyBalanceHoldsOnEveryTestCircuit) {
    // Conservation of energy over a periodic cycle: P_in = P_out + every dissipation.
    for (const Circuit& k : {testing::led_hysteretic(0.0), testing::led_hysteretic(150e-9),
                             testing::led_pwm_cap(), testing::battery_pwm(), testing::dcm_pwm(),
                             testing::saturating_pwm(), testing::large_dcr_pwm()}) {
        const SimulationResult r = simulate(k);
        ASSERT_EQ(r.steady.status, converter::CornerStatus::ok) << r.steady.reason;
        EXPECT_LT(std::abs(r.energy_balance), 1e-5);
        EXPECT_GT(r.steady.losses.diode_conduction, 0.0);
        EXPECT_GT(r.steady.efficiency, 0.5);
        EXPECT_LT(r.steady.efficiency, 1.0);
        if (k.mode == design::ControlMode::pwm) {
            EXPECT_NEAR(r.steady.load_i_avg, k.i_target, 1e-6 * k.i_target);
        }
    }
}

TEST(CycleSimulator, FreewheelingDiodeClampsTheSwitchNode) {
    // Common practice: when the switch opens the diode clamps the switch node to about one
    // diode drop below ground (a Schottky: a few tenths of a volt).
    const SimulationResult r = simulate(testing::led_hysteretic(100e-9));
    ASSERT_FALSE(r.waveform.empty());
    double v_min = 1e9;
    for (const auto& s : r.waveform) v_min = std::min(v_min, s.v_sw);
    EXPECT_LT(v_min, -0.2);
    EXPECT_GT(v_min, -1.0);
}

TEST(CycleSimulator, OutputCapacitorShuntsRipple) {
    const SimulationResult r = simulate(testing::led_pwm_cap());
    ASSERT_EQ(r.steady.status, converter::CornerStatus::ok);
    // The capacitor takes most of the ripple: a 4.7 µF, 20 mΩ branch against 2 Ω of load at
    // 250 kHz (impedance divider, common practice).
    EXPECT_LT(r.steady.load_ripple_pp, 0.2 * r.steady.il_ripple_pp);
    EXPECT_GT(r.steady.load_ripple_pp, 0.0);
}

TEST(CycleSimulator, NoRegulationWhenTheSupplyIsTooLow) {
    Circuit k = testing::led_hysteretic(0.0);
    k.vin = 9.5;
    const SimulationResult r = simulate(k);
    EXPECT_EQ(r.steady.status, converter::CornerStatus::no_regulation);
    EXPECT_FALSE(r.steady.reason.empty());
}

TEST(CycleSimulator, StartupFromRest) {
    // Hysteretic with delay and a capacitor starting at the knee: the first on-interval sees a
    // lower load voltage, so its peak is at least the steady peak.
    Circuit k = testing::led_hysteretic(150e-9);
    k.cap = 1e-6;
    k.cap_esr = 0.05;
    const SimulationResult ss = simulate(k);
    const StartupResult s = simulate_startup(k);
    ASSERT_TRUE(s.regulated);
    EXPECT_GE(s.first_peak, ss.steady.il_peak);
    EXPECT_GT(s.time_to_regulation, 0.0);

    // PWM open loop from rest: the current rises with the L/R time constant, so reaching 2 %
    // takes about ln(50)·τ (first-order step response).
    const Circuit b = testing::battery_pwm();
    const StartupResult sb = simulate_startup(b);
    ASSERT_TRUE(sb.regulated);
    const double r_min = b.r_on + b.r_sense + b.dcr + b.r_load; // + diode, so τ is at most
    const double tau_max = b.l0 / r_min;
    EXPECT_LT(sb.time_to_regulation, 1.5 * std::log(50.0) * tau_max);
    EXPECT_GT(sb.time_to_regulation, 0.5 * std::log(50.0) * b.l0 / (r_min + 0.2));
    EXPECT_LT(sb.first_peak, b.i_target);
    EXPECT_NEAR(sb.first_peak_over_isat, sb.first_peak / b.isat, 1e-12);
}

TEST(CycleSimulator, WaveformCsv) {
    const SimulationResult r = simulate(testing::led_hysteretic(0.0));
    std::ostringstream os;
    write_waveform_csv(os, r.waveform);
    std::istringstream is(os.str());
    std::string line;
    std::getline(is, line);
    EXPECT_EQ(line, "t_s,i_l_A,v_sw_V,i_d_A,i_load_A");
    std::size_t rows = 0;
    double last_t = -1.0;
    while (std::getline(is, line)) {
        double t = std::stod(line.substr(0, line.find(',')));
        EXPECT_GE(t, last_t);
        last_t = t;
        ++rows;
    }
    EXPECT_EQ(rows, r.waveform.size());
    EXPECT_NEAR(last_t, 1.0 / r.steady.f_sw, 1e-9 / r.steady.f_sw);
    EXPECT_THROW(write_waveform_csv(std::filesystem::path("/nonexistent-dir/x.csv"), r.waveform),
                 std::runtime_error);
}

} // namespace
} // namespace coilsieve::simulation
