// CLI11 declarations of `coilsieve parts ...`; the work is in parts_import.cpp, parts_list.cpp and
// parts_sources.cpp.
#include "catalog/fields.hpp"
#include "cli/parts_commands.hpp"

#include <CLI/CLI.hpp>
#include <memory>

namespace coilsieve::cli {

std::vector<Command> setup_parts(CLI::App& root) {
    CLI::App* parts = root.add_subcommand("parts", "Manage the local parts catalog");
    parts->require_subcommand(1);
    parts->footer("Example:\n  coilsieve parts list inductors --inductance 10u..22u --isat-min 2A");
    std::vector<Command> commands;

    {
        auto o = std::make_shared<PartsImportOptions>();
        CLI::App* c = parts->add_subcommand("import", "Import a CSV or JSON part list as a source");
        c->add_option("FILE", o->file, "CSV (RFC 4180) or .json file")->required();
        c->add_option("--kind", o->kind, "inductor or diode")
            ->required()
            ->check(CLI::IsMember({"inductor", "diode", "inductors", "diodes"}));
        c->add_option("--source", o->source, "source name (replaces that source's parts)")
            ->required();
        c->add_flag("--append", o->append, "add to the source instead of replacing it");
        c->add_option("--skip-bad", o->skip_bad,
                      "import the good rows, write the rejected rows with reasons to this CSV");
        c->add_flag("--dry-run", o->dry_run, "check and count changes, write nothing");
        c->add_option("--mapping", o->mapping, "JSON object mapping your headers to field names")
            ->check(CLI::ExistingFile);
        c->footer(
            "Example:\n  coilsieve parts import my-inductors.csv --kind inductor --source lab\n\n" +
            catalog::fields_help(catalog::PartKind::inductor) + "\n" +
            catalog::fields_help(catalog::PartKind::diode));
        commands.push_back({c, [o](Context& ctx) { return run_parts_import(*o, ctx); }});
    }
    {
        auto o = std::make_shared<PartsExportOptions>();
        CLI::App* c = parts->add_subcommand("export", "Write a source's parts as CSV or JSON");
        c->add_option("--source", o->source, "source name")->required();
        c->add_option("--kind", o->kind, "inductor or diode")
            ->required()
            ->check(CLI::IsMember({"inductor", "diode", "inductors", "diodes"}));
        c->add_option("--format", o->format, "csv or json (default: from -o, else csv)")
            ->check(CLI::IsMember({"csv", "json"}));
        c->add_option("-o,--output", o->output, "output file (default: standard output)");
        c->footer("Example:\n  coilsieve parts export --source lab --kind inductor -o lab.csv\n"
                  "The file imports back unchanged; assumed values are left empty.");
        commands.push_back({c, [o](Context& ctx) { return run_parts_export(*o, ctx); }});
    }
    {
        auto o = std::make_shared<PartsListOptions>();
        CLI::App* c = parts->add_subcommand("list", "List parts matching filters");
        c->add_option("KIND", o->kind, "inductors or diodes")
            ->required()
            ->check(CLI::IsMember({"inductor", "diode", "inductors", "diodes"}));
        c->add_option("--inductance", o->inductance,
                      "range MIN..MAX, e.g. 8u..15u (either side may be empty)");
        c->add_option("--isat-min", o->isat_min, "minimum saturation current, e.g. 2A");
        c->add_option("--height-max", o->height_max, "maximum height, e.g. 3mm");
        c->add_option("--vrrm-min", o->vrrm_min, "minimum VRRM, e.g. 60V");
        c->add_option("--if-min", o->if_min, "minimum average forward current, e.g. 1A");
        c->add_option("--family", o->family, "inductor family, e.g. metal-composite");
        c->add_option("--technology", o->technology, "diode technology, e.g. schottky");
        c->add_option("--package", o->package, "diode package, e.g. SMA");
        c->add_option("--source", o->source, "only this source");
        c->add_option("--sort", o->sort, "field to sort by (default inductance / vrrm)");
        c->add_flag("--desc", o->desc, "sort descending");
        c->add_option("--limit", o->limit, "at most N parts")->check(CLI::NonNegativeNumber);
        auto* json = c->add_flag("--json", o->json, "JSON array with every field");
        auto* csv = c->add_flag("--csv", o->csv,
                                "CSV with the table's columns, numbers in the header units");
        json->excludes(csv);
        c->footer("Examples:\n"
                  "  coilsieve parts list inductors --inductance 10u..22u --isat-min 2A "
                  "--height-max 4mm\n"
                  "  coilsieve parts list diodes --vrrm-min 60V --if-min 1A --technology schottky");
        commands.push_back({c, [o](Context& ctx) { return run_parts_list(*o, ctx); }});
    }
    {
        auto o = std::make_shared<PartsShowOptions>();
        CLI::App* c = parts->add_subcommand("show", "Show every field of a part");
        c->add_option("ID", o->id, "part id, or SOURCE:ID when the id is in several sources")
            ->required();
        c->footer("Example:\n  coilsieve parts show starter:GEN-L-SDF-3x3x1.5-1u0\n"
                  "Values that took a default are marked (assumed).");
        commands.push_back({c, [o](Context& ctx) { return run_parts_show(*o, ctx); }});
    }
    {
        CLI::App* c = parts->add_subcommand("sources", "List the catalog's sources");
        c->footer("Example:\n  coilsieve parts sources");
        commands.push_back({c, [](Context& ctx) { return run_parts_sources(ctx); }});
    }
    {
        auto o = std::make_shared<PartsDeleteOptions>();
        CLI::App* c = parts->add_subcommand("delete", "Delete a source and its parts");
        c->add_option("--source", o->source, "source name")->required();
        c->add_option("--kind", o->kind, "only its inductors or only its diodes")
            ->check(CLI::IsMember({"inductor", "diode", "inductors", "diodes"}));
        c->footer("Example:\n  coilsieve parts delete --source lab");
        commands.push_back({c, [o](Context& ctx) { return run_parts_delete(*o, ctx); }});
    }
    return commands;
}

} // namespace coilsieve::cli
