#pragma once
// One linear R–L interval of the converter: L·di/dt = e − r·i with e, r, L constant.
// The exact solution is the exponential i(t) = I∞ + (i0 − I∞)·exp(−t/τ), I∞ = e/r, τ = L/r; the
// straight ramp i0 + e·t/L is its short-time limit (r → 0), which these forms reach without
// dividing by r. Header-only because the steady-state solver calls it in its innermost loop.

#include <cmath>
#include <limits>

namespace coilsieve::converter {

struct Segment {
    double e = 0.0; // V, source voltage of the interval (the inductor voltage at i = 0)
    double r = 0.0; // Ω, total series resistance (>= 0)
    double l = 0.0; // H (> 0)

    // Inductor voltage at current i.
    double v(double i) const { return e - r * i; }
    // Current the interval tends to (infinite when r = 0).
    double asymptote() const {
        return r > 0.0 ? e / r : std::copysign(std::numeric_limits<double>::infinity(), e);
    }
};

// Integrals of one stretch of a segment: start and end current, duration, ∫i dt, ∫i² dt.
struct Stretch {
    double i0 = 0.0;
    double i1 = 0.0;
    double dt = 0.0;
    double q = 0.0;  // A·s
    double q2 = 0.0; // A²·s
};

namespace detail {

// phi1(z) = (1 − e^−z)/z, phi2(z) = (z − 1 + e^−z)/z², phi3(z) = (z − 2(1 − e^−z) + (1 −
// e^−2z)/2)/z³, the shapes of the exponential's first integrals; Taylor series near 0 avoid the
// cancellation.
struct Phi {
    double p1, p2, p3;
};

inline Phi phi(double z) {
    if (z < 0.05) {
        // Taylor series in x = −z, Horner form, 8 terms (next term < 1e-16 relative):
        // phi1 = Σ x^k/(k+1)!, phi2 = Σ x^k/(k+2)!, phi3 = Σ (2^(k+2) − 2)/(k+3)! · x^k.
        constexpr double c1[8] = {1.0,       1.0 / 2,   1.0 / 6,    1.0 / 24,
                                  1.0 / 120, 1.0 / 720, 1.0 / 5040, 1.0 / 40320};
        constexpr double c2[8] = {1.0 / 2,   1.0 / 6,    1.0 / 24,    1.0 / 120,
                                  1.0 / 720, 1.0 / 5040, 1.0 / 40320, 1.0 / 362880};
        constexpr double c3[8] = {2.0 / 6,     6.0 / 24,      14.0 / 120,     30.0 / 720,
                                  62.0 / 5040, 126.0 / 40320, 254.0 / 362880, 510.0 / 3628800};
        const double x = -z;
        double p1 = c1[7], p2 = c2[7], p3 = c3[7];
        for (int k = 6; k >= 0; --k) {
            p1 = p1 * x + c1[k];
            p2 = p2 * x + c2[k];
            p3 = p3 * x + c3[k];
        }
        return {p1, p2, p3};
    }
    const double em1 = std::expm1(-z);       // e^−z − 1
    const double em2 = std::expm1(-2.0 * z); // e^−2z − 1
    const double z2 = z * z;
    return {-em1 / z, (z + em1) / z2, (z + 2.0 * em1 - 0.5 * em2) / (z2 * z)};
}

// log1p(x)/x, 1 at x = 0.
inline double log1p_over_x(double x) {
    if (std::abs(x) < 1e-4) return 1.0 - x / 2.0 + x * x / 3.0 - x * x * x / 4.0;
    return std::log1p(x) / x;
}

} // namespace detail

// Run the segment from i0 for dt seconds (exact exponential; Kirchhoff on the R–L loop).
inline Stretch advance(const Segment& s, double i0, double dt) {
    const double slope = s.v(i0) / s.l; // A/s at the start
    const double z = s.r * dt / s.l;
    const detail::Phi p = detail::phi(z);
    Stretch out;
    out.i0 = i0;
    out.dt = dt;
    out.i1 = i0 + slope * dt * p.p1;
    const double dt2 = dt * dt;
    out.q = i0 * dt + slope * dt2 * p.p2;
    out.q2 = i0 * i0 * dt + 2.0 * i0 * slope * dt2 * p.p2 + slope * slope * dt2 * dt * p.p3;
    return out;
}

// Time for the current to go from i0 to i1: τ·ln((I∞ − i0)/(I∞ − i1)) written as
// L·(i1 − i0)/v(i1)·log1p(x)/x so r = 0 gives the straight ramp L·Δi/v. Infinite when the
// segment never reaches i1 (its asymptote lies before i1, or it runs the other way).
inline double time_between(const Segment& s, double i0, double i1) {
    const double di = i1 - i0;
    if (di == 0.0) return 0.0;
    const double v0 = s.v(i0);
    const double v1 = s.v(i1);
    // Moving towards i1 needs the voltage to push that way at both ends.
    if (!(v0 * di > 0.0) || !(v1 * di > 0.0)) return std::numeric_limits<double>::infinity();
    const double x = (v0 - v1) / v1; // = r·Δi/v(i1) > −1
    return s.l * di / v1 * detail::log1p_over_x(x);
}

// The stretch from i0 to i1 (time and integrals); dt infinite when unreachable.
inline Stretch ramp(const Segment& s, double i0, double i1) {
    const double dt = time_between(s, i0, i1);
    if (!std::isfinite(dt)) {
        Stretch out;
        out.i0 = i0;
        out.i1 = i1;
        out.dt = dt;
        return out;
    }
    Stretch out = advance(s, i0, dt);
    out.i1 = i1; // exact by construction; drop the rounding of advance()
    return out;
}

} // namespace coilsieve::converter
