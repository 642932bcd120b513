#include "cli/study.hpp"

#include "design/design_json.hpp"
#include "report/table.hpp"
#include "studies/study_store.hpp"
#include "units/quantity.hpp"

#include <CLI/CLI.hpp>
#include <memory>
#include <sstream>

namespace coilsieve::cli {

namespace u = coilsieve::units;

namespace {

studies::Study get_study(Context& ctx, const std::string& name) {
    studies::StudyStore store(ctx.store().database());
    try {
        return store.get(name);
    } catch (const studies::StudyError& e) {
        throw UsageError(e.what());
    }
}

std::string num_or_dash(const nlohmann::json& j, u::Dimension d) {
    return j.is_number() ? u::format(j.get<double>(), d) : std::string("-");
}

std::string top_pair(const studies::Study& s) {
    if (s.results.contains("results") && !s.results["results"].empty())
        return s.results["results"][0].value("key", "");
    return "(no feasible pair)";
}

} // namespace

int run_study_list(const StudyOptions& o, Context& ctx) {
    studies::StudyStore store(ctx.store().database());
    const auto all = store.list();
    if (o.json) {
        nlohmann::json j = nlohmann::json::array();
        for (const auto& s : all)
            j.push_back({{"name", s.name},
                         {"created", s.created},
                         {"parent", s.parent_name.empty() ? nlohmann::json(nullptr)
                                                          : nlohmann::json(s.parent_name)},
                         {"design", s.design.value("name", "")},
                         {"best", top_pair(s)}});
        ctx.out() << j.dump(2) << "\n";
        return exit_ok;
    }
    if (all.empty()) {
        ctx.out() << "No studies saved yet; every `coilsieve rank` run saves one.\n";
        return exit_ok;
    }
    report::Table t({{"name"}, {"created"}, {"parent"}, {"design"}, {"best pair"}});
    for (const auto& s : all)
        t.add_row({s.name, s.created, s.parent_name.empty() ? "-" : s.parent_name,
                   s.design.value("name", ""), top_pair(s)});
    ctx.out() << t.render();
    return exit_ok;
}

int run_study_show(const StudyOptions& o, Context& ctx) {
    const auto s = get_study(ctx, o.name);
    if (o.json) {
        nlohmann::json j{{"name", s.name},
                         {"created", s.created},
                         {"parent", s.parent_name.empty() ? nlohmann::json(nullptr)
                                                          : nlohmann::json(s.parent_name)},
                         {"design", s.design},
                         {"options", s.options},
                         {"catalog_fingerprint", s.fingerprint},
                         {"results", s.results}};
        ctx.out() << j.dump(2) << "\n";
        return exit_ok;
    }
    auto& out = ctx.out();
    out << "Study " << s.name << "\n  created " << s.created << "\n";
    if (!s.parent_name.empty()) out << "  rerun of " << s.parent_name << "\n";
    out << "  design " << s.design.value("name", "") << "\n  options " << s.options.dump() << "\n"
        << "  catalog fingerprint " << s.fingerprint.substr(0, 16) << "\n";
    if (!s.results.contains("results") || s.results["results"].empty()) {
        out << "No feasible pair.\n";
        return exit_ok;
    }
    report::Table t({{"#", report::Align::right},
                     {"pair"},
                     {"loss", report::Align::right},
                     {"ripple", report::Align::right},
                     {"volume", report::Align::right},
                     {"Isat margin", report::Align::right},
                     {"score", report::Align::right},
                     {"Pareto"}});
    for (const auto& p : s.results["results"]) {
        const auto& ob = p["objectives"];
        std::ostringstream sc;
        sc.precision(4);
        sc << p["score"].get<double>();
        t.add_row({p["rank"].is_number() ? std::to_string(p["rank"].get<int>()) : "-",
                   p.value("key", ""), num_or_dash(ob["loss"], u::Dimension::power),
                   num_or_dash(ob["ripple"], u::Dimension::ratio),
                   num_or_dash(ob["size"], u::Dimension::volume),
                   num_or_dash(ob["margin"], u::Dimension::ratio), sc.str(),
                   p.value("pareto", false) ? "yes" : ""});
    }
    out << t.render();
    if (s.results.contains("pareto"))
        out << "Pareto set: " << s.results["pareto"].size() << " pairs.\n";
    return exit_ok;
}

int run_study_rerun(const StudyOptions& o, Context& ctx) {
    const auto parent = get_study(ctx, o.name);
    design::Design d;
    try {
        d = design::read_design(parent.design, "study " + parent.name);
    } catch (const design::DesignError& e) {
        throw UsageError(e.what());
    }
    apply_overrides(d, o.rank);
    const EffectiveOptions eo =
        merge_options(effective_options_from_json(parent.options), o.rank, d);
    check_study_name(o.rank, ctx);
    RankSession s = run_ranking(d, eo, o.rank.threads, ctx, true);
    RankCliOptions ro = o.rank;
    if (ro.study.empty()) {
        studies::StudyStore store(ctx.store().database());
        ro.study = store.generate_name(parent.name + "-rerun", studies::utc_now());
    }
    return report_and_save(s, ro, ctx, parent.id);
}

int run_study_diff(const StudyOptions& o, Context& ctx) {
    const auto a = get_study(ctx, o.name);
    const auto b = get_study(ctx, o.other);
    const auto d = studies::diff_studies(a, b);
    if (o.json) ctx.out() << studies::diff_json(d).dump(2) << "\n";
    else ctx.out() << studies::diff_text(d);
    return exit_ok;
}

int run_study_delete(const StudyOptions& o, Context& ctx) {
    studies::StudyStore store(ctx.store().database());
    try {
        store.remove(o.name);
    } catch (const studies::StudyError& e) {
        throw UsageError(e.what());
    }
    ctx.out() << "Deleted study " << o.name << ".\n";
    return exit_ok;
}

std::vector<Command> setup_study(CLI::App& root) {
    CLI::App* st =
        root.add_subcommand("study", "Saved trade studies: list, show, rerun, diff, delete");
    st->require_subcommand(1);
    st->footer("Example:\n  coilsieve study rerun lamp-1 --limit height<=3mm\n"
               "  coilsieve study diff lamp-1 lamp-1-rerun-20261201-120000-1");
    std::vector<Command> out;
    {
        auto o = std::make_shared<StudyOptions>();
        CLI::App* c = st->add_subcommand("list", "List saved studies");
        c->add_flag("--json", o->json, "JSON output");
        out.push_back({c, [o](Context& ctx) { return run_study_list(*o, ctx); }});
    }
    {
        auto o = std::make_shared<StudyOptions>();
        CLI::App* c = st->add_subcommand("show", "Show a saved study's inputs and results");
        c->add_option("NAME", o->name, "study name")->required();
        c->add_flag("--json", o->json, "JSON output (everything stored)");
        out.push_back({c, [o](Context& ctx) { return run_study_show(*o, ctx); }});
    }
    {
        auto o = std::make_shared<StudyOptions>();
        CLI::App* c = st->add_subcommand(
            "rerun", "Rank a saved study's design again, with changes; saved as a new study");
        c->add_option("NAME", o->name, "study name")->required();
        add_rank_options(c, o->rank, true);
        out.push_back({c, [o](Context& ctx) { return run_study_rerun(*o, ctx); }});
    }
    {
        auto o = std::make_shared<StudyOptions>();
        CLI::App* c =
            st->add_subcommand("diff", "Compare two studies: shortlist, Pareto set, inputs");
        c->add_option("A", o->name, "first study")->required();
        c->add_option("B", o->other, "second study")->required();
        c->add_flag("--json", o->json, "JSON output");
        out.push_back({c, [o](Context& ctx) { return run_study_diff(*o, ctx); }});
    }
    {
        auto o = std::make_shared<StudyOptions>();
        CLI::App* c = st->add_subcommand("delete", "Delete a saved study");
        c->add_option("NAME", o->name, "study name")->required();
        out.push_back({c, [o](Context& ctx) { return run_study_delete(*o, ctx); }});
    }
    return out;
}

} // namespace coilsieve::cli
