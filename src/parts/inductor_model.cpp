#include "parts/inductor_model.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>
#include <stdexcept>
#include <string>

// Inductance roll-off with DC bias (a modelling choice, the common shapes of catalog curves):
//   L(i) = l0 / (1 + a·|i/isat|^p),  a = drop / (1 − drop)  so that L(isat) = l0·(1 − drop).
// p = 6 gives a ferrite-like curve (with a 30 % drop: within 1 % of l0 up to 0.54·isat, then a
// sharp knee); p = 2 gives the gradual fall of powder and metal-composite cores. The exponents
// are chosen to match the usual look of datasheet curves, not taken from a standard.

namespace coilsieve::parts {

namespace {

// IEC 60028 annealed copper: temperature coefficient of resistance at 20 °C.
constexpr double copper_alpha20 = 0.00393;       // 1/K
constexpr double t20 = 293.15;                   // K
constexpr double ac_reference_frequency = 100e3; // Hz, where ac_factor is stated

[[noreturn]] void bad_part(const Inductor& part, const std::string& what) {
    throw std::invalid_argument("inductor '" + part.id + "': " + what);
}

} // namespace

double InductorModel::dcr(double temperature, bool use_max) const {
    // IEC 60028: R(T) = R20·(1 + 0.00393·(T − 20 °C)), R20 from the value stated at dcr_t0.
    const double r_t0 = use_max ? dcr_max : dcr_typ;
    const double r20 = r_t0 / (1.0 + copper_alpha20 * (dcr_t0 - t20));
    return r20 * (1.0 + copper_alpha20 * (temperature - t20));
}

double InductorModel::r_ac(double frequency, double temperature, bool use_max) const {
    // Skin and proximity effect grow as sqrt(f) once the skin depth is below the wire size
    // (Dowell, Proc. IEE 113(8), 1966, high-frequency asymptote); anchored at 100 kHz.
    const double rdc = dcr(temperature, use_max);
    const double excess = std::max(0.0, ac_factor - 1.0);
    return rdc * (1.0 + excess * std::sqrt(std::max(0.0, frequency) / ac_reference_frequency));
}

double InductorModel::core_loss(double delta_i, double frequency, double duty) const {
    if (!(delta_i > 0.0) || !(frequency > 0.0) || core_volume <= 0.0 || core.k <= 0.0) return 0.0;
    // Gapped core: flux proportional to current up to saturation (domain notes).
    const double delta_b = b_sat * delta_i / isat;
    const double d = std::clamp(duty, 1e-4, 1.0 - 1e-4);
    const double ki = core_ki > 0.0 ? core_ki : igse_ki(core);
    // iGSE, triangular flux: Venkatachalam et al., IEEE COMPEL 2002.
    const double pv = ki * std::pow(delta_b, core.beta) * std::pow(frequency, core.alpha) *
                      (std::pow(d, 1.0 - core.alpha) + std::pow(1.0 - d, 1.0 - core.alpha));
    return pv * core_volume;
}

double InductorModel::core_loss_least(double delta_i, double frequency) const {
    if (!(core.alpha >= 1.0) || !(delta_i > 0.0) || !(frequency > 0.0) || core_volume <= 0.0 ||
        core.k <= 0.0)
        return 0.0;
    const double delta_b = b_sat * delta_i / isat;
    const double ki = core_ki > 0.0 ? core_ki : igse_ki(core);
    // f^α·(2·0.5^(1−α)) = (2f)^α.
    return ki * std::pow(delta_b, core.beta) * std::pow(2.0 * frequency, core.alpha) * core_volume;
}

double igse_ki(const Steinmetz& s) {
    // k_i = k / ((2π)^(α−1)·∫₀^2π |cos θ|^α·2^(β−α) dθ), Venkatachalam et al., COMPEL 2002.
    // The integral has the closed form 2·√π·Γ((α+1)/2)/Γ(α/2 + 1) (Euler's beta integral),
    // exact to rounding; tests compare it with quadrature.
    const double a = s.alpha;
    const double integral_cos = 2.0 * std::sqrt(std::numbers::pi) * std::tgamma((a + 1.0) / 2.0) /
                                std::tgamma(a / 2.0 + 1.0);
    const double denom =
        std::pow(2.0 * std::numbers::pi, a - 1.0) * integral_cos * std::pow(2.0, s.beta - a);
    return s.k / denom;
}

double igse_triangular(const Steinmetz& s, double delta_b, double frequency, double duty) {
    if (!(delta_b > 0.0) || !(frequency > 0.0)) return 0.0;
    // Venkatachalam et al., COMPEL 2002, piecewise-linear flux with two segments.
    const double d = std::clamp(duty, 1e-4, 1.0 - 1e-4);
    return igse_ki(s) * std::pow(delta_b, s.beta) * std::pow(frequency, s.alpha) *
           (std::pow(d, 1.0 - s.alpha) + std::pow(1.0 - d, 1.0 - s.alpha));
}

InductorModel make_model(const Inductor& part) {
    if (!(part.inductance > 0.0)) bad_part(part, "inductance must be positive");
    if (!(part.isat > 0.0)) bad_part(part, "isat must be positive");
    if (!(part.sat_drop > 0.0 && part.sat_drop < 1.0))
        bad_part(part, "sat_drop must be between 0 and 1 (e.g. 0.3 for a 30 % drop)");
    if (!(part.dcr_typ > 0.0)) bad_part(part, "dcr_typ must be positive");
    if (!(part.irms > 0.0)) bad_part(part, "irms must be positive");
    if (!(part.dcr_temperature > 0.0)) bad_part(part, "dcr_temperature must be in kelvin, > 0");

    InductorModel m;
    m.l0 = part.inductance;
    m.isat = part.isat;
    m.rolloff_a = part.sat_drop / (1.0 - part.sat_drop);
    m.rolloff_p = part.shape == SaturationShape::hard ? 6.0 : 2.0;
    m.dcr_typ = part.dcr_typ;
    m.dcr_max = part.dcr_max > 0.0 ? std::max(part.dcr_max, part.dcr_typ) : part.dcr_typ;
    m.dcr_t0 = part.dcr_temperature;
    m.ac_factor = std::max(1.0, part.ac_factor);
    m.core = part.core;
    if (m.core.k > 0.0) m.core_ki = igse_ki(m.core);
    m.b_sat = part.b_sat;
    m.core_volume = part.core_volume;
    m.t_max = part.t_max;
    // The rating defines R_th: irms raises the winding by irms_rise above the rating ambient,
    // taken as the temperature the DCR is stated at; the winding then sits at t0 + rise, so a
    // thermal fixed point T = Ta + R_th·I²·DCR(T) reproduces the rated rise exactly.
    const double r_hot = m.dcr(part.dcr_temperature + part.irms_rise);
    m.rth = part.irms_rise / (part.irms * part.irms * r_hot);
    return m;
}

} // namespace coilsieve::parts
