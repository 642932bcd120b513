#include "optimisation/objectives.hpp"

#include <algorithm>
#include <cmath>

namespace coilsieve::optimisation {

Objectives objectives_of(const converter::PairEvaluation& e, const parts::Inductor& l,
                         const parts::Diode& diode) {
    Objectives o;
    o.loss = e.loss_nominal;
    o.efficiency = e.efficiency_nominal;
    double peak = 0.0;
    for (const auto& c : e.corners) {
        peak = std::max(peak, c.il_peak);
        if (c.load_i_avg > 0.0) o.ripple = std::max(o.ripple, c.load_ripple_pp / c.load_i_avg);
    }
    o.size = l.volume() + diode.volume();
    o.footprint = l.footprint() + diode.footprint();
    o.margin = l.isat > 0.0 ? 1.0 - peak / l.isat : 0.0;
    if (l.price && diode.price && l.currency == diode.currency) o.cost = *l.price + *diode.price;
    return o;
}

double score(const Objectives& o, const design::Weights& w, const Scales& s) {
    return w.loss * o.loss / s.power + w.size * o.size / s.volume + w.ripple * o.ripple / s.ripple +
           w.margin * (1.0 - o.margin) + cost_term(o.cost, w, s);
}

double cost_term(const std::optional<double>& cost, const design::Weights& w, const Scales& s) {
    if (!(w.cost > 0.0)) return 0.0;
    if (cost) return w.cost * *cost / s.cost;
    return s.cost_unpriced ? w.cost * *s.cost_unpriced / s.cost : 0.0;
}

} // namespace coilsieve::optimisation
