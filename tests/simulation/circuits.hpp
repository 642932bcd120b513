#pragma once
// Hand-built circuits shared by the simulation tests.

#include "simulation/circuit.hpp"

namespace coilsieve::simulation::testing {

// A near-ideal diode: IS so large that Vf = N·Vt·ln(1 + i/IS) is tens of nanovolts.
inline parts::SpiceForward ideal_diode() {
    parts::SpiceForward d;
    d.is = 1e6;
    d.n = 1.0;
    d.rs = 0.0;
    return d;
}

// A small Schottky rectifier (1 A class): IS, N, RS typical of such parts (from memory).
inline parts::SpiceForward schottky() {
    parts::SpiceForward d;
    d.is = 2e-6;
    d.n = 1.05;
    d.rs = 0.04;
    d.eg = 0.69;
    d.xti = 2.0;
    return d;
}

// LED string of 3 (9 V knee, 1.2 Ω) at 1 A from 24 V, 47 µH, hysteretic ±10 %.
inline Circuit led_hysteretic(double delay) {
    Circuit k;
    k.vin = 24.0;
    k.r_on = 0.1;
    k.r_sense = 0.1;
    k.dcr = 0.08;
    k.l0 = 47e-6;
    k.isat = 2.0;
    k.rolloff_a = 0.25 / 0.75;
    k.rolloff_p = 6.0;
    k.diode = schottky();
    k.diode_temperature = 330.0;
    k.diode_cap = {30e-12, 0.5, 0.5};
    k.v0 = 9.0;
    k.r_load = 1.2;
    k.mode = design::ControlMode::hysteretic;
    k.i_target = 1.0;
    k.i_lo = 0.9;
    k.i_hi = 1.1;
    k.delay = delay;
    return k;
}

// LED string at 0.7 A, PWM 250 kHz, 4.7 µF output capacitor with 20 mΩ ESR.
inline Circuit led_pwm_cap() {
    Circuit k = led_hysteretic(0.0);
    k.mode = design::ControlMode::pwm;
    k.frequency = 250e3;
    k.i_target = 0.7;
    k.v0 = 12.0;
    k.r_load = 2.0;
    k.l0 = 68e-6;
    k.isat = 1.5;
    k.rolloff_p = 2.0; // soft (powder) roll-off
    k.cap = 4.7e-6;
    k.cap_esr = 0.02;
    return k;
}

// Battery (2 Li-ion cells: 7.6 V EMF, 0.15 Ω) charged at 2 A from 12 V, PWM 200 kHz.
inline Circuit battery_pwm() {
    Circuit k = led_hysteretic(0.0);
    k.mode = design::ControlMode::pwm;
    k.frequency = 200e3;
    k.vin = 12.0;
    k.v0 = 7.6;
    k.r_load = 0.15;
    k.i_target = 2.0;
    k.l0 = 22e-6;
    k.isat = 4.0;
    k.dcr = 0.03;
    k.r_sense = 0.05;
    k.r_on = 0.04;
    return k;
}

// Light load at low frequency: discontinuous conduction (PWM 100 kHz, 0.15 A, 10 µH).
inline Circuit dcm_pwm() {
    Circuit k = led_hysteretic(0.0);
    k.mode = design::ControlMode::pwm;
    k.frequency = 100e3;
    k.vin = 20.0;
    k.v0 = 6.0;
    k.r_load = 1.0;
    k.i_target = 0.15;
    k.l0 = 10e-6;
    k.isat = 3.0; // peak about 0.4·Isat: this case is about the idle interval, not saturation
    return k;
}

// The battery charger with a smaller inductor rating: the peak (about 1.2·Isat) runs into the
// hard (ferrite) roll-off, so L(i) changes markedly over the ripple.
inline Circuit saturating_pwm() {
    Circuit k = battery_pwm();
    k.isat = 2.0;
    return k;
}

// Large DCR (2.5 Ω) and a long period: the R–L curvature of each interval matters.
inline Circuit large_dcr_pwm() {
    Circuit k = led_hysteretic(0.0);
    k.mode = design::ControlMode::pwm;
    k.frequency = 40e3;
    k.vin = 15.0;
    k.v0 = 6.0;
    k.r_load = 0.5;
    k.dcr = 2.5;
    k.i_target = 0.5;
    k.l0 = 100e-6;
    k.isat = 1.0;
    k.rolloff_a = 0.0;
    return k;
}

} // namespace coilsieve::simulation::testing
