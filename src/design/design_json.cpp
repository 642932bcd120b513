#include "design/design_json.hpp"

#include "units/quantity.hpp"

#include <algorithm>
#include <array>
#include <charconv>
#include <cmath>
#include <fstream>
#include <initializer_list>
#include <sstream>
#include <type_traits>

namespace coilsieve::design {

using nlohmann::json;
using units::Dimension;

namespace {

constexpr double t25 = 298.15; // K

// Defaults of a generic small MOSFET (a 30–60 V, ~100 mΩ logic-level part; common practice).
const Switch switch_defaults{};

std::string quote(const json& v) { return v.dump(); }

std::string shortest(double x) {
    std::array<char, 64> buf{};
    const auto r = std::to_chars(buf.data(), buf.data() + buf.size(), x);
    return std::string(buf.data(), r.ptr);
}

std::string with_article(std::string_view noun) {
    const bool vowel =
        !noun.empty() && std::string_view("aeiou").find(noun.front()) != std::string_view::npos;
    return std::string(vowel ? "an " : "a ") + std::string(noun);
}

// An example of the spelling a field takes, for messages.
std::string example(Dimension d) {
    switch (d) {
    case Dimension::ratio:
        return "\"25%\"";
    case Dimension::inductance:
        return "\"22uH\"";
    case Dimension::resistance:
        return "\"0.2ohm\"";
    case Dimension::current:
        return "\"700mA\"";
    case Dimension::voltage:
        return "\"24V\"";
    case Dimension::capacitance:
        return "\"10uF\"";
    case Dimension::frequency:
        return "\"250kHz\"";
    case Dimension::time:
        return "\"100ns\"";
    case Dimension::temperature:
        return "\"55C\"";
    case Dimension::length:
        return "\"5mm\"";
    case Dimension::charge:
        return "\"6nC\"";
    case Dimension::battery_capacity:
        return "\"2.5Ah\"";
    case Dimension::voltage_per_kelvin:
        return "\"-2mV/K\"";
    default: {
        units::FormatOptions o;
        o.ascii = true;
        std::string s = units::format(1.0, d, o);
        s.erase(std::remove(s.begin(), s.end(), ' '), s.end());
        return "\"" + s + "\"";
    }
    }
}

std::string expected(Dimension d) {
    std::string s = with_article(units::dimension_name(d));
    const auto sym = units::unit_symbol(d);
    if (!sym.empty()) s += " (" + std::string(sym) + ")";
    return s;
}

constexpr std::array all_dimensions{
    Dimension::ratio,
    Dimension::inductance,
    Dimension::resistance,
    Dimension::current,
    Dimension::voltage,
    Dimension::capacitance,
    Dimension::frequency,
    Dimension::power,
    Dimension::time,
    Dimension::temperature,
    Dimension::temperature_difference,
    Dimension::length,
    Dimension::area,
    Dimension::volume,
    Dimension::charge,
    Dimension::energy,
    Dimension::thermal_resistance,
    Dimension::mass,
    Dimension::battery_capacity,
    Dimension::voltage_per_kelvin,
};

bool parses_as(const std::string& s, Dimension d) {
    try {
        (void)units::parse(s, d);
        return true;
    } catch (const units::ParseError&) {
        return false;
    }
}

std::size_t edit_distance(std::string_view a, std::string_view b) {
    std::vector<std::size_t> row(b.size() + 1);
    for (std::size_t j = 0; j <= b.size(); ++j) row[j] = j;
    for (std::size_t i = 1; i <= a.size(); ++i) {
        std::size_t diag = row[0];
        row[0] = i;
        for (std::size_t j = 1; j <= b.size(); ++j) {
            const std::size_t up = row[j];
            row[j] =
                std::min({row[j] + 1, row[j - 1] + 1, diag + (a[i - 1] == b[j - 1] ? 0u : 1u)});
            diag = up;
        }
    }
    return row[b.size()];
}

std::string join(std::initializer_list<std::string_view> names) {
    std::string s;
    for (auto n : names) {
        if (!s.empty()) s += ", ";
        s += n;
    }
    return s;
}

std::string child(const std::string& path, std::string_view key) {
    return path.empty() ? std::string(key) : path + "." + std::string(key);
}

// Reads one design file, carrying the file name for messages.
class Reader {
public:
    explicit Reader(std::string file) : file_(std::move(file)) {}

    [[noreturn]] void fail(const std::string& path, const std::string& msg) const {
        throw DesignError(file_ + ": " + (path.empty() ? std::string("(top level)") : path) + ": " +
                          msg);
    }

    void check_object(const json& v, const std::string& path, std::string_view what) const {
        if (!v.is_object())
            fail(path, "expected an object " + std::string(what) + ", got " + quote(v));
    }

    // Rejects keys that are not known, naming the known ones (catches typos).
    void check_keys(const json& obj, const std::string& path,
                    std::initializer_list<std::string_view> known) const {
        for (auto it = obj.begin(); it != obj.end(); ++it) {
            const std::string& key = it.key();
            if (std::find(known.begin(), known.end(), key) != known.end()) continue;
            std::string msg = "unknown key \"" + key + "\"";
            std::string_view best;
            std::size_t best_d = 3;
            for (auto k : known) {
                const std::size_t dist = edit_distance(key, k);
                if (dist < best_d) {
                    best_d = dist;
                    best = k;
                }
            }
            if (!best.empty()) msg += " (did you mean \"" + std::string(best) + "\"?)";
            msg += "; known keys here: " + join(known);
            fail(child(path, key), msg);
        }
    }

    const json* find(const json& obj, std::string_view key) const {
        const auto it = obj.find(std::string(key));
        return it == obj.end() ? nullptr : &*it;
    }

    const json& require(const json& obj, const std::string& path, std::string_view key,
                        const std::string& hint) const {
        const json* v = find(obj, key);
        if (!v) fail(child(path, key), "missing; " + hint);
        return *v;
    }

    // A quantity: a string with units or a bare number in SI units (temperatures in °C).
    double quantity(const json& v, const std::string& path, Dimension d) const {
        double x = 0.0;
        if (v.is_number()) {
            x = v.get<double>();
            if (d == Dimension::temperature) x = units::celsius(x);
        } else if (v.is_string()) {
            const std::string s = v.get<std::string>();
            try {
                x = units::parse(s, d);
            } catch (const units::ParseError& e) {
                // A temperature below 0 K is a temperature, wrong: no guess at another dimension.
                if (std::string_view(e.what()).find("below absolute zero") !=
                    std::string_view::npos)
                    fail(path, e.what());
                std::vector<std::string> matches;
                for (Dimension other : all_dimensions) {
                    if (other != d && parses_as(s, other))
                        matches.emplace_back(with_article(units::dimension_name(other)));
                }
                if (!matches.empty()) {
                    std::string as = matches.front();
                    for (std::size_t k = 1; k < matches.size(); ++k) as += " or " + matches[k];
                    fail(path, quote(v) + " is " + as + ", expected " + expected(d) + ", e.g. " +
                                   example(d));
                }
                fail(path, e.what());
            }
        } else {
            fail(path, "expected " + expected(d) + " as a string such as " + example(d) +
                           " or a number in SI units, got " + quote(v));
        }
        if (!std::isfinite(x)) fail(path, quote(v) + " is not a finite number");
        return x;
    }

    double positive(const json& v, const std::string& path, Dimension d) const {
        const double x = quantity(v, path, d);
        if (!(x > 0.0)) fail(path, quote(v) + " must be positive");
        return x;
    }

    double non_negative(const json& v, const std::string& path, Dimension d) const {
        const double x = quantity(v, path, d);
        if (x < 0.0) fail(path, quote(v) + " must not be negative");
        return x;
    }

    int count(const json& v, const std::string& path) const {
        if (!v.is_number_integer() || v.get<long long>() < 1 || v.get<long long>() > 10000)
            fail(path, "expected a whole number from 1 up, such as 4, got " + quote(v));
        return static_cast<int>(v.get<long long>());
    }

    std::string text(const json& v, const std::string& path) const {
        if (!v.is_string()) fail(path, "expected a string, got " + quote(v));
        return v.get<std::string>();
    }

    Design read(const json& j, std::string_view file_name) const {
        check_object(j, "", "with the design (supply, load, control, ...)");
        check_keys(j, "",
                   {"name", "supply", "load", "switch", "sense_resistor", "output_capacitor",
                    "control", "ambient", "limits", "weights", "pareto"});
        Design d;
        if (const json* v = find(j, "name")) {
            d.name = text(*v, "name");
        } else {
            d.name = std::filesystem::path(std::string(file_name)).stem().string();
            if (d.name.empty()) d.name = "design";
        }
        d.supply = supply(require(j, "", "supply",
                                  "give {\"min\": \"20V\", \"nom\": \"24V\", "
                                  "\"max\": \"28V\"}"));
        d.load = load(require(j, "", "load",
                              "give e.g. {\"type\": \"led\", \"count\": 4, \"vf\": "
                              "\"3.05V\", \"current\": \"700mA\"}"));
        if (const json* v = find(j, "switch")) d.sw = switch_(*v);
        else d.sw = defaulted_switch();
        if (const json* v = find(j, "sense_resistor"))
            d.sense_resistor = non_negative(*v, "sense_resistor", Dimension::resistance);
        if (const json* v = find(j, "output_capacitor")) d.output_capacitor = capacitor(*v);
        if (const json* v = find(j, "ambient")) d.ambient = ambient(*v);
        if (const json* v = find(j, "limits")) d.limits = limits(*v);
        if (const json* v = find(j, "weights")) d.weights = weights(*v);
        if (const json* v = find(j, "pareto")) d.pareto = pareto(*v);
        d.control = control(require(j, "", "control",
                                    "give {\"mode\": \"hysteretic\", \"band\": \"25%\"} or "
                                    "{\"mode\": \"pwm\", \"frequency\": \"250kHz\"}"),
                            loads::target_current(d.load));
        cross_checks(d);
        return d;
    }

private:
    std::string file_;

    Supply supply(const json& v) const {
        const std::string p = "supply";
        check_object(v, p, "{\"min\": \"20V\", \"nom\": \"24V\", \"max\": \"28V\"}");
        check_keys(v, p, {"min", "nom", "max"});
        Supply s;
        s.min = positive(require(v, p, "min", "give the lowest input voltage, e.g. \"20V\""),
                         "supply.min", Dimension::voltage);
        s.nom = positive(require(v, p, "nom", "give the nominal input voltage, e.g. \"24V\""),
                         "supply.nom", Dimension::voltage);
        s.max = positive(require(v, p, "max", "give the highest input voltage, e.g. \"28V\""),
                         "supply.max", Dimension::voltage);
        if (!(s.min <= s.nom && s.nom <= s.max))
            fail(p, "min <= nom <= max must hold, got min " + fmt_v(s.min) + ", nom " +
                        fmt_v(s.nom) + ", max " + fmt_v(s.max));
        return s;
    }

    static std::string fmt_v(double v) { return units::format(v, Dimension::voltage); }

    loads::Load load(const json& v) const {
        const std::string p = "load";
        check_object(v, p, "describing the load (\"type\": \"led\", \"battery\" or \"sink\")");
        const std::string type =
            text(require(v, p, "type", "give \"led\", \"battery\" or \"sink\""), "load.type");
        if (type == "led") {
            check_keys(v, p, {"type", "count", "vf", "rd", "current", "vf_tempco"});
            loads::LedString s;
            s.count = count(require(v, p, "count", "give the number of LEDs in series, e.g. 4"),
                            "load.count");
            s.vf = positive(require(v, p, "vf", "give the forward voltage per LED, e.g. \"3.05V\""),
                            "load.vf", Dimension::voltage);
            if (const json* x = find(v, "rd"))
                s.rd = non_negative(*x, "load.rd", Dimension::resistance);
            else s.rd = 0.0;
            s.current = positive(require(v, p, "current", "give the LED current, e.g. \"700mA\""),
                                 "load.current", Dimension::current);
            if (const json* x = find(v, "vf_tempco"))
                s.vf_tempco = quantity(*x, "load.vf_tempco", Dimension::voltage_per_kelvin);
            if (s.rd * s.current >= s.vf)
                fail("load.rd", "rd x current (" + fmt_v(s.rd * s.current) +
                                    ") must be below vf (" + fmt_v(s.vf) + ")");
            return s;
        }
        if (type == "battery") {
            check_keys(v, p,
                       {"type", "chemistry", "cells", "capacity", "charge_current",
                        "termination_current", "precharge_current", "internal_resistance"});
            loads::Battery b;
            const std::string chem =
                text(require(v, p, "chemistry", "give li-ion, li-ion-hv, lifepo4 or lead-acid"),
                     "load.chemistry");
            if (chem == "li-ion") b.chemistry = loads::Chemistry::li_ion;
            else if (chem == "li-ion-hv") b.chemistry = loads::Chemistry::li_ion_hv;
            else if (chem == "lifepo4") b.chemistry = loads::Chemistry::lifepo4;
            else if (chem == "lead-acid") b.chemistry = loads::Chemistry::lead_acid;
            else
                fail("load.chemistry", "unknown chemistry \"" + chem +
                                           "\"; known: li-ion, li-ion-hv, lifepo4, lead-acid");
            b.cells = count(require(v, p, "cells", "give the number of cells in series, e.g. 2"),
                            "load.cells");
            b.capacity = positive(require(v, p, "capacity", "give the capacity, e.g. \"2.5Ah\""),
                                  "load.capacity", Dimension::battery_capacity);
            b.charge_current =
                positive(require(v, p, "charge_current", "give the CC current, e.g. \"2A\""),
                         "load.charge_current", Dimension::current);
            const auto& pre = loads::preset(b.chemistry);
            if (const json* x = find(v, "termination_current"))
                b.termination_current =
                    positive(*x, "load.termination_current", Dimension::current);
            else b.termination_current = pre.termination_fraction * b.capacity / 3600.0;
            if (!(b.termination_current < b.charge_current))
                fail("load.termination_current",
                     units::format(b.termination_current, Dimension::current) +
                         " must be below charge_current " +
                         units::format(b.charge_current, Dimension::current));
            if (const json* x = find(v, "precharge_current"))
                b.precharge_current = positive(*x, "load.precharge_current", Dimension::current);
            else b.precharge_current = pre.precharge_fraction * b.charge_current;
            if (b.precharge_current > b.charge_current)
                fail("load.precharge_current",
                     "must not exceed charge_current " +
                         units::format(b.charge_current, Dimension::current));
            if (const json* x = find(v, "internal_resistance"))
                b.internal_resistance =
                    non_negative(*x, "load.internal_resistance", Dimension::resistance);
            return b;
        }
        if (type == "sink") {
            check_keys(v, p, {"type", "voltage", "resistance", "current"});
            loads::Sink s;
            s.voltage = non_negative(require(v, p, "voltage", "give the sink voltage, e.g. \"5V\""),
                                     "load.voltage", Dimension::voltage);
            if (const json* x = find(v, "resistance"))
                s.resistance = non_negative(*x, "load.resistance", Dimension::resistance);
            s.current = positive(require(v, p, "current", "give the target current, e.g. \"1A\""),
                                 "load.current", Dimension::current);
            return s;
        }
        fail("load.type", "unknown load type \"" + type + "\"; known: led, battery, sink");
    }

    static Switch defaulted_switch() {
        Switch s;
        s.defaulted = {"on_resistance", "on_resistance_tempco", "rise_time",         "fall_time",
                       "gate_charge",   "drive_voltage",        "output_capacitance"};
        return s;
    }

    Switch switch_(const json& v) const {
        const std::string p = "switch";
        check_object(v, p, "describing the switch (on_resistance, rise_time, ...)");
        check_keys(v, p,
                   {"on_resistance", "on_resistance_tempco", "rise_time", "fall_time",
                    "gate_charge", "drive_voltage", "output_capacitance"});
        Switch s;
        auto field = [&](std::string_view key, double& out, Dimension d) {
            if (const json* x = find(v, key)) out = non_negative(*x, child(p, key), d);
            else s.defaulted.emplace_back(key);
        };
        field("on_resistance", s.on_resistance, Dimension::resistance);
        field("on_resistance_tempco", s.on_resistance_tempco, Dimension::dimensionless);
        field("rise_time", s.rise_time, Dimension::time);
        field("fall_time", s.fall_time, Dimension::time);
        field("gate_charge", s.gate_charge, Dimension::charge);
        field("drive_voltage", s.drive_voltage, Dimension::voltage);
        field("output_capacitance", s.output_capacitance, Dimension::capacitance);
        return s;
    }

    OutputCapacitor capacitor(const json& v) const {
        const std::string p = "output_capacitor";
        check_object(v, p, "{\"capacitance\": \"10uF\", \"esr\": \"20mohm\"}");
        check_keys(v, p, {"capacitance", "esr"});
        OutputCapacitor c;
        c.capacitance = positive(require(v, p, "capacitance", "give e.g. \"10uF\""),
                                 "output_capacitor.capacitance", Dimension::capacitance);
        if (const json* x = find(v, "esr"))
            c.esr = non_negative(*x, "output_capacitor.esr", Dimension::resistance);
        return c;
    }

    // A hysteresis band: "25%" (or a bare number, a fraction) or a current "0.2A".
    struct Band {
        double value;
        bool fraction;
    };
    Band band(const json& v, const std::string& path) const {
        if (v.is_number()) return {quantity(v, path, Dimension::ratio), true};
        if (v.is_string()) {
            const std::string s = v.get<std::string>();
            if (parses_as(s, Dimension::ratio)) return {units::parse(s, Dimension::ratio), true};
            if (parses_as(s, Dimension::current))
                return {units::parse(s, Dimension::current), false};
        }
        std::string what = quote(v);
        if (v.is_string()) {
            for (Dimension other : all_dimensions) {
                if (parses_as(v.get<std::string>(), other)) {
                    what += " is " + with_article(units::dimension_name(other)) + ";";
                    break;
                }
            }
        }
        fail(path, what + " expected a fraction of the target current such as \"25%\" or a "
                          "current such as \"0.2A\"");
    }

    Control control(const json& v, double target) const {
        const std::string p = "control";
        check_object(v, p, "{\"mode\": \"hysteretic\", ...} or {\"mode\": \"pwm\", ...}");
        const std::string mode =
            text(require(v, p, "mode", "give \"hysteretic\" or \"pwm\""), "control.mode");
        Control c;
        if (mode == "hysteretic") {
            check_keys(v, p, {"mode", "band", "delay", "band_range"});
            c.mode = ControlMode::hysteretic;
            std::optional<Band> b;
            if (const json* x = find(v, "band")) b = band(*x, "control.band");
            std::optional<std::pair<Band, Band>> range;
            if (const json* x = find(v, "band_range")) {
                if (!x->is_array() || x->size() != 2)
                    fail("control.band_range", "expected two values [low, high] such as "
                                               "[\"5%\", \"60%\"], got " +
                                                   quote(*x));
                range.emplace(band((*x)[0], "control.band_range[0]"),
                              band((*x)[1], "control.band_range[1]"));
                if (range->first.fraction != range->second.fraction)
                    fail("control.band_range", "both ends must be fractions (\"5%\") or both "
                                               "currents (\"0.05A\"), got " +
                                                   quote(*x));
                if (!(range->first.value > 0.0 && range->first.value < range->second.value))
                    fail("control.band_range", "expected 0 < low < high, got " + quote(*x));
            }
            const bool fraction = b ? b->fraction : (range ? range->first.fraction : true);
            const double scale = fraction ? 1.0 : target; // default fractions -> amperes
            c.band_is_fraction = fraction;
            c.band = b ? b->value : 0.2 * scale;
            if (range) {
                if (range->first.fraction != fraction)
                    fail("control.band_range",
                         "band is given as " + std::string(fraction ? "a fraction" : "a current") +
                             "; write band_range the same way");
                c.band_min = range->first.value;
                c.band_max = range->second.value;
            } else {
                // Default tuning range 5–60 % of the target, widened to hold a given band.
                c.band_min = std::min(0.05 * scale, c.band);
                c.band_max = std::max(0.6 * scale, c.band);
            }
            const double band_a = fraction ? c.band * target : c.band;
            if (!(c.band > 0.0)) fail("control.band", "must be positive");
            if (!(band_a < 2.0 * target))
                fail("control.band", "a band of " + units::format(band_a, Dimension::current) +
                                         " p-p around " +
                                         units::format(target, Dimension::current) +
                                         " would take the valley below zero; keep it under 200 %");
            if (c.band < c.band_min || c.band > c.band_max)
                fail("control.band", "conflicts with band_range: the band must lie inside it");
            if (c.band_max * (fraction ? target : 1.0) >= 2.0 * target)
                fail("control.band_range", "the upper end must stay under 200 % of the target "
                                           "current");
            if (const json* x = find(v, "delay"))
                c.delay = non_negative(*x, "control.delay", Dimension::time);
        } else if (mode == "pwm") {
            check_keys(v, p, {"mode", "frequency", "frequency_range"});
            c.mode = ControlMode::pwm;
            c.frequency = positive(require(v, p, "frequency",
                                           "give the switching frequency in "
                                           "pwm mode, e.g. \"250kHz\""),
                                   "control.frequency", Dimension::frequency);
            if (const json* x = find(v, "frequency_range")) {
                if (!x->is_array() || x->size() != 2)
                    fail("control.frequency_range", "expected two values [low, high] such as "
                                                    "[\"20kHz\", \"2MHz\"], got " +
                                                        quote(*x));
                c.frequency_min =
                    positive((*x)[0], "control.frequency_range[0]", Dimension::frequency);
                c.frequency_max =
                    positive((*x)[1], "control.frequency_range[1]", Dimension::frequency);
                if (!(c.frequency_min < c.frequency_max))
                    fail("control.frequency_range", "expected low < high, got " + quote(*x));
            }
            if (c.frequency < c.frequency_min || c.frequency > c.frequency_max)
                fail("control.frequency", "conflicts with frequency_range: the frequency must "
                                          "lie inside it");
        } else {
            fail("control.mode", "unknown mode \"" + mode + "\"; known: hysteretic, pwm");
        }
        return c;
    }

    Ambient ambient(const json& v) const {
        const std::string p = "ambient";
        check_object(v, p, "{\"max\": \"55C\", \"min\": \"0C\"}");
        check_keys(v, p, {"max", "min"});
        Ambient a;
        a.max = quantity(require(v, p, "max",
                                 "give the highest ambient temperature, e.g. "
                                 "\"55C\""),
                         "ambient.max", Dimension::temperature);
        if (const json* x = find(v, "min"))
            a.min = quantity(*x, "ambient.min", Dimension::temperature);
        if (a.max <= 0.0 || (a.min && *a.min <= 0.0))
            fail(p, "temperatures must be above absolute zero");
        // The widest temperature grade of common passive parts, -55 °C to +150 °C (AEC-Q200
        // grade 0, from memory): the part models (DCR(T), leakage, V_f(T)) are not meant beyond.
        for (const auto& [t, name] :
             {std::pair{std::optional<double>(a.max), "max"}, std::pair{a.min, "min"}})
            if (t && (*t < units::celsius(-55.0) || *t > units::celsius(150.0)))
                fail(p + "." + name, units::format(*t, Dimension::temperature) +
                                         " is outside -55 °C to 150 °C, the widest temperature "
                                         "grade of common parts; give an ambient in that range");
        if (a.min && *a.min > a.max)
            fail(p, "min must not be above max, got min " +
                        units::format(*a.min, Dimension::temperature) + ", max " +
                        units::format(a.max, Dimension::temperature));
        return a;
    }

    double fraction_in(const json& v, const std::string& path, bool allow_one) const {
        const double x = quantity(v, path, Dimension::ratio);
        if (!(x > 0.0 && (allow_one ? x <= 1.0 : x < 1.0)))
            fail(path, quote(v) + std::string(allow_one ? " must be in (0, 1], e.g. 0.8"
                                                        : " must be between 0 and 100 %"));
        return x;
    }

    Limits limits(const json& v) const {
        const std::string p = "limits";
        check_object(v, p, "of limits");
        check_keys(v, p,
                   {"load_ripple", "current_error", "f_sw_min", "f_sw_max", "t_on_min", "t_off_min",
                    "isat_derating", "vrrm_derating", "diode_current_derating", "tj_max",
                    "t_inductor_max", "height_max", "footprint_max", "efficiency_min"});
        Limits l;
        if (const json* x = find(v, "load_ripple"))
            l.load_ripple = positive(*x, "limits.load_ripple", Dimension::ratio);
        if (const json* x = find(v, "current_error"))
            l.current_error = positive(*x, "limits.current_error", Dimension::ratio);
        if (const json* x = find(v, "f_sw_min"))
            l.f_sw_min = positive(*x, "limits.f_sw_min", Dimension::frequency);
        if (const json* x = find(v, "f_sw_max"))
            l.f_sw_max = positive(*x, "limits.f_sw_max", Dimension::frequency);
        if (const json* x = find(v, "t_on_min"))
            l.t_on_min = positive(*x, "limits.t_on_min", Dimension::time);
        if (const json* x = find(v, "t_off_min"))
            l.t_off_min = positive(*x, "limits.t_off_min", Dimension::time);
        if (const json* x = find(v, "isat_derating"))
            l.isat_derating = fraction_in(*x, "limits.isat_derating", true);
        if (const json* x = find(v, "vrrm_derating"))
            l.vrrm_derating = fraction_in(*x, "limits.vrrm_derating", true);
        if (const json* x = find(v, "diode_current_derating"))
            l.diode_current_derating = fraction_in(*x, "limits.diode_current_derating", true);
        if (const json* x = find(v, "tj_max"))
            l.tj_max = quantity(*x, "limits.tj_max", Dimension::temperature);
        if (const json* x = find(v, "t_inductor_max"))
            l.t_inductor_max = quantity(*x, "limits.t_inductor_max", Dimension::temperature);
        if (const json* x = find(v, "height_max"))
            l.height_max = positive(*x, "limits.height_max", Dimension::length);
        if (const json* x = find(v, "footprint_max"))
            l.footprint_max = positive(*x, "limits.footprint_max", Dimension::area);
        if (const json* x = find(v, "efficiency_min"))
            l.efficiency_min = fraction_in(*x, "limits.efficiency_min", false);
        if (l.f_sw_max && !(l.f_sw_min < *l.f_sw_max))
            fail("limits.f_sw_min",
                 "conflicts with f_sw_max: " + units::format(l.f_sw_min, Dimension::frequency) +
                     " is not below " + units::format(*l.f_sw_max, Dimension::frequency));
        return l;
    }

    Weights weights(const json& v) const {
        const std::string p = "weights";
        check_object(v, p,
                     "{\"loss\": 1, \"size\": 1, \"ripple\": 0.5, \"margin\": 0.5, "
                     "\"cost\": 0}");
        check_keys(v, p, {"loss", "size", "ripple", "margin", "cost"});
        // An empty object names no weight: it means the defaults, as no object does.
        if (v.empty()) return Weights{};
        // A weights object names every weight that counts; the ones left out are zero.
        Weights w{0.0, 0.0, 0.0, 0.0, 0.0};
        auto field = [&](std::string_view key, double& out) {
            const json* x = find(v, key);
            if (!x) return;
            if (!x->is_number() || !std::isfinite(x->get<double>()) || x->get<double>() < 0.0)
                fail(child(p, key),
                     "expected a non-negative number such as 1 or 0.5, got " + quote(*x));
            out = x->get<double>();
        };
        for (const Objective o : all_objectives()) field(objective_name(o), weight_of(w, o));
        if (w.loss + w.size + w.ripple + w.margin + w.cost <= 0.0)
            fail(p, "all weights are zero; give at least one positive weight, e.g. \"loss\": 1");
        return w;
    }

    std::vector<Objective> pareto(const json& v) const {
        const std::string p = "pareto";
        if (!v.is_array())
            fail(p, "expected a list of objectives such as [\"loss\", \"size\"], got " + quote(v));
        std::vector<std::string> names;
        for (std::size_t i = 0; i < v.size(); ++i)
            names.push_back(text(v[i], p + "[" + std::to_string(i) + "]"));
        try {
            return pareto_from_names(names);
        } catch (const ObjectiveListError& e) {
            fail(e.index == std::string::npos ? p : p + "[" + std::to_string(e.index) + "]",
                 e.what());
        }
        return {};
    }

    static std::string load_noun(const loads::Load& l) {
        if (std::holds_alternative<loads::LedString>(l)) return "the LED string";
        if (std::holds_alternative<loads::Battery>(l)) return "the battery";
        return "the sink";
    }

    // Physically impossible designs: a buck cannot put out more than it takes in. The worst
    // load point over the hot and cold ambient is reported.
    void cross_checks(const Design& d) const {
        std::vector<double> temps{d.ambient.max};
        temps.push_back(d.ambient.min.value_or(std::min(d.ambient.max, t25)));
        double worst = -1.0, worst_v = 0.0, worst_drops = 0.0, worst_t = 0.0;
        loads::LoadPoint worst_pt;
        for (double t : temps) {
            for (const auto& pt : loads::load_points(d.load, t)) {
                const double v_load = pt.v0 + pt.r * pt.current;
                const double drops = pt.current * (d.sw.on_resistance + d.sense_resistor);
                if (v_load + drops - d.supply.min > worst) {
                    worst = v_load + drops - d.supply.min;
                    worst_v = v_load;
                    worst_drops = drops;
                    worst_t = t;
                    worst_pt = pt;
                }
            }
        }
        if (worst >= 0.0) {
            std::string msg = load_noun(d.load) + " needs " +
                              units::format(worst_v, Dimension::voltage) + " at " +
                              units::format(worst_pt.current, Dimension::current);
            if (std::holds_alternative<loads::Battery>(d.load)) msg += " (" + worst_pt.name + ")";
            msg += " and " + units::format(worst_t, Dimension::temperature);
            if (worst_drops > 0.0)
                msg += ", plus " + units::format(worst_drops, Dimension::voltage) +
                       " across the switch and sense resistor,";
            msg += " but supply.min is " + units::format(d.supply.min, Dimension::voltage) +
                   ": a buck cannot step up; raise the supply or lower the load voltage";
            fail("supply.min", msg);
        }
        auto above_ambient = [&](const std::optional<double>& lim, const char* name) {
            if (lim && *lim <= d.ambient.max)
                fail(std::string("limits.") + name,
                     units::format(*lim, Dimension::temperature) + " is not above ambient.max " +
                         units::format(d.ambient.max, Dimension::temperature) +
                         ": no part could meet it");
        };
        above_ambient(d.limits.tj_max, "tj_max");
        above_ambient(d.limits.t_inductor_max, "t_inductor_max");
        {
            // Every period holds an on-time and an off-time, and no period may be longer than
            // 1/f_sw_min.
            const double on = shortest_on_time(d), off = shortest_off_time(d);
            if ((d.limits.t_on_min || d.limits.t_off_min) && on + off >= 1.0 / d.limits.f_sw_min)
                fail(d.limits.t_on_min ? "limits.t_on_min" : "limits.t_off_min",
                     "the shortest on-time " + units::format(on, Dimension::time) +
                         " and off-time " + units::format(off, Dimension::time) +
                         " (the limits, or the switch's rise plus fall time where larger) "
                         "leave no period within f_sw_min " +
                         units::format(d.limits.f_sw_min, Dimension::frequency) + " (" +
                         units::format(1.0 / d.limits.f_sw_min, Dimension::time) +
                         "); lower them or f_sw_min");
        }
        if (d.control.mode == ControlMode::pwm) {
            const bool below = d.control.frequency_max < d.limits.f_sw_min;
            const bool above = d.limits.f_sw_max && d.control.frequency_min > *d.limits.f_sw_max;
            if (below || above)
                fail("control.frequency_range",
                     "lies entirely outside limits f_sw_min..f_sw_max; no frequency can meet "
                     "both");
        }
    }
};

// A temperature as a °C number that reads back to exactly the same kelvin value, else "<K>K".
json temperature_json(double kelvin) {
    const double c0 = kelvin - units::zero_celsius;
    double c = c0;
    for (int k = 0; k < 8; ++k) {
        if (units::celsius(c) == kelvin) return c;
        c = std::nextafter(c, units::celsius(c) < kelvin ? INFINITY : -INFINITY);
    }
    return shortest(kelvin) + "K";
}

json band_json(double value, bool fraction) {
    if (fraction) return value;
    return shortest(value) + "A";
}

std::string_view chemistry_name(loads::Chemistry c) {
    switch (c) {
    case loads::Chemistry::li_ion:
        return "li-ion";
    case loads::Chemistry::li_ion_hv:
        return "li-ion-hv";
    case loads::Chemistry::lifepo4:
        return "lifepo4";
    case loads::Chemistry::lead_acid:
        return "lead-acid";
    }
    return "li-ion";
}

} // namespace

Design read_design(const json& j, std::string_view file_name) {
    const Reader r{std::string(file_name.empty() ? "<design>" : file_name)};
    try {
        return r.read(j, file_name);
    } catch (const json::exception& e) {
        // Every access is type-checked first; this is a safety net, not a normal path.
        r.fail("", std::string("unexpected JSON content: ") + e.what());
    }
}

void validate(const Design& d, std::string_view origin) {
    // The written-out design reads back exactly, so reading it applies every rule of the file.
    (void)read_design(to_json(d), origin);
}

Design load_design_file(const std::filesystem::path& path) {
    const std::string name = path.string();
    std::ifstream in(path, std::ios::binary);
    if (!in) throw DesignError(name + ": cannot open the design file; check the path");
    std::ostringstream buf;
    buf << in.rdbuf();
    const std::string text = buf.str();
    json j;
    try {
        j = json::parse(text, nullptr, true, true);
    } catch (const json::parse_error& e) {
        std::size_t line = 1, col = 1;
        for (std::size_t k = 0; k + 1 < e.byte && k < text.size(); ++k) {
            if (text[k] == '\n') {
                ++line;
                col = 1;
            } else {
                ++col;
            }
        }
        throw DesignError(name + ":" + std::to_string(line) + ":" + std::to_string(col) +
                          ": not valid JSON (" + e.what() + ")");
    }
    return read_design(j, name);
}

json to_json(const Design& d) {
    json j;
    j["name"] = d.name;
    j["supply"] = {{"min", d.supply.min}, {"nom", d.supply.nom}, {"max", d.supply.max}};
    j["load"] = std::visit(
        [](const auto& l) -> json {
            using T = std::decay_t<decltype(l)>;
            if constexpr (std::is_same_v<T, loads::LedString>) {
                return {{"type", "led"}, {"count", l.count},     {"vf", l.vf},
                        {"rd", l.rd},    {"current", l.current}, {"vf_tempco", l.vf_tempco}};
            } else if constexpr (std::is_same_v<T, loads::Battery>) {
                return {{"type", "battery"},
                        {"chemistry", chemistry_name(l.chemistry)},
                        {"cells", l.cells},
                        {"capacity", l.capacity},
                        {"charge_current", l.charge_current},
                        {"termination_current", l.termination_current},
                        {"precharge_current", l.precharge_current},
                        {"internal_resistance", l.internal_resistance}};
            } else {
                return {{"type", "sink"},
                        {"voltage", l.voltage},
                        {"resistance", l.resistance},
                        {"current", l.current}};
            }
        },
        d.load);
    json sw = json::object();
    auto put = [&](const char* key, double v) {
        if (std::find(d.sw.defaulted.begin(), d.sw.defaulted.end(), key) == d.sw.defaulted.end())
            sw[key] = v;
    };
    put("on_resistance", d.sw.on_resistance);
    put("on_resistance_tempco", d.sw.on_resistance_tempco);
    put("rise_time", d.sw.rise_time);
    put("fall_time", d.sw.fall_time);
    put("gate_charge", d.sw.gate_charge);
    put("drive_voltage", d.sw.drive_voltage);
    put("output_capacitance", d.sw.output_capacitance);
    j["switch"] = sw;
    j["sense_resistor"] = d.sense_resistor;
    if (d.output_capacitor)
        j["output_capacitor"] = {{"capacitance", d.output_capacitor->capacitance},
                                 {"esr", d.output_capacitor->esr}};
    if (d.control.mode == ControlMode::hysteretic) {
        j["control"] = {{"mode", "hysteretic"},
                        {"band", band_json(d.control.band, d.control.band_is_fraction)},
                        {"delay", d.control.delay},
                        {"band_range",
                         {band_json(d.control.band_min, d.control.band_is_fraction),
                          band_json(d.control.band_max, d.control.band_is_fraction)}}};
    } else {
        j["control"] = {{"mode", "pwm"},
                        {"frequency", d.control.frequency},
                        {"frequency_range", {d.control.frequency_min, d.control.frequency_max}}};
    }
    j["ambient"] = {{"max", temperature_json(d.ambient.max)}};
    if (d.ambient.min) j["ambient"]["min"] = temperature_json(*d.ambient.min);
    json lim = json::object();
    const Limits& l = d.limits;
    if (l.load_ripple) lim["load_ripple"] = *l.load_ripple;
    lim["current_error"] = l.current_error;
    lim["f_sw_min"] = l.f_sw_min;
    if (l.f_sw_max) lim["f_sw_max"] = *l.f_sw_max;
    if (l.t_on_min) lim["t_on_min"] = *l.t_on_min;
    if (l.t_off_min) lim["t_off_min"] = *l.t_off_min;
    lim["isat_derating"] = l.isat_derating;
    lim["vrrm_derating"] = l.vrrm_derating;
    lim["diode_current_derating"] = l.diode_current_derating;
    if (l.tj_max) lim["tj_max"] = temperature_json(*l.tj_max);
    if (l.t_inductor_max) lim["t_inductor_max"] = temperature_json(*l.t_inductor_max);
    if (l.height_max) lim["height_max"] = *l.height_max;
    if (l.footprint_max) lim["footprint_max"] = *l.footprint_max;
    if (l.efficiency_min) lim["efficiency_min"] = *l.efficiency_min;
    j["limits"] = lim;
    j["weights"] = json::object();
    for (const Objective o : all_objectives())
        j["weights"][std::string(objective_name(o))] = weight_of(d.weights, o);
    if (!d.pareto.empty()) {
        j["pareto"] = json::array();
        for (const auto o : d.pareto) j["pareto"].push_back(std::string(objective_name(o)));
    }
    return j;
}

void to_json(json& j, const Design& d) { j = to_json(d); }

void from_json(const json& j, Design& d) { d = read_design(j, "<json>"); }

std::vector<std::string> switch_default_notes(const Switch& s) {
    std::vector<std::string> out;
    for (const auto& f : s.defaulted) {
        std::string v;
        if (f == "on_resistance") v = units::format(s.on_resistance, Dimension::resistance);
        else if (f == "on_resistance_tempco") v = shortest(s.on_resistance_tempco) + " /K";
        else if (f == "rise_time") v = units::format(s.rise_time, Dimension::time);
        else if (f == "fall_time") v = units::format(s.fall_time, Dimension::time);
        else if (f == "gate_charge") v = units::format(s.gate_charge, Dimension::charge);
        else if (f == "drive_voltage") v = units::format(s.drive_voltage, Dimension::voltage);
        else if (f == "output_capacitance")
            v = units::format(s.output_capacitance, Dimension::capacitance);
        else continue;
        out.push_back("switch." + f + " = " + v + " (default for a generic small MOSFET)");
    }
    return out;
}

} // namespace coilsieve::design
