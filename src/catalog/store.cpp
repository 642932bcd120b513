#include "catalog/store.hpp"

#include "catalog/csv.hpp"
#include "catalog/fields.hpp"
#include "catalog/schema.hpp"
#include "catalog/sha256.hpp"

#include <algorithm>
#include <charconv>
#include <chrono>
#include <cmath>
#include <cstdlib>
#include <ctime>
#include <future>
#include <map>
#include <nlohmann/json.hpp>
#include <set>

namespace coilsieve::catalog {

int latest_schema_version() { return static_cast<int>(schema::migrations.size()); }

std::string_view migration_sql(int version) {
    if (version < 1 || version > latest_schema_version()) {
        throw std::out_of_range("no migration " + std::to_string(version));
    }
    return schema::migrations[static_cast<std::size_t>(version - 1)];
}

namespace {

using sqlite::Statement;

std::string_view table_name(PartKind k) { return k == PartKind::inductor ? "inductor" : "diode"; }

std::string quoted_columns(PartKind kind, std::string_view prefix) {
    std::string out;
    for (const Field& f : fields(kind)) {
        if (!out.empty()) out += ", ";
        out += std::string(prefix) + "\"" + std::string(f.name) + "\"";
    }
    return out;
}

std::string insert_sql(PartKind kind) {
    std::string sql = "INSERT INTO " + std::string(table_name(kind)) + " (source_id, assumed, " +
                      quoted_columns(kind, "") + ") VALUES (?, ?";
    for (std::size_t i = 0; i < fields(kind).size(); ++i) sql += ", ?";
    return sql + ")";
}

// Columns: 0 source name, 1 assumed, 2.. the fields in table order.
std::string select_sql(PartKind kind) {
    return "SELECT s.name, t.assumed, " + quoted_columns(kind, "t.") + " FROM " +
           std::string(table_name(kind)) + " t JOIN source s ON s.id = t.source_id";
}

void bind_record(Statement& st, int first, const Record& r) {
    for (std::size_t i = 0; i < r.size(); ++i) {
        const int idx = first + static_cast<int>(i);
        if (auto d = std::get_if<double>(&r[i])) st.bind(idx, *d);
        else if (auto s = std::get_if<std::string>(&r[i])) st.bind(idx, *s);
        else st.bind_null(idx);
    }
}

Record read_record(const Statement& st, PartKind kind, int first) {
    const auto table = fields(kind);
    Record r(table.size());
    for (std::size_t i = 0; i < table.size(); ++i) {
        const int col = first + static_cast<int>(i);
        if (st.is_null(col)) continue;
        if (table[i].type == FieldType::text) r[i] = st.column_text(col);
        else r[i] = st.column_double(col);
    }
    return r;
}

template <class Part> Part part_from_row(const Statement& st, PartKind kind) {
    Record r = read_record(st, kind, 2);
    if constexpr (std::is_same_v<Part, parts::Inductor>) {
        return inductor_from_record(r, st.column_text(0), split_names(st.column_text(1)));
    } else {
        return diode_from_record(r, st.column_text(0), split_names(st.column_text(1)));
    }
}

bool same_value(const Value& a, const Value& b) {
    if (a.index() != b.index()) return false;
    if (auto x = std::get_if<double>(&a)) {
        const double y = std::get<double>(b);
        return std::abs(*x - y) <= 1e-9 * std::max(std::abs(*x), std::abs(y));
    }
    return a == b;
}

template <class Part> bool same_part(const Part& a, const Part& b) {
    if (a.assumed != b.assumed) return false;
    const Record ra = to_record(a), rb = to_record(b);
    for (std::size_t i = 0; i < ra.size(); ++i) {
        if (!same_value(ra[i], rb[i])) return false;
    }
    return true;
}

std::string number_text(double v) {
    char buf[64];
    auto [end, ec] = std::to_chars(buf, buf + sizeof buf, v);
    return std::string(buf, end);
}

void check_source_name(std::string_view name) {
    if (name.empty()) throw CatalogError("source name is empty; give --source NAME");
    if (name.find(':') != std::string_view::npos) {
        throw CatalogError("source name \"" + std::string(name) +
                           "\" contains ':'; ':' separates SOURCE:ID, choose another name");
    }
    if (name.front() == ' ' || name.back() == ' ') {
        throw CatalogError("source name \"" + std::string(name) + "\" has leading/trailing spaces");
    }
}

std::optional<std::int64_t> source_id(sqlite::Database& db, std::string_view name, PartKind kind) {
    Statement st(db, "SELECT id FROM source WHERE name = ? AND part_kind = ?");
    st.bind(1, name).bind(2, to_string(kind));
    if (st.step()) return st.column_int(0);
    return std::nullopt;
}

template <class Part>
std::vector<Part> run_select(sqlite::Database& db, PartKind kind, const std::string& where,
                             const std::vector<Value>& params, const std::string& tail) {
    Statement st(db, select_sql(kind) + where + tail);
    for (std::size_t i = 0; i < params.size(); ++i) {
        const int idx = static_cast<int>(i) + 1;
        if (auto d = std::get_if<double>(&params[i])) st.bind(idx, *d);
        else if (auto s = std::get_if<std::string>(&params[i])) st.bind(idx, *s);
    }
    std::vector<Part> out;
    while (st.step()) out.push_back(part_from_row<Part>(st, kind));
    return out;
}

std::string sources_clause(const std::vector<std::string>& sources, std::vector<Value>& params) {
    if (sources.empty()) return {};
    std::string where = " WHERE s.name IN (";
    for (std::size_t i = 0; i < sources.size(); ++i) {
        where += i ? ", ?" : "?";
        params.emplace_back(sources[i]);
    }
    return where + ")";
}

std::string order_clause(PartKind kind, const std::string& sort, bool descending) {
    if (!field_index(kind, sort)) {
        std::string valid;
        for (const Field& f : fields(kind))
            valid += (valid.empty() ? "" : ", ") + std::string(f.name);
        throw CatalogError("cannot sort by \"" + sort + "\"; valid fields: " + valid);
    }
    // The name is one of the table's own column names, so it is safe to place in the SQL.
    return " ORDER BY t.\"" + sort + "\"" + (descending ? " DESC" : " ASC") + ", t.\"id\", s.name";
}

std::string limit_clause(const std::optional<int>& limit) {
    if (!limit) return {};
    if (*limit < 0) throw CatalogError("limit must not be negative");
    return " LIMIT " + std::to_string(*limit);
}

struct ExistingPart {
    Record record;
    std::vector<std::string> assumed;
};

template <class Part>
ImportSummary do_import(sqlite::Database& db, const ImportRequest& req, ImportResult& result,
                        const std::vector<Part>& incoming, std::future<std::string>& sha) {
    ImportSummary sum;
    sum.rows = result.rows;
    sum.accepted = static_cast<int>(incoming.size());
    sum.rejected = static_cast<int>(result.rejected_lines.size());
    sum.problems = result.problems;
    sum.rejected_lines = result.rejected_lines;
    sum.ignored_columns = result.ignored_columns;

    const PartKind kind = req.kind;
    sqlite::Transaction tx(db);
    const auto existing_id = source_id(db, req.source, kind);
    std::map<std::string, Part> existing;
    if (existing_id) {
        std::vector<Value> params{Value{req.source}};
        for (auto& p : run_select<Part>(db, kind,
                                        " WHERE s.name = ? AND s.part_kind = '" +
                                            std::string(to_string(kind)) + "'",
                                        params, "")) {
            existing.emplace(p.id, std::move(p));
        }
    }
    std::set<std::string> incoming_ids; // needed only to count the existing parts removed
    std::vector<ImportProblem> conflicts;
    for (std::size_t i = 0; i < incoming.size(); ++i) {
        const Part& p = incoming[i];
        if (!existing.empty()) incoming_ids.insert(p.id);
        auto it = existing.find(p.id);
        if (it == existing.end()) {
            ++sum.added;
        } else if (req.mode == ImportMode::append) {
            conflicts.push_back({req.file_name, result.part_lines[i], "id",
                                 "id \"" + p.id + "\" is already in source \"" + req.source +
                                     "\"; import without --append to replace the source"});
        } else if (same_part(p, it->second)) {
            ++sum.unchanged;
        } else {
            ++sum.replaced;
        }
    }
    if (req.mode == ImportMode::replace) {
        for (const auto& [id, part] : existing) {
            if (!incoming_ids.contains(id)) ++sum.removed;
        }
    }
    if (!conflicts.empty()) {
        if (req.dry_run) {
            sum.problems.insert(sum.problems.end(), conflicts.begin(), conflicts.end());
            return sum;
        }
        throw ImportFailed(req.file_name + ": " + std::to_string(conflicts.size()) +
                               " ids already in source \"" + req.source + "\"; nothing imported",
                           conflicts);
    }
    if (req.dry_run) return sum;

    const std::string file_sha = sha.get();
    std::int64_t sid = 0;
    if (req.mode == ImportMode::replace || !existing_id) {
        if (existing_id) {
            Statement del(db, "DELETE FROM source WHERE id = ?");
            del.bind(1, *existing_id).run();
        }
        Statement ins(db, "INSERT INTO source (name, part_kind, kind, created, file_name, sha256, "
                          "row_count) VALUES (?, ?, ?, ?, ?, ?, ?)");
        ins.bind(1, req.source)
            .bind(2, to_string(kind))
            .bind(3, req.source_kind)
            .bind(4, sqlite::utc_now())
            .bind(5, req.file_name)
            .bind(6, file_sha)
            .bind(7, static_cast<std::int64_t>(incoming.size()));
        ins.run();
        sid = db.last_insert_rowid();
    } else {
        sid = *existing_id;
        Statement up(db, "UPDATE source SET file_name = ?, sha256 = ?, row_count = row_count + ? "
                         "WHERE id = ?");
        up.bind(1, req.file_name)
            .bind(2, file_sha)
            .bind(3, static_cast<std::int64_t>(incoming.size()));
        up.bind(4, sid).run();
    }
    Statement ins(db, insert_sql(kind));
    std::size_t n = 0;
    for (std::size_t i = 0; i < incoming.size(); ++i) {
        const Part& p = incoming[i];
        ins.bind(1, sid).bind(2, join_names(p.assumed));
        bind_record(ins, 3, to_record(p));
        try {
            ins.run();
        } catch (const sqlite::SqliteError& e) {
            if (!e.constraint()) throw;
            throw ImportFailed(req.file_name + ":" + std::to_string(result.part_lines[i]) +
                                   ": the catalog refused part \"" + p.id + "\" (" + e.what() +
                                   "); nothing imported",
                               {{req.file_name, result.part_lines[i], "", e.what()}});
        }
        ++n;
        if (req.after_insert) req.after_insert(n);
    }
    tx.commit();
    sum.written = true;
    return sum;
}

template <class Part> std::string export_csv_impl(const std::vector<Part>& ps, PartKind kind) {
    const auto table = fields(kind);
    std::vector<std::string> header;
    std::vector<double> scale(table.size(), 1.0);
    for (std::size_t i = 0; i < table.size(); ++i) {
        const Field& f = table[i];
        std::string h(f.name);
        if (f.type == FieldType::number && !f.display_unit.empty()) {
            h += " (" + std::string(f.display_unit) + ")";
            if (f.dimension != units::Dimension::temperature) {
                scale[i] = std::get<double>(parse_cell(f, "1", f.display_unit));
            }
        }
        header.push_back(std::move(h));
    }
    std::string out = csv_line(header);
    out += "\n";
    std::vector<std::string> cells(table.size());
    for (const Part& p : ps) {
        const Record r = to_record(p);
        for (std::size_t i = 0; i < table.size(); ++i) {
            cells[i].clear();
            if (p.is_assumed(table[i].name)) continue;
            if (auto d = std::get_if<double>(&r[i])) {
                cells[i] = table[i].dimension == units::Dimension::temperature &&
                                   table[i].type == FieldType::number
                               ? number_text(units::to_celsius(*d))
                               : number_text(*d / scale[i]);
            } else if (auto s = std::get_if<std::string>(&r[i])) {
                cells[i] = *s;
            }
        }
        out += csv_line(cells);
        out += "\n";
    }
    return out;
}

template <class Part> std::string export_json_impl(const std::vector<Part>& ps, PartKind kind) {
    const auto table = fields(kind);
    nlohmann::ordered_json arr = nlohmann::ordered_json::array();
    for (const Part& p : ps) {
        const Record r = to_record(p);
        nlohmann::ordered_json obj = nlohmann::ordered_json::object();
        for (std::size_t i = 0; i < table.size(); ++i) {
            if (p.is_assumed(table[i].name)) continue;
            const std::string key(table[i].name);
            if (auto d = std::get_if<double>(&r[i])) {
                obj[key] = table[i].dimension == units::Dimension::temperature &&
                                   table[i].type == FieldType::number
                               ? units::to_celsius(*d)
                               : *d;
            } else if (auto s = std::get_if<std::string>(&r[i])) {
                obj[key] = *s;
            }
        }
        arr.push_back(std::move(obj));
    }
    return arr.dump(2) + "\n";
}

} // namespace

Store::Store(const std::filesystem::path& path, OpenOptions options)
    : path_(path), db_([&] {
          if (path.string() != ":memory:" && path.has_parent_path()) {
              std::error_code ec;
              std::filesystem::create_directories(path.parent_path(), ec);
              if (ec) {
                  throw CatalogError("cannot create directory " + path.parent_path().string() +
                                     " for the catalog: " + ec.message());
              }
          }
          try {
              return sqlite::Database(path);
          } catch (const sqlite::SqliteError& e) {
              throw CatalogError(std::string(e.what()) +
                                 "; check the path given by --db or COILSIEVE_DB");
          }
      }()) {
    try {
        db_.exec("PRAGMA busy_timeout = 5000");
        db_.exec("PRAGMA foreign_keys = ON");
        // A large page cache (allocated only as used) keeps a 100k-row import from spilling
        // index pages to the WAL mid-transaction.
        db_.exec("PRAGMA cache_size = -65536");
        open_checks();
        const bool created = migrate();
        if (created && options.load_starter) load_starter_parts();
    } catch (const sqlite::SqliteError& e) {
        if ((e.code() & 0xff) == 26 /* SQLITE_NOTADB */) {
            throw CatalogError(path.string() + " is not a coilsieve catalog (not an SQLite "
                                               "database); give another path with --db");
        }
        throw;
    }
}

std::string explain_catalog_failure(const sqlite::SqliteError& e,
                                    const std::filesystem::path& path) {
    std::string said = e.what();
    if (const auto in = said.find(" (in: "); in != std::string::npos) said.resize(in);
    std::string advice;
    switch (e.code() & 0xff) { // the primary result code
    case 5:                    // SQLITE_BUSY
    case 6:                    // SQLITE_LOCKED
        advice = "another program is writing it; try again when it is done";
        break;
    case 8: // SQLITE_READONLY
        advice = "it cannot be written: the file or its folder is read-only (SQLite also writes " +
                 path.filename().string() + "-wal and " + path.filename().string() +
                 "-shm beside it); make them writable or give a writable copy with --db";
        break;
    case 11: // SQLITE_CORRUPT
    case 26: // SQLITE_NOTADB
        advice = "the file is damaged; restore it from a backup, or give a new path with --db "
                 "(a new catalog starts with the starter parts; import your lists again)";
        break;
    case 13: // SQLITE_FULL
        advice = "the disk is full; nothing was changed";
        break;
    case 14: // SQLITE_CANTOPEN
        advice =
            "it cannot be opened; check the path and its permissions, or give another with --db";
        break;
    default:
        advice = "the operation failed and nothing was changed";
    }
    return "catalog " + path.string() + ": " + advice + " (" + said + ")";
}

void Store::open_checks() {
    const std::int64_t app = db_.scalar_int("PRAGMA application_id");
    const std::int64_t version = db_.scalar_int("PRAGMA user_version");
    const std::int64_t objects = db_.scalar_int("SELECT count(*) FROM sqlite_master");
    if (app != catalog_application_id && (app != 0 || version != 0 || objects != 0)) {
        throw CatalogError(path_.string() +
                           " is an SQLite database of another program (application_id " +
                           std::to_string(app) +
                           "), not a coilsieve catalog; give another path "
                           "with --db");
    }
    if (version > latest_schema_version()) {
        throw CatalogError(path_.string() + " has catalog schema version " +
                           std::to_string(version) + " but this coilsieve knows only up to " +
                           std::to_string(latest_schema_version()) +
                           "; use a newer coilsieve (the file was left untouched)");
    }
    if (path_.string() != ":memory:") {
        // WAL lets readers work while another process imports; with WAL, synchronous=NORMAL
        // cannot corrupt the file (a power cut may lose only the last commit).
        db_.exec("PRAGMA journal_mode = WAL");
        db_.exec("PRAGMA synchronous = NORMAL");
    }
}

bool Store::migrate() {
    bool created = false;
    for (int v = 1; v <= latest_schema_version(); ++v) {
        if (db_.scalar_int("PRAGMA user_version") >= v) continue;
        sqlite::Transaction tx(db_);
        // Another process may have migrated between our check and the lock.
        if (db_.scalar_int("PRAGMA user_version") >= v) continue;
        db_.exec(migration_sql(v));
        if (v == 1) {
            db_.exec("PRAGMA application_id = " + std::to_string(catalog_application_id));
            created = true;
        }
        db_.exec("PRAGMA user_version = " + std::to_string(v));
        tx.commit();
    }
    return created;
}

void Store::load_starter_parts() {
    const std::pair<PartKind, std::string_view> files[] = {
        {PartKind::inductor, starter_inductors_csv()}, {PartKind::diode, starter_diodes_csv()}};
    for (const auto& [kind, text] : files) {
        if (text.empty()) continue;
        ImportRequest req;
        req.kind = kind;
        req.source = "starter";
        req.file_name = kind == PartKind::inductor ? "starter/inductors.csv" : "starter/diodes.csv";
        req.text = std::string(text);
        req.skip_bad = true;
        req.source_kind = "starter";
        try {
            import(req);
        } catch (const ImportFailed&) {
            // A broken starter file is caught by tests/catalog/starter_catalog_test; the tool
            // still works with the user's own imports.
        }
    }
}

std::filesystem::path Store::default_path() {
    if (const char* env = std::getenv("COILSIEVE_DB"); env && *env) return env;
    if (const char* xdg = std::getenv("XDG_DATA_HOME"); xdg && *xdg) {
        return std::filesystem::path(xdg) / "coilsieve" / "catalog.db";
    }
    if (const char* home = std::getenv("HOME"); home && *home) {
        return std::filesystem::path(home) / ".local" / "share" / "coilsieve" / "catalog.db";
    }
    throw CatalogError("cannot find a place for the catalog: HOME is not set; give --db PATH or "
                       "set COILSIEVE_DB");
}

ImportSummary Store::import(const ImportRequest& req) {
    check_source_name(req.source);
    if (req.source_kind != "import" && req.source_kind != "starter") {
        throw CatalogError("source kind must be import or starter");
    }
    // The file's hash is taken while it is read (a large file takes a tenth of a second); where
    // no thread can be had, libstdc++ defers it to get().
    std::future<std::string> sha = std::async(std::launch::async | std::launch::deferred,
                                              [&text = req.text] { return sha256_hex(text); });
    ImportResult result = read_parts(req.text, req.file_name, req.kind, req.source, req.mapping);
    const std::size_t accepted =
        req.kind == PartKind::inductor ? result.inductors.size() : result.diodes.size();
    if (result.fatal || (!result.problems.empty() && !req.skip_bad) || accepted == 0) {
        if (result.problems.empty()) {
            result.problems.push_back({req.file_name, 0, "", "no parts in the file"});
        }
        std::string what = req.file_name + ": " + std::to_string(result.problems.size()) +
                           (result.problems.size() == 1 ? " problem" : " problems") +
                           "; nothing imported";
        if (!result.fatal && accepted > 0) what += " (--skip-bad imports the good rows)";
        throw ImportFailed(what, std::move(result.problems));
    }
    if (req.kind == PartKind::inductor) return do_import(db_, req, result, result.inductors, sha);
    return do_import(db_, req, result, result.diodes, sha);
}

int Store::delete_source(std::string_view name, std::optional<PartKind> kind) {
    sqlite::Transaction tx(db_);
    int parts_removed = 0;
    int sources_removed = 0;
    for (PartKind k : {PartKind::inductor, PartKind::diode}) {
        if (kind && *kind != k) continue;
        const auto sid = source_id(db_, name, k);
        if (!sid) continue;
        Statement count(db_, "SELECT count(*) FROM " + std::string(table_name(k)) +
                                 " WHERE source_id = ?");
        count.bind(1, *sid);
        if (count.step()) parts_removed += static_cast<int>(count.column_int(0));
        Statement del(db_, "DELETE FROM source WHERE id = ?");
        del.bind(1, *sid).run();
        ++sources_removed;
    }
    if (sources_removed == 0) {
        std::string names;
        for (const auto& s : sources()) names += (names.empty() ? "" : ", ") + s.name;
        throw CatalogError("no source \"" + std::string(name) + "\" in the catalog" +
                           (names.empty() ? std::string{} : "; sources: " + names));
    }
    tx.commit();
    return parts_removed;
}

std::vector<SourceInfo> Store::sources() {
    Statement st(db_, R"sql(
        SELECT s.name, s.kind, s.part_kind, s.created, s.file_name, s.sha256,
               CASE s.part_kind
                 WHEN 'inductor' THEN (SELECT count(*) FROM inductor WHERE source_id = s.id)
                 ELSE (SELECT count(*) FROM diode WHERE source_id = s.id) END
        FROM source s ORDER BY s.name, s.part_kind)sql");
    std::vector<SourceInfo> out;
    while (st.step()) {
        SourceInfo s;
        s.name = st.column_text(0);
        s.kind = st.column_text(1);
        s.part_kind = *part_kind_from_string(st.column_text(2));
        s.created = st.column_text(3);
        s.file_name = st.column_text(4);
        s.sha256 = st.column_text(5);
        s.parts = static_cast<int>(st.column_int(6));
        out.push_back(std::move(s));
    }
    return out;
}

namespace {
// The canonical name of a choice field's value, or an error listing the valid names.
std::string required_choice(const char* field, const std::string& value) {
    if (auto canon = canonical_choice(field, value)) return *canon;
    std::string valid;
    for (const auto& n : choice_names(field)) valid += (valid.empty() ? "" : ", ") + n;
    throw CatalogError(std::string("unknown ") + field + " \"" + value + "\"; valid: " + valid);
}
} // namespace

std::vector<parts::Inductor> Store::query(const InductorQuery& q) {
    std::string where;
    std::vector<Value> params;
    auto add = [&](const std::string& cond, Value v) {
        where += where.empty() ? " WHERE " : " AND ";
        where += cond;
        params.push_back(std::move(v));
    };
    if (q.inductance.min) add("t.inductance >= ?", *q.inductance.min);
    if (q.inductance.max) add("t.inductance <= ?", *q.inductance.max);
    if (q.isat_min) add("t.isat >= ?", *q.isat_min);
    if (q.irms_min) add("t.irms >= ?", *q.irms_min);
    if (q.height_max) add("t.height <= ?", *q.height_max);
    if (q.dcr_max) add("t.dcr_typ <= ?", *q.dcr_max);
    if (q.family) {
        add("t.family = ?", required_choice("family", *q.family));
    }
    if (q.mounting)
        add("t.mounting = ?", canonical_choice("mounting", *q.mounting).value_or(*q.mounting));
    if (q.source) add("s.name = ?", *q.source);
    return run_select<parts::Inductor>(db_, PartKind::inductor, where, params,
                                       order_clause(PartKind::inductor, q.sort, q.descending) +
                                           limit_clause(q.limit));
}

std::vector<parts::Diode> Store::query(const DiodeQuery& q) {
    std::string where;
    std::vector<Value> params;
    auto add = [&](const std::string& cond, Value v) {
        where += where.empty() ? " WHERE " : " AND ";
        where += cond;
        params.push_back(std::move(v));
    };
    if (q.vrrm_min) add("t.vrrm >= ?", *q.vrrm_min);
    if (q.if_avg_min) add("t.if_avg >= ?", *q.if_avg_min);
    if (q.height_max) add("t.height <= ?", *q.height_max);
    if (q.technology) {
        add("t.technology = ?", required_choice("technology", *q.technology));
    }
    if (q.package) {
        add("lower(t.package) = lower(?)",
            canonical_choice("package", *q.package).value_or(*q.package));
    }
    if (q.source) add("s.name = ?", *q.source);
    return run_select<parts::Diode>(db_, PartKind::diode, where, params,
                                    order_clause(PartKind::diode, q.sort, q.descending) +
                                        limit_clause(q.limit));
}

namespace {
template <class Part>
std::vector<Part> find_parts(sqlite::Database& db, PartKind kind, std::string_view key) {
    std::vector<Value> params{Value{std::string(key)}};
    const std::string order = " ORDER BY s.name";
    auto found = run_select<Part>(db, kind, " WHERE t.\"id\" = ?", params, order);
    if (found.empty()) {
        if (const std::size_t colon = key.find(':'); colon != std::string_view::npos) {
            std::vector<Value> p2{Value{std::string(key.substr(0, colon))},
                                  Value{std::string(key.substr(colon + 1))}};
            found = run_select<Part>(db, kind, " WHERE s.name = ? AND t.\"id\" = ?", p2, order);
        }
    }
    return found;
}
} // namespace

std::vector<parts::Inductor> Store::find_inductors(std::string_view key) {
    return find_parts<parts::Inductor>(db_, PartKind::inductor, key);
}

std::vector<parts::Diode> Store::find_diodes(std::string_view key) {
    return find_parts<parts::Diode>(db_, PartKind::diode, key);
}

std::vector<parts::Inductor> Store::all_inductors(const std::vector<std::string>& sources) {
    std::vector<Value> params;
    const std::string where = sources_clause(sources, params);
    return run_select<parts::Inductor>(db_, PartKind::inductor, where, params,
                                       " ORDER BY s.name, t.\"id\"");
}

std::vector<parts::Diode> Store::all_diodes(const std::vector<std::string>& sources) {
    std::vector<Value> params;
    const std::string where = sources_clause(sources, params);
    return run_select<parts::Diode>(db_, PartKind::diode, where, params,
                                    " ORDER BY s.name, t.\"id\"");
}

std::string Store::fingerprint(const std::vector<std::string>& sources) {
    Sha256 h;
    auto add_record = [&](char tag, const std::string& source,
                          const std::vector<std::string>& assumed, const Record& r) {
        std::string line(1, tag);
        line += "\x1f" + source + "\x1f" + join_names(assumed);
        for (const Value& v : r) {
            line += "\x1f";
            if (auto d = std::get_if<double>(&v)) line += number_text(*d);
            else if (auto s = std::get_if<std::string>(&v)) line += "s" + *s;
            else line += "-";
        }
        line += "\x1e";
        h.update(line);
    };
    // One read transaction gives one consistent snapshot (unless the caller already holds one).
    std::optional<sqlite::Transaction> tx;
    if (!db_.in_transaction()) tx.emplace(db_, sqlite::Transaction::Mode::deferred);
    for (const auto& p : all_inductors(sources)) add_record('L', p.source, p.assumed, to_record(p));
    for (const auto& p : all_diodes(sources)) add_record('D', p.source, p.assumed, to_record(p));
    if (tx) tx->commit();
    return h.hex();
}

std::string export_csv(const std::vector<parts::Inductor>& ps) {
    return export_csv_impl(ps, PartKind::inductor);
}
std::string export_csv(const std::vector<parts::Diode>& ps) {
    return export_csv_impl(ps, PartKind::diode);
}
std::string export_json(const std::vector<parts::Inductor>& ps) {
    return export_json_impl(ps, PartKind::inductor);
}
std::string export_json(const std::vector<parts::Diode>& ps) {
    return export_json_impl(ps, PartKind::diode);
}

PartLists starter_parts() {
    PartLists out;
    out.inductors =
        read_parts(starter_inductors_csv(), "inductors.csv", PartKind::inductor, "starter")
            .inductors;
    out.diodes = read_parts(starter_diodes_csv(), "diodes.csv", PartKind::diode, "starter").diodes;
    return out;
}

} // namespace coilsieve::catalog
