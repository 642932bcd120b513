// IEC 60063 preferred-number series, typed in from the standard's tables: several E24 values
// (2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 8.2, ...) differ from round(10^(i/24), 1).

#include "units/quantity.hpp"

#include <array>
#include <stdexcept>
#include <string>

namespace coilsieve::units {
namespace {

constexpr std::array<double, 6> e6{1.0, 1.5, 2.2, 3.3, 4.7, 6.8};

constexpr std::array<double, 12> e12{1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2};

constexpr std::array<double, 24> e24{1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0,
                                     3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1};

} // namespace

std::span<const double> e_series(int n) {
    switch (n) {
    case 6:
        return e6;
    case 12:
        return e12;
    case 24:
        return e24;
    default:
        throw std::invalid_argument("E-series E" + std::to_string(n) +
                                    " is not available; use E6, E12 or E24 (IEC 60063)");
    }
}

} // namespace coilsieve::units
