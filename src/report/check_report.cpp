#include "report/check_report.hpp"

#include "converter/json.hpp"
#include "design/design.hpp"
#include "report/table.hpp"
#include "units/quantity.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <sstream>

namespace coilsieve::report {

namespace {

using units::Dimension;

std::string fmt(double v, Dimension d) { return units::format(v, d); }

// "+3.10 %" / "-2.00 %" (built in steps: GCC 12 misreports -Wrestrict on a ternary + string).
std::string signed_ratio(double v) {
    std::string out = v >= 0.0 ? std::string("+") : std::string();
    out += fmt(v, Dimension::ratio);
    return out;
}

std::string join(const std::vector<std::string>& v, std::string_view sep) {
    std::string out;
    for (const auto& s : v) out += (out.empty() ? "" : std::string(sep)) + s;
    return out;
}

std::string part_name(const std::string& source, const std::string& id) {
    return source.empty() ? id : source + ":" + id;
}

std::string setting_text(const design::Design& d, const converter::Setting& s) {
    std::string out;
    if (d.control.mode == design::ControlMode::hysteretic) {
        const double target = loads::target_current(d.load);
        out = "hysteretic control, band " + fmt(s.band, Dimension::current) + " p-p";
        if (target > 0.0) out += " (" + fmt(s.band / target, Dimension::ratio) + " of the target)";
        out += ", comparator and driver delay " + fmt(d.control.delay, Dimension::time);
    } else {
        out = "fixed-frequency PWM at " + fmt(s.frequency, Dimension::frequency);
    }
    if (s.capacitance) out += ", output capacitor " + fmt(*s.capacitance, Dimension::capacitance);
    return out;
}

Table operating_table(const converter::PairEvaluation& e) {
    Table t({{"corner"},
             {"Vin", Align::right},
             {"ambient", Align::right},
             {"f_sw", Align::right},
             {"duty", Align::right},
             {"I_L avg", Align::right},
             {"I_L peak", Align::right},
             {"ripple p-p", Align::right},
             {"load ripple", Align::right},
             {"I_L rms", Align::right},
             {"I_D avg", Align::right},
             {"mode"}});
    for (const auto& r : e.corners) {
        if (r.status != converter::CornerStatus::ok) {
            std::vector<std::string> row(12, "-");
            row[0] = r.name;
            row[1] = fmt(r.vin, Dimension::voltage);
            row[2] = fmt(r.ambient, Dimension::temperature);
            row[11] = std::string(converter::to_string(r.status));
            t.add_row(std::move(row));
            continue;
        }
        t.add_row({r.name, fmt(r.vin, Dimension::voltage), fmt(r.ambient, Dimension::temperature),
                   fmt(r.f_sw, Dimension::frequency), fmt(r.duty, Dimension::ratio),
                   fmt(r.il_avg, Dimension::current), fmt(r.il_peak, Dimension::current),
                   fmt(r.il_ripple_pp, Dimension::current),
                   fmt(r.load_ripple_pp, Dimension::current), fmt(r.il_rms, Dimension::current),
                   fmt(r.id_avg, Dimension::current), r.dcm ? "DCM" : "CCM"});
    }
    return t;
}

Table loss_table(const converter::PairEvaluation& e) {
    Table t({{"corner"},
             {"copper", Align::right},
             {"core*", Align::right},
             {"D cond.", Align::right},
             {"D switch.", Align::right},
             {"D leak.", Align::right},
             {"S cond.", Align::right},
             {"S switch.", Align::right},
             {"sense", Align::right},
             {"total", Align::right},
             {"efficiency", Align::right},
             {"T inductor", Align::right},
             {"Tj diode", Align::right}});
    for (const auto& r : e.corners) {
        if (r.status != converter::CornerStatus::ok) continue;
        const auto& p = r.losses;
        t.add_row(
            {r.name, fmt(p.inductor_copper, Dimension::power),
             fmt(p.inductor_core, Dimension::power), fmt(p.diode_conduction, Dimension::power),
             fmt(p.diode_switching, Dimension::power), fmt(p.diode_leakage, Dimension::power),
             fmt(p.switch_conduction, Dimension::power), fmt(p.switch_switching, Dimension::power),
             fmt(p.sense + p.capacitor, Dimension::power), fmt(p.total, Dimension::power),
             fmt(r.efficiency, Dimension::ratio), fmt(r.t_inductor, Dimension::temperature),
             fmt(r.tj_diode, Dimension::temperature)});
    }
    return t;
}

// Unit of a limit's value, for the table.
Dimension limit_dimension(const std::string& limit) {
    // A check named as the design file's limit has that limit's unit; the rest check a rating.
    if (const auto* f = design::limit_field(limit)) return f->dimension;
    static const std::map<std::string, Dimension, std::less<>> dims{
        {"isat", Dimension::current},           {"inductor_rms", Dimension::current},
        {"t_inductor", Dimension::temperature}, {"vrrm", Dimension::voltage},
        {"diode_current", Dimension::current},  {"regulation", Dimension::ratio},
        {"srf", Dimension::frequency}};
    const auto it = dims.find(limit);
    return it == dims.end() ? Dimension::dimensionless : it->second;
}

// One row per limit: the check with the least margin over all corners.
Table limits_table(const converter::PairEvaluation& e) {
    std::vector<const converter::LimitCheck*> worst;
    for (const auto& k : e.checks) {
        auto it = std::find_if(worst.begin(), worst.end(),
                               [&](const converter::LimitCheck* w) { return w->limit == k.limit; });
        if (it == worst.end()) worst.push_back(&k);
        else if (k.margin < (*it)->margin) *it = &k;
    }
    Table t({{"limit"},
             {"worst corner"},
             {"value", Align::right},
             {"bound", Align::right},
             {"margin", Align::right},
             {"state"}});
    for (const auto* k : worst) {
        const Dimension dim = limit_dimension(k->limit);
        const bool status_row = k->limit == "thermal_runaway" || k->limit == "convergence";
        const std::string value = k->limit == "regulation"
                                      ? fmt(k->value, Dimension::ratio) + " headroom"
                                  : status_row ? "-"
                                               : fmt(k->value, dim);
        const std::string bound = k->limit == "regulation" || status_row ? "-" : fmt(k->bound, dim);
        t.add_row({k->limit, k->corner.empty() ? "(parts)" : k->corner, value, bound,
                   fmt(k->margin, Dimension::ratio), k->margin < 0.0 ? "BROKEN" : "ok"});
    }
    return t;
}

std::vector<std::string> assumed_notes(const parts::Inductor& l, const parts::Diode& d) {
    std::vector<std::string> out;
    if (!l.assumed.empty())
        out.push_back("Inductor " + part_name(l.source, l.id) +
                      ": assumed (family or catalog defaults): " + join(l.assumed, ", ") + ".");
    if (!d.assumed.empty())
        out.push_back("Diode " + part_name(d.source, d.id) +
                      ": assumed (technology or catalog defaults): " + join(d.assumed, ", ") + ".");
    return out;
}

} // namespace

std::string check_caution(const design::Design& d) {
    std::string s = "Caution: these figures are estimates from datasheet values, family defaults "
                    "and a switch model; confirm them on the bench.";
    if (std::holds_alternative<loads::Battery>(d.load))
        s += " Battery charging needs the voltage limit, temperature monitoring and protections "
             "the battery maker requires; they are not checked here.";
    return s + "\n";
}

std::string check_text(const CheckReportInput& in) {
    std::ostringstream os;
    const auto& e = in.evaluation;
    os << "Design \"" << in.design.name << "\": inductor "
       << part_name(in.inductor.source, in.inductor.id) << " ("
       << fmt(in.inductor.inductance, Dimension::inductance) << ", Isat "
       << fmt(in.inductor.isat, Dimension::current) << "), diode "
       << part_name(in.diode.source, in.diode.id) << " (" << fmt(in.diode.vrrm, Dimension::voltage)
       << ", " << fmt(in.diode.if_avg, Dimension::current) << ")\n";
    os << "Setting: " << setting_text(in.design, in.setting) << "\n\n";

    os << "Operating points\n" << operating_table(e).render() << "\n";
    os << "Losses (W) and temperatures\n" << loss_table(e).render() << "\n";
    if (!in.simulated.empty()) {
        Table t({{"corner"},
                 {"f_sw sim", Align::right},
                 {"vs analytic", Align::right},
                 {"I_L avg sim", Align::right},
                 {"I_L peak sim", Align::right},
                 {"ripple sim", Align::right},
                 {"total loss sim", Align::right},
                 {"energy balance", Align::right}});
        for (const auto& s : in.simulated) {
            if (!s.error.empty()) {
                t.add_row({s.corner, "failed: " + s.error, "", "", "", "", "", ""});
                continue;
            }
            const auto a =
                std::find_if(e.corners.begin(), e.corners.end(),
                             [&](const converter::CornerResult& r) { return r.name == s.corner; });
            const double rel =
                a != e.corners.end() && a->f_sw > 0.0 ? s.steady.f_sw / a->f_sw - 1.0 : 0.0;
            t.add_row({s.corner, fmt(s.steady.f_sw, Dimension::frequency), signed_ratio(rel),
                       fmt(s.steady.il_avg, Dimension::current),
                       fmt(s.steady.il_peak, Dimension::current),
                       fmt(s.steady.il_ripple_pp, Dimension::current),
                       fmt(s.steady.losses.total, Dimension::power),
                       fmt(s.energy_balance, Dimension::ratio)});
        }
        os << "Time-domain simulation (nonlinear L(i) and diode, nothing linearised)\n"
           << t.render() << "\n";
    }
    os << "Limits (the corner with the least margin)\n" << limits_table(e).render() << "\n";

    os << "Notes:\n";
    os << "  * Core loss is estimated (iGSE with family Steinmetz coefficients and a flux swing "
          "taken from the current ripple and Isat).\n";
    if (!in.switch_defaults.empty())
        os << "  Switch values not in the design, defaults used: " << join(in.switch_defaults, "; ")
           << ".\n";
    os << "  The switch is taken at ambient + "
       << fmt(converter::switch_temperature_rise, Dimension::temperature_difference)
       << " for its on-resistance; recovery and junction-charge losses are counted under the "
          "diode although the switch dissipates most of them.\n";
    for (const auto& n : assumed_notes(in.inductor, in.diode)) os << "  " << n << "\n";
    for (const auto& n : in.notes) os << "  " << n << "\n";
    os << "\n";

    if (e.feasible) {
        os << "Verdict: PASS. The pair meets every limit at every corner; nominal loss "
           << fmt(e.loss_nominal, Dimension::power) << ", efficiency "
           << fmt(e.efficiency_nominal, Dimension::ratio) << ".\n";
    } else {
        os << "Verdict: FAIL. " << e.violations.size()
           << (e.violations.size() == 1 ? " limit is" : " limits are") << " broken:\n";
        for (const auto& v : e.violations) os << "  - " << v.message << ".\n";
    }
    os << check_caution(in.design);
    return os.str();
}

nlohmann::json check_json(const CheckReportInput& in) {
    const auto& e = in.evaluation;
    nlohmann::json j;
    j["design"] = in.design.name;
    j["inductor"] = in.inductor.id;
    j["inductor_source"] = in.inductor.source;
    j["diode"] = in.diode.id;
    j["diode_source"] = in.diode.source;
    j["setting"] = in.setting;
    j["corners"] = e.corners;
    j["feasible"] = e.feasible;
    j["violations"] = e.violations;
    j["checks"] = e.checks;
    j["loss_nominal"] = e.loss_nominal;
    j["efficiency_nominal"] = e.efficiency_nominal;
    j["switch_defaults"] = in.switch_defaults;
    j["assumed"] = {{"inductor", in.inductor.assumed}, {"diode", in.diode.assumed}};
    j["core_loss_estimated"] = true;
    j["notes"] = in.notes;
    j["cautions"] = check_caution(in.design);
    if (!in.simulated.empty()) {
        nlohmann::json sims = nlohmann::json::array();
        for (const auto& s : in.simulated) {
            nlohmann::json x;
            x["corner"] = s.corner;
            if (!s.error.empty()) {
                x["error"] = s.error;
            } else {
                x["steady"] = s.steady;
                x["energy_balance"] = std::isfinite(s.energy_balance)
                                          ? nlohmann::json(s.energy_balance)
                                          : nlohmann::json();
            }
            sims.push_back(std::move(x));
        }
        j["simulated"] = std::move(sims);
    }
    return j;
}

} // namespace coilsieve::report
