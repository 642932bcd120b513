#pragma once
// A small RAII layer over the SQLite C API: Database (one connection), Statement (prepared,
// bind by 1-based index, step, typed column reads) and Transaction (rolls back in its destructor
// unless committed). Every error throws SqliteError with the SQLite message and the SQL.

#include <cstdint>
#include <filesystem>
#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>

struct sqlite3;
struct sqlite3_stmt;

namespace coilsieve::catalog::sqlite {

// Current UTC time as "2026-12-01T22:30:00Z", the timestamp stored in every dated row.
std::string utc_now();

class SqliteError : public std::runtime_error {
public:
    SqliteError(const std::string& what, int code) : std::runtime_error(what), code_(code) {}
    int code() const { return code_; } // extended SQLite result code
    bool busy() const;                 // SQLITE_BUSY or SQLITE_LOCKED
    bool constraint() const;           // SQLITE_CONSTRAINT (CHECK, UNIQUE, FK...)

private:
    int code_;
};

class Statement;

class Database {
public:
    // Opens (creating if needed) a database file; ":memory:" for a private in-memory one.
    // A connection is for one thread at a time (SQLite's multi-thread mode); open one per thread.
    explicit Database(const std::filesystem::path& path);
    ~Database();
    Database(Database&& other) noexcept;
    Database& operator=(Database&& other) noexcept;
    Database(const Database&) = delete;
    Database& operator=(const Database&) = delete;

    // Run one or more statements without results (no parameters).
    void exec(std::string_view sql);
    Statement prepare(std::string_view sql);
    // First column of the first row of a parameterless query, as integer (0 if no row).
    std::int64_t scalar_int(std::string_view sql);

    std::int64_t last_insert_rowid() const;
    int changes() const; // rows changed by the last statement
    bool in_transaction() const;
    const std::filesystem::path& path() const { return path_; }
    sqlite3* handle() const { return db_; }

private:
    sqlite3* db_ = nullptr;
    std::filesystem::path path_;
};

class Statement {
public:
    Statement(Database& db, std::string_view sql);
    ~Statement();
    Statement(Statement&& other) noexcept;
    Statement& operator=(Statement&& other) noexcept;
    Statement(const Statement&) = delete;
    Statement& operator=(const Statement&) = delete;

    // Parameters are 1-based, as in SQLite. Returns *this for chaining.
    Statement& bind(int index, double value);
    Statement& bind(int index, std::int64_t value);
    Statement& bind(int index, int value) { return bind(index, std::int64_t{value}); }
    Statement& bind(int index, std::string_view value); // copied by SQLite
    Statement& bind(int index, const char* value) { return bind(index, std::string_view(value)); }
    Statement& bind(int index, const std::string& value) {
        return bind(index, std::string_view(value));
    }
    Statement& bind_null(int index);
    Statement& bind(int index, const std::optional<double>& value);
    int parameter_index(const char* name) const; // ":name" -> index (0 if absent)

    // True while a row is available; false when done. Throws on error.
    bool step();
    // Run to completion (for INSERT/UPDATE/DELETE), then reset so it can be reused.
    void run();
    void reset(); // also clears bindings
    int column_count() const;
    std::string column_name(int col) const;

    // Columns are 0-based, as in SQLite.
    bool is_null(int col) const;
    double column_double(int col) const;
    std::int64_t column_int(int col) const;
    std::string column_text(int col) const;
    std::optional<double> column_optional_double(int col) const;

private:
    sqlite3_stmt* stmt_ = nullptr;
    sqlite3* db_ = nullptr;
};

// BEGIN IMMEDIATE (takes the write lock at once, so two writers never deadlock on an upgrade);
// commit() makes it durable; the destructor rolls back if commit() was not reached.
class Transaction {
public:
    enum class Mode { deferred, immediate };
    explicit Transaction(Database& db, Mode mode = Mode::immediate);
    ~Transaction();
    Transaction(const Transaction&) = delete;
    Transaction& operator=(const Transaction&) = delete;
    void commit();

private:
    Database& db_;
    bool done_ = false;
};

} // namespace coilsieve::catalog::sqlite
