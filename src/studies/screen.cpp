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
constexpr double loss_slack = 0.9; // the switch conduction floor is scaled down by this
constexpr double t_hot = 448.15;   // K (175 °C): no part runs hotter and stays feasible
constexpr double dcr_hot_factor = 1.0 + 0.00393 * (t_hot - 293.15); // IEC 60028 copper

std::string fmt(double v, u::Dimension d) { return u::format(v, d); }

// The band at a corner: a fractional band follows the corner's current (converter::corner_setting).
double band_scale(const ScreenContext& c, const EnvelopeCorner& k) { return band_at(c, k, 1.0); }
double band_lo(const ScreenContext& c) { return hysteretic(c) ? c.range.lo : 0.0; }
double band_hi(const ScreenContext& c) { return hysteretic(c) ? c.range.hi : 0.0; }
double band_lo(const ScreenContext& c, const EnvelopeCorner& k) {
    return band_lo(c) * band_scale(c, k);
}
double band_hi(const ScreenContext& c, const EnvelopeCorner& k) {
    return band_hi(c) * band_scale(c, k);
}
// Smallest possible peak over the corners that carry the largest current. Under hysteretic
// control the switch turns off only once the current reaches the upper threshold I + b/2, so the
// peak is at least that, whatever the average.
double peak_floor(const ScreenContext& c) {
    double p = 0.0;
    for (const auto& k : c.corners) {
        const double share = hysteretic(c) ? 1.0 : k.current_share;
        p = std::max(p, share * (k.current + band_lo(c, k) / 2.0));
    }
    return p;
}

// Lower bound of the on-interval inductor voltage at a corner for an inductor of DCR `dcr_max`.
double von_floor(const ScreenContext& c, const EnvelopeCorner& k, double dcr_max) {
    const double i_hi = k.current + band_hi(c, k) / 2.0;
    const double vo_hi = k.v0 + k.r * i_hi;
    const double r = c.ron_hot + c.design->sense_resistor + dcr_max * dcr_hot_factor;
    return k.vin - vo_hi - i_hi * r;
}

double g_of(double von, double voff) { return volt_second_rate(von, voff); }

// Largest inductor ripple (A p-p) a feasible pair can have at a corner (hysteretic control): the
// band plus the delay overshoot, and no more than the load-ripple limit allows without a capacitor.
double ripple_ceiling(const ScreenContext& c, const EnvelopeCorner& k, double l_lo) {
    const double td = c.design->control.delay;
    double di = band_hi(c, k) + td * (1.2 * k.vin + diode_drop_max) / l_lo;
    if (c.design->limits.load_ripple && !c.design->output_capacitor)
        di = std::min(di, *c.design->limits.load_ripple * k.current_ub());
    return di;
}

} // namespace

double average_current_share(const design::Design& d) {
    if (d.control.mode != design::ControlMode::hysteretic) return pwm_current_share;
    return std::max(0.0, 1.0 - d.limits.current_error);
}

bool hysteretic(const ScreenContext& c) {
    return c.design->control.mode == design::ControlMode::hysteretic;
}

JunctionFloor junction_floor(const EnvelopeCorner& k, const parts::DiodeModel& m, double tj_bound,
                             int passes) {
    JunctionFloor j;
    j.tj = k.ambient;
    if (k.vin <= 0.0 || k.current <= 0.0) return j;
    const double i = k.current_lb();
    const double duty = k.ideal_duty();
    const double vf = std::min(m.vf(i, k.ambient), m.vf(i, std::max(k.ambient, tj_bound)));
    j.conduction = k.off_share * i * std::max(0.0, vf);
    for (int pass = 0; pass < passes; ++pass) {
        j.leakage = m.leakage(k.vin, j.tj) * k.vin * duty;
        j.tj = k.ambient + m.rth_ja * (j.conduction + j.leakage);
        if (j.tj > tj_bound) break;
    }
    return j;
}

bool junction_can_settle(const EnvelopeCorner& k, const parts::DiodeModel& m, double tj_bound) {
    if (k.vin <= 0.0 || k.current <= 0.0 || !(tj_bound > k.ambient)) return true;
    constexpr int cells = 64;
    const double i = k.current_lb();
    const double duty = k.ideal_duty();
    const double off = k.off_share * i;
    auto conduction = [&](double t) { return off * std::max(0.0, m.vf(i, t)); };
    auto leakage = [&](double t) { return m.leakage(k.vin, t) * k.vin * duty; };
    const double h = (tj_bound - k.ambient) / cells;
    double t1 = k.ambient, p1 = conduction(t1);
    for (int n = 1; n <= cells; ++n) {
        const double t2 = n == cells ? tj_bound : k.ambient + h * n;
        const double p2 = conduction(t2);
        const double heat = k.ambient + m.rth_ja * (std::min(p1, p2) + leakage(t1));
        if (heat <= t2) return true; // a balance may exist in this cell
        t1 = t2;
        p1 = p2;
    }
    return false;
}

JunctionBalance::JunctionBalance(const EnvelopeCorner& k, const parts::DiodeModel& m,
                                 double tj_bound)
    : point_(operating_point(k)), ambient_(k.ambient), rth_(m.rth_ja), current_(k.current_lb()) {
    if (k.vin <= 0.0 || k.current <= 0.0) return;
    constexpr int cells = 128; // a cell's width over Rth is what the floor may give away
    const double duty = k.ideal_duty();
    const double top = std::max(k.ambient, tj_bound);
    const double h = (top - k.ambient) / cells;
    for (int n = 0; n <= (top > k.ambient ? cells : 0); ++n) {
        const double t = n == cells ? top : k.ambient + h * n;
        t_.push_back(t);
        vf_.push_back(std::max(0.0, m.vf(current_, t)));
        leak_.push_back(m.leakage(k.vin, t) * k.vin * duty);
    }
}

OperatingPoint operating_point(const EnvelopeCorner& k) {
    return {k.vin, k.ambient, k.current, k.v0, k.r};
}

std::size_t JunctionBalance::first_balancing_cell(double q, double leak_scale) const {
    const double tol = converter::temperature_tolerance;
    for (std::size_t n = 0; n + 1 < t_.size(); ++n)
        if (ambient_ + rth_ * (q * std::min(vf_[n], vf_[n + 1]) + leak_scale * leak_[n]) <=
            t_[n + 1] + tol)
            return n;
    return t_.size();
}

double JunctionBalance::least_heating(double off) const {
    if (t_.empty()) return 0.0;
    const double q = std::max(0.0, off) * current_;
    // V_f is concave in temperature (least at an end), leakage rises with it.
    const double trivial = q * std::min(vf_.front(), vf_.back()) + leak_.front();
    if (!(rth_ > 0.0)) return trivial;
    const std::size_t n = first_balancing_cell(q);
    if (n == t_.size()) return trivial; // no balance below the limit: infeasible, any floor holds
    // Tj lies in cell n or above it. Above it, P >= (t[n+1] − Ta)/Rth; in it, V_f is no lower
    // than at the cell's ends (concave) and the leakage no lower than at its cold end, so
    // P >= q·min V_f + leakage there, which the crossing keeps at most (t[n+1] − Ta)/Rth + tol.
    // Either way P is at least the in-cell value (less the engine's tolerance), and at least the
    // rise to the cell's cold edge.
    const double tol = converter::temperature_tolerance;
    const double in_cell = q * std::min(vf_[n], vf_[n + 1]) + leak_[n] - 2.0 * tol / rth_;
    return std::max({trivial, (t_[n] - ambient_ - tol) / rth_, in_cell});
}

bool JunctionBalance::can_balance(double off) const { return can_balance(off, 1.0); }

bool JunctionBalance::can_balance(double off, double leak_scale) const {
    if (t_.size() < 2 || !(rth_ > 0.0)) return true;
    return first_balancing_cell(std::max(0.0, off) * current_, leak_scale) < t_.size();
}

double JunctionBalance::largest_settling_share(double leak_scale) const {
    if (can_balance(1.0, leak_scale)) return 1.0;
    if (!can_balance(0.0, leak_scale)) return -1.0;
    // Cell n admits a balance for q·V_f,min(n) <= (t[n+1] + tol − Ta)/Rth − s·leakage(n): the
    // largest share is the best cell's bound on q, over the current.
    const double tol = converter::temperature_tolerance;
    double q_most = 0.0;
    for (std::size_t n = 0; n + 1 < t_.size(); ++n) {
        const double room = (t_[n + 1] + tol - ambient_) / rth_ - leak_scale * leak_[n];
        const double v = std::min(vf_[n], vf_[n + 1]);
        if (room >= 0.0 && v > 0.0) q_most = std::max(q_most, room / v);
    }
    double share = std::min(1.0, q_most / current_);
    // Rounding may put the quotient a hair past the cell's own test.
    for (int nudge = 0; nudge < 8 && share > 0.0 && !can_balance(share, leak_scale); ++nudge)
        share -= 1e-12 + 1e-12 * share;
    if (share > 0.0 && !can_balance(share, leak_scale)) // not expected: halve down to it
        share = edge_below(share, leak_scale);
    return std::max(0.0, share);
}

double JunctionBalance::edge_below(double hi, double leak_scale) const {
    double lo = 0.0;
    for (int n = 0; n < 40; ++n) { // 40 halvings: the share to 1e-12, far below any cell's effect
        const double mid = 0.5 * (lo + hi);
        (can_balance(mid, leak_scale) ? lo : hi) = mid;
    }
    return lo;
}

double JunctionBalance::largest_settling_share() const {
    // More conduction heats every cell more, so the admissible shares form an interval [0, s].
    if (can_balance(1.0)) return 1.0;
    if (!can_balance(0.0)) return -1.0;
    return edge_below(1.0, 1.0);
}

double ramp_mean_share(double density_ratio) {
    const double q = std::sqrt(std::clamp(density_ratio, 0.0, 1.0));
    return q / (1.0 + q);
}

double band_at(const ScreenContext& c, const EnvelopeCorner& k, double band) {
    if (!c.design->control.band_is_fraction || c.target <= 0.0 || k.current <= 0.0) return band;
    return band * k.current / c.target;
}

double volt_second_rate(double von, double voff) {
    return von + voff > 0.0 ? von * voff / (von + voff) : 0.0;
}

double off_share_with(const design::Design& d, const EnvelopeCorner& e, double winding) {
    if (!(e.vin > 0.0)) return 0.0;
    const double i = e.current;
    const double on = e.vin - i * converter::switch_on_resistance(d.sw, e.ambient);
    const double duty =
        on > 0.0 ? (e.v0 + e.r * i + i * (std::max(0.0, d.sense_resistor) + winding)) / on : 1.0;
    return duty_slack * (1.0 - std::clamp(duty, 0.0, 1.0));
}

namespace {

EnvelopeCorner envelope_corner(const design::Design& d, const converter::Corner& k,
                               double winding) {
    EnvelopeCorner e{
        k.name,    k.vin,     k.point.v0, k.point.r, k.point.current,         k.ambient,
        k.l_scale, k.dcr_max, k.nominal,  k.weight,  average_current_share(d)};
    e.off_share = off_share_with(d, e, winding);
    return e;
}

} // namespace

std::vector<EnvelopeCorner> part_corners(const ScreenContext& c, double tolerance) {
    std::vector<EnvelopeCorner> out;
    for (const auto& k : converter::make_corners(*c.design, tolerance))
        out.push_back(envelope_corner(*c.design, k, c.winding_resistance));
    return out;
}

double winding_resistance_max(const design::Design& d, const parts::InductorModel& m) {
    const double t =
        d.limits.t_inductor_max ? std::min(m.t_max, *d.limits.t_inductor_max) : m.t_max;
    return std::max(0.0, m.dcr(std::max(t, 0.0), true));
}

void set_winding_resistance(ScreenContext& c, double r) {
    c.winding_resistance = std::max(0.0, r);
    for (auto& e : c.corners) e.off_share = off_share_with(*c.design, e, c.winding_resistance);
}

ScreenContext make_screen_context(const design::Design& d, const optimisation::SettingRange& r) {
    ScreenContext c;
    c.design = &d;
    c.range = r;
    for (const auto& k : converter::make_corners(d, 0.0)) {
        EnvelopeCorner e = envelope_corner(d, k, c.winding_resistance);
        c.vin_max = std::max(c.vin_max, e.vin);
        c.i_max = std::max(c.i_max, e.current);
        c.corners.push_back(std::move(e));
    }
    c.vin_max = std::max(c.vin_max, d.supply.max);
    const double tc = std::max(0.0, d.sw.on_resistance_tempco);
    c.ron_hot = d.sw.on_resistance * (1.0 + tc * (t_hot - 298.15));
    c.target = loads::target_current(d.load);
    // Pair-independent loss at the nominal corner(s), weighted as the loss objective weighs them:
    // sense resistor I²·Rs (I_rms >= I_avg) and switch conduction D·I²·R_on with D >= Vo/Vin
    // (drops only lengthen the on-time) and R_on at the switch temperature the engine assumes.
    double floor = 0.0, w_sum = 0.0;
    for (const auto& k : c.corners) {
        if (!k.nominal || k.vin <= 0.0) continue;
        const double w = std::max(0.0, k.weight);
        floor += w * corner_loss_floor(c, k);
        w_sum += w;
    }
    c.loss_floor = w_sum > 0.0 ? floor / w_sum : 0.0;
    return c;
}

double corner_loss_floor(const ScreenContext& c, const EnvelopeCorner& k) {
    if (k.vin <= 0.0) return 0.0;
    const auto& d = *c.design;
    const double i = k.current_lb();
    const double duty = k.ideal_duty();
    const double ron = converter::switch_on_resistance(d.sw, k.ambient);
    // I_rms >= I_avg makes the sense term exact; the allowance is for the switch's duty.
    return i * i * (std::max(0.0, d.sense_resistor) + loss_slack * duty * ron);
}

std::vector<ScreenReason> screen_inductor(const ScreenContext& c, const parts::Inductor& l,
                                          const parts::InductorModel& m) {
    std::vector<ScreenReason> out;
    const auto& lim = c.design->limits;
    // A catalog row without a body size holds 0 (unknown): it would pass any height limit, add
    // nothing to the size and have no core to lose power in, so it would win for want of data.
    if (!(l.length > 0.0 && l.width > 0.0 && l.height > 0.0)) {
        out.push_back({"body_size", "", 0.0, 0.0,
                       "the catalog gives no body size (length, width, height), so its size, "
                       "height and core loss are unknown; import it again with them"});
        return out;
    }
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
    const double irms_lb = average_current_share(*c.design) * c.i_max;
    if (irms_lb > l.irms)
        out.push_back({"inductor_rms", "", irms_lb, l.irms,
                       "load current " + fmt(c.i_max, u::Dimension::current) +
                           " exceeds the RMS rating " + fmt(l.irms, u::Dimension::current)});

    if (!(m.l0 > 0.0)) return out;
    // Per corner, the inductance lies in l0·scale·[1 - drop, 1] (tolerance, then roll-off down to
    // L(Isat) at most, as a feasible peak stays below Isat).
    const auto corners = part_corners(c, l.tolerance);

    // Regulation: with the switch on, the supply must push the target current through the load,
    // the switch, the sense resistor and the winding. The engine's first pass has the winding at
    // the ambient (its least DCR) and refuses a corner where this voltage is not positive
    // (converter/steady_state.cpp), so such an inductor fails with every diode and setting.
    for (const auto& k : corners) {
        const double r_path = k.r + converter::switch_on_resistance(c.design->sw, k.ambient) +
                              std::max(0.0, c.design->sense_resistor) + m.dcr(k.ambient, k.dcr_max);
        const double needed = k.v0 + r_path * k.current;
        if (k.vin - needed < -1e-9 * k.vin) {
            out.push_back({"regulation", k.name, needed, k.vin,
                           "the supply " + fmt(k.vin, u::Dimension::voltage) + " cannot drive " +
                               fmt(k.current, u::Dimension::current) +
                               " through the load, switch, sense resistor and this winding's " +
                               fmt(m.dcr(k.ambient, k.dcr_max), u::Dimension::resistance) + " (" +
                               fmt(needed, u::Dimension::voltage) + " needed)"});
            break;
        }
    }
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

std::vector<ScreenReason> screen_diode(const ScreenContext& c, const parts::Diode& diode,
                                       const parts::DiodeModel& m) {
    std::vector<ScreenReason> out;
    const auto& lim = c.design->limits;
    if (c.vin_max > lim.vrrm_derating * diode.vrrm)
        out.push_back({"vrrm", "vin-max", c.vin_max, lim.vrrm_derating * diode.vrrm,
                       "reverse voltage " + fmt(c.vin_max, u::Dimension::voltage) + " exceeds " +
                           fmt(lim.vrrm_derating, u::Dimension::ratio) + " of Vrrm " +
                           fmt(diode.vrrm, u::Dimension::voltage)});
    // Average diode current: its share of the period times I (EnvelopeCorner::off_share).
    double id_lb = 0.0;
    std::string at;
    for (const auto& k : c.corners) {
        if (k.vin <= 0.0) continue;
        const double id = k.off_share * k.current_lb();
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
    // Junction temperature from below at every corner (junction_floor): above the limit, no
    // partner can keep this diode within it.
    const double tj_bound = lim.tj_max ? std::min(m.tj_max, *lim.tj_max) : m.tj_max;
    for (const auto& k : c.corners) {
        const double tj = junction_floor(k, m, tj_bound, 30).tj;
        if (tj > tj_bound) {
            out.push_back({"tj_max", k.name, tj, tj_bound,
                           "junction at least " + fmt(tj, u::Dimension::temperature) +
                               " at corner \"" + k.name +
                               "\" (conduction and reverse leakage alone), above the limit " +
                               fmt(tj_bound, u::Dimension::temperature)});
            break;
        }
        if (!junction_can_settle(k, m, tj_bound)) {
            out.push_back({"tj_max", k.name, tj_bound, tj_bound,
                           "at corner \"" + k.name + "\" conduction and reverse leakage at " +
                               fmt(k.vin, u::Dimension::voltage) +
                               " heat the junction faster than it sheds heat at every temperature "
                               "up to the limit " +
                               fmt(tj_bound, u::Dimension::temperature) +
                               ": it runs away or passes the limit with any inductor"});
            break;
        }
    }
    if (lim.height_max && diode.height > *lim.height_max)
        out.push_back({"height_max", "", diode.height, *lim.height_max,
                       "height " + fmt(diode.height, u::Dimension::length) +
                           " is above the limit " + fmt(*lim.height_max, u::Dimension::length)});
    return out;
}

} // namespace coilsieve::studies
