#include "design/design.hpp"

#include <algorithm>
#include <array>
#include <utility>

namespace coilsieve::design {

double band_amps(const Control& c, double target_current) {
    return c.band_is_fraction ? c.band * target_current : c.band;
}

namespace {
using D = units::Dimension;
constexpr LimitField limit_table[] = {
    {"load_ripple", D::ratio, true, true, [](Limits& l, double v) { l.load_ripple = v; }},
    {"current_error", D::ratio, true, true, [](Limits& l, double v) { l.current_error = v; }},
    {"f_sw_min", D::frequency, false, false, [](Limits& l, double v) { l.f_sw_min = v; }},
    {"f_sw_max", D::frequency, true, false, [](Limits& l, double v) { l.f_sw_max = v; }},
    {"t_on_min", D::time, false, false, [](Limits& l, double v) { l.t_on_min = v; }},
    {"t_off_min", D::time, false, false, [](Limits& l, double v) { l.t_off_min = v; }},
    {"isat_derating", D::ratio, true, false, [](Limits& l, double v) { l.isat_derating = v; }},
    {"vrrm_derating", D::ratio, true, false, [](Limits& l, double v) { l.vrrm_derating = v; }},
    {"diode_current_derating", D::ratio, true, false,
     [](Limits& l, double v) { l.diode_current_derating = v; }},
    {"tj_max", D::temperature, true, false, [](Limits& l, double v) { l.tj_max = v; }},
    {"t_inductor_max", D::temperature, true, false,
     [](Limits& l, double v) { l.t_inductor_max = v; }},
    {"height_max", D::length, true, false, [](Limits& l, double v) { l.height_max = v; }},
    {"footprint_max", D::area, true, false, [](Limits& l, double v) { l.footprint_max = v; }},
    {"efficiency_min", D::ratio, false, false, [](Limits& l, double v) { l.efficiency_min = v; }},
};

double transitions(const Switch& sw) {
    return std::max(0.0, sw.rise_time) + std::max(0.0, sw.fall_time);
}
} // namespace

std::span<const LimitField> limit_fields() { return limit_table; }

const LimitField* limit_field(std::string_view name) {
    for (const auto& f : limit_table)
        if (f.name == name) return &f;
    return nullptr;
}

double shortest_on_time(const Design& d) {
    return std::max(d.limits.t_on_min.value_or(0.0), transitions(d.sw));
}
double shortest_off_time(const Design& d) {
    return std::max(d.limits.t_off_min.value_or(0.0), transitions(d.sw));
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

std::vector<Objective> all_objectives() {
    std::vector<Objective> out;
    for (const auto& [v, name] : objective_names) out.push_back(v);
    return out;
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

namespace {
double Weights::*weight_member(Objective o) {
    switch (o) {
    case Objective::loss:
        return &Weights::loss;
    case Objective::size:
        return &Weights::size;
    case Objective::ripple:
        return &Weights::ripple;
    case Objective::margin:
        return &Weights::margin;
    case Objective::cost:
        break;
    }
    return &Weights::cost;
}
} // namespace

double& weight_of(Weights& w, Objective o) { return w.*weight_member(o); }
double weight_of(const Weights& w, Objective o) { return w.*weight_member(o); }

std::vector<Objective> pareto_from_names(const std::vector<std::string>& names) {
    std::vector<Objective> out;
    for (std::size_t i = 0; i < names.size(); ++i) {
        const auto o = objective_from_name(names[i]);
        if (!o)
            throw ObjectiveListError(i, "unknown objective \"" + names[i] +
                                            "\"; known: " + objective_list());
        if (std::find(out.begin(), out.end(), *o) != out.end())
            throw ObjectiveListError(i, "\"" + names[i] + "\" is listed twice");
        out.push_back(*o);
    }
    if (out.size() < 2)
        throw ObjectiveListError(std::string::npos,
                                 "a Pareto set needs at least two objectives, e.g. loss,size "
                                 "(known: " +
                                     objective_list() + ")");
    return out;
}

} // namespace coilsieve::design
