#pragma once
// The local parts catalog: one SQLite file holding sources (a starter set and the user's
// imports), inductors, diodes and saved studies. Opening creates, migrates and (when new) fills it.

#include "catalog/import.hpp"
#include "catalog/sqlite.hpp"

#include <cstdint>
#include <filesystem>
#include <functional>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace coilsieve::catalog {

// PRAGMA application_id of a coilsieve catalog: "CSV1" in ASCII.
inline constexpr std::int32_t catalog_application_id = 0x43535631;
// Latest schema version this code knows (PRAGMA user_version).
int latest_schema_version();
// The SQL of migration `version` (1-based), as applied; for tests that build old databases.
std::string_view migration_sql(int version);

// A data or usage problem with the catalog (unknown source, foreign file, ...): the message names
// the input and says what would be right.
class CatalogError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

// An import refused because of problems in the file (nothing was written).
class ImportFailed : public CatalogError {
public:
    ImportFailed(const std::string& what, std::vector<ImportProblem> problems)
        : CatalogError(what), problems_(std::move(problems)) {}
    const std::vector<ImportProblem>& problems() const { return problems_; }

private:
    std::vector<ImportProblem> problems_;
};

enum class ImportMode {
    replace, // the source's parts become exactly the file's (atomic)
    append,  // the file's parts are added to the source; an id already there is an error
};

struct ImportRequest {
    PartKind kind = PartKind::inductor;
    std::string source;    // source name: no ':' and not empty
    std::string file_name; // for messages and the source record
    std::string text;      // the file's bytes
    ImportMode mode = ImportMode::replace;
    bool skip_bad = false; // write the good rows, report the bad (else all-or-nothing)
    bool dry_run = false;  // count what would change, write nothing
    HeaderMapping mapping;
    std::string source_kind = "import"; // "import" or "starter"
    // Test hook: called after each part row is inserted; may throw to simulate a failure.
    std::function<void(std::size_t inserted)> after_insert;
};

struct ImportSummary {
    int rows = 0;     // data rows in the file
    int accepted = 0; // rows that passed validation
    int rejected = 0;
    int added = 0;     // ids new to the source
    int replaced = 0;  // ids in the source whose values change
    int unchanged = 0; // ids in the source with the same values
    int removed = 0;   // ids in the source that the file no longer has (replace mode)
    bool written = false;
    std::vector<ImportProblem> problems;
    std::vector<int> rejected_lines;
    std::vector<std::string> ignored_columns;
};

struct SourceInfo {
    std::string name;
    std::string kind; // "starter" or "import"
    PartKind part_kind = PartKind::inductor;
    std::string created; // UTC, ISO 8601
    std::string file_name;
    std::string sha256; // of the last imported file's bytes
    int parts = 0;      // parts stored now
};

struct Range {
    std::optional<double> min{};
    std::optional<double> max{};
};

struct InductorQuery {
    Range inductance{};                 // H
    std::optional<double> isat_min{};   // A
    std::optional<double> irms_min{};   // A
    std::optional<double> height_max{}; // m
    std::optional<double> dcr_max{};    // Ω, on dcr_typ
    std::optional<std::string> family{};
    std::optional<std::string> mounting{};
    std::optional<std::string> source{};
    std::string sort = "inductance"; // any field name
    bool descending = false;
    std::optional<int> limit{};
};

struct DiodeQuery {
    std::optional<double> vrrm_min{};   // V
    std::optional<double> if_avg_min{}; // A
    std::optional<double> height_max{}; // m
    std::optional<std::string> technology{};
    std::optional<std::string> package{};
    std::optional<std::string> source{};
    std::string sort = "vrrm";
    bool descending = false;
    std::optional<int> limit{};
};

// What an SQLite failure on the catalog at `path` means for its user: the file named, the likely
// cause and what to do, and SQLite's own words without the SQL text.
std::string explain_catalog_failure(const sqlite::SqliteError& e,
                                    const std::filesystem::path& path);

struct OpenOptions {
    bool load_starter = true; // fill a new database from the embedded starter catalog
};

class Store {
public:
    // Opens or creates the catalog at `path` (parent directories are created). Throws
    // CatalogError for a file that is not ours or is newer than this program.
    explicit Store(const std::filesystem::path& path, OpenOptions options = {});

    // $COILSIEVE_DB, else $XDG_DATA_HOME/coilsieve/catalog.db, else
    // ~/.local/share/coilsieve/catalog.db.
    static std::filesystem::path default_path();

    // Validate and write (or with dry_run, count) a part list. Throws ImportFailed when the file
    // has problems and skip_bad is off, or when nothing in it could be read.
    ImportSummary import(const ImportRequest& request);

    // Delete a source (both kinds, or only `kind`) and its parts; returns the parts removed.
    // Throws CatalogError if no such source exists.
    int delete_source(std::string_view name, std::optional<PartKind> kind = std::nullopt);

    std::vector<SourceInfo> sources();

    std::vector<parts::Inductor> query(const InductorQuery& q);
    std::vector<parts::Diode> query(const DiodeQuery& q);

    // All parts with this id (ids may repeat across sources), or exactly SOURCE:ID.
    std::vector<parts::Inductor> find_inductors(std::string_view key);
    std::vector<parts::Diode> find_diodes(std::string_view key);

    // Every part (optionally only of the given sources), ordered by source then id.
    std::vector<parts::Inductor> all_inductors(const std::vector<std::string>& sources = {});
    std::vector<parts::Diode> all_diodes(const std::vector<std::string>& sources = {});

    // SHA-256 over every stored value of every part, in a stable order (source, kind, id);
    // optionally only over the given sources. Equal catalogs give equal fingerprints.
    std::string fingerprint(const std::vector<std::string>& sources = {});

    // The open connection, for saved studies (table `study`, see migration 2).
    sqlite::Database& database() { return db_; }
    const std::filesystem::path& path() const { return path_; }

private:
    void open_checks();
    bool migrate(); // returns true if this call created the schema
    void load_starter_parts();

    std::filesystem::path path_;
    sqlite::Database db_;
};

// The starter catalog embedded at build time (empty if data/starter had no files then).
std::string_view starter_inductors_csv();
std::string_view starter_diodes_csv();

// The embedded starter catalog, parsed without a database (for tests and benchmarks).
struct PartLists {
    std::vector<parts::Inductor> inductors;
    std::vector<parts::Diode> diodes;
};
PartLists starter_parts();

// Write parts in a form read_parts reads back: CSV with a unit in each numeric header, or a JSON
// array (numbers in SI, temperatures in °C). Assumed fields are left empty so that re-importing
// reproduces the same parts and the same assumed flags.
std::string export_csv(const std::vector<parts::Inductor>& parts);
std::string export_csv(const std::vector<parts::Diode>& parts);
std::string export_json(const std::vector<parts::Inductor>& parts);
std::string export_json(const std::vector<parts::Diode>& parts);

} // namespace coilsieve::catalog
