#pragma once
// Ranking every inductor-diode pair of a catalog for a design: screening, per-pair tuning,
// exact pruning by lower bounds, a thread pool, the top N by weighted score and the Pareto set.
//
// Exactness of the pruning. Phase 1 (top N) takes pairs in ascending order of a score lower
// bound and stops once the bound is above the N-th best score. Phase 2 (Pareto set) takes what is
// left in ascending order of an optimistic loss; a pair is skipped only when its optimistic
// objective vector is dominated by a pair already tuned. Its true score and objectives are no
// better than those bounds, so it could enter neither the top N nor the Pareto set. The bounds
// are in bounds.hpp; a probe (optimisation::walk_hint, the tuner's own first points) tightens them.
// Pairs are tuned in batches of a fixed size; a batch is tuned in parallel and merged in order, so
// the pairs tuned, and the answer, do not depend on the number of threads.

#include "converter/evaluate.hpp"
#include "design/design.hpp"
#include "optimisation/tune.hpp"
#include "parts/diode.hpp"
#include "parts/inductor.hpp"
#include "studies/screen.hpp"

#include <cstddef>
#include <functional>
#include <map>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

namespace coilsieve::studies {

// A request the ranking cannot serve (unknown lock id, ...); what() says what would be right.
class RankError : public std::invalid_argument {
public:
    using std::invalid_argument::invalid_argument;
};

// One pair as the ranking prepared its parts: each part's model made once, the engine's corners
// once for each inductance tolerance. All of it outlives the evaluator made from it.
struct PreparedParts {
    const parts::Inductor& inductor;
    const parts::Diode& diode; // with its fitted forward parameters
    const parts::InductorModel& inductor_model;
    const parts::DiodeModel& diode_model;
    const std::vector<converter::Corner>& corners; // converter::make_corners
};

// Makes the evaluator of one pair over its settings.
using PairEvaluatorFn =
    std::function<optimisation::PairEvaluator(const design::Design&, const PreparedParts&)>;

// converter::evaluate_pair on the prepared models and corners.
PairEvaluatorFn default_evaluator();

struct Progress {
    std::size_t done = 0;  // pairs tuned or skipped
    std::size_t total = 0; // pairs that passed screening
    double elapsed_s = 0.0;
};

struct RankOptions {
    int top = 10;
    bool exhaustive = false;                  // tune every pair that passed screening
    bool distinct_inductors = false;          // the top N holds each inductor once (its best pair)
    unsigned threads = 0;                     // 0: all hardware threads
    std::optional<std::string> lock_inductor; // ID or SOURCE:ID
    std::optional<std::string> lock_diode;
    std::optional<double> band;      // A: fixed band instead of tuning (hysteretic)
    std::optional<double> frequency; // Hz: fixed frequency instead of tuning (PWM)
    optimisation::TuneOptions tune;
    std::size_t batch = 64; // pairs per parallel batch (fixed: determinism)
    bool keep_all = false;  // keep every tuned pair in RankResult::all
    // The calling thread takes the next batch's pairs out of the queue while a batch runs; off,
    // it takes them between batches. The same pairs are tuned either way, with the same counts.
    bool look_ahead = true;
    std::function<void(const Progress&)> progress;
};

struct PairResult {
    std::size_t inductor = 0; // index into the inductors given to rank_pairs
    std::size_t diode = 0;
    optimisation::TuneResult tune;
    double bound = 0.0; // the score's lower bound used for pruning
    bool pareto = false;
    int rank = 0; // 1-based position by score among feasible pairs listed
    // The tuned band or frequency as the table prints it (listed pairs only; digits 0: in full).
    optimisation::PrintedValue printed;
    // The diode's forward drop at the design's target current and 25 °C, from its model (listed
    // pairs only; 0 when not computed).
    double diode_vf = 0.0;
};

struct ScreenedPart {
    bool inductor = true;
    std::size_t index = 0;
    std::vector<ScreenReason> reasons;
};

struct RankCounts {
    std::size_t inductors = 0, diodes = 0;
    std::size_t inductors_screened = 0, diodes_screened = 0;
    std::map<std::string, std::size_t> screened_by_limit; // parts, counted by every reason
    std::size_t pairs_total = 0;                          // inductors x diodes (after locks)
    std::size_t pairs_considered = 0;                     // both parts passed screening
    std::size_t pairs_pruned = 0;                         // skipped by bounds (some after a probe)
    std::size_t pairs_probed = 0; // probed before tuning: up to three evaluations (walk_hint)
    std::size_t pairs_tuned = 0;
    std::size_t pairs_feasible = 0;
    std::size_t pairs_infeasible = 0;
    std::map<std::string, std::size_t> infeasible_by_limit; // by the most broken limit
    std::size_t pareto = 0;
    std::size_t evaluations = 0;
    std::size_t errors = 0; // pairs whose evaluation threw (reported as infeasible)
};

struct RankResult {
    std::vector<PairResult> top;    // best first, ranks 1..N
    std::vector<PairResult> pareto; // the whole Pareto set, by score
    std::vector<PairResult> all;    // every tuned pair, only with keep_all
    std::vector<ScreenedPart> screened;
    std::vector<std::size_t> inductors_used; // indices after locks
    std::vector<std::size_t> diodes_used;
    std::vector<std::string> pareto_axes;
    optimisation::SettingRange range;
    optimisation::Scales scales;
    RankCounts counts;
    double elapsed_s = 0.0;
};

// Parts matching an id ("ID" or "SOURCE:ID"); empty when none.
std::vector<std::size_t> find_inductor(const std::vector<parts::Inductor>& v,
                                       const std::string& key);
std::vector<std::size_t> find_diode(const std::vector<parts::Diode>& v, const std::string& key);

RankResult rank_pairs(const design::Design& d, const std::vector<parts::Inductor>& inductors,
                      const std::vector<parts::Diode>& diodes, const RankOptions& options,
                      const PairEvaluatorFn& evaluate);

// Tie-break order of pairs with equal scores: inductor id, diode id (then sources).
bool pair_before(const PairResult& a, const PairResult& b,
                 const std::vector<parts::Inductor>& inductors,
                 const std::vector<parts::Diode>& diodes);

} // namespace coilsieve::studies
