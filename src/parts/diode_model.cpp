#include "parts/diode_model.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdio>
#include <limits>
#include <stdexcept>
#include <string>
#include <vector>

namespace coilsieve::parts {

namespace {

// Exact SI defining constants (SI Brochure, 9th ed., 2019; CODATA 2018).
constexpr double boltzmann = 1.380649e-23;                 // J/K
constexpr double elementary_charge = 1.602176634e-19;      // C
constexpr double k_over_q = boltzmann / elementary_charge; // V/K

// What datasheet points cannot fix, per technology. Values from memory of SPICE modelling
// practice, to be re-checked: N near 1 for Schottky barriers (thermionic emission), 1.8–2 for
// PN power diodes in high injection; EG is the barrier height for Schottky parts (0.69 eV is
// the usual SPICE value for silicon Schottky) and the silicon gap 1.11 eV for PN; XTI = 2 for
// Schottky (Richardson T² law), 3 for PN (ngspice default). VJ and M: abrupt junctions have
// M = 1/2, graded ones 1/3 (Sze & Ng, 3rd ed., ch. 2 and 3). Capacitance, leakage and recovery
// defaults are rough per-ampere figures of typical catalog parts (from memory), used only when a
// part gives nothing; the catalog marks such fields as assumed.
struct TechnologyDefaults {
    double n;
    double eg; // eV
    double xti;
    double vj; // V
    double m;
    double cj4_per_amp; // F per A of if_avg, at 4 V reverse
    double ir_per_amp;  // A per A of if_avg, at vrrm and 25 °C
    double trr;         // s, 0 for majority-carrier parts
};

const TechnologyDefaults& technology_defaults(DiodeTechnology t) {
    static constexpr std::array<TechnologyDefaults, 5> table{{
        {1.05, 0.69, 2.0, 0.6, 0.5, 80e-12, 150e-6, 0.0}, // schottky
        {1.2, 1.2, 2.0, 1.0, 0.5, 40e-12, 1e-6, 0.0},     // sic_schottky
        {1.9, 1.11, 3.0, 0.7, 0.4, 10e-12, 1e-6, 50e-9},  // ultrafast
        {1.9, 1.11, 3.0, 0.7, 0.4, 10e-12, 2e-6, 250e-9}, // fast
        {1.8, 1.11, 3.0, 0.7, 0.4, 15e-12, 2e-6, 2e-6},   // standard
    }};
    return table[static_cast<std::size_t>(t)];
}

bool is_schottky(DiodeTechnology t) {
    return t == DiodeTechnology::schottky || t == DiodeTechnology::sic_schottky;
}

// Series-resistance default: 0.1 V across RS at the rated average current (common practice,
// from memory: the resistive part of Vf at rated current of small power diodes).
constexpr double rs_default_drop = 0.1; // V

// Emission coefficient bounds: N >= 1 for any junction in forward conduction (Sze & Ng ch. 2-3).
constexpr double n_min = 1.0;
constexpr double n_max = 8.0;

[[noreturn]] void fit_error(const Diode& part, const std::string& what) {
    throw std::invalid_argument("diode '" + part.id + "': " + what);
}

std::string fmt(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.4g", v);
    return buf;
}

struct Point {
    double i, v;
};

// Variable projection: for a fixed IS, Vf = N·[Vt·ln(1 + i/IS)] + RS·i is linear in N and RS.
struct Inner {
    double n, rs, sse;
};

enum class Free { rs_only, n_only, n_and_rs };

Inner inner_fit(const std::vector<Point>& pts, double ln_is, double vt, Free free, double n_fixed,
                double rs_fixed) {
    const double is = std::exp(ln_is);
    double sgg = 0, sgi = 0, sii = 0, sgv = 0, siv = 0;
    for (const auto& p : pts) {
        const double g = vt * std::log1p(p.i / is);
        sgg += g * g;
        sgi += g * p.i;
        sii += p.i * p.i;
        sgv += g * p.v;
        siv += p.i * p.v;
    }
    double n = n_fixed, rs = rs_fixed;
    auto rs_for = [&](double nn) { return std::max(0.0, (siv - nn * sgi) / sii); };
    auto n_for = [&](double r) { return std::clamp((sgv - r * sgi) / sgg, n_min, n_max); };
    switch (free) {
    case Free::rs_only:
        rs = rs_for(n);
        break;
    case Free::n_only:
        n = n_for(rs);
        break;
    case Free::n_and_rs: {
        const double det = sgg * sii - sgi * sgi;
        bool ok = det > 1e-30 * sgg * sii;
        if (ok) {
            n = (sgv * sii - siv * sgi) / det;
            rs = (sgg * siv - sgi * sgv) / det;
            ok = rs >= 0.0 && n >= n_min && n <= n_max;
        }
        if (!ok) {
            // Constrained optimum lies on a bound: try both faces, keep the better.
            const double n_a = n_for(0.0);
            const double rs_a = 0.0;
            const double n_b0 = std::clamp(n, n_min, n_max);
            const double rs_b = rs_for(n_b0);
            auto sse_of = [&](double nn, double rr) {
                double s = 0;
                for (const auto& p : pts) {
                    const double e = nn * vt * std::log1p(p.i / is) + rr * p.i - p.v;
                    s += e * e;
                }
                return s;
            };
            if (sse_of(n_a, rs_a) <= sse_of(n_b0, rs_b)) {
                n = n_a;
                rs = rs_a;
            } else {
                n = n_b0;
                rs = rs_b;
            }
        }
        break;
    }
    }
    double sse = 0;
    for (const auto& p : pts) {
        const double e = n * vt * std::log1p(p.i / is) + rs * p.i - p.v;
        sse += e * e;
    }
    return {n, rs, sse};
}

struct ColdFit {
    double ln_is, n, rs, sse;
};

// Minimise over ln IS: a coarse scan brackets the minimum, golden-section search refines it.
ColdFit outer_fit(const std::vector<Point>& pts, double vt, Free free, double n_fixed,
                  double rs_fixed) {
    const double lo = std::log(1e-30);
    const double hi = std::log(pts.front().i) + 5.0;
    constexpr int scan = 400;
    double best_x = lo, best_f = std::numeric_limits<double>::infinity();
    const double step = (hi - lo) / scan;
    for (int k = 0; k <= scan; ++k) {
        const double x = lo + step * k;
        const double f = inner_fit(pts, x, vt, free, n_fixed, rs_fixed).sse;
        if (f < best_f) {
            best_f = f;
            best_x = x;
        }
    }
    double a = std::max(lo, best_x - step), b = std::min(hi, best_x + step);
    const double r = (std::sqrt(5.0) - 1.0) / 2.0;
    double c = b - r * (b - a), d = a + r * (b - a);
    double fc = inner_fit(pts, c, vt, free, n_fixed, rs_fixed).sse;
    double fd = inner_fit(pts, d, vt, free, n_fixed, rs_fixed).sse;
    for (int it = 0; it < 200 && (b - a) > 1e-12; ++it) {
        if (fc < fd) {
            b = d;
            d = c;
            fd = fc;
            c = b - r * (b - a);
            fc = inner_fit(pts, c, vt, free, n_fixed, rs_fixed).sse;
        } else {
            a = c;
            c = d;
            fc = fd;
            d = a + r * (b - a);
            fd = inner_fit(pts, d, vt, free, n_fixed, rs_fixed).sse;
        }
    }
    const double x = 0.5 * (a + b);
    const Inner in = inner_fit(pts, x, vt, free, n_fixed, rs_fixed);
    return {x, in.n, in.rs, in.sse};
}

// ln IS(T) − ln IS(T_ref) for the ngspice temperature law (exact rearrangement of
// IS(T) = IS·exp((T/Tnom − 1)·EG/(N·Vt(T)))·(T/Tnom)^(XTI/N)).
double ln_is_shift(double t, double t_ref, double n, double eg, double xti) {
    return eg / (n * k_over_q) * (1.0 / t_ref - 1.0 / t) + xti / n * std::log(t / t_ref);
}

double rating_current(const Diode& part) {
    if (part.if_avg > 0.0) return part.if_avg;
    double imax = 0.0;
    for (const auto& p : part.forward) imax = std::max(imax, p.current);
    return imax > 0.0 ? imax : 1.0;
}

} // namespace

double thermal_voltage(double temperature) { return k_over_q * temperature; }

double DiodeModel::saturation_current(double temperature) const {
    // ngspice diotemp.c (TLEV = 0): IS(T) = IS·exp((T/Tnom − 1)·EG/(N·Vt) + XTI/N·ln(T/Tnom)).
    const double vt = thermal_voltage(temperature);
    return fwd.is * std::exp((temperature / tnom - 1.0) * fwd.eg / (fwd.n * vt) +
                             fwd.xti / fwd.n * std::log(temperature / tnom));
}

double ForwardLaw::vf(double current) const {
    if (!(current > 0.0)) return 0.0;
    // SPICE diode i = IS(T)·(exp(vd/(N·Vt)) − 1) inverted exactly, plus the drop across RS.
    const double x = current / is;
    // From x = 1 up, 1 + x rounds by at most half an ulp and ln(1 + x) >= ln 2, so log(1 + x) is
    // as exact as log1p(x), and several times cheaper on the optimiser's hot path.
    const double l = x >= 1.0 ? std::log(1.0 + x) : std::log1p(x);
    return nvt * l + current * rs;
}

ForwardLaw DiodeModel::forward_at(double temperature) const {
    return {fwd.n * thermal_voltage(temperature), saturation_current(temperature), fwd.rs};
}

double DiodeModel::vf(double current, double temperature) const {
    if (!(current > 0.0)) return 0.0;
    return forward_at(temperature).vf(current);
}

double DiodeModel::junction_charge(double vr) const {
    if (!(vr > 0.0) || cap.cjo <= 0.0) return 0.0;
    // ∫₀^V CJO/(1 + v/VJ)^M dv = VJ·CJO·((1 + V/VJ)^(1−M) − 1)/(1 − M) (SPICE depletion charge).
    const double l = std::log1p(vr / cap.vj);
    const double e = 1.0 - cap.m;
    if (std::abs(e) < 1e-9) return cap.cjo * cap.vj * l;
    return cap.cjo * cap.vj * std::expm1(e * l) / e;
}

double DiodeModel::capacitive_energy(double vr) const {
    if (!(vr > 0.0) || cap.cjo <= 0.0) return 0.0;
    // ∫₀^V v·C(v) dv with u = 1 + v/VJ: CJO·VJ²·[(u^(2−M) − 1)/(2−M) − (u^(1−M) − 1)/(1−M)].
    const double l = std::log1p(vr / cap.vj);
    auto term = [l](double e) { return std::abs(e) < 1e-9 ? l : std::expm1(e * l) / e; };
    return cap.cjo * cap.vj * cap.vj * (term(2.0 - cap.m) - term(1.0 - cap.m));
}

double DiodeModel::recovery_charge(double i_f) const {
    if (!(i_f > 0.0)) return 0.0;
    // Charge-control model (SPICE TT: stored charge = TT·I_F): Qrr scales linearly with the
    // forward current, anchored at the datasheet test point.
    if (qrr_ref > 0.0 && if_ref > 0.0) return qrr_ref * (i_f / if_ref);
    return tt * i_f;
}

double DiodeModel::leakage(double vr, double temperature) const {
    if (!(vr > 0.0) || ir_ref <= 0.0) return 0.0;
    // Doubling every `leakage_doubling` K (thermionic emission, Sze & Ng 3rd ed. ch. 3; "doubles
    // every ~10 °C" is common practice). Voltage: sqrt(vr/vr_ref), the depletion-width growth of
    // generation current in an abrupt junction (Sze & Ng ch. 2); a modelling choice.
    const double v_scale = vr_ref > 0.0 ? std::sqrt(vr / vr_ref) : 1.0;
    return ir_ref * std::exp2((temperature - t_ref) / leakage_doubling) * v_scale;
}

SpiceForward fit_forward(const Diode& part) {
    if (part.forward.empty()) fit_error(part, "no forward-voltage points to fit (give vf at if)");
    for (const auto& p : part.forward) {
        if (!(p.vf > 0.0 && p.current > 0.0 && p.temperature > 0.0))
            fit_error(part, "forward point vf=" + fmt(p.vf) + " V at " + fmt(p.current) +
                                " A must have positive voltage, current and temperature");
    }
    const auto& def = technology_defaults(part.technology);

    // Cold group: points within 1 K of the lowest temperature; the others fix EG.
    double tc = std::numeric_limits<double>::infinity();
    for (const auto& p : part.forward) tc = std::min(tc, p.temperature);
    std::vector<Point> cold;
    std::vector<ForwardPoint> hot;
    for (const auto& p : part.forward) {
        if (p.temperature - tc <= 1.0) cold.push_back({p.current, p.vf});
        else hot.push_back(p);
    }
    std::sort(cold.begin(), cold.end(), [](const Point& a, const Point& b) { return a.i < b.i; });
    for (std::size_t k = 1; k < cold.size(); ++k) {
        if (cold[k].i == cold[k - 1].i)
            fit_error(part, "two forward points at the same current " + fmt(cold[k].i) +
                                " A and temperature; give each current once");
        if (!(cold[k].v > cold[k - 1].v))
            fit_error(part, "Vf must rise with current, but " + fmt(cold[k].v) + " V at " +
                                fmt(cold[k].i) + " A is not above " + fmt(cold[k - 1].v) +
                                " V at " + fmt(cold[k - 1].i) + " A");
    }

    const double vt = thermal_voltage(tc);
    const double irate = rating_current(part);
    ColdFit fit{};
    if (cold.size() == 1) {
        // One point: N and RS from defaults, IS closed form; keep RS below half the drop.
        const Point p = cold.front();
        const double rs = std::min(rs_default_drop / irate, 0.5 * p.v / p.i);
        const double vd = p.v - p.i * rs;
        fit = {std::log(p.i) - std::log(std::expm1(vd / (def.n * vt))), def.n, rs, 0.0};
    } else if (cold.size() == 2) {
        // Two points: IS and RS with the default N; if that would need RS < 0 the curve is
        // steeper than N allows, so fit N and IS with RS = 0 instead.
        fit = outer_fit(cold, vt, Free::rs_only, def.n, 0.0);
        if (std::sqrt(fit.sse / 2.0) > 1e-4) {
            const ColdFit alt = outer_fit(cold, vt, Free::n_only, def.n, 0.0);
            if (alt.sse < fit.sse) fit = alt;
        }
    } else {
        fit = outer_fit(cold, vt, Free::n_and_rs, def.n, 0.0);
    }
    const double rms = std::sqrt(fit.sse / static_cast<double>(cold.size()));
    if (!std::isfinite(fit.ln_is) || !std::isfinite(fit.n) || !std::isfinite(fit.rs) || rms > 0.03)
        fit_error(part, "the forward points cannot be fitted by a diode law with series "
                        "resistance (RMS error " +
                            fmt(rms * 1e3) + " mV); check the Vf values and their units");

    SpiceForward out;
    out.n = fit.n;
    out.rs = fit.rs;
    out.xti = def.xti;
    out.eg = def.eg;

    if (!hot.empty()) {
        // EG from the hot points, XTI fixed: golden-section least squares on Vf over a
        // physical range (ngspice limits EG to >= 0.1 eV).
        auto sse_eg = [&](double eg) {
            double s = 0;
            for (const auto& p : hot) {
                const double ln_is = fit.ln_is + ln_is_shift(p.temperature, tc, fit.n, eg, def.xti);
                const double v = fit.n * thermal_voltage(p.temperature) *
                                     std::log1p(p.current * std::exp(-ln_is)) +
                                 fit.rs * p.current;
                s += (v - p.vf) * (v - p.vf);
            }
            return s;
        };
        double a = 0.1, b = 4.0;
        const double r = (std::sqrt(5.0) - 1.0) / 2.0;
        double c = b - r * (b - a), d = a + r * (b - a);
        double fc = sse_eg(c), fd = sse_eg(d);
        for (int it = 0; it < 200 && (b - a) > 1e-12; ++it) {
            if (fc < fd) {
                b = d;
                d = c;
                fd = fc;
                c = b - r * (b - a);
                fc = sse_eg(c);
            } else {
                a = c;
                c = d;
                fc = fd;
                d = a + r * (b - a);
                fd = sse_eg(d);
            }
        }
        out.eg = 0.5 * (a + b);
    }

    // Refer IS from the cold temperature to Tnom = 300.15 K.
    const double tnom = DiodeModel{}.tnom;
    out.is = std::exp(fit.ln_is + ln_is_shift(tnom, tc, out.n, out.eg, out.xti));
    if (!(out.is > 0.0) || !std::isfinite(out.is))
        fit_error(part, "the fitted saturation current is not a positive finite number");
    return out;
}

DiodeModel make_model(const Diode& part) {
    const auto& def = technology_defaults(part.technology);
    const double irate = rating_current(part);
    DiodeModel m;
    m.technology = part.technology;
    if (part.spice) {
        m.fwd = *part.spice;
        if (!(m.fwd.is > 0.0 && m.fwd.n > 0.0 && m.fwd.rs >= 0.0))
            fit_error(part, "SPICE parameters need IS > 0, N > 0 and RS >= 0");
    } else {
        m.fwd = fit_forward(part);
    }

    // Junction capacitance: given CJO/VJ/M win; else one datasheet point with the technology's
    // VJ and M; else a per-ampere default at 4 V (the usual datasheet test voltage).
    if (part.spice_cap) {
        m.cap = *part.spice_cap;
    } else {
        m.cap.vj = def.vj;
        m.cap.m = def.m;
        const double c_at = part.cj ? *part.cj : def.cj4_per_amp * irate;
        const double v_at = part.cj ? part.cj_vr.value_or(4.0) : 4.0;
        m.cap.cjo = c_at * std::pow(1.0 + v_at / def.vj, def.m);
    }
    if (!(m.cap.vj > 0.0) || m.cap.m < 0.0 || m.cap.cjo < 0.0)
        fit_error(part, "capacitance parameters need CJO >= 0, VJ > 0 and M >= 0");

    // Recovery: none for majority-carrier (Schottky) parts. For PN parts Qrr at a test current,
    // else TT, else Qrr ≈ ½·I_RRM·trr with I_RRM ≈ I_F (Erickson §4.3.2; I_RRM ≈ I_F is a
    // conservative common-practice assumption).
    if (!is_schottky(part.technology)) {
        m.if_ref = part.recovery_if.value_or(irate);
        if (part.qrr) {
            m.qrr_ref = *part.qrr;
        } else if (part.tt) {
            m.qrr_ref = *part.tt * m.if_ref;
        } else {
            m.qrr_ref = 0.5 * m.if_ref * part.trr.value_or(def.trr);
        }
        m.tt = part.tt.value_or(m.if_ref > 0.0 ? m.qrr_ref / m.if_ref : 0.0);
    }

    m.ir_ref = part.ir.value_or(def.ir_per_amp * irate);
    m.vr_ref = part.ir_vr.value_or(part.vrrm);
    m.t_ref = part.ir_temperature.value_or(298.15);
    m.leakage_doubling = 10.0;

    m.rth_ja = part.rth_ja;
    if (!(m.rth_ja > 0.0)) {
        const auto outline = package_outline(part.package);
        if (!outline)
            fit_error(part, "no rth_ja and no known package outline ('" + part.package +
                                "') to take a typical value from");
        m.rth_ja = outline->rth_ja;
    }
    m.tj_max = part.tj_max;
    return m;
}

} // namespace coilsieve::parts
