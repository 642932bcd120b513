#pragma once
// The keys of one corner in `check --json` and `rank --json`, as the README documents them.
#include <array>

namespace test_support {

inline constexpr std::array<const char*, 23> documented_corner_keys{
    "name",       "vin",     "ambient",   "duty",         "f_sw",   "t_on",       "t_off",
    "il_avg",     "il_peak", "il_valley", "il_ripple_pp", "il_rms", "load_i_avg", "load_ripple_pp",
    "id_avg",     "id_rms",  "isw_rms",   "dcm",          "losses", "p_out",      "efficiency",
    "t_inductor", "tj_diode"};

} // namespace test_support
