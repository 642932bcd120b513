#include "loads/load.hpp"

#include <array>
#include <cmath>
#include <stdexcept>
#include <string>
#include <type_traits>

namespace coilsieve::loads {

namespace {

constexpr double t25 = 298.15; // K, reference temperature of datasheet values

// Per-cell charge profiles. Sources:
// - Li-ion: CC/CV to 4.20 V/cell, 4.35 V for high-voltage cells; pre-charge below about 3.0 V/cell
//   at <= 0.1 C; termination C/20 (common practice; IEC 62133-2 / IEC 61960 test charges end at
//   0.05 It, from memory). Pre-charge at 10 % of the charge current (common charger practice),
//   which stays <= 0.1 C for charge rates up to 1 C. Empty = 3.0 V/cell, the usual discharge
//   cut-off (common practice), so a normal charge starts where pre-charge ends.
// - LiFePO4: 3.60 V/cell, the lower end of the 3.60–3.65 V band (common practice; the lower
//   setpoint is the usual choice for cycle life); 2.5 V/cell cut-off (common practice).
// - Lead-acid: absorption 2.40 V/cell, lower end of 2.40–2.45 V, with −4 mV/K per cell
//   temperature compensation (common practice; Linden, Handbook of Batteries, 4th ed.);
//   1.75 V/cell end of discharge (common practice); absorption ends near C/20 (common practice).
constexpr std::array<ChemistryPreset, 4> presets{{
    {4.20, 3.0, 0.1, 0.05, 3.0, 0.0},     // li_ion
    {4.35, 3.0, 0.1, 0.05, 3.0, 0.0},     // li_ion_hv
    {3.60, 2.5, 0.1, 0.05, 2.5, 0.0},     // lifepo4
    {2.40, 1.75, 0.1, 0.05, 1.75, -4e-3}, // lead_acid
}};

// Charge-profile time split (a modelling estimate, common practice for 0.5–1 C charging):
// the CC phase returns about 80 % of the capacity, the CV taper the rest with an exponential
// current decay I(t) = I_cc·exp(−t/τ) until the termination current; pre-charge is entered only
// by over-discharged cells and is taken to restore 1 % of the capacity.
constexpr double cc_fraction = 0.8;
constexpr double precharge_capacity_fraction = 0.01;

std::vector<LoadPoint> led_points(const LedString& s, double temperature) {
    const double n = static_cast<double>(s.count);
    // Knee voltage extrapolated to zero current along rd, shifted by the tempco (Khanna,
    // Fundamentals of Solid-State Lighting, CRC 2014, ch. 14: Vf falls ~2–4 mV/K).
    const double v0 = n * (s.vf - s.rd * s.current + s.vf_tempco * (temperature - t25));
    return {LoadPoint{"nominal", v0, n * s.rd, s.current, 1.0}};
}

std::vector<LoadPoint> battery_points(const Battery& b, double temperature) {
    if (b.cells < 1) throw std::invalid_argument("battery: cells must be at least 1");
    if (!(b.capacity > 0.0)) throw std::invalid_argument("battery: capacity must be positive");
    if (!(b.charge_current > 0.0))
        throw std::invalid_argument("battery: charge_current must be positive");
    const ChemistryPreset& p = preset(b.chemistry);
    const double s = static_cast<double>(b.cells);
    const double r = b.internal_resistance;
    const double icc = b.charge_current;
    const double capacity_ah = b.capacity / 3600.0;
    const double iterm =
        b.termination_current > 0.0 ? b.termination_current : p.termination_fraction * capacity_ah;
    const double ipre =
        b.precharge_current > 0.0 ? b.precharge_current : p.precharge_fraction * icc;
    if (!(iterm < icc))
        throw std::invalid_argument("battery: termination_current must be below charge_current");

    // Charge (CV) voltage with temperature compensation (lead-acid), terminal at the pack.
    const double v_cv = s * (p.charge_voltage + p.tempco * (temperature - t25));

    // Phase durations (s).
    const double t_pre = precharge_capacity_fraction * b.capacity / ipre;
    const double t_cc = cc_fraction * b.capacity / icc;
    const double tau = (1.0 - cc_fraction) * b.capacity / (icc - iterm);
    const double t_cv = tau * std::log(icc / iterm);
    const double total = t_pre + t_cc + t_cv;

    // The CV taper is split in two halves of time; the mid-time current of an exponential decay
    // from icc to iterm is their geometric mean.
    const double i_mid = std::sqrt(icc * iterm);
    std::vector<LoadPoint> pts;
    pts.reserve(5);
    pts.push_back({"precharge", s * p.precharge_threshold, r, ipre, t_pre / total});
    pts.push_back({"cc-start", s * p.empty_voltage, r, icc, 0.5 * t_cc / total});
    // EMF such that the terminal reaches the CV setpoint at the CC current.
    pts.push_back({"cc-end", v_cv - icc * r, r, icc, 0.5 * t_cc / total});
    pts.push_back({"cv-mid", v_cv - i_mid * r, r, i_mid, 0.5 * t_cv / total});
    pts.push_back({"cv-end", v_cv - iterm * r, r, iterm, 0.5 * t_cv / total});
    return pts;
}

} // namespace

const ChemistryPreset& preset(Chemistry c) { return presets[static_cast<std::size_t>(c)]; }

std::vector<LoadPoint> load_points(const Load& load, double temperature) {
    return std::visit(
        [temperature](const auto& l) -> std::vector<LoadPoint> {
            using T = std::decay_t<decltype(l)>;
            if constexpr (std::is_same_v<T, LedString>) {
                return led_points(l, temperature);
            } else if constexpr (std::is_same_v<T, Battery>) {
                return battery_points(l, temperature);
            } else {
                return {LoadPoint{"nominal", l.voltage, l.resistance, l.current, 1.0}};
            }
        },
        load);
}

double target_current(const Load& load) {
    return std::visit(
        [](const auto& l) -> double {
            using T = std::decay_t<decltype(l)>;
            if constexpr (std::is_same_v<T, Battery>) {
                return l.charge_current;
            } else {
                return l.current;
            }
        },
        load);
}

} // namespace coilsieve::loads
