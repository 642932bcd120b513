// The R–L segment: straight-ramp facts, the exact exponential and its integrals.

#include "converter/segment.hpp"

#include <cmath>
#include <gtest/gtest.h>

namespace coilsieve::converter {
namespace {

TEST(Segment, TwelveVoltsAcross800MicrohenriesFor100MicrosecondsGives1p5Amperes) {
    // Common practice (domain notes): I = V·t/L = 12 V × 0.1 ms / 800 µH = 1.5 A.
    const Segment s{12.0, 0.0, 800e-6};
    EXPECT_NEAR(advance(s, 0.0, 0.1e-3).i1, 1.5, 1e-12);
    EXPECT_NEAR(time_between(s, 0.0, 1.5), 0.1e-3, 1e-15);
}

TEST(Segment, OneVoltAcrossOneMillihenryRampsAt1000AmperesPerSecond) {
    // Common practice (domain notes): di/dt = V/L = 1 V / 1 mH = 1000 A/s.
    const Segment s{1.0, 0.0, 1e-3};
    const double dt = 1e-6;
    EXPECT_NEAR((advance(s, 0.3, dt).i1 - 0.3) / dt, 1000.0, 1e-6);
    // A tiny resistance changes nothing visible: the ramp is the short-time limit.
    const Segment r{1.0, 1e-9, 1e-3};
    EXPECT_NEAR((advance(r, 0.0, dt).i1) / dt, 1000.0, 1e-6);
}

TEST(Segment, ExponentialMatchesTheClosedForm) {
    // First-order R–L response i(t) = I∞ + (i0 − I∞)·exp(−t·R/L), I∞ = V/R (solution of
    // L·di/dt = V − R·i; any circuit-analysis text, e.g. the natural plus forced response).
    const Segment s{10.0, 5.0, 1e-3}; // τ = 0.2 ms, I∞ = 2 A
    for (double t : {1e-6, 5e-5, 2e-4, 1e-3}) {
        const double expected = 2.0 + (0.5 - 2.0) * std::exp(-t / 2e-4);
        EXPECT_NEAR(advance(s, 0.5, t).i1, expected, 1e-12) << t;
    }
    // Inverse: τ·ln((I∞ − i0)/(I∞ − i1)).
    EXPECT_NEAR(time_between(s, 0.5, 1.5), 2e-4 * std::log(1.5 / 0.5), 1e-15);
    // The asymptote is never reached, and the segment does not run backwards.
    EXPECT_TRUE(std::isinf(time_between(s, 0.5, 2.0)));
    EXPECT_TRUE(std::isinf(time_between(s, 0.5, 0.2)));
}

TEST(Segment, ChargeAndSquareIntegralsMatchQuadrature) {
    // ∫i dt and ∫i² dt of the exact exponential against a fine midpoint rule of the same
    // closed-form current, for short (series) and long (exact) stretches, both directions.
    struct Case {
        Segment s;
        double i0, dt;
    };
    const Case cases[] = {{{10.0, 5.0, 1e-3}, 0.5, 1e-6},     // z = 0.005, series branch
                          {{10.0, 5.0, 1e-3}, 0.5, 3e-4},     // z = 1.5
                          {{-12.0, 2.0, 1e-4}, 1.2, 2e-5},    // falling, z = 0.4
                          {{-12.0, 2.0, 1e-4}, 1.2, 2.4e-6}}; // falling, z = 0.048
    for (const auto& c : cases) {
        const double tau = c.s.l / c.s.r;
        const double iinf = c.s.e / c.s.r;
        const int n = 200000;
        double q = 0.0, q2 = 0.0;
        for (int k = 0; k < n; ++k) {
            const double t = (k + 0.5) * c.dt / n;
            const double i = iinf + (c.i0 - iinf) * std::exp(-t / tau);
            q += i * c.dt / n;
            q2 += i * i * c.dt / n;
        }
        const Stretch st = advance(c.s, c.i0, c.dt);
        EXPECT_NEAR(st.q, q, 1e-9 * std::abs(q)) << c.dt;
        EXPECT_NEAR(st.q2, q2, 1e-9 * std::abs(q2)) << c.dt;
    }
}

TEST(Segment, SeriesAndExactBranchesAgreeAtTheSwitchOver) {
    // phi(z) switches from its Taylor series to the closed form at z = 0.05: no step there.
    const detail::Phi a = detail::phi(0.05 * (1.0 - 1e-12));
    const detail::Phi b = detail::phi(0.05 * (1.0 + 1e-12));
    EXPECT_NEAR(a.p1, b.p1, 1e-12);
    EXPECT_NEAR(a.p2, b.p2, 1e-12);
    EXPECT_NEAR(a.p3, b.p3, 1e-10);
    // Limits at z -> 0: 1, 1/2, 1/3 (Taylor coefficients of the integrals of a ramp).
    const detail::Phi z = detail::phi(0.0);
    EXPECT_DOUBLE_EQ(z.p1, 1.0);
    EXPECT_DOUBLE_EQ(z.p2, 0.5);
    EXPECT_DOUBLE_EQ(z.p3, 1.0 / 3.0);
}

TEST(Segment, RampAndAdvanceAreInverse) {
    const Segment s{-5.0, 0.7, 47e-6};
    const Stretch down = ramp(s, 1.3, 0.4);
    ASSERT_TRUE(std::isfinite(down.dt));
    EXPECT_NEAR(advance(s, 1.3, down.dt).i1, 0.4, 1e-12);
    EXPECT_EQ(ramp(s, 1.3, 1.3).dt, 0.0);
}

} // namespace
} // namespace coilsieve::converter
