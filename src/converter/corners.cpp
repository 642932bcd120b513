// The operating corners a pair is checked at, and the design's own setting.
//
// Corners (few, because the optimiser evaluates all of them for every trial):
// - nominal supply, hot ambient, nominal inductance, typical DCR: the corner the loss objective is
//   taken from (for a charger: every point of its charge profile, with the profile's time weights);
// - minimum and maximum supply at the hot ambient with the inductance at −tol and +tol and the
//   maximum DCR: the extremes of frequency, ripple, peak current and temperatures (the hysteretic
//   frequency f = Vo·(Vin − Vo)/(Vin·L·ΔI) rises monotonically with Vin, so the supply extremes
//   bound it); a charger uses its highest-voltage point at minimum supply (regulation headroom)
//   and its highest-current point at maximum supply (peak current);
// - a cold corner at minimum supply, where an LED string's voltage is highest and can break
//   regulation (ambient.min, or 25 °C for an LED string when the design gives no minimum).

#include "converter/evaluate.hpp"

#include <algorithm>
#include <cstdio>
#include <string>

namespace coilsieve::converter {

namespace {

constexpr double t25 = 298.15;

std::string tolerance_tag(double tol, int sign) {
    if (!(tol > 0.0)) return "";
    char buf[32];
    std::snprintf(buf, sizeof buf, " L%c%g%%", sign < 0 ? '-' : '+', 100.0 * tol);
    return buf;
}

double terminal_voltage(const loads::LoadPoint& p) { return p.v0 + p.r * p.current; }

} // namespace

std::vector<Corner> make_corners(const design::Design& d, double l_tolerance) {
    const double tol = std::clamp(l_tolerance, 0.0, 0.9);
    const double hot = d.ambient.max;
    const bool led = std::holds_alternative<loads::LedString>(d.load);
    // A plain double and a flag: GCC's -Wmaybe-uninitialized misfires on std::optional here.
    const double t_cold = d.ambient.min ? *d.ambient.min : t25;
    const bool cold = (d.ambient.min || led) && t_cold <= hot - 0.5;

    std::vector<int> signs{-1};
    if (tol > 0.0) signs.push_back(+1);

    std::vector<Corner> out;
    out.reserve(12);
    auto add = [&](std::string name, double vin, double ambient, int sign, bool worst,
                   const loads::LoadPoint& p, double weight, bool nominal) {
        Corner c;
        c.name = std::move(name);
        c.vin = vin;
        c.ambient = ambient;
        c.l_scale = 1.0 + sign * tol;
        c.dcr_max = worst;
        c.point = p;
        c.weight = weight;
        c.nominal = nominal;
        out.push_back(std::move(c));
    };

    const std::vector<loads::LoadPoint> hot_points = loads::load_points(d.load, hot);
    if (hot_points.empty()) return out;

    if (hot_points.size() == 1) {
        const loads::LoadPoint& p = hot_points.front();
        add("vin-nom hot", d.supply.nom, hot, 0, false, p, 1.0, true);
        for (const int sign : signs)
            add("vin-min hot" + tolerance_tag(tol, sign), d.supply.min, hot, sign, true, p, 0.0,
                false);
        for (const int sign : signs)
            add("vin-max hot" + tolerance_tag(tol, sign), d.supply.max, hot, sign, true, p, 0.0,
                false);
        if (cold) {
            const loads::LoadPoint pc = loads::load_points(d.load, t_cold).front();
            for (const int sign : signs)
                add("vin-min cold" + tolerance_tag(tol, sign), d.supply.min, t_cold, sign, true, pc,
                    0.0, false);
        }
        return out;
    }

    // A charge profile: every point at nominal supply carries its share of the charge time.
    for (const auto& p : hot_points)
        add(p.name + " vin-nom hot", d.supply.nom, hot, 0, false, p, p.weight, true);
    auto highest_voltage = [](const std::vector<loads::LoadPoint>& pts) {
        return *std::max_element(pts.begin(), pts.end(), [](const auto& a, const auto& b) {
            const double va = terminal_voltage(a), vb = terminal_voltage(b);
            return va != vb ? va < vb : a.current < b.current;
        });
    };
    const loads::LoadPoint hv = highest_voltage(hot_points);
    const loads::LoadPoint hi =
        *std::max_element(hot_points.begin(), hot_points.end(), [](const auto& a, const auto& b) {
            return a.current != b.current ? a.current < b.current
                                          : terminal_voltage(a) > terminal_voltage(b);
        });
    for (const int sign : signs)
        add(hv.name + " vin-min hot" + tolerance_tag(tol, sign), d.supply.min, hot, sign, true, hv,
            0.0, false);
    for (const int sign : signs)
        add(hi.name + " vin-max hot" + tolerance_tag(tol, sign), d.supply.max, hot, sign, true, hi,
            0.0, false);
    if (cold) {
        const loads::LoadPoint hvc = highest_voltage(loads::load_points(d.load, t_cold));
        add(hvc.name + " vin-min cold" + tolerance_tag(tol, -1), d.supply.min, t_cold, -1, true,
            hvc, 0.0, false);
    }
    return out;
}

double switch_on_resistance(const design::Switch& sw, double ambient) {
    const double t_switch = ambient + switch_temperature_rise;
    return std::max(0.0, sw.on_resistance * (1.0 + sw.on_resistance_tempco * (t_switch - t25)));
}

Setting default_setting(const design::Design& d) {
    Setting s;
    const double target = loads::target_current(d.load);
    s.band = design::band_amps(d.control, target);
    s.frequency = d.control.frequency;
    if (d.output_capacitor) s.capacitance = d.output_capacitor->capacitance;
    return s;
}

} // namespace coilsieve::converter
