#include "simulation/ngspice.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>
#include <stdexcept>
#include <sys/wait.h>
#include <unistd.h>

namespace coilsieve::simulation {

namespace fs = std::filesystem;

namespace {

std::string quote(const std::string& s) {
    std::string q = "'";
    for (char ch : s) {
        if (ch == '\'') q += "'\\''";
        else q += ch;
    }
    return q + "'";
}

// A fresh private folder, removed when this goes out of scope.
class TempDir {
public:
    TempDir() {
        std::random_device rd;
        const auto stamp = std::chrono::steady_clock::now().time_since_epoch().count();
        for (int attempt = 0; attempt < 100; ++attempt) {
            std::ostringstream name;
            name << "coilsieve-ngspice-" << ::getpid() << '-' << stamp << '-' << rd();
            path_ = fs::temp_directory_path() / name.str();
            if (fs::create_directory(path_)) return;
        }
        throw std::runtime_error("cannot create a temporary folder for ngspice in " +
                                 fs::temp_directory_path().string());
    }
    ~TempDir() {
        std::error_code ec;
        fs::remove_all(path_, ec);
    }
    TempDir(const TempDir&) = delete;
    TempDir& operator=(const TempDir&) = delete;
    const fs::path& path() const { return path_; }

private:
    fs::path path_;
};

std::string slurp(const fs::path& p) {
    std::ifstream f(p);
    std::ostringstream ss;
    ss << f.rdbuf();
    return ss.str();
}

std::string tail(const std::string& s, std::size_t n) {
    return s.size() <= n ? s : "..." + s.substr(s.size() - n);
}

} // namespace

bool ngspice_available(const std::string& executable) {
    const std::string cmd = "command -v " + quote(executable) + " >/dev/null 2>&1";
    return std::system(cmd.c_str()) == 0;
}

NgspiceRun run_ngspice(const std::string& netlist, const std::string& data_file,
                       const std::string& executable) {
    TempDir dir;
    const fs::path cir = dir.path() / "circuit.cir";
    const fs::path log = dir.path() / "ngspice.log";
    {
        std::ofstream f(cir);
        f << netlist;
        if (!f) throw std::runtime_error("cannot write the netlist to " + cir.string());
    }
    const std::string cmd = "cd " + quote(dir.path().string()) + " && " + quote(executable) +
                            " -b circuit.cir >ngspice.log 2>&1";
    const int raw = std::system(cmd.c_str());
    NgspiceRun run;
    run.log = slurp(log);
    run.exit_status = raw == -1 ? -1 : (WIFEXITED(raw) ? WEXITSTATUS(raw) : 128);
    if (run.exit_status == 127) {
        throw std::runtime_error("ngspice was not found ('" + executable +
                                 "'): install it (Debian package 'ngspice') or give its path");
    }
    if (run.exit_status != 0) {
        throw std::runtime_error("ngspice failed (exit status " + std::to_string(run.exit_status) +
                                 "): " + tail(run.log, 1500));
    }
    std::ifstream data(dir.path() / data_file);
    if (!data) {
        throw std::runtime_error("ngspice wrote no data file '" + data_file +
                                 "': " + tail(run.log, 1500));
    }
    // wrdata: for each vector a (time, value) pair of columns.
    std::string line;
    while (std::getline(data, line)) {
        std::istringstream ls(line);
        std::vector<double> row;
        double v = 0.0;
        while (ls >> v) row.push_back(v);
        if (row.empty()) continue;
        if (run.columns.empty()) run.columns.resize(1 + row.size() / 2);
        if (row.size() / 2 + 1 != run.columns.size()) continue;
        run.columns[0].push_back(row[0]);
        for (std::size_t c = 1; c < run.columns.size(); ++c) {
            run.columns[c].push_back(row[2 * c - 1]);
        }
    }
    if (run.columns.empty() || run.columns[0].size() < 10) {
        throw std::runtime_error("ngspice data file '" + data_file +
                                 "' holds too few points: " + tail(run.log, 1500));
    }
    return run;
}

SpiceMeasurement measure(const Circuit& k, const NgspiceRun& run, int periods) {
    const auto& t = run.columns[0];
    const auto& il = run.columns.at(1);
    const auto& vsw = run.columns.at(2);
    const auto& id = run.columns.at(3);
    const auto& iload = run.columns.at(4);
    const auto& ivin = run.columns.at(5);
    const std::size_t n = t.size();
    const bool pwm = k.mode == design::ControlMode::pwm;

    // Switch turn-on and turn-off instants: the switch node crossing half the supply.
    const double level = 0.5 * k.vin;
    std::vector<double> ons, offs;
    for (std::size_t j = 1; j < n; ++j) {
        const double a = vsw[j - 1] - level, b = vsw[j] - level;
        if ((a < 0.0) != (b < 0.0)) {
            const double tc = t[j - 1] + (t[j] - t[j - 1]) * a / (a - b);
            (b >= 0.0 ? ons : offs).push_back(tc);
        }
    }
    double t_a = 0.0, t_b = 0.0;
    SpiceMeasurement m;
    if (pwm) {
        // Clock edges at whole multiples of the period.
        const double period = 1.0 / k.frequency;
        t_b = std::floor(t.back() / period + 1e-6) * period;
        m.periods = std::max(
            1, std::min(periods, static_cast<int>(std::floor((t_b - t.front()) / period + 1e-6))));
        t_a = t_b - m.periods * period;
    } else {
        if (ons.size() < 2) {
            throw std::runtime_error("ngspice run: fewer than two switching periods in the "
                                     "saved window; the converter did not switch");
        }
        m.periods = std::min<int>(periods, static_cast<int>(ons.size()) - 1);
        t_b = ons.back();
        t_a = ons[ons.size() - 1 - static_cast<std::size_t>(m.periods)];
    }
    const double span = t_b - t_a;
    m.f_sw = m.periods / span;

    // Trapezoidal integrals over [t_a, t_b] with linear interpolation at the ends.
    auto interp = [&](const std::vector<double>& y, std::size_t j, double tt) {
        const double w = (tt - t[j - 1]) / (t[j] - t[j - 1]);
        return y[j - 1] + w * (y[j] - y[j - 1]);
    };
    double s_il = 0, s_il2 = 0, s_load = 0, s_load2 = 0, s_id = 0, s_id2 = 0, s_pd = 0, s_sw = 0,
           s_sw2 = 0;
    m.il_peak = -1e300;
    m.il_valley = 1e300;
    double load_max = -1e300, load_min = 1e300;
    m.v_sw_min = 1e300;
    for (std::size_t j = 1; j < n; ++j) {
        const double lo = std::max(t[j - 1], t_a), hi = std::min(t[j], t_b);
        if (!(hi > lo)) continue;
        const double dt = hi - lo;
        // Conduction currents by switch state: the switch carries the inductor current while the
        // node is high, the diode while it is below ground; this leaves out the junction
        // capacitance's charging spikes (booked as diode switching loss, not conduction).
        struct P {
            double il, vsw, id, load, isw, iin;
        };
        auto at = [&](double tt) {
            const double v = interp(vsw, j, tt), i = interp(il, j, tt);
            const double d = interp(id, j, tt);
            return P{i,
                     v,
                     v < 0.0 ? std::max(d, 0.0) : 0.0,
                     interp(iload, j, tt),
                     v > level ? i : 0.0,
                     -interp(ivin, j, tt)};
        };
        const P p0 = at(lo), p1 = at(hi);
        auto trap = [&](double f0, double f1) { return 0.5 * (f0 + f1) * dt; };
        s_il += trap(p0.il, p1.il);
        s_il2 += trap(p0.il * p0.il, p1.il * p1.il);
        s_load += trap(p0.load, p1.load);
        s_load2 += trap(p0.load * p0.load, p1.load * p1.load);
        s_id += trap(p0.id, p1.id);
        s_id2 += trap(p0.id * p0.id, p1.id * p1.id);
        // Diode voltage anode (0 V) to cathode (switch node) is −v_sw.
        s_pd += trap(-p0.vsw * p0.id, -p1.vsw * p1.id);
        s_sw += trap(p0.iin, p1.iin);
        s_sw2 += trap(p0.isw * p0.isw, p1.isw * p1.isw);
        for (const P& p : {p0, p1}) {
            m.il_peak = std::max(m.il_peak, p.il);
            m.il_valley = std::min(m.il_valley, p.il);
            load_max = std::max(load_max, p.load);
            load_min = std::min(load_min, p.load);
            m.v_sw_min = std::min(m.v_sw_min, p.vsw);
        }
    }
    m.il_avg = s_il / span;
    m.il_rms = std::sqrt(s_il2 / span);
    m.il_ripple_pp = m.il_peak - m.il_valley;
    m.load_i_avg = s_load / span;
    m.load_ripple_pp = load_max - load_min;
    m.id_avg = s_id / span;
    m.id_rms = std::sqrt(std::max(s_id2, 0.0) / span);
    m.isw_rms = std::sqrt(s_sw2 / span);
    m.copper_dc = k.dcr * s_il2 / span;
    m.sense = k.r_sense * s_il2 / span;
    m.switch_conduction = k.r_on * s_sw2 / span;
    m.diode_conduction = s_pd / span;
    m.p_in = k.vin * s_sw / span;
    m.p_out = (k.v0 * s_load + k.r_load * s_load2) / span;
    // On-time: mean of the closed intervals inside the window.
    double on_sum = 0.0;
    int on_count = 0;
    for (double ton : ons) {
        if (ton < t_a - 1e-12 * span || ton >= t_b - 1e-12 * span) continue;
        const auto it = std::upper_bound(offs.begin(), offs.end(), ton);
        if (it == offs.end()) continue;
        on_sum += *it - ton;
        ++on_count;
    }
    if (pwm) {
        // Clock edges at whole periods: the on-time ends at the first fall after each edge
        // (later crossings are ringing of the idle node in discontinuous conduction).
        on_sum = 0.0;
        on_count = 0;
        const double period = 1.0 / k.frequency;
        for (int p = 0; p < m.periods; ++p) {
            const double edge = t_a + p * period;
            const auto it = std::upper_bound(offs.begin(), offs.end(), edge);
            if (it == offs.end() || *it > edge + period) continue;
            on_sum += *it - edge;
            ++on_count;
        }
    }
    m.t_on = on_count > 0 ? on_sum / on_count : 0.0;
    m.duty = m.t_on * m.f_sw;
    return m;
}

SpiceMeasurement simulate_ngspice(const Circuit& k, const NetlistOptions& o,
                                  const std::string& executable) {
    const NgspiceRun run = run_ngspice(write_netlist(k, o), o.data_file, executable);
    return measure(k, run, o.measure_periods);
}

} // namespace coilsieve::simulation
