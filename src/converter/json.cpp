#include "converter/json.hpp"

#include <cmath>

namespace coilsieve::converter {

namespace {

// JSON has no NaN or infinity; a non-finite figure (never expected) is written as null.
nlohmann::json num(double v) { return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(); }

} // namespace

std::string_view to_string(CornerStatus s) {
    switch (s) {
    case CornerStatus::ok:
        return "ok";
    case CornerStatus::no_regulation:
        return "no_regulation";
    case CornerStatus::thermal_runaway:
        return "thermal_runaway";
    case CornerStatus::no_convergence:
        return "no_convergence";
    }
    return "unknown";
}

void to_json(nlohmann::json& j, const Setting& s) {
    j = nlohmann::json::object();
    j["band"] = num(s.band);
    j["frequency"] = num(s.frequency);
    j["capacitance"] = s.capacitance ? num(*s.capacitance) : nlohmann::json();
}

void to_json(nlohmann::json& j, const Losses& l) {
    j = nlohmann::json{{"inductor_copper", num(l.inductor_copper)},
                       {"inductor_core", num(l.inductor_core)},
                       {"diode_conduction", num(l.diode_conduction)},
                       {"diode_switching", num(l.diode_switching)},
                       {"diode_leakage", num(l.diode_leakage)},
                       {"switch_conduction", num(l.switch_conduction)},
                       {"switch_switching", num(l.switch_switching)},
                       {"sense", num(l.sense)},
                       {"capacitor", num(l.capacitor)},
                       {"total", num(l.total)}};
}

void to_json(nlohmann::json& j, const CornerResult& r) {
    j = nlohmann::json::object();
    j["name"] = r.name;
    j["status"] = std::string(to_string(r.status));
    if (!r.reason.empty()) j["reason"] = r.reason;
    j["vin"] = num(r.vin);
    j["ambient"] = num(r.ambient);
    j["duty"] = num(r.duty);
    j["f_sw"] = num(r.f_sw);
    j["t_on"] = num(r.t_on);
    j["t_off"] = num(r.t_off);
    j["il_avg"] = num(r.il_avg);
    j["il_peak"] = num(r.il_peak);
    j["il_valley"] = num(r.il_valley);
    j["il_ripple_pp"] = num(r.il_ripple_pp);
    j["il_rms"] = num(r.il_rms);
    j["load_i_avg"] = num(r.load_i_avg);
    j["load_ripple_pp"] = num(r.load_ripple_pp);
    j["id_avg"] = num(r.id_avg);
    j["id_rms"] = num(r.id_rms);
    j["isw_rms"] = num(r.isw_rms);
    j["isw_avg"] = num(r.isw_avg);
    j["dcm"] = r.dcm;
    j["losses"] = r.losses;
    j["p_out"] = num(r.p_out);
    j["p_in"] = num(r.p_in);
    j["efficiency"] = num(r.efficiency);
    j["t_inductor"] = num(r.t_inductor);
    j["tj_diode"] = num(r.tj_diode);
    j["t_switch"] = num(r.t_switch);
    j["v_reverse"] = num(r.v_reverse);
    j["l_at_peak"] = num(r.l_at_peak);
    j["regulation_error"] = num(r.regulation_error);
    j["regulation_headroom"] = num(r.regulation_headroom);
}

void to_json(nlohmann::json& j, const LimitCheck& k) {
    j = nlohmann::json{{"limit", k.limit},      {"corner", k.corner},      {"value", num(k.value)},
                       {"bound", num(k.bound)}, {"margin", num(k.margin)}, {"message", k.message}};
}

void to_json(nlohmann::json& j, const PairEvaluation& e) {
    j = nlohmann::json::object();
    j["corners"] = e.corners;
    j["checks"] = e.checks;
    j["violations"] = e.violations;
    j["feasible"] = e.feasible;
    j["loss_nominal"] = num(e.loss_nominal);
    j["efficiency_nominal"] = num(e.efficiency_nominal);
}

} // namespace coilsieve::converter
