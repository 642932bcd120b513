#pragma once
// A hand-built circuit turned into the design, part models, corner and setting the analytical
// engine takes, so the engine, the cycle simulator and ngspice see the same converter.

#include "circuits.hpp"
#include "converter/evaluate.hpp"

#include <string>

namespace coilsieve::simulation::testing {

struct DesignCase {
    std::string name;
    design::Design d;
    parts::InductorModel l;
    parts::DiodeModel diode;
    converter::Corner c;
    converter::Setting s;
};

// ac_factor 1 makes R_ac = DCR, so the engine's copper loss is DCR·I_rms², the quantity ngspice
// gives as ∫DCR·i²dt.
inline DesignCase design_case(const std::string& name, const Circuit& k, double ac_factor = 1.0) {
    DesignCase x;
    x.name = name;
    design::Design& d = x.d;
    d.name = name;
    d.supply = {k.vin, k.vin, k.vin};
    d.load = loads::Sink{k.v0, k.r_load, k.i_target};
    d.sw.on_resistance = k.r_on;
    d.sw.on_resistance_tempco = 0.004;
    d.sense_resistor = k.r_sense;
    if (k.cap > 0.0) d.output_capacitor = design::OutputCapacitor{k.cap, k.cap_esr};
    d.control.mode = k.mode;
    d.control.band = k.i_hi - k.i_lo;
    d.control.band_is_fraction = false;
    d.control.delay = k.delay;
    d.control.frequency = k.frequency;
    d.ambient.max = 313.15;

    parts::InductorModel& l = x.l;
    l.l0 = k.l0;
    l.isat = k.isat;
    l.rolloff_a = k.rolloff_a;
    l.rolloff_p = k.rolloff_p;
    l.dcr_typ = k.dcr;
    l.dcr_max = 1.2 * k.dcr;
    l.dcr_t0 = 293.15;
    l.ac_factor = ac_factor;
    l.core = {2.0, 1.4, 2.6}; // MnZn-like Steinmetz set (from memory), SI units
    l.b_sat = 0.3;
    l.core_volume = 2e-7;
    l.rth = 40.0;

    parts::DiodeModel& dm = x.diode;
    dm.fwd = k.diode;
    dm.tnom = 300.15;
    dm.cap = k.diode_cap;
    dm.ir_ref = 20e-6;
    dm.vr_ref = 40.0;
    dm.rth_ja = 80.0;

    converter::Corner& c = x.c;
    c.name = name;
    c.vin = k.vin;
    c.ambient = d.ambient.max;
    c.point.name = "test";
    c.point.v0 = k.v0;
    c.point.r = k.r_load;
    c.point.current = k.i_target;
    c.nominal = true;

    x.s.band = k.i_hi - k.i_lo;
    x.s.frequency = k.frequency;
    x.s = converter::corner_setting(d, c, x.s);
    return x;
}

} // namespace coilsieve::simulation::testing
