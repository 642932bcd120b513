#include "cli/rank.hpp"

#include "design/design_json.hpp"
#include "report/rank_report.hpp"
#include "studies/result_json.hpp"
#include "studies/study_store.hpp"
#include "studies/why.hpp"
#include "units/quantity.hpp"

#include <CLI/CLI.hpp>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iostream>
#include <memory>
#include <sstream>
#include <unistd.h>

namespace coilsieve::cli {

namespace u = coilsieve::units;

namespace {

enum class Direction { upper, lower, either };

// Short names for the command line: `short<=` or `short>=` stands for the design name. They take
// no `=`, which could read as "exactly".
struct ShortLimit {
    std::string_view short_name;
    Direction dir;
    std::string_view name;
};
constexpr ShortLimit short_limits[] = {
    {"height", Direction::upper, "height_max"},
    {"footprint", Direction::upper, "footprint_max"},
    {"f_sw", Direction::upper, "f_sw_max"},
    {"f_sw", Direction::lower, "f_sw_min"},
    {"efficiency", Direction::lower, "efficiency_min"},
    {"tj", Direction::upper, "tj_max"},
    {"ripple", Direction::upper, "load_ripple"},
    {"t_inductor", Direction::upper, "t_inductor_max"},
};

std::string trim(std::string_view s) {
    const auto b = s.find_first_not_of(" \t");
    if (b == std::string_view::npos) return "";
    const auto e = s.find_last_not_of(" \t");
    return std::string(s.substr(b, e - b + 1));
}

std::string fmt(double v, u::Dimension d) { return u::format(v, d); }

} // namespace

std::vector<std::string> limit_names() {
    std::vector<std::string> v;
    for (const auto& f : design::limit_fields()) v.emplace_back(f.name);
    for (const auto& s : short_limits)
        v.push_back(std::string(s.short_name) + (s.dir == Direction::upper ? "<=" : ">="));
    return v;
}

void apply_limit(design::Design& d, std::string_view spec) {
    const std::string text(spec);
    const std::string forms = "write NAME<=VALUE (a maximum), NAME>=VALUE (a minimum) or "
                              "LIMIT=VALUE with a design file's limit name, e.g. height<=3mm, "
                              "efficiency>=90% or height_max=3mm";
    const auto pos = text.find_first_of("<>=");
    if (pos == std::string::npos || pos == 0)
        throw UsageError("--limit \"" + text + "\": " + forms);
    std::string name = trim(text.substr(0, pos));
    Direction op = Direction::either;
    std::size_t vpos = pos + 1;
    if (text[pos] == '<' || text[pos] == '>') {
        op = text[pos] == '<' ? Direction::upper : Direction::lower;
        // Every limit includes its bound, so a strict comparison would be read wrongly.
        if (vpos >= text.size() || text[vpos] != '=')
            throw UsageError("--limit \"" + text + "\": a strict \"" + text[pos] +
                             "\" is not accepted, a limit includes its bound; use <= or >=, e.g. " +
                             name + (op == Direction::upper ? "<=" : ">=") +
                             trim(text.substr(vpos)));
        ++vpos;
    }
    if (vpos < text.size() && std::string_view("<>=").find(text[vpos]) != std::string_view::npos)
        throw UsageError("--limit \"" + text + "\": " + forms);
    // "height=3mm" could read as "exactly 3 mm": `=` sets a design file's limit, named as there.
    const ShortLimit* short_form = nullptr;
    for (const auto& s : short_limits)
        if (s.short_name == name && (short_form == nullptr || s.dir == op)) short_form = &s;
    if (op == Direction::either && short_form != nullptr)
        throw UsageError("--limit \"" + text +
                         "\": NAME=VALUE takes a design file's limit name, and " + name +
                         " is not one; " + forms);
    const std::string value = trim(text.substr(vpos));
    // A short form of the other direction falls to the direction check below.
    if (short_form != nullptr) name = std::string(short_form->name);
    const design::LimitField* ls = design::limit_field(name);
    if (ls == nullptr) {
        std::string known;
        for (const auto& n : limit_names()) known += (known.empty() ? "" : ", ") + n;
        throw UsageError("--limit \"" + text + "\": unknown limit \"" + name +
                         "\"; known: " + known);
    }
    const Direction dir = ls->upper ? Direction::upper : Direction::lower;
    if (op != Direction::either && op != dir)
        throw UsageError("--limit \"" + text + "\": " + name + " is " +
                         (dir == Direction::upper ? "an upper limit; write " + name + "<=VALUE"
                                                  : "a lower limit; write " + name + ">=VALUE"));
    double v = 0.0;
    try {
        v = u::parse(value, ls->dimension);
    } catch (const std::exception& e) {
        throw UsageError("--limit \"" + text + "\": " + name + " takes a " +
                         std::string(u::dimension_name(ls->dimension)) + ": " + e.what());
    }
    if (!std::isfinite(v) || (ls->dimension != u::Dimension::temperature && v <= 0.0))
        throw UsageError("--limit \"" + text + "\": the value must be positive");
    if (ls->dimension == u::Dimension::ratio && !ls->above_one && v > 1.0)
        throw UsageError("--limit \"" + text + "\": " + name + " is a fraction of at most 100 %");
    ls->set(d.limits, v);
}

void apply_weight(design::Design& d, std::string_view spec) {
    const std::string text(spec);
    const auto pos = text.find('=');
    if (pos == std::string::npos)
        throw UsageError("--weight \"" + text + "\": write NAME=VALUE, e.g. size=2");
    const std::string name = trim(text.substr(0, pos));
    const std::string value = trim(text.substr(pos + 1));
    double v = 0.0;
    try {
        v = u::parse(value, u::Dimension::dimensionless);
    } catch (const std::exception& e) {
        throw UsageError("--weight \"" + text + "\": " + e.what());
    }
    if (!(v >= 0.0) || !std::isfinite(v))
        throw UsageError("--weight \"" + text + "\": a weight is a number >= 0");
    const auto o = design::objective_from_name(name);
    if (!o)
        throw UsageError("--weight \"" + text + "\": unknown objective \"" + name +
                         "\"; known: " + design::objective_list());
    design::weight_of(d.weights, *o) = v;
}

void apply_pareto(design::Design& d, std::string_view list) {
    const std::string text(list);
    std::vector<std::string> names;
    for (std::size_t start = 0;;) {
        const auto comma = text.find(',', start);
        names.push_back(trim(
            text.substr(start, comma == std::string::npos ? std::string::npos : comma - start)));
        if (comma == std::string::npos) break;
        start = comma + 1;
    }
    try {
        d.pareto = design::pareto_from_names(names);
    } catch (const design::ObjectiveListError& e) {
        throw UsageError("--pareto \"" + text + "\": " + e.what());
    }
}

void apply_overrides(design::Design& d, const RankCliOptions& o) {
    for (const auto& l : o.limits) apply_limit(d, l);
    for (const auto& w : o.weights) apply_weight(d, w);
    if (!o.pareto.empty()) apply_pareto(d, o.pareto);
    const auto& l = d.limits;
    if (l.f_sw_max && *l.f_sw_max < l.f_sw_min)
        throw UsageError("conflicting limits: the minimum switching frequency " +
                         fmt(l.f_sw_min, u::Dimension::frequency) + " is above the maximum " +
                         fmt(*l.f_sw_max, u::Dimension::frequency));
    if (d.control.mode == design::ControlMode::pwm && l.f_sw_max &&
        d.control.frequency_min > *l.f_sw_max)
        throw UsageError("conflicting limits: the PWM frequency range starts at " +
                         fmt(d.control.frequency_min, u::Dimension::frequency) +
                         ", above the limit f_sw_max " + fmt(*l.f_sw_max, u::Dimension::frequency));
    // The same rules as a design file, so that no option can make a design a file could not be.
    std::string given;
    for (const auto& [name, used] :
         {std::pair{"--limit", !o.limits.empty()}, std::pair{"--weight", !o.weights.empty()},
          std::pair{"--pareto", !o.pareto.empty()}})
        if (used) given += std::string(given.empty() ? "" : ", ") + name;
    try {
        design::validate(d, given.empty() ? std::string("the design")
                                          : "the design with " + given + " applied");
    } catch (const design::DesignError& e) {
        throw UsageError(e.what());
    }
}

nlohmann::json to_json(const EffectiveOptions& o) {
    nlohmann::json j;
    j["top"] = o.top;
    j["sources"] = o.sources;
    j["exhaustive"] = o.exhaustive;
    j["distinct_inductors"] = o.distinct_inductors;
    j["lock_inductor"] = o.lock_inductor ? nlohmann::json(*o.lock_inductor) : nullptr;
    j["lock_diode"] = o.lock_diode ? nlohmann::json(*o.lock_diode) : nullptr;
    j["band"] = o.band ? nlohmann::json(*o.band) : nullptr;
    j["frequency"] = o.frequency ? nlohmann::json(*o.frequency) : nullptr;
    return j;
}

EffectiveOptions effective_options_from_json(const nlohmann::json& j) {
    EffectiveOptions o;
    if (!j.is_object()) return o;
    if (j.contains("top") && j["top"].is_number_integer()) o.top = j["top"].get<int>();
    if (j.contains("sources") && j["sources"].is_array())
        o.sources = j["sources"].get<std::vector<std::string>>();
    if (j.contains("exhaustive") && j["exhaustive"].is_boolean())
        o.exhaustive = j["exhaustive"].get<bool>();
    if (j.contains("distinct_inductors") && j["distinct_inductors"].is_boolean())
        o.distinct_inductors = j["distinct_inductors"].get<bool>();
    auto str = [&](const char* k, std::optional<std::string>& out) {
        if (j.contains(k) && j[k].is_string()) out = j[k].get<std::string>();
    };
    auto num = [&](const char* k, std::optional<double>& out) {
        if (j.contains(k) && j[k].is_number()) out = j[k].get<double>();
    };
    str("lock_inductor", o.lock_inductor);
    str("lock_diode", o.lock_diode);
    num("band", o.band);
    num("frequency", o.frequency);
    return o;
}

EffectiveOptions merge_options(EffectiveOptions base, const RankCliOptions& o,
                               const design::Design& d) {
    if (o.top) {
        if (*o.top < 1) throw UsageError("--top must be at least 1, got " + std::to_string(*o.top));
        base.top = *o.top;
    }
    if (!o.sources.empty()) base.sources = o.sources;
    if (o.exhaustive) base.exhaustive = true;
    if (o.distinct_inductors) base.distinct_inductors = true;
    if (!o.lock_inductor.empty()) base.lock_inductor = o.lock_inductor;
    if (!o.lock_diode.empty()) base.lock_diode = o.lock_diode;
    if (!o.band.empty() && !o.frequency.empty())
        throw UsageError("--band and --frequency exclude each other: the first fixes a hysteretic "
                         "band, the second a PWM frequency");
    if (!o.band.empty()) {
        if (d.control.mode != design::ControlMode::hysteretic)
            throw UsageError("--band " + o.band +
                             ": this design uses PWM control; use --frequency");
        double band = 0.0;
        try {
            band = u::parse(o.band, u::Dimension::current);
        } catch (const std::exception&) {
            try {
                band = u::parse(o.band, u::Dimension::ratio) * loads::target_current(d.load);
            } catch (const std::exception& e) {
                throw UsageError("--band " + o.band +
                                 ": give a current (\"0.2A\") or a fraction "
                                 "of the target current (\"25%\"): " +
                                 e.what());
            }
        }
        if (!(band > 0.0)) throw UsageError("--band " + o.band + ": the band must be positive");
        base.band = band;
        base.frequency.reset();
    }
    if (!o.frequency.empty()) {
        if (d.control.mode != design::ControlMode::pwm)
            throw UsageError("--frequency " + o.frequency +
                             ": this design uses hysteretic control; use --band");
        double f = 0.0;
        try {
            f = u::parse(o.frequency, u::Dimension::frequency);
        } catch (const std::exception& e) {
            throw UsageError("--frequency " + o.frequency + ": " + e.what());
        }
        if (!(f > 0.0)) throw UsageError("--frequency " + o.frequency + ": must be positive");
        base.frequency = f;
        base.band.reset();
    }
    // A stored study's setting is checked too: new limits may rule it out.
    if (base.band)
        check_fixed_band(*base.band, d,
                         o.band.empty() ? "the study's fixed band" : "--band " + o.band);
    if (base.frequency) {
        const std::string given =
            o.frequency.empty() ? "the study's fixed frequency" : "--frequency " + o.frequency;
        const auto& l = d.limits;
        const auto hz = [](double v) { return fmt(v, u::Dimension::frequency); };
        const std::string range =
            l.f_sw_max ? hz(l.f_sw_min) + " to " + hz(*l.f_sw_max) : "at least " + hz(l.f_sw_min);
        if (*base.frequency < l.f_sw_min || (l.f_sw_max && *base.frequency > *l.f_sw_max))
            throw UsageError(given + ": a fixed PWM frequency of " + hz(*base.frequency) +
                             " is outside the design's limits f_sw_min..f_sw_max and can never "
                             "meet them; give one " +
                             (l.f_sw_max ? "from " : "") + range +
                             ", or leave --frequency out to tune it");
    }
    return base;
}

void check_fixed_band(double band, const design::Design& d, const std::string& given) {
    const double target = loads::target_current(d.load);
    if (!(band < 2.0 * target))
        throw UsageError(given + ": a band of " + fmt(band, u::Dimension::current) +
                         " p-p around " + fmt(target, u::Dimension::current) +
                         " would take the valley below zero; keep it under 200 % of the target "
                         "current (below " +
                         fmt(2.0 * target, u::Dimension::current) + ")");
}

namespace {

// A one-line progress bar on stderr: pairs done, rate, time left.
class ProgressBar {
public:
    explicit ProgressBar(std::ostream& err) : err_(err) {}
    void update(const studies::Progress& p) {
        if (p.elapsed_s < 1.0 || p.total == 0) return;
        const double frac =
            std::min(1.0, static_cast<double>(p.done) / static_cast<double>(p.total));
        const int width = 30;
        const int filled = static_cast<int>(frac * width);
        const double rate = static_cast<double>(p.done) / p.elapsed_s;
        const double left =
            rate > 0 ? static_cast<double>(p.total - std::min(p.done, p.total)) / rate : 0.0;
        char buf[160];
        std::snprintf(buf, sizeof buf, "\r[%s%s] %zu/%zu pairs  %.0f/s  %.0f s left ",
                      std::string(static_cast<std::size_t>(filled), '#').c_str(),
                      std::string(static_cast<std::size_t>(width - filled), '.').c_str(), p.done,
                      p.total, rate, left);
        err_ << buf << std::flush;
        shown_ = true;
    }
    ~ProgressBar() {
        if (shown_) err_ << "\r" << std::string(78, ' ') << "\r" << std::flush;
    }

private:
    std::ostream& err_;
    bool shown_ = false;
};

} // namespace

RankSession run_ranking(const design::Design& d, const EffectiveOptions& o, unsigned threads,
                        Context& ctx, bool progress) {
    RankSession s;
    s.design = d;
    s.options = o;
    auto& store = ctx.store();
    if (!o.sources.empty()) {
        const auto known = store.sources();
        for (const auto& name : o.sources) {
            const bool found = std::any_of(known.begin(), known.end(),
                                           [&](const auto& k) { return k.name == name; });
            if (!found) {
                std::string list;
                for (const auto& k : known)
                    if (list.find(k.name) == std::string::npos)
                        list += (list.empty() ? "" : ", ") + k.name;
                throw UsageError("--source " + name + ": no such source in the catalog; sources: " +
                                 (list.empty() ? std::string("none") : list));
            }
        }
    }
    s.inductors = store.all_inductors(o.sources);
    s.diodes = store.all_diodes(o.sources);
    s.fingerprint = store.fingerprint(o.sources);
    auto& ro = s.rank_options;
    ro.top = o.top;
    ro.exhaustive = o.exhaustive;
    ro.distinct_inductors = o.distinct_inductors;
    ro.threads = threads;
    ro.lock_inductor = o.lock_inductor;
    ro.lock_diode = o.lock_diode;
    ro.band = o.band;
    ro.frequency = o.frequency;
    std::unique_ptr<ProgressBar> bar;
    if (progress && &ctx.err() == &std::cerr && isatty(STDERR_FILENO)) {
        bar = std::make_unique<ProgressBar>(ctx.err());
        ro.progress = [b = bar.get()](const studies::Progress& p) { b->update(p); };
    }
    try {
        s.result =
            studies::rank_pairs(s.design, s.inductors, s.diodes, ro, studies::default_evaluator());
    } catch (const studies::RankError& e) {
        throw UsageError(e.what());
    }
    ro.progress = nullptr;
    return s;
}

void check_study_name(const RankCliOptions& o, Context& ctx) {
    if (o.no_save || o.study.empty()) return;
    studies::StudyStore store(ctx.store().database());
    if (store.find(o.study))
        throw UsageError("--study " + o.study +
                         ": a study with this name exists already; choose another name, delete "
                         "it with `coilsieve study delete " +
                         o.study + "`, or give --no-save");
}

int report_and_save(RankSession& s, const RankCliOptions& o, Context& ctx,
                    std::optional<std::int64_t> parent) {
    std::string study_name;
    std::string not_saved; // why the run could not be saved; reported after the ranking
    if (!o.no_save) {
        try {
            studies::StudyStore store(ctx.store().database());
            studies::Study st;
            st.created = studies::utc_now();
            st.name = o.study.empty() ? store.generate_name(s.design.name, st.created) : o.study;
            st.parent_id = parent;
            st.design = design::to_json(s.design);
            st.options = to_json(s.options);
            st.fingerprint = s.fingerprint;
            st.results = studies::results_to_json(s.result, s.inductors, s.diodes, false);
            store.save(st);
            study_name = st.name;
        } catch (const studies::StudyError& e) {
            not_saved = e.what();
        } catch (const catalog::sqlite::SqliteError& e) {
            // The SQLite message quotes the statement: not for the user.
            not_saved = e.busy() ? "the database is busy (another program is writing to it)"
                                 : "the database could not be written";
        }
    }
    report::RankReportInput in{s.design, s.inductors, s.diodes, s.result, study_name};
    std::optional<studies::WhyReport> why;
    if (!o.why.empty()) {
        try {
            why = studies::explain_part(s.design, s.inductors, s.diodes, s.result, s.rank_options,
                                        studies::default_evaluator(), o.why);
        } catch (const studies::RankError& e) {
            throw UsageError(e.what());
        }
    }
    if (o.json) {
        auto j = report::rank_json(in);
        if (why) j["why"] = why->json;
        ctx.out() << j.dump(2) << "\n";
    } else if (o.csv) {
        ctx.out() << report::rank_csv(in);
    } else {
        ctx.out() << report::rank_text(in);
        if (why) ctx.out() << "\nWhy " << o.why << ":\n" << why->text;
    }
    if (!not_saved.empty()) {
        ctx.out() << std::flush;
        ctx.err() << "error: the ranking above could not be saved as a study in "
                  << ctx.store().path().string() << ": " << not_saved
                  << "; check that the file and its folder are writable, or give --no-save\n";
        return exit_error;
    }
    return s.result.top.empty() ? exit_error : exit_ok;
}

int run_rank(const RankCliOptions& o, Context& ctx) {
    if (o.json && o.csv) throw UsageError("--json and --csv exclude each other");
    design::Design d;
    try {
        d = design::load_design_file(o.design_file);
    } catch (const design::DesignError& e) {
        throw UsageError(e.what());
    }
    apply_overrides(d, o);
    const EffectiveOptions eo = merge_options(EffectiveOptions{}, o, d);
    check_study_name(o, ctx);
    RankSession s = run_ranking(d, eo, o.threads, ctx, true);
    return report_and_save(s, o, ctx, std::nullopt);
}

void add_rank_options(CLI::App* c, RankCliOptions& o, bool with_study) {
    c->add_option("--top", o.top, "how many pairs to list (default 10)");
    c->add_option("--source", o.sources, "use only this catalog source (repeatable)");
    c->add_flag("--exhaustive", o.exhaustive, "tune every pair that passes screening (no bounds)");
    c->add_flag("--distinct-inductors", o.distinct_inductors,
                "list each inductor once, with its best diode");
    c->add_option("--threads", o.threads, "worker threads (default: all cores)");
    c->add_flag("--json", o.json, "JSON output");
    c->add_flag("--csv", o.csv, "CSV output, one row per listed pair");
    c->add_option("--why", o.why, "explain why an inductor or diode (ID) is or is not listed");
    c->add_option("--lock-inductor", o.lock_inductor,
                  "rank only with this inductor (ID or SOURCE:ID)");
    c->add_option("--lock-diode", o.lock_diode, "rank only with this diode (ID or SOURCE:ID)");
    c->add_option("--band", o.band,
                  "fix the hysteresis band (\"0.2A\" or \"25%\") instead of tuning it");
    c->add_option("--frequency", o.frequency,
                  "fix the PWM frequency (\"300kHz\") instead of tuning it");
    c->add_option("--limit", o.limits,
                  "override a limit: NAME<=VALUE or NAME>=VALUE, or LIMIT=VALUE with a design "
                  "file's limit name (repeatable), e.g. height<=3mm, load_ripple<=10%, "
                  "f_sw<=500kHz, efficiency>=90%, height_max=3mm");
    c->add_option("--weight", o.weights,
                  "objective weight NAME=VALUE (loss, size, ripple, margin, cost)");
    c->add_option("--pareto", o.pareto,
                  "objectives of the Pareto set, e.g. loss,size,ripple (default: loss,size, "
                  "plus cost when weighted); more objectives rank slower");
    if (with_study) {
        c->add_option("--study", o.study, "save the run as this study (default: a generated name)");
        c->add_flag("--no-save", o.no_save, "do not save the run as a study");
    }
}

std::vector<Command> setup_rank(CLI::App& root) {
    auto o = std::make_shared<RankCliOptions>();
    CLI::App* c =
        root.add_subcommand("rank", "Rank every inductor-diode pair of the catalog for a design");
    c->add_option("DESIGN", o->design_file, "design file (JSON)")
        ->required()
        ->check(CLI::ExistingFile);
    add_rank_options(c, *o, true);
    c->footer(
        "Example:\n  coilsieve rank data/examples/reading-lamp.json --top 5 --limit height<=3mm "
        "--weight size=2\nEvery run is saved as a study (see `coilsieve study list`).");
    return {{c, [o](Context& ctx) { return run_rank(*o, ctx); }}};
}

} // namespace coilsieve::cli
