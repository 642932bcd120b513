#include "simulation/circuit.hpp"

#include "converter/evaluate.hpp"

#include <cmath>
#include <sstream>
#include <stdexcept>

namespace coilsieve::simulation {

Temperatures temperatures_from(const converter::CornerResult& r) {
    Temperatures t;
    t.inductor = r.t_inductor > 0.0 ? r.t_inductor : r.ambient;
    t.diode = r.tj_diode > 0.0 ? r.tj_diode : r.ambient;
    t.sw = r.t_switch > 0.0 ? r.t_switch : r.ambient + converter::switch_temperature_rise;
    return t;
}

double Circuit::inductance(double i) const {
    // Roll-off law of parts/inductor_model.hpp: L(i) = l0 / (1 + a·|i/isat|^p).
    if (rolloff_a == 0.0) {
        return l0;
    }
    return l0 / (1.0 + rolloff_a * std::pow(std::abs(i / isat), rolloff_p));
}

double Circuit::diode_is() const {
    // ngspice diode temperature law: IS(T) = IS·exp((T/Tnom − 1)·EG/(N·Vt))·(T/Tnom)^(XTI/N).
    const double vt = parts::thermal_voltage(diode_temperature);
    const double ratio = diode_temperature / diode_tnom;
    return diode.is * std::exp((ratio - 1.0) * diode.eg / (diode.n * vt)) *
           std::pow(ratio, diode.xti / diode.n);
}

double Circuit::vf(double i) const {
    // SPICE diode: i = IS·(exp(v/(N·Vt)) − 1) plus series RS (ngspice manual, diode model).
    if (i <= 0.0) {
        return 0.0;
    }
    const double vt = parts::thermal_voltage(diode_temperature);
    return diode.n * vt * std::log1p(i / diode_is()) + i * diode.rs;
}

namespace {

[[noreturn]] void fail(const std::string& what, double value, const std::string& want) {
    std::ostringstream os;
    os << "simulation circuit: " << what << " = " << value << " cannot be simulated; " << want;
    throw std::invalid_argument(os.str());
}

} // namespace

Circuit make_circuit(const design::Design& d, const parts::InductorModel& l,
                     const parts::DiodeModel& diode, const converter::Corner& c,
                     const converter::Setting& s, const Temperatures& t) {
    Circuit k;
    k.vin = c.vin;
    // Switch R_on rises linearly from its 25 °C value (design/design.hpp convention).
    k.r_on = d.sw.on_resistance * (1.0 + d.sw.on_resistance_tempco * (t.sw - 298.15));
    k.r_sense = d.sense_resistor;
    k.dcr = l.dcr(t.inductor, c.dcr_max);
    k.l0 = l.l0 * c.l_scale;
    k.isat = l.isat > 0.0 ? l.isat : 1.0;
    k.rolloff_a = l.isat > 0.0 ? l.rolloff_a : 0.0;
    k.rolloff_p = l.rolloff_p;
    k.diode = diode.fwd;
    k.diode_tnom = diode.tnom;
    k.diode_temperature = t.diode;
    k.diode_cap = diode.cap;
    k.diode_tt = diode.tt;
    k.v0 = c.point.v0;
    k.r_load = c.point.r;
    if (s.capacitance || d.output_capacitor) {
        k.cap = s.capacitance ? *s.capacitance : d.output_capacitor->capacitance;
        k.cap_esr = d.output_capacitor ? d.output_capacitor->esr : 0.0;
    }
    k.mode = d.control.mode;
    k.i_target = c.point.current;
    k.delay = d.control.delay;
    if (k.mode == design::ControlMode::hysteretic) {
        k.i_lo = k.i_target - 0.5 * s.band;
        k.i_hi = k.i_target + 0.5 * s.band;
        if (!(s.band > 0.0)) {
            fail("hysteresis band (A)", s.band, "give a band > 0");
        }
        if (!(k.i_lo > 0.0)) {
            fail("lower threshold (A)", k.i_lo, "the band must be below twice the target current");
        }
    } else {
        k.frequency = s.frequency > 0.0 ? s.frequency : d.control.frequency;
        if (!(k.frequency > 0.0)) {
            fail("PWM frequency (Hz)", k.frequency, "give a switching frequency > 0");
        }
    }
    if (!(k.l0 > 0.0)) {
        fail("inductance (H)", k.l0, "the inductor needs a positive inductance");
    }
    if (!(k.i_target > 0.0)) {
        fail("target current (A)", k.i_target, "the load point needs a positive current");
    }
    if (!(k.diode.is > 0.0) || !(k.diode.n > 0.0)) {
        fail("diode IS (A)", k.diode.is, "the diode model needs IS > 0 and N > 0");
    }
    return k;
}

} // namespace coilsieve::simulation
