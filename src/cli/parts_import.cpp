// `parts import` and `parts export`.
#include "catalog/csv.hpp"
#include "catalog/fields.hpp"
#include "cli/parts_commands.hpp"

#include <fstream>
#include <iostream>
#include <nlohmann/json.hpp>
#include <sstream>

namespace coilsieve::cli {
namespace {

std::string read_file(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    if (!in) throw std::runtime_error(path + ": cannot open the file for reading");
    std::ostringstream ss;
    ss << in.rdbuf();
    if (in.bad()) throw std::runtime_error(path + ": read error");
    return ss.str();
}

catalog::HeaderMapping read_mapping(const std::string& path) {
    const std::string text = read_file(path);
    nlohmann::json j;
    try {
        j = nlohmann::json::parse(text);
    } catch (const nlohmann::json::parse_error& e) {
        throw std::runtime_error(path + ": invalid JSON: " + e.what());
    }
    if (!j.is_object()) {
        throw std::runtime_error(path +
                                 ": a mapping is a JSON object {\"your header\": \"field\"}");
    }
    catalog::HeaderMapping m;
    for (const auto& [k, v] : j.items()) {
        if (!v.is_string()) {
            throw std::runtime_error(path + ": value of \"" + k + "\" must be a field name string");
        }
        m[k] = v.get<std::string>();
    }
    return m;
}

void write_rejects(const std::string& path, const std::vector<catalog::ImportProblem>& problems) {
    std::ofstream out(path, std::ios::binary);
    if (!out) throw std::runtime_error(path + ": cannot open the rejects file for writing");
    out << "file,line,column,reason\n";
    for (const auto& p : problems) {
        out << catalog::csv_line({p.file, std::to_string(p.line), p.column, p.reason}) << "\n";
    }
    if (!out) throw std::runtime_error(path + ": write error");
}

std::string counted(int n, const std::string& noun) {
    return std::to_string(n) + " " + noun + (n == 1 ? "" : "s");
}

} // namespace

catalog::PartKind parse_kind(std::string_view text, std::string_view option) {
    if (auto k = catalog::part_kind_from_string(text)) return *k;
    throw UsageError(std::string(option) + ": \"" + std::string(text) +
                     "\" is not a part kind; use inductor or diode");
}

int run_parts_import(const PartsImportOptions& o, Context& ctx) {
    catalog::ImportRequest req;
    req.kind = parse_kind(o.kind, "--kind");
    req.source = o.source;
    req.file_name = o.file;
    req.text = read_file(o.file);
    req.mode = o.append ? catalog::ImportMode::append : catalog::ImportMode::replace;
    req.skip_bad = !o.skip_bad.empty();
    req.dry_run = o.dry_run;
    if (!o.mapping.empty()) req.mapping = read_mapping(o.mapping);

    catalog::ImportSummary s;
    try {
        s = ctx.store().import(req);
    } catch (const catalog::ImportFailed& e) {
        for (const auto& p : e.problems()) ctx.err() << p.to_string() << "\n";
        ctx.err() << "error: " << e.what() << "\n";
        return exit_error;
    }
    if (!s.ignored_columns.empty()) {
        ctx.err() << o.file << ": note: ignored columns:";
        for (const auto& c : s.ignored_columns) ctx.err() << " \"" << c << "\"";
        ctx.err() << " (not catalog fields; map them with --mapping if they are)\n";
    }
    for (const auto& p : s.problems) ctx.err() << p.to_string() << "\n";
    if (!o.skip_bad.empty() && !s.problems.empty() && !o.dry_run) {
        write_rejects(o.skip_bad, s.problems);
        ctx.err() << counted(s.rejected, "row") << " rejected; reasons written to " << o.skip_bad
                  << "\n";
    }
    ctx.out() << (o.dry_run ? "dry run: would import " : "imported ")
              << counted(s.accepted, std::string(catalog::to_string(req.kind))) << " of "
              << counted(s.rows, "row") << " into source \"" << o.source << "\": " << s.added
              << " added, " << s.replaced << " replaced, " << s.unchanged << " unchanged, "
              << s.removed << " removed"
              << (s.rejected ? ", " + std::to_string(s.rejected) + " rejected" : "") << "\n";
    return exit_ok;
}

int run_parts_export(const PartsExportOptions& o, Context& ctx) {
    const catalog::PartKind kind = parse_kind(o.kind, "--kind");
    std::string format = o.format;
    if (format.empty()) {
        format = o.output.size() >= 5 && o.output.ends_with(".json") ? "json" : "csv";
    }
    if (format != "csv" && format != "json") {
        throw UsageError("--format: \"" + format + "\" is not csv or json");
    }
    auto& store = ctx.store();
    bool found = false;
    for (const auto& s : store.sources()) {
        if (s.name == o.source && s.part_kind == kind) found = true;
    }
    if (!found) {
        std::string names;
        for (const auto& s : store.sources()) {
            if (s.part_kind == kind) names += (names.empty() ? "" : ", ") + s.name;
        }
        throw catalog::CatalogError("no " + std::string(catalog::to_string(kind)) + " source \"" +
                                    o.source + "\"" + (names.empty() ? "" : "; sources: " + names));
    }
    std::string text;
    if (kind == catalog::PartKind::inductor) {
        const auto ps = store.all_inductors({o.source});
        text = format == "json" ? catalog::export_json(ps) : catalog::export_csv(ps);
    } else {
        const auto ps = store.all_diodes({o.source});
        text = format == "json" ? catalog::export_json(ps) : catalog::export_csv(ps);
    }
    if (o.output.empty()) {
        ctx.out() << text;
    } else {
        std::ofstream out(o.output, std::ios::binary);
        if (!out) throw std::runtime_error(o.output + ": cannot open for writing");
        out << text;
        if (!out) throw std::runtime_error(o.output + ": write error");
    }
    return exit_ok;
}

} // namespace coilsieve::cli
