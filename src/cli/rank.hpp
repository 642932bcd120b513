#pragma once
// `coilsieve rank DESIGN.json`: rank every inductor-diode pair of the catalog for a design, and
// the pieces `study rerun` and `sweep` share with it (limit and weight overrides, one ranking run).

#include "cli/context.hpp"
#include "design/design.hpp"
#include "studies/rank.hpp"

#include <nlohmann/json.hpp>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace CLI {
class App;
}

namespace coilsieve::cli {

struct RankCliOptions {
    std::string design_file;
    std::optional<int> top; // default 10
    std::vector<std::string> sources;
    bool exhaustive = false;
    bool distinct_inductors = false;
    unsigned threads = 0;
    bool json = false;
    bool csv = false;
    std::string why;
    std::string lock_inductor, lock_diode;
    std::string band, frequency;      // text with units
    std::vector<std::string> limits;  // "height<=3mm", "load_ripple<=10%", ...
    std::vector<std::string> weights; // "size=2"
    std::string pareto;               // "loss,size,ripple" ("" = the design's)
    std::string study;                // name to save under ("" = generated)
    bool no_save = false;
};

// The options a ranking ran with, as stored in a study.
struct EffectiveOptions {
    int top = 10;
    std::vector<std::string> sources;
    bool exhaustive = false;
    bool distinct_inductors = false;
    std::optional<std::string> lock_inductor, lock_diode;
    std::optional<double> band, frequency; // A, Hz
};
nlohmann::json to_json(const EffectiveOptions& o);
EffectiveOptions effective_options_from_json(const nlohmann::json& j);
// `o` given on the command line over `base` (a stored study's options, or the defaults).
EffectiveOptions merge_options(EffectiveOptions base, const RankCliOptions& o,
                               const design::Design& d);

// A fixed hysteresis band (A) must keep the inductor current's valley above zero; `given` names
// the input in the message. Throws UsageError.
void check_fixed_band(double band, const design::Design& d, const std::string& given);

// Known limit names for --limit, with their short forms.
std::vector<std::string> limit_names();
// "NAME<=VALUE" / "NAME>=VALUE" (short or design file names) / "LIMIT=VALUE" (design file names
// only, as in the file); throws UsageError naming the input and the accepted forms.
void apply_limit(design::Design& d, std::string_view spec);
// "NAME=VALUE" for loss, size, ripple, margin, cost; throws UsageError.
void apply_weight(design::Design& d, std::string_view spec);
// "loss,size,ripple": the Pareto set's objectives; throws UsageError naming unknown ones.
void apply_pareto(design::Design& d, std::string_view list);
// Every --limit, --weight and --pareto, then a check for conflicting limits. Throws UsageError.
void apply_overrides(design::Design& d, const RankCliOptions& o);

struct RankSession {
    design::Design design;
    EffectiveOptions options;
    std::vector<parts::Inductor> inductors;
    std::vector<parts::Diode> diodes;
    studies::RankOptions rank_options;
    studies::RankResult result;
    std::string fingerprint;
};

// Load the parts of the chosen sources and rank. Shows a progress bar on a terminal when
// `progress` is set and the run takes longer than a second.
RankSession run_ranking(const design::Design& d, const EffectiveOptions& o, unsigned threads,
                        Context& ctx, bool progress);

// Refuses (UsageError) a --study name that is taken, before any ranking is run.
void check_study_name(const RankCliOptions& o, Context& ctx);

// Print the session in the chosen format (+ --why), save it as a study unless no_save.
// Returns the exit code (1 when no pair is feasible, or when the study could not be saved: the
// ranking is printed all the same and the reason follows on stderr).
int report_and_save(RankSession& s, const RankCliOptions& o, Context& ctx,
                    std::optional<std::int64_t> parent);

int run_rank(const RankCliOptions& o, Context& ctx);

// Declares the ranking options on a (sub)command; used by rank, study rerun and sweep.
void add_rank_options(CLI::App* app, RankCliOptions& o, bool with_study);
std::vector<Command> setup_rank(CLI::App& root);

} // namespace coilsieve::cli
