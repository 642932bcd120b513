#include "catalog/sqlite.hpp"

#include <chrono>
#include <ctime>
#include <sqlite3.h>
#include <utility>

namespace coilsieve::catalog::sqlite {
namespace {

[[noreturn]] void fail(sqlite3* db, int rc, std::string_view context) {
    std::string msg = db ? sqlite3_errmsg(db) : sqlite3_errstr(rc);
    const int code = db ? sqlite3_extended_errcode(db) : rc;
    throw SqliteError("SQLite error: " + msg + " (in: " + std::string(context) + ")", code);
}

} // namespace

bool SqliteError::busy() const {
    const int primary = code_ & 0xff;
    return primary == SQLITE_BUSY || primary == SQLITE_LOCKED;
}

bool SqliteError::constraint() const { return (code_ & 0xff) == SQLITE_CONSTRAINT; }

Database::Database(const std::filesystem::path& path) : path_(path) {
    const int rc =
        sqlite3_open_v2(path.string().c_str(), &db_,
                        SQLITE_OPEN_READWRITE | SQLITE_OPEN_CREATE | SQLITE_OPEN_NOMUTEX, nullptr);
    if (rc != SQLITE_OK) {
        std::string msg = db_ ? sqlite3_errmsg(db_) : sqlite3_errstr(rc);
        sqlite3_close(db_);
        db_ = nullptr;
        throw SqliteError("cannot open database " + path.string() + ": " + msg, rc);
    }
    sqlite3_extended_result_codes(db_, 1);
}

Database::~Database() {
    if (db_) sqlite3_close_v2(db_);
}

Database::Database(Database&& other) noexcept
    : db_(std::exchange(other.db_, nullptr)), path_(std::move(other.path_)) {}

Database& Database::operator=(Database&& other) noexcept {
    if (this != &other) {
        if (db_) sqlite3_close_v2(db_);
        db_ = std::exchange(other.db_, nullptr);
        path_ = std::move(other.path_);
    }
    return *this;
}

void Database::exec(std::string_view sql) {
    std::string text(sql);
    char* err = nullptr;
    const int rc = sqlite3_exec(db_, text.c_str(), nullptr, nullptr, &err);
    if (rc != SQLITE_OK) {
        std::string msg = err ? err : sqlite3_errstr(rc);
        sqlite3_free(err);
        throw SqliteError("SQLite error: " + msg + " (in: " + text.substr(0, 200) + ")",
                          sqlite3_extended_errcode(db_));
    }
}

Statement Database::prepare(std::string_view sql) { return Statement(*this, sql); }

std::int64_t Database::scalar_int(std::string_view sql) {
    Statement st(*this, sql);
    return st.step() ? st.column_int(0) : 0;
}

std::int64_t Database::last_insert_rowid() const { return sqlite3_last_insert_rowid(db_); }
int Database::changes() const { return sqlite3_changes(db_); }
bool Database::in_transaction() const { return sqlite3_get_autocommit(db_) == 0; }

Statement::Statement(Database& db, std::string_view sql) : db_(db.handle()) {
    const int rc =
        sqlite3_prepare_v2(db_, sql.data(), static_cast<int>(sql.size()), &stmt_, nullptr);
    if (rc != SQLITE_OK) fail(db_, rc, sql.substr(0, 200));
}

Statement::~Statement() {
    if (stmt_) sqlite3_finalize(stmt_);
}

Statement::Statement(Statement&& other) noexcept
    : stmt_(std::exchange(other.stmt_, nullptr)), db_(other.db_) {}

Statement& Statement::operator=(Statement&& other) noexcept {
    if (this != &other) {
        if (stmt_) sqlite3_finalize(stmt_);
        stmt_ = std::exchange(other.stmt_, nullptr);
        db_ = other.db_;
    }
    return *this;
}

Statement& Statement::bind(int index, double value) {
    const int rc = sqlite3_bind_double(stmt_, index, value);
    if (rc != SQLITE_OK) fail(db_, rc, sqlite3_sql(stmt_));
    return *this;
}

Statement& Statement::bind(int index, std::int64_t value) {
    const int rc = sqlite3_bind_int64(stmt_, index, value);
    if (rc != SQLITE_OK) fail(db_, rc, sqlite3_sql(stmt_));
    return *this;
}

Statement& Statement::bind(int index, std::string_view value) {
    const int rc = sqlite3_bind_text64(stmt_, index, value.data(), value.size(), SQLITE_TRANSIENT,
                                       SQLITE_UTF8);
    if (rc != SQLITE_OK) fail(db_, rc, sqlite3_sql(stmt_));
    return *this;
}

Statement& Statement::bind_null(int index) {
    const int rc = sqlite3_bind_null(stmt_, index);
    if (rc != SQLITE_OK) fail(db_, rc, sqlite3_sql(stmt_));
    return *this;
}

Statement& Statement::bind(int index, const std::optional<double>& value) {
    return value ? bind(index, *value) : bind_null(index);
}

int Statement::parameter_index(const char* name) const {
    return sqlite3_bind_parameter_index(stmt_, name);
}

bool Statement::step() {
    const int rc = sqlite3_step(stmt_);
    if (rc == SQLITE_ROW) return true;
    if (rc == SQLITE_DONE) return false;
    // sqlite3_reset returns the same error; keep the statement reusable.
    std::string sql = sqlite3_sql(stmt_) ? sqlite3_sql(stmt_) : "";
    sqlite3_reset(stmt_);
    fail(db_, rc, std::string_view(sql).substr(0, 200));
}

void Statement::run() {
    while (step()) {
    }
    reset();
}

void Statement::reset() {
    sqlite3_reset(stmt_);
    sqlite3_clear_bindings(stmt_);
}

int Statement::column_count() const { return sqlite3_column_count(stmt_); }

std::string Statement::column_name(int col) const {
    const char* n = sqlite3_column_name(stmt_, col);
    return n ? n : "";
}

bool Statement::is_null(int col) const { return sqlite3_column_type(stmt_, col) == SQLITE_NULL; }
double Statement::column_double(int col) const { return sqlite3_column_double(stmt_, col); }
std::int64_t Statement::column_int(int col) const { return sqlite3_column_int64(stmt_, col); }

std::string Statement::column_text(int col) const {
    const auto* p = sqlite3_column_text(stmt_, col);
    if (!p) return {};
    return std::string(reinterpret_cast<const char*>(p),
                       static_cast<std::size_t>(sqlite3_column_bytes(stmt_, col)));
}

std::optional<double> Statement::column_optional_double(int col) const {
    if (is_null(col)) return std::nullopt;
    return column_double(col);
}

Transaction::Transaction(Database& db, Mode mode) : db_(db) {
    db_.exec(mode == Mode::immediate ? "BEGIN IMMEDIATE" : "BEGIN");
}

Transaction::~Transaction() {
    if (!done_) {
        try {
            db_.exec("ROLLBACK");
        } catch (...) {
            // SQLite may already have rolled back (e.g. after SQLITE_FULL); nothing left to undo.
        }
    }
}

void Transaction::commit() {
    db_.exec("COMMIT");
    done_ = true;
}

std::string utc_now() {
    const std::time_t t = std::chrono::system_clock::to_time_t(std::chrono::system_clock::now());
    std::tm tm{};
    gmtime_r(&t, &tm);
    char buf[32];
    std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", &tm);
    return buf;
}

} // namespace coilsieve::catalog::sqlite
