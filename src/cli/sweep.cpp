#include "cli/sweep.hpp"

#include "design/design_json.hpp"
#include "report/table.hpp"
#include "studies/result_json.hpp"

#include <CLI/CLI.hpp>
#include <cmath>
#include <memory>
#include <sstream>

namespace coilsieve::cli {

namespace u = coilsieve::units;

namespace {

// The dimension of a design field from its name (and its parent's, for supply/ambient).
u::Dimension field_dimension(const std::vector<std::string>& path, const design::Design& d) {
    const std::string& k = path.back();
    const std::string parent = path.size() > 1 ? path[path.size() - 2] : "";
    if (parent == "supply") return u::Dimension::voltage;
    if (parent == "ambient") return u::Dimension::temperature;
    if (parent == "weights") return u::Dimension::dimensionless;
    if (parent == "limits") {
        const auto* f = design::limit_field(k);
        return f != nullptr ? f->dimension : u::Dimension::dimensionless;
    }
    if (k == "current" || k == "charge_current" || k == "termination_current" ||
        k == "precharge_current")
        return u::Dimension::current;
    if (k == "vf" || k == "voltage" || k == "drive_voltage") return u::Dimension::voltage;
    if (k == "rd" || k == "resistance" || k == "internal_resistance" || k == "esr" ||
        k == "on_resistance" || k == "sense_resistor")
        return u::Dimension::resistance;
    if (k == "capacitance" || k == "output_capacitance") return u::Dimension::capacitance;
    if (k == "frequency") return u::Dimension::frequency;
    if (k == "band")
        return d.control.band_is_fraction ? u::Dimension::ratio : u::Dimension::current;
    if (k == "delay" || k == "rise_time" || k == "fall_time") return u::Dimension::time;
    if (k == "gate_charge") return u::Dimension::charge;
    if (k == "capacity") return u::Dimension::battery_capacity;
    if (k == "vf_tempco") return u::Dimension::voltage_per_kelvin;
    return u::Dimension::dimensionless;
}

std::vector<std::string> split_path(std::string_view s) {
    std::vector<std::string> out;
    std::string cur;
    for (char c : s) {
        if (c == '.') {
            out.push_back(cur);
            cur.clear();
        } else {
            cur += c;
        }
    }
    out.push_back(cur);
    return out;
}

const nlohmann::json* find(const nlohmann::json& j, const std::vector<std::string>& path) {
    const nlohmann::json* p = &j;
    for (const auto& k : path) {
        if (!p->is_object() || !p->contains(k)) return nullptr;
        p = &(*p)[k];
    }
    return p;
}

// The unit a CSV column name carries for a quantity in SI (none for ratios and plain numbers).
std::string csv_unit(u::Dimension d) {
    switch (d) {
    case u::Dimension::dimensionless:
    case u::Dimension::ratio:
        return "";
    case u::Dimension::temperature:
    case u::Dimension::temperature_difference:
        return "K";
    case u::Dimension::resistance:
        return "ohm";
    case u::Dimension::battery_capacity:
        return "As";
    case u::Dimension::area:
        return "m2";
    case u::Dimension::volume:
        return "m3";
    case u::Dimension::voltage_per_kelvin:
        return "V_per_K";
    default:
        return std::string(u::unit_symbol(d, true));
    }
}

struct Step {
    double value; // SI
    RankSession s;
    bool changed;
};

// Machine-readable, like `rank --csv`: SI numbers, the unit in the column name.
std::string sweep_csv(const std::string& field, u::Dimension dim, design::ControlMode mode,
                      const std::vector<Step>& steps) {
    const std::string unit = csv_unit(dim);
    const bool band = mode == design::ControlMode::hysteretic;
    report::Table t({{unit.empty() ? field : field + "_" + unit},
                     {"inductor_source"},
                     {"inductor"},
                     {"diode_source"},
                     {"diode"},
                     {band ? "band_A" : "frequency_Hz"},
                     {"loss_W"},
                     {"efficiency"},
                     {"ripple"},
                     {"size_m3"},
                     {"margin"},
                     {"cost"},
                     {"score"},
                     {"changed"}});
    for (const auto& st : steps) {
        const std::string value = report::csv_number(st.value);
        const std::string changed = st.changed ? "1" : "0";
        if (st.s.result.top.empty()) {
            t.add_row({value, "", "", "", "", "", "", "", "", "", "", "", "", changed});
            continue;
        }
        const auto& p = st.s.result.top.front();
        const auto& b = p.tune.best;
        const auto& ob = b.objectives;
        const auto& l = st.s.inductors[p.inductor];
        const auto& d = st.s.diodes[p.diode];
        t.add_row({value, l.source, l.id, d.source, d.id,
                   report::csv_number(band ? b.setting.band : b.setting.frequency),
                   report::csv_number(ob.loss), report::csv_number(ob.efficiency),
                   report::csv_number(ob.ripple), report::csv_number(ob.size),
                   report::csv_number(ob.margin), ob.cost ? report::csv_number(*ob.cost) : "",
                   report::csv_number(b.score), changed});
    }
    return t.to_csv();
}

} // namespace

SweepSpec parse_sweep(std::string_view text, const design::Design& d) {
    const std::string t(text);
    const auto eq = t.find('=');
    const auto dots = t.find("..", eq == std::string::npos ? 0 : eq);
    const auto colon = t.rfind(':');
    if (eq == std::string::npos || dots == std::string::npos || colon == std::string::npos ||
        colon < dots)
        throw UsageError("--vary \"" + t +
                         "\": write PATH=FROM..TO:STEPS, e.g. "
                         "load.current=0.35A..1.5A:8");
    SweepSpec s;
    s.path = split_path(t.substr(0, eq));
    const nlohmann::json j = design::to_json(d);
    const nlohmann::json* field = find(j, s.path);
    // A limit the file leaves out (each is optional) is set at every step.
    const bool absent_limit = field == nullptr && s.path.size() == 2 &&
                              s.path.front() == "limits" &&
                              field_dimension(s.path, d) != u::Dimension::dimensionless;
    // A string is a quantity with units (a band in amperes, a temperature in kelvin) only where
    // the field has a dimension; load.type or control.mode are words.
    const bool numeric =
        absent_limit ||
        (field != nullptr && s.path.front() != "name" &&
         (field->is_number() ||
          (field->is_string() && field_dimension(s.path, d) != u::Dimension::dimensionless)));
    if (!numeric) {
        std::string fields;
        for (const char* f : {"supply.min", "supply.nom", "supply.max", "load.current",
                              "sense_resistor", "control.band", "control.delay", "ambient.max",
                              "limits.load_ripple", "limits.f_sw_max", "weights.size"})
            if (find(j, split_path(f)) != nullptr)
                fields += std::string(fields.empty() ? "" : ", ") + f;
        throw UsageError("--vary \"" + t + "\": the design has no numeric field \"" +
                         t.substr(0, eq) + "\"; for example: " + fields);
    }
    s.dimension = field_dimension(s.path, d);
    auto parse = [&](const std::string& v) {
        try {
            return u::parse(v, s.dimension);
        } catch (const std::exception& e) {
            throw UsageError("--vary \"" + t + "\": " + t.substr(0, eq) + " is a " +
                             std::string(u::dimension_name(s.dimension)) + ": " + e.what());
        }
    };
    s.from = parse(t.substr(eq + 1, dots - eq - 1));
    s.to = parse(t.substr(dots + 2, colon - dots - 2));
    try {
        s.steps = std::stoi(t.substr(colon + 1));
    } catch (const std::exception&) {
        throw UsageError("--vary \"" + t + "\": STEPS after ':' must be a whole number");
    }
    if (s.steps < 2 || s.steps > 200)
        throw UsageError("--vary \"" + t + "\": STEPS must be between 2 and 200");
    // A count (LEDs, cells) takes whole numbers only: a step between them would be rounded.
    if (field != nullptr && field->is_number_integer()) {
        for (int i = 0; i < s.steps; ++i) {
            const double v = step_value(s, i);
            if (std::abs(v - std::round(v)) > 1e-9)
                throw UsageError("--vary \"" + t + "\": " + t.substr(0, eq) +
                                 " is a whole number, but step " + std::to_string(i + 1) + " of " +
                                 std::to_string(s.steps) + " would be " +
                                 u::format(v, s.dimension) +
                                 "; choose FROM, TO and STEPS so that every step is whole, e.g. " +
                                 t.substr(0, eq) + "=3..6:4");
        }
    }
    return s;
}

double step_value(const SweepSpec& s, int i) {
    return s.from + (s.to - s.from) * i / (s.steps - 1);
}

design::Design with_value(const design::Design& d, const SweepSpec& s, double value) {
    nlohmann::json j = design::to_json(d);
    nlohmann::json* p = &j;
    for (const auto& k : s.path) p = &(*p)[k];
    if (s.dimension == u::Dimension::temperature) *p = u::to_celsius(value);
    else if (s.path.back() == "band" && s.dimension == u::Dimension::current) {
        std::ostringstream os;
        os.precision(17);
        os << value << "A";
        *p = os.str();
    } else if (p->is_number_integer()) {
        *p = static_cast<long long>(std::llround(value));
    } else {
        *p = value;
    }
    try {
        return design::read_design(j, "sweep " + s.path.back() + " = " +
                                          u::format(value, s.dimension));
    } catch (const design::DesignError& e) {
        throw UsageError(e.what());
    }
}

int run_sweep(const SweepOptions& o, Context& ctx) {
    const auto& ro = o.rank;
    if (ro.json && ro.csv) throw UsageError("--json and --csv exclude each other");
    design::Design base;
    try {
        base = design::load_design_file(ro.design_file);
    } catch (const design::DesignError& e) {
        throw UsageError(e.what());
    }
    apply_overrides(base, ro);
    const SweepSpec spec = parse_sweep(o.vary, base);
    merge_options(EffectiveOptions{}, ro, base); // refuse bad options before the first step

    std::vector<Step> steps;
    std::string previous;
    for (int i = 0; i < spec.steps; ++i) {
        const double v = step_value(spec, i);
        const design::Design d = with_value(base, spec, v);
        // Per step: a --band given as a share of the target current follows the step's current.
        const EffectiveOptions eo = merge_options(EffectiveOptions{}, ro, d);
        RankSession s = run_ranking(d, eo, ro.threads, ctx, true);
        std::string key = s.result.top.empty()
                              ? std::string()
                              : studies::pair_key(s.result.top.front(), s.inductors, s.diodes);
        const bool changed = i > 0 && key != previous;
        previous = key;
        steps.push_back({v, std::move(s), changed});
    }

    const std::string field = o.vary.substr(0, o.vary.find('='));
    if (ro.json) {
        nlohmann::json j;
        j["field"] = field;
        j["steps"] = nlohmann::json::array();
        for (const auto& st : steps) {
            nlohmann::json e{{"value", st.value}, {"changed", st.changed}};
            if (st.s.result.top.empty()) e["best"] = nullptr;
            else
                e["best"] = studies::pair_to_json(st.s.result.top.front(), st.s.result,
                                                  st.s.inductors, st.s.diodes, false);
            e["counts"] = studies::counts_to_json(st.s.result.counts);
            j["steps"].push_back(e);
        }
        ctx.out() << j.dump(2) << "\n";
        return exit_ok;
    }
    if (ro.csv) {
        ctx.out() << sweep_csv(field, spec.dimension, base.control.mode, steps);
        return exit_ok;
    }
    report::Table t({{field, report::Align::right},
                     {"best inductor"},
                     {"best diode"},
                     {"loss", report::Align::right},
                     {"efficiency", report::Align::right},
                     {"ripple", report::Align::right},
                     {"volume", report::Align::right},
                     {"Isat margin", report::Align::right},
                     {"score", report::Align::right},
                     {"changed"}});
    for (const auto& st : steps) {
        const std::string value = u::format(st.value, spec.dimension);
        if (st.s.result.top.empty()) {
            t.add_row(
                {value, "(no feasible pair)", "", "", "", "", "", "", "", st.changed ? "yes" : ""});
            continue;
        }
        const auto& p = st.s.result.top.front();
        const auto& ob = p.tune.best.objectives;
        std::ostringstream sc;
        sc.precision(4);
        sc << p.tune.best.score;
        t.add_row(
            {value, st.s.inductors[p.inductor].id, st.s.diodes[p.diode].id,
             u::format(ob.loss, u::Dimension::power), u::format(ob.efficiency, u::Dimension::ratio),
             u::format(ob.ripple, u::Dimension::ratio), u::format(ob.size, u::Dimension::volume),
             u::format(ob.margin, u::Dimension::ratio), sc.str(), st.changed ? "yes" : ""});
    }
    ctx.out() << t.render();
    return exit_ok;
}

std::vector<Command> setup_sweep(CLI::App& root) {
    auto o = std::make_shared<SweepOptions>();
    CLI::App* c = root.add_subcommand("sweep", "Rank at each step of one design field");
    c->add_option("DESIGN", o->rank.design_file, "design file (JSON)")
        ->required()
        ->check(CLI::ExistingFile);
    c->add_option("--vary", o->vary, "PATH=FROM..TO:STEPS, e.g. load.current=0.35A..1.5A:8")
        ->required();
    add_rank_options(c, o->rank, false);
    c->footer(
        "Example:\n  coilsieve sweep data/examples/reading-lamp.json --vary supply.nom=18V..28V:6");
    o->rank.no_save = true;
    return {{c, [o](Context& ctx) { return run_sweep(*o, ctx); }}};
}

} // namespace coilsieve::cli
