#pragma once
// Saved trade studies in the catalog database (table `study`, schema migration 2): each rank run
// with its effective design, options, catalog fingerprint and results; reruns link to a parent.

#include "catalog/sqlite.hpp"

#include <cstdint>
#include <nlohmann/json.hpp>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace coilsieve::studies {

class StudyError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

struct Study {
    std::int64_t id = 0;
    std::string name;
    std::optional<std::int64_t> parent_id;
    std::string parent_name; // filled when read back ("" if none or deleted)
    std::string created;     // UTC, ISO 8601
    nlohmann::json design;   // design_json::to_json of the effective design
    nlohmann::json options;  // locks, top N, sources, exhaustive, fixed setting, ...
    std::string fingerprint; // catalog fingerprint of the sources used
    nlohmann::json results;  // results_to_json without corners
};

class StudyStore {
public:
    explicit StudyStore(catalog::sqlite::Database& db) : db_(db) {}

    // Inserts in one transaction; sets s.id. Throws StudyError if the name is taken.
    std::int64_t save(Study& s);
    std::vector<Study> list(); // by id (creation order)
    std::optional<Study> find(std::string_view name);
    Study get(std::string_view name);   // throws StudyError naming the known studies
    void remove(std::string_view name); // throws StudyError if unknown
    // "<design>-<YYYYMMDD-HHMMSS>-<n>" with the smallest n not taken yet.
    std::string generate_name(std::string_view design_name, std::string_view created);

private:
    catalog::sqlite::Database& db_;
};

using catalog::sqlite::utc_now;

struct ObjectiveChange {
    std::string objective;
    double before = 0.0, after = 0.0;
};
struct PairChange {
    std::string key;
    std::optional<int> rank_before, rank_after;
    std::vector<ObjectiveChange> changes;
};
struct InputChange {
    std::string path;   // "limits.load_ripple", "options.top", ...
    std::string before; // JSON text ("absent" when missing)
    std::string after;
};
struct StudyDiff {
    std::string a, b;
    std::vector<std::string> entered_top, left_top;
    std::vector<std::string> entered_pareto, left_pareto;
    std::vector<PairChange> common; // pairs in both top lists
    std::vector<InputChange> design_changes;
    std::vector<InputChange> option_changes;
    bool catalog_changed = false;
    std::string fingerprint_a, fingerprint_b;
};

StudyDiff diff_studies(const Study& a, const Study& b);
std::string diff_text(const StudyDiff& d);
nlohmann::json diff_json(const StudyDiff& d);

} // namespace coilsieve::studies
