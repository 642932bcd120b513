#pragma once
// Hand-built parts, designs and corners for the converter tests. Invented values, chosen only to
// put the physics in a regime a formula can check; never a reference in themselves.

#include "converter/evaluate.hpp"
#include "parts/diode.hpp"
#include "parts/inductor.hpp"

#include <cmath>
#include <string>

namespace coilsieve::converter::testing {

// An inductor with no roll-off, negligible DCR, no core loss and a tiny thermal resistance.
inline parts::InductorModel ideal_inductor(double l) {
    parts::InductorModel m;
    m.l0 = l;
    m.isat = 1e6;
    m.rolloff_a = 0.0;
    m.dcr_typ = m.dcr_max = 1e-9;
    m.dcr_t0 = 293.15;
    m.ac_factor = 1.0;
    m.rth = 1e-6;
    m.t_max = 423.15;
    return m;
}

// A diode whose forward drop is microvolts (huge IS), no capacitance, recovery or leakage.
inline parts::DiodeModel ideal_diode() {
    parts::DiodeModel m;
    m.fwd.is = 1e6;
    m.fwd.n = 1.0;
    m.fwd.rs = 0.0;
    m.cap.cjo = 0.0;
    m.rth_ja = 1e-6;
    m.ir_ref = 0.0;
    return m;
}

// A small power Schottky as SPICE values (invented, typical magnitudes).
inline parts::DiodeModel schottky() {
    parts::DiodeModel m;
    m.fwd.is = 2e-6;
    m.fwd.n = 1.05;
    m.fwd.rs = 0.04;
    m.fwd.eg = 0.69;
    m.fwd.xti = 2.0;
    m.cap.cjo = 150e-12;
    m.cap.vj = 0.6;
    m.cap.m = 0.5;
    m.ir_ref = 20e-6;
    m.vr_ref = 40.0;
    m.t_ref = 298.15;
    m.rth_ja = 100.0;
    m.tj_max = 423.15;
    m.technology = parts::DiodeTechnology::schottky;
    return m;
}

// A drum inductor with real resistance, roll-off and an estimated core.
inline parts::InductorModel drum(double l, double dcr, double isat) {
    parts::InductorModel m;
    m.l0 = l;
    m.isat = isat;
    m.rolloff_a = 0.3 / 0.7;
    m.rolloff_p = 6.0;
    m.dcr_typ = dcr;
    m.dcr_max = 1.2 * dcr;
    m.dcr_t0 = 293.15;
    m.ac_factor = 1.5;
    m.core = {1.5, 1.4, 2.6};
    m.b_sat = 0.3;
    m.core_volume = 0.2e-6;
    m.rth = 40.0;
    m.t_max = 398.15;
    return m;
}

// A switch with no losses to speak of.
inline design::Switch ideal_switch() {
    design::Switch s;
    s.on_resistance = 1e-9;
    s.on_resistance_tempco = 0.0;
    s.rise_time = s.fall_time = 0.0;
    s.gate_charge = 0.0;
    s.output_capacitance = 0.0;
    return s;
}

inline design::Design sink_design(double vin, double vo, double r, double current) {
    design::Design d;
    d.name = "test";
    d.supply = {vin, vin, vin};
    d.load = loads::Sink{vo, r, current};
    d.sw = ideal_switch();
    d.sense_resistor = 0.0;
    d.ambient.max = 298.15;
    return d;
}

inline Corner corner_for(const design::Design& d, double vin, double v0, double r, double current,
                         double ambient = 298.15) {
    Corner c;
    c.name = "test corner";
    c.vin = vin;
    c.ambient = ambient;
    c.point = loads::LoadPoint{"nominal", v0, r, current, 1.0};
    (void)d;
    return c;
}

inline Setting band_setting(double band) {
    Setting s;
    s.band = band;
    return s;
}

inline Setting pwm_setting(double f) {
    Setting s;
    s.frequency = f;
    return s;
}

inline bool all_finite(const CornerResult& r) {
    const double v[] = {r.vin,
                        r.ambient,
                        r.duty,
                        r.f_sw,
                        r.t_on,
                        r.t_off,
                        r.il_avg,
                        r.il_peak,
                        r.il_valley,
                        r.il_ripple_pp,
                        r.il_rms,
                        r.load_i_avg,
                        r.load_ripple_pp,
                        r.id_avg,
                        r.id_rms,
                        r.isw_rms,
                        r.isw_avg,
                        r.losses.inductor_copper,
                        r.losses.inductor_core,
                        r.losses.diode_conduction,
                        r.losses.diode_switching,
                        r.losses.diode_leakage,
                        r.losses.switch_conduction,
                        r.losses.switch_switching,
                        r.losses.sense,
                        r.losses.capacitor,
                        r.losses.total,
                        r.p_out,
                        r.p_in,
                        r.efficiency,
                        r.t_inductor,
                        r.tj_diode,
                        r.t_switch,
                        r.v_reverse,
                        r.l_at_peak,
                        r.regulation_error,
                        r.regulation_headroom};
    for (double x : v)
        if (!std::isfinite(x)) return false;
    return true;
}

} // namespace coilsieve::converter::testing
