#pragma once
// Exact non-dominated (Pareto) set; every objective is minimised.

#include "design/design.hpp"
#include "optimisation/objectives.hpp"

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

// The Pareto axes: loss and size always, cost when its weight is positive (a pair without a price
// counts as the most expensive). These are the hardware trade-offs a designer buys. Ripple and
// saturation margin are left out on purpose: both follow mostly from the tuned band or frequency
// (a free choice the tuner trades inside the pair's own score) and are guarded by limits
// (load_ripple, isat_derating); they still count in the weighted score.
std::vector<std::string> pareto_axes(const design::Weights& w);
std::vector<double> pareto_vector(const optimisation::Objectives& o, const design::Weights& w);

} // namespace coilsieve::studies
