// The analytical steady state against textbook relations in their limits.

#include "fixtures.hpp"

#include <cmath>
#include <gtest/gtest.h>
#include <numbers>

namespace coilsieve::converter {
namespace {

using namespace testing;

TEST(Hysteretic, TenPercentBandAroundOneAmpereSwitchesAt0p9And1p1) {
    // Common practice (domain notes): a ±10 % band around 1 A switches at 0.9 A and 1.1 A.
    const auto d = sink_design(24.0, 12.0, 0.0, 1.0);
    const auto r = evaluate_corner(d, ideal_inductor(100e-6), ideal_diode(),
                                   corner_for(d, 24.0, 12.0, 0.0, 1.0), band_setting(0.2));
    ASSERT_EQ(r.status, CornerStatus::ok) << r.reason;
    EXPECT_NEAR(r.il_valley, 0.9, 1e-9);
    EXPECT_NEAR(r.il_peak, 1.1, 1e-9);
    EXPECT_NEAR(r.il_ripple_pp, 0.2, 1e-9);
    EXPECT_FALSE(r.dcm);
}

TEST(Hysteretic, LosslessTimesAndFrequencyFromVoltSecondBalance) {
    // Domain notes (derived from volt-second balance, Erickson & Maksimović 2nd ed. ch. 2):
    // t_on = L·ΔI/(Vin − Vo), t_off = L·ΔI/Vo, f = Vo·(Vin − Vo)/(Vin·L·ΔI).
    const double vin = 24.0, vo = 9.0, l = 100e-6, di = 0.2;
    const auto d = sink_design(vin, vo, 0.0, 1.0);
    const auto r = evaluate_corner(d, ideal_inductor(l), ideal_diode(),
                                   corner_for(d, vin, vo, 0.0, 1.0), band_setting(di));
    ASSERT_EQ(r.status, CornerStatus::ok) << r.reason;
    EXPECT_NEAR(r.t_on, l * di / (vin - vo), 1e-6 * r.t_on);
    EXPECT_NEAR(r.t_off, l * di / vo, 1e-6 * r.t_off);
    EXPECT_NEAR(r.f_sw, vo * (vin - vo) / (vin * l * di), 1e-5 * r.f_sw);
    // Steady state: D = Vo/Vin (volt-second balance, Erickson & Maksimović 2nd ed. ch. 2).
    EXPECT_NEAR(r.duty, vo / vin, 1e-5);
    // Symmetric triangle: the average is the band centre, RMS √(I² + ΔI²/12) (Erickson app. A).
    EXPECT_NEAR(r.il_avg, 1.0, 1e-6);
    EXPECT_NEAR(r.il_rms, std::sqrt(1.0 + di * di / 12.0), 1e-6);
    // Diode average (1 − D)·I, switch RMS √D·I_L,rms (domain notes, triangular currents).
    EXPECT_NEAR(r.id_avg, (1.0 - vo / vin) * 1.0, 1e-5);
    EXPECT_NEAR(r.isw_rms, std::sqrt(vo / vin) * r.il_rms, 1e-5);
}

TEST(Hysteretic, DelayWidensTheRippleAndShiftsTheAverage) {
    // Domain notes (derived): with a delay t_d, ΔI_eff = ΔI + t_d·Vin/L and the average moves by
    // t_d·(Vin − 2·Vo)/(2L); peak = I_hi + t_d·slope_on, valley = I_lo − t_d·|slope_off|.
    const double vin = 24.0, vo = 8.0, l = 100e-6, di = 0.2, td = 100e-9;
    auto d = sink_design(vin, vo, 0.0, 1.0);
    d.control.delay = td;
    const auto r = evaluate_corner(d, ideal_inductor(l), ideal_diode(),
                                   corner_for(d, vin, vo, 0.0, 1.0), band_setting(di));
    ASSERT_EQ(r.status, CornerStatus::ok) << r.reason;
    const double di_eff = di + td * vin / l;
    EXPECT_NEAR(r.il_ripple_pp, di_eff, 1e-7);
    EXPECT_NEAR(r.il_peak, 1.1 + td * (vin - vo) / l, 1e-7);
    EXPECT_NEAR(r.il_valley, 0.9 - td * vo / l, 1e-7);
    EXPECT_NEAR(r.il_avg - 1.0, td * (vin - 2.0 * vo) / (2.0 * l), 1e-7);
    EXPECT_NEAR(r.regulation_error, td * (vin - 2.0 * vo) / (2.0 * l), 1e-7);
    EXPECT_NEAR(r.f_sw, vo * (vin - vo) / (vin * l * di_eff), 1e-5 * r.f_sw);
}

TEST(Hysteretic, WiderBandMeansLowerFrequency) {
    // Common practice (domain notes): a wider band means a lower frequency.
    const auto d = sink_design(24.0, 12.0, 0.5, 1.0);
    const auto l = drum(47e-6, 0.05, 3.0);
    const auto diode = schottky();
    const auto c = corner_for(d, 24.0, 12.0, 0.5, 1.0);
    double f_prev = 1e300;
    for (double band : {0.05, 0.1, 0.2, 0.4, 0.8}) {
        const auto r = evaluate_corner(d, l, diode, c, band_setting(band));
        ASSERT_EQ(r.status, CornerStatus::ok) << r.reason;
        EXPECT_LT(r.f_sw, f_prev) << band;
        f_prev = r.f_sw;
    }
}

TEST(Hysteretic, LargeResistanceFollowsTheExponentialNotTheRamp) {
    // L·di/dt = E − R·i: the on-time from valley to peak is τ·ln((I∞ − i_v)/(I∞ − i_p)), τ = L/R
    // (first-order R–L response). With R·I comparable to the drive the straight ramp is far off.
    const double vin = 12.0, vo = 6.0, l = 1e-3, dcr = 4.0, di = 0.4;
    auto d = sink_design(vin, vo, 0.0, 1.0);
    auto ind = ideal_inductor(l);
    ind.dcr_typ = ind.dcr_max = dcr;
    ind.dcr_t0 = 298.15; // the test runs at 25 °C with no heating: DCR as given
    const auto r =
        evaluate_corner(d, ind, ideal_diode(), corner_for(d, vin, vo, 0.0, 1.0), band_setting(di));
    ASSERT_EQ(r.status, CornerStatus::ok) << r.reason;
    const double tau = l / dcr;
    const double i_inf_on = (vin - vo) / dcr; // 1.5 A
    const double i_inf_off = -vo / dcr;       // −1.5 A (ideal diode)
    const double t_on = tau * std::log((i_inf_on - 0.8) / (i_inf_on - 1.2));
    const double t_off = tau * std::log((i_inf_off - 1.2) / (i_inf_off - 0.8));
    EXPECT_NEAR(r.t_on, t_on, 1e-5 * t_on);
    EXPECT_NEAR(r.t_off, t_off, 1e-5 * t_off);
    const double t_on_ramp = l * di / (vin - vo - dcr * 1.0);
    EXPECT_GT(std::abs(r.t_on - t_on_ramp) / t_on, 0.02); // the curvature is visible
}

TEST(Hysteretic, NoRegulationWhenTheSupplyCannotReachTheUpperThreshold) {
    // On-interval asymptote (Vin − Vo)/R below I_hi: the current never reaches the threshold.
    const auto d = sink_design(12.0, 11.0, 1.0, 1.0);
    const auto r = evaluate_corner(d, drum(47e-6, 0.1, 3.0), schottky(),
                                   corner_for(d, 12.0, 11.0, 1.0, 1.0), band_setting(0.2));
    EXPECT_EQ(r.status, CornerStatus::no_regulation);
    EXPECT_FALSE(r.reason.empty());
    EXPECT_LT(r.regulation_headroom, 0.0);
    EXPECT_TRUE(all_finite(r));
}

TEST(Hysteretic, LongDelayDrivesTheValleyToZeroAndTheDiodeBlocks) {
    // If the delayed valley would fall below zero the diode blocks and the current rests at zero
    // until the switch turns on (discontinuous conduction).
    const double vin = 24.0, vo = 20.0, l = 10e-6, td = 2e-6;
    auto d = sink_design(vin, vo, 0.0, 0.5);
    d.control.delay = td;
    const auto r = evaluate_corner(d, ideal_inductor(l), ideal_diode(),
                                   corner_for(d, vin, vo, 0.0, 0.5), band_setting(0.2));
    ASSERT_EQ(r.status, CornerStatus::ok) << r.reason;
    EXPECT_TRUE(r.dcm);
    EXPECT_EQ(r.il_valley, 0.0);
    // Off from I_lo = 0.4 A at Vo/L = 2 A/µs reaches zero after 0.2 µs; idle for the rest of t_d.
    const double t_down_from_peak = l * (r.il_peak - 0.0) / vo;
    EXPECT_NEAR(r.t_off, t_down_from_peak, 1e-6 * r.t_off);
    EXPECT_GT(1.0 / r.f_sw, r.t_on + r.t_off);
    EXPECT_TRUE(all_finite(r));
}

TEST(Pwm, LosslessRippleAndDutyFromVoltSecondBalance) {
    // Erickson & Maksimović 2nd ed. ch. 2: D = Vo/Vin and ΔI_pp = (Vin − Vo)·D/(L·f) (their Δi is
    // half of this peak-to-peak value).
    const double vin = 24.0, vo = 12.0, l = 100e-6, f = 100e3;
    auto d = sink_design(vin, vo, 0.0, 1.0);
    d.control.mode = design::ControlMode::pwm;
    d.control.frequency = f;
    d.sense_resistor = 1e-4;
    const auto r = evaluate_corner(d, ideal_inductor(l), ideal_diode(),
                                   corner_for(d, vin, vo, 0.0, 1.0), pwm_setting(f));
    ASSERT_EQ(r.status, CornerStatus::ok) << r.reason;
    EXPECT_NEAR(r.duty, vo / vin, 1e-4);
    EXPECT_NEAR(r.il_ripple_pp, (vin - vo) * 0.5 / (l * f), 1e-3 * 0.6);
    EXPECT_NEAR(r.il_avg, 1.0, 1e-6);
    EXPECT_NEAR(r.f_sw, f, 1e-6 * f);
    EXPECT_FALSE(r.dcm);
}

TEST(Pwm, ContinuousDiscontinuousBoundary) {
    // Mohan, Undeland, Robbins 3rd ed. §7-3: I_LB = Ts·Vd·D·(1 − D)/(2L) at fixed output voltage;
    // above it the current is continuous, below it the diode blocks for part of the period.
    const double vin = 24.0, vo = 12.0, l = 100e-6, f = 100e3;
    const double i_lb = (1.0 / f) * vin * 0.5 * 0.5 / (2.0 * l); // 0.3 A at D = 0.5
    for (double factor : {1.05, 0.95}) {
        const double target = factor * i_lb;
        auto d = sink_design(vin, vo, 0.0, target);
        d.control.mode = design::ControlMode::pwm;
        d.control.frequency = f;
        d.sense_resistor = 1e-4;
        const auto r = evaluate_corner(d, ideal_inductor(l), ideal_diode(),
                                       corner_for(d, vin, vo, 0.0, target), pwm_setting(f));
        ASSERT_EQ(r.status, CornerStatus::ok) << r.reason;
        EXPECT_EQ(r.dcm, factor < 1.0) << factor;
        EXPECT_NEAR(r.il_avg, target, 1e-6);
        if (!r.dcm) {
            EXPECT_NEAR(r.il_valley, target - i_lb, 2e-3); // ripple 2·I_LB centred on the average
        } else {
            EXPECT_EQ(r.il_valley, 0.0);
            EXPECT_LT(r.duty, 0.5); // less on-time than CCM needs at the same output voltage
        }
    }
}

TEST(Pwm, DiscontinuousConversionRatioOfAResistiveLoad) {
    // Erickson & Maksimović 2nd ed. ch. 5: in DCM a buck with load R has
    // M = V/Vg = 2/(1 + √(1 + 4K/D²)), K = 2L/(R·Ts), valid for K < 1 − D. The textbook assumes a
    // small-ripple output, so a large capacitor sits across the load.
    const double vin = 24.0, rl = 20.0, l = 20e-6, f = 100e3;
    const double k = 2.0 * l / (rl / f); // 0.2
    const double m = 0.4;                // choose M; then D follows from the formula
    const double dd = std::sqrt(4.0 * k / (std::pow(2.0 / m - 1.0, 2) - 1.0));
    ASSERT_LT(k, 1.0 - dd);
    const double target = m * vin / rl;
    auto d = sink_design(vin, 0.0, rl, target);
    d.control.mode = design::ControlMode::pwm;
    d.control.frequency = f;
    d.sense_resistor = 1e-6;
    d.output_capacitor = design::OutputCapacitor{1e-3, 0.0};
    const auto r = evaluate_corner(d, ideal_inductor(l), ideal_diode(),
                                   corner_for(d, vin, 0.0, rl, target), pwm_setting(f));
    ASSERT_EQ(r.status, CornerStatus::ok) << r.reason;
    EXPECT_TRUE(r.dcm);
    EXPECT_NEAR(r.duty, dd, 2e-3 * dd);
    EXPECT_LT(r.load_ripple_pp, 0.01 * r.il_ripple_pp); // the capacitor takes the ripple
}

TEST(Pwm, NoRegulationWhenEvenFullDutyFallsShort) {
    auto d = sink_design(12.0, 11.5, 1.0, 1.0);
    d.control.mode = design::ControlMode::pwm;
    d.control.frequency = 200e3;
    const auto r = evaluate_corner(d, drum(47e-6, 0.1, 3.0), schottky(),
                                   corner_for(d, 12.0, 11.5, 1.0, 1.0), pwm_setting(200e3));
    EXPECT_EQ(r.status, CornerStatus::no_regulation);
    EXPECT_FALSE(r.reason.empty());
}

// Load ripple of an ideal triangle through r ∥ (C + ESR), by brute force: the divider's ODE
// C·dv_c/dt = i_L − i_load, i_load = (v_c + ESR·i_L)/(r + ESR), stepped finely (midpoint rule)
// over many periods until periodic, then the p-p of i_load over the last one.
double triangle_ripple_by_integration(double r, double c, double esr, double f, double duty) {
    const double period = 1.0 / f, t1 = duty * period;
    auto i_l = [&](double t) {
        const double x = std::fmod(t, period);
        return x < t1 ? x / t1 : 1.0 - (x - t1) / (period - t1);
    };
    const double tau = (r + esr) * c;
    const int per_period = 20000;
    const double h = period / per_period;
    const int periods = 10 + static_cast<int>(20.0 * tau / period);
    double v = 0.0, lo = INFINITY, hi = -INFINITY;
    auto dv = [&](double t, double vc) { return (i_l(t) - (vc + esr * i_l(t)) / (r + esr)) / c; };
    for (int n = 0; n < periods * per_period; ++n) {
        const double t = n * h;
        v += h * dv(t + 0.5 * h, v + 0.5 * h * dv(t, v));
        if (n >= (periods - 1) * per_period) {
            const double il = (v + esr * i_l(t + h)) / (r + esr);
            lo = std::min(lo, il);
            hi = std::max(hi, il);
        }
    }
    return hi - lo;
}

TEST(LoadRipple, TriangleThroughTheCapacitorMatchesABruteForceIntegration) {
    // The closed form against the ODE stepped finely (above): light, medium and heavy filtering,
    // symmetric and lopsided triangles, with and without ESR.
    struct Case {
        double r, c, esr, f, duty;
    };
    for (const Case k : {Case{0.12, 10e-6, 0.01, 250e3, 0.7}, Case{0.12, 1e-6, 0.0, 250e3, 0.5},
                         Case{1.0, 1e-6, 0.05, 100e3, 0.2}, Case{10.0, 100e-9, 0.1, 50e3, 0.9},
                         Case{0.5, 47e-6, 0.02, 1e6, 0.35}}) {
        const double ref = triangle_ripple_by_integration(k.r, k.c, k.esr, k.f, k.duty);
        EXPECT_NEAR(triangle_load_ripple(k.r, k.c, k.esr, k.f, k.duty), ref, 1e-3 * ref + 1e-6)
            << k.r << " ohm, " << k.c << " F, " << k.esr << " ohm ESR, " << k.f << " Hz, D "
            << k.duty;
    }
}

TEST(LoadRipple, PwmCrestBetweenTheEnginesSamplesIsKept) {
    // Straight ramps (ideal parts, a load voltage far above its own ripple) into a capacitor whose
    // time constant (0.2 µs) is short beside the period (10 µs): the load follows the inductor
    // current with a lag, and its crest falls between the engine's 16 samples per interval, which
    // alone would miss it by about 2 %. Reference: the divider's ODE stepped finely (above) for
    // the same triangle.
    const double vin = 48.0, v0 = 23.8, rl = 0.2, l = 100e-6, f = 100e3, c = 1e-6;
    auto d = sink_design(vin, v0, rl, 1.0);
    d.control.mode = design::ControlMode::pwm;
    d.control.frequency = f;
    d.sense_resistor = 1e-4;
    d.output_capacitor = design::OutputCapacitor{c, 0.0};
    const auto r = evaluate_corner(d, ideal_inductor(l), ideal_diode(),
                                   corner_for(d, vin, v0, rl, 1.0), pwm_setting(f));
    ASSERT_EQ(r.status, CornerStatus::ok) << r.reason;
    ASSERT_FALSE(r.dcm);
    const double ref = triangle_ripple_by_integration(rl, c, 0.0, f, r.duty) * r.il_ripple_pp;
    EXPECT_NEAR(r.load_ripple_pp, ref, 3e-3 * ref);
}

TEST(LoadRipple, HystereticWithCapacitorIsTheTrianglesThroughTheDivider) {
    // Hysteretic control in CCM with straight ramps (ideal parts) into a capacitor: the load's p-p
    // is the triangle's through the divider (reference: the divider's ODE stepped finely, above),
    // not the divider's share at the switching frequency, a first-harmonic figure that
    // overstated it by up to 27 % against ngspice.
    const double vin = 48.0, v0 = 23.8, rl = 0.5, l = 100e-6, c = 2.2e-6;
    auto d = sink_design(vin, v0, rl, 1.0);
    d.sense_resistor = 1e-4;
    d.output_capacitor = design::OutputCapacitor{c, 0.01};
    const auto r = evaluate_corner(d, ideal_inductor(l), ideal_diode(),
                                   corner_for(d, vin, v0, rl, 1.0), band_setting(0.3));
    ASSERT_EQ(r.status, CornerStatus::ok) << r.reason;
    ASSERT_FALSE(r.dcm);
    const double ref = triangle_ripple_by_integration(rl, c, 0.01, r.f_sw, r.duty) * r.il_ripple_pp;
    EXPECT_NEAR(r.load_ripple_pp, ref, 3e-3 * ref);
    // The first-harmonic figure differs by more than that here: the test can tell them apart.
    const double first = load_ripple_share(rl, c, 0.01, r.f_sw) * r.il_ripple_pp;
    EXPECT_GT(std::abs(first - ref), 0.03 * ref);
}

// The current divider with complex impedances, I_load/I = Z_c/(Z_c + r) (Alexander & Sadiku,
// Fundamentals of Electric Circuits, 5th ed., sec. 9.7; section from memory), worked by hand at
// the frequency where the capacitor's reactance equals the load's 1 Ω.
TEST(LoadRipple, FirstHarmonicShareIsTheCurrentDivider) {
    const double f = 1.0 / (2.0 * std::numbers::pi); // X = 1/(2πfC) = 1 Ω with C = 1 F
    EXPECT_NEAR(load_ripple_share(1.0, 1.0, 0.0, f), std::sqrt(0.5), 1e-12); // |−j/(1 − j)|
    EXPECT_NEAR(load_ripple_share(1.0, 1.0, 1.0, f), std::sqrt(2.0 / 5.0),
                1e-12); // |(1 − j)/(2 − j)|
    // No capacitor, or one open at this frequency: the load takes it all.
    EXPECT_EQ(load_ripple_share(1.0, 0.0, 0.0, f), 1.0);
    EXPECT_NEAR(load_ripple_share(1.0, 1e-300, 0.0, 1.0), 1.0, 1e-12);
    // A short at high frequency leaves the ESR's share, ESR/(ESR + r).
    EXPECT_NEAR(load_ripple_share(3.0, 1.0, 1.0, 1e12), 0.25, 1e-9);
}

// A capacitor far larger than the period needs (τ = r·C ≫ T) takes all the ripple's charge, and
// the charge a triangle of ΔI p-p moves above its mean is ΔI·T/8 whatever the duty, so the load's
// p-p is ΔI·T/(8·r·C) (the buck's output ripple, Erickson & Maksimović 2nd ed., sec. 2.5). At
// τ/T = 10^6 the exact solution's terms cancel to one part in a million: this checks that they
// are taken in an order that keeps the digits.
TEST(LoadRipple, TriangleThroughALongTimeConstantIsTheChargeOverC) {
    for (double duty : {0.02, 0.3, 0.5, 0.97}) {
        const double r = 2.0, c = 0.5, f = 1e6; // τ = 1 s, T = 1 µs
        const double expected = 1.0 / (f * 8.0 * r * c);
        EXPECT_NEAR(triangle_load_ripple(r, c, 0.0, f, duty), expected, 1e-4 * expected) << duty;
    }
}

TEST(LoadRipple, TriangleLimitsAndItsFallWithFrequency) {
    // Derived: no capacitor passes the whole ripple; a large one leaves the ESR's share
    // ESR/(r + ESR). The ranking's bound takes the value at the highest frequency of a stretch,
    // which needs it to fall as the frequency rises: checked over a wide grid.
    EXPECT_DOUBLE_EQ(triangle_load_ripple(1.0, 0.0, 0.01, 1e5, 0.5), 1.0);
    EXPECT_NEAR(triangle_load_ripple(1.0, 1.0, 0.25, 1e5, 0.3), 0.25 / 1.25, 1e-4);
    EXPECT_NEAR(triangle_load_ripple(1.0, 1e-15, 0.0, 1e5, 0.3), 1.0, 1e-6);
    for (double r : {0.05, 1.0, 20.0})
        for (double esr : {0.0, 0.01, 0.5})
            for (double c : {1e-7, 1e-5, 1e-3})
                for (double duty : {0.05, 0.3, 0.5, 0.8}) {
                    double prev = INFINITY;
                    for (int n = 0; n <= 40; ++n) {
                        const double f = 1e3 * std::pow(10.0, n / 8.0);
                        const double v = triangle_load_ripple(r, c, esr, f, duty);
                        EXPECT_LE(v, prev * (1.0 + 1e-12))
                            << r << " " << esr << " " << c << " " << f;
                        prev = v;
                    }
                }
}

TEST(LoadRipple, TriangleOverANarrowDutyRangeIsLeastNearAnEnd) {
    // The ranking's bound takes the least of the two ends of the duty's flux-balance range for
    // the least over the range; that range is at most 0.058 wide on the example charger. Checked
    // here for ranges up to 0.1 wide anywhere in the duty, over light to heavy filtering, against
    // a 64-step grid: the ends' least is within 0.5 % of it (an interior minimum near D = 0.5
    // costs at most 0.45 %).
    for (double r : {0.05, 1.0, 20.0})
        for (double esr : {0.0, 0.005, 0.5})
            for (double c : {1e-8, 1e-6, 1e-4, 1e-3})
                for (int fn = 0; fn <= 12; ++fn) {
                    const double f = 1e3 * std::pow(10.0, fn / 3.0);
                    for (double width : {0.02, 0.06, 0.1})
                        for (int cn = 0; cn <= 20; ++cn) {
                            const double lo = 0.02 + (0.96 - width) * cn / 20.0;
                            const double hi = lo + width;
                            double least = INFINITY;
                            for (int n = 0; n <= 64; ++n)
                                least = std::min(least, triangle_load_ripple(
                                                            r, c, esr, f, lo + width * n / 64.0));
                            const double ends = std::min(triangle_load_ripple(r, c, esr, f, lo),
                                                         triangle_load_ripple(r, c, esr, f, hi));
                            EXPECT_LE(ends, 1.005 * least)
                                << r << " ohm, " << esr << " ohm ESR, " << c << " F, " << f
                                << " Hz, D " << lo << ".." << hi;
                        }
                }
}

TEST(Losses, DiodeConductionIsTheAverageOfVfTimesCurrent) {
    // Domain notes: conduction loss is the average of v_f(i)·i over the interval, not
    // V_f(I_avg)·I_avg. Lossless limit: the off interval is a straight ramp from peak to valley,
    // so the reference is a plain quadrature of diode.vf(i)·i over that ramp.
    const double vin = 24.0, vo = 12.0, l = 30e-6, band = 1.2;
    auto d = sink_design(vin, vo, 0.0, 1.0);
    auto diode = schottky();
    diode.rth_ja = 1e-6; // junction at ambient
    diode.ir_ref = 0.0;
    const auto r = evaluate_corner(d, ideal_inductor(l), diode, corner_for(d, vin, vo, 0.0, 1.0),
                                   band_setting(band));
    ASSERT_EQ(r.status, CornerStatus::ok) << r.reason;
    // Exact off-interval physics of the lossless circuit with the nonlinear diode:
    // L·di/dt = −(Vo + V_f(i)), so dt = L·di/(Vo + V_f(i)).
    const int n = 20000;
    const double h = (r.il_peak - r.il_valley) / n;
    double e = 0.0;
    for (int k = 0; k < n; ++k) {
        const double i = r.il_valley + (k + 0.5) * h;
        const double vf = diode.vf(i, 298.15);
        e += vf * i * l * h / (vo + vf);
    }
    const double expected = e * r.f_sw;
    EXPECT_NEAR(r.losses.diode_conduction, expected, 2e-3 * expected);
    // And it differs from the shortcut V_f(I_avg)·I_avg·(1 − D).
    const double shortcut = diode.vf(r.il_avg, 298.15) * r.il_avg * r.t_off * r.f_sw;
    EXPECT_GT(std::abs(shortcut - expected), 3e-3 * expected);
}

TEST(Thermal, LeakySchottkyAtHighReverseVoltageRunsAway) {
    // Schottky leakage doubles every ~10 K (Sze & Ng 3rd ed. ch. 3; common practice); leakage ×
    // reverse voltage heats the junction, which raises leakage: no fixed point when
    // R_th·dP/dT > 1 everywhere above ambient (domain notes).
    auto d = sink_design(48.0, 12.0, 0.5, 1.0);
    d.ambient.max = 358.15;
    auto diode = schottky();
    diode.ir_ref = 2e-3; // 2 mA at 40 V, 25 °C: a very leaky part
    diode.rth_ja = 120.0;
    const auto r = evaluate_corner(d, drum(47e-6, 0.05, 3.0), diode,
                                   corner_for(d, 48.0, 12.0, 0.5, 1.0, 358.15), band_setting(0.3));
    EXPECT_EQ(r.status, CornerStatus::thermal_runaway);
    EXPECT_NE(r.reason.find("48.0 V"), std::string::npos) << r.reason;
    EXPECT_NE(r.reason.find("diode"), std::string::npos) << r.reason;

    // The same diode with little leakage settles.
    diode.ir_ref = 2e-6;
    const auto ok = evaluate_corner(d, drum(47e-6, 0.05, 3.0), diode,
                                    corner_for(d, 48.0, 12.0, 0.5, 1.0, 358.15), band_setting(0.3));
    ASSERT_EQ(ok.status, CornerStatus::ok) << ok.reason;
    // Fixed point: Tj = Ta + R_th·(conduction + leakage) within the 0.05 K tolerance.
    EXPECT_NEAR(ok.tj_diode,
                358.15 + diode.rth_ja * (ok.losses.diode_conduction + ok.losses.diode_leakage),
                0.1);
    EXPECT_GT(ok.tj_diode, 358.15);
}

TEST(Thermal, JunctionNearTheRunawayEdgeSettlesOrRunsAwayNeverNeither) {
    // Where the leakage is just enough for the junction's two balances (stable and unstable) to
    // merge and vanish, the temperature creeps up ever more slowly past where the balance was
    // before it runs away (a saddle-node bottleneck). Each case must come out as a balance or a
    // runaway; "did not settle" would leave the designer without the answer. The edge is found
    // by bisection on the outcome, then approached from both sides.
    auto d = sink_design(48.0, 12.0, 0.5, 1.0);
    d.ambient.max = 358.15;
    auto diode = schottky();
    diode.rth_ja = 120.0;
    auto run = [&](double ir) {
        diode.ir_ref = ir;
        return evaluate_corner(d, drum(47e-6, 0.05, 3.0), diode,
                               corner_for(d, 48.0, 12.0, 0.5, 1.0, 358.15), band_setting(0.3));
    };
    double lo = 2e-6, hi = 2e-3;
    ASSERT_EQ(run(lo).status, CornerStatus::ok);
    ASSERT_EQ(run(hi).status, CornerStatus::thermal_runaway);
    for (int n = 0; n < 60; ++n) {
        const double mid = std::sqrt(lo * hi);
        (run(mid).status == CornerStatus::ok ? lo : hi) = mid;
    }
    for (double f : {1e-6, 1e-5, 1e-4, 1e-3, 1e-2, 3e-2}) {
        const auto below = run(lo * (1.0 - f));
        EXPECT_EQ(below.status, CornerStatus::ok)
            << "below the edge by " << f << ": " << below.reason;
        const auto above = run(hi * (1.0 + f));
        EXPECT_EQ(above.status, CornerStatus::thermal_runaway)
            << "above the edge by " << f << ": " << above.reason;
    }
}

TEST(Thermal, InductorTemperatureIsItsOwnFixedPoint) {
    auto d = sink_design(24.0, 12.0, 0.5, 1.5);
    const auto l = drum(47e-6, 0.15, 3.0);
    const auto r = evaluate_corner(d, l, schottky(), corner_for(d, 24.0, 12.0, 0.5, 1.5, 323.15),
                                   band_setting(0.3));
    ASSERT_EQ(r.status, CornerStatus::ok) << r.reason;
    EXPECT_NEAR(r.t_inductor, 323.15 + l.rth * (r.losses.inductor_copper + r.losses.inductor_core),
                0.1);
    // The copper loss uses DCR at that temperature (IEC 60028 copper, α20 = 0.00393 /K).
    EXPECT_GE(r.losses.inductor_copper, l.dcr(r.t_inductor) * r.il_avg * r.il_avg * 0.999);
}

// Waveform energy balance: vin·I_sw,avg equals what the circuit's resistances, the diode and the
// load take (conservation of energy over a period; the inductor returns what it stores), and the
// reported p_in equals p_out + total losses.
void expect_energy_balance(const design::Design& d, const parts::InductorModel& l,
                           const parts::DiodeModel& diode, const Corner& c, const Setting& s) {
    const auto r = evaluate_corner(d, l, diode, c, s);
    ASSERT_EQ(r.status, CornerStatus::ok) << r.reason;
    ASSERT_TRUE(all_finite(r));
    EXPECT_NEAR(r.p_in, r.p_out + r.losses.total, 5e-3 * r.p_in) << c.name;
    const double in_circuit = r.p_out + r.losses.capacitor + r.losses.sense +
                              r.losses.switch_conduction + r.losses.diode_conduction +
                              l.dcr(r.t_inductor, c.dcr_max) * r.il_rms * r.il_rms;
    EXPECT_NEAR(r.vin * r.isw_avg, in_circuit, 5e-3 * r.vin * r.isw_avg) << c.name;
    EXPECT_GT(r.efficiency, 0.0);
    EXPECT_LT(r.efficiency, 1.0);
}

TEST(Losses, EnergyBalanceHoldsOnSeveralDesigns) {
    { // LED-like load, hysteretic with delay, soft losses everywhere
        auto d = sink_design(24.0, 17.0, 2.0, 0.7);
        d.sense_resistor = 0.3;
        d.control.delay = 80e-9;
        d.sw = design::Switch{};
        expect_energy_balance(d, drum(68e-6, 0.2, 1.2), schottky(),
                              corner_for(d, 24.0, 17.0, 2.0, 0.7, 328.15), band_setting(0.2));
    }
    { // the same with an output capacitor
        auto d = sink_design(24.0, 17.0, 2.0, 0.7);
        d.sense_resistor = 0.3;
        d.control.delay = 80e-9;
        d.output_capacitor = design::OutputCapacitor{1e-6, 0.05};
        expect_energy_balance(d, drum(68e-6, 0.2, 1.2), schottky(),
                              corner_for(d, 24.0, 17.0, 2.0, 0.7, 328.15), band_setting(0.2));
    }
    { // PWM, continuous, peak at about 0.93 Isat: L falls by about 20 % over the ripple
        auto d = sink_design(36.0, 12.0, 0.2, 2.0);
        d.control.mode = design::ControlMode::pwm;
        d.control.frequency = 150e3;
        d.sense_resistor = 0.05;
        expect_energy_balance(d, drum(22e-6, 0.04, 3.5), schottky(),
                              corner_for(d, 36.0, 12.0, 0.2, 2.0, 318.15), pwm_setting(150e3));
    }
    { // PWM, discontinuous
        auto d = sink_design(24.0, 6.0, 0.1, 0.2);
        d.control.mode = design::ControlMode::pwm;
        d.control.frequency = 100e3;
        expect_energy_balance(d, drum(22e-6, 0.1, 2.0), schottky(),
                              corner_for(d, 24.0, 6.0, 0.1, 0.2), pwm_setting(100e3));
    }
    { // hysteretic, wide band deep into the roll-off (sub-stretches in current)
        auto d = sink_design(30.0, 10.0, 0.3, 1.5);
        d.sense_resistor = 0.1;
        expect_energy_balance(d, drum(33e-6, 0.08, 1.6), schottky(),
                              corner_for(d, 30.0, 10.0, 0.3, 1.5), band_setting(0.9));
    }
}

// 36 V -> 12 V at 2 A, 22 uH, Isat 2.4 A, hard roll-off: the peak would be about 1.35 Isat where
// L(i) has collapsed; the highest average any duty reaches is about 1.8 A (a fine-step RK4 of
// L(i)·di/dt = e - r·i over the cycle, done outside the engine). The engine must refuse the corner
// rather than report figures for an operating point that does not exist.
TEST(Robustness, SaturatedPwmWithoutSteadyStateIsRefused) {
    auto d = sink_design(36.0, 12.0, 0.2, 2.0);
    d.control.mode = design::ControlMode::pwm;
    d.control.frequency = 150e3;
    d.sense_resistor = 0.05;
    const auto r = evaluate_corner(d, drum(22e-6, 0.04, 2.4), schottky(),
                                   corner_for(d, 36.0, 12.0, 0.2, 2.0, 318.15), pwm_setting(150e3));
    EXPECT_NE(r.status, CornerStatus::ok);
    EXPECT_FALSE(r.reason.empty());
}

TEST(Robustness, NoNaNForEdgeCases) {
    const auto diode = schottky();
    struct Case {
        const char* what;
        double vin, vo, r, current, l, band, delay;
        bool pwm;
        double f;
    };
    const Case cases[] = {
        {"tiny band", 24.0, 12.0, 0.5, 1.0, 47e-6, 1e-9, 0.0, false, 0.0},
        {"tiny band with delay", 24.0, 12.0, 0.5, 1.0, 47e-6, 1e-9, 50e-9, false, 0.0},
        {"huge inductance", 24.0, 12.0, 0.5, 1.0, 1.0, 0.2, 0.0, false, 0.0},
        {"near-unity duty", 24.0, 23.0, 0.1, 1.0, 47e-6, 0.2, 0.0, false, 0.0},
        {"near-zero duty", 48.0, 0.5, 0.0, 1.0, 47e-6, 0.2, 0.0, false, 0.0},
        {"pwm near-unity duty", 24.0, 23.0, 0.1, 1.0, 47e-6, 0.0, 0.0, true, 100e3},
        {"pwm huge inductance", 24.0, 12.0, 0.5, 1.0, 1.0, 0.0, 0.0, true, 100e3},
        {"pwm tiny current", 24.0, 12.0, 0.5, 1e-4, 47e-6, 0.0, 0.0, true, 100e3},
        {"pwm tiny inductance", 24.0, 12.0, 0.5, 1.0, 1e-9, 0.0, 0.0, true, 100e3},
        {"band wider than twice the target", 24.0, 12.0, 0.5, 0.1, 47e-6, 0.3, 0.0, false, 0.0},
        {"load above supply", 12.0, 15.0, 0.5, 1.0, 47e-6, 0.2, 0.0, false, 0.0},
        {"zero target", 24.0, 12.0, 0.5, 0.0, 47e-6, 0.2, 0.0, false, 0.0},
    };
    for (const auto& c : cases) {
        auto d = sink_design(c.vin, c.vo, c.r, c.current);
        d.control.delay = c.delay;
        if (c.pwm) {
            d.control.mode = design::ControlMode::pwm;
            d.control.frequency = c.f;
        }
        const Setting s = c.pwm ? pwm_setting(c.f) : band_setting(c.band);
        const auto r = evaluate_corner(d, drum(c.l, 0.1, 3.0), diode,
                                       corner_for(d, c.vin, c.vo, c.r, c.current), s);
        EXPECT_TRUE(all_finite(r)) << c.what;
        if (r.status != CornerStatus::ok) {
            EXPECT_FALSE(r.reason.empty()) << c.what;
        } else {
            EXPECT_GT(r.f_sw, 0.0) << c.what;
            EXPECT_GE(r.il_valley, 0.0) << c.what;
            EXPECT_GE(r.il_peak, r.il_valley) << c.what;
        }
    }
}

} // namespace
} // namespace coilsieve::converter
