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

// The operating envelope a design gives, from its corners.
struct EnvelopeCorner {
    std::string name;
    double vin = 0.0;
    double v0 = 0.0;       // load EMF / knee
    double r = 0.0;        // load series resistance
    double current = 0.0;  // target average current
    double ambient = 0.0;  // K
    double l_scale = 1.0;  // the corner's inductance tolerance factor
};

struct ScreenContext {
    const design::Design* design = nullptr;
    optimisation::SettingRange range;
    std::vector<EnvelopeCorner> corners;
    double vin_max = 0.0;
    double i_max = 0.0;        // largest target current over corners
    double target = 0.0;       // the design's target current (a band given as a fraction scales
                               // with each corner's current, as converter::corner_setting does)
    double ron_hot = 0.0;      // switch on-resistance at 175 °C junction (upper bound)
    double loss_floor = 0.0;   // W: sense-resistor and switch conduction loss no pair avoids
};

// `range` is the setting range the tuner will use (fixed when --band/--frequency is given).
ScreenContext make_screen_context(const design::Design& d, const optimisation::SettingRange& range);

std::vector<ScreenReason> screen_inductor(const ScreenContext& c, const parts::Inductor& l,
                                          const parts::InductorModel& m);
std::vector<ScreenReason> screen_diode(const ScreenContext& c, const parts::Diode& diode);

// Per-part contributions to a pair's optimistic objective vector. The pair's lower bounds are
// sums: loss >= inductor.loss + diode.loss, size exact, margin <= inductor.margin, ripple >=
// inductor.ripple, cost exact.
struct InductorBound {
    double loss = 0.0;   // W, copper loss floor
    double size = 0.0;
    double margin = 1.0; // upper bound of the saturation margin
    double ripple = 0.0; // lower bound of the load ripple fraction
};
struct DiodeBound {
    double loss = 0.0;   // W, conduction loss floor
    double size = 0.0;
};

InductorBound inductor_bound(const ScreenContext& c, const parts::Inductor& l,
                             const parts::InductorModel& m);
DiodeBound diode_bound(const ScreenContext& c, const parts::Diode& diode,
                       const parts::DiodeModel& m);

} // namespace coilsieve::studies
