#include "studies/rank.hpp"

#include "optimisation/objectives.hpp"
#include "studies/bounds.hpp"
#include "studies/pareto.hpp"
#include "studies/workers.hpp"
#include "units/quantity.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdint>
#include <exception>
#include <functional>
#include <limits>
#include <numeric>
#include <queue>
#include <thread>
#include <unordered_map>

namespace coilsieve::studies {

namespace {

template <class Part>
std::vector<std::size_t> find_part(const std::vector<Part>& v, const std::string& key) {
    std::vector<std::size_t> out;
    const auto colon = key.find(':');
    for (std::size_t i = 0; i < v.size(); ++i) {
        if (v[i].id == key) out.push_back(i);
        else if (colon != std::string::npos && v[i].source == key.substr(0, colon) &&
                 v[i].id == key.substr(colon + 1))
            out.push_back(i);
    }
    return out;
}

// Pairs in ascending order of a separable bound a[i] + b[j], lazily (a k-way merge over rows).
class CandidateStream {
public:
    CandidateStream(std::vector<std::size_t> rows, std::vector<double> a,
                    std::vector<std::size_t> cols, std::vector<double> b)
        : rows_(std::move(rows)), a_(std::move(a)), cols_(std::move(cols)), b_(std::move(b)) {
        if (cols_.empty()) return;
        for (std::size_t r = 0; r < rows_.size(); ++r) heap_.push({a_[r] + b_[0], r, 0});
    }
    bool empty() const { return heap_.empty(); }
    struct Item {
        double key;
        std::size_t row, col; // positions in the sorted lists
        bool operator>(const Item& o) const {
            if (key != o.key) return key > o.key;
            if (row != o.row) return row > o.row;
            return col > o.col;
        }
    };
    // The next pair; false when none is left.
    bool pop(Item& out) {
        if (heap_.empty()) return false;
        out = heap_.top();
        heap_.pop();
        if (out.col + 1 < cols_.size())
            heap_.push({a_[out.row] + b_[out.col + 1], out.row, out.col + 1});
        return true;
    }
    // The next item of every row not yet exhausted (each stands for the rest of its row).
    std::vector<Item> remaining() const {
        auto copy = heap_;
        std::vector<Item> out;
        out.reserve(copy.size());
        for (; !copy.empty(); copy.pop()) out.push_back(copy.top());
        return out;
    }

private:
    std::vector<std::size_t> rows_;
    std::vector<double> a_;
    std::vector<std::size_t> cols_;
    std::vector<double> b_;
    std::priority_queue<Item, std::vector<Item>, std::greater<Item>> heap_;
};

} // namespace

std::vector<std::size_t> find_inductor(const std::vector<parts::Inductor>& v,
                                       const std::string& key) {
    return find_part(v, key);
}
std::vector<std::size_t> find_diode(const std::vector<parts::Diode>& v, const std::string& key) {
    return find_part(v, key);
}

bool pair_before(const PairResult& a, const PairResult& b,
                 const std::vector<parts::Inductor>& inductors,
                 const std::vector<parts::Diode>& diodes) {
    const auto& la = inductors[a.inductor];
    const auto& lb = inductors[b.inductor];
    const auto& da = diodes[a.diode];
    const auto& db = diodes[b.diode];
    if (la.id != lb.id) return la.id < lb.id;
    if (da.id != db.id) return da.id < db.id;
    if (la.source != lb.source) return la.source < lb.source;
    if (da.source != db.source) return da.source < db.source;
    return std::make_pair(a.inductor, a.diode) < std::make_pair(b.inductor, b.diode);
}

RankResult rank_pairs(const design::Design& d, const std::vector<parts::Inductor>& inductors,
                      const std::vector<parts::Diode>& diodes, const RankOptions& options,
                      const PairEvaluatorFn& evaluate) {
    const auto t0 = std::chrono::steady_clock::now();
    auto elapsed = [&] {
        return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    };
    if (!evaluate) throw std::invalid_argument("rank_pairs: no pair evaluator given");
    if (options.top < 1)
        throw RankError("--top must be at least 1, got " + std::to_string(options.top));
    const unsigned threads =
        options.threads > 0 ? options.threads : std::max(1u, std::thread::hardware_concurrency());
    Workers workers(threads);

    RankResult res;
    // The free setting.
    res.range = optimisation::setting_range(d);
    const bool hyst = d.control.mode == design::ControlMode::hysteretic;
    if (options.band) {
        if (!hyst)
            throw RankError("--band applies to hysteretic control; this design uses PWM "
                            "(use --frequency)");
        res.range = optimisation::fixed_range(optimisation::Variable::band, *options.band);
    }
    if (options.frequency) {
        if (hyst)
            throw RankError("--frequency applies to PWM control; this design is hysteretic "
                            "(use --band)");
        res.range =
            optimisation::fixed_range(optimisation::Variable::frequency, *options.frequency);
    }
    res.scales = optimisation::make_scales(d);
    {
        // Over the whole catalog given, locks aside: a locked rerun scores a pair as before.
        std::optional<double> dearest_l, dearest_d;
        for (const auto& l : inductors)
            if (l.price) dearest_l = std::max(dearest_l.value_or(0.0), *l.price);
        for (const auto& di : diodes)
            if (di.price) dearest_d = std::max(dearest_d.value_or(0.0), *di.price);
        if (dearest_l && dearest_d) res.scales.cost_unpriced = *dearest_l + *dearest_d;
    }
    const auto axes = pareto_objectives(d);
    res.pareto_axes = pareto_axes(axes);

    // Locks.
    auto all_indices = [](std::size_t n) {
        std::vector<std::size_t> v(n);
        for (std::size_t i = 0; i < n; ++i) v[i] = i;
        return v;
    };
    res.inductors_used = all_indices(inductors.size());
    res.diodes_used = all_indices(diodes.size());
    if (options.lock_inductor) {
        res.inductors_used = find_inductor(inductors, *options.lock_inductor);
        if (res.inductors_used.empty())
            throw RankError("--lock-inductor " + *options.lock_inductor +
                            ": no inductor with this id in the catalog (" +
                            std::to_string(inductors.size()) +
                            " inductors searched; use ID or SOURCE:ID as `coilsieve parts` lists "
                            "them)");
    }
    if (options.lock_diode) {
        res.diodes_used = find_diode(diodes, *options.lock_diode);
        if (res.diodes_used.empty())
            throw RankError("--lock-diode " + *options.lock_diode +
                            ": no diode with this id in the catalog (" +
                            std::to_string(diodes.size()) +
                            " diodes searched; use ID or SOURCE:ID as `coilsieve parts` lists "
                            "them)");
    }
    // The queue's entries index the parts in 32 bits.
    constexpr std::size_t part_limit = std::numeric_limits<std::uint32_t>::max();
    if (res.inductors_used.size() > part_limit || res.diodes_used.size() > part_limit)
        throw RankError("a ranking takes at most " + std::to_string(part_limit) +
                        " inductors and as many diodes; narrow the search with --source");
    auto& counts = res.counts;
    counts.inductors = res.inductors_used.size();
    counts.diodes = res.diodes_used.size();
    counts.pairs_total = counts.inductors * counts.diodes;

    // Prepare, screen and bound every part once.
    ScreenContext ctx = make_screen_context(d, res.range);
    struct LPrep {
        std::vector<ScreenReason> reasons;
        InductorBound bound;
        std::optional<parts::InductorModel> model;
    };
    struct DPrep {
        std::vector<ScreenReason> reasons;
        DiodeBound bound;
        parts::Diode prepared; // with the fitted SPICE forward parameters: no refit per call
        std::optional<parts::DiodeModel> model;
    };
    std::vector<LPrep> lprep(res.inductors_used.size());
    std::vector<DPrep> dprep(res.diodes_used.size());
    // The corners of an inductor depend on its tolerance alone, and catalogs use few tolerances:
    // made once for each, for every bound of its inductors.
    // (A NaN, which validated catalogs cannot hold, sorts last so the order stays strict.)
    auto tol_less = [](double a, double b) { return !std::isnan(a) && (std::isnan(b) || a < b); };
    std::vector<double> tolerances;
    for (const auto i : res.inductors_used) tolerances.push_back(inductors[i].tolerance);
    std::sort(tolerances.begin(), tolerances.end(), tol_less);
    tolerances.erase(
        std::unique(tolerances.begin(), tolerances.end(),
                    [&](double a, double b) { return !tol_less(a, b) && !tol_less(b, a); }),
        tolerances.end());
    std::vector<std::vector<EnvelopeCorner>> corner_sets;
    std::vector<std::vector<converter::Corner>> engine_corner_sets; // the evaluations'
    for (const double t : tolerances) {
        corner_sets.push_back(part_corners(ctx, t));
        engine_corner_sets.push_back(converter::make_corners(d, t));
    }
    auto tolerance_index = [&](const parts::Inductor& part) {
        const auto at =
            std::lower_bound(tolerances.begin(), tolerances.end(), part.tolerance, tol_less);
        return static_cast<std::size_t>(at - tolerances.begin());
    };
    auto corners_of = [&](const parts::Inductor& part) -> const std::vector<EnvelopeCorner>& {
        return corner_sets[tolerance_index(part)];
    };
    workers.run(lprep.size(), [&](std::size_t k) {
        const auto& part = inductors[res.inductors_used[k]];
        try {
            const auto& m = lprep[k].model.emplace(parts::make_model(part));
            lprep[k].reasons = screen_inductor(ctx, part, m);
            if (lprep[k].reasons.empty()) {
                lprep[k].bound = inductor_bound(ctx, part, m, res.scales, corners_of(part));
                if (lprep[k].bound.window) lprep[k].reasons.push_back(*lprep[k].bound.window);
            }
        } catch (const std::exception& e) {
            lprep[k].reasons.push_back({"model", "", 0, 0, e.what()});
        }
    });
    // The diodes' floors and screens take the largest winding resistance among the inductors
    // left (EnvelopeCorner::off_share): near dropout it decides how little the diode carries.
    {
        double r_w = 0.0;
        for (const auto& p : lprep)
            if (p.reasons.empty() && p.model)
                r_w = std::max(r_w, winding_resistance_max(d, *p.model));
        set_winding_resistance(ctx, r_w);
        corner_sets.clear();
        for (const double t : tolerances) corner_sets.push_back(part_corners(ctx, t));
    }
    workers.run(dprep.size(), [&](std::size_t k) {
        const auto& part = diodes[res.diodes_used[k]];
        try {
            const auto& m = dprep[k].model.emplace(parts::make_model(part));
            dprep[k].prepared = part;
            dprep[k].prepared.spice = m.fwd;
            dprep[k].reasons = screen_diode(ctx, part, m);
            dprep[k].bound = diode_bound(ctx, part, m, res.scales);
        } catch (const std::exception& e) {
            dprep[k].reasons.push_back({"model", "", 0, 0, e.what()});
        }
    });

    const auto& w = d.weights;
    const auto& sc = res.scales;
    std::vector<std::size_t> lrows, dcols;
    std::vector<double> a, b;
    for (std::size_t k = 0; k < lprep.size(); ++k) {
        if (!lprep[k].reasons.empty()) {
            ++counts.inductors_screened;
            for (const auto& r : lprep[k].reasons) ++counts.screened_by_limit[r.limit];
            res.screened.push_back({true, res.inductors_used[k], lprep[k].reasons});
            continue;
        }
        lrows.push_back(k);
    }
    for (std::size_t k = 0; k < dprep.size(); ++k) {
        if (!dprep[k].reasons.empty()) {
            ++counts.diodes_screened;
            for (const auto& r : dprep[k].reasons) ++counts.screened_by_limit[r.limit];
            res.screened.push_back({false, res.diodes_used[k], dprep[k].reasons});
            continue;
        }
        dcols.push_back(k);
    }
    counts.pairs_considered = lrows.size() * dcols.size();

    // Separable score bound: inductor part + diode part; the pair adds its exact cost and the
    // diode's junction-charge loss at the inductor's lowest frequency (bounds.hpp).
    auto l_term = [&](const InductorBound& ib) { return ib.score; };
    auto d_term = [&](const DiodeBound& db) { return db.score; };
    // Sort rows and columns by their terms (ties by part order: deterministic).
    std::stable_sort(lrows.begin(), lrows.end(), [&](std::size_t x, std::size_t y) {
        return l_term(lprep[x].bound) < l_term(lprep[y].bound);
    });
    std::stable_sort(dcols.begin(), dcols.end(), [&](std::size_t x, std::size_t y) {
        return d_term(dprep[x].bound) < d_term(dprep[y].bound);
    });
    for (auto k : lrows) a.push_back(l_term(lprep[k].bound));
    for (auto k : dcols) b.push_back(d_term(dprep[k].bound));
    double min_d_loss = INFINITY, min_d_size = INFINITY, min_d_price = INFINITY;
    double min_d_esw = INFINITY;
    for (auto k : dcols) {
        min_d_loss = std::min(min_d_loss, dprep[k].bound.loss);
        min_d_size = std::min(min_d_size, dprep[k].bound.size);
        min_d_esw = std::min(min_d_esw, dprep[k].bound.e_switch);
        const auto& p = diodes[res.diodes_used[k]].price;
        min_d_price = std::min(min_d_price, p ? *p : INFINITY);
    }
    CandidateStream stream(lrows, a, dcols, b);

    auto pair_cost = [&](const parts::Inductor& l,
                         const parts::Diode& di) -> std::optional<double> {
        if (l.price && di.price && l.currency == di.currency) return *l.price + *di.price;
        return std::nullopt;
    };
    auto optimistic = [&](std::size_t lk, std::size_t dk,
                          std::optional<double> known_loss = std::nullopt) {
        optimisation::Objectives o =
            pair_optimistic(ctx, lprep[lk].bound, dprep[dk].bound, known_loss);
        o.cost = pair_cost(inductors[res.inductors_used[lk]], diodes[res.diodes_used[dk]]);
        return o;
    };

    // State merged after each batch.
    const std::size_t n_top = static_cast<std::size_t>(options.top);
    std::vector<PairResult> top; // sorted, at most n_top
    struct FrontEntry {
        ParetoPoint v;
        PairResult r;
    };
    std::vector<FrontEntry> front;
    auto before = [&](const PairResult& x, const PairResult& y) {
        if (x.tune.best.score != y.tune.best.score) return x.tune.best.score < y.tune.best.score;
        return pair_before(x, y, inductors, diodes);
    };
    auto threshold = [&] { return top.size() < n_top ? INFINITY : top.back().tune.best.score; };
    auto dominated_by_front = [&](const ParetoPoint& v) {
        for (const auto& f : front)
            if (dominates(f.v.values(), v.values())) return true;
        return false;
    };
    // The loss above which a pair with these other objectives is dominated: the least loss of the
    // front members no worse on every other axis (infinite when none is, or loss is no axis).
    const auto loss_axis = std::find(axes.begin(), axes.end(), design::Objective::loss);
    auto loss_to_dominate = [&](const ParetoPoint& v) -> double {
        if (loss_axis == axes.end()) return INFINITY;
        const auto li = static_cast<std::size_t>(loss_axis - axes.begin());
        double least = INFINITY;
        for (const auto& f : front) {
            bool no_worse = true;
            for (std::size_t axis = 0; axis < v.n && no_worse; ++axis)
                if (axis != li && f.v.v[axis] > v.v[axis]) no_worse = false;
            if (no_worse) least = std::min(least, f.v.v[li]);
        }
        return least;
    };

    const optimisation::Scales scales = sc;
    const converter::Setting base = converter::default_setting(d);
    std::vector<std::size_t> lprep_of(inductors.size(), 0), dprep_of(diodes.size(), 0);
    for (std::size_t k = 0; k < res.inductors_used.size(); ++k) lprep_of[res.inductors_used[k]] = k;
    for (std::size_t k = 0; k < res.diodes_used.size(); ++k) dprep_of[res.diodes_used[k]] = k;
    // The evaluator of a pair whose parts both passed screening (their models are made).
    auto evaluator_of = [&](std::size_t inductor, std::size_t diode) {
        const auto& l = inductors[inductor];
        const DPrep& dp = dprep[dprep_of[diode]];
        return evaluate(d, PreparedParts{l, dp.prepared, *lprep[lprep_of[inductor]].model,
                                         *dp.model, engine_corner_sets[tolerance_index(l)]});
    };
    // A pair that can only matter for the Pareto set is first probed: from its start
    // (PairBound::start_setting), walked into its open window until a point meets the limits
    // (walk_hint). The tuner is handed those same points and ends no worse, so the tuned setting
    // lies where the score bound is below the best probe score, and the loss bound there often
    // shows the pair dominated (bounds.hpp, pair_loss_within).
    // What a pair's bound with its diode gave, kept while the pair waits in the queue again so
    // that its next run starts from there (a few hundred bytes).
    struct BoundKept {
        std::optional<double> start;                     // PairBound::start_setting
        std::optional<std::pair<double, double>> window; // PairBound::open
        PairBound::Learnt learnt;                        // the stretches it bounded
    };
    struct Job {
        PairResult r;
        std::size_t lk = 0, dk = 0;
        bool probe = false;       // probe before tuning (set when taken into a batch)
        bool probed = false;      // its loss bound already has the probe's tightening
        bool probed_here = false; // probed in this job
        bool skipped = false;     // the probe showed it dominated
        bool requeue = false;     // its bound or probe raised its loss bound: back to the queue
        std::optional<BoundKept> kept; // set once its bound with the diode has been asked
        optimisation::Objectives optimistic;
        double cost_term = 0.0;
        int probe_evaluations = 0;
    };
    // The middle of the settings a pair's bound leaves open (where a hint walks when it breaks a
    // limit); `fallback` when it leaves none.
    auto window_middle = [&](const std::optional<std::pair<double, double>>& open,
                             double fallback) {
        if (!open) return fallback;
        const auto [lo, hi] = *open;
        return res.range.log_scale && lo > 0.0 ? std::sqrt(lo * hi) : 0.5 * (lo + hi);
    };
    // The range the tuner searches: only the settings the pair's bound leaves open can meet the
    // limits. Its pre-scan keeps the whole range's spacing there (at least three points). The
    // whole range when the bound leaves nothing open (an exhaustive run still tunes such a pair).
    auto search_range = [&](const std::optional<std::pair<double, double>>& open,
                            optimisation::TuneOptions& to) {
        const auto& all = res.range;
        if (!open || !(all.hi > all.lo)) return all;
        optimisation::SettingRange win = all;
        win.lo = std::max(all.lo, open->first);
        win.hi = std::min(all.hi, open->second);
        if (!(win.hi > win.lo)) return all;
        const double share = all.log_scale ? std::log(win.hi / win.lo) / std::log(all.hi / all.lo)
                                           : (win.hi - win.lo) / (all.hi - all.lo);
        const int k = std::max(2, to.prescan_points);
        to.prescan_points =
            std::clamp(1 + static_cast<int>(std::ceil((k - 1) * share)), std::min(3, k), k);
        return win;
    };
    // The least key left in the Pareto phase's queue while a batch runs (infinite before it).
    double next_key = INFINITY;
    auto run_job = [&](Job& job) {
        PairResult& pr = job.r;
        const auto& l = inductors[pr.inductor];
        const auto& di = diodes[pr.diode];
        const auto scorer = optimisation::make_scorer(l, di, w, scales);
        const auto& db = dprep[job.dk].bound;
        // The pair's bounds with its own diode, stretch by stretch as the tests below need them.
        std::optional<PairBound> pb_made;
        auto pb = [&]() -> PairBound& {
            if (!pb_made) {
                pb_made.emplace(ctx, l, *lprep[job.lk].model, lprep[job.lk].bound,
                                *dprep[job.dk].model, db, scales, corners_of(l));
                if (job.kept) pb_made->take(job.kept->learnt);
            }
            return *pb_made;
        };
        // A pair back from the queue passed these tests before, and its key holds the loss bound
        // they gave.
        if (!options.exhaustive && !job.kept) {
            // Most pairs that can only matter for the Pareto set are shown dominated with the
            // diode's bound on the few stretches the inductor's own bound leaves in doubt.
            const double enough = loss_to_dominate(pareto_point(job.optimistic, axes));
            const double top_score = threshold();
            if (std::isfinite(enough))
                if (const auto f = pb().floors_above(enough, top_score - job.cost_term))
                    if (f->loss > enough && f->score + job.cost_term > top_score) {
                        job.skipped = true;
                        return;
                    }
            // With this diode's forward drop the bound may show that no setting can meet the
            // limits with this pair.
            if (!pb().feasible()) {
                job.skipped = true;
                return;
            }
            // Skipped when it can neither enter the top N nor the Pareto set.
            const double popped_loss = job.optimistic.loss;
            job.optimistic.loss = std::max(popped_loss, pb().loss_bound());
            const bool can_top = pb().score_bound() + job.cost_term <= threshold();
            if (!can_top && dominated_by_front(pareto_point(job.optimistic, axes))) {
                job.skipped = true;
                return;
            }
            // A Pareto-phase pair whose loss bound rose past the next pair's goes back to the queue
            // before any evaluation: by the time it comes up again the front may dominate it.
            if (job.probe && job.optimistic.loss > popped_loss && job.optimistic.loss > next_key)
                job.requeue = true;
        }
        if (!job.kept) job.kept = BoundKept{pb().start_setting(), pb().open(), {}};
        if (job.requeue) {
            job.kept->learnt = pb().learnt();
            return;
        }
        // The tuner also starts there, walking towards the middle of the pair's open window until a
        // point meets the limits, in every mode (same answer).
        std::vector<optimisation::TunedPoint> walked;
        try {
            const optimisation::PairEvaluator ev = evaluator_of(pr.inductor, pr.diode);
            if (const auto x = job.kept->start)
                walked = optimisation::walk_hint(res.range, base, ev, scorer, *x,
                                                 window_middle(job.kept->window, *x));
            if (job.probe && !walked.empty()) {
                job.probed = job.probed_here = true;
                job.probe_evaluations = static_cast<int>(walked.size());
                double cap = INFINITY;
                for (const auto& p : walked)
                    if (p.evaluation.feasible && std::isfinite(p.score))
                        cap = std::min(cap, p.score);
                if (std::isfinite(cap)) {
                    auto o = job.optimistic;
                    // Splitting the stretches pays only where some loss would show the pair
                    // dominated.
                    const double enough = loss_to_dominate(pareto_point(o, axes));
                    o.loss = std::max(o.loss, pb().loss_within(cap - job.cost_term, enough,
                                                               std::isfinite(enough)));
                    if (dominated_by_front(pareto_point(o, axes))) {
                        job.skipped = true;
                        return;
                    }
                    if (o.loss > job.optimistic.loss) {
                        job.optimistic = o;
                        job.requeue = true;
                        job.kept->learnt = pb().learnt();
                        return;
                    }
                }
                job.probe_evaluations = 0; // handed to the tuner, which counts them
            }
            optimisation::TuneOptions to = options.tune;
            const optimisation::SettingRange search = search_range(job.kept->window, to);
            pr.tune = optimisation::tune(search, base, ev, scorer, to, {}, walked);
        } catch (const std::exception& e) {
            pr.tune = optimisation::TuneResult{};
            pr.tune.feasible = false;
            pr.tune.has_binding = true;
            pr.tune.binding.limit = "evaluation_error";
            pr.tune.binding.message = e.what();
            pr.tune.status = optimisation::SolverStatus::failure;
        }
    };

    std::vector<Job> batch;
    batch.reserve(options.batch);
    std::size_t done = 0;
    auto last_progress = elapsed();
    // Pareto-only pairs whose probe raised their loss bound go back to the queue (phase 2).
    std::vector<Job> requeue;
    std::vector<std::size_t> order; // the batch's jobs in the order they start
    // Work for the calling thread while the batch runs (nothing in phase 1).
    std::function<void()> meanwhile = [] {};
    auto run_batch = [&] {
        // The front and the threshold are only read while the batch runs; they change in the
        // merge below, in batch order, so the outcome does not depend on the number of threads.
        // Tuning takes ten to a hundred times longer than a probe: the jobs sure to tune start
        // first, so the batch ends on short jobs and no thread waits long for the other.
        order.resize(batch.size());
        std::iota(order.begin(), order.end(), std::size_t{0});
        std::stable_partition(order.begin(), order.end(),
                              [&](std::size_t k) { return !batch[k].probe; });
        const auto job_at = [&](std::size_t k) { run_job(batch[order[k]]); };
        workers.run(order.size(), job_at, meanwhile);
        for (auto& job : batch) {
            counts.evaluations += static_cast<std::size_t>(job.probe_evaluations);
            if (job.probed_here) ++counts.pairs_probed;
            if (job.skipped) {
                ++counts.pairs_pruned;
                ++done;
                continue;
            }
            if (job.requeue) {
                job.requeue = false;
                job.probe = false;
                requeue.push_back(std::move(job));
                continue;
            }
            ++done;
            auto& pr = job.r;
            ++counts.pairs_tuned;
            counts.evaluations += static_cast<std::size_t>(pr.tune.evaluations);
            if (pr.tune.binding.limit == "evaluation_error") ++counts.errors;
            if (!pr.tune.feasible) {
                ++counts.pairs_infeasible;
                ++counts.infeasible_by_limit[pr.tune.has_binding ? pr.tune.binding.limit
                                                                 : std::string("unknown")];
                if (options.keep_all) res.all.push_back(pr);
                continue;
            }
            ++counts.pairs_feasible;
            if (options.keep_all) res.all.push_back(pr);
            // Top N. With distinct inductors a pair replaces its inductor's entry only when it is
            // better, so the N-th score still bounds what can enter.
            auto same = top.end();
            if (options.distinct_inductors)
                same = std::find_if(top.begin(), top.end(),
                                    [&](const PairResult& t) { return t.inductor == pr.inductor; });
            if (same != top.end()) {
                if (before(pr, *same)) {
                    top.erase(same);
                    top.insert(std::upper_bound(top.begin(), top.end(), pr, before), pr);
                }
            } else if (top.size() < n_top || before(pr, top.back())) {
                top.insert(std::upper_bound(top.begin(), top.end(), pr, before), pr);
                if (top.size() > n_top) top.pop_back();
            }
            // Pareto front.
            auto v = pareto_point(pr.tune.best.objectives, axes);
            if (!dominated_by_front(v)) {
                std::erase_if(front, [&](const FrontEntry& f) {
                    return dominates(v.values(), f.v.values());
                });
                front.push_back({std::move(v), pr});
            }
        }
        batch.clear();
        if (options.progress && elapsed() - last_progress > 0.1) {
            last_progress = elapsed();
            options.progress({done, counts.pairs_considered, last_progress});
        }
    };
    // `o`: the pair's optimistic vector when the caller has it.
    auto make_job = [&](std::size_t row, std::size_t col,
                        const std::optional<optimisation::Objectives>& o = std::nullopt) {
        Job job;
        job.lk = lrows[row];
        job.dk = dcols[col];
        job.r.inductor = res.inductors_used[job.lk];
        job.r.diode = res.diodes_used[job.dk];
        job.optimistic = o ? *o : optimistic(job.lk, job.dk);
        const auto& opt = job.optimistic;
        job.cost_term = optimisation::cost_term(opt.cost, w, sc);
        job.r.bound =
            pair_score_bound(ctx, lprep[job.lk].bound, dprep[job.dk].bound, sc) + job.cost_term;
        return job;
    };

    // Phase 1, the top N: pairs in ascending order of their separable score bound. Once that
    // bound is above the N-th best score, no later pair can enter the top N (the bound only
    // grows along the stream, the N-th score only falls). `deferred` keeps the pairs out of the
    // top N that may still be on the Pareto set: (row, column) in the sorted lists.
    std::vector<std::pair<std::size_t, std::size_t>> deferred;
    CandidateStream::Item it{};
    bool phase1_over = false;
    while (!phase1_over && stream.pop(it)) {
        if (!options.exhaustive && it.key > threshold()) {
            if (!batch.empty()) run_batch();
            if (it.key > threshold()) {
                deferred.emplace_back(it.row, it.col);
                phase1_over = true;
                break;
            }
        }
        Job job = make_job(it.row, it.col);
        if (!options.exhaustive && job.r.bound > threshold()) {
            deferred.emplace_back(it.row, it.col);
            continue;
        }
        batch.push_back(std::move(job));
        if (batch.size() >= options.batch) run_batch();
    }
    if (!batch.empty()) run_batch();

    // Phase 2, the Pareto set: what is left can only matter there. Taken in ascending order of
    // the optimistic loss, a pair is reached only after every pair that could dominate it
    // (its loss is no lower than its bound), so the front that tests it is as full as it can be.
    // Rows not yet expanded stand for all their remaining pairs with the row's own bound.
    // Entries hold no job: a pair's job is made when it is taken into a batch, so the queue stays
    // small on large catalogs.
    // 24 bytes: the queue holds up to a few million on large catalogs, and its heap's cache
    // misses are most of the phase's serial time.
    struct Entry {
        double key = 0.0;
        std::uint32_t row_index = 0, col = 0; // in the sorted lists
        bool row = false;     // a row remainder: inductor `row_index`, columns from `col`
        bool probed = false;  // `key` is the loss bound its probe gave (else its own bound's)
        bool carried = false; // what its bound gave is in `carried`
        bool operator>(const Entry& o) const {
            if (key != o.key) return key > o.key;
            if (row_index != o.row_index) return row_index > o.row_index;
            if (col != o.col) return col > o.col;
            return row > o.row;
        }
    };
    std::priority_queue<Entry, std::vector<Entry>, std::greater<Entry>> queue;
    auto entry = [](double key, bool row, std::size_t r, std::size_t c, bool probed, bool carried) {
        return Entry{
            key,    static_cast<std::uint32_t>(r), static_cast<std::uint32_t>(c), row, probed,
            carried};
    };
    std::unordered_map<std::size_t, BoundKept> carried;
    auto pair_key = [&](std::size_t lk, std::size_t dk) { return lk * dprep.size() + dk; };
    // A pair the front already dominates is pruned here rather than when popped: the front only
    // grows stronger (what it loses, a newer member dominates), so it would be pruned then too.
    auto push_pair = [&](std::size_t row, std::size_t col) {
        const auto o = optimistic(lrows[row], dcols[col]);
        if (dominated_by_front(pareto_point(o, axes))) {
            ++counts.pairs_pruned;
            ++done;
            return;
        }
        queue.push(entry(o.loss, false, row, col, false, false));
    };
    std::vector<std::size_t> row_of(lprep.size(), 0);
    for (std::size_t r = 0; r < lrows.size(); ++r) row_of[lrows[r]] = r;
    std::vector<std::size_t> col_of(dprep.size(), 0);
    for (std::size_t c = 0; c < dcols.size(); ++c) col_of[dcols[c]] = c;
    auto row_vector = [&](std::size_t row) {
        // The most optimistic vector of any pair of the row: cost from the cheapest priced
        // partner, or none (counted as most expensive) when the inductor or every diode lacks
        // a price - exact for every pair of the row then.
        const std::size_t lk = lrows[row];
        const auto& lb = lprep[lk].bound;
        optimisation::Objectives o;
        o.loss = lb.loss + min_d_loss + ctx.loss_floor + min_d_esw * lb.f_min;
        o.size = lb.size + min_d_size;
        o.ripple = lb.ripple;
        o.margin = lb.margin;
        const auto& lp = inductors[res.inductors_used[lk]].price;
        if (lp && std::isfinite(min_d_price)) o.cost = *lp + min_d_price;
        return o;
    };
    for (const auto& [row, col] : deferred) push_pair(row, col);
    deferred.clear();
    if (phase1_over)
        for (const auto& rest : stream.remaining())
            queue.push(entry(row_vector(rest.row).loss, true, rest.row, rest.col, false, false));
    // While a batch runs, the calling thread takes the next entries out of the queue and prunes
    // those its front already dominates (the front only grows stronger, so the next batch would
    // prune them too); the others wait in `ahead`. The next batch takes from `ahead` and the
    // queue in the same order as from one queue, so it is made of the same pairs and every count
    // comes out the same: the queue's cache misses, most of this phase's serial time, move into
    // the batch's time. A row waits in the queue: whether it is pruned as a whole depends on the
    // front the next batch sees.
    struct Ahead {
        Entry e;
        bool pruned = false; // counted already; kept for its place in the order (next_key)
        bool operator>(const Ahead& o) const { return e > o.e; }
    };
    std::priority_queue<Ahead, std::vector<Ahead>, std::greater<Ahead>> ahead;
    std::size_t ahead_live = 0; // not pruned
    auto ahead_first = [&] {
        return !ahead.empty() && (queue.empty() || queue.top() > ahead.top().e);
    };
    auto prune_popped = [&](std::size_t lk, std::size_t dk, bool was_carried) {
        if (was_carried) carried.erase(pair_key(lk, dk));
        ++counts.pairs_pruned;
        ++done;
    };
    if (options.look_ahead)
        meanwhile = [&] {
            while (ahead_live < options.batch && !queue.empty() && !queue.top().row) {
                const Entry e = queue.top();
                queue.pop();
                const std::size_t lk = lrows[e.row_index], dk = dcols[e.col];
                const bool pruned =
                    dominated_by_front(pareto_point(optimistic(lk, dk, e.key), axes));
                if (pruned) prune_popped(lk, dk, e.carried);
                else ++ahead_live;
                ahead.push({e, pruned});
            }
        };
    while (!queue.empty() || !ahead.empty() || !batch.empty()) {
        while ((!queue.empty() || !ahead.empty()) && batch.size() < options.batch) {
            Entry e;
            if (ahead_first()) {
                const Ahead first = ahead.top();
                ahead.pop();
                if (first.pruned) continue;
                --ahead_live;
                e = first.e;
            } else {
                e = queue.top();
                queue.pop();
            }
            if (e.row) {
                if (dominated_by_front(pareto_point(row_vector(e.row_index), axes))) {
                    const std::size_t n = dcols.size() - e.col;
                    counts.pairs_pruned += n;
                    done += n;
                    continue;
                }
                for (std::size_t c = e.col; c < dcols.size(); ++c) push_pair(e.row_index, c);
                continue;
            }
            // Most pairs are dominated when they come up: tested before a job is made.
            const std::size_t lk = lrows[e.row_index], dk = dcols[e.col];
            // Its key is its optimistic loss when pushed, or a raised bound: no lower.
            const auto o = optimistic(lk, dk, e.key);
            const auto kept = e.carried ? carried.find(pair_key(lk, dk)) : carried.end();
            if (dominated_by_front(pareto_point(o, axes))) {
                prune_popped(lk, dk, kept != carried.end());
                continue;
            }
            Job job = make_job(e.row_index, e.col, o);
            job.probed = e.probed;
            if (kept != carried.end()) {
                job.kept = std::move(kept->second);
                carried.erase(kept);
            }
            job.probe = !job.probed && !front.empty();
            batch.push_back(std::move(job));
        }
        if (batch.empty()) break;
        next_key = std::min(queue.empty() ? INFINITY : queue.top().key,
                            ahead.empty() ? INFINITY : ahead.top().e.key);
        run_batch();
        for (auto& job : requeue) {
            queue.push(entry(job.optimistic.loss, false, row_of[job.lk], col_of[job.dk], job.probed,
                             job.kept.has_value()));
            if (job.kept) carried[pair_key(job.lk, job.dk)] = std::move(*job.kept);
        }
        requeue.clear();
    }

    // Results.
    for (std::size_t k = 0; k < top.size(); ++k) top[k].rank = static_cast<int>(k + 1);
    // Listed pairs get a printed setting that meets the limits as typed (a few evaluations each).
    auto print_setting = [&](PairResult& p) {
        const auto& tuned = p.tune.best.setting;
        const double value =
            res.range.variable == optimisation::Variable::band ? tuned.band : tuned.frequency;
        p.printed = {value, 0};
        if (const auto& m = dprep[dprep_of[p.diode]].model; m && ctx.target > 0.0)
            p.diode_vf = m->vf(ctx.target, units::celsius(25.0));
        if (!p.tune.feasible) return;
        const auto ev = evaluator_of(p.inductor, p.diode);
        p.printed = optimisation::printed_value(res.range, tuned, ev, value);
    };
    workers.run(top.size(), [&](std::size_t k) { print_setting(top[k]); });
    workers.run(front.size(), [&](std::size_t k) { print_setting(front[k].r); });
    for (auto& f : front) {
        f.r.pareto = true;
        res.pareto.push_back(f.r);
    }
    std::sort(res.pareto.begin(), res.pareto.end(), before);
    for (auto& t : top)
        for (const auto& p : res.pareto)
            if (p.inductor == t.inductor && p.diode == t.diode) t.pareto = true;
    for (auto& p : res.pareto)
        for (const auto& t : top)
            if (p.inductor == t.inductor && p.diode == t.diode) p.rank = t.rank;
    res.top = std::move(top);
    counts.pareto = res.pareto.size();
    res.elapsed_s = elapsed();
    if (options.progress) options.progress({done, counts.pairs_considered, res.elapsed_s});
    return res;
}

} // namespace coilsieve::studies
