#include "studies/pareto.hpp"

#include <algorithm>
#include <limits>
#include <numeric>
#include <stdexcept>
#include <string>

namespace coilsieve::studies {

bool dominates(std::span<const double> a, std::span<const double> b) {
    bool strictly = false;
    for (std::size_t i = 0; i < a.size() && i < b.size(); ++i) {
        if (a[i] > b[i]) return false;
        if (a[i] < b[i]) strictly = true;
    }
    return strictly;
}

std::vector<std::size_t> pareto_front(const std::vector<std::vector<double>>& points) {
    std::vector<std::size_t> order(points.size());
    std::iota(order.begin(), order.end(), std::size_t{0});
    // Lexicographic order: a point can only be dominated by one before it.
    std::sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
        if (points[a] != points[b]) return points[a] < points[b];
        return a < b;
    });
    std::vector<std::size_t> front;
    for (std::size_t i : order) {
        bool dominated = false;
        for (std::size_t f : front)
            if (dominates(points[f], points[i])) {
                dominated = true;
                break;
            }
        if (!dominated) front.push_back(i);
    }
    std::sort(front.begin(), front.end());
    return front;
}

std::vector<design::Objective> pareto_objectives(const design::Design& d) {
    if (!d.pareto.empty()) return d.pareto;
    std::vector<design::Objective> axes{design::Objective::loss, design::Objective::size};
    if (d.weights.cost > 0.0) axes.push_back(design::Objective::cost);
    return axes;
}

std::vector<std::string> pareto_axes(const std::vector<design::Objective>& axes) {
    std::vector<std::string> out;
    for (const auto a : axes) out.emplace_back(design::objective_name(a));
    return out;
}

ParetoPoint pareto_point(const optimisation::Objectives& o,
                         const std::vector<design::Objective>& axes) {
    ParetoPoint p;
    if (axes.size() > p.v.size())
        throw std::invalid_argument("a Pareto set has at most " + std::to_string(p.v.size()) +
                                    " objectives, one of each; got " + std::to_string(axes.size()));
    for (const auto a : axes) {
        double x = 0.0;
        switch (a) {
        case design::Objective::loss:
            x = o.loss;
            break;
        case design::Objective::size:
            x = o.size;
            break;
        case design::Objective::ripple:
            x = o.ripple;
            break;
        case design::Objective::margin:
            x = 1.0 - o.margin;
            break;
        case design::Objective::cost:
            x = o.cost ? *o.cost : std::numeric_limits<double>::infinity();
            break;
        }
        p.v[p.n++] = x;
    }
    return p;
}

std::vector<double> pareto_vector(const optimisation::Objectives& o,
                                  const std::vector<design::Objective>& axes) {
    const auto p = pareto_point(o, axes);
    return {p.values().begin(), p.values().end()};
}

} // namespace coilsieve::studies
