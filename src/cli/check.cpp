#include "cli/check.hpp"

#include "cli/rank.hpp"
#include "converter/evaluate.hpp"
#include "design/design_json.hpp"
#include "report/check_report.hpp"
#include "simulation/cycle_simulator.hpp"
#include "simulation/netlist.hpp"
#include "units/quantity.hpp"

#include <CLI/CLI.hpp>
#include <fstream>
#include <memory>
#include <ostream>

namespace coilsieve::cli {

namespace {

namespace u = coilsieve::units;

template <class Part>
Part pick(const std::vector<Part>& found, const std::string& key, const char* kind,
          const char* plural) {
    if (found.empty())
        throw UsageError(std::string("no ") + kind + " \"" + key +
                         "\" in the catalog; list them with `coilsieve parts list " + plural + "`");
    if (found.size() > 1) {
        std::string sources;
        for (const auto& p : found)
            sources += (sources.empty() ? "" : ", ") + p.source + ":" + p.id;
        throw UsageError(std::string(kind) + " \"" + key + "\" is in more than one source (" +
                         sources + "); write SOURCE:ID");
    }
    return found.front();
}

converter::Setting setting_from(const CheckOptions& o, const design::Design& d) {
    converter::Setting s = converter::default_setting(d);
    const bool hysteretic = d.control.mode == design::ControlMode::hysteretic;
    if (!o.band.empty()) {
        if (!hysteretic)
            throw UsageError("--band applies to hysteretic control; this design uses PWM "
                             "(give --frequency)");
        const double target = loads::target_current(d.load);
        try {
            s.band = o.band.find('%') != std::string::npos
                         ? u::parse(o.band, u::Dimension::ratio) * target
                         : u::parse(o.band, u::Dimension::current);
        } catch (const std::exception& e) {
            throw UsageError("--band \"" + o.band +
                             "\": give amperes (175mA) or a share of the "
                             "target current (25%): " +
                             e.what());
        }
        if (!(s.band > 0.0))
            throw UsageError("--band \"" + o.band + "\": the band must be above zero");
        check_fixed_band(s.band, d, "--band " + o.band);
    }
    if (!o.frequency.empty()) {
        if (hysteretic)
            throw UsageError("--frequency applies to PWM control; this design is hysteretic "
                             "(give --band)");
        try {
            s.frequency = u::parse(o.frequency, u::Dimension::frequency);
        } catch (const std::exception& e) {
            throw UsageError("--frequency \"" + o.frequency + "\": " + e.what());
        }
        if (!(s.frequency > 0.0))
            throw UsageError("--frequency \"" + o.frequency + "\": must be above zero");
    }
    return s;
}

} // namespace

int run_check(const CheckOptions& o, Context& ctx) {
    design::Design d;
    try {
        d = design::load_design_file(o.design_file);
    } catch (const design::DesignError& e) {
        throw UsageError(e.what()); // as in rank: the design file is part of the command's input
    }
    const converter::Setting s = setting_from(o, d);
    auto& store = ctx.store();
    const parts::Inductor l =
        pick(store.find_inductors(o.inductor), o.inductor, "inductor", "inductors");
    const parts::Diode diode = pick(store.find_diodes(o.diode), o.diode, "diode", "diodes");

    const converter::PairEvaluation e = converter::evaluate_pair(d, l, diode, s);
    const std::vector<converter::Corner> corners = converter::make_corners(d, l.tolerance);

    report::CheckReportInput in{d, l, diode, s, e, design::switch_default_notes(d.sw), {}, {}};

    if (!(l.length > 0.0 && l.width > 0.0 && l.height > 0.0))
        in.notes.push_back("Inductor \"" + l.id +
                           "\" has no body size in the catalog: its size and height are "
                           "unknown, its core loss is taken as zero, and a ranking leaves it "
                           "out (body_size).");

    const bool need_models = o.simulate || !o.waveform.empty() || !o.netlist.empty();
    if (need_models) {
        const auto lm = parts::make_model(l);
        const auto dm = parts::make_model(diode);
        // The nominal corner (the first nominal one that regulates) for the waveform and netlist.
        std::size_t nominal = corners.size();
        for (std::size_t k = 0; k < corners.size(); ++k)
            if (corners[k].nominal && e.corners[k].status == converter::CornerStatus::ok) {
                nominal = k;
                break;
            }
        if (o.simulate) {
            for (std::size_t k = 0; k < corners.size(); ++k) {
                report::SimulatedCorner sc;
                sc.corner = corners[k].name;
                if (e.corners[k].status != converter::CornerStatus::ok) continue;
                try {
                    const auto r = simulation::simulate_corner(
                        d, lm, dm, corners[k], converter::corner_setting(d, corners[k], s),
                        e.corners[k]);
                    sc.steady = r.steady;
                    sc.energy_balance = r.energy_balance;
                } catch (const std::exception& ex) {
                    sc.error = ex.what();
                }
                in.simulated.push_back(std::move(sc));
            }
        }
        if (!o.waveform.empty() || !o.netlist.empty()) {
            if (nominal == corners.size())
                throw std::runtime_error("no nominal corner regulates, so there is no waveform or "
                                         "netlist to write; see the check's violations");
            const auto& c = corners[nominal];
            const auto cs = converter::corner_setting(d, c, s);
            if (!o.waveform.empty()) {
                simulation::SimulationOptions so;
                so.waveform_cycles = 3;
                const auto r =
                    simulation::simulate_corner(d, lm, dm, c, cs, e.corners[nominal], so);
                simulation::write_waveform_csv(std::filesystem::path(o.waveform), r.waveform);
                in.notes.push_back("Waveform of corner \"" + c.name +
                                   "\" (3 steady-state cycles) "
                                   "written to " +
                                   o.waveform + ".");
            }
            if (!o.netlist.empty()) {
                const std::string text =
                    simulation::write_netlist(d, lm, dm, c, cs, e.corners[nominal]);
                std::ofstream f(o.netlist, std::ios::binary);
                const std::string hint = ": check that the folder exists and is writable";
                if (!f) throw std::runtime_error("cannot write the netlist to " + o.netlist + hint);
                f << text;
                f.close();
                if (!f)
                    throw std::runtime_error("writing the netlist to " + o.netlist + " failed" +
                                             hint);
                in.notes.push_back("ngspice netlist of corner \"" + c.name + "\" written to " +
                                   o.netlist + " (run: ngspice -b " + o.netlist + ").");
            }
        }
    }

    if (o.json) ctx.out() << report::check_json(in).dump(2) << "\n";
    else ctx.out() << report::check_text(in);
    return e.feasible ? exit_ok : exit_error;
}

std::vector<Command> setup_check(CLI::App& root) {
    auto o = std::make_shared<CheckOptions>();
    CLI::App* c = root.add_subcommand(
        "check", "Evaluate one inductor-diode pair on a design at every corner and limit");
    c->add_option("DESIGN", o->design_file, "design file (JSON)")
        ->required()
        ->check(CLI::ExistingFile);
    c->add_option("--inductor", o->inductor, "inductor ID (or SOURCE:ID)")->required();
    c->add_option("--diode", o->diode, "diode ID (or SOURCE:ID)")->required();
    auto* band = c->add_option("--band", o->band,
                               "hysteresis band: amperes (175mA) or a share of the target (25%)");
    auto* freq = c->add_option("--frequency", o->frequency, "PWM switching frequency (300kHz)");
    band->excludes(freq);
    c->add_flag("--simulate", o->simulate,
                "also run the time-domain simulator at every corner and compare");
    c->add_option("--waveform", o->waveform,
                  "write the nominal corner's steady-state waveform to this CSV file");
    c->add_option("--netlist", o->netlist,
                  "write the nominal corner as an ngspice netlist to this file");
    c->add_flag("--json", o->json, "print the result as JSON (SI units)");
    c->footer("Example:\n  coilsieve check data/examples/reading-lamp.json --inductor "
              "GEN-L-SDF-5x5x4-47u "
              "--diode GEN-D-SCH-40V-2A-SMA --band 30%\nExit code 0 when every limit holds, 1 when "
              "one is "
              "broken.");
    return {{c, [o](Context& ctx) { return run_check(*o, ctx); }}};
}

} // namespace coilsieve::cli
