// Loads: chemistry presets, LED string voltage, battery charge profile.

#include "loads/load.hpp"

#include <cmath>
#include <gtest/gtest.h>
#include <numeric>
#include <stdexcept>

using namespace coilsieve::loads;

namespace {

Battery two_cell() {
    Battery b;
    b.chemistry = Chemistry::li_ion;
    b.cells = 2;
    b.capacity = 2.5 * 3600.0;
    b.charge_current = 2.0;
    b.termination_current = 0.125;
    b.internal_resistance = 0.12;
    return b;
}

const LoadPoint& point(const std::vector<LoadPoint>& pts, const std::string& name) {
    for (const auto& p : pts)
        if (p.name == name) return p;
    throw std::runtime_error("no point " + name);
}

} // namespace

TEST(Loads, ChemistryPresets) {
    // Li-ion CC/CV to 4.20 V/cell, 4.35 V for high-voltage cells, pre-charge below ~3.0 V/cell
    // (common practice); termination 0.05 It (IEC 62133-2 / IEC 61960 test charge, from memory).
    EXPECT_DOUBLE_EQ(preset(Chemistry::li_ion).charge_voltage, 4.20);
    EXPECT_DOUBLE_EQ(preset(Chemistry::li_ion_hv).charge_voltage, 4.35);
    EXPECT_DOUBLE_EQ(preset(Chemistry::li_ion).precharge_threshold, 3.0);
    EXPECT_DOUBLE_EQ(preset(Chemistry::li_ion).termination_fraction, 0.05);
    EXPECT_LE(preset(Chemistry::li_ion).precharge_fraction, 0.1); // <= 0.1 C at up to 1 C
    EXPECT_DOUBLE_EQ(preset(Chemistry::li_ion).tempco, 0.0);
    // LiFePO4 3.60–3.65 V/cell (common practice): the lower end is used.
    EXPECT_GE(preset(Chemistry::lifepo4).charge_voltage, 3.60);
    EXPECT_LE(preset(Chemistry::lifepo4).charge_voltage, 3.65);
    // Lead-acid absorption 2.40–2.45 V/cell, compensation −3 to −5 mV/K per cell
    // (common practice; Linden, Handbook of Batteries, 4th ed.).
    EXPECT_GE(preset(Chemistry::lead_acid).charge_voltage, 2.40);
    EXPECT_LE(preset(Chemistry::lead_acid).charge_voltage, 2.45);
    EXPECT_DOUBLE_EQ(preset(Chemistry::lead_acid).tempco, -4e-3);
}

TEST(Loads, LedTempcoWorkedExample) {
    // Khanna, Fundamentals of Solid-State Lighting, CRC 2014, ch. 14:
    // 3.0 V − 3 mV/K × 100 K = 2.7 V.
    LedString led;
    led.count = 1;
    led.vf = 3.0;
    led.rd = 0.0;
    led.current = 0.35;
    led.vf_tempco = -3e-3;
    const auto pts = load_points(led, 298.15 + 100.0);
    ASSERT_EQ(pts.size(), 1u);
    EXPECT_NEAR(pts[0].v0, 2.7, 1e-12);
    EXPECT_DOUBLE_EQ(pts[0].weight, 1.0);
}

TEST(Loads, LedStringAtRatedCurrent) {
    LedString led{4, 3.05, 0.45, 0.7, -2e-3};
    const auto pts = load_points(led, 298.15);
    ASSERT_EQ(pts.size(), 1u);
    // Terminal voltage at the rated current is count·vf by definition of vf.
    EXPECT_NEAR(pts[0].v0 + pts[0].r * pts[0].current, 4 * 3.05, 1e-12);
    EXPECT_NEAR(pts[0].r, 4 * 0.45, 1e-15);
    EXPECT_DOUBLE_EQ(pts[0].current, 0.7);
    EXPECT_DOUBLE_EQ(target_current(led), 0.7);
}

TEST(Loads, ChargeProfileWeightsSumToOne) {
    for (auto chem :
         {Chemistry::li_ion, Chemistry::li_ion_hv, Chemistry::lifepo4, Chemistry::lead_acid}) {
        Battery b = two_cell();
        b.chemistry = chem;
        b.termination_current = 0.0; // preset
        const auto pts = load_points(b, 298.15);
        const double sum = std::accumulate(
            pts.begin(), pts.end(), 0.0, [](double s, const LoadPoint& p) { return s + p.weight; });
        EXPECT_NEAR(sum, 1.0, 1e-12);
        for (const auto& p : pts) EXPECT_GT(p.weight, 0.0) << p.name;
    }
}

TEST(Loads, ChargeProfileVoltagesAndCurrents) {
    const Battery b = two_cell();
    const auto pts = load_points(b, 298.15);
    ASSERT_EQ(pts.size(), 5u);
    // CC ends when the terminal reaches 2 × 4.20 V at the charge current.
    const auto& cc_end = point(pts, "cc-end");
    EXPECT_NEAR(cc_end.v0 + cc_end.r * cc_end.current, 8.4, 1e-12);
    EXPECT_DOUBLE_EQ(cc_end.current, 2.0);
    // CV holds the terminal at 8.4 V while the current tapers to termination.
    const auto& cv_end = point(pts, "cv-end");
    EXPECT_NEAR(cv_end.v0 + cv_end.r * cv_end.current, 8.4, 1e-12);
    EXPECT_DOUBLE_EQ(cv_end.current, 0.125);
    const auto& cv_mid = point(pts, "cv-mid");
    EXPECT_NEAR(cv_mid.current, 0.5, 1e-12); // sqrt(2 × 0.125): mid-time of an exponential taper
    EXPECT_NEAR(point(pts, "cc-start").v0, 6.0, 1e-12);
    EXPECT_NEAR(point(pts, "precharge").v0, 6.0, 1e-12);
    EXPECT_NEAR(point(pts, "precharge").current, 0.2, 1e-12);
    EXPECT_DOUBLE_EQ(target_current(Load{b}), 2.0);

    // Phase times of the documented estimate, by hand: precharge 1 % of 9000 C at 0.2 A = 450 s;
    // CC 80 % at 2 A = 3600 s; CV τ = 1800 C/1.875 A = 960 s over ln(16) -> 2661.6 s.
    const double t_cv = 960.0 * std::log(16.0);
    const double total = 450.0 + 3600.0 + t_cv;
    EXPECT_NEAR(point(pts, "precharge").weight, 450.0 / total, 1e-12);
    EXPECT_NEAR(point(pts, "cc-start").weight, 1800.0 / total, 1e-12);
    EXPECT_NEAR(point(pts, "cv-end").weight, 0.5 * t_cv / total, 1e-12);
}

TEST(Loads, LeadAcidChargeVoltageIsTemperatureCompensated) {
    Battery b;
    b.chemistry = Chemistry::lead_acid;
    b.cells = 6;
    b.capacity = 7.0 * 3600.0;
    b.charge_current = 1.0;
    b.internal_resistance = 0.05;
    // −4 mV/K per cell around 25 °C (common practice; Linden, 4th ed.): at 35 °C, 6 × 2.36 V.
    const auto pts = load_points(b, 308.15);
    const auto& cc_end = point(pts, "cc-end");
    EXPECT_NEAR(cc_end.v0 + cc_end.r * cc_end.current, 6 * (2.40 - 0.04), 1e-12);
}

TEST(Loads, SinkIsOnePoint) {
    const Sink s{5.0, 0.1, 1.5};
    const auto pts = load_points(s, 330.0);
    ASSERT_EQ(pts.size(), 1u);
    EXPECT_DOUBLE_EQ(pts[0].v0, 5.0);
    EXPECT_DOUBLE_EQ(pts[0].r, 0.1);
    EXPECT_DOUBLE_EQ(pts[0].current, 1.5);
    EXPECT_DOUBLE_EQ(target_current(s), 1.5);
}

TEST(Loads, InvalidBatteryThrows) {
    Battery b = two_cell();
    b.termination_current = 3.0;
    EXPECT_THROW((void)load_points(b, 298.15), std::invalid_argument);
    b = two_cell();
    b.capacity = 0.0;
    EXPECT_THROW((void)load_points(b, 298.15), std::invalid_argument);
}
