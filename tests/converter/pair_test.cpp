// Corners of a design and the limits of a pair, with their margins.

#include "converter/evaluate.hpp"
#include "converter/json.hpp"
#include "corner_keys.hpp"

#include <algorithm>
#include <cmath>
#include <gtest/gtest.h>
#include <set>
#include <string>

namespace coilsieve::converter {
namespace {

parts::Inductor inductor() {
    parts::Inductor l;
    l.id = "L-TEST-47";
    l.source = "test";
    l.family = parts::InductorFamily::shielded_drum_ferrite;
    l.inductance = 47e-6;
    l.tolerance = 0.2;
    l.dcr_typ = 0.08;
    l.dcr_max = 0.1;
    l.isat = 2.0;
    l.sat_drop = 0.3;
    l.irms = 1.8;
    l.shape = parts::SaturationShape::hard;
    l.core = {1.5, 1.4, 2.6};
    l.core_volume = 0.3e-6;
    l.length = 6e-3;
    l.width = 6e-3;
    l.height = 3e-3;
    return l;
}

parts::Diode diode() {
    parts::Diode d;
    d.id = "D-TEST-40";
    d.source = "test";
    d.technology = parts::DiodeTechnology::schottky;
    d.vrrm = 40.0;
    d.if_avg = 2.0;
    d.spice = parts::SpiceForward{2e-6, 1.05, 0.04, 0.69, 2.0};
    d.spice_cap = parts::SpiceCapacitance{150e-12, 0.6, 0.5};
    d.ir = 20e-6;
    d.ir_vr = 40.0;
    d.rth_ja = 100.0;
    d.tj_max = 423.15;
    d.package = "SMA";
    d.length = 4.3e-3;
    d.width = 2.6e-3;
    d.height = 2.4e-3;
    return d;
}

design::Design led_design() {
    design::Design d;
    d.name = "three white LEDs";
    d.supply = {20.0, 24.0, 28.0};
    d.load = loads::LedString{3, 3.0, 0.5, 0.7, -2e-3};
    d.sense_resistor = 0.3;
    d.control.mode = design::ControlMode::hysteretic;
    d.control.band = 0.3;
    d.control.band_is_fraction = true;
    d.control.delay = 50e-9;
    d.ambient.max = 328.15;
    d.ambient.min = 273.15;
    return d;
}

TEST(Corners, LedDesignHasSupplyToleranceAndColdCorners) {
    const auto corners = make_corners(led_design(), 0.2);
    std::set<std::string> names;
    int nominal = 0;
    for (const auto& c : corners) {
        names.insert(c.name);
        nominal += c.nominal ? 1 : 0;
    }
    EXPECT_EQ(names.size(), corners.size()); // unique names
    EXPECT_EQ(nominal, 1);
    EXPECT_TRUE(names.count("vin-nom hot"));
    EXPECT_TRUE(names.count("vin-min hot L-20%"));
    EXPECT_TRUE(names.count("vin-max hot L+20%"));
    EXPECT_TRUE(names.count("vin-min cold L-20%"));
    EXPECT_GE(corners.size(), 6u);
    EXPECT_LE(corners.size(), 12u);
    for (const auto& c : corners) {
        if (c.name == "vin-max hot L-20%") {
            EXPECT_DOUBLE_EQ(c.l_scale, 0.8);
            EXPECT_DOUBLE_EQ(c.vin, 28.0);
            EXPECT_TRUE(c.dcr_max);
        }
        if (c.name == "vin-min cold L-20%") {
            // White LEDs lose about 2–4 mV/K (Khanna, Fundamentals of Solid-State Lighting, CRC
            // 2014, ch. 14): 55 K colder at −2 mV/K per LED is 0.33 V more for three.
            const auto hot = std::find_if(corners.begin(), corners.end(),
                                          [](const Corner& k) { return k.name == "vin-nom hot"; });
            EXPECT_NEAR(c.point.v0 - hot->point.v0, 3 * 2e-3 * 55.0, 1e-9);
            EXPECT_DOUBLE_EQ(c.ambient, 273.15);
        }
    }
}

TEST(Corners, ChargerProfilePointsCarryTheTimeWeights) {
    design::Design d = led_design();
    loads::Battery b;
    b.chemistry = loads::Chemistry::li_ion;
    b.cells = 2;
    b.capacity = 2.0 * 3600.0;
    b.charge_current = 1.0;
    b.internal_resistance = 0.1;
    d.load = b;
    d.ambient.min.reset();
    const auto corners = make_corners(d, 0.2);
    double w = 0.0;
    int nominal = 0;
    bool cc_end_low_supply = false;
    for (const auto& c : corners) {
        if (c.nominal) {
            ++nominal;
            w += c.weight;
            EXPECT_DOUBLE_EQ(c.vin, 24.0);
        }
        if (c.name == "cc-end vin-min hot L-20%") cc_end_low_supply = true;
    }
    EXPECT_GT(nominal, 1);
    EXPECT_NEAR(w, 1.0, 1e-12);
    EXPECT_TRUE(cc_end_low_supply);
    EXPECT_LE(corners.size(), 12u);
}

TEST(Pair, AComfortablePairIsFeasible) {
    const auto d = led_design();
    const auto e = evaluate_pair(d, inductor(), diode(), default_setting(d));
    for (const auto& v : e.violations) ADD_FAILURE() << v.message;
    EXPECT_TRUE(e.feasible);
    ASSERT_FALSE(e.corners.empty());
    for (const auto& c : e.corners) EXPECT_EQ(c.status, CornerStatus::ok) << c.reason;
    for (const auto& k : e.checks) EXPECT_GE(k.margin, 0.0) << k.limit << " " << k.corner;
    // The loss objective is the nominal corner's total.
    const auto nom = std::find_if(e.corners.begin(), e.corners.end(),
                                  [](const CornerResult& r) { return r.name == "vin-nom hot"; });
    ASSERT_NE(nom, e.corners.end());
    EXPECT_DOUBLE_EQ(e.loss_nominal, nom->losses.total);
    EXPECT_GT(e.efficiency_nominal, 0.5);
    EXPECT_LT(e.efficiency_nominal, 1.0);
    // Every corner got the isat check.
    const auto isat_checks = std::count_if(e.checks.begin(), e.checks.end(),
                                           [](const LimitCheck& k) { return k.limit == "isat"; });
    EXPECT_EQ(static_cast<std::size_t>(isat_checks), e.corners.size());
}

TEST(Pair, SaturationLimitBreaksWithTheDocumentedMargin) {
    const auto d = led_design();
    auto l = inductor();
    l.isat = 0.85; // 80 % of it is 0.68 A, below the 0.7 A target
    const auto e = evaluate_pair(d, l, diode(), default_setting(d));
    EXPECT_FALSE(e.feasible);
    int broken = 0;
    for (const auto& v : e.violations) {
        if (v.limit != "isat") continue;
        ++broken;
        const auto r = std::find_if(e.corners.begin(), e.corners.end(),
                                    [&](const CornerResult& c) { return c.name == v.corner; });
        ASSERT_NE(r, e.corners.end());
        const double bound = 0.8 * 0.85;
        EXPECT_DOUBLE_EQ(v.bound, bound);
        EXPECT_DOUBLE_EQ(v.value, r->il_peak);
        EXPECT_NEAR(v.margin, (bound - r->il_peak) / bound, 1e-12); // upper-limit margin
        EXPECT_NE(v.message.find("peak inductor current"), std::string::npos) << v.message;
        EXPECT_NE(v.message.find("of Isat"), std::string::npos) << v.message;
        EXPECT_NE(v.message.find(v.corner), std::string::npos) << v.message;
    }
    EXPECT_EQ(static_cast<std::size_t>(broken), e.corners.size());
}

TEST(Pair, ReverseVoltageHeightAndEfficiencyLimits) {
    auto d = led_design();
    d.limits.height_max = 2.5e-3;    // the 3 mm inductor is too tall, the diode fits
    d.limits.efficiency_min = 0.995; // no real pair reaches this
    auto dd = diode();
    dd.vrrm = 30.0; // 28 V > 0.8 × 30 V
    const auto e = evaluate_pair(d, inductor(), dd, default_setting(d));
    EXPECT_FALSE(e.feasible);
    std::set<std::string> broken;
    for (const auto& v : e.violations) broken.insert(v.limit);
    EXPECT_TRUE(broken.count("vrrm"));
    EXPECT_TRUE(broken.count("height_max"));
    EXPECT_TRUE(broken.count("efficiency_min"));
    for (const auto& v : e.violations) {
        if (v.limit == "vrrm") {
            EXPECT_DOUBLE_EQ(v.value, 28.0);
            EXPECT_DOUBLE_EQ(v.bound, 24.0);
            EXPECT_NEAR(v.margin, (24.0 - 28.0) / 24.0, 1e-12);
        }
        if (v.limit == "height_max") {
            EXPECT_EQ(v.corner, "");
            EXPECT_NE(v.message.find("L-TEST-47"), std::string::npos) << v.message;
        }
        if (v.limit == "efficiency_min") {
            EXPECT_NEAR(v.margin, (e.efficiency_nominal - 0.995) / 0.995, 1e-12); // lower limit
        }
    }
    const auto heights = std::count_if(e.violations.begin(), e.violations.end(),
                                       [](const LimitCheck& k) { return k.limit == "height_max"; });
    EXPECT_EQ(heights, 1); // only the inductor
}

TEST(Pair, LostRegulationAtLowSupplyIsAViolationWithAReason) {
    auto d = led_design();
    d.supply = {9.0, 24.0, 28.0}; // three LEDs need about 9.3 V at 0.7 A
    const auto e = evaluate_pair(d, inductor(), diode(), default_setting(d));
    EXPECT_FALSE(e.feasible);
    bool found = false;
    for (const auto& v : e.violations) {
        if (v.limit != "regulation") continue;
        found = true;
        EXPECT_LT(v.margin, 0.0);
        EXPECT_NE(v.message.find("9.00 V"), std::string::npos) << v.message;
        EXPECT_NE(v.message.find("vin-min"), std::string::npos) << v.message;
    }
    EXPECT_TRUE(found);
}

TEST(Pair, JsonCarriesTheDocumentedKeys) {
    const auto d = led_design();
    const auto e = evaluate_pair(d, inductor(), diode(), default_setting(d));
    const nlohmann::json j = e.corners.front();
    for (const char* key : test_support::documented_corner_keys)
        EXPECT_TRUE(j.contains(key)) << key;
    for (const char* key :
         {"inductor_copper", "inductor_core", "diode_conduction", "diode_switching",
          "diode_leakage", "switch_conduction", "switch_switching", "sense", "total"})
        EXPECT_TRUE(j["losses"].contains(key)) << key;
    EXPECT_TRUE(j["f_sw"].is_number());
}

} // namespace
// A pulse the switch cannot complete, or shorter than the controller allows, breaks t_on_min or
// t_off_min. A buck in CCM has D >= V_o/V_in (volt-second balance with the drops on the load's
// side, Erickson & Maksimović 2nd ed., ch. 2) and D <= (V_o + V_D + I·R)/V_in, V_D <= 1 V and
// R <= 1 Ω taking every drop here; 47 µH at 2 MHz keeps 700 mA far from DCM.
TEST(PairLimits, PulsesShorterThanTheSwitchOrControllerAllowsAreBroken) {
    auto d = led_design();
    d.control.mode = design::ControlMode::pwm;
    d.control.frequency = 2e6;
    d.control.frequency_min = 20e3;
    d.control.frequency_max = 20e6;
    const auto l = inductor();
    const auto di = diode();
    // Three LEDs, 3.0 V each at 25 °C and 2 mV/K less when hot (55 °C): V_o in 8.8–9.0 V.
    const double vo_lo = 3 * (3.0 - 2e-3 * 30.0), vo_hi = 3 * 3.0 + 0.7 * 0.3;
    auto broken = [&](const design::Design& dd, double f, const char* limit) {
        Setting s;
        s.frequency = f;
        const auto e = evaluate_pair(dd, l, di, s);
        for (const auto& c : e.corners) EXPECT_FALSE(c.dcm) << c.name;
        std::string all; // every corner's message
        for (const auto& c : e.violations)
            if (c.limit == limit) all += c.message + "\n";
        return all;
    };
    // Shortest on-time at 28 V, shortest off-time at 20 V.
    const double f = 2e6;
    const double on_lo = vo_lo / 28.0 / f, on_hi = (vo_hi + 1.0 + 0.7) / 28.0 / f;
    const double off_lo = (1.0 - (vo_hi + 1.0 + 0.7) / 20.0) / f, off_hi = (1.0 - vo_lo / 20.0) / f;
    d.limits.t_on_min = 0.95 * on_lo;
    d.limits.t_off_min = 0.95 * off_lo;
    EXPECT_EQ(broken(d, f, "t_on_min"), "");
    EXPECT_EQ(broken(d, f, "t_off_min"), "");
    d.limits.t_on_min = 1.05 * on_hi;
    d.limits.t_off_min = 1.05 * off_hi;
    const std::string on = broken(d, f, "t_on_min"), off = broken(d, f, "t_off_min");
    EXPECT_NE(on.find("controller's minimum"), std::string::npos) << on;
    EXPECT_NE(on.find("vin-max"), std::string::npos) << on;
    EXPECT_NE(off.find("controller's minimum"), std::string::npos) << off;
    EXPECT_NE(off.find("vin-min"), std::string::npos) << off;

    // No controller limit: the switch's own rise plus fall time (20 + 20 ns by default) is the
    // floor. At 10 MHz the on-time at 28 V is below 40 ns; with 5 + 5 ns transitions it is not.
    d.limits.t_on_min.reset();
    d.limits.t_off_min.reset();
    ASSERT_LT((vo_hi + 1.0 + 0.7) / 28.0 / 10e6, 40e-9);
    const std::string floor = broken(d, 10e6, "t_on_min");
    EXPECT_NE(floor.find("rise plus fall"), std::string::npos) << floor;
    d.sw.rise_time = d.sw.fall_time = 5e-9;
    ASSERT_GT(vo_lo / 28.0 / 10e6, 10e-9);
    EXPECT_EQ(broken(d, 10e6, "t_on_min"), "");
}

// Hysteretic control sets the average only through its thresholds: the comparator's delay t_d lets
// the current run on past each threshold at the ramp's slope (V = L·di/dt), to I_hi + t_d·V_on/L
// and I_lo − t_d·V_off/L, so a near-triangular cycle's mean sits t_d·(V_on − V_off)/(2L) above the
// target (derived from the inductor law; Erickson & Maksimović 2nd ed., ch. 2 for the ramps).
// The limit current_error holds |I_avg − I|/I at every corner.
TEST(PairLimits, HystereticCurrentErrorFollowsTheDelayAndIsLimited) {
    auto d = led_design();
    const auto l = inductor();
    const auto di = diode();
    Setting s;
    s.band = 0.1;
    d.control.delay = 0.0;
    for (const auto& c : evaluate_pair(d, l, di, s).corners)
        EXPECT_LT(std::abs(c.regulation_error), 0.005) << c.name; // no delay: no skew to speak of
    d.control.delay = 300e-9;
    const auto e = evaluate_pair(d, l, di, s);
    const auto corners = make_corners(d, l.tolerance);
    double worst = 0.0;
    for (std::size_t k = 0; k < corners.size(); ++k) {
        const auto& r = e.corners[k];
        ASSERT_EQ(r.status, CornerStatus::ok) << r.name;
        const double i = corners[k].point.current;
        const double vo = corners[k].point.v0 + corners[k].point.r * i;
        const double drops = i * (d.sense_resistor + l.dcr_typ);
        const double von = r.vin - vo - drops - i * switch_on_resistance(d.sw, r.ambient);
        // The diode's drop from the SPICE law with kT/q = 25.9 mV (300 K; CODATA k and q).
        const double voff = vo + drops + di.spice->n * 0.0259 * std::log(i / di.spice->is);
        const double skew = 300e-9 * (von - voff) / (2.0 * l.inductance * corners[k].l_scale * i);
        EXPECT_NEAR(r.regulation_error, skew, 0.15 * std::abs(skew) + 0.001) << r.name;
        worst = std::max(worst, std::abs(r.regulation_error));
    }
    ASSERT_GT(worst, 0.01);
    auto broken = [&](double limit) {
        d.limits.current_error = limit;
        const auto ev = evaluate_pair(d, l, di, s);
        return std::any_of(ev.violations.begin(), ev.violations.end(),
                           [](const LimitCheck& c) { return c.limit == "current_error"; });
    };
    EXPECT_TRUE(broken(0.5 * worst));
    EXPECT_FALSE(broken(1.01 * worst));
}

} // namespace coilsieve::converter

namespace coilsieve::converter {

// A limit broken by less than the three digits a report prints: the message must still show the
// value above the limit, not "1.00 MHz is above the maximum 1.00 MHz".
TEST(PairMessages, ValueAndLimitAreToldApart) {
    auto d = led_design();
    const auto l = inductor();
    const auto di = diode();
    Setting s;
    s.band = 0.1;
    const auto free = evaluate_pair(d, l, di, s);
    double f_top = 0.0;
    for (const auto& c : free.corners) f_top = std::max(f_top, c.f_sw);
    ASSERT_GT(f_top, 0.0);
    d.limits.f_sw_max = f_top * (1.0 - 2e-4);
    const auto e = evaluate_pair(d, l, di, s);
    const auto v = std::find_if(e.violations.begin(), e.violations.end(),
                                [](const LimitCheck& c) { return c.limit == "f_sw_max"; });
    ASSERT_NE(v, e.violations.end());
    const std::string& m = v->message;
    const auto above = m.find(" is above the maximum ");
    ASSERT_NE(above, std::string::npos) << m;
    const std::string value = m.substr(std::string("switching frequency ").size(),
                                       above - std::string("switching frequency ").size());
    const std::string rest = m.substr(above + std::string(" is above the maximum ").size());
    const std::string limit = rest.substr(0, rest.find(" at corner"));
    EXPECT_NE(value, limit) << m;
}

// Above its self-resonant frequency a part is a capacitor, not an inductor (a physical floor):
// a switching frequency above the catalog's SRF is a broken limit, one below it is not.
TEST(PairLimits, SwitchingAboveTheSelfResonantFrequencyIsBroken) {
    const auto d = led_design();
    auto l = inductor();
    const auto di = diode();
    Setting s;
    s.band = 0.1;
    auto broken = [&](const parts::Inductor& part) {
        const auto e = evaluate_pair(d, part, di, s);
        return std::any_of(e.violations.begin(), e.violations.end(),
                           [](const LimitCheck& c) { return c.limit == "srf"; });
    };
    l.srf.reset();
    double f_top = 0.0;
    for (const auto& c : evaluate_pair(d, l, di, s).corners) f_top = std::max(f_top, c.f_sw);
    ASSERT_GT(f_top, 0.0);
    EXPECT_FALSE(broken(l)); // no SRF given: nothing to check
    l.srf = 1.01 * f_top;
    EXPECT_FALSE(broken(l));
    l.srf = 0.99 * f_top;
    EXPECT_TRUE(broken(l));
}

} // namespace coilsieve::converter
