#pragma once
// `coilsieve parts ...`: the catalog subcommands. Each has an options struct and a run_* that
// works without the parser (tests call them directly); setup_parts declares them on CLI11.

#include "catalog/store.hpp"
#include "cli/context.hpp"
#include "units/quantity.hpp"

#include <optional>
#include <string>
#include <vector>

namespace coilsieve::cli {

struct PartsImportOptions {
    std::string file;
    std::string kind; // inductor | diode
    std::string source;
    bool append = false;
    std::string skip_bad; // rejects file; empty = all-or-nothing
    bool dry_run = false;
    std::string mapping; // JSON object header -> field
};

struct PartsExportOptions {
    std::string source;
    std::string kind;
    std::string format; // csv | json; empty = from -o's extension, else csv
    std::string output; // empty = stdout
};

struct PartsListOptions {
    std::string kind;       // inductors | diodes
    std::string inductance; // "8u..15u"
    std::string isat_min, height_max, vrrm_min, if_min;
    std::string family, technology, package, source;
    std::string sort;
    bool desc = false;
    std::optional<int> limit;
    bool json = false;
    bool csv = false;
};

struct PartsShowOptions {
    std::string id; // ID or SOURCE:ID
};

struct PartsDeleteOptions {
    std::string source;
    std::string kind; // optional: only this kind
};

int run_parts_import(const PartsImportOptions& o, Context& ctx);
int run_parts_export(const PartsExportOptions& o, Context& ctx);
int run_parts_list(const PartsListOptions& o, Context& ctx);
int run_parts_show(const PartsShowOptions& o, Context& ctx);
int run_parts_sources(Context& ctx);
int run_parts_delete(const PartsDeleteOptions& o, Context& ctx);

// Declares `parts` and its subcommands on `root`; returns one Command per leaf subcommand.
std::vector<Command> setup_parts(CLI::App& root);

// "8u..15u" -> {8e-6, 15e-6}; either side may be empty ("..15u", "8u.."). Throws UsageError.
catalog::Range parse_range(std::string_view text, units::Dimension d, std::string_view option);
// A quantity option ("2A", "3mm"); throws UsageError naming the option.
double parse_quantity(std::string_view text, units::Dimension d, std::string_view option);
catalog::PartKind parse_kind(std::string_view text, std::string_view option);

} // namespace coilsieve::cli
