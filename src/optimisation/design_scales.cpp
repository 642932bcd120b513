// Design-derived figures for tuning and scoring (kept apart: they need the load models).
#include "loads/load.hpp"
#include "optimisation/objectives.hpp"
#include "optimisation/tune.hpp"

#include <algorithm>
#include <cmath>

namespace coilsieve::optimisation {

Scales make_scales(const design::Design& d) {
    Scales s;
    // Output power at the design's load points (weighted by time for a charge profile).
    double p = 0.0, w = 0.0;
    for (const auto& pt : loads::load_points(d.load, d.ambient.max)) {
        p += pt.weight * (pt.v0 + pt.r * pt.current) * pt.current;
        w += pt.weight;
    }
    if (w > 0.0 && std::isfinite(p) && p > 0.0) s.power = p / w;
    if (d.limits.load_ripple && *d.limits.load_ripple > 0.0) s.ripple = *d.limits.load_ripple;
    return s;
}

SettingRange setting_range(const design::Design& d) {
    SettingRange r;
    if (d.control.mode == design::ControlMode::hysteretic) {
        const double scale = d.control.band_is_fraction ? loads::target_current(d.load) : 1.0;
        r.variable = Variable::band;
        r.lo = d.control.band_min * scale;
        r.hi = d.control.band_max * scale;
        r.log_scale = false;
    } else {
        r.variable = Variable::frequency;
        r.lo = d.control.frequency_min;
        r.hi = d.control.frequency_max;
        r.log_scale = r.lo > 0.0;
    }
    if (r.hi < r.lo) std::swap(r.lo, r.hi);
    return r;
}

} // namespace coilsieve::optimisation
