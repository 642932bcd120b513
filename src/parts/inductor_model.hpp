#pragma once
// The physics of one inductor, prepared once from its catalog record for fast repeated use.

#include "parts/inductor.hpp"

#include <cmath>

namespace coilsieve::parts {

struct InductorModel {
    double l0 = 0.0;        // H, nominal zero-bias inductance
    double isat = 0.0;      // A
    double rolloff_a = 0.0; // L(i) = l0 / (1 + a * |i/isat|^p), a = drop / (1 - drop)
    double rolloff_p = 6.0; // 6 hard (ferrite), 2 soft (powder, metal composite)
    double dcr_typ = 0.0;   // Ω at dcr_t0
    double dcr_max = 0.0;
    double dcr_t0 = 293.15; // K
    double ac_factor = 1.0; // R_ac/DCR at 100 kHz
    Steinmetz core;
    double core_ki = 0.0;     // iGSE k_i of `core`, set by make_model (computed on use if 0)
    double b_sat = 0.3;       // T at isat (flux-swing estimate)
    double core_volume = 0.0; // m^3
    double rth = 0.0;         // K/W, hot spot to ambient, from the rated rise
    double t_max = 398.15;    // K

    // Inductance at current i, times l_scale (tolerance corner). Inline: the engine calls it in
    // its innermost loops.
    double inductance(double i, double l_scale = 1.0) const {
        const double x = std::abs(i) / isat;
        return l0 * l_scale / (1.0 + rolloff_a * rolloff_power(x));
    }
    // DCR at temperature T (K): IEC 60028 copper, alpha20 = 0.00393 /K.
    double dcr(double temperature, bool use_max = false) const;
    // Resistance the ripple current sees at frequency f (Hz) and temperature T.
    double r_ac(double frequency, double temperature, bool use_max = false) const;
    // Core loss (W) for a triangular current ripple delta_i (A p-p) at f with duty D (iGSE).
    double core_loss(double delta_i, double frequency, double duty) const;
    // The least core loss over the duty: at D = 0.5, since D^(1−α) + (1−D)^(1−α) is convex and
    // symmetric for α >= 1; 0 for α < 1 (no such least is claimed). Two powers instead of four.
    double core_loss_least(double delta_i, double frequency) const;

private:
    // x^rolloff_p; the two catalog shapes use integer exponents, so no std::pow for them.
    double rolloff_power(double x) const {
        if (rolloff_p == 6.0) {
            const double x2 = x * x;
            return x2 * x2 * x2;
        }
        if (rolloff_p == 2.0) return x * x;
        return std::pow(x, rolloff_p);
    }
};

InductorModel make_model(const Inductor& part);

// iGSE coefficient k_i from Steinmetz (k, alpha, beta); Venkatachalam et al., COMPEL 2002.
double igse_ki(const Steinmetz& s);
// iGSE power density (W/m^3) for triangular flux of peak-to-peak delta_b (T), frequency f, duty D.
double igse_triangular(const Steinmetz& s, double delta_b, double frequency, double duty);

} // namespace coilsieve::parts
