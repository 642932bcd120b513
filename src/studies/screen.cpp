#include "studies/screen.hpp"

#include "converter/evaluate.hpp"
#include "loads/load.hpp"
#include "units/quantity.hpp"

#include <algorithm>
#include <cmath>

namespace coilsieve::studies {

namespace u = coilsieve::units;

namespace {

// Allowances that keep every screen a necessary condition (see screen.hpp).
constexpr double current_slack = 0.97;   // regulation error of the average current
constexpr double duty_slack = 0.75;      // (1 - D) >= 0.75 (1 - D_ideal): drops the ideal duty ignores
constexpr double loss_slack = 0.9;       // loss floors are scaled down by this
constexpr double t_hot = 448.15;         // K (175 °C): no part runs hotter and stays feasible
constexpr double dcr_hot_factor = 1.0 + 0.00393 * (t_hot - 293.15); // IEC 60028 copper
constexpr double diode_drop_max = 3.0;   // V, a generous ceiling on a diode's forward drop

std::string fmt(double v, u::Dimension d) { return u::format(v, d); }

bool hysteretic(const ScreenContext& c) {
    return c.design->control.mode == design::ControlMode::hysteretic;
}

// The band at a corner: a fractional band follows the corner's current (converter::corner_setting).
double band_scale(const ScreenContext& c, const EnvelopeCorner& k) {
    if (!c.design->control.band_is_fraction || c.target <= 0.0 || k.current <= 0.0) return 1.0;
    return k.current / c.target;
}
double band_lo(const ScreenContext& c) { return hysteretic(c) ? c.range.lo : 0.0; }
double band_hi(const ScreenContext& c) { return hysteretic(c) ? c.range.hi : 0.0; }
double band_lo(const ScreenContext& c, const EnvelopeCorner& k) {
    return band_lo(c) * band_scale(c, k);
}
double band_hi(const ScreenContext& c, const EnvelopeCorner& k) {
    return band_hi(c) * band_scale(c, k);
}
// Smallest possible peak over the corners that carry the largest current.
double peak_floor(const ScreenContext& c) {
    double p = 0.0;
    for (const auto& k : c.corners) p = std::max(p, k.current + band_lo(c, k) / 2.0);
    return current_slack * p;
}

// Lower bound of the on-interval inductor voltage at a corner for an inductor of DCR `dcr_max`.
double von_floor(const ScreenContext& c, const EnvelopeCorner& k, double dcr_max) {
    const double i_hi = k.current + band_hi(c, k) / 2.0;
    const double vo_hi = k.v0 + k.r * i_hi;
    const double r = c.ron_hot + c.design->sense_resistor + dcr_max * dcr_hot_factor;
    return k.vin - vo_hi - i_hi * r;
}

// g = Von·Voff/(Von + Voff): the buck's volt-second product per unit time, f·L·ΔI = g
// (volt-second balance, Erickson & Maksimović 2nd ed. ch. 2). Increasing in both arguments.
double g_of(double von, double voff) { return von * voff / (von + voff); }

// Largest inductor ripple (A p-p) a feasible pair can have at a corner (hysteretic control): the
// band plus the delay overshoot, and no more than the load-ripple limit allows without a capacitor.
double ripple_ceiling(const ScreenContext& c, const EnvelopeCorner& k, double l_lo) {
    const double td = c.design->control.delay;
    double di = band_hi(c, k) + td * (1.2 * k.vin + diode_drop_max) / l_lo;
    if (c.design->limits.load_ripple && !c.design->output_capacitor)
        di = std::min(di, *c.design->limits.load_ripple * k.current / current_slack);
    return di;
}

// Lowest switching frequency a feasible pair can run at a corner: f_sw_min, and for hysteretic
// control f >= g/(L_hi·ΔI_max) (t_on <= L·ΔI/Von_min, t_off <= L·ΔI/Voff_min).
double frequency_floor(const ScreenContext& c, const EnvelopeCorner& k, const parts::Inductor& l,
                       double l0) {
    double f = c.design->limits.f_sw_min;
    if (hysteretic(c)) {
        const double l_lo = l0 * k.l_scale * (1.0 - l.sat_drop);
        const double l_hi = l0 * k.l_scale;
        const double von = von_floor(c, k, l.dcr_max);
        if (von > 0.0 && l_lo > 0.0) f = std::max(f, g_of(von, k.v0) / (l_hi * ripple_ceiling(c, k, l_lo)));
    } else {
        f = std::max(f, c.range.lo);
    }
    return f;
}

// Switch transition, gate and output-capacitance energy per cycle (the converter's switching-loss
// terms, Mohan §2-7 linearised), with the valley no lower than I - ΔI_max/2.
double switch_energy_floor(const ScreenContext& c, const EnvelopeCorner& k, double di_max) {
    const auto& sw = c.design->sw;
    const double i = current_slack * k.current;
    const double valley = std::max(0.0, i - di_max / 2.0);
    return 0.5 * k.vin * (valley * sw.rise_time + i * sw.fall_time) + sw.gate_charge * sw.drive_voltage +
           0.5 * sw.output_capacitance * k.vin * k.vin;
}

// The design's corners for a part of this tolerance (inductance scaled per corner).
std::vector<EnvelopeCorner> part_corners(const ScreenContext& c, double tolerance) {
    std::vector<EnvelopeCorner> out;
    for (const auto& k : converter::make_corners(*c.design, tolerance))
        out.push_back({k.name, k.vin, k.point.v0, k.point.r, k.point.current, k.ambient, k.l_scale});
    return out;
}

} // namespace

ScreenContext make_screen_context(const design::Design& d, const optimisation::SettingRange& r) {
    ScreenContext c;
    c.design = &d;
    c.range = r;
    for (const auto& k : converter::make_corners(d, 0.0)) {
        EnvelopeCorner e{k.name, k.vin, k.point.v0, k.point.r, k.point.current, k.ambient, 1.0};
        c.vin_max = std::max(c.vin_max, e.vin);
        c.i_max = std::max(c.i_max, e.current);
        c.corners.push_back(std::move(e));
    }
    c.vin_max = std::max(c.vin_max, d.supply.max);
    const double tc = std::max(0.0, d.sw.on_resistance_tempco);
    c.ron_hot = d.sw.on_resistance * (1.0 + tc * (t_hot - 298.15));
    c.target = loads::target_current(d.load);
    // Pair-independent loss floor at each corner: sense resistor I²·Rs (I_rms >= I_avg) and
    // switch conduction D·I²·Ron with D >= Vo/Vin (drops only lengthen the on-time) and Ron no
    // lower than at the colder of the ambient and 25 °C.
    double floor = INFINITY;
    for (const auto& k : c.corners) {
        if (k.vin <= 0.0) continue;
        const double i = current_slack * k.current;
        const double duty = std::clamp((k.v0 + k.r * k.current) / k.vin, 0.0, 1.0);
        const double ron = d.sw.on_resistance * (1.0 + tc * (std::min(k.ambient, 298.15) - 298.15));
        floor = std::min(floor, i * i * (d.sense_resistor + duty * std::max(0.0, ron)));
    }
    c.loss_floor = std::isfinite(floor) ? loss_slack * floor : 0.0;
    return c;
}

std::vector<ScreenReason> screen_inductor(const ScreenContext& c, const parts::Inductor& l,
                                          const parts::InductorModel& m) {
    std::vector<ScreenReason> out;
    const auto& lim = c.design->limits;
    if (lim.height_max && l.height > *lim.height_max)
        out.push_back({"height_max", "", l.height, *lim.height_max,
                       "height " + fmt(l.height, u::Dimension::length) + " is above the limit " +
                           fmt(*lim.height_max, u::Dimension::length)});
    if (lim.footprint_max && l.footprint() > *lim.footprint_max)
        out.push_back({"footprint_max", "", l.footprint(), *lim.footprint_max,
                       "footprint " + fmt(l.footprint(), u::Dimension::area) +
                           " is above the limit " + fmt(*lim.footprint_max, u::Dimension::area)});

    // Saturation: the peak is at least the target plus half the smallest band.
    const double peak_lb = peak_floor(c);
    if (peak_lb > lim.isat_derating * l.isat)
        out.push_back({"isat", "", peak_lb, lim.isat_derating * l.isat,
                       "peak current at least " + fmt(peak_lb, u::Dimension::current) +
                           " exceeds " + fmt(lim.isat_derating, u::Dimension::ratio) + " of Isat " +
                           fmt(l.isat, u::Dimension::current)});
    // RMS rating: the RMS current is at least the average.
    const double irms_lb = current_slack * c.i_max;
    if (irms_lb > l.irms)
        out.push_back({"inductor_rms", "", irms_lb, l.irms,
                       "load current " + fmt(c.i_max, u::Dimension::current) +
                           " exceeds the RMS rating " + fmt(l.irms, u::Dimension::current)});

    if (!(m.l0 > 0.0)) return out;
    // Per corner, the inductance lies in l0·scale·[1 - drop, 1] (tolerance, then roll-off down to
    // L(Isat) at most, as a feasible peak stays below Isat).
    const auto corners = part_corners(c, l.tolerance);
    auto l_lo = [&](const EnvelopeCorner& k) { return m.l0 * k.l_scale * (1.0 - l.sat_drop); };
    auto l_hi = [&](const EnvelopeCorner& k) { return m.l0 * k.l_scale; };

    if (hysteretic(c)) {
        // Frequency window: f = g/(L·ΔI_eff); some band in range must put f inside
        // [f_sw_min, f_sw_max] at every corner.
        for (const auto& k : corners) {
            const double von_ub = k.vin - k.v0;
            if (von_ub <= 0.0 || band_lo(c, k) <= 0.0) continue;
            const double f_ub = von_ub / (l_lo(k) * band_lo(c, k)); // g < Von, ΔI_eff >= band
            if (f_ub < lim.f_sw_min) {
                out.push_back({"f_sw_min", k.name, f_ub, lim.f_sw_min,
                               "inductance " + fmt(m.l0, u::Dimension::inductance) +
                                   " is too large: switching frequency at most " +
                                   fmt(f_ub, u::Dimension::frequency) + ", below the minimum " +
                                   fmt(lim.f_sw_min, u::Dimension::frequency)});
                break;
            }
        }
        if (lim.f_sw_max)
            for (const auto& k : corners) {
                const double von = von_floor(c, k, l.dcr_max);
                if (von <= 0.0) continue;
                const double f_lb = g_of(von, k.v0) / (l_hi(k) * ripple_ceiling(c, k, l_lo(k)));
                if (f_lb > *lim.f_sw_max) {
                    out.push_back({"f_sw_max", k.name, f_lb, *lim.f_sw_max,
                                   "inductance " + fmt(m.l0, u::Dimension::inductance) +
                                       " is too small: with the band and ripple in range the "
                                       "switching frequency is at least " +
                                       fmt(f_lb, u::Dimension::frequency) + ", above the maximum " +
                                       fmt(*lim.f_sw_max, u::Dimension::frequency)});
                    break;
                }
            }
    } else if (lim.load_ripple && !c.design->output_capacitor) {
        // PWM without a capacitor: the ripple at the highest frequency must fit the limit.
        for (const auto& k : corners) {
            const double von = von_floor(c, k, l.dcr_max);
            if (von <= 0.0 || k.current <= 0.0) continue;
            const double ripple_lb = g_of(von, k.v0) / (l_hi(k) * c.range.hi) / k.current;
            if (ripple_lb > *lim.load_ripple) {
                out.push_back({"load_ripple", k.name, ripple_lb, *lim.load_ripple,
                               "inductance " + fmt(m.l0, u::Dimension::inductance) +
                                   " is too small: ripple at least " +
                                   fmt(ripple_lb, u::Dimension::ratio) + " even at " +
                                   fmt(c.range.hi, u::Dimension::frequency)});
                break;
            }
        }
    }
    return out;
}

std::vector<ScreenReason> screen_diode(const ScreenContext& c, const parts::Diode& diode) {
    std::vector<ScreenReason> out;
    const auto& lim = c.design->limits;
    if (c.vin_max > lim.vrrm_derating * diode.vrrm)
        out.push_back({"vrrm", "vin-max", c.vin_max, lim.vrrm_derating * diode.vrrm,
                       "reverse voltage " + fmt(c.vin_max, u::Dimension::voltage) + " exceeds " +
                           fmt(lim.vrrm_derating, u::Dimension::ratio) + " of Vrrm " +
                           fmt(diode.vrrm, u::Dimension::voltage)});
    // Average diode current: (1 - D)·I, with the duty slack for drops.
    double id_lb = 0.0;
    std::string at;
    for (const auto& k : c.corners) {
        if (k.vin <= 0.0) continue;
        const double vo = k.v0 + k.r * k.current;
        const double off = std::clamp(1.0 - vo / k.vin, 0.0, 1.0);
        const double id = duty_slack * off * current_slack * k.current;
        if (id > id_lb) {
            id_lb = id;
            at = k.name;
        }
    }
    if (id_lb > lim.diode_current_derating * diode.if_avg)
        out.push_back({"diode_current", at, id_lb, lim.diode_current_derating * diode.if_avg,
                       "average current at least " + fmt(id_lb, u::Dimension::current) +
                           " exceeds " + fmt(lim.diode_current_derating, u::Dimension::ratio) +
                           " of If(AV) " + fmt(diode.if_avg, u::Dimension::current)});
    if (lim.height_max && diode.height > *lim.height_max)
        out.push_back({"height_max", "", diode.height, *lim.height_max,
                       "height " + fmt(diode.height, u::Dimension::length) +
                           " is above the limit " + fmt(*lim.height_max, u::Dimension::length)});
    return out;
}

InductorBound inductor_bound(const ScreenContext& c, const parts::Inductor& l,
                             const parts::InductorModel& m) {
    InductorBound b;
    b.size = l.volume();
    const auto corners = part_corners(c, l.tolerance);
    double loss = INFINITY;
    for (const auto& k : corners) {
        // Copper loss >= I_avg²·R_dc at ambient (I_rms >= I_avg; copper only heats up).
        const double i = current_slack * k.current;
        double corner = i * i * m.dcr(k.ambient, false);
        const double l_lo = m.l0 * k.l_scale * (1.0 - l.sat_drop);
        const double di_max = hysteretic(c) && l_lo > 0.0 ? ripple_ceiling(c, k, l_lo) : 2.0 * i;
        corner += switch_energy_floor(c, k, di_max) * frequency_floor(c, k, l, m.l0);
        loss = std::min(loss, corner);
    }
    b.loss = std::isfinite(loss) ? loss_slack * std::max(0.0, loss) : 0.0;
    const double peak_lb = peak_floor(c);
    b.margin = l.isat > 0.0 ? 1.0 - peak_lb / l.isat : 0.0;
    if (!c.design->output_capacitor && c.i_max > 0.0) {
        if (hysteretic(c)) {
            // The objective is the worst corner's ripple: at least the band, and at least
            // g/(L_hi·f_sw_max) where the frequency limit forces a wider ripple.
            double r = 0.0;
            for (const auto& k : corners) {
                const double l_hi = m.l0 * k.l_scale;
                if (k.current <= 0.0) continue;
                double di = band_lo(c, k);
                const double von = von_floor(c, k, l.dcr_max);
                if (c.design->limits.f_sw_max && von > 0.0)
                    di = std::max(di, g_of(von, k.v0) / (l_hi * *c.design->limits.f_sw_max));
                r = std::max(r, di / k.current);
                // The peak is at least the average plus half that ripple.
                if (l.isat > 0.0)
                    b.margin = std::min(b.margin, 1.0 - current_slack * (k.current + di / 2.0) / l.isat);
            }
            b.ripple = current_slack * r;
        } else {
            double r = INFINITY;
            for (const auto& k : corners) {
                const double l_hi = m.l0 * k.l_scale;
                const double von = von_floor(c, k, l.dcr_max);
                if (von <= 0.0 || k.current <= 0.0) {
                    r = 0.0;
                    break;
                }
                r = std::min(r, g_of(von, k.v0) / (l_hi * c.range.hi) / k.current);
            }
            b.ripple = std::isfinite(r) ? current_slack * r : 0.0;
        }
    }
    return b;
}

DiodeBound diode_bound(const ScreenContext& c, const parts::Diode& diode,
                       const parts::DiodeModel& m) {
    DiodeBound b;
    b.size = diode.volume();
    double loss = INFINITY;
    for (const auto& k : c.corners) {
        if (k.vin <= 0.0 || k.current <= 0.0) {
            loss = 0.0;
            break;
        }
        // Conduction: the mean of v_f(i)·i over the off-interval is at least v_f(ī)·ī (v_f·i is
        // convex in i), taken at the temperature that gives the lower drop.
        const double i = current_slack * k.current;
        const double vo = k.v0 + k.r * k.current;
        const double off = duty_slack * std::clamp(1.0 - vo / k.vin, 0.0, 1.0);
        const double vf = std::min(m.vf(i, k.ambient), m.vf(i, std::max(t_hot, m.tj_max)));
        loss = std::min(loss, off * i * std::max(0.0, vf));
    }
    b.loss = std::isfinite(loss) ? loss_slack * loss : 0.0;
    return b;
}

} // namespace coilsieve::studies
