#pragma once
// The figures a tuned pair is judged on, and the single weighted score the tuner minimises.
// Normalisation uses fixed, design-derived scales (never the spread of the evaluated pairs), so a
// pair's score does not depend on which other pairs were evaluated or pruned; only the charge for
// a missing price comes from the catalog searched, as a whole.

#include "converter/evaluate.hpp"
#include "design/design.hpp"
#include "parts/diode.hpp"
#include "parts/inductor.hpp"

#include <optional>

namespace coilsieve::optimisation {

struct Objectives {
    double loss = 0.0; // W at the nominal corner (time-weighted for a charger)
    double efficiency = 0.0;
    double ripple = 0.0;        // load ripple p-p as a fraction of the load current, worst corner
    double size = 0.0;          // m^3, inductor body + diode package
    double footprint = 0.0;     // m^2, reported only
    double margin = 0.0;        // 1 - peak/Isat at the worst corner; more is better
    std::optional<double> cost; // sum of prices when both parts have one in the same currency
};

// Fixed scales a design gives to each objective.
struct Scales {
    double power = 1.0;   // W, output power at the nominal load point(s): loss is a fraction of it
    double ripple = 0.3;  // fraction: the ripple limit, or 30 % p-p when the design sets none
    double volume = 1e-6; // m^3: a fixed reference of 1 cm^3
    double cost = 1.0;    // one currency unit
    // The cost an unpriced pair (a part without a price, or two currencies) is scored at: the
    // dearest priced inductor plus the dearest priced diode of the catalog searched, so a missing
    // price is never an advantage (the Pareto set counts it as the most expensive, too). None when
    // the catalog prices no inductor or no diode: then no pair has a cost, and none is charged.
    std::optional<double> cost_unpriced;
};

Scales make_scales(const design::Design& d);

// Figures of one evaluated pair.
Objectives objectives_of(const converter::PairEvaluation& e, const parts::Inductor& l,
                         const parts::Diode& diode);

// Weighted sum of normalised objectives; lower is better. Margin enters as (1 - margin), the
// peak current as a share of Isat.
double score(const Objectives& o, const design::Weights& w, const Scales& s);
// The cost's share of the score: the pair's cost, or Scales::cost_unpriced when it has none.
double cost_term(const std::optional<double>& cost, const design::Weights& w, const Scales& s);

} // namespace coilsieve::optimisation
