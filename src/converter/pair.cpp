// One inductor-diode pair on a design: every corner, then every limit at every corner as a
// margin (>= 0 holds). Messages are written only for broken limits.

#include "converter/evaluate.hpp"
#include "units/quantity.hpp"

#include <algorithm>
#include <cmath>
#include <string>
#include <string_view>
#include <utility>

namespace coilsieve::converter {

namespace {

using units::Dimension;

std::string fmt(double v, Dimension d) { return units::format(v, d); }

// A value and its limit with enough digits to tell them apart: a broken limit printed as "1.00 MHz
// is above the maximum 1.00 MHz" would contradict itself.
std::pair<std::string, std::string> apart(double value, double bound, Dimension d) {
    for (int sig = 3;; ++sig) {
        std::string a = units::format(value, d, {sig}), b = units::format(bound, d, {sig});
        if (a != b || sig >= 8) return {std::move(a), std::move(b)};
    }
}

std::string at(const std::string& corner) {
    return corner.empty() ? std::string() : " at corner \"" + corner + "\"";
}

class Checker {
public:
    explicit Checker(PairEvaluation& e) : e_(e) {}

    // value <= bound
    template <class Message>
    void upper(std::string_view limit, const SharedName& corner, double value, double bound,
               Message&& message) {
        const double margin = bound != 0.0 ? (bound - value) / std::abs(bound) : bound - value;
        add(limit, corner, value, bound, margin, message);
    }
    // value >= bound
    template <class Message>
    void lower(std::string_view limit, const SharedName& corner, double value, double bound,
               Message&& message) {
        const double margin = bound != 0.0 ? (value - bound) / std::abs(bound) : value - bound;
        add(limit, corner, value, bound, margin, message);
    }
    // value <= bound, a limit no setting can move (a rating or a size)
    template <class Message>
    void fixed_upper(std::string_view limit, const SharedName& corner, double value, double bound,
                     Message&& message) {
        upper(limit, corner, value, bound, message);
        e_.checks.back().fixed = true;
        if (e_.checks.back().margin < 0.0) e_.violations.back().fixed = true;
    }
    template <class Message>
    void add(std::string_view limit, const SharedName& corner, double value, double bound,
             double margin, Message&& message) {
        // Made in place: this runs for every limit at every corner of every evaluation.
        LimitCheck& k = e_.checks.emplace_back();
        k.limit.assign(limit);
        k.corner = corner;
        k.value = std::isfinite(value) ? value : 0.0;
        k.bound = bound;
        k.margin = std::isfinite(margin) ? margin : -1.0;
        if (k.margin < 0.0) {
            k.message = message();
            e_.violations.push_back(k);
        }
    }

private:
    PairEvaluation& e_;
};

std::string name_part(std::string reason, const parts::Inductor& l, const parts::Diode& diode) {
    auto swap = [&](std::string_view from, const std::string& to) {
        const auto pos = reason.find(from);
        if (pos != std::string::npos) reason.replace(pos, from.size(), to);
    };
    swap("of the diode", "of diode \"" + diode.id + "\"");
    swap("of the inductor", "of inductor \"" + l.id + "\"");
    return reason;
}

} // namespace

PreparedPair prepare_pair(const design::Design& d, const parts::Inductor& l,
                          const parts::Diode& diode) {
    return {parts::make_model(l), parts::make_model(diode), make_corners(d, l.tolerance)};
}

PairEvaluation evaluate_pair(const design::Design& d, const parts::Inductor& l,
                             const parts::Diode& diode, const Setting& s) {
    return evaluate_pair(d, l, diode, prepare_pair(d, l, diode), s);
}

PairEvaluation evaluate_pair(const design::Design& d, const parts::Inductor& l,
                             const parts::Diode& diode, const PreparedPair& prepared,
                             const Setting& s) {
    return evaluate_pair(d, l, diode, prepared.inductor, prepared.diode, prepared.corners, s);
}

PairEvaluation evaluate_pair(const design::Design& d, const parts::Inductor& l,
                             const parts::Diode& diode, const parts::InductorModel& lm,
                             const parts::DiodeModel& dm, const std::vector<Corner>& corners,
                             const Setting& s) {
    PairEvaluation e;
    e.corners.reserve(corners.size());
    // One reverse-voltage check, up to thirteen per corner, efficiency, heights and footprint: no
    // regrowth on the optimiser's hot path.
    e.checks.reserve(1 + 13 * corners.size() + 4);
    for (const Corner& c : corners)
        e.corners.push_back(evaluate_corner(d, lm, dm, c, corner_setting(d, c, s)));

    const design::Limits& lim = d.limits;
    Checker check(e);
    const double isat_bound = lim.isat_derating * l.isat;
    const double t_l_bound =
        lim.t_inductor_max ? std::min(lm.t_max, *lim.t_inductor_max) : lm.t_max;
    const double tj_bound = lim.tj_max ? std::min(dm.tj_max, *lim.tj_max) : dm.tj_max;
    const double vr_bound = lim.vrrm_derating * diode.vrrm;
    const double id_bound = lim.diode_current_derating * diode.if_avg;
    // Shorter pulses never reach the states the waveform and loss models assume.
    const double t_on_bound = design::shortest_on_time(d);
    const double t_off_bound = design::shortest_off_time(d);
    auto pulse_source = [&](const std::optional<double>& given, double bound) {
        return given && *given >= bound ? std::string(" (the controller's minimum)")
                                        : std::string(" (the switch's rise plus fall time)");
    };

    // Reverse voltage: once, at the highest supply (it does not depend on the corner's result).
    if (!corners.empty()) {
        const auto worst =
            std::max_element(corners.begin(), corners.end(),
                             [](const Corner& a, const Corner& b) { return a.vin < b.vin; });
        const double vr = worst->vin;
        check.fixed_upper("vrrm", worst->name, vr, vr_bound, [&] {
            return "diode reverse voltage " + fmt(vr, Dimension::voltage) + " exceeds " +
                   fmt(lim.vrrm_derating, Dimension::ratio) + " of its Vrrm (" +
                   fmt(vr_bound, Dimension::voltage) + ")" + at(worst->name);
        });
    }

    for (std::size_t k = 0; k < corners.size(); ++k) {
        const Corner& c = corners[k];
        const CornerResult& r = e.corners[k];
        const SharedName& cn = r.name;
        if (r.status != CornerStatus::ok) {
            const bool regulation = r.status == CornerStatus::no_regulation;
            const std::string_view limit = r.status == CornerStatus::thermal_runaway
                                               ? "thermal_runaway"
                                           : regulation ? "regulation"
                                                        : "convergence";
            const double margin =
                regulation && r.regulation_headroom < 0.0 ? r.regulation_headroom : -1.0;
            check.add(limit, cn, r.regulation_headroom, 0.0, margin,
                      [&] { return name_part(r.reason, l, diode) + at(cn); });
            continue;
        }
        check.lower("regulation", cn, r.regulation_headroom, 0.0,
                    [&] { return "the supply cannot hold the target current" + at(cn); });
        if (lim.load_ripple) {
            const double ripple = r.load_ripple_pp / c.point.current;
            check.upper("load_ripple", cn, ripple, *lim.load_ripple, [&] {
                const auto [v, b] = apart(ripple, *lim.load_ripple, Dimension::ratio);
                return "load ripple " + v + " p-p (" + fmt(r.load_ripple_pp, Dimension::current) +
                       ") exceeds the limit " + b + at(cn);
            });
        }
        // Under PWM the duty is solved for the target: the error is the solver's tolerance, and a
        // constraint that never binds would only steer the tuner.
        if (d.control.mode == design::ControlMode::hysteretic) {
            const double error = std::abs(r.regulation_error);
            check.upper("current_error", cn, error, lim.current_error, [&] {
                const auto [v, b] = apart(error, lim.current_error, Dimension::ratio);
                return "average load current " + fmt(r.load_i_avg, Dimension::current) + " is " +
                       v + (r.regulation_error < 0.0 ? " below" : " above") + " its target " +
                       fmt(c.point.current, Dimension::current) + ", more than the limit " + b +
                       at(cn);
            });
        }
        check.lower("f_sw_min", cn, r.f_sw, lim.f_sw_min, [&] {
            const auto [v, b] = apart(r.f_sw, lim.f_sw_min, Dimension::frequency);
            return "switching frequency " + v + " is below the minimum " + b + at(cn);
        });
        if (lim.f_sw_max)
            check.upper("f_sw_max", cn, r.f_sw, *lim.f_sw_max, [&] {
                const auto [v, b] = apart(r.f_sw, *lim.f_sw_max, Dimension::frequency);
                return "switching frequency " + v + " is above the maximum " + b + at(cn);
            });
        // Above its self-resonant frequency the part is a capacitor, not an inductor: a floor for
        // the switching frequency, not a design margin (the ripple's harmonics reach higher).
        if (l.srf && *l.srf > 0.0)
            check.upper("srf", cn, r.f_sw, *l.srf, [&] {
                const auto [v, b] = apart(r.f_sw, *l.srf, Dimension::frequency);
                return "switching frequency " + v +
                       " is above the inductor's self-resonant "
                       "frequency " +
                       b + ", where it stops being an inductor" + at(cn);
            });
        if (t_on_bound > 0.0)
            check.lower("t_on_min", cn, r.t_on, t_on_bound, [&] {
                const auto [v, b] = apart(r.t_on, t_on_bound, Dimension::time);
                return "switch on-time " + v + " is below the minimum " + b +
                       pulse_source(lim.t_on_min, t_on_bound) + at(cn);
            });
        if (t_off_bound > 0.0 && r.f_sw > 0.0) {
            const double t_off = 1.0 / r.f_sw - r.t_on; // the switch's, DCM idle time included
            check.lower("t_off_min", cn, t_off, t_off_bound, [&] {
                const auto [v, b] = apart(t_off, t_off_bound, Dimension::time);
                return "switch off-time " + v + " is below the minimum " + b +
                       pulse_source(lim.t_off_min, t_off_bound) + at(cn);
            });
        }
        check.upper("isat", cn, r.il_peak, isat_bound, [&] {
            const auto [v, b] = apart(r.il_peak, isat_bound, Dimension::current);
            return "peak inductor current " + v + " exceeds " +
                   fmt(lim.isat_derating, Dimension::ratio) + " of Isat (" + b + ")" + at(cn);
        });
        check.upper("inductor_rms", cn, r.il_rms, l.irms, [&] {
            const auto [v, b] = apart(r.il_rms, l.irms, Dimension::current);
            return "inductor RMS current " + v + " exceeds its rating " + b + at(cn);
        });
        check.upper("t_inductor", cn, r.t_inductor, t_l_bound, [&] {
            const auto [v, b] = apart(r.t_inductor, t_l_bound, Dimension::temperature);
            return "inductor hot spot " + v + " exceeds " + b + at(cn);
        });
        if (diode.if_avg > 0.0)
            check.upper("diode_current", cn, r.id_avg, id_bound, [&] {
                const auto [v, b] = apart(r.id_avg, id_bound, Dimension::current);
                return "diode average current " + v + " exceeds " +
                       fmt(lim.diode_current_derating, Dimension::ratio) + " of its rating (" + b +
                       ")" + at(cn);
            });
        check.upper("tj_max", cn, r.tj_diode, tj_bound, [&] {
            const auto [v, b] = apart(r.tj_diode, tj_bound, Dimension::temperature);
            return "diode junction " + v + " exceeds " + b + at(cn);
        });
    }

    // Nominal figures: the nominal corner, or the time-weighted charge profile.
    double w_sum = 0.0, loss = 0.0, p_out = 0.0;
    const Corner* nominal = nullptr;
    int nominal_count = 0;
    for (std::size_t k = 0; k < corners.size(); ++k) {
        if (!corners[k].nominal) continue;
        ++nominal_count;
        nominal = &corners[k];
        const CornerResult& r = e.corners[k];
        if (r.status != CornerStatus::ok) continue; // already a violation; leave it out of the sums
        const double w = corners[k].weight > 0.0 ? corners[k].weight : 0.0;
        w_sum += w;
        loss += w * r.losses.total;
        p_out += w * r.p_out;
    }
    if (w_sum > 0.0) {
        e.loss_nominal = loss / w_sum;
        e.efficiency_nominal = p_out + loss > 0.0 ? p_out / (p_out + loss) : 0.0;
    }
    if (lim.efficiency_min) {
        const SharedName nominal_name = nominal_count > 1
                                            ? SharedName("charge profile (time-weighted)")
                                        : nominal != nullptr ? nominal->name
                                                             : SharedName();
        check.lower("efficiency_min", nominal_name, e.efficiency_nominal, *lim.efficiency_min, [&] {
            const auto [v, b] = apart(e.efficiency_nominal, *lim.efficiency_min, Dimension::ratio);
            return "efficiency " + v + " is below the minimum " + b + at(nominal_name);
        });
    }
    if (lim.height_max) {
        check.fixed_upper("height_max", {}, l.height, *lim.height_max, [&] {
            return "inductor \"" + l.id + "\" is " + fmt(l.height, Dimension::length) +
                   " high, above the limit " + fmt(*lim.height_max, Dimension::length);
        });
        check.fixed_upper("height_max", {}, diode.height, *lim.height_max, [&] {
            return "diode \"" + diode.id + "\" is " + fmt(diode.height, Dimension::length) +
                   " high, above the limit " + fmt(*lim.height_max, Dimension::length);
        });
    }
    if (lim.footprint_max) {
        const double area = l.footprint() + diode.footprint();
        check.fixed_upper("footprint_max", {}, area, *lim.footprint_max, [&] {
            return "the two parts take " + fmt(area, Dimension::area) +
                   " of board, above the limit " + fmt(*lim.footprint_max, Dimension::area);
        });
    }

    e.feasible = e.violations.empty();
    return e;
}

} // namespace coilsieve::converter
