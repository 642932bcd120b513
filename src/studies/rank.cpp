#include "studies/rank.hpp"

#include "optimisation/objectives.hpp"
#include "studies/pareto.hpp"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <exception>
#include <limits>
#include <queue>
#include <thread>

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

// Runs fn(i) for i in [0, n) on up to `threads` threads; the first exception is rethrown.
template <class Fn> void parallel_for(std::size_t n, unsigned threads, Fn&& fn) {
    if (n == 0) return;
    const unsigned t = static_cast<unsigned>(std::min<std::size_t>(std::max(1u, threads), n));
    if (t == 1) {
        for (std::size_t i = 0; i < n; ++i) fn(i);
        return;
    }
    std::atomic<std::size_t> next{0};
    std::vector<std::exception_ptr> errors(t);
    std::vector<std::thread> pool;
    pool.reserve(t);
    for (unsigned k = 0; k < t; ++k)
        pool.emplace_back([&, k] {
            try {
                for (std::size_t i = next++; i < n; i = next++) fn(i);
            } catch (...) {
                errors[k] = std::current_exception();
                next = n;
            }
        });
    for (auto& th : pool) th.join();
    for (auto& e : errors)
        if (e) std::rethrow_exception(e);
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
    // Next pair of a live row (the caller checks empty() first; returns false when none left).
    bool pop(Item& out) {
        while (!heap_.empty()) {
            Item it = heap_.top();
            heap_.pop();
            if (dead_.size() > it.row && dead_[it.row]) continue;
            if (it.col + 1 < cols_.size())
                heap_.push({a_[it.row] + b_[it.col + 1], it.row, it.col + 1});
            out = it;
            return true;
        }
        return false;
    }
    // Drops the rest of the row of an item just popped; returns how many pairs that skips.
    std::size_t drop_rest_of_row(const Item& it) {
        if (dead_.empty()) dead_.assign(rows_.size(), false);
        dead_[it.row] = true;
        return cols_.size() - (it.col + 1);
    }
    std::size_t row_part(std::size_t r) const { return rows_[r]; }
    std::size_t col_part(std::size_t c) const { return cols_[c]; }

private:
    std::vector<std::size_t> rows_;
    std::vector<double> a_;
    std::vector<std::size_t> cols_;
    std::vector<double> b_;
    std::priority_queue<Item, std::vector<Item>, std::greater<Item>> heap_;
    std::vector<bool> dead_;
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
    if (options.top < 1) throw RankError("--top must be at least 1, got " + std::to_string(options.top));
    const unsigned threads =
        options.threads > 0 ? options.threads : std::max(1u, std::thread::hardware_concurrency());

    RankResult res;
    // The free setting.
    res.range = optimisation::setting_range(d);
    const bool hyst = d.control.mode == design::ControlMode::hysteretic;
    if (options.band) {
        if (!hyst) throw RankError("--band applies to hysteretic control; this design uses PWM "
                                   "(use --frequency)");
        res.range = optimisation::fixed_range(optimisation::Variable::band, *options.band);
    }
    if (options.frequency) {
        if (hyst) throw RankError("--frequency applies to PWM control; this design is hysteretic "
                                  "(use --band)");
        res.range = optimisation::fixed_range(optimisation::Variable::frequency, *options.frequency);
    }
    res.scales = optimisation::make_scales(d);
    res.pareto_axes = pareto_axes(d.weights);

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
    auto& counts = res.counts;
    counts.inductors = res.inductors_used.size();
    counts.diodes = res.diodes_used.size();
    counts.pairs_total = counts.inductors * counts.diodes;

    // Prepare, screen and bound every part once.
    const ScreenContext ctx = make_screen_context(d, res.range);
    struct LPrep {
        std::vector<ScreenReason> reasons;
        InductorBound bound;
    };
    struct DPrep {
        std::vector<ScreenReason> reasons;
        DiodeBound bound;
        parts::Diode prepared; // with the fitted SPICE forward parameters: no refit per call
    };
    std::vector<LPrep> lprep(res.inductors_used.size());
    std::vector<DPrep> dprep(res.diodes_used.size());
    parallel_for(lprep.size(), threads, [&](std::size_t k) {
        const auto& part = inductors[res.inductors_used[k]];
        try {
            const auto m = parts::make_model(part);
            lprep[k].reasons = screen_inductor(ctx, part, m);
            lprep[k].bound = inductor_bound(ctx, part, m);
        } catch (const std::exception& e) {
            lprep[k].reasons.push_back({"model", "", 0, 0, e.what()});
        }
    });
    parallel_for(dprep.size(), threads, [&](std::size_t k) {
        const auto& part = diodes[res.diodes_used[k]];
        try {
            const auto m = parts::make_model(part);
            dprep[k].prepared = part;
            dprep[k].prepared.spice = m.fwd;
            dprep[k].reasons = screen_diode(ctx, part);
            dprep[k].bound = diode_bound(ctx, part, m);
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

    // Separable score bound: inductor part + diode part (cost is added per pair).
    auto l_term = [&](const InductorBound& ib) {
        return w.loss * (ib.loss + ctx.loss_floor) / sc.power + w.size * ib.size / sc.volume +
               w.ripple * ib.ripple / sc.ripple + w.margin * (1.0 - ib.margin);
    };
    auto d_term = [&](const DiodeBound& db) {
        return w.loss * db.loss / sc.power + w.size * db.size / sc.volume;
    };
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
    for (auto k : dcols) {
        min_d_loss = std::min(min_d_loss, dprep[k].bound.loss);
        min_d_size = std::min(min_d_size, dprep[k].bound.size);
        const auto& p = diodes[res.diodes_used[k]].price;
        min_d_price = std::min(min_d_price, p ? *p : INFINITY);
    }
    CandidateStream stream(lrows, a, dcols, b);

    auto pair_cost = [&](const parts::Inductor& l, const parts::Diode& di) -> std::optional<double> {
        if (l.price && di.price && l.currency == di.currency) return *l.price + *di.price;
        return std::nullopt;
    };
    auto optimistic = [&](std::size_t lk, std::size_t dk) {
        const auto& lb = lprep[lk].bound;
        const auto& db = dprep[dk].bound;
        optimisation::Objectives o;
        o.loss = lb.loss + db.loss + ctx.loss_floor;
        o.size = lb.size + db.size;
        o.margin = lb.margin;
        o.ripple = lb.ripple;
        o.cost = pair_cost(inductors[res.inductors_used[lk]], diodes[res.diodes_used[dk]]);
        return o;
    };

    // State merged after each batch.
    const std::size_t n_top = static_cast<std::size_t>(options.top);
    std::vector<PairResult> top; // sorted, at most n_top
    struct FrontEntry {
        std::vector<double> v;
        PairResult r;
    };
    std::vector<FrontEntry> front;
    auto before = [&](const PairResult& x, const PairResult& y) {
        if (x.tune.best.score != y.tune.best.score) return x.tune.best.score < y.tune.best.score;
        return pair_before(x, y, inductors, diodes);
    };
    auto threshold = [&] {
        return top.size() < n_top ? INFINITY : top.back().tune.best.score;
    };
    auto dominated_by_front = [&](const std::vector<double>& v) {
        for (const auto& f : front)
            if (dominates(f.v, v)) return true;
        return false;
    };

    const optimisation::Scales scales = sc;
    const converter::Setting base = converter::default_setting(d);
    std::vector<std::size_t> dprep_of(diodes.size(), 0);
    for (std::size_t k = 0; k < res.diodes_used.size(); ++k) dprep_of[res.diodes_used[k]] = k;
    auto tune_one = [&](PairResult& pr) {
        const auto& l = inductors[pr.inductor];
        const auto& di = diodes[pr.diode];
        const auto& prepared = dprep[dprep_of[pr.diode]].prepared;
        optimisation::PairEvaluator ev = [&](const converter::Setting& s) {
            return evaluate(d, l, prepared, s);
        };
        try {
            pr.tune = optimisation::tune(res.range, base, ev,
                                         optimisation::make_scorer(l, di, w, scales), options.tune);
        } catch (const std::exception& e) {
            pr.tune = optimisation::TuneResult{};
            pr.tune.feasible = false;
            pr.tune.has_binding = true;
            pr.tune.binding.limit = "evaluation_error";
            pr.tune.binding.message = e.what();
            pr.tune.status = optimisation::SolverStatus::failure;
        }
    };

    std::vector<PairResult> batch;
    batch.reserve(options.batch);
    std::size_t done = 0;
    auto last_progress = elapsed();
    auto run_batch = [&] {
        parallel_for(batch.size(), threads, [&](std::size_t k) { tune_one(batch[k]); });
        for (auto& pr : batch) {
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
            // Top N.
            if (top.size() < n_top || before(pr, top.back())) {
                auto pos = std::upper_bound(top.begin(), top.end(), pr, before);
                top.insert(pos, pr);
                if (top.size() > n_top) top.pop_back();
            }
            // Pareto front.
            auto v = pareto_vector(pr.tune.best.objectives, w);
            if (!dominated_by_front(v)) {
                std::erase_if(front, [&](const FrontEntry& f) { return dominates(v, f.v); });
                front.push_back({std::move(v), pr});
            }
        }
        done += batch.size();
        batch.clear();
        if (options.progress && elapsed() - last_progress > 0.1) {
            last_progress = elapsed();
            options.progress({done, counts.pairs_considered, last_progress});
        }
    };

    CandidateStream::Item it{};
    while (stream.pop(it)) {
        const std::size_t lk = lrows[it.row];
        const std::size_t dk = dcols[it.col];
        const std::size_t li = res.inductors_used[lk];
        const std::size_t di = res.diodes_used[dk];
        if (!options.exhaustive && it.key > threshold()) {
            // Score can no longer reach the top N for this row: test the whole rest of the row
            // against the front with the row's most optimistic vector.
            optimisation::Objectives row = optimistic(lk, dk);
            row.loss = lprep[lk].bound.loss + min_d_loss + ctx.loss_floor;
            row.size = lprep[lk].bound.size + min_d_size;
            // Cost: the cheapest priced partner, or none (counted as most expensive) when the
            // inductor or every diode lacks a price - exact for every pair of the row then.
            const auto& lp = inductors[li].price;
            if (lp && std::isfinite(min_d_price)) row.cost = *lp + min_d_price;
            else row.cost.reset();
            const bool row_dominated = dominated_by_front(pareto_vector(row, w));
            if (row_dominated) {
                const std::size_t dropped = 1 + stream.drop_rest_of_row(it);
                counts.pairs_pruned += dropped;
                done += dropped;
                continue;
            }
        }
        PairResult pr;
        pr.inductor = li;
        pr.diode = di;
        const auto opt = optimistic(lk, dk);
        pr.bound = it.key + (opt.cost && w.cost > 0.0 ? w.cost * *opt.cost / sc.cost : 0.0);
        if (!options.exhaustive && pr.bound > threshold() &&
            dominated_by_front(pareto_vector(opt, w))) {
            ++counts.pairs_pruned;
            ++done;
            continue;
        }
        batch.push_back(std::move(pr));
        if (batch.size() >= options.batch) run_batch();
    }
    if (!batch.empty()) run_batch();

    // Results.
    for (std::size_t k = 0; k < top.size(); ++k) top[k].rank = static_cast<int>(k + 1);
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
