#pragma once
// Evaluate one inductor-diode pair on a design: every corner, every limit.
// The analytical steady state is the fast path the optimiser calls.

#include "converter/operating_point.hpp"
#include "design/design.hpp"
#include "parts/diode_model.hpp"
#include "parts/inductor_model.hpp"

#include <memory>
#include <ostream>
#include <string>
#include <vector>

namespace coilsieve::converter {

// The switch is taken this far above the corner's ambient for its R_on(T) (an assumption: the
// design gives no thermal data for the switch; 30 K is a typical rise of a small MOSFET on a
// board).
constexpr double switch_temperature_rise = 30.0; // K

// The thermal fixed point stops when a pass moves each temperature by less than this: a corner's
// reported temperature and the one its losses were computed at differ by less.
constexpr double temperature_tolerance = 0.05; // K

// The switch's on-resistance at a corner: R_on rises linearly from its 25 °C value (design.hpp)
// and the switch sits switch_temperature_rise above the corner's ambient.
double switch_on_resistance(const design::Switch& sw, double ambient);

// Share |I_load/I_L| of the inductor's ripple at frequency f that flows in a load of dynamic
// resistance r with a capacitor C (ESR) across it: the current divider with Z_c = ESR + 1/(jωC).
// 1 without a capacitor; ESR/(ESR + r) as f grows without bound. Falls as f rises.
double load_ripple_share(double r, double capacitance, double esr, double frequency);

// Peak-to-peak load current per ampere of inductor ripple when the inductor current is an ideal
// triangle (rising for duty·T, falling for the rest) and the load r has a capacitor C (ESR)
// across it. The divider is first order, i_load = β·i_L + (1 − β)·z with τ·z' = i_L − z,
// β = ESR/(r + ESR), τ = (r + ESR)·C; the periodic solution is exact (two exponential pieces).
// 1 without a capacitor (or for a duty outside (0, 1)); β as C grows without bound.
double triangle_load_ripple(double r, double capacitance, double esr, double frequency,
                            double duty);

// The corners of a design for a part with inductance tolerance `l_tolerance` (fraction).
std::vector<Corner> make_corners(const design::Design& d, double l_tolerance);

// The design's own setting (band in A, or frequency), before any tuning.
Setting default_setting(const design::Design& d);

// The setting as it applies at one corner. A band given as a fraction of the target current
// scales with the corner's load-point current (a charger lowers its reference in pre-charge and
// constant voltage, and the comparator's band follows it); a band given in amperes is kept.
// evaluate_pair calls evaluate_corner with this; a simulator comparing a corner should too.
Setting corner_setting(const design::Design& d, const Corner& c, const Setting& s);

// Analytical periodic steady state at one corner, thermal fixed point included.
CornerResult evaluate_corner(const design::Design& d, const parts::InductorModel& l,
                             const parts::DiodeModel& diode, const Corner& c, const Setting& s);

// One limit checked at one corner. margin = (bound - value)/|bound| for upper limits, the
// opposite for lower ones: >= 0 holds, < 0 broken. The optimiser uses margins as constraints.
struct LimitCheck {
    std::string limit;  // "load_ripple", "f_sw_max", "isat", "vrrm", "tj_max", ...
    SharedName corner;  // corner name, or "" for part-only limits (height)
    double value = 0.0; // SI
    double bound = 0.0; // SI
    double margin = 0.0;
    std::string message; // plain sentence with numbers, for a broken limit
    bool fixed = false;  // set by the parts alone (ratings, sizes): no setting moves it
};

struct PairEvaluation {
    std::vector<CornerResult> corners;
    std::vector<LimitCheck> checks;     // every limit at every corner
    std::vector<LimitCheck> violations; // the broken ones
    bool feasible = false;
    double loss_nominal = 0.0; // W at the nominal corner, or time-weighted for a charger
    double efficiency_nominal = 0.0;
};

PairEvaluation evaluate_pair(const design::Design& d, const parts::Inductor& l,
                             const parts::Diode& diode, const Setting& s);

// What evaluate_pair derives from the parts alone, prepared once for many settings of one pair.
struct PreparedPair {
    parts::InductorModel inductor;
    parts::DiodeModel diode;
    std::vector<Corner> corners;
};
PreparedPair prepare_pair(const design::Design& d, const parts::Inductor& l,
                          const parts::Diode& diode);
PairEvaluation evaluate_pair(const design::Design& d, const parts::Inductor& l,
                             const parts::Diode& diode, const PreparedPair& prepared,
                             const Setting& s);
// The same with the models and corners made elsewhere: a ranking makes each part's model once and
// the corners once for each inductance tolerance (make_model, make_corners), not once a pair.
PairEvaluation evaluate_pair(const design::Design& d, const parts::Inductor& l,
                             const parts::Diode& diode, const parts::InductorModel& lm,
                             const parts::DiodeModel& dm, const std::vector<Corner>& corners,
                             const Setting& s);

} // namespace coilsieve::converter
