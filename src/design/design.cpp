#include "design/design.hpp"

#include <array>
#include <utility>

namespace coilsieve::design {

double band_amps(const Control& c, double target_current) {
    return c.band_is_fraction ? c.band * target_current : c.band;
}

namespace {
constexpr std::array<std::pair<Objective, std::string_view>, 5> objective_names{{
    {Objective::loss, "loss"},
    {Objective::size, "size"},
    {Objective::ripple, "ripple"},
    {Objective::margin, "margin"},
    {Objective::cost, "cost"},
}};
} // namespace

std::string_view objective_name(Objective o) {
    for (const auto& [v, name] : objective_names)
        if (v == o) return name;
    return "?";
}

std::string objective_list() {
    std::string out;
    for (const auto& [v, name] : objective_names)
        out += (out.empty() ? "" : ", ") + std::string(name);
    return out;
}

std::optional<Objective> objective_from_name(std::string_view name) {
    for (const auto& [v, n] : objective_names)
        if (n == name) return v;
    return std::nullopt;
}

} // namespace coilsieve::design
