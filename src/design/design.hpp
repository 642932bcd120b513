#pragma once
// A design: everything about the converter except the inductor and the diode.
// Read from a JSON design file by design/design_json.hpp; plain data here.

#include "loads/load.hpp"
#include "units/quantity.hpp"

#include <optional>
#include <span>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace coilsieve::design {

struct Supply {
    double min = 0.0, nom = 0.0, max = 0.0; // V
};

// Defaults: a generic small MOSFET, printed when used (see design_json.cpp).
struct Switch {
    double on_resistance = 0.1;          // Ω at 25 °C
    double on_resistance_tempco = 0.004; // 1/K, relative rise per kelvin
    double rise_time = 20e-9;            // s
    double fall_time = 20e-9;            // s
    double gate_charge = 10e-9;          // C
    double drive_voltage = 10.0;         // V
    double output_capacitance = 100e-12; // F
    std::vector<std::string> defaulted;  // fields that took the default
};

struct OutputCapacitor {
    double capacitance = 0.0; // F
    double esr = 0.0;         // Ω
};

enum class ControlMode { hysteretic, pwm };

struct Control {
    ControlMode mode = ControlMode::hysteretic;
    // Hysteretic: band is the peak-to-peak distance between thresholds, as a fraction of the
    // target current (band_is_fraction) or in amperes.
    double band = 0.2;
    bool band_is_fraction = true;
    double delay = 0.0;                     // s, comparator + gate-drive delay
    double band_min = 0.05, band_max = 0.6; // same unit as band
    // PWM
    double frequency = 0.0; // Hz
    double frequency_min = 20e3, frequency_max = 2e6;
};

struct Ambient {
    double max = 298.15;       // K
    std::optional<double> min; // K
};

// A limit is optional (absent means "not checked") unless it has a default.
struct Limits {
    std::optional<double> load_ripple; // fraction p-p of average load current
    double f_sw_min = 20e3;            // Hz, above hearing (common practice)
    std::optional<double> f_sw_max;    // Hz
    // The controller's minimum on-time and off-time (its datasheet's figures). Either way the
    // switch needs at least its rise plus fall time to switch fully (converter/pair.cpp).
    std::optional<double> t_on_min;  // s
    std::optional<double> t_off_min; // s
    // |average load current − target|/target at every corner: hysteretic control sets the average
    // only through the thresholds, the delay and the ramps' shape. A constant-current stage is
    // specified by its current: ±5 % is the usual accuracy asked of an LED driver (common
    // practice); 100 % lifts the limit.
    double current_error = 0.05;          // fraction
    double isat_derating = 0.8;           // peak <= derating * Isat (common practice)
    double vrrm_derating = 0.8;           // reverse voltage <= derating * Vrrm (common practice)
    double diode_current_derating = 0.8;  // diode average <= derating * If(AV) (common practice)
    std::optional<double> tj_max;         // K
    std::optional<double> t_inductor_max; // K
    std::optional<double> height_max;     // m
    std::optional<double> footprint_max;  // m^2
    std::optional<double> efficiency_min; // fraction
};

struct Weights {
    double loss = 1.0, size = 1.0, ripple = 0.5, margin = 0.5, cost = 0.0;
};

// The objectives a ranking's Pareto set can be taken over.
enum class Objective { loss, size, ripple, margin, cost };
// "loss", "size", "ripple", "margin", "cost".
std::string_view objective_name(Objective o);
std::optional<Objective> objective_from_name(std::string_view name);
// Every objective, in the order the messages list them.
std::vector<Objective> all_objectives();
// "loss, size, ripple, margin, cost": for messages naming the known objectives.
std::string objective_list();
// The weight an objective carries.
double& weight_of(Weights& w, Objective o);
double weight_of(const Weights& w, Objective o);

// A Pareto objective list that cannot be used: `index` is the entry at fault, or npos when the
// list as a whole is (fewer than two objectives).
struct ObjectiveListError : std::invalid_argument {
    ObjectiveListError(std::size_t at, const std::string& message)
        : std::invalid_argument(message), index(at) {}
    std::size_t index;
};
// The Pareto objectives from their names: each known, none twice, at least two.
std::vector<Objective> pareto_from_names(const std::vector<std::string>& names);

struct Design {
    std::string name;
    Supply supply;
    loads::Load load;
    Switch sw;
    double sense_resistor = 0.0; // Ω
    std::optional<OutputCapacitor> output_capacitor;
    Control control;
    Ambient ambient;
    Limits limits;
    Weights weights;
    // The Pareto set's objectives; empty: loss and size, plus cost when it is weighted. More
    // objectives make a larger set and a slower ranking (fewer pairs can be shown dominated).
    std::vector<Objective> pareto;
};

// Band in amperes for a design's target current.
double band_amps(const Control& c, double target_current);

// The design file's limits as named there: the unit of the value, whether it is a maximum, whether
// a ratio may exceed 100 % (a ripple or an error is no share of a whole), and where it is kept.
struct LimitField {
    std::string_view name;
    units::Dimension dimension;
    bool upper;
    bool above_one;
    void (*set)(Limits&, double);
};
std::span<const LimitField> limit_fields();
const LimitField* limit_field(std::string_view name); // nullptr for an unknown name

// The shortest on- and off-time a switching period may hold: the controller's minimum
// (limits.t_on_min, limits.t_off_min) or the switch's rise plus fall time, whichever is longer
// (a shorter pulse never switches fully).
double shortest_on_time(const Design& d);
double shortest_off_time(const Design& d);

} // namespace coilsieve::design
