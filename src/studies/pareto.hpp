#pragma once
// Exact non-dominated (Pareto) set; every objective is minimised.

#include "design/design.hpp"
#include "optimisation/objectives.hpp"

#include <array>
#include <cstddef>
#include <span>
#include <string>
#include <vector>

namespace coilsieve::studies {

// a dominates b: no worse in every objective and strictly better in at least one. Equal vectors
// do not dominate each other, so ties stay on the front together.
bool dominates(std::span<const double> a, std::span<const double> b);

// Indices (ascending) of the points no other point dominates. O(n^2) in the worst case, with the
// candidates sorted by the first objective so most comparisons stop early.
std::vector<std::size_t> pareto_front(const std::vector<std::vector<double>>& points);

// The Pareto set's objectives: the design's own list, or by default loss and size, plus cost when
// its weight is positive (a pair without a price counts as the most expensive). The default holds
// the hardware trade-offs a designer buys. Ripple and saturation margin are left out of it because
// both follow mostly from the tuned band or frequency (a free choice the tuner trades inside the
// pair's own score) and are guarded by limits; they still count in the weighted score, and a
// design can add them ("pareto": ["loss", "size", "ripple", "margin"]) at the price of a larger
// set and a slower ranking.
std::vector<design::Objective> pareto_objectives(const design::Design& d);
std::vector<std::string> pareto_axes(const std::vector<design::Objective>& axes);
// A point in the Pareto set's space, held inline: the ranking forms one for every pair it
// considers. At most one value per objective (an axis list with repeats is refused).
struct ParetoPoint {
    std::array<double, 5> v{};
    std::size_t n = 0;
    std::span<const double> values() const { return {v.data(), n}; }
};
// Every entry minimised: margin enters as 1 - margin.
ParetoPoint pareto_point(const optimisation::Objectives& o,
                         const std::vector<design::Objective>& axes);
std::vector<double> pareto_vector(const optimisation::Objectives& o,
                                  const std::vector<design::Objective>& axes);

} // namespace coilsieve::studies
