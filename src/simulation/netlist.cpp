#include "simulation/netlist.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>
#include <stdexcept>

namespace coilsieve::simulation {

namespace {

std::string num(double v) {
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.10g", v);
    return buf;
}

double to_celsius(double kelvin) { return kelvin - 273.15; }

// A series resistance, or a 0 V source when it is zero (SPICE rejects R = 0).
void series(std::ostream& os, const std::string& name, const std::string& a, const std::string& b,
            double r) {
    if (r > 0.0) {
        os << 'R' << name << ' ' << a << ' ' << b << ' ' << num(r) << '\n';
    } else {
        os << "V" << name << ' ' << a << ' ' << b << " DC 0\n";
    }
}

} // namespace

double estimated_period(const Circuit& k) {
    if (k.mode == design::ControlMode::pwm) {
        return 1.0 / k.frequency;
    }
    // Straight-line hysteretic estimate with the delay widening the band (domain notes).
    const double vo = k.v0 + k.r_load * k.i_target + k.i_target * (k.dcr + k.r_sense);
    const double v_on = std::max(k.vin - vo - k.i_target * k.r_on, 1e-3 * k.vin);
    const double v_off = std::max(vo + k.vf(k.i_target), 1e-3);
    const double band = k.i_hi - k.i_lo;
    const double l = k.l0;
    return l * (band + k.delay * v_off / l) / v_on + l * (band + k.delay * v_on / l) / v_off;
}

std::string write_netlist(const Circuit& k, const NetlistOptions& o) {
    const bool pwm = k.mode == design::ControlMode::pwm;
    if (pwm && !(o.duty > 0.0 && o.duty < 1.0)) {
        std::ostringstream msg;
        msg << "netlist: PWM needs a duty between 0 and 1 (got " << num(o.duty) << ')';
        throw std::invalid_argument(msg.str());
    }
    const double period = estimated_period(k);
    const double vo = k.v0 + k.r_load * k.i_target;
    const double i0 = o.i_initial.value_or(std::max(0.0, pwm ? k.i_target * 0.9 : k.i_lo));
    const double vc0 = o.vc_initial.value_or(vo);

    int settle = o.settle_periods;
    if (settle <= 0) {
        // Start near the operating point; settle several time constants (L/R; C·r with a
        // capacitor), at least 20 periods, at most 2000.
        const double r = k.r_on + k.r_sense + k.dcr + k.r_load + 1e-3;
        double tau = pwm ? k.l0 / r : 0.0;
        if (k.has_capacitor()) tau = std::max(tau, k.cap * (k.r_load + k.cap_esr));
        settle = static_cast<int>(std::clamp(std::ceil(6.0 * tau / period), 20.0, 2000.0));
    }
    const int measure = std::max(o.measure_periods, 1);
    const double t_stop = (settle + measure + 0.5) * period;
    // Hysteretic periods drift from the estimate: save more than needed.
    const double saved = (measure + (pwm ? 0.5 : 2.0 + 0.5 * measure)) * period;
    const double t_start = std::max(0.0, t_stop - saved);
    const double t_max = period / o.steps_per_period;

    std::ostringstream os;
    os << "* coilsieve buck constant-current stage (" << (pwm ? "PWM" : "hysteretic")
       << " control)\n"
       << "* Vin = " << num(k.vin) << " V, target " << num(k.i_target) << " A, load " << num(k.v0)
       << " V + " << num(k.r_load) << " Ohm; diode at " << num(to_celsius(k.diode_temperature))
       << " degC\n"
       << "* inductor current = V(ni) (1 V = 1 A): integrator equivalent of L(i)\n";
    os << "Vin vin 0 DC " << num(k.vin) << '\n';
    os << "S1 vin sw ctrl 0 SWMOD\n";
    if (pwm) {
        const double edge = period * 1e-4;
        const double width = o.duty * period - edge; // on while ctrl > 0.5: width + edge
        os << "Vclk ctrl 0 PULSE(0 1 0 " << num(edge) << ' ' << num(edge) << ' '
           << num(std::max(width, edge)) << ' ' << num(period) << ")\n";
        os << ".model SWMOD SW(VT=0.5 VH=0 RON=" << num(std::max(k.r_on, 1e-6)) << " ROFF=1e8)\n";
    } else {
        // ctrl = −i (delayed): on below −VT−VH... i.e. closes at I_lo, opens at I_hi.
        const std::string sensed = k.delay > 0.0 ? "nd" : "ni";
        if (k.delay > 0.0) {
            os << "Ebuf nb 0 ni 0 1\n"
               << "Tdelay nb 0 nd 0 Z0=50 TD=" << num(k.delay) << '\n'
               << "Rterm nd 0 50\n";
        }
        os << "Bctrl ctrl 0 V=-V(" << sensed << ")\n";
        os << ".model SWMOD SW(VT=" << num(-0.5 * (k.i_hi + k.i_lo))
           << " VH=" << num(0.5 * (k.i_hi - k.i_lo)) << " RON=" << num(std::max(k.r_on, 1e-6))
           << " ROFF=1e8)\n";
    }
    os << "Vdm 0 dan DC 0\n";
    os << "D1 dan sw DMOD temp=" << num(to_celsius(k.diode_temperature)) << '\n';
    os << ".model DMOD D(IS=" << num(k.diode.is) << " N=" << num(k.diode.n)
       << " RS=" << num(k.diode.rs) << " EG=" << num(k.diode.eg) << " XTI=" << num(k.diode.xti)
       << " TNOM=" << num(to_celsius(k.diode_tnom));
    if (k.diode_cap.cjo > 0.0) {
        os << " CJO=" << num(k.diode_cap.cjo) << " VJ=" << num(k.diode_cap.vj)
           << " M=" << num(k.diode_cap.m);
    }
    if (k.diode_tt > 0.0) {
        os << " TT=" << num(k.diode_tt);
    }
    os << ")\n";
    series(os, "sense", "sw", "a", k.r_sense);
    // Inductor: di/dt = v_L / L(i) on a 1 F integrator; L(i) = l0/(1 + a·|i/isat|^p).
    std::ostringstream l_expr;
    if (k.rolloff_a != 0.0) {
        l_expr << '(' << num(k.l0) << "/(1+" << num(k.rolloff_a) << "*pow(abs(V(ni))/"
               << num(k.isat) << ',' << num(k.rolloff_p) << ")))";
    } else {
        l_expr << num(k.l0);
    }
    os << "Bl a b I=V(ni)\n"
       << "Cint ni 0 1\n"
       << "Rint ni 0 1e12\n"
       << "Bint 0 ni I=(V(a)-V(b))/" << l_expr.str() << '\n';
    series(os, "dcr", "b", "c", k.dcr);
    series(os, "load", "c", "d", k.r_load);
    os << "Vload d 0 DC " << num(k.v0) << '\n';
    std::ostringstream ic;
    ic << ".ic V(ni)=" << num(i0);
    if (k.has_capacitor()) {
        if (k.cap_esr > 0.0) {
            os << "Resr c e " << num(k.cap_esr) << "\nCout e 0 " << num(k.cap) << '\n';
            ic << " V(e)=" << num(vc0);
        } else {
            os << "Cout c 0 " << num(k.cap) << '\n';
            ic << " V(c)=" << num(vc0);
        }
    }
    os << ic.str() << '\n';
    os << ".options reltol=1e-4 abstol=1e-9 vntol=1e-7 itl4=100\n";
    os << ".tran " << num(t_max) << ' ' << num(t_stop) << ' ' << num(t_start) << ' ' << num(t_max)
       << " uic\n";
    os << ".control\nrun\nwrdata " << o.data_file
       << " V(ni) V(sw) I(Vdm) I(Vload) I(Vin)\nquit\n.endc\n.end\n";
    return os.str();
}

std::string write_netlist(const design::Design& d, const parts::InductorModel& l,
                          const parts::DiodeModel& diode, const converter::Corner& c,
                          const converter::Setting& s, const converter::CornerResult& at,
                          NetlistOptions o) {
    const Circuit k = make_circuit(d, l, diode, c, s, temperatures_from(at));
    if (k.mode == design::ControlMode::pwm && !(o.duty > 0.0)) {
        o.duty = at.duty;
    }
    if (!o.i_initial && at.il_valley >= 0.0 && std::isfinite(at.il_valley)) {
        o.i_initial = at.il_valley;
    }
    return write_netlist(k, o);
}

} // namespace coilsieve::simulation
