#pragma once
// A hand-made design and catalog whose ranking is known by construction.
#include "design/design.hpp"
#include "parts/diode.hpp"
#include "parts/inductor.hpp"
#include "units/quantity.hpp"

#include <string>
#include <vector>

namespace fixtures {

using namespace coilsieve;

// 4 white LEDs at 700 mA from 20-28 V, hysteretic control (like data/examples/reading-lamp.json).
inline design::Design lamp() {
    design::Design d;
    d.name = "hand-made lamp";
    d.supply = {20.0, 24.0, 28.0};
    loads::LedString led;
    led.count = 4;
    led.vf = 3.05;
    led.rd = 0.45;
    led.current = 0.7;
    d.load = led;
    d.sense_resistor = 0.2;
    d.control.mode = design::ControlMode::hysteretic;
    d.control.band = 0.25;
    d.control.band_is_fraction = true;
    d.control.delay = 120e-9;
    d.control.band_min = 0.05;
    d.control.band_max = 0.6;
    d.ambient.max = units::celsius(55);
    d.limits.load_ripple = 0.3;
    d.limits.f_sw_min = 20e3;
    d.limits.f_sw_max = 1e6;
    d.limits.tj_max = units::celsius(125);
    d.limits.t_inductor_max = units::celsius(110);
    d.limits.height_max = 5e-3;
    return d;
}

inline parts::Inductor inductor(std::string id, double l, double dcr, double isat, double irms,
                                double len, double wid, double hgt) {
    parts::Inductor p;
    p.id = std::move(id);
    p.source = "hand";
    p.family = parts::InductorFamily::shielded_drum_ferrite;
    p.inductance = l;
    p.tolerance = 0.2;
    p.dcr_typ = dcr;
    p.dcr_max = dcr * 1.2;
    p.isat = isat;
    p.sat_drop = 0.3;
    p.irms = irms;
    p.shape = parts::SaturationShape::hard;
    // Ferrite-like Steinmetz values as the starter catalog uses for this family.
    p.core = {6.4, 1.4, 2.6};
    p.b_sat = 0.3;
    p.length = len;
    p.width = wid;
    p.height = hgt;
    p.core_volume = 0.3 * len * wid * hgt;
    p.ac_factor = 1.8;
    p.t_max = units::celsius(125);
    return p;
}

inline parts::Diode schottky(std::string id, double vrrm, double if_avg) {
    parts::Diode p;
    p.id = std::move(id);
    p.source = "hand";
    p.technology = parts::DiodeTechnology::schottky;
    p.vrrm = vrrm;
    p.if_avg = if_avg;
    p.spice = parts::SpiceForward{2e-6, 1.05, 0.05, 0.69, 2.0};
    p.forward = {{0.45, 1.0, 298.15}};
    p.spice_cap = parts::SpiceCapacitance{100e-12, 0.5, 0.5};
    p.ir = 20e-6;
    p.ir_vr = vrrm;
    p.ir_temperature = 298.15;
    p.rth_ja = 90.0;
    p.tj_max = units::celsius(150);
    p.package = "SMA";
    p.length = 4.3e-3;
    p.width = 2.6e-3;
    p.height = 2.4e-3;
    return p;
}

// L-BIG: lowest loss (large, low DCR, high Isat). L-SMALL: smallest. L-SAT: saturates.
inline std::vector<parts::Inductor> inductors() {
    return {inductor("L-BIG", 100e-6, 0.08, 2.5, 2.5, 10e-3, 10e-3, 4.5e-3),
            inductor("L-SMALL", 47e-6, 0.35, 1.3, 1.2, 5e-3, 5e-3, 3e-3),
            inductor("L-SAT", 100e-6, 0.10, 0.6, 2.0, 8e-3, 8e-3, 4e-3)};
}

// D-40V fits; D-15V's voltage rating is too low for 28 V.
inline std::vector<parts::Diode> diodes() {
    return {schottky("D-40V", 40.0, 2.0), schottky("D-15V", 15.0, 2.0)};
}

} // namespace fixtures
