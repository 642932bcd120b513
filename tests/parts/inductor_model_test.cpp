// Inductor model: roll-off, copper resistance, AC resistance, iGSE core loss, thermal resistance.

#include "parts/inductor_model.hpp"

#include <cmath>
#include <gtest/gtest.h>
#include <numbers>
#include <stdexcept>

using namespace coilsieve::parts;

namespace {

Inductor sample_part() {
    Inductor p;
    p.id = "L-test";
    p.inductance = 22e-6;
    p.isat = 3.0;
    p.sat_drop = 0.3;
    p.dcr_typ = 0.050;
    p.dcr_max = 0.060;
    p.dcr_temperature = 293.15;
    p.irms = 2.5;
    p.irms_rise = 40.0;
    p.shape = SaturationShape::hard;
    p.core = {2.0, 1.4, 2.6};
    p.b_sat = 0.3;
    p.core_volume = 200e-9;
    p.ac_factor = 1.5;
    return p;
}

// Composite Simpson rule on [a, b] with n (even) intervals.
template <class F> double simpson(F f, double a, double b, int n) {
    const double h = (b - a) / n;
    double s = f(a) + f(b);
    for (int k = 1; k < n; ++k) s += f(a + h * k) * (k % 2 ? 4.0 : 2.0);
    return s * h / 3.0;
}

// The iGSE time average (1/T)∫ k_i·|dB/dt|^α·ΔB^(β−α) dt of a sampled flux waveform
// (Venkatachalam et al., IEEE COMPEL 2002, eq. for the iGSE), by central differences.
template <class B>
double igse_numeric(const Steinmetz& s, B flux, double period, double delta_b, int n) {
    const double ki = igse_ki(s);
    const double h = period / n;
    double sum = 0.0;
    for (int k = 0; k < n; ++k) {
        const double t = (k + 0.5) * h;
        const double dbdt = (flux(t + 0.5 * h) - flux(t - 0.5 * h)) / h;
        sum += std::pow(std::abs(dbdt), s.alpha) * h;
    }
    return ki * std::pow(delta_b, s.beta - s.alpha) * sum / period;
}

} // namespace

TEST(InductorModel, RollOffHitsRatedDropAtIsat) {
    for (auto shape : {SaturationShape::hard, SaturationShape::soft}) {
        Inductor p = sample_part();
        p.shape = shape;
        const auto m = make_model(p);
        // Definition of the Isat rating: L(Isat) = L0·(1 − drop) (common practice, IEC 62024-2).
        EXPECT_NEAR(m.inductance(3.0), 22e-6 * 0.7, 1e-15);
        EXPECT_NEAR(m.inductance(-3.0), 22e-6 * 0.7, 1e-15);
        EXPECT_DOUBLE_EQ(m.inductance(0.0), 22e-6);
        EXPECT_NEAR(m.inductance(3.0, 0.8), 22e-6 * 0.7 * 0.8, 1e-15);
        double prev = m.inductance(0.0);
        for (double i = 0.1; i < 10.0; i += 0.1) {
            const double l = m.inductance(i);
            EXPECT_LT(l, prev) << "L must fall with current, i = " << i;
            prev = l;
        }
    }
}

TEST(InductorModel, HardShapeIsFlatterBelowIsatThanSoft) {
    Inductor hard = sample_part();
    Inductor soft = sample_part();
    soft.shape = SaturationShape::soft;
    const auto mh = make_model(hard);
    const auto ms = make_model(soft);
    // At half Isat a ferrite part has lost almost nothing, a powder part noticeably more.
    EXPECT_GT(mh.inductance(1.5), 0.99 * 22e-6);
    EXPECT_LT(ms.inductance(1.5), 0.92 * 22e-6);
    // Beyond Isat the hard knee falls faster.
    EXPECT_LT(mh.inductance(4.5), ms.inductance(4.5));
}

TEST(InductorModel, CopperResistanceFollowsIec60028) {
    const auto m = make_model(sample_part());
    // IEC 60028 annealed copper, alpha20 = 0.00393 /K: R(100 °C)/R(20 °C) = 1.3144.
    EXPECT_NEAR(m.dcr(373.15) / m.dcr(293.15), 1.3144, 1e-12);
    EXPECT_NEAR(m.dcr(293.15), 0.050, 1e-15);
    EXPECT_NEAR(m.dcr(293.15, true), 0.060, 1e-15);

    // Stated at 25 °C: R20 = R25/(1 + 0.00393·5) (IEC 60028 referred back to 20 °C).
    Inductor p = sample_part();
    p.dcr_temperature = 298.15;
    const auto m25 = make_model(p);
    EXPECT_NEAR(m25.dcr(298.15), 0.050, 1e-15);
    EXPECT_NEAR(m25.dcr(293.15), 0.050 / (1.0 + 0.00393 * 5.0), 1e-15);
    EXPECT_NEAR(m25.dcr(373.15) / m25.dcr(293.15), 1.3144, 1e-12);
}

TEST(InductorModel, AcResistanceScalesWithSqrtFrequency) {
    const auto m = make_model(sample_part());
    const double rdc = m.dcr(350.0);
    // ac_factor is R_ac/DCR at 100 kHz; the sqrt(f) growth is the high-frequency asymptote of
    // Dowell, Proc. IEE 113(8), 1966.
    EXPECT_NEAR(m.r_ac(100e3, 350.0), 1.5 * rdc, 1e-15);
    EXPECT_NEAR(m.r_ac(400e3, 350.0), (1.0 + 0.5 * 2.0) * rdc, 1e-15);
    EXPECT_NEAR(m.r_ac(0.0, 350.0), rdc, 1e-15);

    Inductor p = sample_part();
    p.ac_factor = 0.7; // below 1 is not physical: never below DCR
    EXPECT_NEAR(make_model(p).r_ac(1e6, 350.0), rdc, 1e-15);
}

TEST(InductorModel, IgseCoefficientCheckValue) {
    // Domain notes (derived from Venkatachalam et al., COMPEL 2002): alpha 1.5, beta 2.5, k 1
    // -> k_i = 0.0570557.
    EXPECT_NEAR(igse_ki({1.0, 1.5, 2.5}), 0.0570557, 5e-8);
}

TEST(InductorModel, IgseCoefficientMatchesQuadrature) {
    // k_i = k/((2π)^(α−1)·∫₀^2π |cos θ|^α·2^(β−α) dθ), Venkatachalam et al., COMPEL 2002,
    // with the integral evaluated by Simpson's rule.
    for (const Steinmetz s : {Steinmetz{1.0, 1.5, 2.5}, Steinmetz{3.2, 1.2, 2.4},
                              Steinmetz{0.7, 1.7, 3.0}, Steinmetz{5.0, 1.05, 2.1}}) {
        const double integral =
            simpson([&](double th) { return std::pow(std::abs(std::cos(th)), s.alpha); }, 0.0,
                    2.0 * std::numbers::pi, 2'000'000);
        const double ki = s.k / (std::pow(2.0 * std::numbers::pi, s.alpha - 1.0) * integral *
                                 std::pow(2.0, s.beta - s.alpha));
        EXPECT_NEAR(igse_ki(s) / ki, 1.0, 1e-7) << "alpha " << s.alpha;
    }
}

TEST(InductorModel, IgseEqualsSteinmetzForSinusoid) {
    // The iGSE reduces to the Steinmetz equation k·f^α·B̂^β for sinusoidal flux
    // (Venkatachalam et al., COMPEL 2002, the defining property of k_i).
    const Steinmetz s{2.5, 1.45, 2.7};
    const double f = 150e3, b_peak = 0.08, period = 1.0 / f;
    const double p = igse_numeric(
        s, [&](double t) { return b_peak * std::sin(2.0 * std::numbers::pi * f * t); }, period,
        2.0 * b_peak, 400'000);
    const double steinmetz = s.k * std::pow(f, s.alpha) * std::pow(b_peak, s.beta);
    EXPECT_NEAR(p / steinmetz, 1.0, 1e-6);
}

TEST(InductorModel, IgseTriangularClosedFormMatchesIntegration) {
    // Closed form for piecewise-linear flux against the iGSE integral itself
    // (Venkatachalam et al., COMPEL 2002).
    const Steinmetz s{2.5, 1.45, 2.7};
    const double f = 200e3, period = 1.0 / f, db = 0.05;
    for (double duty : {0.1, 0.3, 0.5, 0.8}) {
        auto tri = [&](double t) {
            double x = std::fmod(t, period);
            if (x < 0) x += period;
            const double ton = duty * period;
            return x < ton ? db * x / ton : db * (1.0 - (x - ton) / (period - ton));
        };
        // The grid puts a node on the corner so the finite differences are exact per segment.
        const double p = igse_numeric(s, tri, period, db, 1000);
        EXPECT_NEAR(igse_triangular(s, db, f, duty) / p, 1.0, 1e-9) << "duty " << duty;
    }
}

TEST(InductorModel, CoreLossUsesFluxProportionalToCurrent) {
    const auto m = make_model(sample_part());
    // Gapped core: ΔB = B_sat·ΔI/I_sat (domain notes), P = P_v·V_core.
    const double di = 0.6, f = 300e3, d = 0.4;
    const double db = 0.3 * di / 3.0;
    EXPECT_NEAR(m.core_loss(di, f, d), igse_triangular(m.core, db, f, d) * 200e-9, 1e-15);
    EXPECT_GT(m.core_loss(di, f, d), 0.0);
    EXPECT_EQ(m.core_loss(0.0, f, d), 0.0);
    EXPECT_EQ(m.core_loss(di, 0.0, d), 0.0);
    EXPECT_TRUE(std::isfinite(m.core_loss(di, f, 0.0)));
    EXPECT_TRUE(std::isfinite(m.core_loss(di, f, 1.0)));

    // A hand-made model without make_model's precomputed k_i gives the same answer.
    InductorModel bare = m;
    bare.core_ki = 0.0;
    EXPECT_DOUBLE_EQ(bare.core_loss(di, f, d), m.core_loss(di, f, d));
}

TEST(InductorModel, LeastCoreLossOverTheDutyIsAtHalf) {
    // iGSE's duty factor D^(1−α) + (1−D)^(1−α) (Venkatachalam et al., COMPEL 2002) is convex and
    // symmetric for α > 1, so its least is at D = 0.5, where it equals 2^α.
    const auto m = make_model(sample_part());
    ASSERT_GT(m.core.alpha, 1.0);
    const double di = 0.6, f = 300e3;
    const double least = m.core_loss_least(di, f);
    EXPECT_NEAR(least, m.core_loss(di, f, 0.5), 1e-12 * least);
    for (double d : {0.01, 0.2, 0.45, 0.55, 0.8, 0.99})
        EXPECT_LT(least, m.core_loss(di, f, d)) << d;
    EXPECT_EQ(m.core_loss_least(0.0, f), 0.0);
    EXPECT_EQ(m.core_loss_least(di, 0.0), 0.0);
    InductorModel below_one = m;
    below_one.core.alpha = 0.9; // no least claimed: the floor is zero
    EXPECT_EQ(below_one.core_loss_least(di, f), 0.0);
}

TEST(InductorModel, ThermalResistanceReproducesRatedRise) {
    const auto m = make_model(sample_part());
    // The rating defines R_th: at Irms in the rating ambient (the DCR's stated temperature) the
    // thermal fixed point T = Ta + R_th·I²·DCR(T) must sit exactly irms_rise above ambient.
    const double ta = 293.15;
    double t = ta;
    for (int k = 0; k < 200; ++k) t = ta + m.rth * 2.5 * 2.5 * m.dcr(t);
    EXPECT_NEAR(t - ta, 40.0, 1e-9);
}

TEST(InductorModel, RejectsUnusableParts) {
    Inductor p = sample_part();
    p.isat = 0.0;
    EXPECT_THROW((void)make_model(p), std::invalid_argument);
    p = sample_part();
    p.sat_drop = 1.0;
    EXPECT_THROW((void)make_model(p), std::invalid_argument);
    p = sample_part();
    p.irms = 0.0;
    try {
        (void)make_model(p);
        FAIL() << "expected an exception";
    } catch (const std::invalid_argument& e) {
        EXPECT_NE(std::string(e.what()).find("L-test"), std::string::npos) << e.what();
        EXPECT_NE(std::string(e.what()).find("irms"), std::string::npos) << e.what();
    }
}
