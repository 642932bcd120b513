// Diode model: SPICE forward law against ngspice, fitting, capacitance, recovery, leakage.

#include "parts/diode_model.hpp"

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <gtest/gtest.h>
#include <sstream>
#include <stdexcept>
#include <string>
#include <unistd.h>
#include <vector>

using namespace coilsieve::parts;

namespace {

DiodeModel model_with(SpiceForward f) {
    DiodeModel m;
    m.fwd = f;
    return m;
}

Diode part_from_points(const SpiceForward& truth, const std::vector<std::pair<double, double>>& it,
                       DiodeTechnology tech = DiodeTechnology::schottky) {
    const DiodeModel m = model_with(truth);
    Diode d;
    d.id = "D-fit";
    d.technology = tech;
    d.if_avg = 3.0;
    d.vrrm = 40.0;
    for (auto [i, t] : it) d.forward.push_back({m.vf(i, t), i, t});
    return d;
}

template <class F> double simpson(F f, double a, double b, int n) {
    const double h = (b - a) / n;
    double s = f(a) + f(b);
    for (int k = 1; k < n; ++k) s += f(a + h * k) * (k % 2 ? 4.0 : 2.0);
    return s * h / 3.0;
}

struct SweepPoint {
    double current, voltage;
};

// DC sweep of a current-driven diode in ngspice at `temp_c`; empty if ngspice failed.
std::vector<SweepPoint> ngspice_sweep(const SpiceForward& f, double temp_c,
                                      const std::string& tag) {
    namespace fs = std::filesystem;
    const fs::path dir = fs::path(::testing::TempDir()) /
                         ("coilsieve-diode-" + std::to_string(::getpid()) + "-" + tag);
    fs::create_directories(dir);
    const fs::path cir = dir / "vf.cir";
    const fs::path out = dir / "vf.txt";
    {
        std::ofstream c(cir);
        c.precision(17);
        c << "* forward voltage of one diode model\n"
          << ".model dut D(IS=" << f.is << " N=" << f.n << " RS=" << f.rs << " EG=" << f.eg
          << " XTI=" << f.xti << ")\n"
          << "I1 0 a DC 1\n"
          << "D1 a 0 dut\n"
          << ".temp " << temp_c << "\n"
          << ".options reltol=1e-9 vntol=1e-12 abstol=1e-15\n"
          << ".control\n"
          << "dc I1 0.05 3.0 0.05\n"
          << "wrdata " << out.string() << " v(a)\n"
          << "quit\n"
          << ".endc\n"
          << ".end\n";
    }
    const std::string cmd =
        "ngspice -b " + cir.string() + " > " + (dir / "log.txt").string() + " 2>&1";
    if (std::system(cmd.c_str()) != 0) return {};
    std::ifstream in(out);
    std::vector<SweepPoint> pts;
    double i = 0, v = 0;
    while (in >> i >> v) pts.push_back({i, v});
    in.close();
    std::error_code ec;
    fs::remove_all(dir, ec);
    return pts;
}

} // namespace

TEST(DiodeModel, ThermalVoltageFromExactSiConstants) {
    // k = 1.380649e-23 J/K, q = 1.602176634e-19 C (exact since the 2019 SI; CODATA 2018):
    // kT/q = 25.852 mV at 300 K.
    EXPECT_NEAR(thermal_voltage(300.0), 25.852e-3, 0.5e-6);
    EXPECT_NEAR(thermal_voltage(300.0), 1.380649e-23 * 300.0 / 1.602176634e-19, 1e-18);
}

TEST(DiodeModel, SaturationCurrentLawOfNgspice) {
    const auto m = model_with({1e-9, 1.9, 0.05, 1.11, 3.0});
    // At TNOM the law returns IS itself (ngspice diotemp.c).
    EXPECT_DOUBLE_EQ(m.saturation_current(300.15), 1e-9);
    // Textbook form IS·exp((T/Tnom − 1)·EG/(N·Vt))·(T/Tnom)^(XTI/N) at 100 °C.
    const double t = 373.15, r = t / 300.15;
    const double expect =
        1e-9 * std::exp((r - 1.0) * 1.11 / (1.9 * thermal_voltage(t))) * std::pow(r, 3.0 / 1.9);
    EXPECT_NEAR(m.saturation_current(t) / expect, 1.0, 1e-12);
}

TEST(DiodeModel, ForwardVoltageMatchesNgspice) {
    if (!std::filesystem::exists("/usr/bin/ngspice")) GTEST_SKIP() << "ngspice not installed";
    const std::vector<SpiceForward> models{
        {5e-6, 1.05, 0.04, 0.69, 2.0}, // Schottky-like
        {2e-9, 1.9, 0.06, 1.11, 3.0},  // ultrafast PN-like
        {1e-14, 1.0, 0.02, 1.11, 3.0}, // ideal small-signal junction
    };
    int tag = 0;
    for (const auto& f : models) {
        const auto m = model_with(f);
        for (double tc : {25.0, 100.0}) {
            const auto pts = ngspice_sweep(f, tc, std::to_string(tag++));
            ASSERT_GE(pts.size(), 50u) << "ngspice produced no sweep for IS=" << f.is;
            for (const auto& p : pts) {
                // Reference: ngspice DC analysis of the same SPICE diode model; 1 mV agreement.
                EXPECT_NEAR(m.vf(p.current, tc + 273.15), p.voltage, 1e-3)
                    << "IS=" << f.is << " N=" << f.n << " T=" << tc << " I=" << p.current;
            }
        }
    }
}

TEST(DiodeModel, FitRecoversParametersFromManyPoints) {
    const SpiceForward truth{3e-6, 1.08, 0.035, 0.72, 2.0};
    const Diode d = part_from_points(truth, {{0.01, 298.15},
                                             {0.1, 298.15},
                                             {0.5, 298.15},
                                             {1.0, 298.15},
                                             {3.0, 298.15},
                                             {0.1, 398.15},
                                             {1.0, 398.15}});
    const SpiceForward fit = fit_forward(d);
    // Points generated from known parameters must give them back (self-consistency of the fit).
    EXPECT_NEAR(fit.is / truth.is, 1.0, 1e-3);
    EXPECT_NEAR(fit.n, truth.n, 1e-4);
    EXPECT_NEAR(fit.rs, truth.rs, 1e-5);
    EXPECT_NEAR(fit.eg, truth.eg, 1e-4);
    EXPECT_DOUBLE_EQ(fit.xti, 2.0); // fixed: technology default for Schottky (from memory)
}

TEST(DiodeModel, FitWithPnDefaultsAndTwoPoints) {
    // Two points at 25 °C: N from the technology default, IS and RS from the points.
    const SpiceForward truth{2e-9, 1.9, 0.06, 1.11, 3.0};
    const Diode d =
        part_from_points(truth, {{0.2, 298.15}, {2.0, 298.15}}, DiodeTechnology::ultrafast);
    const SpiceForward fit = fit_forward(d);
    const auto m = model_with(fit);
    for (const auto& p : d.forward) EXPECT_NEAR(m.vf(p.current, p.temperature), p.vf, 1e-6);
    EXPECT_NEAR(fit.rs, 0.06, 1e-4);
}

TEST(DiodeModel, FitOnePointReproducesIt) {
    Diode d;
    d.id = "D-one";
    d.technology = DiodeTechnology::schottky;
    d.if_avg = 2.0;
    d.forward = {{0.5, 2.0, 298.15}};
    const SpiceForward fit = fit_forward(d);
    EXPECT_NEAR(model_with(fit).vf(2.0, 298.15), 0.5, 1e-9);
    EXPECT_NEAR(fit.rs, 0.1 / 2.0, 1e-12); // 0.1 V at the rated current (common practice)
}

TEST(DiodeModel, FitRejectsFallingVf) {
    Diode d;
    d.id = "D-bad";
    d.forward = {{0.5, 1.0, 298.15}, {0.45, 2.0, 298.15}};
    try {
        (void)fit_forward(d);
        FAIL() << "expected std::invalid_argument";
    } catch (const std::invalid_argument& e) {
        EXPECT_NE(std::string(e.what()).find("D-bad"), std::string::npos) << e.what();
        EXPECT_NE(std::string(e.what()).find("rise"), std::string::npos) << e.what();
    }
    d.forward.clear();
    EXPECT_THROW((void)fit_forward(d), std::invalid_argument);
}

TEST(DiodeModel, JunctionChargeAndEnergyMatchIntegration) {
    for (const SpiceCapacitance c :
         {SpiceCapacitance{300e-12, 0.6, 0.5}, SpiceCapacitance{80e-12, 0.75, 0.33},
          SpiceCapacitance{50e-12, 0.7, 1.0}}) {
        DiodeModel m;
        m.cap = c;
        auto cv = [&](double v) { return c.cjo / std::pow(1.0 + v / c.vj, c.m); };
        for (double vr : {0.5, 12.0, 48.0}) {
            // C(v) = CJO/(1 + v/VJ)^M (SPICE depletion capacitance, ngspice manual); Q = ∫C dv,
            // E = ∫v·C(v) dv, by Simpson's rule.
            const double q = simpson(cv, 0.0, vr, 20000);
            const double e = simpson([&](double v) { return v * cv(v); }, 0.0, vr, 20000);
            EXPECT_NEAR(m.junction_charge(vr) / q, 1.0, 1e-9) << "M " << c.m << " V " << vr;
            EXPECT_NEAR(m.capacitive_energy(vr) / e, 1.0, 1e-9) << "M " << c.m << " V " << vr;
        }
        EXPECT_EQ(m.junction_charge(0.0), 0.0);
        EXPECT_EQ(m.capacitive_energy(-1.0), 0.0);
    }
}

TEST(DiodeModel, CapacitanceFromDatasheetPoint) {
    Diode d;
    d.id = "D-cap";
    d.technology = DiodeTechnology::schottky;
    d.if_avg = 3.0;
    d.rth_ja = 80.0;
    d.forward = {{0.45, 3.0, 298.15}};
    d.cj = 200e-12;
    d.cj_vr = 4.0;
    const auto m = make_model(d);
    // The model's C(v) passes through the datasheet point.
    EXPECT_NEAR(m.cap.cjo / std::pow(1.0 + 4.0 / m.cap.vj, m.cap.m), 200e-12, 1e-24);
    EXPECT_EQ(m.recovery_charge(2.0), 0.0); // Schottky: majority carriers, no stored charge
}

TEST(DiodeModel, RecoveryScalesWithForwardCurrent) {
    Diode d;
    d.id = "D-pn";
    d.technology = DiodeTechnology::ultrafast;
    d.if_avg = 2.0;
    d.rth_ja = 80.0;
    d.forward = {{0.9, 2.0, 298.15}};
    d.qrr = 20e-9;
    d.recovery_if = 1.0;
    const auto m = make_model(d);
    // Charge-control model: stored charge proportional to forward current (SPICE TT).
    EXPECT_NEAR(m.recovery_charge(1.0), 20e-9, 1e-21);
    EXPECT_NEAR(m.recovery_charge(2.5), 50e-9, 1e-21);
    EXPECT_EQ(m.recovery_charge(0.0), 0.0);
}

TEST(DiodeModel, LeakageDoublesEveryTenKelvin) {
    DiodeModel m;
    m.ir_ref = 50e-6;
    m.vr_ref = 40.0;
    m.t_ref = 298.15;
    m.leakage_doubling = 10.0;
    // Doubling every 10 K: common practice for Schottky leakage (thermionic emission,
    // Sze & Ng, Physics of Semiconductor Devices, 3rd ed., ch. 3).
    EXPECT_NEAR(m.leakage(40.0, 298.15), 50e-6, 1e-18);
    EXPECT_NEAR(m.leakage(40.0, 308.15), 100e-6, 1e-15);
    EXPECT_NEAR(m.leakage(40.0, 398.15), 50e-6 * 1024.0, 1e-12);
    // sqrt(V) voltage dependence (generation current in an abrupt junction, Sze & Ng ch. 2).
    EXPECT_NEAR(m.leakage(10.0, 298.15), 25e-6, 1e-18);
    EXPECT_EQ(m.leakage(0.0, 350.0), 0.0);
}

TEST(DiodeModel, GivenSpiceParametersWin) {
    Diode d;
    d.id = "D-spice";
    d.rth_ja = 90.0;
    d.forward = {{0.9, 1.0, 298.15}};
    d.spice = SpiceForward{1e-7, 1.2, 0.02, 0.7, 2.0};
    const auto m = make_model(d);
    EXPECT_DOUBLE_EQ(m.fwd.is, 1e-7);
    EXPECT_DOUBLE_EQ(m.fwd.rs, 0.02);
    EXPECT_DOUBLE_EQ(m.rth_ja, 90.0);
}
