#include "report/rank_report.hpp"

#include "report/table.hpp"
#include "studies/result_json.hpp"
#include "units/quantity.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

namespace coilsieve::report {

namespace u = coilsieve::units;

namespace {

std::string f(double v, u::Dimension d, int sig = 3) {
    return u::format(v, d, u::FormatOptions{sig, false, true});
}

std::string dims(double l, double w, double h) {
    std::ostringstream os;
    os.precision(3);
    os << l * 1e3 << "×" << w * 1e3 << "×" << h * 1e3 << " mm";
    return os.str();
}

std::string price(const std::optional<double>& p) {
    if (!p) return "-";
    std::ostringstream os;
    os.setf(std::ios::fixed);
    os.precision(2);
    os << *p;
    return os.str();
}

std::string sorted_counts(const std::map<std::string, std::size_t>& m) {
    std::vector<std::pair<std::string, std::size_t>> v(m.begin(), m.end());
    std::stable_sort(v.begin(), v.end(), [](auto& a, auto& b) { return a.second > b.second; });
    std::string s;
    for (const auto& [k, n] : v) s += (s.empty() ? "" : ", ") + k + " " + std::to_string(n);
    return s.empty() ? "none" : s;
}

} // namespace

std::string cautions(const design::Design& d) {
    std::string s = "Cautions: losses, temperatures and core losses are estimates from datasheet "
                    "figures and family defaults; confirm on the bench. Mains isolation and "
                    "safety approvals are not checked.";
    if (std::holds_alternative<loads::Battery>(d.load))
        s += " Battery charging: the charger's voltage limit, temperature monitoring and "
             "protection circuits are outside this ranking.";
    return s + "\n";
}

std::string rank_footer(const studies::RankResult& r) {
    const auto& c = r.counts;
    std::ostringstream os;
    os << "Pairs: " << c.pairs_total << " (" << c.inductors << " inductors × " << c.diodes
       << " diodes); after screening " << c.pairs_considered << "; tuned " << c.pairs_tuned
       << ", skipped by bounds " << c.pairs_pruned;
    if (c.pairs_probed > 0) os << " (with " << c.pairs_probed << " probed first)";
    os << "; feasible " << c.pairs_feasible << ", infeasible " << c.pairs_infeasible
       << "; on the Pareto set " << c.pareto << ".\n";
    os << "Screened out: " << c.inductors_screened << " inductors, " << c.diodes_screened
       << " diodes; by limit: " << sorted_counts(c.screened_by_limit) << ".\n";
    if (c.pairs_infeasible > 0)
        os << "Infeasible pairs by most broken limit: " << sorted_counts(c.infeasible_by_limit)
           << ".\n";
    if (c.errors > 0) os << "Pairs whose evaluation failed: " << c.errors << ".\n";
    std::ostringstream t;
    t.precision(3);
    t << r.elapsed_s;
    os << "Pareto axes: ";
    for (std::size_t i = 0; i < r.pareto_axes.size(); ++i)
        os << (i ? ", " : "") << r.pareto_axes[i];
    os << ". Time " << t.str() << " s, " << c.evaluations << " evaluations.\n";
    return os.str();
}

std::string no_feasible_text(const studies::RankResult& r) {
    const auto& c = r.counts;
    std::ostringstream os;
    os << "No inductor-diode pair meets every limit.\n";
    if (c.pairs_considered == 0) {
        os << "Screening removed ";
        if (c.inductors_screened == c.inductors) os << "every inductor";
        if (c.inductors_screened == c.inductors && c.diodes_screened == c.diodes) os << " and ";
        if (c.diodes_screened == c.diodes) os << "every diode";
        if (c.inductors_screened != c.inductors && c.diodes_screened != c.diodes)
            os << "too many parts";
        os << "; limits that removed parts: " << sorted_counts(c.screened_by_limit) << ".\n";
    } else {
        os << "All " << c.pairs_tuned << " pairs tuned break a limit at every setting; most "
           << "broken limits: " << sorted_counts(c.infeasible_by_limit) << ".\n";
        if (c.inductors_screened + c.diodes_screened > 0)
            os << "Screening had removed " << c.inductors_screened << " inductors and "
               << c.diodes_screened << " diodes (" << sorted_counts(c.screened_by_limit) << ").\n";
    }
    // Regulation is no limit a user can relax: it is the supply's headroom.
    const auto most = [](const std::map<std::string, std::size_t>& m) {
        return std::max_element(m.begin(), m.end(),
                                [](const auto& a, const auto& b) { return a.second < b.second; });
    };
    const auto& by = c.pairs_considered == 0 ? c.screened_by_limit : c.infeasible_by_limit;
    if (const auto top = most(by); top != by.end() && top->first == "regulation")
        os << "Regulation is the most common reason: the supply cannot drive the load current "
              "through "
              "the load, the switch, the sense resistor and the winding. Raise supply.min, lower "
              "the load's voltage or current, or use parts with less resistance.\n";
    else
        os << "Relax the limits named above (--limit NAME<=VALUE), widen the control range, or "
              "import parts with higher ratings.\n";
    return os.str();
}

std::string rank_text(const RankReportInput& in) {
    const auto& r = in.result;
    if (r.top.empty()) return no_feasible_text(r) + rank_footer(r) + cautions(in.design);
    const bool band = r.range.variable == optimisation::Variable::band;
    Table t({{"#", Align::right},
             {"inductor"},
             {"L", Align::right},
             {"DCR", Align::right},
             {"Isat", Align::right},
             {"body"},
             {"diode"},
             {"type"},
             {"Vrrm", Align::right},
             {"Vf", Align::right},
             {band ? "band" : "frequency", Align::right},
             {"switching", Align::right},
             {"ripple", Align::right},
             {"loss", Align::right},
             {"efficiency", Align::right},
             {"hottest", Align::right},
             {"Isat margin", Align::right},
             {"volume", Align::right},
             {"price", Align::right},
             {"Pareto"},
             {"tightest limit"}});
    for (const auto& p : r.top) {
        const auto& l = in.inductors[p.inductor];
        const auto& d = in.diodes[p.diode];
        const auto& b = p.tune.best;
        const auto fig = studies::figures_of(b.evaluation);
        std::string vf = p.diode_vf > 0.0 ? f(p.diode_vf, u::Dimension::voltage) : "-";
        const int digits = p.printed.digits > 0 ? p.printed.digits : 6;
        const double shown = p.printed.digits > 0 ? p.printed.value
                             : band               ? b.setting.band
                                                  : b.setting.frequency;
        std::string setting = band ? f(shown, u::Dimension::current, digits)
                                   : f(shown, u::Dimension::frequency, digits);
        std::string fsw = f(fig.f_sw_min, u::Dimension::frequency, 3) + "–" +
                          f(fig.f_sw_max, u::Dimension::frequency, 3);
        std::string binding = p.tune.has_binding
                                  ? p.tune.binding.limit + " (" +
                                        f(p.tune.binding.margin, u::Dimension::ratio, 2) + ")"
                                  : "-";
        t.add_row({std::to_string(p.rank),
                   l.id,
                   f(l.inductance, u::Dimension::inductance),
                   f(l.dcr_typ, u::Dimension::resistance),
                   f(l.isat, u::Dimension::current),
                   dims(l.length, l.width, l.height),
                   d.id,
                   std::string(parts::to_string(d.technology)),
                   f(d.vrrm, u::Dimension::voltage),
                   vf,
                   setting,
                   fsw,
                   f(b.objectives.ripple, u::Dimension::ratio),
                   f(b.objectives.loss, u::Dimension::power),
                   f(b.objectives.efficiency, u::Dimension::ratio),
                   f(fig.t_hottest, u::Dimension::temperature),
                   f(b.objectives.margin, u::Dimension::ratio),
                   f(b.objectives.size, u::Dimension::volume),
                   b.objectives.cost ? price(b.objectives.cost) : "-",
                   p.pareto ? "yes" : "",
                   binding});
    }
    std::string out = t.render();
    const bool unpriced_listed = std::any_of(r.top.begin(), r.top.end(), [](const auto& p) {
        return !p.tune.best.objectives.cost.has_value();
    });
    if (in.design.weights.cost > 0.0 && r.scales.cost_unpriced && unpriced_listed)
        out += "Price \"-\": a part has no price (or the two are in different currencies); such a "
               "pair is scored as if it cost " +
               price(r.scales.cost_unpriced) +
               ", the dearest priced inductor and diode together.\n";
    out += rank_footer(r);
    if (!in.study_name.empty()) out += "Saved as study " + in.study_name + ".\n";
    out += cautions(in.design);
    return out;
}

nlohmann::json rank_json(const RankReportInput& in) {
    nlohmann::json j = studies::results_to_json(in.result, in.inductors, in.diodes, true);
    j["study"] = in.study_name.empty() ? nlohmann::json(nullptr) : nlohmann::json(in.study_name);
    j["cautions"] = cautions(in.design);
    return j;
}

std::string rank_csv(const RankReportInput& in) {
    const auto& r = in.result;
    const bool band = r.range.variable == optimisation::Variable::band;
    Table t({{"rank"},
             {"inductor_source"},
             {"inductor"},
             {"diode_source"},
             {"diode"},
             {band ? "band_A" : "frequency_Hz"},
             {"loss_W"},
             {"efficiency"},
             {"ripple"},
             {"size_m3"},
             {"footprint_m2"},
             {"margin"},
             {"cost"},
             {"score"},
             {"pareto"},
             {"f_sw_min_Hz"},
             {"f_sw_max_Hz"},
             {"t_hottest_K"},
             {"binding_limit"}});
    const auto num = csv_number;
    for (const auto& p : r.top) {
        const auto& l = in.inductors[p.inductor];
        const auto& d = in.diodes[p.diode];
        const auto& b = p.tune.best;
        const auto& o = b.objectives;
        const auto fig = studies::figures_of(b.evaluation);
        t.add_row({std::to_string(p.rank), l.source, l.id, d.source, d.id,
                   num(band ? b.setting.band : b.setting.frequency), num(o.loss), num(o.efficiency),
                   num(o.ripple), num(o.size), num(o.footprint), num(o.margin),
                   o.cost ? num(*o.cost) : "", num(b.score), p.pareto ? "1" : "0",
                   num(fig.f_sw_min), num(fig.f_sw_max), num(fig.t_hottest),
                   p.tune.has_binding ? p.tune.binding.limit : ""});
    }
    return t.to_csv();
}

} // namespace coilsieve::report
