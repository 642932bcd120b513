#pragma once
// What every subcommand's run_* gets: the global options, the output streams and the catalog
// (opened on first use, so commands that need no catalog never create one).

#include "catalog/store.hpp"

#include <functional>
#include <iosfwd>
#include <optional>
#include <stdexcept>
#include <string>

namespace CLI {
class App;
}

namespace coilsieve::cli {

// Exit codes: 0 success, 1 a runtime or data error (also: no feasible pair, a broken limit), 2 a
// usage error (bad option, argument or design file).
inline constexpr int exit_ok = 0;
inline constexpr int exit_error = 1;
inline constexpr int exit_usage = 2;

// A bad option value found after parsing (e.g. "--inductance 10u"): exits with exit_usage.
class UsageError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

struct GlobalOptions {
    std::string db; // --db PATH; empty = COILSIEVE_DB or the XDG default
};

class Context {
public:
    Context(GlobalOptions global, std::ostream& out, std::ostream& err)
        : global_(std::move(global)), out_(out), err_(err) {}

    std::ostream& out() { return out_; }
    std::ostream& err() { return err_; }
    const GlobalOptions& global() const { return global_; }

    // The catalog's file: --db, else COILSIEVE_DB or the XDG default.
    std::filesystem::path db_path() const {
        return global_.db.empty() ? catalog::Store::default_path()
                                  : std::filesystem::path(global_.db);
    }
    // The catalog, opened (created and filled if new) on first call.
    catalog::Store& store() {
        if (!store_) store_.emplace(db_path());
        return *store_;
    }

private:
    GlobalOptions global_;
    std::ostream& out_;
    std::ostream& err_;
    std::optional<catalog::Store> store_;
};

// One registered subcommand: its CLI11 node and the action to run when it was chosen.
struct Command {
    CLI::App* app = nullptr;
    std::function<int(Context&)> run;
};

} // namespace coilsieve::cli
