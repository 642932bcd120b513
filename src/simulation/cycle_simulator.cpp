#include "simulation/cycle_simulator.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <fstream>
#include <limits>
#include <ostream>
#include <sstream>
#include <stdexcept>
#include <string>

namespace coilsieve::simulation {

namespace {

enum class Phase { on, off, idle };

// State: inductor current, capacitor voltage, then running integrals over the cycle.
enum Index : std::size_t {
    kI,
    kVc,
    kQi,
    kQi2,
    kQload,
    kQload2,
    kQd,
    kQd2,
    kQpd,
    kQsw,
    kQsw2,
    kQesr,
    kSize
};
using State = std::array<double, kSize>;

struct Output {
    double v_out, i_load, i_cap;
};

// Load node from KCL: inductor current splits into the load (v0 + r·i) and C with its ESR.
Output output(const Circuit& k, double i, double vc) {
    if (!k.has_capacitor()) {
        return {k.v0 + k.r_load * i, i, 0.0};
    }
    const double gr = 1.0 / k.r_load;
    if (k.cap_esr <= 0.0) {
        const double i_load = (vc - k.v0) * gr;
        return {vc, i_load, i - i_load};
    }
    const double ge = 1.0 / k.cap_esr;
    const double v_out = (i + k.v0 * gr + vc * ge) / (gr + ge);
    return {v_out, (v_out - k.v0) * gr, (v_out - vc) * ge};
}

// Kirchhoff's voltage law round the inductor loop (domain-notes "The circuit"); di/dt = v_L/L(i).
void rhs(const Circuit& k, Phase ph, const State& y, State& f) {
    f.fill(0.0);
    const double i = ph == Phase::idle ? 0.0 : y[kI];
    const Output o = output(k, i, y[kVc]);
    double v_l = 0.0;
    if (ph == Phase::on) {
        v_l = k.vin - i * (k.r_on + k.r_sense + k.dcr) - o.v_out;
        f[kQsw] = i;
        f[kQsw2] = i * i;
    } else if (ph == Phase::off) {
        const double vf = k.vf(i);
        v_l = -(vf + i * (k.r_sense + k.dcr) + o.v_out);
        f[kQd] = i;
        f[kQd2] = i * i;
        f[kQpd] = vf * std::max(i, 0.0);
    }
    f[kI] = ph == Phase::idle ? 0.0 : v_l / k.inductance(i);
    f[kVc] = k.has_capacitor() ? o.i_cap / k.cap : 0.0;
    f[kQi] = i;
    f[kQi2] = i * i;
    f[kQload] = o.i_load;
    f[kQload2] = o.i_load * o.i_load;
    f[kQesr] = o.i_cap * o.i_cap * k.cap_esr;
}

WaveformSample sample(const Circuit& k, Phase ph, double t, const State& y) {
    const double i = ph == Phase::idle ? 0.0 : y[kI];
    const Output o = output(k, i, y[kVc]);
    WaveformSample s;
    s.t = t;
    s.i_l = i;
    s.i_load = o.i_load;
    if (ph == Phase::on) {
        s.v_sw = k.vin - i * k.r_on;
    } else if (ph == Phase::off) {
        s.v_sw = -k.vf(i);
        s.i_d = std::max(i, 0.0);
    } else {
        s.v_sw = o.v_out; // no voltage across the idle inductor (ringing not modelled)
    }
    return s;
}

// A threshold on the inductor current: fires when dir·(i − level) becomes >= 0.
struct Event {
    double level = 0.0;
    double dir = 1.0;
};

struct Extremes {
    double i_max = -std::numeric_limits<double>::infinity();
    double i_min = std::numeric_limits<double>::infinity();
    double load_max = -std::numeric_limits<double>::infinity();
    double load_min = std::numeric_limits<double>::infinity();
    void add(double i, double i_load) {
        i_max = std::max(i_max, i);
        i_min = std::min(i_min, i);
        load_max = std::max(load_max, i_load);
        load_min = std::min(load_min, i_load);
    }
};

// Dormand–Prince RK5(4)7M with Hairer's dense output (Hairer, Nørsett, Wanner, Solving ODEs I,
// 2nd ed., 1993, §II.5/II.6, DOPRI5 and CONTD5).
class Integrator {
public:
    Integrator(const Circuit& k, double rtol) : k_(k), rtol_(rtol) {
        atol_i_ = rtol * std::max(k.i_target, 1e-6);
        atol_v_ = rtol * std::max(std::abs(k.v0), 1.0);
        i_limit_ = 50.0 * std::max({k.isat, k.i_hi, k.i_target});
    }

    double h = 0.0; // step carried across segments
    int steps = 0;
    Waveform* record = nullptr;
    double record_offset = 0.0;
    int record_per_step = 6;

    // Integrate phase `ph` from (t, y) until t_limit or the first event; returns the event index
    // fired (-1 when t_limit was reached). Throws on a runaway step count.
    int run(Phase ph, double& t, State& y, double t_limit, const std::vector<Event>& events,
            Extremes& ext) {
        State k1, k2, k3, k4, k5, k6, k7, yt, yn;
        rhs(k_, ph, y, k1);
        if (!(h > 0.0)) {
            // First step: a small fraction of the time the current needs to move by the target.
            const double rate = std::abs(k1[kI]);
            h = rate > 0.0 ? 1e-3 * std::max(k_.i_target, 1e-6) / rate : 1e-3 * (t_limit - t);
        }
        for (int guard = 0;; ++guard) {
            if (guard > 2000000) {
                throw std::runtime_error("cycle simulator: step limit exceeded in one interval");
            }
            const double remaining = t_limit - t;
            if (remaining <= 1e-15 * std::max(std::abs(t_limit), 1e-12)) {
                t = t_limit;
                return -1;
            }
            const bool last = h >= remaining;
            const double hs = last ? remaining : h;
            stage(ph, y, hs, k1, k2, k3, k4, k5, k6, k7, yt, yn);
            const double err = error(y, yn, hs, k1, k3, k4, k5, k6, k7);
            if (!(err <= 1.0)) {
                // Rejected (a NaN from an absurd trial state counts as a rejection).
                h = std::isfinite(err) ? hs * std::max(0.2, 0.9 * std::pow(err, -0.2)) : 0.1 * hs;
                continue;
            }
            ++steps;
            if (!(std::abs(yn[kI]) < i_limit_)) {
                throw std::runtime_error("cycle simulator: inductor current runaway (the "
                                         "inductor saturates far beyond its rating)");
            }
            // Dense output coefficients for this step.
            std::array<State, 5> rc;
            for (std::size_t j = 0; j < kSize; ++j) {
                const double dy = yn[j] - y[j];
                const double b = hs * k1[j] - dy;
                rc[0][j] = y[j];
                rc[1][j] = dy;
                rc[2][j] = b;
                rc[3][j] = dy - hs * k7[j] - b;
                rc[4][j] = hs * (d1 * k1[j] + d3 * k3[j] + d4 * k4[j] + d5 * k5[j] + d6 * k6[j] +
                                 d7 * k7[j]);
            }
            // Earliest event inside this step.
            double theta_ev = 2.0;
            int fired = -1;
            for (std::size_t e = 0; e < events.size(); ++e) {
                const Event& ev = events[e];
                const double g1 = ev.dir * (yn[kI] - ev.level);
                if (g1 < 0.0) {
                    continue;
                }
                const double th = locate(rc, ev);
                if (th < theta_ev) {
                    theta_ev = th;
                    fired = static_cast<int>(e);
                }
            }
            const double th_end = fired >= 0 ? theta_ev : 1.0;
            if (record != nullptr || k_.has_capacitor()) {
                const int n = record != nullptr ? record_per_step : 4;
                for (int s = 1; s < n; ++s) {
                    const double th = th_end * s / n;
                    const State ys = dense(rc, th);
                    const WaveformSample w = sample(k_, ph, t + th * hs, ys);
                    ext.add(w.i_l, w.i_load);
                    if (record != nullptr) {
                        WaveformSample r = w;
                        r.t += record_offset;
                        record->push_back(r);
                    }
                }
            }
            if (fired >= 0) {
                y = dense(rc, theta_ev);
                y[kI] = events[static_cast<std::size_t>(fired)].level;
                t += theta_ev * hs;
            } else {
                y = yn;
                t = last ? t_limit : t + hs;
                k1 = k7; // first-same-as-last
            }
            const WaveformSample w = sample(k_, ph, t, y);
            ext.add(w.i_l, w.i_load);
            if (record != nullptr) {
                WaveformSample r = w;
                r.t += record_offset;
                record->push_back(r);
            }
            if (!last || fired >= 0) {
                h = hs * std::min(5.0, std::max(0.2, 0.9 * std::pow(std::max(err, 1e-10), -0.2)));
            }
            if (fired >= 0) {
                return fired;
            }
        }
    }

    const Circuit& circuit() const { return k_; }

private:
    static constexpr double c2 = 1.0 / 5, c3 = 3.0 / 10, c4 = 4.0 / 5, c5 = 8.0 / 9;
    static constexpr double a21 = 1.0 / 5;
    static constexpr double a31 = 3.0 / 40, a32 = 9.0 / 40;
    static constexpr double a41 = 44.0 / 45, a42 = -56.0 / 15, a43 = 32.0 / 9;
    static constexpr double a51 = 19372.0 / 6561, a52 = -25360.0 / 2187, a53 = 64448.0 / 6561,
                            a54 = -212.0 / 729;
    static constexpr double a61 = 9017.0 / 3168, a62 = -355.0 / 33, a63 = 46732.0 / 5247,
                            a64 = 49.0 / 176, a65 = -5103.0 / 18656;
    static constexpr double a71 = 35.0 / 384, a73 = 500.0 / 1113, a74 = 125.0 / 192,
                            a75 = -2187.0 / 6784, a76 = 11.0 / 84;
    static constexpr double e1 = 71.0 / 57600, e3 = -71.0 / 16695, e4 = 71.0 / 1920,
                            e5 = -17253.0 / 339200, e6 = 22.0 / 525, e7 = -1.0 / 40;
    static constexpr double d1 = -12715105075.0 / 11282082432.0, d3 = 87487479700.0 / 32700410799.0,
                            d4 = -10690763975.0 / 1880347072.0,
                            d5 = 701980252875.0 / 199316789632.0, d6 = -1453857185.0 / 822651844.0,
                            d7 = 69997945.0 / 29380423.0;

    void stage(Phase ph, const State& y, double hs, const State& k1, State& k2, State& k3,
               State& k4, State& k5, State& k6, State& k7, State& yt, State& yn) const {
        for (std::size_t j = 0; j < kSize; ++j) yt[j] = y[j] + hs * a21 * k1[j];
        rhs(k_, ph, yt, k2);
        for (std::size_t j = 0; j < kSize; ++j) yt[j] = y[j] + hs * (a31 * k1[j] + a32 * k2[j]);
        rhs(k_, ph, yt, k3);
        for (std::size_t j = 0; j < kSize; ++j)
            yt[j] = y[j] + hs * (a41 * k1[j] + a42 * k2[j] + a43 * k3[j]);
        rhs(k_, ph, yt, k4);
        for (std::size_t j = 0; j < kSize; ++j)
            yt[j] = y[j] + hs * (a51 * k1[j] + a52 * k2[j] + a53 * k3[j] + a54 * k4[j]);
        rhs(k_, ph, yt, k5);
        for (std::size_t j = 0; j < kSize; ++j)
            yt[j] =
                y[j] + hs * (a61 * k1[j] + a62 * k2[j] + a63 * k3[j] + a64 * k4[j] + a65 * k5[j]);
        rhs(k_, ph, yt, k6);
        for (std::size_t j = 0; j < kSize; ++j)
            yn[j] =
                y[j] + hs * (a71 * k1[j] + a73 * k3[j] + a74 * k4[j] + a75 * k5[j] + a76 * k6[j]);
        rhs(k_, ph, yn, k7);
    }

    double error(const State& y, const State& yn, double hs, const State& k1, const State& k3,
                 const State& k4, const State& k5, const State& k6, const State& k7) const {
        double err = 0.0;
        const std::array<std::size_t, 2> idx{kI, kVc};
        const std::array<double, 2> atol{atol_i_, atol_v_};
        for (std::size_t n = 0; n < 2; ++n) {
            const std::size_t j = idx[n];
            const double e =
                hs * (e1 * k1[j] + e3 * k3[j] + e4 * k4[j] + e5 * k5[j] + e6 * k6[j] + e7 * k7[j]);
            const double sc = atol[n] + rtol_ * std::max(std::abs(y[j]), std::abs(yn[j]));
            err = std::max(err, std::abs(e) / sc);
        }
        return err;
    }

    static State dense(const std::array<State, 5>& rc, double th) {
        const double th1 = 1.0 - th;
        State out;
        for (std::size_t j = 0; j < kSize; ++j) {
            out[j] =
                rc[0][j] + th * (rc[1][j] + th1 * (rc[2][j] + th * (rc[3][j] + th1 * rc[4][j])));
        }
        return out;
    }

    // Root of dir·(i(θ) − level) on [0, 1] by bisection refined with the Illinois rule, to
    // ~1e-14 in θ.
    static double locate(const std::array<State, 5>& rc, const Event& ev) {
        auto g = [&](double th) {
            const double th1 = 1.0 - th;
            const double i =
                rc[0][kI] +
                th * (rc[1][kI] + th1 * (rc[2][kI] + th * (rc[3][kI] + th1 * rc[4][kI])));
            return ev.dir * (i - ev.level);
        };
        double a = 0.0, b = 1.0;
        double ga = g(a), gb = g(b);
        if (ga >= 0.0) {
            return 0.0;
        }
        int side = 0;
        for (int it = 0; it < 200 && b - a > 1e-14; ++it) {
            double m = (a * gb - b * ga) / (gb - ga);
            if (!(m > a && m < b) || it % 4 == 3) {
                m = 0.5 * (a + b);
            }
            const double gm = g(m);
            if (gm >= 0.0) {
                b = m;
                gb = gm;
                if (side == -1) ga *= 0.5;
                side = -1;
            } else {
                a = m;
                ga = gm;
                if (side == 1) gb *= 0.5;
                side = 1;
            }
        }
        return b;
    }

    const Circuit& k_;
    double rtol_;
    double atol_i_ = 0.0, atol_v_ = 0.0;
    double i_limit_ = 0.0;
};

struct Cycle {
    State y{}; // state at the end (next turn-on) with the integrals over the cycle
    double period = 0.0;
    double t_on = 0.0;       // switch on
    double t_diode = 0.0;    // diode conducting
    double i_turn_off = 0.0; // inductor current when the switch opens
    double i_turn_on = 0.0;  // ... when it closes
    Extremes ext;
    bool dcm = false;
};

// A guard on how long one interval may last before we call the circuit stuck.
double interval_guard(const Circuit& k) {
    const double r = k.r_on + k.r_sense + k.dcr + k.r_load + 1e-3;
    const double tau = k.l0 / r;
    const double hop = k.l0 * k.i_target / std::max(k.vin, 1e-3);
    return 200.0 * std::max(tau, hop) +
           (k.mode == design::ControlMode::pwm ? 2.0 / k.frequency : 0.0);
}

Cycle run_cycle(Integrator& in, double i0, double vc0, double duty) {
    const Circuit& k = in.circuit();
    Cycle c;
    State y{};
    y[kI] = std::max(i0, 0.0);
    y[kVc] = vc0;
    c.i_turn_on = y[kI];
    double t = 0.0;
    const double guard = interval_guard(k);
    const std::vector<Event> none;
    const std::vector<Event> dcm{{0.0, -1.0}};
    if (k.mode == design::ControlMode::hysteretic) {
        double t_switch = 0.0;
        if (y[kI] < k.i_hi) {
            const int ev = in.run(Phase::on, t, y, guard, {{k.i_hi, 1.0}}, c.ext);
            if (ev < 0) {
                throw std::runtime_error("cycle simulator: the current never reaches the upper "
                                         "threshold (no regulation)");
            }
        }
        t_switch = t + k.delay;
        if (k.delay > 0.0) {
            in.run(Phase::on, t, y, t_switch, none, c.ext);
        }
        c.t_on = t;
        c.i_turn_off = y[kI];
        const double t_open = t;
        double t_close = 0.0;
        bool idle = false;
        if (y[kI] > k.i_lo) {
            const int ev =
                in.run(Phase::off, t, y, t + guard, {{k.i_lo, -1.0}, {0.0, -1.0}}, c.ext);
            if (ev < 0) {
                throw std::runtime_error("cycle simulator: the current never falls to the lower "
                                         "threshold");
            }
            idle = ev == 1;
        }
        t_close = t + k.delay;
        if (!idle && t_close > t) {
            idle = in.run(Phase::off, t, y, t_close, dcm, c.ext) == 0;
        }
        c.t_diode = t - t_open;
        if (idle) {
            c.dcm = true;
            y[kI] = 0.0;
            in.run(Phase::idle, t, y, t_close, none, c.ext);
        }
    } else {
        const double period = 1.0 / k.frequency;
        const double t_off = std::clamp(duty, 0.0, 1.0) * period;
        if (t_off > 0.0) {
            in.run(Phase::on, t, y, t_off, none, c.ext);
        }
        c.t_on = t;
        c.i_turn_off = y[kI];
        const double t_open = t;
        bool idle = false;
        if (t < period) {
            idle = in.run(Phase::off, t, y, period, dcm, c.ext) == 0;
        }
        c.t_diode = t - t_open;
        if (idle) {
            c.dcm = true;
            y[kI] = 0.0;
            in.run(Phase::idle, t, y, period, none, c.ext);
        }
    }
    c.y = y;
    c.period = t;
    return c;
}

// Small dense linear solve with partial pivoting; false when singular.
bool solve(std::vector<std::vector<double>> a, std::vector<double>& b) {
    const std::size_t n = b.size();
    for (std::size_t col = 0; col < n; ++col) {
        std::size_t piv = col;
        for (std::size_t r = col + 1; r < n; ++r) {
            if (std::abs(a[r][col]) > std::abs(a[piv][col])) piv = r;
        }
        if (!(std::abs(a[piv][col]) > 1e-300)) return false;
        std::swap(a[piv], a[col]);
        std::swap(b[piv], b[col]);
        for (std::size_t r = col + 1; r < n; ++r) {
            const double f = a[r][col] / a[col][col];
            for (std::size_t cc = col; cc < n; ++cc) a[r][cc] -= f * a[col][cc];
            b[r] -= f * b[col];
        }
    }
    for (std::size_t r = n; r-- > 0;) {
        double s = b[r];
        for (std::size_t cc = r + 1; cc < n; ++cc) s -= a[r][cc] * b[cc];
        b[r] = s / a[r][r];
    }
    return true;
}

// Unknowns of the shooting problem: i0, [vc0], [duty].
struct Shooting {
    const Circuit& k;
    Integrator& in;
    bool cap;
    bool pwm;
    double vscale;
    int cycles = 0;

    std::size_t size() const { return 1 + (cap ? 1 : 0) + (pwm ? 1 : 0); }

    Cycle cycle(const std::vector<double>& z) {
        ++cycles;
        const double vc0 = cap ? z[1] : k.v0;
        const double duty = pwm ? z.back() : 0.0;
        return run_cycle(in, z[0], vc0, duty);
    }

    std::vector<double> residual(const std::vector<double>& z, const Cycle& c) const {
        std::vector<double> r;
        r.push_back((c.y[kI] - std::max(z[0], 0.0)) / k.i_target);
        if (cap) r.push_back((c.y[kVc] - z[1]) / vscale);
        if (pwm) r.push_back((c.y[kQload] / c.period - k.i_target) / k.i_target);
        return r;
    }

    static double norm(const std::vector<double>& r) {
        double m = 0.0;
        for (double v : r) m = std::max(m, std::abs(v));
        return m;
    }

    void clamp(std::vector<double>& z) const {
        z[0] = std::max(z[0], 0.0);
        if (pwm) z.back() = std::clamp(z.back(), 1e-6, 1.0 - 1e-6);
    }
};

converter::CornerResult summarise(const Circuit& k, const Cycle& c, double& p_in, double& p_circuit,
                                  double& p_esr) {
    converter::CornerResult r;
    const double T = c.period;
    r.vin = k.vin;
    r.f_sw = 1.0 / T;
    r.t_on = c.t_on;
    r.t_off = c.t_diode;
    r.duty = c.t_on / T;
    r.il_avg = c.y[kQi] / T;
    r.il_peak = c.ext.i_max;
    r.il_valley = std::max(c.ext.i_min, 0.0);
    r.il_ripple_pp = r.il_peak - r.il_valley;
    r.il_rms = std::sqrt(c.y[kQi2] / T);
    r.load_i_avg = c.y[kQload] / T;
    r.load_ripple_pp = c.ext.load_max - c.ext.load_min;
    r.id_avg = c.y[kQd] / T;
    r.id_rms = std::sqrt(std::max(c.y[kQd2], 0.0) / T);
    r.isw_rms = std::sqrt(c.y[kQsw2] / T);
    r.dcm = c.dcm;
    r.losses.inductor_copper = k.dcr * c.y[kQi2] / T;
    r.losses.diode_conduction = c.y[kQpd] / T;
    r.losses.switch_conduction = k.r_on * c.y[kQsw2] / T;
    r.losses.sense = k.r_sense * c.y[kQi2] / T;
    p_esr = c.y[kQesr] / T;
    r.losses.capacitor = p_esr;
    r.losses.total = r.losses.inductor_copper + r.losses.diode_conduction +
                     r.losses.switch_conduction + r.losses.sense + r.losses.capacitor;
    r.p_out = (k.v0 * c.y[kQload] + k.r_load * c.y[kQload2]) / T;
    r.isw_avg = c.y[kQsw] / T;
    p_in = k.vin * r.isw_avg;
    r.p_in = p_in;
    p_circuit = r.losses.total;
    r.efficiency = r.p_out / (r.p_out + r.losses.total);
    r.v_reverse = k.vin;
    r.l_at_peak = k.inductance(r.il_peak);
    r.regulation_error = (r.load_i_avg - k.i_target) / k.i_target;
    r.tj_diode = k.diode_temperature;
    // Headroom as the engine defines it: the on-interval's asymptotic current over the need.
    const double i_need = k.mode == design::ControlMode::pwm ? k.i_target : k.i_hi;
    const double r_series = k.r_on + k.r_sense + k.dcr + k.r_load;
    r.regulation_headroom = ((k.vin - k.v0) / std::max(r_series, 1e-12) - i_need) / i_need;
    return r;
}

bool finite(const std::vector<double>& v) {
    return std::all_of(v.begin(), v.end(), [](double x) { return std::isfinite(x); });
}

} // namespace

SimulationResult simulate(const Circuit& k, const SimulationOptions& opt,
                          const converter::CornerResult* guess) {
    SimulationResult res;
    res.steady.vin = k.vin;
    const bool pwm = k.mode == design::ControlMode::pwm;
    // A current source can only regulate below the current the full supply would drive.
    const double r_series = k.r_on + k.r_sense + k.dcr + k.r_load;
    const double i_max = (k.vin - k.v0) / std::max(r_series, 1e-12);
    const double i_needed = pwm ? k.i_target : k.i_hi;
    if (!(i_max > i_needed)) {
        res.steady.status = converter::CornerStatus::no_regulation;
        std::ostringstream os;
        os << "the supply (" << k.vin << " V) cannot drive " << i_needed
           << " A into the load (at most " << std::max(i_max, 0.0) << " A)";
        res.steady.reason = os.str();
        return res;
    }

    Integrator in(k, opt.rtol);
    Shooting sh{k, in, k.has_capacitor(), pwm, std::max(std::abs(k.v0), 1.0)};

    // Initial guess: the analytical result, else a lossless-with-drops estimate.
    const double i = k.i_target;
    const double vo = k.v0 + k.r_load * i;
    const double vd = k.vf(i);
    double duty =
        std::clamp((vo + vd + i * (k.r_sense + k.dcr)) / (k.vin + vd - i * k.r_on), 0.01, 0.99);
    double i0 = 0.0;
    if (pwm) {
        const double ripple = (k.vin - vo) * duty / (k.l0 * k.frequency);
        i0 = std::max(0.0, i - 0.5 * ripple);
        if (ripple > 2.0 * i && k.vin > vo) {
            // Discontinuous: triangle of area I·T (Erickson & Maksimović ch. 5, lossless).
            const double peak =
                std::sqrt(2.0 * i / (k.l0 * k.frequency * (1.0 / (k.vin - vo) + 1.0 / (vo + vd))));
            duty = std::clamp(k.l0 * peak * k.frequency / (k.vin - vo), 1e-4, 0.99);
            i0 = 0.0;
        }
    } else {
        i0 = std::max(0.0, k.i_lo - k.delay * (vo + vd) / k.l0);
    }
    if (guess != nullptr && guess->status == converter::CornerStatus::ok &&
        std::isfinite(guess->il_valley) && guess->il_valley >= 0.0) {
        i0 = guess->il_valley;
        if (pwm && guess->duty > 0.0 && guess->duty < 1.0) duty = guess->duty;
    }
    std::vector<double> z{i0};
    if (sh.cap) z.push_back(vo);
    if (pwm) z.push_back(duty);

    bool converged = false;
    Cycle c;
    try {
        c = sh.cycle(z);
        auto r = sh.residual(z, c);
        for (int it = 0; it < opt.max_newton && !converged; ++it) {
            if (Shooting::norm(r) < opt.shooting_tol) {
                converged = true;
                break;
            }
            ++res.newton_iterations;
            const std::size_t n = z.size();
            std::vector<std::vector<double>> jac(n, std::vector<double>(n));
            for (std::size_t j = 0; j < n; ++j) {
                std::vector<double> zp = z;
                double dz = 1e-6 * (j == 0 ? k.i_target : (pwm && j == n - 1 ? 1.0 : sh.vscale));
                if (pwm && j == n - 1 && zp[j] + dz >= 1.0) dz = -dz;
                zp[j] += dz;
                const auto rp = sh.residual(zp, sh.cycle(zp));
                for (std::size_t row = 0; row < n; ++row) jac[row][j] = (rp[row] - r[row]) / dz;
            }
            std::vector<double> step(r);
            if (!solve(jac, step) || !finite(step)) break;
            // Backtracking: accept the first damped step that lowers the residual.
            double lambda = 1.0;
            bool accepted = false;
            for (int b = 0; b < 12; ++b, lambda *= 0.5) {
                std::vector<double> zn = z;
                for (std::size_t j = 0; j < n; ++j) zn[j] -= lambda * step[j];
                sh.clamp(zn);
                const Cycle cn = sh.cycle(zn);
                const auto rn = sh.residual(zn, cn);
                if (finite(rn) && Shooting::norm(rn) < Shooting::norm(r)) {
                    z = zn;
                    c = cn;
                    r = rn;
                    accepted = true;
                    break;
                }
            }
            if (!accepted) break;
        }
        if (!converged && Shooting::norm(r) < opt.shooting_tol) converged = true;
    } catch (const std::runtime_error&) {
        converged = false;
    }

    if (!converged) {
        // Fallback: cycle the map until it settles; for PWM bisect the duty around it.
        res.used_fallback = true;
        auto settle = [&](double d, std::vector<double>& zz) -> Cycle {
            Cycle cc;
            for (int n = 0; n < opt.max_brute_cycles; ++n) {
                if (pwm) zz.back() = d;
                cc = sh.cycle(zz);
                const auto rr = sh.residual(zz, cc);
                zz[0] = cc.y[kI];
                if (sh.cap) zz[1] = cc.y[kVc];
                if (std::abs(rr[0]) < opt.shooting_tol &&
                    (!sh.cap || std::abs(rr[1]) < opt.shooting_tol))
                    break;
            }
            return cc;
        };
        try {
            if (pwm) {
                double lo = 0.0, hi = 1.0;
                // Load current rises with the duty; a runaway counts as too much.
                bool have = false;
                for (int it = 0; it < 60; ++it) {
                    const double d = 0.5 * (lo + hi);
                    double err = 1.0;
                    try {
                        std::vector<double> zz = z;
                        const Cycle cd = settle(d, zz);
                        err = cd.y[kQload] / cd.period - k.i_target;
                        if (!std::isfinite(err)) err = 1.0;
                        c = cd;
                        z = zz;
                        have = true;
                    } catch (const std::runtime_error&) {
                        z[0] = 0.0;
                    }
                    if (err > 0.0) hi = d;
                    else lo = d;
                    if (std::abs(err) < opt.shooting_tol * k.i_target) break;
                }
                if (!have) throw std::runtime_error("no duty gives a periodic state");
            } else {
                c = settle(0.0, z);
            }
            converged = true;
        } catch (const std::runtime_error& e) {
            res.steady.status = converter::CornerStatus::no_convergence;
            res.steady.reason = std::string("time-domain simulation failed: ") + e.what();
            res.cycles_simulated = sh.cycles;
            return res;
        }
    }

    // One more cycle at the periodic state, recorded.
    const int rec_cycles = std::max(opt.waveform_cycles, 0);
    if (rec_cycles > 0) {
        in.record = &res.waveform;
        double offset = 0.0;
        std::vector<double> zz = z;
        for (int n = 0; n < rec_cycles; ++n) {
            in.record_offset = offset;
            const Cycle cr = run_cycle(in, zz[0], sh.cap ? zz[1] : k.v0, pwm ? zz.back() : 0.0);
            if (n == 0) c = cr;
            offset += cr.period;
            zz[0] = cr.y[kI];
            if (sh.cap) zz[1] = cr.y[kVc];
            ++sh.cycles;
        }
        in.record = nullptr;
    }
    res.cycles_simulated = sh.cycles;
    res.steady = summarise(k, c, res.p_in, res.p_circuit_loss, res.capacitor_esr_loss);
    res.energy_balance = (res.p_in - res.steady.p_out - res.p_circuit_loss) / res.p_in;
    return res;
}

namespace {

double rac_ripple_copper(const Circuit& k, const parts::InductorModel& l, const Temperatures& t,
                         bool use_max, const converter::CornerResult& r) {
    // DC part from the exact waveform, ripple part with R_ac (as the analytical engine does).
    const double ac2 = std::max(r.il_rms * r.il_rms - r.il_avg * r.il_avg, 0.0);
    return k.dcr * r.il_avg * r.il_avg + l.r_ac(r.f_sw, t.inductor, use_max) * ac2;
}

} // namespace

SimulationResult simulate_corner(const design::Design& d, const parts::InductorModel& l,
                                 const parts::DiodeModel& diode, const converter::Corner& c,
                                 const converter::Setting& s, const Temperatures& t,
                                 const SimulationOptions& opt,
                                 const converter::CornerResult* guess) {
    const Circuit k = make_circuit(d, l, diode, c, s, t);
    SimulationResult res = simulate(k, opt, guess);
    converter::CornerResult& r = res.steady;
    r.name = c.name;
    r.vin = c.vin;
    r.ambient = c.ambient;
    r.t_inductor = t.inductor;
    r.tj_diode = t.diode;
    if (r.status != converter::CornerStatus::ok) {
        return res;
    }
    r.t_switch = t.sw;
    converter::Losses& lo = r.losses;
    const double copper_dc = lo.inductor_copper; // DCR·<i²> of the waveform
    lo.inductor_copper = rac_ripple_copper(k, l, t, c.dcr_max, r);
    // Not time-domain matters: the same closed forms as the analytical engine.
    const double period = 1.0 / r.f_sw;
    const double t_active = r.t_on + r.t_off;
    const double t_idle = std::max(period - t_active, 0.0);
    // iGSE; with a resting flux (DCM) the active part's loss scaled by its share of the period
    // (Venkatachalam et al., COMPEL 2002), as the engine does.
    lo.inductor_core =
        r.dcm && t_active > 0.0
            ? l.core_loss(r.il_ripple_pp, 1.0 / t_active, r.t_on / t_active) * t_active / period
            : l.core_loss(r.il_ripple_pp, r.f_sw, r.duty);
    const double v_r = k.vin;
    const double i_off = r.il_valley; // diode current when the switch closes (0 in DCM)
    // Capacitive energy ∫v·C(v)dv and V·Q_rr per cycle (domain-notes "Diode", Erickson §4.3.2).
    lo.diode_switching =
        (diode.capacitive_energy(v_r) + diode.recovery_charge(i_off) * v_r) * r.f_sw;
    lo.diode_leakage = diode.leakage(v_r, t.diode) * v_r * r.duty;
    if (r.dcm && k.v0 > 0.0) {
        lo.diode_leakage += diode.leakage(k.v0, t.diode) * k.v0 * t_idle / period;
    }
    // Linearised clamped-inductive transitions (Mohan §2-7) + gate + output capacitance.
    const double i_on = r.dcm ? 0.0 : r.il_valley;
    lo.switch_switching =
        (0.5 * k.vin * (i_on * d.sw.rise_time + r.il_peak * d.sw.fall_time) +
         d.sw.gate_charge * d.sw.drive_voltage + 0.5 * d.sw.output_capacitance * k.vin * k.vin) *
        r.f_sw;
    lo.total = lo.inductor_copper + lo.inductor_core + lo.diode_conduction + lo.diode_switching +
               lo.diode_leakage + lo.switch_conduction + lo.switch_switching + lo.sense +
               lo.capacitor;
    // Supply power as the engine books it: the waveform's plus what the waveform does not carry.
    r.p_in = res.p_in + (lo.inductor_copper - copper_dc) + lo.inductor_core + lo.diode_switching +
             lo.diode_leakage + lo.switch_switching;
    r.efficiency = r.p_out / (r.p_out + lo.total);
    r.l_at_peak = l.inductance(r.il_peak, c.l_scale);
    return res;
}

SimulationResult simulate_corner(const design::Design& d, const parts::InductorModel& l,
                                 const parts::DiodeModel& diode, const converter::Corner& c,
                                 const converter::Setting& s,
                                 const converter::CornerResult& analytical,
                                 const SimulationOptions& opt) {
    return simulate_corner(d, l, diode, c, s, temperatures_from(analytical), opt, &analytical);
}

StartupResult simulate_startup(const Circuit& k, double duty, int max_cycles, int record_cycles) {
    StartupResult s;
    if (k.mode == design::ControlMode::pwm && !(duty > 0.0)) {
        SimulationOptions o;
        o.waveform_cycles = 0;
        const SimulationResult ss = simulate(k, o);
        if (ss.steady.status != converter::CornerStatus::ok) {
            throw std::runtime_error("start-up: no steady state to take the duty from: " +
                                     ss.steady.reason);
        }
        duty = ss.steady.duty;
    }
    Integrator in(k, 1e-9);
    double i = 0.0, vc = k.v0, t = 0.0;
    for (int n = 0; n < max_cycles; ++n) {
        if (n < record_cycles) {
            in.record = &s.waveform;
            in.record_offset = t;
        } else {
            in.record = nullptr;
        }
        const Cycle c = run_cycle(in, i, vc, duty);
        t += c.period;
        ++s.cycles;
        if (n == 0) {
            s.first_peak = c.ext.i_max;
            s.first_peak_over_isat = c.ext.i_max / k.isat;
        }
        i = c.y[kI];
        vc = c.y[kVc];
        const double avg = c.y[kQload] / c.period;
        if (!s.regulated && std::abs(avg - k.i_target) <= 0.02 * k.i_target) {
            s.time_to_regulation = t;
            s.regulated = true;
        }
        if (s.regulated && n + 1 >= record_cycles) {
            break;
        }
    }
    return s;
}

void write_waveform_csv(std::ostream& out, const Waveform& w) {
    out << "t_s,i_l_A,v_sw_V,i_d_A,i_load_A\n";
    out.precision(12);
    for (const WaveformSample& s : w) {
        out << s.t << ',' << s.i_l << ',' << s.v_sw << ',' << s.i_d << ',' << s.i_load << '\n';
    }
}

void write_waveform_csv(const std::filesystem::path& path, const Waveform& w) {
    std::ofstream f(path);
    if (!f) {
        throw std::runtime_error("cannot write the waveform to '" + path.string() +
                                 "': check that the folder exists and is writable");
    }
    write_waveform_csv(f, w);
    if (!f) {
        throw std::runtime_error("writing the waveform to '" + path.string() + "' failed");
    }
}

} // namespace coilsieve::simulation
