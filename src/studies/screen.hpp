#pragma once
// Screening each part alone with the limits that need no partner, and the per-part lower bounds
// that let the ranking skip pairs without changing its answer. Every test here is a necessary
// condition for feasibility, loosened by the inductance tolerance, the roll-off down to L(Isat)
// and generous allowances for resistive and diode drops, so screening never removes a part that
// a partner could make feasible.

#include "design/design.hpp"
#include "optimisation/tune.hpp"
#include "parts/diode.hpp"
#include "parts/diode_model.hpp"
#include "parts/inductor.hpp"
#include "parts/inductor_model.hpp"

#include <algorithm>
#include <string>
#include <vector>

namespace coilsieve::studies {

// Why a part was screened out: the limit, the corner and the numbers (SI).
struct ScreenReason {
    std::string limit;
    std::string corner;
    double value = 0.0;
    double bound = 0.0;
    std::string message;
};

// Allowances shared by the screens and the bounds (engineering margins, common practice): the
// diode carries at least duty_slack·(1 − D) of the charge, D the duty with the design's own switch
// and sense drops and the largest winding paired (EnvelopeCorner::off_share; the slack is for the
// diode's drop, DCM and the ramps: BoundsJunction.DiodeChargeShareCoversFeasiblePairs finds 0.89
// at least; 0.75 before the winding was taken); a diode drops at most diode_drop_max.
constexpr double pwm_current_share = 1.0 - 1e-6;
constexpr double duty_slack = 0.8;
constexpr double diode_drop_max = 3.0; // V
// The share of its target the average current of a feasible pair is at least, for this design's
// control: a fact either way. Under PWM the engine solves the duty for the target, so only the
// solver's tolerance; under hysteretic control the limit current_error.
double average_current_share(const design::Design& d);

// The operating envelope a design gives, from its corners.
struct EnvelopeCorner {
    std::string name;
    double vin = 0.0;
    double v0 = 0.0;      // load EMF / knee
    double r = 0.0;       // load series resistance
    double current = 0.0; // target average current
    double ambient = 0.0; // K
    double l_scale = 1.0; // the corner's inductance tolerance factor
    bool dcr_max = false; // the corner takes the maximum DCR
    bool nominal = false; // the loss objective is taken here
    double weight = 0.0;  // its share of the loss objective (charge profile time)
    // The average current of a feasible pair is at least this share of `current` and at most
    // (2 − share) times it (average_current_share).
    double current_share = pwm_current_share;
    double current_lb() const { return current_share * current; }
    double current_ub() const { return (2.0 - current_share) * current; }
    // The lossless duty, the load's voltage at the corner's current over Vin, in [0, 1], as the
    // floors take it.
    double ideal_duty() const {
        return vin > 0.0 ? std::clamp((v0 + r * current) / vin, 0.0, 1.0) : 0.0;
    }
    // The share of the charge the diode carries at least: duty_slack·(1 − D) with
    // D = (V_load + I·(R_sense + R_w))/(Vin − I·R_on), the CCM duty with the winding's largest
    // resistance R_w (ScreenContext::winding_resistance) and before the diode's drop, which only
    // lengthens the on-time (Erickson & Maksimović 2nd ed. ch. 2). Near dropout the winding's drop
    // is most of the headroom, and the diode carries next to nothing.
    double off_share = 0.0;
};

struct ScreenContext {
    const design::Design* design = nullptr;
    optimisation::SettingRange range;
    std::vector<EnvelopeCorner> corners;
    double vin_max = 0.0;
    double i_max = 0.0;      // largest target current over corners
    double target = 0.0;     // the design's target current (a band given as a fraction scales
                             // with each corner's current, as converter::corner_setting does)
    double ron_hot = 0.0;    // switch on-resistance at 175 °C junction (upper bound)
    double loss_floor = 0.0; // W: sense-resistor and switch conduction loss no pair avoids,
                             // at the nominal corner(s) as the loss objective weighs them
    double winding_resistance = 0.0; // Ω: the largest DCR of the inductors paired (off_share)
};

// EnvelopeCorner::off_share with a winding resistance `winding` (Ω).
double off_share_with(const design::Design& d, const EnvelopeCorner& e, double winding);
// The largest DCR a feasible pair's winding can have: at its temperature limit, maximum DCR.
double winding_resistance_max(const design::Design& d, const parts::InductorModel& m);
// Takes the largest winding resistance of the inductors to be paired into every corner's
// off_share (the corners part_corners makes from `c` too).
void set_winding_resistance(ScreenContext& c, double r);

bool hysteretic(const ScreenContext& c);

// One corner's part of ScreenContext::loss_floor (W): its sense-resistor and switch conduction
// loss no pair avoids.
double corner_loss_floor(const ScreenContext& c, const EnvelopeCorner& k);

// A diode's heating from below at one corner: conduction at least off·I·V_f,min (V_f is concave in
// temperature, so its least value over [ambient, tj_bound] is at an end) and reverse leakage at
// least I_R(Vin, Tj)·Vin·D with D >= Vo/Vin. The map Tj -> Ta + Rth·P(Tj) rises with Tj, so passes
// from the ambient stay below the engine's fixed point; they stop once Tj is above `tj_bound`.
struct JunctionFloor {
    double conduction = 0.0; // W
    double leakage = 0.0;    // W, at the last junction temperature not above tj_bound
    double tj = 0.0;         // K
};
JunctionFloor junction_floor(const EnvelopeCorner& k, const parts::DiodeModel& m, double tj_bound,
                             int passes);
// What a diode's junction tables depend on at a corner: the supply, the ambient and the load point
// (its current, v0 and r set the duty). Corners of different inductance tolerance share it; two
// points of a charge profile at the same current do not.
struct OperatingPoint {
    double vin = 0.0, ambient = 0.0, current = 0.0, v0 = 0.0, r = 0.0;
    bool operator==(const OperatingPoint&) const = default;
};
OperatingPoint operating_point(const EnvelopeCorner& k);

// The diode's heating P (conduction + leakage) at the engine's thermal fixed point, from below,
// for a share `off` of the period in conduction. At that point Tj = Ta + Rth·P (to within
// converter::temperature_tolerance), and P >= off·I·V_f(I, Tj) + I_R(Vin, Tj)·Vin·D
// (junction_floor's inequalities). So Tj is no lower than the first temperature where that floor
// can balance, and P no lower than the rise there over Rth: V_f is taken near the junction's own
// temperature instead of at its limit. Tabulated once per diode and corner on cells of [ambient,
// tj_bound]; each cell is bounded by monotone pieces as in junction_can_settle.

class JunctionBalance {
public:
    JunctionBalance() = default;
    JunctionBalance(const EnvelopeCorner& k, const parts::DiodeModel& m, double tj_bound);
    double least_heating(double off) const; // W
    // Whether some cell admits a balance with conduction over share `off` (false: the junction
    // passes its limit or runs away), and the largest share that still does (−1: none does).
    bool can_balance(double off) const;
    double largest_settling_share() const;
    // The same with the leakage `leak_scale` times the corner's (a reverse-biased share of the
    // period that much above the corner's ideal duty): the largest share, exact up to rounding.
    bool can_balance(double off, double leak_scale) const;
    double largest_settling_share(double leak_scale) const;
    const OperatingPoint& point() const { return point_; }

private:
    // The first cell where heating `q`·V_f + leakage can meet the temperature (t_.size(): none).
    std::size_t first_balancing_cell(double q, double leak_scale = 1.0) const;
    // The largest share in [0, hi] that balances, by halving (can_balance(0) must hold).
    double edge_below(double hi, double leak_scale) const;

    OperatingPoint point_;
    double ambient_ = 0.0, rth_ = 0.0, current_ = 0.0;
    std::vector<double> t_, vf_, leak_; // cell edges, V_f(I, t) and leakage power there
};

// Whether the junction can balance at all: false when, on every cell of [ambient, tj_bound], the
// heating from below exceeds the temperature (T < Ta + Rth·(conduction + leakage) throughout), so
// the fixed point the engine seeks lies above the limit or does not exist (runaway). Each cell is
// bounded by monotone pieces: leakage at its cold end, conduction at its lower end value (V_f is
// concave in T), the temperature at its hot end. This sees runaway that passes from the ambient
// miss, because there V_f may be taken at each temperature rather than at its least.
bool junction_can_settle(const EnvelopeCorner& k, const parts::DiodeModel& m, double tj_bound);

// The least mean a monotone ramp from a to b can have when its time density dt/di stays within
// [ρ_min, ρ_max]: a + h·(b − a), h = √r/(1 + √r) with r = ρ_min/ρ_max in [0, 1] (the density
// at ρ_max below the mean and ρ_min above it; h = 1/2 for a straight ramp).
double ramp_mean_share(double density_ratio);

// The design's corners for a part of this inductance tolerance (inductance scaled per corner).
std::vector<EnvelopeCorner> part_corners(const ScreenContext& c, double tolerance);
// The band (A) at a corner for a setting `band` at the target current (a fractional band follows
// the corner's current, as converter::corner_setting does).
double band_at(const ScreenContext& c, const EnvelopeCorner& k, double band);
// g = Von·Voff/(Von + Voff): the buck's volt-second product per unit time, f·L·ΔI = g
// (volt-second balance, Erickson & Maksimović 2nd ed. ch. 2). Increasing in both arguments.
double volt_second_rate(double von, double voff);

// `range` is the setting range the tuner will use (fixed when --band/--frequency is given).
ScreenContext make_screen_context(const design::Design& d, const optimisation::SettingRange& range);

std::vector<ScreenReason> screen_inductor(const ScreenContext& c, const parts::Inductor& l,
                                          const parts::InductorModel& m);
std::vector<ScreenReason> screen_diode(const ScreenContext& c, const parts::Diode& diode,
                                       const parts::DiodeModel& m);

} // namespace coilsieve::studies
