// coilsieve: choose the inductor and freewheeling diode of a buck constant-current stage.
//
// This file only wires subcommands; the work is in src/cli/<name>_*.cpp.
// How to add a subcommand (pattern shared by every command):
//   1. In src/cli/<name>_command.hpp/.cpp (or <name>_*.cpp) write an options struct,
//      `int run_<name>(const <Name>Options&, Context&)` doing the work (testable without the
//      parser), and `std::vector<Command> setup_<name>(CLI::App& root)` that adds the subcommand
//      to `root`, declares its options into a std::make_shared<Options>, gives it a footer with an
//      example, and returns {app, [opts](Context& c) { return run_<name>(*opts, c); }}.
//   2. Add the .cpp to src/cli/CMakeLists.txt and one line `add(setup_<name>(app));` below.
// Errors: throw; main maps UsageError and CLI11 parse errors to exit 2, everything else to 1,
// printing `error: <message>` on stderr. Global options (--db) live in GlobalOptions (context.hpp)
// and are accepted before or after the subcommand.
#include "cli/check.hpp"
#include "cli/context.hpp"
#include "cli/parts_commands.hpp"
#include "cli/rank.hpp"
#include "cli/study.hpp"
#include "cli/sweep.hpp"

#include <CLI/CLI.hpp>
#include <exception>
#include <iostream>

int main(int argc, char** argv) {
    using namespace coilsieve::cli;

    CLI::App app{"coilsieve: pick the inductor and the freewheeling diode for a buck\n"
                 "constant-current stage from a local parts catalog.",
                 "coilsieve"};
    app.fallthrough(); // subcommands pass unknown options (e.g. --db after them) up to here
    app.require_subcommand(1);
    GlobalOptions global;
    app.add_option("--db", global.db,
                   "catalog file (default: $COILSIEVE_DB, else "
                   "$XDG_DATA_HOME/coilsieve/catalog.db or ~/.local/share/coilsieve/catalog.db)");
    app.footer("Example:\n  coilsieve parts list inductors --inductance 10u..22u --isat-min 2A\n"
               "Exit codes: 0 success; 1 no feasible pair (rank), a broken limit (check), or a\n"
               "runtime or data error (catalog, part list, a file that cannot be written); 2 a\n"
               "usage error (a bad option, argument or design file).");

    std::vector<Command> commands;
    auto add = [&](std::vector<Command> more) {
        for (auto& c : more) commands.push_back(std::move(c));
    };
    // ---- register subcommands here, one line each ----
    add(setup_parts(app));
    add(setup_rank(app));
    add(setup_study(app));
    add(setup_sweep(app));
    add(setup_check(app));
    // ---------------------------------------------------

    try {
        app.parse(argc, argv);
    } catch (const CLI::CallForHelp& e) {
        return app.exit(e);
    } catch (const CLI::CallForAllHelp& e) {
        return app.exit(e);
    } catch (const CLI::CallForVersion& e) {
        return app.exit(e);
    } catch (const CLI::ParseError& e) {
        app.exit(e);
        return exit_usage;
    }

    Context ctx(global, std::cout, std::cerr);
    try {
        for (const Command& c : commands) {
            if (c.app->parsed()) return c.run(ctx);
        }
        std::cerr << "error: no command given; see coilsieve --help\n";
        return exit_usage;
    } catch (const UsageError& e) {
        std::cerr << "error: " << e.what() << "\n";
        return exit_usage;
    } catch (const coilsieve::catalog::sqlite::SqliteError& e) {
        std::cerr << "error: " << coilsieve::catalog::explain_catalog_failure(e, ctx.db_path())
                  << "\n";
        return exit_error;
    } catch (const std::exception& e) {
        std::cerr << "error: " << e.what() << "\n";
        return exit_error;
    } catch (...) {
        std::cerr << "error: unexpected failure\n";
        return exit_error;
    }
}
