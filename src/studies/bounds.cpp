#include "studies/bounds.hpp"

#include "converter/evaluate.hpp"
#include "converter/segment.hpp"
#include "units/quantity.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <numbers>
#include <numeric>
#include <queue>
#include <string>
#include <vector>

namespace coilsieve::studies {

namespace {

namespace u = coilsieve::units;

constexpr int first_intervals = 12;       // initial split of the setting range
constexpr int max_refinements = 40;       // interval halvings around the minimum
constexpr int edge_refinements = 6;       // halvings of a stretch at the edge of the window
constexpr double refine_tolerance = 2e-4; // stop when the bound can rise no more than this (score)
// Halvings of a stretch when a probe's score caps where the tuned setting can lie: the score
// varies across a stretch by more than the bound's own slack, so finer parts exclude more. Three
// (eight parts) is a measured choice: with the tuned score as the cap, eight parts showed 82 % of
// the lamp's Pareto-phase pairs dominated where whole stretches showed 22 %.
constexpr int probe_halvings = 3;

// A diode's forward laws at an ambient, 1 K below it and at its junction limit: what the pair
// bounds take its drop from (InductorBounder::drop_max, drop_min).
DiodeBound::AmbientLaws ambient_laws(const parts::DiodeModel& m, double ambient, double tj_bound) {
    return {ambient, m.forward_at(ambient), m.forward_at(ambient - 1.0),
            m.forward_at(std::max(ambient, tj_bound))};
}

// What an inductor brings to every corner, independent of the setting.
struct CornerParts {
    const EnvelopeCorner* k = nullptr;
    double l_hi = 0.0;     // H: largest inductance (no roll-off)
    double r_on_ub = 0.0;  // Ω: switch + sense + hot DCR, the on-path resistance at most
    double r_off_ub = 0.0; // Ω: sense + hot DCR, the off-path resistance at most
    double r_off_lb = 0.0; // Ω: sense + DCR at the ambient, the off-path resistance at least
    double r_on_lb = 0.0;  // Ω: switch (as the engine takes it) + sense + DCR at the ambient
    double ron = 0.0;      // Ω: the switch's on-resistance as the engine takes it
    double l_lo_cap = 0.0; // H: inductance at the Isat limit
    bool capacitor = false;
    double cap = 0.0, esr = 0.0; // F, Ω of the output capacitor when it takes ripple
    double off_own = 0.0;        // the diode's charge share with this winding (off_share_with)
    double drop_at_cap = 0.0;    // drop_max at the saturation ceiling, where every stretch starts
    // With a diode: its forward laws at the ambient, 1 K below it and at the junction limit.
    DiodeBound::AmbientLaws vf;
    // With the diode's bound: its heating balance at this corner's operating point (the first
    // DiodeBound::nominal entry there, if any) and the least settling shares of the
    // DiodeBound::settling entries there, at the corner's leakage and at each leak level.
    const JunctionBalance* balance = nullptr;
    bool settles = false;
    double settle_share = 1.0;
    std::array<double, DiodeBound::leak_levels.size()> settle_with_leak{};
};

// Bounds of the figures over a setting interval [x1, x2] (a degenerate one gives a point value).
struct Interval {
    double x1 = 0.0, x2 = 0.0;
    bool feasible = true;
    std::string_view closed_by; // the first limit it cannot meet (a literal limit name)
    double score = 0.0;
    double loss = 0.0;       // nominal, inductor copper + core + switch transitions
    double ripple = 0.0;     // worst corner, fraction
    double peak_ratio = 0.0; // worst corner, peak / Isat
    double f_nominal = 0.0;  // Hz, nominal (weighted) frequency at least
    double f_valley_v = 0.0; // nominal (weighted) f·i_valley·Vin at least
};

class InductorBounder {
public:
    // `corners`: part_corners(c, l.tolerance), outliving the bounder.
    InductorBounder(const ScreenContext& c, const parts::Inductor& l, const parts::InductorModel& m,
                    const optimisation::Scales& s, const std::vector<EnvelopeCorner>& corners,
                    const parts::DiodeModel* diode = nullptr,
                    const DiodeBound* diode_bound = nullptr)
        : c_(c), d_(*c.design), l_(l), m_(m), s_(s), diode_(diode), diode_bound_(diode_bound),
          corners_(corners) {
        if (diode_ != nullptr) {
            const auto& lim = d_.limits;
            tj_bound_ = lim.tj_max ? std::min(diode_->tj_max, *lim.tj_max) : diode_->tj_max;
        }
        const auto& lim = d_.limits;
        peak_cap_ = lim.isat_derating * m.isat;
        t_l_bound_ = lim.t_inductor_max ? std::min(m.t_max, *lim.t_inductor_max) : m.t_max;
        dcr_ub_ = winding_resistance_max(d_, m); // at t_l_bound_, maximum DCR
        const double dcr_ub = dcr_ub_;
        const double cap = d_.output_capacitor ? d_.output_capacitor->capacitance : 0.0;
        for (const auto& k : corners_) {
            CornerParts p;
            p.k = &k;
            p.l_hi = m.l0 * k.l_scale;
            p.l_lo_cap = m.inductance(std::max(0.0, peak_cap_), k.l_scale);
            const double ron = converter::switch_on_resistance(d_.sw, k.ambient);
            const double rs = std::max(0.0, d_.sense_resistor);
            p.r_on_ub = ron + rs + dcr_ub;
            p.r_off_ub = rs + dcr_ub;
            p.r_off_lb = rs + std::max(0.0, m.dcr(k.ambient, false));
            p.r_on_lb = ron + p.r_off_lb;
            p.ron = ron;
            p.capacitor = cap > 0.0 && k.r > 0.0;
            p.cap = cap;
            p.esr = d_.output_capacitor ? std::max(0.0, d_.output_capacitor->esr) : 0.0;
            p.off_own = off_share_with(d_, k, dcr_ub_);
            if (diode_ != nullptr) {
                const DiodeBound::AmbientLaws* made = nullptr;
                if (diode_bound_ != nullptr) // the same model's (diode_bound)
                    for (const auto& x : diode_bound_->laws)
                        if (x.ambient == k.ambient) {
                            made = &x;
                            break;
                        }
                p.vf = made != nullptr ? *made : ambient_laws(*diode_, k.ambient, tj_bound_);
            }
            p.drop_at_cap = drop_max(std::max(0.0, peak_cap_), p);
            if (diode_bound_ != nullptr) {
                const OperatingPoint op = operating_point(k);
                for (const auto& b : diode_bound_->nominal)
                    if (b.point() == op) {
                        p.balance = &b;
                        break;
                    }
                for (const auto& st : diode_bound_->settling) {
                    if (st.point != op) continue;
                    if (!p.settles) {
                        p.settles = true;
                        p.settle_share = st.share;
                        p.settle_with_leak = st.share_with_leak;
                        continue;
                    }
                    p.settle_share = std::min(p.settle_share, st.share);
                    for (std::size_t i = 0; i < DiodeBound::leak_levels.size(); ++i)
                        p.settle_with_leak[i] =
                            std::min(p.settle_with_leak[i], st.share_with_leak[i]);
                }
            }
            parts_.push_back(p);
        }
    }

    // The diode's forward drop at current i at most, over the junction temperatures a feasible
    // pair can have (ambient to the junction limit); the generous allowance without a diode.
    // V_f is concave in temperature (screen.hpp), so it lies below its tangent at the ambient,
    // whose slope is at most the backward difference there.
    double drop_max(double i, const CornerParts& p) const {
        if (diode_ == nullptr) return diode_drop_max;
        const double v = p.vf.at.vf(i);
        const double slope = std::max(0.0, v - p.vf.below.vf(i));
        return std::min(diode_drop_max, v + slope * std::max(0.0, tj_bound_ - p.k->ambient));
    }

    // The least forward drop at current i a pair's diode can have (0 without a diode): V_f rises
    // with the current and is concave in temperature, so over [ambient, junction limit] its
    // least value is at an end.
    double drop_min(double i, const CornerParts& p) const {
        if (diode_ == nullptr || !(i > 0.0)) return 0.0;
        return std::max(0.0, std::min(p.vf.at.vf(i), p.vf.limit.vf(i)));
    }

    // With a diode and CCM certain (the valley above zero), the diode conducts for the whole off
    // interval, and volt-second balance gives t_off/T = V_on/(V_on + V_off) >= von_lb/(von_lb +
    // voff_ub) (Erickson & Maksimović 2nd ed. ch. 2). Its mean current there, `mean_off`, may be
    // above the current the junction tables take: V_f·i is convex and V_f rises with i, so
    // the conduction loss is at least V_f(I_k)·mean_off, which the tables give as a share of the
    // period scaled by mean_off/I_k. What this adds to the diode's heating floor, which assumes
    // only EnvelopeCorner::off_share at I_k (diode_bound): the same junction balance. That share
    // takes the largest winding of the inductors paired; this pair's own winding gives at least
    // off_share_with its DCR, CCM certain or not.
    double diode_excess(const CornerParts& p, double valley_lb, double von_lb, double voff_ub,
                        double mean_off) const {
        const EnvelopeCorner& k = *p.k;
        if (diode_ == nullptr || diode_bound_ == nullptr || k.vin <= 0.0 || k.current <= 0.0)
            return 0.0;
        double off = p.off_own;
        if (valley_lb > 0.0 && von_lb > 0.0)
            off = std::max(off,
                           von_lb / (von_lb + voff_ub) * std::max(1.0, mean_off / k.current_lb()));
        const double floor_off = k.off_share;
        if (!(off > floor_off) || p.balance == nullptr) return 0.0;
        return std::max(0.0, p.balance->least_heating(off) - p.balance->least_heating(floor_off));
    }

    double value_at(double u) const {
        const auto& r = c_.range;
        u = std::clamp(u, 0.0, 1.0);
        if (r.log_scale && r.lo > 0.0) return r.lo * std::pow(r.hi / r.lo, u);
        return r.lo + (r.hi - r.lo) * u;
    }

    Interval evaluate(double x1, double x2) const {
        Interval iv;
        iv.x1 = x1;
        iv.x2 = x2;
        const auto& lim = d_.limits;
        const auto& sw = d_.sw;
        const double td = std::max(0.0, d_.control.delay);
        double loss_sum = 0.0, f_sum = 0.0, fv_sum = 0.0, w_sum = 0.0;
        auto close = [&](const char* limit) {
            if (iv.feasible) iv.closed_by = limit;
            iv.feasible = false;
        };
        for (const auto& p : parts_) {
            const EnvelopeCorner& k = *p.k;
            const double i_target = k.current;
            if (!(i_target > 0.0) || !(k.vin > 0.0)) continue;
            // Ceilings first: the peak, then the voltages it implies. L(i) falls with |i|, so along
            // a ramp L >= L(peak) >= L(peak ceiling); two passes tighten the pair.
            // The load's voltage v0 + r·i_load. With a capacitor across the load, i_load is the
            // inductor current filtered, and a feasible pair keeps its peak-to-peak within the
            // load-ripple limit around the mean: i_load lies within mean ± limit·I (the engine's
            // swing r_ripple·(i − I) is at most r times the load's share of it). Without one it
            // is the inductor current itself.
            double load_lo = 0.0, load_hi = INFINITY;
            if (p.capacitor && lim.load_ripple) {
                load_lo = std::max(0.0, k.current_lb() - *lim.load_ripple * i_target);
                load_hi = k.current_ub() + *lim.load_ripple * i_target;
            }
            auto vload_lb = [&](double i) { return k.v0 + k.r * std::max(i, load_lo); };
            auto vload_ub = [&](double i) { return k.v0 + k.r * std::min(i, load_hi); };
            const double von_ub = std::max(0.0, k.vin - vload_lb(0.0));
            // Time per henry of an on-ramp from i1 to i2 and an off-ramp from i3 to i4, ∫di/|v|,
            // with each ramp's voltage a line in the current: V_in − load − r_on·i on the way up,
            // load + drop + r_off·i on the way down, where the load is the load's own line
            // without a capacitor and the given voltage with one (converter::time_between on
            // 1 H segments; infinite where a ramp cannot go on).
            auto ramps_time = [&](double load_on, double r_on, double i1, double i2,
                                  double load_off, double drop, double r_off, double i3,
                                  double i4) {
                const bool cap = p.capacitor;
                const converter::Segment on{k.vin - (cap ? load_on : k.v0),
                                            (cap ? 0.0 : k.r) + r_on, 1.0};
                const converter::Segment off{-((cap ? load_off : k.v0) + drop),
                                             (cap ? 0.0 : k.r) + r_off, 1.0};
                return converter::time_between(on, i1, i2) + converter::time_between(off, i3, i4);
            };
            double b1 = 0.0, b2 = 0.0;
            double peak_ub = std::max(0.0, peak_cap_);
            double l_lo = p.l_lo_cap;
            double voff_ub = 0.0;
            if (hysteretic(c_)) {
                b1 = band_at(c_, k, x1);
                b2 = band_at(c_, k, x2);
            }
            // drop_max at the last current asked (each costs two logarithms).
            double drop_i = std::max(0.0, peak_cap_), drop_v = p.drop_at_cap;
            auto drop_at = [&](double i) {
                if (i != drop_i) {
                    drop_i = i;
                    drop_v = drop_max(i, p);
                }
                return drop_v;
            };
            for (int pass = 0; pass < 2; ++pass) {
                if (hysteretic(c_)) {
                    peak_ub = std::min(peak_ub, i_target + b2 / 2.0 + td * von_ub / l_lo);
                } else {
                    // PWM: ΔI <= T·g_ub/L_lo (the flux swing, as below); in CCM the valley is
                    // below the mean, and in DCM the charge I·T >= L_lo·peak²/(2·g_ub) gives
                    // peak <= sqrt(2·I·ΔI) <= I + ΔI: either way peak <= I + ΔI.
                    const double voff = vload_ub(peak_ub) + drop_at(peak_ub) + peak_ub * p.r_off_ub;
                    peak_ub = std::min(peak_ub, k.current_ub() +
                                                    volt_second_rate(von_ub, voff) / (l_lo * x1));
                }
                l_lo = std::max(l_lo, m_.inductance(peak_ub, k.l_scale));
            }
            const double drop_peak = drop_at(peak_ub);
            voff_ub = vload_ub(peak_ub) + drop_peak + peak_ub * p.r_off_ub;
            const double von_lb = std::max(0.0, k.vin - vload_ub(peak_ub) - peak_ub * p.r_on_ub);
            const double g_ub = volt_second_rate(von_ub, voff_ub);

            double i_lb = 0.0, i_ub = 0.0, peak_lb = 0.0, valley_lb = 0.0;
            double di_lb = 0.0, f_lb = 0.0, f_ub = INFINITY;
            bool dcm_certain = false; // the valley cannot stay above zero
            // Over each ramp: the off-voltage at least, the on-voltage at most, L at most.
            double voff_least = 0.0, von_most = 0.0, l_top = 0.0;
            double triangle_share = 0.0; // PWM: an ideal triangle's load p-p per A of ΔI (CCM)
            double shape_slack = ramp_shape_slack; // PWM in CCM: for the ramps' curvature
            if (hysteretic(c_)) {
                // The comparator trips at I ± b/2; the switch follows t_d later, so the peak is
                // i_hi + ∫v_on/L over t_d and the valley i_lo − ∫v_off/L (clamped at zero, DCM).
                const double valley_min = i_target - b2 / 2.0 - td * voff_ub / l_lo;
                valley_lb = std::max(0.0, valley_min);
                // Along the cycle the current stays above the valley, so L <= L(valley).
                const double l_hi = m_.inductance(valley_lb, k.l_scale);
                // V_off = v0 + (r + R_s + DCR)·i + V_f(i) >= its value at the valley (V_f with this
                // pair's diode, else 0).
                const double drop_valley = drop_min(valley_lb, p);
                const double voff_lb =
                    std::max(0.0, vload_lb(valley_lb) + valley_lb * p.r_off_lb + drop_valley);
                const double g_lb = volt_second_rate(von_lb, voff_lb);
                peak_lb = i_target + b1 / 2.0 + td * von_lb / l_hi;
                di_lb = std::min(b1 + td * (von_lb + voff_lb) / l_hi, peak_lb);
                // The on-voltage falls with the current: over the whole on-ramp it is at most its
                // value at the valley; over the overshoot past I + b/2 the series drop is at least
                // that current's (the load's own drop only the valley's: a capacitor carries the
                // ripple).
                const double von_ub_ramp =
                    std::max(0.0, k.vin - vload_lb(valley_lb) - valley_lb * p.r_on_lb);
                const double von_ub_over =
                    std::max(0.0, k.vin - vload_lb(valley_lb) - (i_target + b1 / 2.0) * p.r_on_lb);
                const double di_ub = b2 + td * (von_ub_over + voff_ub) / l_lo;
                // t_on + t_off <= L_hi·ΔI·(1/Von_min + 1/Voff_min); DCM adds a rest of at most t_d.
                // Tighter: along each ramp the voltage is at least a line in the current (the
                // load's own drop without a capacitor, its extreme with one, plus the series
                // drops), so a ramp takes at most L_hi·∫di/v over the widest span it can have:
                // ending at the peak ceiling on the way up (1/v_on rises with i), starting at the
                // valley floor on the way down (1/v_off falls with i).
                double t_ramps = g_lb > 0.0 ? di_ub / g_lb : INFINITY;
                if (di_ub > 0.0)
                    t_ramps =
                        std::min(t_ramps, ramps_time(vload_ub(peak_ub), p.r_on_ub, peak_ub - di_ub,
                                                     peak_ub, vload_lb(valley_lb), drop_valley,
                                                     p.r_off_lb, valley_lb + di_ub, valley_lb));
                if (t_ramps > 0.0 && std::isfinite(t_ramps))
                    f_lb = 1.0 / (l_hi * t_ramps + (valley_min < 0.0 ? td : 0.0));
                voff_least = voff_lb;
                von_most = von_ub_ramp;
                l_top = l_hi;
                const double g_ub_ramp = volt_second_rate(von_ub_ramp, voff_ub);
                if (di_lb > 0.0 && g_ub_ramp > 0.0) f_ub = g_ub_ramp / (l_lo * di_lb);
                // Tighter, as for the floor: along each ramp the voltage is at most a line in
                // the current, so a ramp takes at least L_lo·∫di/v over the narrowest span it
                // can have: starting at the valley floor on the way up (1/v_on rises with i),
                // ending at the peak ceiling on the way down (1/v_off falls with i).
                if (di_lb > 0.0) {
                    const double t_least = ramps_time(
                        vload_lb(valley_lb), p.r_on_lb, valley_lb, valley_lb + di_lb,
                        vload_ub(peak_ub), drop_peak, p.r_off_ub, peak_ub, peak_ub - di_lb);
                    if (t_least > 0.0 && std::isfinite(t_least))
                        f_ub = std::min(f_ub, 1.0 / (l_lo * t_least));
                }
                // In CCM the duty follows from flux balance between the ramps' voltage extremes
                // (the delay lengthens both ramps, not the balance); as under PWM below, the
                // least of the triangle's ripple at the range's ends stands for its least.
                if (p.capacitor && von_lb > 0.0 && voff_lb > 0.0 && std::isfinite(f_ub)) {
                    const double d_lo = voff_lb / (von_ub + voff_lb);
                    const double d_hi = voff_ub / (von_lb + voff_ub);
                    if (d_lo > 0.0 && d_hi < 1.0)
                        triangle_share =
                            (d_hi - d_lo <= duty_ends_width ? duty_ends_slack : ramp_shape_slack) *
                            std::min(
                                converter::triangle_load_ripple(k.r, p.cap, p.esr, f_ub, d_lo),
                                converter::triangle_load_ripple(k.r, p.cap, p.esr, f_ub, d_hi));
                }
                // The limit on the current's error holds for a feasible pair.
                i_lb = k.current_lb();
                i_ub = k.current_ub();
                // In CCM each ramp is monotone with time density dt/di = L(i)/|v_L(i)| within
                // known limits, so its mean is at least valley + h·ΔI (ramp_mean_share); the
                // cycle's mean is a blend of its two ramps' means.
                if (valley_min > 0.0 && von_ub > 0.0 && voff_ub > 0.0 && l_hi > 0.0) {
                    const double r_on = l_lo * von_lb / (l_hi * von_ub);
                    const double r_off = l_lo * voff_lb / (l_hi * voff_ub);
                    const double h = ramp_mean_share(std::min(r_on, r_off));
                    i_lb = std::max(i_lb, (1.0 - h) * valley_lb + h * peak_lb);
                    // Mirrored, the mean is at most peak − h·ΔI: the ripple objective's divisor
                    // (the load's mean) from above without the current allowance.
                    if (peak_ub - h * di_lb > 0.0) i_ub = std::min(i_ub, peak_ub - h * di_lb);
                }
            } else {
                // PWM: the flux swing per cycle is T·g(Von, Voff) in CCM (volt-second balance,
                // Erickson & Maksimović 2nd ed. ch. 2) and ΔI >= ΔΨ/L_hi. In DCM the flux balance
                // still holds and the charge I·T = ∫i·L(1/Von + 1/Voff) di <= L_hi·ΔI²/(2g), so
                // ΔI >= sqrt(2·I·g·T/L_hi) (ibid. ch. 5).
                i_lb = k.current_lb();
                i_ub = k.current_ub();
                const double di_ub = g_ub / (l_lo * x1);
                valley_lb = std::max(0.0, i_lb - di_ub);
                const double g_lb = volt_second_rate(von_lb, std::max(0.0, vload_lb(0.0)));
                const double di_ccm = g_lb / (p.l_hi * x2);
                di_lb = std::min(di_ccm, std::sqrt(2.0 * i_lb * di_ccm));
                dcm_certain = di_ccm > 2.0 * i_ub;
                // The off-voltage never falls below its value at the valley, the on-voltage
                // never rises above it.
                double voff_i = -1.0, voff_v = 0.0; // the last asked (two logarithms each)
                auto voff_at = [&](double valley) {
                    if (valley != voff_i) {
                        voff_i = valley;
                        voff_v = vload_lb(valley) + valley * p.r_off_lb + drop_min(valley, p);
                    }
                    return voff_v;
                };
                auto von_at = [&](double valley) {
                    return std::max(0.0, k.vin - vload_lb(valley) - valley * p.r_on_lb);
                };
                // In CCM the mean is at most valley + (1 − h)·ΔI (ramp_mean_share, the bound's
                // other side), so the valley is at least I − (1 − h)·ΔI_max, with h from the
                // ramps' voltage and inductance ranges at the valley found so far.
                double h = 0.0;
                if (valley_lb > 0.0 && von_ub > 0.0 && voff_ub > 0.0) {
                    h = ramp_mean_share(std::min(l_lo * von_lb / (p.l_hi * von_at(valley_lb)),
                                                 l_lo * voff_at(valley_lb) / (p.l_hi * voff_ub)));
                    valley_lb = std::max(valley_lb, i_lb - (1.0 - h) * di_ub);
                }
                const double voff_valley = voff_at(valley_lb);
                // CCM certain: the current stays above the valley, so L(i) <= L(valley) along the
                // cycle and ΔI >= ΔΨ/L(valley).
                const double l_valley = valley_lb > 0.0
                                            ? std::min(p.l_hi, m_.inductance(valley_lb, k.l_scale))
                                            : p.l_hi;
                if (valley_lb > 0.0)
                    di_lb =
                        std::max(di_lb, volt_second_rate(von_lb, voff_valley) / (l_valley * x2));
                voff_least = voff_valley;
                von_most = von_at(valley_lb);
                l_top = p.l_hi;
                // In CCM the duty follows from flux balance, V_on·D = V_off·(1 − D), between its
                // extremes; the capacitor's divider passes the least of the triangle's ripple
                // there at the highest frequency (triangle_load_ripple falls with f). The range
                // is narrow (at most 0.058 wide over the example charger's pairs) and the
                // function nearly linear over it, so the least of its ends stands for its least
                // within duty_ends_slack for ranges up to duty_ends_width (tested), within
                // ramp_shape_slack beyond.
                if (p.capacitor && von_lb > 0.0) {
                    const double d_lo = voff_valley / (von_ub + voff_valley);
                    const double d_hi = voff_ub / (von_lb + voff_ub);
                    if (d_lo > 0.0 && d_hi < 1.0) {
                        triangle_share =
                            std::min(converter::triangle_load_ripple(k.r, p.cap, p.esr, x2, d_lo),
                                     converter::triangle_load_ripple(k.r, p.cap, p.esr, x2, d_hi));
                        // The longer ramp's R·t/L at most: the lowest frequency, the least L.
                        shape_slack =
                            (d_hi - d_lo <= duty_ends_width ? duty_ends_slack : ramp_shape_slack) *
                            curved_ramp_slack((p.r_on_ub + k.r) * std::max(d_hi, 1.0 - d_lo) /
                                              (x1 * l_lo));
                    }
                }
                // The mean of near-linear ramps sits mid-way between valley and peak (CCM), and
                // below peak/2 in DCM, so peak >= I + ΔI/2; curved_peak_slack allows for the
                // curvature of R–L ramps, with R·T/L at most at the lowest frequency and least L.
                // With CCM certain the mean is at most peak − h·ΔI, so peak >= I + h·ΔI without
                // an allowance.
                peak_lb =
                    valley_lb > 0.0
                        ? i_lb + h * di_lb
                        : i_lb + 0.5 * curved_peak_slack((p.r_on_ub + k.r) / (x1 * l_lo)) * di_lb;
                f_lb = x1;
                f_ub = x2;
            }
            // With CCM certain each ramp runs from the valley to the peak with a time density
            // dt/di = L(i)/|v_L(i)| whose least over its largest is at least r (as for
            // ramp_mean_share). A density at least r times its mean over a range of width ΔI
            // gives the current a variance of at least r·ΔI²/12 (the uniform one's ΔI²/12,
            // scaled), for each ramp and for the cycle (whose density ratio is at least the
            // smaller of the two).
            const bool ramps_known = valley_lb > 0.0 && von_lb > 0.0 && voff_least > 0.0 &&
                                     von_most > 0.0 && l_top > 0.0;
            const double r_on = ramps_known ? l_lo * von_lb / (l_top * von_most) : 0.0;
            const double r_off = ramps_known ? l_lo * voff_least / (l_top * voff_ub) : 0.0;
            const double spread = di_lb * di_lb / 12.0; // a uniform ramp's variance
            const double var_cycle = std::min(r_on, r_off) * spread;

            // Limits any feasible pair meets at every corner.
            if (peak_lb > peak_cap_) close("isat");
            if (lim.f_sw_max && f_lb > *lim.f_sw_max) close("f_sw_max");
            if (f_ub < lim.f_sw_min) close("f_sw_min");
            // Load ripple with a capacitor, as the engine takes it (converter/steady_state.cpp):
            // - PWM in DCM: share(f)·ΔI, the divider's share at the switching frequency, and
            //   share falls with f, so share(f_ub)·ΔI;
            // - hysteretic: the ideal triangle's ripple through the divider in CCM, share(f)·ΔI
            //   in DCM: the smaller of the two where CCM is not certain;
            // - PWM in CCM: the two-state solution. Any waveform's p-p is at least π/2 times its
            //   fundamental (the square wave is the extreme), and a triangle's fundamental is at
            //   least ΔI/π, so p-p >= share(f_ub)·ΔI/2; tighter, the ideal triangle's own ripple
            //   through the divider, with curved_ramp_slack for curved ramps;
            // - PWM, CCM not certain: the smaller of the two.
            double load_share = 1.0;
            if (p.capacitor) {
                const double share = converter::load_ripple_share(k.r, p.cap, p.esr, f_ub);
                const double ccm = std::max(0.5 * share, shape_slack * triangle_share);
                if (hysteretic(c_)) // its allowance is in triangle_share
                    load_share = valley_lb > 0.0 ? triangle_share : std::min(share, triangle_share);
                else if (dcm_certain) load_share = share;
                else load_share = valley_lb > 0.0 ? ccm : std::min(share, ccm);
            }
            const double load_di = load_share * di_lb;
            if (lim.load_ripple && load_di / i_target > *lim.load_ripple) close("load_ripple");
            iv.ripple = std::max(iv.ripple, load_di / i_ub);
            if (m_.isat > 0.0) iv.peak_ratio = std::max(iv.peak_ratio, peak_lb / m_.isat);

            // Inductor heating (T_L = T_a + R_th·(copper + core), as the engine has it) from below:
            // each pass of the map from the ambient stays below its fixed point.
            const double core = m_.core_loss_least(di_lb, f_lb);
            double t_l = k.ambient, copper = 0.0;
            for (int pass = 0; pass < 3; ++pass) {
                // I_rms² = I² + variance, and the engine's ripple sees R_ac >= DCR.
                copper = (i_lb * i_lb + var_cycle) * m_.dcr(t_l, k.dcr_max);
                t_l = k.ambient + m_.rth * (copper + core);
            }
            if (t_l > t_l_bound_) close("t_inductor");
            // With CCM certain the diode conducts for at least the volt-second share of the
            // period; beyond the largest share its junction can balance at, it cannot. The
            // balance heats that share at the corner's least current; the off-ramp's mean
            // current, where it is higher, heats it more (V_f·i is convex in i, so the mean of
            // V_f·i is at least V_f(ī)·ī, and V_f rises with i): the share scaled by their ratio.
            if (diode_bound_ != nullptr && valley_lb > 0.0 && von_lb > 0.0) {
                const double off = von_lb / (von_lb + voff_ub);
                // The off-ramp's least mean current, valley + h·ΔI (ramp_mean_share).
                double mean_off = 0.0;
                double heating_share = off, leak_scale = 1.0;
                if (ramps_known) {
                    const double h = ramp_mean_share(r_off);
                    mean_off = (1.0 - h) * valley_lb + h * peak_lb;
                    heating_share *= std::max(1.0, mean_off / k.current_lb());
                    // Its leakage heats over the switch's on share, at least the volt-second
                    // duty, where the balance took the corner's ideal duty.
                    if (const double ideal = k.ideal_duty(); ideal > 0.0)
                        leak_scale = voff_least / (voff_least + von_most) / ideal;
                }
                if (p.settles) {
                    double share = p.settle_share; // more leakage balances at no larger a share
                    for (std::size_t i = 0; i < DiodeBound::leak_levels.size(); ++i)
                        if (DiodeBound::leak_levels[i] <= leak_scale) share = p.settle_with_leak[i];
                    if (heating_share > share) close("tj_max");
                }
                // Its average current is that share times the off-ramp's mean.
                if (ramps_known && off * mean_off > diode_bound_->current_max)
                    close("diode_current");
            }
            if (!k.nominal) continue;
            // Switch transitions (Mohan, Undeland, Robbins 3rd ed. §2-7), gate and C_oss.
            const double e_sw = 0.5 * k.vin * (valley_lb * sw.rise_time + peak_lb * sw.fall_time) +
                                sw.gate_charge * sw.drive_voltage +
                                0.5 * sw.output_capacitance * k.vin * k.vin;
            // With CCM certain: the switch conducts for D >= V_off/(V_on + V_off) of the period
            // (volt-second balance, Erickson & Maksimović 2nd ed. ch. 2) with a mean current on
            // each ramp of at least valley + h·ΔI (ramp_mean_share), and R_on·∫i² dt over the
            // on-time is R_on·D·(mean² + variance); the sense resistor takes the cycle's. What
            // that adds to the pair-independent floor (corner_loss_floor).
            double mean_off = 0.0, floor_excess = 0.0;
            if (ramps_known) {
                auto ramp_mean = [&](double ratio) {
                    const double h = ramp_mean_share(ratio);
                    return (1.0 - h) * valley_lb + h * peak_lb;
                };
                const double mean_on = ramp_mean(r_on);
                mean_off = ramp_mean(r_off);
                const double duty_on = voff_least / (voff_least + von_most);
                const double i_mean = std::max(i_lb, k.current_lb());
                const double floor =
                    p.ron * duty_on * (mean_on * mean_on + r_on * spread) +
                    std::max(0.0, d_.sense_resistor) * (i_mean * i_mean + var_cycle);
                floor_excess = std::max(0.0, floor - corner_loss_floor(c_, k));
            }
            const double w = std::max(0.0, k.weight);
            loss_sum += w * (copper + core + e_sw * f_lb + floor_excess +
                             diode_excess(p, valley_lb, von_lb, voff_ub, mean_off));
            f_sum += w * f_lb;
            fv_sum += w * f_lb * valley_lb * k.vin;
            w_sum += w;
        }
        if (w_sum > 0.0) {
            iv.loss = loss_sum / w_sum;
            iv.f_nominal = f_sum / w_sum;
            iv.f_valley_v = fv_sum / w_sum;
        }
        const auto& wt = d_.weights;
        const double margin_term = m_.isat > 0.0 ? iv.peak_ratio : 1.0;
        iv.score = wt.loss * (iv.loss + c_.loss_floor) / s_.power +
                   wt.size * l_.volume() / s_.volume + wt.ripple * iv.ripple / s_.ripple +
                   wt.margin * margin_term;
        return iv;
    }

    InductorBound run() const {
        const auto& r = c_.range;
        std::vector<std::pair<double, double>> spans; // in u
        std::vector<Interval> ivs;
        if (!(r.hi > r.lo)) {
            ivs.push_back(evaluate(r.lo, r.lo));
        } else {
            for (int i = 0; i < first_intervals; ++i) {
                const double u1 = static_cast<double>(i) / first_intervals;
                const double u2 = static_cast<double>(i + 1) / first_intervals;
                spans.emplace_back(u1, u2);
                ivs.push_back(evaluate(value_at(u1), value_at(u2)));
            }
            // Halve the interval holding the minimum until its midpoint's value is within the
            // tolerance of the bound (the bound function cannot rise further there).
            for (int n = 0; n < max_refinements; ++n) {
                std::size_t best = ivs.size();
                for (std::size_t i = 0; i < ivs.size(); ++i)
                    if (ivs[i].feasible && (best == ivs.size() || ivs[i].score < ivs[best].score))
                        best = i;
                if (best == ivs.size()) break;
                const double um = 0.5 * (spans[best].first + spans[best].second);
                const double xm = value_at(um);
                const Interval mid = evaluate(xm, xm);
                if (mid.feasible && mid.score - ivs[best].score < refine_tolerance) break;
                const auto [u1, u2] = spans[best];
                spans[best] = {u1, um};
                ivs[best] = evaluate(value_at(u1), xm);
                spans.emplace_back(um, u2);
                ivs.push_back(evaluate(xm, value_at(u2)));
            }
            // Each limit is bounded at the stretch's better end, so a wide stretch can pass two
            // limits that no single setting in it meets together (a frequency ceiling and a
            // ripple ceiling, say). Halve a feasible stretch while only one half stays feasible.
            for (std::size_t i = 0; i < ivs.size(); ++i) {
                for (int n = 0; n < edge_refinements && ivs[i].feasible; ++n) {
                    const auto [u1, u2] = spans[i];
                    const double um = 0.5 * (u1 + u2);
                    Interval lo = evaluate(value_at(u1), value_at(um));
                    Interval hi = evaluate(value_at(um), value_at(u2));
                    if (lo.feasible && hi.feasible) break;
                    if (lo.feasible) {
                        spans[i] = {u1, um};
                        ivs[i] = lo;
                    } else if (hi.feasible) {
                        spans[i] = {um, u2};
                        ivs[i] = hi;
                    } else {
                        ivs[i].feasible = false;
                        ivs[i].closed_by = lo.closed_by;
                    }
                }
            }
        }
        return summarise(ivs, "any diode");
    }

    // One stretch [x1, x2] bounded, or none when no setting in it can meet the limits.
    std::optional<SettingStretch> stretch(double x1, double x2) const {
        const Interval iv = evaluate(x1, x2);
        if (!iv.feasible) return std::nullopt;
        return SettingStretch{iv.x1, iv.x2, iv.score, iv.loss, iv.f_nominal, iv.f_valley_v};
    }

    // The given stretches again (with this bounder's diode): no new refinement.
    InductorBound rebound(const std::vector<SettingStretch>& stretches) const {
        std::vector<Interval> ivs;
        ivs.reserve(stretches.size());
        for (const auto& st : stretches) ivs.push_back(evaluate(st.x1, st.x2));
        return summarise(ivs, "this diode");
    }

private:
    InductorBound summarise(const std::vector<Interval>& ivs, const char* partner) const {
        InductorBound b;
        b.size = l_.volume();
        const auto& r = c_.range;
        bool any = false;
        std::map<std::string_view, int> closed;
        for (const auto& iv : ivs) {
            if (!iv.feasible) {
                ++closed[iv.closed_by];
                continue;
            }
            b.stretches.push_back({iv.x1, iv.x2, iv.score, iv.loss, iv.f_nominal, iv.f_valley_v});
            if (!any) {
                b.score = iv.score;
                b.loss = iv.loss;
                b.ripple = iv.ripple;
                b.margin = 1.0 - iv.peak_ratio;
                b.f_min = iv.f_nominal;
                any = true;
                continue;
            }
            b.score = std::min(b.score, iv.score);
            b.loss = std::min(b.loss, iv.loss);
            b.ripple = std::min(b.ripple, iv.ripple);
            b.margin = std::max(b.margin, 1.0 - iv.peak_ratio);
            b.f_min = std::min(b.f_min, iv.f_nominal);
        }
        if (!(m_.isat > 0.0)) b.margin = 0.0;
        if (!any) {
            b.feasible = false;
            std::string limit, list;
            int most = -1;
            for (const auto& [name, n] : closed) {
                if (n > most) {
                    most = n;
                    limit = name;
                }
                if (!list.empty()) list += ", ";
                list += name;
            }
            const bool band = hysteretic(c_);
            const auto dim = band ? u::Dimension::current : u::Dimension::frequency;
            b.window =
                ScreenReason{limit.empty() ? std::string("setting_window") : limit, "", r.lo, r.hi,
                             std::string("no ") + (band ? "band" : "frequency") + " from " +
                                 u::format(r.lo, dim) + " to " + u::format(r.hi, dim) +
                                 " can meet the limits at every corner with " + partner +
                                 " (closed by " + list + ")"};
        }
        return b;
    }

    const ScreenContext& c_;
    const design::Design& d_;
    const parts::Inductor& l_;
    const parts::InductorModel& m_;
    const optimisation::Scales& s_;
    const parts::DiodeModel* diode_ = nullptr;
    const DiodeBound* diode_bound_ = nullptr;
    double tj_bound_ = 0.0;
    const std::vector<EnvelopeCorner>& corners_;
    std::vector<CornerParts> parts_;
    double peak_cap_ = 0.0;
    double t_l_bound_ = 0.0;
    double dcr_ub_ = 0.0; // Ω, the winding at its temperature limit
};

} // namespace

InductorBound inductor_bound(const ScreenContext& c, const parts::Inductor& l,
                             const parts::InductorModel& m, const optimisation::Scales& s,
                             const std::vector<EnvelopeCorner>& corners) {
    return InductorBounder(c, l, m, s, corners).run();
}

InductorBound inductor_bound(const ScreenContext& c, const parts::Inductor& l,
                             const parts::InductorModel& m, const optimisation::Scales& s) {
    return inductor_bound(c, l, m, s, part_corners(c, l.tolerance));
}

InductorBound pair_inductor_bound(const ScreenContext& c, const parts::Inductor& l,
                                  const parts::InductorModel& m, const InductorBound& b,
                                  const parts::DiodeModel& diode, const DiodeBound& db,
                                  const optimisation::Scales& s,
                                  const std::vector<EnvelopeCorner>& corners) {
    if (!b.feasible || b.stretches.empty()) return b;
    return InductorBounder(c, l, m, s, corners, &diode, &db).rebound(b.stretches);
}

InductorBound pair_inductor_bound(const ScreenContext& c, const parts::Inductor& l,
                                  const parts::InductorModel& m, const InductorBound& b,
                                  const parts::DiodeModel& diode, const DiodeBound& db,
                                  const optimisation::Scales& s) {
    return pair_inductor_bound(c, l, m, b, diode, db, s, part_corners(c, l.tolerance));
}

DiodeBound diode_bound(const ScreenContext& c, const parts::Diode& diode,
                       const parts::DiodeModel& m, const optimisation::Scales& s) {
    DiodeBound b;
    b.size = diode.volume();
    const auto& lim = c.design->limits;
    const double tj_bound = lim.tj_max ? std::min(m.tj_max, *lim.tj_max) : m.tj_max;
    double loss = 0.0, e_sw = 0.0, w_sum = 0.0;
    for (const auto& k : c.corners) {
        if (std::none_of(b.laws.begin(), b.laws.end(),
                         [&](const auto& x) { return x.ambient == k.ambient; }))
            b.laws.push_back(ambient_laws(m, k.ambient, tj_bound));
        const bool driven = k.vin > 0.0 && k.current > 0.0;
        std::optional<JunctionBalance> balance;
        if (driven) {
            balance.emplace(k, m, tj_bound);
            DiodeBound::Settling st{operating_point(k), balance->largest_settling_share(), {}};
            for (std::size_t i = 0; i < DiodeBound::leak_levels.size(); ++i)
                st.share_with_leak[i] =
                    std::min(st.share, balance->largest_settling_share(DiodeBound::leak_levels[i]));
            b.settling.push_back(st);
        }
        if (!k.nominal) continue;
        const double w = std::max(0.0, k.weight);
        w_sum += w;
        if (!driven) continue;
        // Conduction and leakage from below at the junction's balance (JunctionBalance); the mean
        // of v_f(i)·i over the off-interval is at least v_f(ī)·ī as v_f·i is convex in i.
        b.nominal.push_back(std::move(*balance));
        loss += w * b.nominal.back().least_heating(k.off_share);
        // Junction charge lost each cycle (the engine's diode switching term without recovery).
        e_sw += w * m.capacitive_energy(k.vin);
    }
    if (w_sum > 0.0) {
        b.loss = loss / w_sum;
        b.e_switch = e_sw / w_sum;
    }
    b.qrr_per_amp = m.qrr_ref > 0.0 && m.if_ref > 0.0 ? m.qrr_ref / m.if_ref : std::max(0.0, m.tt);
    if (diode.if_avg > 0.0) b.current_max = lim.diode_current_derating * diode.if_avg;
    const auto& wt = c.design->weights;
    b.score = wt.loss * b.loss / s.power + wt.size * b.size / s.volume;
    return b;
}

namespace {

// The diode's switching loss over a stretch: junction charge and recovery Q_rr = q·i_valley, each
// lost once a cycle (the engine's diode switching term).
double diode_switching(const SettingStretch& s, const DiodeBound& d) {
    return d.e_switch * s.f + d.qrr_per_amp * s.f_valley_v;
}

} // namespace

double pair_score_bound(const ScreenContext& c, const InductorBound& l, const DiodeBound& d,
                        const optimisation::Scales& s) {
    const double k = c.design->weights.loss / s.power;
    double best = l.stretches.empty() ? l.score : INFINITY;
    for (const auto& st : l.stretches) best = std::min(best, st.score + k * diode_switching(st, d));
    return best + d.score;
}

optimisation::Objectives pair_optimistic(const ScreenContext& c, const InductorBound& l,
                                         const DiodeBound& d, std::optional<double> known_loss) {
    optimisation::Objectives o;
    if (known_loss) {
        o.loss = *known_loss;
    } else {
        double loss = l.stretches.empty() ? l.loss : INFINITY;
        for (const auto& st : l.stretches) loss = std::min(loss, st.loss + diode_switching(st, d));
        o.loss = loss + d.loss + c.loss_floor;
    }
    o.size = l.size + d.size;
    o.ripple = l.ripple;
    o.margin = l.margin;
    return o;
}

std::optional<PairFloors> pair_floors_above(const ScreenContext& c, const parts::Inductor& l,
                                            const parts::InductorModel& m, const InductorBound& b,
                                            const parts::DiodeModel& diode, const DiodeBound& d,
                                            const optimisation::Scales& s,
                                            const std::vector<EnvelopeCorner>& corners,
                                            double loss_enough, double score_enough) {
    return PairBound(c, l, m, b, diode, d, s, corners).floors_above(loss_enough, score_enough);
}

double pair_loss_within(const ScreenContext& c, const InductorBound& l, const DiodeBound& d,
                        const optimisation::Scales& s, double score_cap) {
    const double k = c.design->weights.loss / s.power;
    // Round-off in the score sum must not exclude the stretch the tuned point lies in.
    const double cap = score_cap + 1e-9 * (1.0 + std::abs(score_cap));
    double loss = INFINITY;
    for (const auto& st : l.stretches) {
        const double sw = diode_switching(st, d);
        if (st.score + k * sw + d.score <= cap) loss = std::min(loss, st.loss + sw);
    }
    if (!std::isfinite(loss)) return pair_optimistic(c, l, d).loss;
    return loss + d.loss + c.loss_floor;
}

double pair_loss_within(const ScreenContext& c, const parts::Inductor& l,
                        const parts::InductorModel& m, const InductorBound& b,
                        const parts::DiodeModel& diode, const DiodeBound& d,
                        const optimisation::Scales& s, double score_cap,
                        const std::vector<EnvelopeCorner>& corners, double enough) {
    // `b` holds the pair's own stretches: bounded again with its diode they give the same.
    return PairBound(c, l, m, b, diode, d, s, corners).loss_within(score_cap, enough, true);
}

std::optional<std::pair<double, double>> open_settings(const InductorBound& b) {
    if (!b.feasible || b.stretches.empty()) return std::nullopt;
    double lo = INFINITY, hi = -INFINITY;
    for (const auto& st : b.stretches) {
        lo = std::min(lo, st.x1);
        hi = std::max(hi, st.x2);
    }
    return std::make_pair(lo, hi);
}

struct PairBound::State {
    State(const ScreenContext& c_, const parts::Inductor& l, const parts::InductorModel& m,
          const InductorBound& b_, const parts::DiodeModel& diode, const DiodeBound& d_,
          const optimisation::Scales& s, const std::vector<EnvelopeCorner>& corners)
        : c(c_), b(b_), d(d_), k(c_.design->weights.loss / s.power),
          bounder(c_, l, m, s, corners, &diode, &d_), pair(b_.stretches.size()) {}

    const ScreenContext& c;
    const InductorBound& b;
    const DiodeBound& d;
    double k; // the score's weight on loss, per watt
    InductorBounder bounder;
    // Outer: evaluated with the diode; inner: open with it.
    std::vector<std::optional<std::optional<SettingStretch>>> pair;
    std::vector<std::size_t> by_bound; // stretches in ascending order of the inductor's value
    std::vector<std::size_t> by_loss;  // and of its loss (both made when first needed)
    std::size_t next = 0;              // the first of by_bound not yet taken
    std::optional<std::size_t> start;  // the first of by_bound open with the diode

    const std::optional<SettingStretch>& at(std::size_t i) {
        auto& p = pair[i];
        if (!p) p = bounder.stretch(b.stretches[i].x1, b.stretches[i].x2);
        return *p;
    }
    // The stretch as known now: the pair's own when evaluated (null when closed), else the
    // inductor's, which bounds it for every diode.
    const SettingStretch* known(std::size_t i) const {
        const auto& p = pair[i];
        if (!p) return &b.stretches[i];
        return *p ? &**p : nullptr;
    }
    double value(const SettingStretch& st) const { return st.score + k * diode_switching(st, d); }
    double loss(const SettingStretch& st) const { return st.loss + diode_switching(st, d); }

    // Takes stretches in ascending order of the inductor's loss until the next one's is no lower
    // than the least found with the diode, so that the least over `known` is the pair's own.
    void settle_loss() {
        double least = INFINITY;
        for (const auto& p : pair)
            if (p && *p) least = std::min(least, loss(**p));
        for (std::size_t i : loss_order()) {
            if (loss(b.stretches[i]) >= least) break;
            if (const auto& st = at(i)) least = std::min(least, loss(*st));
        }
    }

    // The stretches in ascending order of the inductor's loss (ties by position).
    const std::vector<std::size_t>& loss_order() {
        if (by_loss.size() != b.stretches.size()) {
            by_loss.resize(b.stretches.size());
            std::iota(by_loss.begin(), by_loss.end(), std::size_t{0});
            std::stable_sort(by_loss.begin(), by_loss.end(), [&](std::size_t x, std::size_t y) {
                return loss(b.stretches[x]) < loss(b.stretches[y]);
            });
        }
        return by_loss;
    }

    // Takes stretches in ascending order of the inductor's value (ties by position) until one
    // stays open with the diode: where the walk starts. Without one, every stretch is taken.
    void settle_start() {
        if (by_bound.empty() && !b.stretches.empty()) {
            by_bound.resize(b.stretches.size());
            std::iota(by_bound.begin(), by_bound.end(), std::size_t{0});
            std::stable_sort(by_bound.begin(), by_bound.end(), [&](std::size_t x, std::size_t y) {
                return value(b.stretches[x]) < value(b.stretches[y]);
            });
        }
        while (!start && next < by_bound.size()) {
            const std::size_t i = by_bound[next++];
            if (at(i)) start = i;
        }
    }
};

PairBound::PairBound(const ScreenContext& c, const parts::Inductor& l,
                     const parts::InductorModel& m, const InductorBound& b,
                     const parts::DiodeModel& diode, const DiodeBound& d,
                     const optimisation::Scales& s, const std::vector<EnvelopeCorner>& corners)
    : state_(std::make_unique<State>(c, l, m, b, diode, d, s, corners)) {}

PairBound::~PairBound() = default;

std::optional<PairFloors> PairBound::floors_above(double loss_enough, double score_enough) {
    State& t = *state_;
    PairFloors out;
    if (!t.b.feasible) return out; // no setting meets the limits with any diode
    // Summed in the order of pair_optimistic and pair_score_bound: the same stretch gives the
    // same figure to the last bit.
    auto loss_of = [&](const SettingStretch& st) { return t.loss(st) + t.d.loss + t.c.loss_floor; };
    // The stretches in doubt, least loss first: the one most likely to stay below comes first.
    std::vector<std::size_t> doubt;
    for (std::size_t i : t.loss_order()) {
        const auto& st = t.b.stretches[i];
        const double loss = loss_of(st), score = t.value(st) + t.d.score;
        if (loss <= loss_enough || score <= score_enough) {
            doubt.push_back(i);
            continue;
        }
        out.loss = std::min(out.loss, loss);
        out.score = std::min(out.score, score);
    }
    for (std::size_t i : doubt) {
        const auto& part = t.at(i);
        if (!part) continue; // no setting there meets the limits with this diode
        const double loss = loss_of(*part), score = t.value(*part) + t.d.score;
        if (loss <= loss_enough || score <= score_enough) return std::nullopt;
        out.loss = std::min(out.loss, loss);
        out.score = std::min(out.score, score);
    }
    return out;
}

bool PairBound::feasible() {
    State& t = *state_;
    if (!t.b.feasible || t.b.stretches.empty()) return t.b.feasible;
    t.settle_start();
    return t.start.has_value();
}

std::optional<std::pair<double, double>> PairBound::open() {
    State& t = *state_;
    const auto& st = t.b.stretches;
    if (!t.b.feasible || st.empty()) return std::nullopt;
    // From each end inwards to the first stretch that stays open: the hull of the open ones.
    std::vector<std::size_t> order(st.size());
    std::iota(order.begin(), order.end(), std::size_t{0});
    std::stable_sort(order.begin(), order.end(),
                     [&](std::size_t x, std::size_t y) { return st[x].x1 < st[y].x1; });
    double lo = INFINITY, hi = -INFINITY;
    for (std::size_t i : order)
        if (t.at(i)) {
            lo = st[i].x1;
            break;
        }
    if (!std::isfinite(lo)) return std::nullopt;
    std::stable_sort(order.begin(), order.end(),
                     [&](std::size_t x, std::size_t y) { return st[x].x2 > st[y].x2; });
    for (std::size_t i : order)
        if (t.at(i)) {
            hi = st[i].x2;
            break;
        }
    return std::make_pair(lo, hi);
}

std::optional<double> PairBound::start_setting() {
    State& t = *state_;
    if (!t.b.feasible || t.b.stretches.empty()) return std::nullopt;
    t.settle_start();
    if (!t.start) return std::nullopt;
    const auto& st = t.b.stretches[*t.start];
    if (t.c.range.log_scale && st.x1 > 0.0) return std::sqrt(st.x1 * st.x2);
    return 0.5 * (st.x1 + st.x2);
}

double PairBound::score_bound() const {
    const State& t = *state_;
    double best = t.b.stretches.empty() ? t.b.score : INFINITY;
    for (std::size_t i = 0; i < t.b.stretches.size(); ++i)
        if (const auto* st = t.known(i)) best = std::min(best, t.value(*st));
    return best + t.d.score;
}

double PairBound::loss_bound() {
    State& t = *state_;
    t.settle_loss();
    double least = t.b.stretches.empty() ? t.b.loss : INFINITY;
    for (std::size_t i = 0; i < t.b.stretches.size(); ++i)
        if (const auto* st = t.known(i)) least = std::min(least, t.loss(*st));
    return least + t.d.loss + t.c.loss_floor;
}

namespace {

// x rounded to a float no greater than it: a lower bound stays one.
float float_below(double x) {
    const auto f = static_cast<float>(x);
    return static_cast<double>(f) > x ? std::nextafter(f, -INFINITY) : f;
}

} // namespace

PairBound::Learnt PairBound::learnt() const {
    const State& t = *state_;
    Learnt out;
    if (t.pair.size() > 64) return out;
    for (std::size_t i = 0; i < t.pair.size(); ++i) {
        if (!t.pair[i]) continue;
        out.bounded |= std::uint64_t{1} << i;
        if (const auto& st = *t.pair[i]) {
            out.open |= std::uint64_t{1} << i;
            out.figures.push_back({float_below(st->score), float_below(st->loss),
                                   float_below(st->f), float_below(st->f_valley_v)});
        }
    }
    return out;
}

void PairBound::take(const Learnt& seed) {
    State& t = *state_;
    if (t.pair.size() > 64) return;
    std::size_t k = 0;
    for (std::size_t i = 0; i < t.pair.size(); ++i) {
        const std::uint64_t bit = std::uint64_t{1} << i;
        if (!(seed.bounded & bit)) continue;
        if (!(seed.open & bit)) {
            t.pair[i] = std::optional<SettingStretch>{};
            continue;
        }
        const auto& q = seed.figures.at(k++);
        const auto& own = t.b.stretches[i];
        t.pair[i] = SettingStretch{own.x1, own.x2, q[0], q[1], q[2], q[3]};
    }
}

double PairBound::loss_within(double score_cap, double enough, bool split) {
    State& t = *state_;
    // Round-off in the score sum must not exclude the stretch the tuned point lies in.
    const double cap = score_cap + 1e-9 * (1.0 + std::abs(score_cap));
    // Summed in the order of pair_loss_within: the same stretch gives the same figure to the bit.
    auto with_fixed = [&](double loss) { return loss + t.d.loss + t.c.loss_floor; };
    // Best first by loss bound. A stretch not yet bounded with the diode enters with the
    // inductor's bound and is bounded when it comes first; a part of a split enters with its
    // parent's bound likewise. A node's bound is never taken below its parent's, so the first
    // bounded node at full depth holds the least over all parts, and the least node left bounds
    // them all (enough to stop once it reaches `enough`).
    struct Node {
        double loss; // lower bound of the loss over the node's settings (without the fixed terms)
        double x1, x2;
        int depth;
        std::size_t stretch; // its stretch while not yet bounded at depth 0, else `none`
        bool bounded;
        bool operator>(const Node& o) const { return loss > o.loss; }
    };
    constexpr std::size_t none = static_cast<std::size_t>(-1);
    std::priority_queue<Node, std::vector<Node>, std::greater<Node>> open;
    auto push_bounded = [&](const SettingStretch& st, double floor, int depth) {
        if (t.value(st) + t.d.score <= cap)
            open.push({std::max(floor, t.loss(st)), st.x1, st.x2, depth, none, true});
    };
    for (std::size_t i = 0; i < t.b.stretches.size(); ++i) {
        const auto& own = t.b.stretches[i];
        if (!t.pair[i]) {
            // A stretch whose inductor bound is above the cap is above it with any diode.
            if (t.value(own) + t.d.score <= cap)
                open.push({t.loss(own), own.x1, own.x2, 0, i, false});
        } else if (*t.pair[i]) {
            push_bounded(**t.pair[i], -INFINITY, 0);
        }
    }
    const int depth_max = split ? probe_halvings : 0;
    const auto& r = t.c.range;
    double least_root = INFINITY; // the least bounded stretch under the cap (the coarse value)
    while (!open.empty()) {
        const Node n = open.top();
        open.pop();
        if (with_fixed(n.loss) >= enough || (n.bounded && n.depth == depth_max))
            return with_fixed(n.loss);
        if (!n.bounded) {
            if (n.stretch != none) {
                if (const auto& st = t.at(n.stretch)) push_bounded(*st, -INFINITY, 0);
            } else if (const auto part = t.bounder.stretch(n.x1, n.x2)) {
                push_bounded(*part, n.loss, n.depth);
            }
            continue;
        }
        if (n.depth == 0) least_root = std::min(least_root, n.loss);
        const double xm = r.log_scale && n.x1 > 0.0 ? std::sqrt(n.x1 * n.x2) : 0.5 * (n.x1 + n.x2);
        open.push({n.loss, n.x1, xm, n.depth + 1, none, false});
        open.push({n.loss, xm, n.x2, n.depth + 1, none, false});
    }
    // A stretch's parts cover it, so the probe's own point lies in one that qualifies; none at all
    // means round-off at the cap: the stretch's own bound stands, or the pair's without a cap.
    if (std::isfinite(least_root)) return with_fixed(least_root);
    return loss_bound();
}

} // namespace coilsieve::studies
