// Analytical periodic steady state of one inductor-diode pair at one corner.
//
// Model (domain notes, "The circuit"): each switching interval is a linear R–L segment,
//   on:  L·di/dt = Vin − V_load(i) − i·(R_on + R_sense + DCR)
//   off: L·di/dt = −(V_load(i) + V_f(i) + i·(R_sense + DCR)),
// solved exactly as exponentials (segment.hpp). The load is v0 + r·i. The diode's V_f(i) is
// replaced by a straight line V_d0 + r_d·i fitted over its conduction interval (least squares in
// time, so its volt-seconds and its energy match the SPICE curve), and the inductance by its
// value at each stretch's mid current
// (hysteretic: four sub-stretches in current when L(i) varies; PWM: per interval the 1/v-weighted
// mean of L(i) over the ripple, which keeps its times exact, plus the charge it misses).
// Temperatures, the diode line, L and the capacitor's share of the ripple are iterated to a joint
// fixed point. Nothing on this path allocates unless the corner fails and a reason is written.

#include "converter/evaluate.hpp"
#include "converter/segment.hpp"
#include "units/quantity.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>
#include <string>

namespace coilsieve::converter {

namespace {

using units::Dimension;

constexpr double temperature_tol = temperature_tolerance; // K, thermal fixed point
constexpr double current_tol = 1e-5; // relative to the target, linearisation points
constexpr int max_iterations = 50;
constexpr double diode_runaway_margin = 100.0;    // K beyond tj_max: leakage has run away
constexpr double inductor_runaway_margin = 300.0; // K beyond t_max: the winding has run away
constexpr int sub_stretches = 4;                  // per ramp when L(i) varies over the ripple
// Relative change of v over a ramp up to which it is integrated by quadrature: 1/v then departs
// from the degree-7 polynomial Gauss–Legendre integrates exactly by about 0.25^8 ≈ 2e-5.
constexpr double smooth_voltage_change = 0.25;
constexpr double flat_inductance = 1e-3; // relative L change over the ripple treated as flat
constexpr double d_min = 1e-9, d_max = 1.0 - 1e-9;

std::string fmt(double v, Dimension d) { return units::format(v, d); }

struct Wave {
    double i_valley = 0.0, i_peak = 0.0;
    double t_on = 0.0, t_off = 0.0, t_idle = 0.0;
    double q_on = 0.0, q2_on = 0.0, q_off = 0.0, q2_off = 0.0;
    bool dcm = false;
    double period() const { return t_on + t_off + t_idle; }
};

// phi1, phi2 of segment.hpp with one expm1: enough for the charge of a stretch.
struct Phi12 {
    double p1, p2, x; // x = e^−z
};
Phi12 phi12(double z) {
    if (z < 0.05) {
        const detail::Phi p = detail::phi(z);
        return {p.p1, p.p2, std::exp(-z)};
    }
    const double em1 = std::expm1(-z);
    return {-em1 / z, (z + em1) / (z * z), 1.0 + em1};
}

// --- hysteretic -------------------------------------------------------------------------------

struct Inductance {
    const parts::InductorModel& model;
    double scale;
    bool flat;
    double l_flat;
    double at(double i) const { return flat ? l_flat : model.inductance(i, scale); }
};

// From i0 to i1 on a segment. Along it dt = L(i)·di/v(i) (Kirchhoff on the R–L loop), so the
// time and the charges are ∫(1, i, i²)·L(i)/v(i) di. Where v changes little over the stretch these
// are smooth and 4-point Gauss–Legendre in current (Abramowitz & Stegun 25.4.30; exact to degree 7)
// takes them with no exponential; else sub-stretches of current, L at each one's middle, each
// solved exactly.
Stretch ramp_current(Segment s, double i0, double i1, const Inductance& ind) {
    if (ind.flat) {
        s.l = ind.l_flat;
        return ramp(s, i0, i1);
    }
    Stretch sum;
    sum.i0 = i0;
    sum.i1 = i1;
    const double va = s.v(i0), vb = s.v(i1), di = i1 - i0;
    if (di * va > 0.0 && di * vb > 0.0 &&
        std::abs(vb - va) <= smooth_voltage_change * std::min(std::abs(va), std::abs(vb))) {
        constexpr double x[2] = {0.3399810435848563, 0.8611363115940526};
        constexpr double wt[2] = {0.6521451548625461, 0.3478548451374538};
        const double c = 0.5 * (i0 + i1), h = 0.5 * di;
        for (int k = 0; k < 4; ++k) {
            const double i = c + (k < 2 ? -h : h) * x[k % 2];
            const double g = wt[k % 2] * h * ind.model.inductance(i, ind.scale) / s.v(i);
            sum.dt += g;
            sum.q += g * i;
            sum.q2 += g * i * i;
        }
        return sum;
    }
    const double h = (i1 - i0) / sub_stretches;
    for (int k = 0; k < sub_stretches; ++k) {
        const double a = i0 + h * k;
        const double b = k + 1 == sub_stretches ? i1 : a + h;
        s.l = ind.model.inductance(0.5 * (a + b), ind.scale);
        const Stretch st = ramp(s, a, b);
        sum.dt += st.dt;
        sum.q += st.q;
        sum.q2 += st.q2;
    }
    return sum;
}

// Running a segment for a fixed time (the comparator delay), L at the stretch's mid current.
Stretch run_for(Segment s, double i0, double dt, const Inductance& ind) {
    s.l = ind.at(i0);
    Stretch st = advance(s, i0, dt);
    if (!ind.flat) {
        s.l = ind.at(0.5 * (i0 + std::max(st.i1, 0.0)));
        st = advance(s, i0, dt);
    }
    return st;
}

// Hysteretic cycle: on from the valley through I_hi, on for t_d more (peak); off through I_lo,
// off for t_d more (valley). If the valley would fall below zero the diode blocks and the
// current rests at zero until the delayed turn-on. Needs on.v(I_hi) > 0 and off.v(I_lo) < 0.
Wave hysteretic_wave(const Segment& on, const Segment& off, double i_lo, double i_hi, double td,
                     const Inductance& ind) {
    Wave w;
    Stretch off_delay; // I_lo -> valley
    off_delay.i0 = off_delay.i1 = i_lo;
    if (td > 0.0) {
        off_delay = run_for(off, i_lo, td, ind);
        if (off_delay.i1 < 0.0) {
            Segment s = off;
            s.l = ind.at(0.5 * i_lo);
            off_delay = ramp(s, i_lo, 0.0);
            w.t_idle = std::max(0.0, td - off_delay.dt);
            w.dcm = true;
        }
    }
    w.i_valley = std::max(off_delay.i1, 0.0);
    const Stretch up = ramp_current(on, w.i_valley, i_hi, ind);
    Stretch on_delay;
    on_delay.i0 = on_delay.i1 = i_hi;
    if (td > 0.0) on_delay = run_for(on, i_hi, td, ind);
    w.i_peak = on_delay.i1;
    const Stretch down = ramp_current(off, w.i_peak, i_lo, ind);
    w.t_on = up.dt + on_delay.dt;
    w.t_off = down.dt + off_delay.dt;
    w.q_on = up.q + on_delay.q;
    w.q2_on = up.q2 + on_delay.q2;
    w.q_off = down.q + off_delay.q;
    w.q2_off = down.q2 + off_delay.q2;
    return w;
}

// --- PWM -------------------------------------------------------------------------------------

// Periodic steady state at duty d (both segments carry the same L). CCM: the cycle map
// i_v -> i_p = x1·i_v + a1 -> i_v = x2·i_p + a2 has the fixed point i_v = (a2 + x2·a1)/(1 − x1·x2).
// If that is negative the diode blocks at zero (DCM) and the cycle starts from zero.
// With `full` false only the charges are computed (the duty search needs no more).
Wave pwm_wave(const Segment& on, const Segment& off, double period, double d, bool full) {
    Wave w;
    w.t_on = d * period;
    const double t_off = period - w.t_on;
    const double z1 = on.r * w.t_on / on.l;
    const double z2 = off.r * t_off / off.l;
    const Phi12 f1 = phi12(z1);
    const Phi12 f2 = phi12(z2);
    const double a1 = on.e / on.l * w.t_on * f1.p1;
    const double a2 = off.e / off.l * t_off * f2.p1;
    const double den = -std::expm1(-(z1 + z2));
    double iv = den > 0.0 ? (a2 + f2.x * a1) / den : (a1 + a2 > 0.0 ? 1e12 : -1.0);
    if (iv >= 0.0) {
        w.i_valley = iv;
        const double s1 = on.v(iv) / on.l;
        w.i_peak = iv + s1 * w.t_on * f1.p1;
        const double s2 = off.v(w.i_peak) / off.l;
        w.t_off = t_off;
        w.q_on = iv * w.t_on + s1 * w.t_on * w.t_on * f1.p2;
        w.q_off = w.i_peak * t_off + s2 * t_off * t_off * f2.p2;
        if (full) {
            const Stretch a = advance(on, iv, w.t_on);
            const Stretch b = advance(off, w.i_peak, t_off);
            w.q2_on = a.q2;
            w.q2_off = b.q2;
        }
        return w;
    }
    w.dcm = true;
    w.i_valley = 0.0;
    w.i_peak = a1;
    const double s1 = on.e / on.l;
    w.q_on = s1 * w.t_on * w.t_on * f1.p2;
    const Stretch down = ramp(off, w.i_peak, 0.0);
    const double t_down = std::isfinite(down.dt) ? std::min(down.dt, t_off) : t_off;
    w.t_off = t_down;
    w.t_idle = t_off - t_down;
    w.q_off = down.q;
    if (full) {
        w.q2_on = advance(on, 0.0, w.t_on).q2;
        w.q2_off = down.q2;
    }
    return w;
}

// Inductance of the two PWM intervals when L depends on the current. Along a segment
// dt = L(i)·di/v(i), so the interval from i0 to i1 lasts ∫L/v di (Kirchhoff on the R–L loop with
// L(i), integrated in current): a constant L equal to the 1/v-weighted mean of L(i) over the
// ripple gives the same end currents and times exactly, and what that constant L gets wrong in
// the charges ∫i dt and ∫i² dt is added back as dq, dq2 (∫iⁿ·(L(i) − L_eff)/v di). Both are
// taken over the previous pass's ripple, so they are exact at the fixed point. Quadrature:
// 8-point Gauss–Legendre (Abramowitz & Stegun 25.4.30).
struct PwmInductance {
    double l_on = 0.0, l_off = 0.0;
    double dq_on = 0.0, dq2_on = 0.0, dq_off = 0.0, dq2_off = 0.0;
};

PwmInductance pwm_inductance(const parts::InductorModel& l, double scale, const Segment& on,
                             const Segment& off, double lo, double hi) {
    PwmInductance p;
    const double la = l.inductance(lo, scale);
    const double lb = l.inductance(hi, scale);
    if (!(hi > lo) || std::abs(la - lb) <= flat_inductance * std::max(la, lb)) {
        p.l_on = p.l_off = (la + 4.0 * l.inductance(0.5 * (lo + hi), scale) + lb) / 6.0;
        return p;
    }
    constexpr double x[4] = {0.1834346424956498, 0.5255324099163290, 0.7966664774136267,
                             0.9602898564975363};
    constexpr double wt[4] = {0.3626837833783620, 0.3137066458778873, 0.2223810344533745,
                              0.1012285362903763};
    const double c = 0.5 * (hi + lo), h = 0.5 * (hi - lo);
    double i_n[8], l_n[8], g_on[8], g_off[8];
    double w_on = 0.0, wl_on = 0.0, w_off = 0.0, wl_off = 0.0;
    for (int k = 0; k < 8; ++k) {
        const double sgn = k < 4 ? -1.0 : 1.0;
        const double i = c + sgn * h * x[k % 4];
        const double vo = on.v(i), vf = -off.v(i);
        i_n[k] = i;
        l_n[k] = l.inductance(i, scale);
        g_on[k] = vo > 0.0 ? wt[k % 4] / vo : 0.0;
        g_off[k] = vf > 0.0 ? wt[k % 4] / vf : 0.0;
        w_on += g_on[k];
        wl_on += g_on[k] * l_n[k];
        w_off += g_off[k];
        wl_off += g_off[k] * l_n[k];
    }
    if (!(w_on > 0.0) || !(w_off > 0.0)) {
        p.l_on = p.l_off = (la + 4.0 * l.inductance(c, scale) + lb) / 6.0;
        return p;
    }
    p.l_on = wl_on / w_on;
    p.l_off = wl_off / w_off;
    for (int k = 0; k < 8; ++k) {
        const double a = g_on[k] * (l_n[k] - p.l_on) * h;
        const double b = g_off[k] * (l_n[k] - p.l_off) * h;
        p.dq_on += a * i_n[k];
        p.dq2_on += a * i_n[k] * i_n[k];
        p.dq_off += b * i_n[k];
        p.dq2_off += b * i_n[k] * i_n[k];
    }
    return p;
}

// PWM with a capacitor across the load: the state is (i_L, v_C), linear within each interval
// (diode as its fitted line, L at the interval's effective value), x' = A·x + b. Each interval is
// solved exactly with the closed-form 2×2 matrix exponential e^{At} = e^{μt}·(c·I + s·(A − μI)),
// μ = tr A/2, δ² = μ² − det A, c = cosh δt, s = sinh(δt)/δ (cos/sin for δ² < 0) (Cayley–Hamilton),
// around the interval's equilibrium x* = −A⁻¹b; the periodic state solves the 2×2 fixed point
// x0 = Φ_off·(Φ_on·x0 + g_on) + g_off. ∫i dt exactly (charge_i), and the squares exactly too
// (a Lyapunov equation per interval, in pwm_wave2).
struct Lin2 {
    double a11, a12, a21, a22, b1, b2;
};
struct Output2 {
    double alpha, beta, gamma, r; // v_o = alpha·v_C + beta·i_L + gamma; i_load = (v_o − v0)/r
    double v0;
    double i_load(double i, double v) const { return (alpha * v + beta * i + gamma - v0) / r; }
};
struct Mat2 {
    double m11, m12, m21, m22;
};
// Below ln(2)/2 the C library's cosh(x) is 1 + e²/(2(1 + e)) with e = expm1(x), and below 1 its
// sinh(x) is (2e − e²/(e + 1))/2 (fdlibm, which glibc follows).
constexpr double cosh_by_expm1 = 0.5 * std::numbers::ln2;
Mat2 expm2(const Lin2& a, double t) {
    const double mu = 0.5 * (a.a11 + a.a22);
    const double det = a.a11 * a.a22 - a.a12 * a.a21;
    const double d2 = mu * mu - det;
    double c, sn;
    if (d2 > 0.0) {
        const double dl = std::sqrt(d2);
        const double x = dl * t;
        if (x > 1e-8 && x < cosh_by_expm1) {
            // cosh and sinh from one expm1, as the C library forms each of them from its own
            // (fdlibm's e_cosh.c and e_sinh.c): the same values for half the calls.
            const double e = std::expm1(x);
            c = 1.0 + e * e / (2.0 * (1.0 + e));
            sn = 0.5 * (2.0 * e - e * e / (e + 1.0)) / dl;
        } else {
            c = std::cosh(x);
            sn = x > 1e-8 ? std::sinh(x) / dl : t;
        }
    } else if (d2 < 0.0) {
        const double dl = std::sqrt(-d2);
        c = std::cos(dl * t);
        sn = dl * t > 1e-8 ? std::sin(dl * t) / dl : t;
    } else {
        c = 1.0;
        sn = t;
    }
    const double em = std::exp(mu * t);
    return {em * (c + sn * (a.a11 - mu)), em * sn * a.a12, em * sn * a.a21,
            em * (c + sn * (a.a22 - mu))};
}
// ∫i dt over an interval that runs from state (i0, v0) to (i1, v1): integrating x' = A·x + b gives
// ∫x dt = A⁻¹·(x1 − x0) − A⁻¹·b·t = A⁻¹·(x1 − x0) + x*·t, exact and free of quadrature.
double charge_i(const Lin2& a, double eq_i, double i0, double v0, double i1, double v1, double t) {
    const double det = a.a11 * a.a22 - a.a12 * a.a21;
    return (a.a22 * (i1 - i0) - a.a12 * (v1 - v0)) / det + eq_i * t;
}
// Equilibrium −A⁻¹b.
void equilibrium(const Lin2& a, double& i, double& v) {
    const double det = a.a11 * a.a22 - a.a12 * a.a21;
    i = -(a.a22 * a.b1 - a.a12 * a.b2) / det;
    v = -(-a.a21 * a.b1 + a.a11 * a.b2) / det;
}
struct Wave2 {
    bool ok = false;
    double i0 = 0.0, v0 = 0.0, i_peak = 0.0;
    double q_on = 0.0, q2_on = 0.0, q_off = 0.0, q2_off = 0.0;
    double load_min = 0.0, load_max = 0.0, load_q2 = 0.0, cap_q2 = 0.0; // ∫ over the period
    double v_peak = 0.0; // capacitor voltage at the peak (the off interval's start)
    double e1i = 0.0, e1v = 0.0, e2i = 0.0, e2v = 0.0; // the on and off intervals' equilibria
};
// The load current's extremes inside one interval of a two-state cycle: where its slope g·u'
// is zero, u(τ) = e^{Aτ}·u0 relative to the equilibrium (g the load's gradient over the state).
// With N = A − μ·I, N² = δ²·I, e^{Aτ} = e^{μτ}·(cosh δτ·I + sinh δτ/δ·N), so the slope is zero
// where cosh δτ·p + sinh δτ/δ·q = 0, p = g·A·u0, q = g·A·N·u0: once at most, τ = atanh(−δp/q)/δ,
// for real δ; every π/|δ| from atan(−|δ|p/q)/|δ| for imaginary δ; −p/q for δ = 0.
void interval_crests(const Lin2& a, double gi, double gv, const Output2& o, double ei, double ev,
                     double ui, double uv, double t, double& lo, double& hi) {
    auto slope = [&](double xi, double xv) {
        return gi * (a.a11 * xi + a.a12 * xv) + gv * (a.a21 * xi + a.a22 * xv);
    };
    const double mu = 0.5 * (a.a11 + a.a22);
    const double d2 = mu * mu - (a.a11 * a.a22 - a.a12 * a.a21);
    const double p = slope(ui, uv);
    const double q = slope((a.a11 - mu) * ui + a.a12 * uv, a.a21 * ui + (a.a22 - mu) * uv);
    auto take = [&](double tau) {
        if (!(tau > 0.0 && tau < t)) return;
        const Mat2 e = expm2(a, tau);
        const double il = o.i_load(ei + e.m11 * ui + e.m12 * uv, ev + e.m21 * ui + e.m22 * uv);
        lo = std::min(lo, il);
        hi = std::max(hi, il);
    };
    if (q == 0.0) return;
    if (d2 > 0.0) {
        const double dl = std::sqrt(d2);
        const double z = -dl * p / q;
        if (std::abs(z) < 1.0) take(std::atanh(z) / dl);
    } else if (d2 < 0.0) {
        const double dl = std::sqrt(-d2);
        double x = std::atan(-dl * p / q);
        if (x <= 0.0) x += std::numbers::pi;
        for (int k = 0; k < 64 && x / dl < t; ++k, x += std::numbers::pi) take(x / dl);
    } else {
        take(-p / q);
    }
}

// Gaussian elimination with partial pivoting on a 3×3 system (augmented, row by row).
bool solve3(double (&m)[3][4], double (&x)[3]) {
    for (int c = 0; c < 3; ++c) {
        int p = c;
        for (int r = c + 1; r < 3; ++r)
            if (std::abs(m[r][c]) > std::abs(m[p][c])) p = r;
        if (!(std::abs(m[p][c]) > 0.0)) return false;
        if (p != c)
            for (int k = 0; k < 4; ++k) std::swap(m[c][k], m[p][k]);
        for (int r = c + 1; r < 3; ++r) {
            const double f = m[r][c] / m[c][c];
            for (int k = c; k < 4; ++k) m[r][k] -= f * m[c][k];
        }
    }
    for (int c = 2; c >= 0; --c) {
        double v = m[c][3];
        for (int k = c + 1; k < 3; ++k) v -= m[c][k] * x[k];
        x[c] = v / m[c][c];
    }
    return true;
}

// The periodic cycle at duty d: its states and charges (what the duty search needs).
Wave2 pwm_wave2(const Lin2& on, const Lin2& off, double period, double d) {
    Wave2 w;
    const double t1 = d * period, t2 = period - t1;
    const Mat2 p1 = expm2(on, t1), p2 = expm2(off, t2);
    double e1i, e1v, e2i, e2v;
    equilibrium(on, e1i, e1v);
    equilibrium(off, e2i, e2v);
    w.e1i = e1i;
    w.e1v = e1v;
    w.e2i = e2i;
    w.e2v = e2v;
    // x0 = e2 + P2·(e1 + P1·(x0 − e1) − e2) => (I − P2·P1)·x0 = e2 − P2·e2 + P2·e1 − P2·P1·e1.
    const Mat2 m{p2.m11 * p1.m11 + p2.m12 * p1.m21, p2.m11 * p1.m12 + p2.m12 * p1.m22,
                 p2.m21 * p1.m11 + p2.m22 * p1.m21, p2.m21 * p1.m12 + p2.m22 * p1.m22};
    const double di = e1i - e2i, dv = e1v - e2v;
    const double ri = e2i + p2.m11 * di + p2.m12 * dv - (m.m11 * e1i + m.m12 * e1v);
    const double rv = e2v + p2.m21 * di + p2.m22 * dv - (m.m21 * e1i + m.m22 * e1v);
    const double a11 = 1.0 - m.m11, a12 = -m.m12, a21 = -m.m21, a22 = 1.0 - m.m22;
    const double det = a11 * a22 - a12 * a21;
    if (!(std::abs(det) > 0.0)) return w;
    w.i0 = (a22 * ri - a12 * rv) / det;
    w.v0 = (a11 * rv - a21 * ri) / det;
    const double xi1 = e1i + p1.m11 * (w.i0 - e1i) + p1.m12 * (w.v0 - e1v);
    const double xv1 = e1v + p1.m21 * (w.i0 - e1i) + p1.m22 * (w.v0 - e1v);
    w.i_peak = xi1;
    w.v_peak = xv1;
    w.q_on = charge_i(on, e1i, w.i0, w.v0, xi1, xv1, t1);
    w.q_off = charge_i(off, e2i, xi1, xv1, w.i0, w.v0, t2);
    w.ok = std::isfinite(w.q_on) && std::isfinite(w.q_off) && w.i0 > 0.0;
    return w;
}

// The squares and the load's extremes at the interval ends, added to a cycle of pwm_wave2.
void pwm_squares(Wave2& w, const Lin2& on, const Lin2& off, const Output2& o, double period,
                 double d) {
    const double t1 = d * period, t2 = period - t1;
    const double e1i = w.e1i, e1v = w.e1v, e2i = w.e2i, e2v = w.e2v;
    const double xi1 = w.i_peak, xv1 = w.v_peak;
    // The squares exactly: with u = x − x* (u' = A·u), ∫u dt = A⁻¹·(u1 − u0) and X = ∫u·uᵀ dt
    // solves the Lyapunov equation A·X + X·Aᵀ = u1·u1ᵀ − u0·u0ᵀ (A is stable: its resistances
    // damp it, so λi + λj != 0). Any current affine in the state, c + g·u, then has
    // ∫(c + g·u)² dt = c²·t + 2c·g·∫u + gᵀ·X·g. The load's extremes are at the interval ends or
    // at its crests (load_crests adds those).
    const double gi = o.beta / o.r, gv = o.alpha / o.r; // ∂i_load/∂i_L, ∂i_load/∂v_C
    w.load_min = std::min(o.i_load(w.i0, w.v0), o.i_load(xi1, xv1));
    w.load_max = std::max(o.i_load(w.i0, w.v0), o.i_load(xi1, xv1));
    auto squares = [&](const Lin2& a, double ei, double ev, double xi0, double xv0, double xi1_,
                       double xv1_, double t, double& q2) {
        const double ui0 = xi0 - ei, uv0 = xv0 - ev, ui1 = xi1_ - ei, uv1 = xv1_ - ev;
        const double da = a.a11 * a.a22 - a.a12 * a.a21;
        const double si = (a.a22 * (ui1 - ui0) - a.a12 * (uv1 - uv0)) / da; // ∫u dt
        const double sv = (a.a11 * (uv1 - uv0) - a.a21 * (ui1 - ui0)) / da;
        // [2a11 2a12 0; a21 a11+a22 a12; 0 2a21 2a22]·(x11, x12, x22) = (r11, r12, r22).
        double ly[3][4] = {{2.0 * a.a11, 2.0 * a.a12, 0.0, ui1 * ui1 - ui0 * ui0},
                           {a.a21, a.a11 + a.a22, a.a12, ui1 * uv1 - ui0 * uv0},
                           {0.0, 2.0 * a.a21, 2.0 * a.a22, uv1 * uv1 - uv0 * uv0}};
        double x[3];
        if (!solve3(ly, x)) {
            q2 = std::numeric_limits<double>::quiet_NaN();
            return;
        }
        const double x11 = x[0], x12 = x[1], x22 = x[2];
        auto sq = [&](double c, double g1, double g2) {
            return c * c * t + 2.0 * c * (g1 * si + g2 * sv) +
                   (g1 * g1 * x11 + 2.0 * g1 * g2 * x12 + g2 * g2 * x22);
        };
        q2 = sq(ei, 1.0, 0.0);
        const double c_load = o.i_load(ei, ev);
        w.load_q2 += sq(c_load, gi, gv);
        w.cap_q2 += sq(ei - c_load, 1.0 - gi, -gv);
    };
    squares(on, e1i, e1v, w.i0, w.v0, xi1, xv1, t1, w.q2_on);
    squares(off, e2i, e2v, xi1, xv1, w.i0, w.v0, t2, w.q2_off);
    w.ok = w.ok && std::isfinite(w.q2_on) && std::isfinite(w.q2_off);
}

// The load's p-p of a full pwm_wave2 cycle at duty d: its values at the interval ends with the
// crests inside each interval.
double load_crests(const Wave2& x, const Lin2& on, const Lin2& off, const Output2& o, double period,
                   double d) {
    const double gi = o.beta / o.r, gv = o.alpha / o.r; // ∂i_load/∂i_L, ∂i_load/∂v_C
    double lo = x.load_min, hi = x.load_max;
    interval_crests(on, gi, gv, o, x.e1i, x.e1v, x.i0 - x.e1i, x.v0 - x.e1v, d * period, lo, hi);
    interval_crests(off, gi, gv, o, x.e2i, x.e2v, x.i_peak - x.e2i, x.v_peak - x.e2v,
                    (1.0 - d) * period, lo, hi);
    return hi - lo;
}

// Brent's method (R. P. Brent, Algorithms for Minimization without Derivatives, 1973, ch. 4):
// bracketed root of f on [a, b] with f(a)·f(b) <= 0.
template <class F>
double brent_root(F&& f, double a, double b, double fa, double fb, double xtol, double ftol,
                  int max_it) {
    if (std::abs(fa) < std::abs(fb)) {
        std::swap(a, b);
        std::swap(fa, fb);
    }
    double c = a, fc = fa, d = b - a, e = d;
    for (int it = 0; it < max_it; ++it) {
        if (std::abs(fb) <= ftol) return b;
        if ((fb > 0.0) == (fc > 0.0)) {
            c = a;
            fc = fa;
            d = e = b - a;
        }
        if (std::abs(fc) < std::abs(fb)) {
            a = b;
            b = c;
            c = a;
            fa = fb;
            fb = fc;
            fc = fa;
        }
        const double tol = 2.0 * 1e-16 * std::abs(b) + 0.5 * xtol;
        const double m = 0.5 * (c - b);
        if (std::abs(m) <= tol) return b;
        if (std::abs(e) >= tol && std::abs(fa) > std::abs(fb)) {
            // Inverse quadratic interpolation (secant when only two points differ).
            double p, q;
            const double s = fb / fa;
            if (a == c) {
                p = 2.0 * m * s;
                q = 1.0 - s;
            } else {
                const double qq = fa / fc, r = fb / fc;
                p = s * (2.0 * m * qq * (qq - r) - (b - a) * (r - 1.0));
                q = (qq - 1.0) * (r - 1.0) * (s - 1.0);
            }
            if (p > 0.0) q = -q;
            else p = -p;
            if (2.0 * p < std::min(3.0 * m * q - std::abs(tol * q), std::abs(e * q))) {
                e = d;
                d = p / q;
            } else {
                d = e = m;
            }
        } else {
            d = e = m;
        }
        a = b;
        fa = fb;
        b += std::abs(d) > tol ? d : (m > 0.0 ? tol : -tol);
        fb = f(b);
    }
    return b;
}

// The averaged model's dI/dD (Erickson & Maksimović 2nd ed. ch. 3) for two intervals whose
// sources differ by `de` (E_on − E_off) and whose series resistances, the load's included, are
// r_on and r_off: I·(r_off + (r_on − r_off)·D) = D·E_on + (1 − D)·E_off.
double averaged_duty_slope(double de, double r_on, double r_off, double current, double duty) {
    return (de - (r_on - r_off) * current) / (r_off + (r_on - r_off) * duty);
}

// The duty searches stop when the average current is this close to its target (relative).
constexpr double duty_current_tol = 1e-10;

// A root of an increasing f by secant steps from x0 with a first slope guess, within (d_min,
// d_max); 0 when it does not reach |f| <= ftol in a few steps (the caller then brackets).
template <class F> double secant_root(F&& f, double x0, double slope, double ftol) {
    double x = x0, fx = f(x);
    for (int k = 0; k < 6; ++k) {
        if (std::abs(fx) <= ftol) return x;
        if (!(slope > 0.0) || !std::isfinite(slope) || !std::isfinite(fx)) return 0.0;
        const double xn = x - fx / slope;
        if (!(xn > d_min && xn < d_max)) return 0.0;
        const double fn = f(xn);
        if (fn != fx && xn != x) slope = (fn - fx) / (xn - x);
        x = xn;
        fx = fn;
    }
    return std::abs(fx) <= ftol ? x : 0.0;
}

// Duty for an average current `target`; false when even d_max cannot reach it.
bool solve_duty(const Segment& on, const Segment& off, double period, double target, double guess,
                double step, double& duty) {
    auto g = [&](double d) {
        const Wave w = pwm_wave(on, off, period, d, false);
        return (w.q_on + w.q_off) / period - target;
    };
    // Secant steps from the guess on the averaged model's slope mostly meet the tolerance in two
    // or three solves; the bracket and Brent take over when they do not (DCM bends the curve).
    const double ftol = duty_current_tol * target;
    const double slope = averaged_duty_slope(on.e - off.e, on.r, off.r, target, guess);
    if (const double d = secant_root(g, std::clamp(guess, d_min, d_max), slope, ftol); d > 0.0) {
        duty = d;
        return true;
    }
    double a = std::clamp(guess - step, d_min, d_max);
    double b = std::clamp(guess + step, d_min, d_max);
    double fa = g(a), fb = g(b);
    while (fa > 0.0 && a > d_min) {
        b = a;
        fb = fa;
        step *= 4.0;
        a = std::max(d_min, a - step);
        fa = g(a);
    }
    while (fb < 0.0 && b < d_max) {
        a = b;
        fa = fb;
        step *= 4.0;
        b = std::min(d_max, b + step);
        fb = g(b);
    }
    if (fb < 0.0 || fa > 0.0) return false;
    duty = brent_root(g, a, b, fa, fb, 1e-13, ftol, 100);
    return true;
}

// --- the corner ------------------------------------------------------------------------------

CornerResult fail(CornerResult r, CornerStatus status, std::string reason) {
    r.status = status;
    r.reason = std::move(reason);
    return r;
}

// Load ripple path at the switching frequency (fundamental only): the inductor ripple splits
// between the load's dynamic resistance r and the capacitor branch Z_c = ESR + 1/(jωC)
// (current divider). k = |Z_c/(Z_c + r)| is the share through the load; the ripple sees the
// parallel impedance, whose real part is the power it dissipates (load share + ESR share).
struct RipplePath {
    double k_load = 1.0;   // |I_load,ripple / I_L,ripple|
    double k_cap2 = 0.0;   // |I_cap,ripple / I_L,ripple|²
    double r_ripple = 0.0; // Ω, Re(r ∥ Z_c): what the ripple current works against
};

RipplePath ripple_path(double r, double capacitance, double esr, double frequency) {
    RipplePath p;
    p.r_ripple = r;
    if (!(capacitance > 0.0) || !(r > 0.0) || !(frequency > 0.0)) return p;
    // In real arithmetic (X = 1/(ωC), Z_c = ESR − jX): no complex division on the hot path.
    const double x = 1.0 / (2.0 * std::numbers::pi * frequency * capacitance);
    const double rs = r + esr;
    const double sum2 = rs * rs + x * x; // |Z_c + r|²
    if (!std::isfinite(sum2)) return p;  // the capacitor is open at this frequency
    p.k_load = std::sqrt((esr * esr + x * x) / sum2);
    p.k_cap2 = r * r / sum2;
    p.r_ripple = r * (esr * rs + x * x) / sum2; // Re(r·Z_c·conj(Z_c + r))/|Z_c + r|²
    return p;
}

// Core loss of a cycle. iGSE with a resting flux (DCM): the rest adds no loss, so the loss is
// that of the active part's frequency scaled by its share of the period (Venkatachalam et al.,
// COMPEL 2002, the iGSE integral taken over the period).
double core_loss(const parts::InductorModel& l, const Wave& w) {
    const double ripple = w.i_peak - w.i_valley;
    const double t_active = w.t_on + w.t_off;
    const double tp = w.period();
    if (!(t_active > 0.0) || !(tp > 0.0)) return 0.0;
    if (w.t_idle > 0.0)
        return l.core_loss(ripple, 1.0 / t_active, w.t_on / t_active) * t_active / tp;
    return l.core_loss(ripple, 1.0 / tp, w.t_on / tp);
}

// Steps of a scalar fixed point x <- g(x). When the updates shrink geometrically with one sign
// (ratio rho in (0.05, 0.95)) the remaining steps sum to ω·d/(1 − rho) (Aitken's extrapolation;
// with damping ω the ratio is 1 − ω·(1 − g')); otherwise a plain or damped step. Large steps
// extrapolate on one ratio; steps nearer the tolerance, where the other states' noise shows, only
// when two successive ratios agree. Never twice in a row (the step after an extrapolation is not
// part of the geometric sequence).
// A temperature map can have two balances: a stable one and, above it, an unstable one where
// leakage (or copper) heats faster than the part sheds heat. Iterated from the ambient, as the
// part warms from cold, the plain steps reach the stable one; an extrapolation can jump past both.
// So a jump stays unconfirmed until the map is seen to contract after it, and the caller goes
// back to where the plain step would have gone (below the stable balance) when it does not.
struct FixedPointSteps {
    double big = 0.0;   // a step above this extrapolates on one ratio
    double small = 0.0; // a step above this extrapolates on two agreeing ratios
    double tol = 0.0;   // settled within this
    double d_prev = 0.0, rho_prev = 0.0;
    bool jumps = true;        // extrapolation allowed (off after going back once)
    bool unconfirmed = false; // the last extrapolation is not yet confirmed
    bool seen_after = false;  // one step after it has been seen
    double d_after = 0.0;     // that step
    double before_jump = 0.0; // where the plain step would have gone instead
    bool first = false;       // the unconfirmed step is the first one (first_step)

    double step(double d, double omega) {
        const double rho = d_prev != 0.0 ? d / d_prev : 0.0;
        const bool geometric = rho > 0.05 && rho < 0.95;
        const bool agreed = rho_prev > 0.0 && std::abs(rho - rho_prev) <= 0.15 * rho;
        if (jumps && geometric && (std::abs(d) > big || (std::abs(d) > small && agreed))) {
            d_prev = rho_prev = 0.0;
            return omega * d / (1.0 - rho);
        }
        rho_prev = rho;
        d_prev = d;
        return omega * d;
    }
    // x <- x + step, keeping what going back after a jump needs.
    double next(double x, double d, double omega) {
        const double plain = x + omega * d;
        const double moved = x + step(d, omega);
        if (moved != plain) {
            first = false;
            unconfirmed = true;
            seen_after = false;
            before_jump = plain;
        }
        return moved;
    }
    // Within the tolerance of the balance: a step below it, and, when the steps shrink with one
    // sign at ratio rho, the rest of them (d·rho/(1 − rho), the a-posteriori bound of a
    // contraction) too; steps that do not shrink are no sign of a balance near.
    bool settled(double d) const {
        if (!(std::abs(d) < tol)) return false;
        const double rho = d_prev != 0.0 ? d / d_prev : 0.0;
        // Steps at the round-off floor of the electrical solve carry no ratio worth reading.
        if (rho <= 0.0 || std::abs(d) < 1e-3 * tol) return true;
        return rho < 1.0 && std::abs(d) * rho / (1.0 - rho) < tol;
    }
    // True when the steps after a jump grow with one sign: it landed past an unstable balance.
    bool landed_past(double d) {
        if (!unconfirmed) return false;
        if (!seen_after) {
            seen_after = true;
            d_after = d;
            return false;
        }
        unconfirmed = first = false;
        return d * d_after > 0.0 && std::abs(d) > std::abs(d_after);
    }
    // The first step is taken on a guessed waveform (the linearisation has not settled), so it
    // can overshoot the way a jump does: it stays unconfirmed too, going back to where it began.
    void first_step(double from) {
        d_prev = rho_prev = 0.0; // a guessed waveform's step gives no ratio to extrapolate on
        unconfirmed = true;
        seen_after = false;
        before_jump = from;
        first = true;
    }
    void go_back(double& x) {
        x = before_jump;
        if (!first) jumps = false; // a jump that landed past: plain steps from here on
        first = false;
        unconfirmed = false;
        d_prev = rho_prev = 0.0;
    }
};

} // namespace

CornerResult evaluate_corner(const design::Design& d, const parts::InductorModel& l,
                             const parts::DiodeModel& diode, const Corner& c, const Setting& s) {
    CornerResult res;
    res.name = c.name;
    res.vin = c.vin;
    res.ambient = c.ambient;
    res.v_reverse = c.vin;
    res.t_switch = c.ambient + switch_temperature_rise;
    res.t_inductor = c.ambient;
    res.tj_diode = c.ambient;

    const double target = c.point.current;
    const double amb = c.ambient;
    const double vin = c.vin;
    if (!(target > 0.0))
        return fail(res, CornerStatus::no_regulation,
                    "load point \"" + c.point.name + "\" asks for " +
                        fmt(target, Dimension::current) +
                        "; a target current above zero is needed");
    if (!(l.l0 > 0.0) || !(l.isat > 0.0))
        return fail(res, CornerStatus::no_convergence,
                    "the inductor model has no positive inductance and saturation current");

    const bool hysteretic = d.control.mode == design::ControlMode::hysteretic;
    double i_lo = 0.0, i_hi = 0.0, period = 0.0;
    const double td = std::max(0.0, d.control.delay);
    if (hysteretic) {
        const double band = std::max(s.band, 1e-6 * target); // a zero band still switches (delay)
        i_lo = target - 0.5 * band;
        i_hi = target + 0.5 * band;
        if (!(i_lo > 0.0))
            return fail(res, CornerStatus::no_regulation,
                        "the hysteresis band " + fmt(band, Dimension::current) +
                            " is at least twice the target current " +
                            fmt(target, Dimension::current) +
                            ": the lower threshold is not above zero, so the switch never turns on "
                            "again");
    } else {
        const double f = s.frequency > 0.0 ? s.frequency : d.control.frequency;
        if (!(f > 0.0))
            return fail(res, CornerStatus::no_convergence,
                        "PWM control needs a switching frequency above zero (control.frequency)");
        period = 1.0 / f;
    }

    double cap_c = 0.0, cap_esr = 0.0;
    if (d.output_capacitor) {
        cap_c = d.output_capacitor->capacitance;
        cap_esr = d.output_capacitor->esr;
    }
    if (s.capacitance) cap_c = *s.capacitance;
    const bool capacitor = cap_c > 0.0 && c.point.r > 0.0;

    const double ron = switch_on_resistance(d.sw, c.ambient);
    const double r_sense = std::max(0.0, d.sense_resistor);
    const double v0 = c.point.v0;
    const double r_load = std::max(0.0, c.point.r);

    // Fixed-point state. The junction starts at the ambient, as at power-up: where the diode's
    // leakage gives it a second, hot balance, this finds the one a real part settles at (a start
    // nearer the answer, or from a neighbouring setting, can land on the other). The winding has
    // one balance (its loss only grows with temperature), so any start finds it: it starts at
    // the rise its DC copper loss at the ambient gives, near the balance (below it unless a
    // hysteretic average sits under its target), which saves a pass.
    double t_l = amb + l.rth * l.dcr(amb, c.dcr_max) * target * target, tj = amb;
    double lin_lo = hysteretic ? i_lo : 0.9 * target;
    double lin_hi = hysteretic ? i_hi : 1.1 * target;
    double i_avg_prev = target;
    const double l_eff = l.inductance(target, c.l_scale);
    const double vo_target = v0 + r_load * target; // the load's voltage at the target
    const bool lossless_ok = vin > vo_target && vo_target > 0.0 && l_eff > 0.0;
    // First linearisation spans near the answer's: the valley and peak, which the roll-off's
    // effective L (and under PWM its charge correction) are taken over, then settle in fewer
    // passes. Hysteretic: the thresholds plus the delay's overshoots t_d·V/L; PWM: the lossless
    // CCM ripple (Vin − Vo)·D/(L·f), D = Vo/Vin (domain notes).
    if (lossless_ok && hysteretic) {
        lin_hi = i_hi + td * (vin - vo_target) / l_eff;
        lin_lo = std::max(0.0, i_lo - td * vo_target / l_eff);
    } else if (lossless_ok) {
        const double half =
            std::min(0.5 * (vin - vo_target) * (vo_target / vin) * period / l_eff, target);
        lin_lo = target - half;
        lin_hi = target + half;
    }
    // Straight-line lossless estimate (domain notes) only to start the capacitor's divider.
    double f_prev = 0.0;
    if (hysteretic) {
        const double di = i_hi - i_lo + td * vin / l_eff;
        f_prev = lossless_ok ? vo_target * (vin - vo_target) / (vin * l_eff * di) : 1e5;
    } else {
        f_prev = 1.0 / period;
    }
    double duty_prev = -1.0;
    double omega = 1.0;
    FixedPointSteps steps_l{20.0 * temperature_tol, 2.0 * temperature_tol, temperature_tol};
    FixedPointSteps steps_j = steps_l;
    const double tol_i = current_tol * target;
    FixedPointSteps steps_q{20.0 * tol_i * period, 2.0 * tol_i * period}; // PWM charge correction

    // Quantities of the last electrical solve, used after the loop.
    Wave w;
    double dcr = 0.0, rd = 0.0, vd0 = 0.0;
    RipplePath path;
    Segment on, off;
    Segment prev_off; // off segment of the previous pass: dt/di weights of the diode fit
    bool have_prev_off = false;
    double e_cond = 0.0; // J per cycle, ∫ V_f(i)·i dt over the diode's interval
    double copper = 0.0, core = 0.0, leak = 0.0;
    double t_l_new = amb, tj_new = amb;
    bool converged = false;
    int iterations = 0;
    // The last two steps of each temperature: still rising when the loop gives up?
    double dj_last = 0.0, dj_before = 0.0, dl_last = 0.0, dl_before = 0.0;
    // PWM with a capacitor: the cycle is the two-state solution (load and capacitor together).
    bool two_state = false;
    double dq_used = 0.0; // A·s, relaxed charge correction of the PWM roll-off
    // The last two-state cycle: its load's mean squares and, once the loop has converged, its
    // crests.
    Lin2 last_on{}, last_off{};
    Output2 last_out{};
    Wave2 last_wave{};
    double last_duty = 0.0;
    double core_ripple = -1.0, core_f = 0.0, core_duty = 0.0; // inputs of the cached core loss

    for (int it = 0; it < max_iterations; ++it) {
        iterations = it + 1;
        dcr = l.dcr(t_l, c.dcr_max);

        // Diode V_f at five currents over the present ripple (the fit and Simpson's rule share
        // them), from the SPICE forward law at this junction temperature (IS(T) once).
        const parts::ForwardLaw law = diode.forward_at(tj);
        double node[5], vnode[5];
        const double h = 0.25 * (lin_hi - lin_lo);
        for (int k = 0; k < 5; ++k) {
            node[k] = lin_lo + h * k;
            vnode[k] = law.vf(node[k]);
        }
        // Straight line V_d0 + r_d·i fitted by least squares in time over the diode's interval
        // (Simpson weights × dt/di of the previous cycle): it keeps both the diode's volt-seconds
        // and its energy ∫V_f·i dt, so the waveform's energy balance holds with the true V_f.
        bool fitted = false;
        if (lin_hi - lin_lo > 1e-9 * target) {
            double m0 = 0.0, m1 = 0.0, m2 = 0.0, s0 = 0.0, s1 = 0.0;
            for (int k = 0; k < 5; ++k) {
                const double i = node[k];
                const double wk = (k == 0 || k == 4) ? 1.0 : (k % 2 == 1 ? 4.0 : 2.0);
                const double lg = l.inductance(i, c.l_scale);
                const double g = have_prev_off ? lg / -prev_off.v(i) : 1.0;
                const double wg = wk * (g > 0.0 && std::isfinite(g) ? g : 0.0);
                m0 += wg;
                m1 += wg * i;
                m2 += wg * i * i;
                s0 += wg * vnode[k];
                s1 += wg * vnode[k] * i;
            }
            const double det = m0 * m2 - m1 * m1;
            if (det > 1e-12 * m0 * m2) {
                rd = (m0 * s1 - m1 * s0) / det;
                vd0 = (s0 * m2 - m1 * s1) / det;
                fitted = rd >= 0.0 && std::isfinite(rd) && std::isfinite(vd0);
            }
        }
        if (!fitted) {
            const double im = std::max(node[2], 1e-9 * target);
            rd = (law.vf(im * (1.0 + 1e-4)) - law.vf(im * (1.0 - 1e-4))) / (2e-4 * im);
            vd0 = law.vf(im) - rd * im;
        }

        path =
            capacitor ? ripple_path(r_load, cap_c, cap_esr, f_prev) : RipplePath{1.0, 0.0, r_load};
        // The load voltage the inductor sees: DC at v0 + r·I, ripple through r ∥ Z_c.
        const double v0_eff = v0 + (r_load - path.r_ripple) * i_avg_prev;
        on = Segment{vin - v0_eff, path.r_ripple + ron + r_sense + dcr, 0.0};
        off = Segment{-(v0_eff + vd0), path.r_ripple + r_sense + dcr + rd, 0.0};
        prev_off = off;
        have_prev_off = true;

        const double i_need = hysteretic ? i_hi : target;
        const double i_reach = on.r > 0.0 ? on.e / on.r : (on.e > 0.0 ? 1e300 : -1e300);
        res.regulation_headroom = std::clamp((i_reach - i_need) / i_need, -1e6, 1e6);
        if (!(on.v(i_need) > 0.0)) {
            const double vload = v0 + r_load * i_need;
            return fail(res, CornerStatus::no_regulation,
                        "the supply " + fmt(vin, Dimension::voltage) + " cannot drive " +
                            fmt(i_need, Dimension::current) + " through the load (" +
                            fmt(vload, Dimension::voltage) + " at that current) and the " +
                            fmt(on.r, Dimension::resistance) +
                            " of the switch, sense resistor, winding and load: the on-interval "
                            "current tends to " +
                            fmt(std::max(0.0, i_reach), Dimension::current) + ", below the " +
                            (hysteretic ? "upper threshold" : "target"));
        }
        if (!(off.v(hysteretic ? i_lo : 0.0) < 0.0))
            return fail(res, CornerStatus::no_regulation,
                        "the load and diode voltage cannot bring the inductor current down to the "
                        "lower threshold " +
                            fmt(i_lo, Dimension::current));

        Inductance ind{l, c.l_scale, true, l_eff};
        if (hysteretic) {
            const double la = l.inductance(lin_lo, c.l_scale);
            const double lb = l.inductance(lin_hi, c.l_scale);
            ind.flat = std::abs(la - lb) <= flat_inductance * std::max(la, lb);
            ind.l_flat = ind.flat ? l.inductance(0.5 * (lin_lo + lin_hi), c.l_scale) : 0.0;
            w = hysteretic_wave(on, off, i_lo, i_hi, td, ind);
        } else {
            const PwmInductance pl = pwm_inductance(l, c.l_scale, on, off, lin_lo, lin_hi);
            on.l = pl.l_on;
            off.l = pl.l_off;
            // The charge correction enters relaxed (half steps): fed back at once it makes the
            // outer fixed point oscillate deep in the roll-off. Half steps shrink by half each
            // pass, so the extrapolation ends the geometric tail once it shows.
            dq_used += steps_q.step(0.5 * (pl.dq_on + pl.dq_off - dq_used), 1.0);
            const double share_on =
                pl.dq_on + pl.dq_off != 0.0 ? pl.dq_on / (pl.dq_on + pl.dq_off) : 0.5;
            const double target_lin = target - dq_used / period;
            double duty = 0.0;
            // With a capacitor the two-state solution replaces the single-state one; once a pass
            // has it, the next starts from its duty and needs no single-state solve.
            auto two_state_solve = [&](double center, double half) {
                const double den = r_load + cap_esr;
                const Output2 o{r_load / den, r_load * cap_esr / den, cap_esr * v0 / den, r_load,
                                v0};
                auto lin = [&](double e, double rs, double lx) {
                    return Lin2{-(rs + o.beta) / lx,
                                -o.alpha / lx,
                                (1.0 - o.beta / r_load) / cap_c,
                                -o.alpha / (r_load * cap_c),
                                (e - o.gamma) / lx,
                                (v0 - o.gamma) / (r_load * cap_c)};
                };
                const Lin2 a_on = lin(vin, ron + r_sense + dcr, on.l);
                const Lin2 a_off = lin(-vd0, r_sense + dcr + rd, off.l);
                Wave2 x;           // the last cycle the search solved
                double x_d = -1.0; // at this duty
                auto g2 = [&](double dd) {
                    x = pwm_wave2(a_on, a_off, period, dd);
                    x_d = dd;
                    return (x.q_on + x.q_off) / period - target_lin;
                };
                // The mean current is nearly linear in the duty: a Newton step from the centre on
                // the averaged model's slope (Erickson & Maksimović 2nd ed. ch. 3), then secant
                // steps, mostly meet the tolerance in two or three solves; Brent on a bracket
                // takes over when they do not.
                const double ftol = duty_current_tol * target;
                double d2 = secant_root(g2, std::clamp(center, d_min, d_max),
                                        averaged_duty_slope(vin + vd0, r_load + ron + r_sense + dcr,
                                                            r_load + r_sense + dcr + rd, target_lin,
                                                            center),
                                        ftol);
                if (!(d2 > 0.0)) {
                    double da = std::max(d_min, center - half);
                    double db = std::min(d_max, center + half);
                    double fa = g2(da), fb = g2(db);
                    for (int k = 0; k < 8 && fa > 0.0 && da > d_min; ++k)
                        fa = g2(da = std::max(d_min, da - 0.05));
                    for (int k = 0; k < 8 && fb < 0.0 && db < d_max; ++k)
                        fb = g2(db = std::min(d_max, db + 0.05));
                    if (!(fa <= 0.0 && fb >= 0.0)) return false;
                    d2 = brent_root(g2, da, db, fa, fb, 1e-13, ftol, 100);
                }
                if (x_d != d2) g2(d2);
                pwm_squares(x, a_on, a_off, o, period, d2);
                if (!(x.ok && x.i_peak > x.i0)) return false;
                duty = d2;
                w.dcm = false;
                w.i_valley = x.i0;
                w.i_peak = x.i_peak;
                w.t_on = d2 * period;
                w.t_off = period - w.t_on;
                w.t_idle = 0.0;
                w.q_on = x.q_on + share_on * dq_used;
                w.q2_on = x.q2_on + pl.dq2_on;
                w.q_off = x.q_off + (1.0 - share_on) * dq_used;
                w.q2_off = x.q2_off + pl.dq2_off;
                last_on = a_on;
                last_off = a_off;
                last_out = o;
                last_wave = x;
                last_duty = d2;
                return true;
            };
            const bool had_two_state = two_state;
            two_state = capacitor && had_two_state && two_state_solve(duty_prev, 2e-3);
            if (!two_state) {
                // First guess from the averaged model: I·(R1·D + R2·(1 − D)) = E1·D + E2·(1 − D).
                double guess = duty_prev > 0.0 ? duty_prev
                                               : (target * off.r - off.e) /
                                                     ((on.e - off.e) - target * (on.r - off.r));
                if (!std::isfinite(guess)) guess = 0.5;
                const double step = duty_prev > 0.0 ? 1e-3 : 0.02;
                if (!solve_duty(on, off, period, target_lin, std::clamp(guess, 1e-3, 0.999), step,
                                duty))
                    return fail(res, CornerStatus::no_regulation,
                                "no duty cycle below 100 % gives " +
                                    fmt(target, Dimension::current) + " from " +
                                    fmt(vin, Dimension::voltage));
                w = pwm_wave(on, off, period, duty, true);
                w.q_on += share_on * dq_used;
                w.q_off += (1.0 - share_on) * dq_used;
                w.q2_on += pl.dq2_on;
                w.q2_off += pl.dq2_off;
                if (capacitor && !w.dcm) two_state = two_state_solve(duty, 0.02);
            }
            duty_prev = duty;
        }

        const double tp = w.period();
        if (!(tp > 0.0) || !std::isfinite(tp))
            return fail(res, CornerStatus::no_convergence,
                        "the switching period came out as " + fmt(tp, Dimension::time));
        const double f = 1.0 / tp;
        const double i_avg = (w.q_on + w.q_off) * f;
        const double i_rms2 = (w.q2_on + w.q2_off) * f;
        const double rip2 = std::max(0.0, i_rms2 - i_avg * i_avg);

        // Diode conduction energy: composite Simpson over the diode's current range, ∫V_f·i dt =
        // ∫V_f(i)·i·L(i)/|v_L(i)| di (the off interval is monotone in current).
        {
            double sum = 0.0;
            for (int k = 0; k < 5; ++k) {
                const double i = node[k];
                const double lk = hysteretic ? ind.at(i) : l.inductance(i, c.l_scale);
                const double vl = -off.v(i);
                const double wk = (k == 0 || k == 4) ? 1.0 : (k % 2 == 1 ? 4.0 : 2.0);
                sum += wk * vnode[k] * i * lk / vl;
            }
            e_cond = std::max(0.0, sum * h / 3.0);
        }

        // Heating of the parts.
        copper = dcr * i_avg * i_avg + l.r_ac(f, t_l, c.dcr_max) * rip2;
        const double ripple = w.i_peak - w.i_valley;
        // The core loss does not depend on temperature and hardly moves between passes: it is
        // recomputed only when ripple, frequency or duty moved by more than 1e-4 (and once more
        // exactly after convergence).
        const double duty_now = w.t_on * f;
        if (core_ripple < 0.0 || std::abs(ripple - core_ripple) > 1e-4 * ripple ||
            std::abs(f - core_f) > 1e-4 * f || std::abs(duty_now - core_duty) > 1e-4) {
            core = core_loss(l, w);
            core_ripple = ripple;
            core_f = f;
            core_duty = duty_now;
        }
        leak = diode.leakage(vin, tj) * vin * duty_now;
        if (w.t_idle > 0.0 && v0 > 0.0) leak += diode.leakage(v0, tj) * v0 * w.t_idle * f;
        const double p_cond = e_cond * f;
        t_l_new = amb + l.rth * (copper + core);
        tj_new = amb + diode.rth_ja * (p_cond + leak);

        const double dl = t_l_new - t_l;
        const double dj = tj_new - tj;
        dj_before = dj_last;
        dj_last = dj;
        dl_before = dl_last;
        dl_last = dl;
        const bool states_settled = std::abs(w.i_valley - lin_lo) <= tol_i &&
                                    std::abs(w.i_peak - lin_hi) <= tol_i &&
                                    std::abs(i_avg - i_avg_prev) <= tol_i &&
                                    (!capacitor || std::abs(f - f_prev) <= 1e-6 * f);
        // Past an unstable balance after a jump (FixedPointSteps): go back below it. A balance
        // reached right after a jump is kept only where it is stable, the map's slope below one
        // (copper grows with DCR(T); leakage's growth bounds the diode's, as V_f falls with T).
        bool back_l = steps_l.landed_past(dl);
        bool back_j = steps_j.landed_past(dj);
        const bool settled = steps_l.settled(dl) && steps_j.settled(dj) && states_settled;
        // Still heating past the margin: a winding started above its balance falls towards it.
        const bool runaway_l = t_l_new > l.t_max + inductor_runaway_margin && t_l_new > t_l;
        const bool runaway_j = tj_new > diode.tj_max + diode_runaway_margin && leak > p_cond;
        if (settled || runaway_l || runaway_j) {
            if (steps_l.unconfirmed) {
                const double slope =
                    l.rth * copper * (l.dcr(t_l + 1.0, c.dcr_max) - dcr) / std::max(dcr, 1e-300);
                back_l = back_l || runaway_l || slope >= 1.0;
            }
            if (steps_j.unconfirmed) {
                const double i_r = diode.leakage(vin, tj);
                const double growth = i_r > 0.0 ? diode.leakage(vin, tj + 1.0) / i_r - 1.0 : 0.0;
                back_j = back_j || runaway_j || diode.rth_ja * leak * growth >= 1.0;
            }
        }
        if (back_l || back_j) {
            if (back_l) steps_l.go_back(t_l);
            if (back_j) steps_j.go_back(tj);
            continue;
        }
        if (settled) {
            converged = true;
            break;
        }

        // Runaway: far beyond any rating, with the feedback that drives it.
        if (runaway_j)
            return fail(res, CornerStatus::thermal_runaway,
                        "thermal runaway of the diode: its reverse leakage at " +
                            fmt(vin, Dimension::voltage) +
                            " grows with temperature faster than the junction sheds heat (" +
                            fmt(leak, Dimension::power) +
                            " of leakage loss with the junction past " +
                            fmt(diode.tj_max + diode_runaway_margin, Dimension::temperature) +
                            "; rating " + fmt(diode.tj_max, Dimension::temperature) + ")");
        if (runaway_l)
            return fail(res, CornerStatus::thermal_runaway,
                        "thermal runaway of the inductor: its losses (" +
                            fmt(copper + core, Dimension::power) + ") heat it past " +
                            fmt(l.t_max + inductor_runaway_margin, Dimension::temperature) +
                            " with no steady temperature in reach (rating " +
                            fmt(l.t_max, Dimension::temperature) + ")");

        // Damped update: halve the step when the temperature overshoots back and forth.
        auto overshoots = [](double step, double step_prev) {
            return std::abs(step) > temperature_tol && step * step_prev < 0.0 &&
                   std::abs(step) > 0.5 * std::abs(step_prev);
        };
        if (overshoots(dl, steps_l.d_prev) || overshoots(dj, steps_j.d_prev))
            omega = std::max(0.25, 0.5 * omega);
        // Losses are never negative: neither part can sit below ambient.
        const double t_l_from = t_l, tj_from = tj;
        t_l = std::max(amb, steps_l.next(t_l, dl, omega));
        tj = std::max(amb, steps_j.next(tj, dj, omega));
        if (it == 0) {
            steps_l.first_step(t_l_from);
            steps_j.first_step(tj_from);
        }
        if (!std::isfinite(t_l) || !std::isfinite(tj)) break;
        lin_lo = w.i_valley;
        lin_hi = w.i_peak;
        i_avg_prev = i_avg;
        f_prev = f;
    }
    (void)iterations;

    if (!converged) {
        // Still heating at a step that hardly shrinks: past (or at) the edge where the stable and
        // unstable balances merge, the temperature creeps through where the balance was and then
        // runs away. Only leakage (diode) or DCR(T) (inductor) can drive it there.
        auto creeping = [](double step, double before) {
            return step > 1e-3 * temperature_tol && step >= 0.9 * before;
        };
        if (creeping(dj_last, dj_before) ||
            (dj_last > 0.0 && leak > 0.5 * (tj_new - amb) / std::max(diode.rth_ja, 1e-12)))
            return fail(res, CornerStatus::thermal_runaway,
                        "thermal runaway of the diode: the junction keeps heating through its "
                        "reverse leakage at " +
                            fmt(vin, Dimension::voltage) + " (" +
                            fmt(tj_new, Dimension::temperature) + " and rising, rating " +
                            fmt(diode.tj_max, Dimension::temperature) +
                            "): no balance, or one too close to runaway to hold");
        if (creeping(dl_last, dl_before))
            return fail(res, CornerStatus::thermal_runaway,
                        "thermal runaway of the inductor: its copper loss rises with its "
                        "temperature as fast as it sheds heat (" +
                            fmt(t_l_new, Dimension::temperature) + " and rising, rating " +
                            fmt(l.t_max, Dimension::temperature) + ")");
        return fail(res, CornerStatus::no_convergence,
                    "the thermal and electrical fixed point did not settle in " +
                        std::to_string(max_iterations) + " iterations (inductor at " +
                        fmt(t_l_new, Dimension::temperature) + ", junction at " +
                        fmt(tj_new, Dimension::temperature) + ")");
    }

    // --- figures of the converged cycle -------------------------------------------------------
    core = core_loss(l, w);
    const double tp = w.period();
    const double f = 1.0 / tp;
    const double i_avg = (w.q_on + w.q_off) * f;
    const double i_rms2 = (w.q2_on + w.q2_off) * f;
    const double rip2 = std::max(0.0, i_rms2 - i_avg * i_avg);
    const double duty = w.t_on * f;

    res.duty = duty;
    res.f_sw = f;
    res.t_on = w.t_on;
    res.t_off = w.t_off;
    res.il_avg = i_avg;
    res.il_peak = w.i_peak;
    res.il_valley = w.i_valley;
    res.il_ripple_pp = w.i_peak - w.i_valley;
    res.il_rms = std::sqrt(std::max(0.0, i_rms2));
    res.load_i_avg = i_avg; // the capacitor carries no DC
    // With a capacitor: PWM in CCM has the exact two-state cycle. Hysteretic control in CCM has
    // near-straight ramps, whose p-p through the divider is the ideal triangle's (exact, two
    // exponential pieces); the divider's share at the switching frequency alone, a first-harmonic
    // figure, overstated it by up to 27 % against ngspice. In DCM the share stays (on the safe
    // side: the idle interval is no triangle).
    if (two_state)
        res.load_ripple_pp = load_crests(last_wave, last_on, last_off, last_out, period, last_duty);
    else if (capacitor && hysteretic && !w.dcm)
        res.load_ripple_pp =
            triangle_load_ripple(r_load, cap_c, cap_esr, f, duty) * res.il_ripple_pp;
    else res.load_ripple_pp = path.k_load * res.il_ripple_pp;
    res.id_avg = w.q_off * f;
    res.id_rms = std::sqrt(std::max(0.0, w.q2_off * f));
    res.isw_rms = std::sqrt(std::max(0.0, w.q2_on * f));
    res.isw_avg = w.q_on * f;
    res.dcm = w.dcm;
    res.t_inductor = t_l_new;
    res.tj_diode = tj_new;
    res.l_at_peak = l.inductance(w.i_peak, c.l_scale);
    res.regulation_error = (i_avg - target) / target;

    Losses& p = res.losses;
    // Copper: DCR(T)·I² for the DC part, R_ac(f, T)·I_ripple,rms² for the ripple (domain notes).
    p.inductor_copper = copper;
    // Core: iGSE with the flux swing estimated from the current ripple (parts/inductor_model.cpp).
    p.inductor_core = core;
    // Conduction: the average of V_f(i)·i over the diode's interval, not V_f(I_avg)·I_avg.
    p.diode_conduction = e_cond * f;
    // Switching of the diode: its junction charge ∫v·C(v)dv at V_R = Vin, lost each cycle when the
    // switch charges it, plus recovery Q_rr(i_valley)·V_R·f (Erickson & Maksimović 2nd ed.
    // §4.3.2). Both are dissipated mostly in the switch but follow from the choice of diode, so
    // they are booked here.
    p.diode_switching =
        (diode.capacitive_energy(vin) + diode.recovery_charge(w.i_valley) * vin) * f;
    // Leakage: I_R(V_R, Tj)·V_R while the switch is on (and at the load voltage while idle).
    p.diode_leakage = leak;
    // Switch conduction: R_on(T)·I_sw,rms².
    p.switch_conduction = ron * res.isw_rms * res.isw_rms;
    // Switch transitions, linearised clamped-inductive waveforms (Mohan, Undeland, Robbins 3rd ed.
    // §2-7): ½·V·(I_on·t_r + I_off·t_f)·f with turn-on at the valley and turn-off at the peak;
    // gate charge Q_g·V_drive·f and output capacitance ½·C_oss·V²·f (common practice).
    p.switch_switching = 0.5 * vin * (w.i_valley * d.sw.rise_time + w.i_peak * d.sw.fall_time) * f +
                         d.sw.gate_charge * d.sw.drive_voltage * f +
                         0.5 * d.sw.output_capacitance * vin * vin * f;
    p.sense = r_sense * i_rms2;
    p.capacitor = two_state ? cap_esr * (last_wave.cap_q2 / period) : cap_esr * path.k_cap2 * rip2;
    p.total = p.inductor_copper + p.inductor_core + p.diode_conduction + p.diode_switching +
              p.diode_leakage + p.switch_conduction + p.switch_switching + p.sense + p.capacitor;

    // Output power: the average of v_load·i_load = v0·I + r·I_load,rms².
    res.p_out = two_state
                    ? v0 * i_avg + r_load * (last_wave.load_q2 / period)
                    : v0 * i_avg + r_load * (i_avg * i_avg + path.k_load * path.k_load * rip2);
    // Supply power: the waveform's vin·I_sw,avg plus what the waveform does not carry.
    const double outside = (p.inductor_copper - dcr * i_rms2) + p.inductor_core +
                           p.diode_switching + p.diode_leakage + p.switch_switching;
    res.p_in = vin * res.isw_avg + outside;
    const double denom = res.p_out + p.total;
    res.efficiency = denom > 0.0 ? std::clamp(res.p_out / denom, 0.0, 1.0) : 0.0;
    return res;
}

double load_ripple_share(double r, double capacitance, double esr, double frequency) {
    if (std::isinf(frequency) && capacitance > 0.0 && r > 0.0) return esr / (esr + r);
    return ripple_path(r, capacitance, esr, frequency).k_load;
}

double triangle_load_ripple(double r, double capacitance, double esr, double frequency,
                            double duty) {
    if (!(capacitance > 0.0) || !(r > 0.0) || !(frequency > 0.0) || !(duty > 0.0) || !(duty < 1.0))
        return 1.0;
    const double e = std::max(0.0, esr);
    const double beta = e / (r + e);
    const double tau = (r + e) * capacitance;
    const double period = 1.0 / frequency;
    const double t1 = duty * period, t2 = period - t1;
    const double a = 1.0 / t1, b = 1.0 / t2; // slopes of a triangle of 1 A p-p
    // 1 − e^{−t/τ} without cancellation when τ is long; over the period it is g1 + g2 − g1·g2, a
    // sum of positive terms but for a small product, so two exponentials serve the three.
    auto one_minus = [tau](double t) { return -std::expm1(-t / tau); };
    const double g1 = one_minus(t1), g2 = one_minus(t2), g = g1 + g2 - g1 * g2;
    // e = i_L − z: on the rise e → a·τ, on the fall e → −b·τ; e0 at the valley, e1 at the peak.
    const double e0 = tau * (-b * g2 + a * (1.0 - g2) * g1) / g;
    const double e1 = a * tau + (e0 - a * tau) * (1.0 - g1);
    // y measured from its value at the valley; `gt` is 1 − e^{−t/τ} at t.
    auto rise = [&](double t, double gt) { return a * t + (1.0 - beta) * (e0 - a * tau) * gt; };
    const double y1 = rise(t1, g1);
    auto fall = [&](double t, double gt) {
        return y1 - b * t + (1.0 - beta) * (e1 + b * tau) * gt;
    };
    double lo = std::min(0.0, y1), hi = std::max(0.0, y1);
    // Turning points inside a piece: y' = 0 where e^{−t/τ} takes the value p/q. With t taken from
    // 1 − p/q itself the pair (t, 1 − e^{−t/τ}) stays on the curve, where y is stationary and so
    // insensitive to the rounding of p/q; no exponential is needed.
    if (beta < 1.0) {
        auto inside = [&](double p, double q, double t_end, auto&& y) {
            if (!(p > 0.0) || !(p < q)) return;
            const double gt = (q - p) / q;
            const double t = -tau * std::log1p(-gt);
            if (!(t > 0.0 && t < t_end)) return;
            const double v = y(t, gt);
            lo = std::min(lo, v);
            hi = std::max(hi, v);
        };
        if (a * tau - e0 > 0.0) inside(a * tau, (1.0 - beta) * (a * tau - e0), t1, rise);
        if (e1 + b * tau > 0.0) inside(b * tau, (1.0 - beta) * (e1 + b * tau), t2, fall);
    }
    return hi - lo;
}

Setting corner_setting(const design::Design& d, const Corner& c, const Setting& s) {
    Setting out = s;
    if (d.control.mode == design::ControlMode::hysteretic && d.control.band_is_fraction) {
        const double target = loads::target_current(d.load);
        if (target > 0.0 && c.point.current > 0.0) out.band = s.band * c.point.current / target;
    }
    return out;
}

} // namespace coilsieve::converter
