// The junction balance screen (studies::junction_can_settle) and heating floor
// (studies::JunctionBalance) against a dense scan of the same
// lower-bound heating map h(T) = Ta + Rth·(conduction(T) + leakage(T)) − T: the screen may only say
// "no balance" where the scan finds h > 0 everywhere on [Ta, Tj limit], and it should say so close
// to where the scan's answer changes. The diode is a generic 2 A Schottky (SPICE parameters of the
// usual size, from memory); leakage doubles every 10 K (common practice).
#include "studies/screen.hpp"

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <gtest/gtest.h>
#include <optional>

using namespace coilsieve;

namespace {

parts::DiodeModel schottky(double ir_ref) {
    parts::DiodeModel m;
    m.fwd.is = 2e-6;
    m.fwd.n = 1.05;
    m.fwd.rs = 0.05;
    m.fwd.eg = 0.69; // Schottky barrier (ngspice EG for Schottky models, from memory)
    m.fwd.xti = 2.0;
    m.ir_ref = ir_ref;
    m.vr_ref = 20.0;
    m.rth_ja = 75.0;
    m.tj_max = 398.15;
    return m;
}

studies::EnvelopeCorner corner() {
    studies::EnvelopeCorner k;
    k.name = "hot";
    k.vin = 14.0;
    k.v0 = 7.0;
    k.r = 0.1;
    k.current = 2.0;
    k.ambient = 318.15;
    k.nominal = true;
    k.weight = 1.0;
    // The diode's share as make_screen_context sets it, for a design with a lossless switch and
    // no sense resistor.
    k.off_share = studies::duty_slack * (1.0 - (k.v0 + k.r * k.current) / k.vin);
    return k;
}

// The same heating map with conduction over share `off`, scanned on `points` temperatures of
// [ambient, tj_bound]: the first temperature the map reaches, if any.
std::optional<double> first_balance(const studies::EnvelopeCorner& k, const parts::DiodeModel& m,
                                    double off, double tj_bound, int points) {
    const double i = k.current_lb();
    const double duty = std::clamp((k.v0 + k.r * k.current) / k.vin, 0.0, 1.0);
    for (int n = 0; n <= points; ++n) {
        const double t = k.ambient + (tj_bound - k.ambient) * n / points;
        const double heat = off * i * m.vf(i, t) + m.leakage(k.vin, t) * k.vin * duty;
        if (k.ambient + m.rth_ja * heat <= t) return t;
    }
    return std::nullopt;
}

// With the screens' conduction share, on 20,000 points: does it reach T below the limit?
bool scan_settles(const studies::EnvelopeCorner& k, const parts::DiodeModel& m, double tj_bound) {
    return first_balance(k, m, k.off_share, tj_bound, 20000).has_value();
}

} // namespace

TEST(JunctionBalance, NeverClaimsRunawayWhereABalanceExistsAndFindsItNearTheEdge) {
    const auto k = corner();
    const double tj_bound = 398.15;
    // The scan's edge: the leakage at which the balance below the limit disappears (bisection on
    // a log scale; the map rises with the leakage).
    double lo = 1e-6, hi = 1.0;
    ASSERT_TRUE(scan_settles(k, schottky(lo), tj_bound));
    ASSERT_FALSE(scan_settles(k, schottky(hi), tj_bound));
    for (int n = 0; n < 40; ++n) {
        const double mid = std::sqrt(lo * hi);
        (scan_settles(k, schottky(mid), tj_bound) ? lo : hi) = mid;
    }
    // Just inside the edge a balance exists: the screen must not remove the diode.
    EXPECT_TRUE(studies::junction_can_settle(k, schottky(lo * 0.999), tj_bound));
    // The cell bound is conservative by at most one 1.25 K cell: 10 % past the edge it screens.
    EXPECT_FALSE(studies::junction_can_settle(k, schottky(hi * 1.1), tj_bound));
    // And far from it, both ways.
    EXPECT_TRUE(studies::junction_can_settle(k, schottky(lo * 1e-2), tj_bound));
    EXPECT_FALSE(studies::junction_can_settle(k, schottky(hi * 1e2), tj_bound));
}

TEST(JunctionBalance, ConductionAloneBalancesWhereTheHeatingLineMeetsTheTemperature) {
    // No leakage: V_f falls with temperature, so the single balance T* = Ta + Rth·P(T*) lies
    // between Ta + Rth·P(Tlimit) and Ta + Rth·P(Ta). A limit 2 K above the upper end must admit
    // it; a limit 2 K below the lower end must not.
    const auto k = corner();
    const auto m = schottky(0.0);
    const double i = k.current_lb();
    auto power = [&](double t) { return k.off_share * i * m.vf(i, t); };
    const double upper = k.ambient + m.rth_ja * power(k.ambient);
    EXPECT_TRUE(studies::junction_can_settle(k, m, upper + 2.0));
    const double lower = k.ambient + m.rth_ja * power(upper + 2.0);
    ASSERT_GT(lower - 2.0, k.ambient);
    EXPECT_FALSE(studies::junction_can_settle(k, m, lower - 2.0));
}

// The diode's heating floor (studies::JunctionBalance) against the balance of the same map found
// on 200,000 points: the engine's fixed point has Tj = Ta + Rth·P with P at least the map's
// heating, so P >= (T* − Ta)/Rth where T* is the first temperature the map reaches. The floor may
// not exceed that (it would prune a pair that can win) and should be within the change of the
// heating over two of its cells (its crossing test may fire one cell early), plus the engine's
// tolerance (a floor far below is valid but useless).
TEST(JunctionBalance, HeatingFloorIsTheRiseToTheFirstBalance) {
    const auto k = corner();
    const double tj_bound = 398.15;
    const auto m = schottky(2e-4);
    const double i = k.current_lb();
    const double duty = (k.v0 + k.r * k.current) / k.vin;
    const studies::JunctionBalance balance(k, m, tj_bound);
    double previous = 0.0;
    for (double off : {0.3, studies::duty_slack * (1.0 - duty), 0.6}) {
        const double t_star = first_balance(k, m, off, tj_bound, 200000).value_or(tj_bound);
        ASSERT_LT(t_star, tj_bound) << "off " << off << ": the case should balance";
        const double p_star = (t_star - k.ambient) / m.rth_ja;
        const double floor = balance.least_heating(off);
        const double cell = (tj_bound - k.ambient) / 128.0;
        EXPECT_LE(floor, p_star) << "off " << off;
        const double cell_change =
            off * i * (m.vf(i, t_star - 2.0 * cell) - m.vf(i, t_star)) +
            (m.leakage(k.vin, t_star) - m.leakage(k.vin, t_star - 2.0 * cell)) * k.vin * duty;
        EXPECT_GE(floor, p_star - 2.0 * 0.05 / m.rth_ja - cell_change) << "off " << off;
        // Well above the conduction with V_f taken at the junction limit (the older floor).
        EXPECT_GT(floor, 1.05 * off * i * m.vf(i, tj_bound)) << "off " << off;
        EXPECT_GE(floor, previous) << "more conduction, more heating";
        previous = floor;
    }
}

// The largest conduction share at which the junction can still balance (used to close pairs
// whose volt-second share is above it): beyond it the dense scan of the same map finds no balance
// below the limit (the cells may only be generous), and 0.01 below it (the cells' width, 0.6 K,
// seen as a share) the scan finds one.
TEST(JunctionBalance, LargestSettlingShareSeparatesBalanceFromRunaway) {
    const auto k = corner();
    const double tj_bound = 398.15;
    auto scan_balances = [&](const parts::DiodeModel& m, double off) {
        return first_balance(k, m, off, tj_bound, 200000).has_value();
    };
    for (double ir : {3e-5, 2e-4, 5e-4}) {
        auto m = schottky(ir);
        m.rth_ja = 150.0;
        const studies::JunctionBalance balance(k, m, tj_bound);
        const double s = balance.largest_settling_share();
        ASSERT_GT(s, 0.0) << "ir " << ir;
        ASSERT_LT(s, 1.0) << "ir " << ir << ": the case should run away at full conduction";
        EXPECT_TRUE(balance.can_balance(s));
        EXPECT_FALSE(balance.can_balance(std::min(1.0, s + 1e-6)));
        EXPECT_FALSE(scan_balances(m, std::min(1.0, s + 1e-6))) << "ir " << ir;
        EXPECT_TRUE(scan_balances(m, s - 0.01)) << "ir " << ir;
        // With more leakage (a duty above the corner's ideal one), worked cell by cell: the
        // bisection's share at the corner's own leakage, and the edge of balance above it.
        EXPECT_NEAR(balance.largest_settling_share(1.0), s, 1e-9) << "ir " << ir;
        double before = s;
        for (double scale : {1.05, 1.3, 2.0}) {
            const double sl = balance.largest_settling_share(scale);
            EXPECT_LE(sl, before) << "ir " << ir << ", leakage x" << scale;
            before = sl;
            if (sl <= 0.0) continue;
            EXPECT_TRUE(balance.can_balance(sl, scale)) << "ir " << ir << ", leakage x" << scale;
            EXPECT_FALSE(balance.can_balance(sl + 1e-6, scale))
                << "ir " << ir << ", leakage x" << scale;
        }
    }
}

// The least-mean lemma behind ramp_mean_share, checked by construction: the two-level density it
// names reaches the share exactly, and no density within the same limits (random piecewise
// constant ones on 64 steps) has a lower mean, nor, mirrored, a mean above 1 − h (the side the
// PWM valley and peak bounds use). The bounds also take the variance over such a density as at
// least r/12 (the uniform one's 1/12, scaled by the density's least over its largest): checked on
// the same densities (each step's own spread, 1/(12·64²), included).
TEST(RampMean, TwoLevelDensityIsTheLeastMean) {
    EXPECT_DOUBLE_EQ(studies::ramp_mean_share(1.0), 0.5); // a straight ramp: the midpoint
    EXPECT_DOUBLE_EQ(studies::ramp_mean_share(0.0), 0.0);
    std::uint32_t state = 12345u; // a small LCG: deterministic, no global state
    auto uniform = [&] {
        state = state * 1664525u + 1013904223u;
        return static_cast<double>(state >> 8) / static_cast<double>(1u << 24);
    };
    for (double r : {0.05, 0.3, 0.6, 0.8, 0.95}) {
        const double h = studies::ramp_mean_share(r);
        // The named density: ρ_max = 1 on [0, h], ρ_min = r on [h, 1].
        const double mass = h + r * (1.0 - h);
        const double moment = h * h / 2.0 + r * (1.0 - h * h) / 2.0;
        EXPECT_NEAR(moment / mass, h, 1e-12) << "r " << r;
        constexpr int steps = 64;
        for (int trial = 0; trial < 2000; ++trial) {
            double m0 = 0.0, m1 = 0.0, m2 = 0.0;
            for (int n = 0; n < steps; ++n) {
                const double rho = r + (1.0 - r) * (uniform() < 0.5 ? 0.0 : 1.0) * uniform();
                const double mid = (n + 0.5) / steps;
                m0 += rho;
                m1 += rho * mid;
                m2 += rho * (mid * mid + 1.0 / (12.0 * steps * steps));
            }
            const double mean = m1 / m0;
            EXPECT_GE(mean, h - 1e-12) << "r " << r << " trial " << trial;
            EXPECT_LE(mean, 1.0 - h + 1e-12) << "r " << r << " trial " << trial;
            EXPECT_GE(m2 / m0 - mean * mean, r / 12.0 - 1e-12) << "r " << r << " trial " << trial;
        }
    }
}
