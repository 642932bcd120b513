#pragma once
// Per-part lower bounds of a pair's score and objectives, for pruning without changing the answer.
//
// A bound needs to hold only for a pair's feasible settings (an infeasible pair is never listed):
// the peak stays within isat_derating·Isat, so L(i) >= L(derating·Isat); the inductor stays below
// its temperature limit, which caps its DCR; the frequency and ripple limits hold at every corner.
// Over the free setting x (the band, or the PWM frequency) each figure is bounded on an interval
// [x1, x2] by monotone pieces (ripple from x1, frequency from x2, ...), and the inductor's share of
// the score is minimised over intervals refined where the minimum lies. The sum over a pair's two
// parts is then a lower bound of what the tuner can reach.
// The average current lies within the limit current_error of its target under hysteretic control,
// and is the target under PWM (the engine solves the duty for it). Four allowances are
// engineering margins, not proofs: the diode's share of the charge is at least 0.8·(1 − D), D the
// duty with the design's switch and sense drops and the largest winding paired; the switch duty is
// at least 0.9·Vo/Vin (where CCM is certain, a pair's own floors from its ramps are taken when
// higher, but these still stand beneath them); a PWM peak is at least I + ΔI/2 less
// curved_peak_slack where CCM is not certain; in CCM with a capacitor the PWM load ripple is at
// least an ideal triangle's less curved_ramp_slack. The rest are inequalities: volt-second and
// charge balance, and each ramp's least and greatest mean and least variance for a time density
// within a known ratio. tests/studies/bounds_test.cpp checks every bound pointwise against the
// engine on the starter catalog for the example designs and for variants with a lossy switch or
// sense resistor.

#include "design/design.hpp"
#include "optimisation/objectives.hpp"
#include "parts/diode.hpp"
#include "parts/diode_model.hpp"
#include "parts/inductor.hpp"
#include "parts/inductor_model.hpp"
#include "studies/screen.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdint>
#include <memory>
#include <optional>
#include <utility>
#include <vector>

namespace coilsieve::studies {

// Hysteretic control with a capacitor: the load ripple over a duty range wider than
// duty_ends_width is at least 90 % of the triangle's at the range's least end (common practice).
// Within the derated Isat the PWM load p-p stays above 98 % of an ideal triangle's on a sample of
// starter pairs at the example's supply (BoundsPwm.RampShapeAllowanceCoversTheEnginesLoadRipple),
// but strongly curved ramps fall far lower (0.67 at R·t/L = 5 and 99.8 % duty): the PWM load ripple
// takes curved_ramp_slack instead.
constexpr double ramp_shape_slack = 0.9;

// PWM where CCM is not certain: the peak is at least the mean plus curved_peak_slack(x)·ΔI/2, x =
// R·T/L over the whole period (R the series resistance with the load's, L the least inductance).
// Curved ramps spend longer near the peak, which lifts the mean towards it: over random starter
// pairs, supplies and frequencies (CCM and DCM corners) (peak − mean)/(ΔI/2) stays above
// 1 − 0.33·x, down to 0.29 at 99.9 % duty (BoundsPwm.PeakAllowanceCoversCurvedRamps, which fails
// at 0.3·x); the allowance takes 0.5·x (common practice; measured, not derived).
constexpr double curved_peak_coefficient = 0.5;
inline double curved_peak_slack(double x) {
    return std::isfinite(x) && x >= 0.0 ? std::max(0.0, 1.0 - curved_peak_coefficient * x) : 0.0;
}

// PWM in CCM with a capacitor: the load's p-p over an ideal triangle's with the same ΔI and duty
// through the same divider falls as the ramps curve, with x = R·t/L of the longer ramp (R the
// series resistance with the load's, t its duration, L the least inductance): at least 1 − 0.078·x
// over random starter pairs, supplies and capacitors, down to 0.87 near x = 5
// (BoundsPwm.CurvedRampAllowanceCoversTheEnginesLoadRipple, which fails at 0.07·x). The allowance
// takes 0.12·x (common practice; the margin is measured, not derived); past x = 1/0.12 the bound's
// fundamental floor alone holds. Typical pairs have x below 0.05: an allowance under 0.6 %.
constexpr double curved_ramp_coefficient = 0.12;
inline double curved_ramp_slack(double x) {
    return std::isfinite(x) && x >= 0.0 ? std::max(0.0, 1.0 - curved_ramp_coefficient * x) : 0.0;
}

// Hysteretic control with a capacitor in CCM: the engine takes the ideal triangle's p-p through
// the divider at its own frequency and duty, so the bound needs no allowance for curved ramps,
// only for standing the least of the duty range's two ends for its least: within 0.5 % for a
// range up to 0.1 wide (LoadRipple.TriangleOverANarrowDutyRangeIsLeastNearAnEnd); a wider range
// takes ramp_shape_slack. PWM's bound takes the same, times curved_ramp_slack.
constexpr double duty_ends_slack = 0.995;
constexpr double duty_ends_width = 0.1;

// One stretch of the setting range with the inductor's bounds over it (feasible stretches only).
struct SettingStretch {
    double x1 = 0.0, x2 = 0.0; // the stretch of the free variable (A or Hz)
    double score = 0.0;        // the inductor's share of the score (incl. switch and sense loss)
    double loss = 0.0;         // W, nominal: copper, core and switch transitions
    double f = 0.0;            // Hz, nominal switching frequency at least (weighted as the loss)
    double f_valley_v = 0.0;   // f·i_valley·Vin at least (W/C): recovery loss per C/A of Qrr
};

struct InductorBound {
    // false: no setting in range can meet the limits with any diode (`window` says why).
    bool feasible = true;
    double score = 0.0;  // the inductor's share of the score, minimised jointly over the setting
                         // (includes the pair-independent switch and sense loss)
    double loss = 0.0;   // W at the nominal corner(s): copper, core and switch transitions, no
                         // diode; the smallest over the setting
    double size = 0.0;   // m^3, exact
    double margin = 1.0; // upper bound of the saturation margin
    double ripple = 0.0; // lower bound of the load ripple fraction
    double f_min = 0.0;  // Hz, lowest nominal switching frequency a feasible setting gives
    std::vector<SettingStretch> stretches; // for the pair bounds with a diode's switching loss
    std::optional<ScreenReason> window;    // set when !feasible
};

struct DiodeBound {
    double score = 0.0;            // the diode's share of the score (its conduction loss and size)
    double loss = 0.0;             // W, conduction loss floor at the nominal corner(s)
    double size = 0.0;             // m^3, exact
    double e_switch = 0.0;         // J per cycle of junction-charge loss at the nominal Vin
    double qrr_per_amp = 0.0;      // C/A: recovery charge per ampere of forward current
    double current_max = INFINITY; // A, the derated average current rating (diode_current)
    std::vector<JunctionBalance> nominal; // its heating balance at each nominal corner
    // At each operating point of the design, the largest share of the period the diode can
    // conduct and still balance below its limit (JunctionBalance).
    // Leakage factors over the corner's at which the settling share is also kept: a pair's own
    // factor (its least duty over the ideal one) is rounded down to one of them. A numerical
    // choice: the factors seen on the examples lie within 1.1.
    static constexpr std::array<double, 6> leak_levels{1.02, 1.05, 1.1, 1.2, 1.4, 1.7};
    struct Settling {
        OperatingPoint point;
        double share = 1.0;
        // The same with the leakage leak_levels[i] times the corner's (a duty above its ideal).
        std::array<double, leak_levels.size()> share_with_leak{};
    };
    std::vector<Settling> settling;
    // Its forward law at each ambient of the design's corners, 1 K below it and at its junction
    // limit, as the pair bounds take them: made once here, not again for every pair.
    struct AmbientLaws {
        double ambient = 0.0;
        parts::ForwardLaw at, below, limit;
    };
    std::vector<AmbientLaws> laws;
};

// `corners` is part_corners(c, l.tolerance): a caller bounding many parts makes it once per
// tolerance. The overloads without it make it themselves.
InductorBound inductor_bound(const ScreenContext& c, const parts::Inductor& l,
                             const parts::InductorModel& m, const optimisation::Scales& s,
                             const std::vector<EnvelopeCorner>& corners);
InductorBound inductor_bound(const ScreenContext& c, const parts::Inductor& l,
                             const parts::InductorModel& m, const optimisation::Scales& s);
// The inductor's stretches bounded again with this diode's forward drop in place of the 3 V
// allowance (tighter frequency bounds, so more settings closed and higher switching loss) and,
// where CCM is certain, the diode's conduction over the volt-second share of the period instead
// of EnvelopeCorner::off_share: `feasible` false when no setting in range can meet the limits with
// this pair. Its `loss` then includes what the diode's conduction adds to diode_bound's floor.
InductorBound pair_inductor_bound(const ScreenContext& c, const parts::Inductor& l,
                                  const parts::InductorModel& m, const InductorBound& b,
                                  const parts::DiodeModel& diode, const DiodeBound& db,
                                  const optimisation::Scales& s,
                                  const std::vector<EnvelopeCorner>& corners);
InductorBound pair_inductor_bound(const ScreenContext& c, const parts::Inductor& l,
                                  const parts::InductorModel& m, const InductorBound& b,
                                  const parts::DiodeModel& diode, const DiodeBound& db,
                                  const optimisation::Scales& s);
DiodeBound diode_bound(const ScreenContext& c, const parts::Diode& diode,
                       const parts::DiodeModel& m, const optimisation::Scales& s);

// A pair's score lower bound without its cost term (cost is exact and added by the caller): the
// two shares plus the diode's switching loss, minimised jointly over the inductor's stretches.
double pair_score_bound(const ScreenContext& c, const InductorBound& l, const DiodeBound& d,
                        const optimisation::Scales& s);
// A pair's optimistic objective vector (loss, size, ripple, margin; cost left empty); with
// `known_loss`, a loss bound the caller already holds (no lower than this one's) is taken as is.
optimisation::Objectives pair_optimistic(const ScreenContext& c, const InductorBound& l,
                                         const DiodeBound& d,
                                         std::optional<double> known_loss = std::nullopt);

// A pair's loss bound (as pair_optimistic's) and score bound (as pair_score_bound) with only the
// stretches whose own values reach down to `loss_enough` or `score_enough` bounded again with the
// pair's diode; the rest keep the inductor's values, which hold for every partner. None as soon
// as a stretch stays at or below either: the pair may matter, and its full bound is needed. Lets a
// caller discard a pair at a fraction of pair_inductor_bound's cost (`b` is the inductor's bound,
// `corners` part_corners(c, l.tolerance)).
struct PairFloors {
    double loss = INFINITY;
    double score = INFINITY;
};
std::optional<PairFloors> pair_floors_above(const ScreenContext& c, const parts::Inductor& l,
                                            const parts::InductorModel& m, const InductorBound& b,
                                            const parts::DiodeModel& diode, const DiodeBound& d,
                                            const optimisation::Scales& s,
                                            const std::vector<EnvelopeCorner>& corners,
                                            double loss_enough, double score_enough);

// A tighter loss bound once the pair's tuned score (without its cost term) is known to be at most
// `score_cap` (e.g. the score of a pre-scan point the tuner also visits): the tuned setting lies
// where the pair's score bound is below the cap, and the loss there is at least the result.
double pair_loss_within(const ScreenContext& c, const InductorBound& l, const DiodeBound& d,
                        const optimisation::Scales& s, double score_cap);
// The same with each stretch under the cap split into parts bounded again with the pair's diode
// (`b` is the pair's bound, `corners` part_corners(c, l.tolerance)): the score changes across a
// stretch by more than the bound's slack, so the parts exclude settings a whole stretch keeps.
// Never below the coarse value. It may stop splitting once its bound reaches `enough` (the loss
// a caller needs to see, e.g. the one that makes the pair dominated).
double pair_loss_within(const ScreenContext& c, const parts::Inductor& l,
                        const parts::InductorModel& m, const InductorBound& b,
                        const parts::DiodeModel& diode, const DiodeBound& d,
                        const optimisation::Scales& s, double score_cap,
                        const std::vector<EnvelopeCorner>& corners, double enough = INFINITY);

// The settings a bound leaves open: the hull [lo, hi] of its feasible stretches (none when it
// leaves none). No setting outside it can meet the limits, so a tuner need not look there.
std::optional<std::pair<double, double>> open_settings(const InductorBound& b);

// One pair's bounds with its own diode, a stretch of the inductor's bound evaluated with the diode
// only when an answer needs it (each costs a pass over the corners), and once: the ranking asks a
// pair for its floors, its feasibility, where to start, its open settings and a loss under a cap,
// and most pairs are settled by a few stretches. Every answer is a valid bound, as the functions
// above give: a stretch not yet evaluated keeps the inductor's own bound (valid for any diode).
// `open`, `feasible` and `loss_bound` equal those of pair_inductor_bound exactly.
class PairBound {
public:
    // All references must outlive the object; `b` is the inductor's bound, `corners`
    // part_corners(c, l.tolerance).
    PairBound(const ScreenContext& c, const parts::Inductor& l, const parts::InductorModel& m,
              const InductorBound& b, const parts::DiodeModel& diode, const DiodeBound& d,
              const optimisation::Scales& s, const std::vector<EnvelopeCorner>& corners);
    ~PairBound();
    PairBound(const PairBound&) = delete;
    PairBound& operator=(const PairBound&) = delete;

    // pair_floors_above, on the stretches in doubt.
    std::optional<PairFloors> floors_above(double loss_enough, double score_enough);
    // Some setting in range may meet the limits with this pair.
    bool feasible();
    // The hull of the stretches that stay open with this diode (open_settings).
    std::optional<std::pair<double, double>> open();
    // Where a ranking's walk starts for this pair: the middle of the first stretch, in ascending
    // order of the inductor's score bound with this diode's switching, that stays open with the
    // diode (geometric on a log scale). It asks one stretch of most pairs where the least of the
    // pair's own bound asked six, and starts the walk as well: the tuner's evaluations were the
    // same to 0.1 % on the examples and generated catalogs. The same in every mode of a ranking.
    std::optional<double> start_setting();
    // A lower bound over every setting of the score without the cost term (pair_score_bound),
    // from the stretches evaluated so far.
    double score_bound() const;
    // pair_optimistic's loss, with the stretches that could hold the least evaluated first.
    double loss_bound();
    // What the stretches bounded so far gave, compact (figures rounded down to float, so still
    // bounds), for a later PairBound of the same pair: the ranking keeps it for a pair it puts
    // back in its queue. Empty for an inductor bound of more than 64 stretches.
    struct Learnt {
        std::uint64_t bounded = 0, open = 0;       // bit i: stretch i bounded with the diode; open
        std::vector<std::array<float, 4>> figures; // score, loss, f, f·i·V of the open ones
    };
    Learnt learnt() const;
    // Starts from what a PairBound of the same pair learnt (its answers then lie within the
    // rounding below the exact ones).
    void take(const Learnt& seed);

    // pair_loss_within with the pair's own stretches, split as the refined overload does when
    // `split`; it may stop once its bound reaches `enough`. A stretch is bounded with the diode
    // only when the search reaches it.
    double loss_within(double score_cap, double enough, bool split);

private:
    struct State;
    std::unique_ptr<State> state_;
};

} // namespace coilsieve::studies
