#include "design/design.hpp"

namespace coilsieve::design {

double band_amps(const Control& c, double target_current) {
    return c.band_is_fraction ? c.band * target_current : c.band;
}

} // namespace coilsieve::design
