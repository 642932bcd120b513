#pragma once
// What the converter physics says about one pair at one corner: plain result records.
// Field names match the `check --json` output (SI units).

#include "loads/load.hpp"

#include <memory>
#include <optional>
#include <ostream>
#include <string>
#include <vector>

namespace coilsieve::converter {

// The free settings a pair is tuned over.
struct Setting {
    double band = 0.0;                 // A, hysteresis band peak-to-peak (hysteretic control)
    double frequency = 0.0;            // Hz (PWM)
    std::optional<double> capacitance; // F, output capacitor when tuned or given
    friend bool operator==(const Setting&, const Setting&) = default;
};

// A corner's name as its results and the checks of every evaluation share it: copied by a reference
// count, not an allocation (an evaluation holds dozens of checks, and the optimiser makes
// millions).
class SharedName {
public:
    SharedName() = default;
    SharedName(std::string s) : p_(std::make_shared<const std::string>(std::move(s))) {}
    SharedName(const char* s) : SharedName(std::string(s)) {}
    const std::string& str() const noexcept { return p_ ? *p_ : empty_; }
    operator const std::string&() const noexcept { return str(); }
    bool empty() const noexcept { return str().empty(); }
    friend bool operator==(const SharedName& a, const SharedName& b) { return a.str() == b.str(); }
    friend bool operator==(const SharedName& a, const std::string& b) { return a.str() == b; }
    friend bool operator==(const SharedName& a, const char* b) { return a.str() == b; }
    friend std::ostream& operator<<(std::ostream& o, const SharedName& n) { return o << n.str(); }
    friend std::string operator+(std::string a, const SharedName& b) { return a += b.str(); }
    friend std::string operator+(const SharedName& a, const std::string& b) { return a.str() + b; }
    friend std::string operator+(const SharedName& a, const char* b) { return a.str() + b; }

private:
    std::shared_ptr<const std::string> p_;
    static inline const std::string empty_;
};

// One operating corner: supply, ambient, load point and part tolerances.
struct Corner {
    SharedName name;         // "vin-min/hot/L-tol", "cc-start/hot", ...
    double vin = 0.0;        // V
    double ambient = 298.15; // K
    double l_scale = 1.0;    // multiplies nominal inductance (1 - tol, 1, 1 + tol)
    bool dcr_max = false;    // use the maximum DCR instead of typical
    loads::LoadPoint point;  // load seen at this corner's temperature
    double weight = 1.0;     // share of time (charge profile) for energy-weighted loss
    bool nominal = false;    // the corner the "loss at nominal" objective is taken from
};

struct Losses {
    double inductor_copper = 0.0;
    double inductor_core = 0.0;
    double diode_conduction = 0.0;
    double diode_switching = 0.0; // capacitive + reverse recovery
    double diode_leakage = 0.0;
    double switch_conduction = 0.0;
    double switch_switching = 0.0; // transitions + gate + output capacitance
    double sense = 0.0;
    double capacitor = 0.0; // output capacitor ESR (ripple share through it)
    double total = 0.0;
};

enum class CornerStatus {
    ok,
    no_regulation,   // target current unreachable (load voltage too high for the supply)
    thermal_runaway, // Schottky leakage or DCR feedback diverges
    no_convergence,  // fixed point or duty solve did not converge
};

struct CornerResult {
    SharedName name;
    double vin = 0.0;
    double ambient = 0.0; // K
    double duty = 0.0;
    double f_sw = 0.0;   // Hz
    double t_on = 0.0;   // s
    double t_off = 0.0;  // s (diode conduction; DCM idle time excluded)
    double il_avg = 0.0; // A
    double il_peak = 0.0;
    double il_valley = 0.0;
    double il_ripple_pp = 0.0;
    double il_rms = 0.0;
    double load_i_avg = 0.0;
    double load_ripple_pp = 0.0; // A, after the output capacitor
    double id_avg = 0.0;
    double id_rms = 0.0;
    double isw_rms = 0.0;
    double isw_avg = 0.0; // A, average switch (= supply) current of the waveform
    bool dcm = false;
    Losses losses;
    double p_out = 0.0; // W
    // W from the supply: vin·isw_avg plus the losses the waveform does not carry (core, AC copper
    // excess, switching, recovery, capacitive, leakage, gate). Equals p_out + losses.total up to
    // the waveform's own energy-balance residual, which the tests hold below 0.5 %.
    double p_in = 0.0;
    double efficiency = 0.0;
    double t_inductor = 0.0; // K, hot spot
    double tj_diode = 0.0;   // K
    double t_switch = 0.0;   // K, switch temperature assumed (ambient + switch_temperature_rise)
    double v_reverse = 0.0;  // V, diode reverse voltage while the switch is on
    double l_at_peak = 0.0;  // H, inductance at the peak current (roll-off)
    double regulation_error = 0.0; // (load_i_avg - target) / target
    // (I_reach - I_need)/I_need: how far the on-interval's asymptotic current I_reach = (Vin - V)/R
    // is above what regulation needs (the upper threshold, or the target for PWM); < 0 means lost.
    double regulation_headroom = 0.0;
    CornerStatus status = CornerStatus::ok;
    std::string reason; // plain sentence when status != ok
};

} // namespace coilsieve::converter
