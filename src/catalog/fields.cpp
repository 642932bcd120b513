// The field table and the default rules. Each default is stated once here, in the table's
// default_rule text (shown by --help) and in apply_defaults (which applies it).
#include "catalog/fields.hpp"

#include <algorithm>
#include <array>
#include <cctype>
#include <cmath>
#include <limits>
#include <sstream>

namespace coilsieve::catalog {
namespace {

using units::Dimension;
constexpr double inf = std::numeric_limits<double>::infinity();
constexpr double t_lo = 193.15; // -80 °C: below any rated part
constexpr double t_hi = 773.15; // 500 °C

constexpr Field num(std::string_view name, Dimension d, bool required, std::string_view aliases,
                    std::string_view unit, double min, bool min_inclusive, double max,
                    std::string_view rule, std::string_view description) {
    return Field{name, FieldType::number, d,   required, aliases,    unit,
                 min,  min_inclusive,     max, rule,     description};
}
constexpr Field txt(std::string_view name, bool required, std::string_view aliases,
                    std::string_view rule, std::string_view description) {
    return Field{
        name, FieldType::text, Dimension::dimensionless, required, aliases, "", 0.0, true, 0.0,
        rule, description};
}

constexpr auto inductor_table = std::to_array<Field>({
    txt("id", true, "id|partnumber|partno|part|pn|mpn", "",
        "part number, unique within its source"),
    txt("family", false, "family|construction|type", "shielded-drum-ferrite",
        "construction family (sets the defaults below)"),
    // At least 1 nH: below that a board trace's own inductance is larger (common practice).
    num("inductance", Dimension::inductance, true, "inductance|l|l0|lnom|inductancenominal", "uH",
        1e-9, true, 1.0, "", "nominal inductance at zero bias"),
    num("tolerance", Dimension::ratio, false, "tolerance|tol|ltol", "%", 0, false, 1.0, "20 %",
        "inductance tolerance (±)"),
    // At least 1 µΩ, a tenth of the lowest DCR of large power chokes (common practice).
    num("dcr_typ", Dimension::resistance, true, "dcrtyp|dcr|rdc|dcrtypical|dcrnom|rdctyp", "mOhm",
        1e-6, true, 1000.0, "", "typical DC resistance"),
    num("dcr_max", Dimension::resistance, false, "dcrmax|rdcmax", "mOhm", 0, false, 1000.0,
        "= dcr_typ", "maximum DC resistance"),
    num("dcr_temperature", Dimension::temperature, false, "dcrtemperature|dcrtemp|tdcr", "C", t_lo,
        true, t_hi, "20 °C", "temperature at which DCR is stated"),
    num("isat", Dimension::current, true, "isat|saturationcurrent|idcsat|isatdc", "A", 0, false,
        1e4, "", "saturation current"),
    num("sat_drop", Dimension::ratio, false, "satdrop|isatdrop|ldrop", "%", 0, false, 1.0, "30 %",
        "inductance drop that defines isat"),
    num("irms", Dimension::current, false, "irms|ratedcurrent|itemp|irated", "A", 0, false, 1e4,
        "0.8 × isat", "RMS current for irms_rise"),
    num("irms_rise", Dimension::temperature_difference, false,
        "irmsrise|deltat|temperaturerise|trise", "K", 0, false, 300.0, "40 K",
        "temperature rise at irms"),
    num("srf", Dimension::frequency, false, "srf|selfresonantfrequency|fres", "MHz", 0, false, 1e11,
        "", "self-resonant frequency"),
    txt("shape", false, "shape|saturationshape", "family default", "saturation knee: hard|soft"),
    num("core_k", Dimension::dimensionless, false, "corek|steinmetzk", "", 0, false, 1e9,
        "family default", "Steinmetz k, SI (W/m³ with f in Hz, B in T)"),
    num("core_alpha", Dimension::dimensionless, false, "corealpha|steinmetzalpha|alpha", "", 0,
        false, 4.0, "family default", "Steinmetz frequency exponent"),
    num("core_beta", Dimension::dimensionless, false, "corebeta|steinmetzbeta|beta", "", 0, false,
        5.0, "family default", "Steinmetz flux exponent"),
    num("b_sat", Dimension::dimensionless, false, "bsat|saturationfluxdensity", "mT", 0, false, 3.0,
        "family default", "flux density at isat (T or mT)"),
    num("core_volume", Dimension::volume, false, "corevolume|ve|effectivevolume", "mm3", 0, false,
        1e-2, "family fraction × length·width·height", "effective core volume"),
    num("ac_factor", Dimension::dimensionless, false, "acfactor|racdcr|racfactor", "", 1.0, true,
        100.0, "family default", "R_ac/DCR at 100 kHz for the ripple"),
    num("t_max", Dimension::temperature, false,
        "tmax|maxtemperature|operatingtemperaturemax|tophigh", "C", t_lo, true, t_hi, "125 °C",
        "maximum hot-spot temperature"),
    txt("mounting", false, "mounting|mount", "tht if largest dimension > 15 mm, else smd",
        "smd|tht"),
    num("length", Dimension::length, false, "length|len", "mm", 0, false, 1.0, "0 (unknown)",
        "body length"),
    num("width", Dimension::length, false, "width|w", "mm", 0, false, 1.0, "0 (unknown)",
        "body width"),
    num("height", Dimension::length, false, "height|h|thickness", "mm", 0, false, 1.0,
        "0 (unknown)", "body height"),
    num("mass", Dimension::mass, false, "mass|weight", "g", 0, false, 100.0, "", "mass"),
    num("price", Dimension::dimensionless, false, "price|unitprice|cost", "", 0, true, 1e6, "",
        "unit price in `currency`"),
    txt("currency", false, "currency|cur", "", "ISO 4217 code of the price"),
    txt("notes", false, "notes|note|comment|comments|remarks", "", "free text"),
});

constexpr auto diode_table = std::to_array<Field>({
    txt("id", true, "id|partnumber|partno|part|pn|mpn", "",
        "part number, unique within its source"),
    txt("technology", true, "technology|tech|type", "",
        "schottky|sic-schottky|ultrafast|fast|standard"),
    num("vrrm", Dimension::voltage, true, "vrrm|vrm|vr|reversevoltage|vrwm", "V", 0, false, 1e5, "",
        "repetitive peak reverse voltage"),
    num("if_avg", Dimension::current, true, "ifavg|if(av)|if|io|iav|ifav|iforwardavg", "A", 0,
        false, 1e4, "", "average forward current rating"),
    num("ifsm", Dimension::current, false, "ifsm|isurge", "A", 0, false, 1e5, "",
        "non-repetitive surge current"),
    num("vf1", Dimension::voltage, false, "vf1|vf", "V", 0, false, 100.0, "",
        "forward voltage of point 1"),
    num("if1", Dimension::current, false, "if1", "A", 0, false, 1e4, "", "current of point 1"),
    num("t1", Dimension::temperature, false, "t1|tvf1", "C", t_lo, true, t_hi, "25 °C",
        "junction temperature of point 1"),
    num("vf2", Dimension::voltage, false, "vf2", "V", 0, false, 100.0, "",
        "forward voltage, point 2"),
    num("if2", Dimension::current, false, "if2", "A", 0, false, 1e4, "", "current of point 2"),
    num("t2", Dimension::temperature, false, "t2|tvf2", "C", t_lo, true, t_hi, "25 °C",
        "junction temperature of point 2"),
    num("vf3", Dimension::voltage, false, "vf3", "V", 0, false, 100.0, "",
        "forward voltage, point 3"),
    num("if3", Dimension::current, false, "if3", "A", 0, false, 1e4, "", "current of point 3"),
    num("t3", Dimension::temperature, false, "t3|tvf3", "C", t_lo, true, t_hi, "25 °C",
        "junction temperature of point 3"),
    num("spice_is", Dimension::current, false, "spiceis|is", "A", 0, false, 1.0, "",
        "SPICE IS (saturation current)"),
    num("spice_n", Dimension::dimensionless, false, "spicen|n", "", 0, false, 20.0, "",
        "SPICE N (emission coefficient)"),
    num("spice_rs", Dimension::resistance, false, "spicers|rs", "Ohm", 0, true, 1000.0, "0 Ω",
        "SPICE RS (series resistance)"),
    num("spice_eg", Dimension::dimensionless, false, "spiceeg|eg", "", 0, false, 5.0,
        "0.69 eV Schottky, else 1.11 eV", "SPICE EG in eV"),
    num("spice_xti", Dimension::dimensionless, false, "spicexti|xti", "", 0, true, 50.0,
        "2 Schottky, else 3", "SPICE XTI"),
    num("cj", Dimension::capacitance, false, "cj|ct|capacitance", "pF", 0, false, 1e-6, "",
        "junction capacitance at cj_vr"),
    num("cj_vr", Dimension::voltage, false, "cjvr|vrcj", "V", 0, true, 1e5, "4 V (when cj given)",
        "reverse voltage of cj"),
    num("cjo", Dimension::capacitance, false, "cjo|cj0", "pF", 0, false, 1e-6, "",
        "SPICE CJO (zero-bias capacitance)"),
    num("vj", Dimension::voltage, false, "vj", "V", 0, false, 10.0, "1 V (when cjo given)",
        "SPICE VJ"),
    num("m", Dimension::dimensionless, false, "m|mj", "", 0, false, 1.0, "0.5 (when cjo given)",
        "SPICE M (grading coefficient)"),
    num("trr", Dimension::time, false, "trr", "ns", 0, true, 1e-3,
        "0 Schottky; ultrafast 50 ns, fast 250 ns, standard 2 µs", "reverse-recovery time"),
    num("qrr", Dimension::charge, false, "qrr", "nC", 0, true, 1e-3, "0 Schottky",
        "reverse-recovery charge"),
    num("recovery_if", Dimension::current, false, "recoveryif|iftrr", "A", 0, false, 1e4,
        "0.5 A (when trr or qrr given)", "forward current of the trr/qrr test"),
    num("tt", Dimension::time, false, "tt", "ns", 0, true, 1e-3, "0 Schottky", "SPICE TT"),
    num("ir", Dimension::current, false, "ir|irm|leakage", "uA", 0, true, 10.0, "",
        "reverse leakage current"),
    num("ir_vr", Dimension::voltage, false, "irvr|vrir", "V", 0, false, 1e5,
        "= vrrm (when ir given)", "reverse voltage of ir"),
    num("ir_temperature", Dimension::temperature, false, "irtemperature|irtemp|tir", "C", t_lo,
        true, t_hi, "25 °C (when ir given)", "junction temperature of ir"),
    num("rth_ja", Dimension::thermal_resistance, false, "rthja|rth(ja)|rth|thetaja", "K/W", 0,
        false, 1e4, "package table", "junction-to-ambient thermal resistance"),
    num("tj_max", Dimension::temperature, false, "tjmax|tj|tjunctionmax", "C", t_lo, true, t_hi,
        "125 °C Schottky, 175 °C SiC, else 150 °C", "maximum junction temperature"),
    txt("package", false, "package|case|pkg|outline", "",
        "outline name; gives dimensions and rth_ja when those are missing"),
    num("length", Dimension::length, false, "length|len", "mm", 0, false, 1.0, "package table",
        "body length"),
    num("width", Dimension::length, false, "width|w", "mm", 0, false, 1.0, "package table",
        "body width"),
    num("height", Dimension::length, false, "height|h|thickness", "mm", 0, false, 1.0,
        "package table", "body height"),
    num("price", Dimension::dimensionless, false, "price|unitprice|cost", "", 0, true, 1e6, "",
        "unit price in `currency`"),
    txt("currency", false, "currency|cur", "", "ISO 4217 code of the price"),
    txt("notes", false, "notes|note|comment|comments|remarks", "", "free text"),
});

template <std::size_t N>
constexpr std::size_t fi(const std::array<Field, N>& table, std::string_view name) {
    for (std::size_t i = 0; i < N; ++i) {
        if (table[i].name == name) return i;
    }
    throw "unknown field"; // compile-time error in a constant expression
}

// Inductor indices.
namespace L {
constexpr std::size_t id = fi(inductor_table, "id"), family = fi(inductor_table, "family"),
                      inductance = fi(inductor_table, "inductance"),
                      tolerance = fi(inductor_table, "tolerance"),
                      dcr_typ = fi(inductor_table, "dcr_typ"),
                      dcr_max = fi(inductor_table, "dcr_max"),
                      dcr_temperature = fi(inductor_table, "dcr_temperature"),
                      isat = fi(inductor_table, "isat"), sat_drop = fi(inductor_table, "sat_drop"),
                      irms = fi(inductor_table, "irms"),
                      irms_rise = fi(inductor_table, "irms_rise"), srf = fi(inductor_table, "srf"),
                      shape = fi(inductor_table, "shape"), core_k = fi(inductor_table, "core_k"),
                      core_alpha = fi(inductor_table, "core_alpha"),
                      core_beta = fi(inductor_table, "core_beta"),
                      b_sat = fi(inductor_table, "b_sat"),
                      core_volume = fi(inductor_table, "core_volume"),
                      ac_factor = fi(inductor_table, "ac_factor"),
                      t_max = fi(inductor_table, "t_max"),
                      mounting = fi(inductor_table, "mounting"),
                      length = fi(inductor_table, "length"), width = fi(inductor_table, "width"),
                      height = fi(inductor_table, "height"), mass = fi(inductor_table, "mass"),
                      price = fi(inductor_table, "price"),
                      currency = fi(inductor_table, "currency"),
                      notes = fi(inductor_table, "notes");
}

// Diode indices.
namespace D {
constexpr std::size_t id = fi(diode_table, "id"), technology = fi(diode_table, "technology"),
                      vrrm = fi(diode_table, "vrrm"), if_avg = fi(diode_table, "if_avg"),
                      ifsm = fi(diode_table, "ifsm"), vf1 = fi(diode_table, "vf1"),
                      if1 = fi(diode_table, "if1"), t1 = fi(diode_table, "t1"),
                      spice_is = fi(diode_table, "spice_is"), spice_n = fi(diode_table, "spice_n"),
                      spice_rs = fi(diode_table, "spice_rs"),
                      spice_eg = fi(diode_table, "spice_eg"),
                      spice_xti = fi(diode_table, "spice_xti"), cj = fi(diode_table, "cj"),
                      cj_vr = fi(diode_table, "cj_vr"), cjo = fi(diode_table, "cjo"),
                      vj = fi(diode_table, "vj"), m = fi(diode_table, "m"),
                      trr = fi(diode_table, "trr"), qrr = fi(diode_table, "qrr"),
                      recovery_if = fi(diode_table, "recovery_if"), tt = fi(diode_table, "tt"),
                      ir = fi(diode_table, "ir"), ir_vr = fi(diode_table, "ir_vr"),
                      ir_temperature = fi(diode_table, "ir_temperature"),
                      rth_ja = fi(diode_table, "rth_ja"), tj_max = fi(diode_table, "tj_max"),
                      package = fi(diode_table, "package"), length = fi(diode_table, "length"),
                      width = fi(diode_table, "width"), height = fi(diode_table, "height"),
                      price = fi(diode_table, "price"), currency = fi(diode_table, "currency"),
                      notes = fi(diode_table, "notes");
}
constexpr std::size_t forward_points = 3; // vfK/ifK/tK triples follow vf1 in the table

bool has(const Record& r, std::size_t i) { return !std::holds_alternative<std::monostate>(r[i]); }
double number(const Record& r, std::size_t i) { return std::get<double>(r[i]); }
std::optional<double> opt(const Record& r, std::size_t i) {
    if (auto p = std::get_if<double>(&r[i])) return *p;
    return std::nullopt;
}
std::string text(const Record& r, std::size_t i) {
    if (auto p = std::get_if<std::string>(&r[i])) return *p;
    return {};
}
Value val(const std::optional<double>& v) { return v ? Value{*v} : Value{}; }
Value str(const std::string& s) { return s.empty() ? Value{} : Value{s}; }

std::string trim(std::string_view s) {
    while (!s.empty() && std::isspace(static_cast<unsigned char>(s.front()))) s.remove_prefix(1);
    while (!s.empty() && std::isspace(static_cast<unsigned char>(s.back()))) s.remove_suffix(1);
    return std::string(s);
}

std::string lower(std::string_view s) {
    std::string out(s);
    for (char& c : out) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    return out;
}

bool is_celsius_unit(std::string_view u) {
    const std::string l = lower(u);
    return l == "c" || l == "°c" || l == "degc" || l == "deg c" || l == "\xE2\x84\x83";
}

// Units the units library has no dimension for: flux density (T) and the SPICE gap energy (eV).
struct CustomUnit {
    std::string_view field;
    std::string_view symbol;
    double scale;
};
constexpr std::array<CustomUnit, 3> custom_units{{
    {"b_sat", "mT", 1e-3},
    {"b_sat", "T", 1.0},
    {"spice_eg", "eV", 1.0},
}};

bool has_custom_units(std::string_view field) {
    return std::any_of(custom_units.begin(), custom_units.end(),
                       [&](const CustomUnit& u) { return u.field == field; });
}

std::optional<double> custom_scale(std::string_view field, std::string_view unit) {
    for (const CustomUnit& u : custom_units) {
        if (u.field == field && u.symbol == unit) return u.scale;
    }
    return std::nullopt;
}

// Package names probed against parts::package_outline for the list of known outlines.
constexpr std::array<std::string_view, 30> package_candidates{
    "SOD-123",  "SOD-123F", "SOD-123FL", "SOD-323", "SOD-323F", "SOD-523",  "SOD-128",  "SMA",
    "SMAF",     "SMB",      "SMBF",      "SMC",     "SMP",      "SMF",      "DO-214AC", "DO-214AA",
    "DO-214AB", "DO-219AB", "DO-41",     "DO-15",   "DO-201AD", "TO-220AC", "TO-220",   "TO-252",
    "TO-263",   "TO-277",   "TO-247",    "SOT-23",  "MELF",     "MiniMELF"};

std::string choice_key(std::string_view s) {
    std::string out;
    for (char c : trim(s)) {
        if (c == ' ' || c == '_') out.push_back('-');
        else out.push_back(static_cast<char>(std::tolower(static_cast<unsigned char>(c))));
    }
    return out;
}

} // namespace

std::string_view to_string(PartKind k) { return k == PartKind::inductor ? "inductor" : "diode"; }

std::optional<PartKind> part_kind_from_string(std::string_view s) {
    const std::string l = lower(s);
    if (l == "inductor" || l == "inductors") return PartKind::inductor;
    if (l == "diode" || l == "diodes") return PartKind::diode;
    return std::nullopt;
}

std::span<const Field> fields(PartKind kind) {
    if (kind == PartKind::inductor) return inductor_table;
    return diode_table;
}

std::optional<std::size_t> field_index(PartKind kind, std::string_view name) {
    const auto table = fields(kind);
    for (std::size_t i = 0; i < table.size(); ++i) {
        if (table[i].name == name) return i;
    }
    return std::nullopt;
}

std::string normalise_header(std::string_view header) {
    std::string out;
    out.reserve(header.size());
    for (char c : header) {
        if (c == ' ' || c == '_' || c == '-' || c == '.' || c == '\t') continue;
        out.push_back(static_cast<char>(std::tolower(static_cast<unsigned char>(c))));
    }
    return out;
}

namespace {

std::optional<std::size_t> match_name(PartKind kind, const std::string& key) {
    const auto table = fields(kind);
    for (std::size_t i = 0; i < table.size(); ++i) {
        if (normalise_header(table[i].name) == key) return i;
        std::string_view aliases = table[i].aliases;
        while (!aliases.empty()) {
            const std::size_t bar = aliases.find('|');
            if (aliases.substr(0, bar) == key) return i;
            if (bar == std::string_view::npos) break;
            aliases.remove_prefix(bar + 1);
        }
    }
    return std::nullopt;
}

// "L (uH)" -> {"L ", "uH"}; "dcr [mOhm]" -> {"dcr ", "mOhm"}; no trailing group -> nullopt.
std::optional<std::pair<std::string, std::string>> split_unit(std::string_view header) {
    const std::string h = trim(header);
    if (h.empty()) return std::nullopt;
    const char close = h.back();
    if (close != ')' && close != ']') return std::nullopt;
    const char open = close == ')' ? '(' : '[';
    const std::size_t pos = h.rfind(open);
    if (pos == std::string::npos || pos == 0) return std::nullopt;
    return std::make_pair(h.substr(0, pos),
                          trim(std::string_view(h).substr(pos + 1, h.size() - pos - 2)));
}

} // namespace

std::optional<HeaderMatch> match_header(PartKind kind, std::string_view header,
                                        const HeaderMapping& mapping) {
    const std::string key = normalise_header(header);
    for (const auto& [from, to] : mapping) {
        if (normalise_header(from) == key) {
            if (auto i = field_index(kind, to)) {
                auto split = split_unit(header);
                return HeaderMatch{*i, split ? split->second : std::string{}};
            }
        }
    }
    if (auto i = match_name(kind, key)) return HeaderMatch{*i, {}};
    if (auto split = split_unit(header)) {
        const std::string name_key = normalise_header(split->first);
        for (const auto& [from, to] : mapping) {
            if (normalise_header(from) == name_key) {
                if (auto i = field_index(kind, to)) return HeaderMatch{*i, split->second};
            }
        }
        if (auto i = match_name(kind, name_key)) return HeaderMatch{*i, split->second};
    }
    return std::nullopt;
}

Value parse_cell(const Field& field, std::string_view cell, std::string_view header_unit) {
    std::string t = trim(cell);
    if (t.empty()) return Value{};
    if (field.type == FieldType::text) return Value{std::move(t)};
    if (has_custom_units(field.name)) {
        double scale = 1.0;
        std::string number_text = t;
        bool own_unit = false;
        for (const CustomUnit& u : custom_units) {
            if (u.field != field.name) continue;
            if (t.size() > u.symbol.size() && t.ends_with(u.symbol)) {
                number_text = trim(std::string_view(t).substr(0, t.size() - u.symbol.size()));
                scale = u.scale;
                own_unit = true;
                break;
            }
        }
        if (!own_unit && !header_unit.empty()) {
            auto s = custom_scale(field.name, header_unit);
            if (!s)
                throw units::ParseError("unit \"" + std::string(header_unit) +
                                        "\" is not valid here");
            scale = *s;
        }
        return Value{units::parse(number_text, Dimension::dimensionless) * scale};
    }
    std::string_view unit = header_unit;
    if (field.dimension == Dimension::temperature && is_celsius_unit(unit)) unit = {};
    const double v =
        unit.empty() ? units::parse(t, field.dimension) : units::parse(t, field.dimension, unit);
    return Value{v};
}

std::optional<std::string> check_header_unit(const Field& field, std::string_view unit) {
    if (unit.empty()) return std::nullopt;
    if (field.type == FieldType::text) {
        return "a text column takes no unit";
    }
    try {
        parse_cell(field, "1", unit);
    } catch (const std::exception&) {
        std::string valid = std::string(field.display_unit);
        if (has_custom_units(field.name)) {
            valid.clear();
            for (const CustomUnit& u : custom_units) {
                if (u.field != field.name) continue;
                if (!valid.empty()) valid += " or ";
                valid += u.symbol;
            }
        }
        return "unit \"" + std::string(unit) + "\" is not a " +
               (has_custom_units(field.name)
                    ? std::string(field.name)
                    : std::string(units::dimension_name(field.dimension))) +
               " unit" + (valid.empty() ? std::string{} : " (e.g. " + valid + ")");
    }
    return std::nullopt;
}

std::optional<std::string> check_range(const Field& field, double v) {
    if (!std::isfinite(v)) return std::string("not a finite number");
    const bool low = field.min_inclusive ? v < field.min : v <= field.min;
    if (low || v > field.max) {
        auto show = [&](double x) {
            if (has_custom_units(field.name) || field.dimension == Dimension::dimensionless) {
                std::ostringstream os;
                os << x;
                return os.str();
            }
            return units::format(x, field.dimension,
                                 {.significant = 3, .ascii = false, .unit = true});
        };
        std::string range = field.min_inclusive ? "at least " : "greater than ";
        range += show(field.min);
        if (std::isfinite(field.max)) range += " and at most " + show(field.max);
        return "out of range: must be " + range;
    }
    return std::nullopt;
}

std::vector<std::string> choice_names(std::string_view field) {
    std::vector<std::string> out;
    if (field == "family") {
        for (auto n : parts::family_names()) out.emplace_back(n);
    } else if (field == "technology") {
        for (auto n : parts::technology_names()) out.emplace_back(n);
    } else if (field == "shape") {
        out = {"hard", "soft"};
    } else if (field == "mounting") {
        out = {"smd", "tht"};
    } else if (field == "package") {
        for (auto n : package_candidates) {
            if (auto o = parts::package_outline(n)) {
                std::string name(o->name);
                if (std::find(out.begin(), out.end(), name) == out.end()) out.push_back(name);
            }
        }
    }
    return out;
}

std::optional<std::string> canonical_choice(std::string_view field, std::string_view value) {
    const std::string key = choice_key(value);
    if (field == "family") {
        if (auto f = parts::family_from_string(key)) return std::string(parts::to_string(*f));
    } else if (field == "technology") {
        if (auto t = parts::technology_from_string(key)) return std::string(parts::to_string(*t));
    } else if (field == "shape") {
        if (auto s = parts::shape_from_string(key)) return std::string(parts::to_string(*s));
    } else if (field == "mounting") {
        if (auto m = parts::mounting_from_string(key)) return std::string(parts::to_string(*m));
    } else if (field == "package") {
        if (auto o = parts::package_outline(trim(value))) return std::string(o->name);
    }
    return std::nullopt;
}

std::vector<RecordProblem> apply_defaults(PartKind kind, Record& r,
                                          std::vector<std::string>& assumed) {
    std::vector<RecordProblem> problems;
    const auto table = fields(kind);
    auto set = [&](std::size_t i, Value v) {
        r[i] = std::move(v);
        assumed.emplace_back(table[i].name);
    };
    if (kind == PartKind::inductor) {
        using namespace L;
        // Family: the most common construction for buck inductors in catalogs (common practice).
        if (!has(r, family)) set(family, std::string("shielded-drum-ferrite"));
        const auto fam = parts::family_from_string(text(r, family));
        if (!fam) return problems; // reported by the caller
        const parts::FamilyDefaults& fd = parts::family_defaults(*fam);
        // Tolerance ±20 %: the usual letter code M for power inductors (IEC 60062, from memory).
        if (!has(r, tolerance)) set(tolerance, 0.2);
        // DCR max = typical when only one value is given (no margin invented).
        if (!has(r, dcr_max)) set(dcr_max, number(r, dcr_typ));
        // DCR stated at 20 °C, the usual datasheet reference temperature (common practice).
        if (!has(r, dcr_temperature)) set(dcr_temperature, units::celsius(20.0));
        // Isat at a 30 % drop: the middle of the 10-40 % definitions in use (domain notes).
        if (!has(r, sat_drop)) set(sat_drop, 0.3);
        // Irms = 0.8·Isat: a conservative guess; catalog Irms and Isat are usually of similar size.
        if (!has(r, irms)) set(irms, 0.8 * number(r, isat));
        // Irms at a 40 K rise, the usual rating (IEC 62024-2 practice, domain notes).
        if (!has(r, irms_rise)) set(irms_rise, 40.0);
        // Saturation shape, Steinmetz data, B_sat and R_ac/DCR: family typicals (parts library).
        if (!has(r, shape)) set(shape, std::string(parts::to_string(fd.shape)));
        if (!has(r, core_k)) set(core_k, fd.core.k);
        if (!has(r, core_alpha)) set(core_alpha, fd.core.alpha);
        if (!has(r, core_beta)) set(core_beta, fd.core.beta);
        if (!has(r, b_sat)) set(b_sat, fd.b_sat);
        if (!has(r, ac_factor)) set(ac_factor, fd.ac_factor);
        // Missing dimensions stay 0 = unknown (they then pass any size filter; flagged assumed).
        for (std::size_t d : {length, width, height}) {
            if (!has(r, d)) set(d, 0.0);
        }
        const double body = number(r, length) * number(r, width) * number(r, height);
        // Core volume: the family's fraction of the body volume (0 when the body is unknown).
        if (!has(r, core_volume)) set(core_volume, fd.core_volume_fraction * body);
        // Hot-spot limit 125 °C: the common rating of ferrite SMD power inductors (common
        // practice).
        if (!has(r, t_max)) set(t_max, units::celsius(125.0));
        // Mounting: bodies larger than 15 mm are usually through-hole (common practice).
        if (!has(r, mounting)) {
            const double largest =
                std::max({number(r, length), number(r, width), number(r, height)});
            set(mounting, std::string(largest > 0.015 ? "tht" : "smd"));
        }
        if (number(r, dcr_max) < number(r, dcr_typ)) {
            problems.push_back({"dcr_max", "dcr_max is below dcr_typ"});
        }
        return problems;
    }

    using namespace D;
    const auto tech = parts::technology_from_string(text(r, technology));
    if (!tech) return problems;
    const bool schottky =
        *tech == parts::DiodeTechnology::schottky || *tech == parts::DiodeTechnology::sic_schottky;
    // Forward points: a point needs both vf and if; its temperature defaults to 25 °C (the usual
    // datasheet condition).
    bool any_point = false;
    for (std::size_t k = 0; k < forward_points; ++k) {
        const std::size_t vf = vf1 + 3 * k, ifk = if1 + 3 * k, tk = t1 + 3 * k;
        if (has(r, vf) != has(r, ifk)) {
            problems.push_back({std::string(table[has(r, vf) ? ifk : vf].name),
                                "forward point " + std::to_string(k + 1) + " needs both " +
                                    std::string(table[vf].name) + " and " +
                                    std::string(table[ifk].name)});
            continue;
        }
        if (has(r, vf)) {
            any_point = true;
            if (!has(r, tk)) set(tk, units::celsius(25.0));
        }
    }
    const bool spice = has(r, spice_is) && has(r, spice_n);
    if (has(r, spice_is) != has(r, spice_n)) {
        problems.push_back(
            {has(r, spice_is) ? "spice_n" : "spice_is", "spice_is and spice_n go together"});
    }
    if (!any_point && !spice && problems.empty()) {
        problems.push_back({"vf1", "no forward characteristic: give vf1 and if1 (and optionally "
                                   "t1), or spice_is and spice_n"});
    }
    if (spice) {
        // SPICE defaults: RS 0; EG/XTI 0.69 eV/2 for Schottky barriers (common SPICE practice),
        // else 1.11 eV/3 (ngspice defaults).
        if (!has(r, spice_rs)) set(spice_rs, 0.0);
        if (!has(r, spice_eg)) set(spice_eg, schottky ? 0.69 : 1.11);
        if (!has(r, spice_xti)) set(spice_xti, schottky ? 2.0 : 3.0);
    }
    // Capacitance point at 4 V: the usual datasheet test voltage (from memory).
    if (has(r, cj) && !has(r, cj_vr)) set(cj_vr, 4.0);
    // SPICE VJ 1 V and M 0.5 are the ngspice defaults.
    if (has(r, cjo)) {
        if (!has(r, vj)) set(vj, 1.0);
        if (!has(r, m)) set(m, 0.5);
    }
    // Recovery: none for majority-carrier (Schottky, SiC Schottky) parts; typical trr for PN
    // parts by class (from memory: ultrafast ≤ 50 ns, fast ≈ 250 ns, standard ≈ 2 µs).
    if (schottky) {
        if (!has(r, trr)) set(trr, 0.0);
        if (!has(r, qrr)) set(qrr, 0.0);
        if (!has(r, tt)) set(tt, 0.0);
    } else if (!has(r, trr) && !has(r, qrr) && !has(r, tt)) {
        const double t = *tech == parts::DiodeTechnology::ultrafast ? 50e-9
                         : *tech == parts::DiodeTechnology::fast    ? 250e-9
                                                                    : 2e-6;
        set(trr, t);
    }
    // trr/qrr test current 0.5 A (the common IF = 0.5 A, IR = 1 A, Irr = 0.25 A test, from memory).
    if ((opt(r, trr).value_or(0) > 0 || opt(r, qrr).value_or(0) > 0) && !has(r, recovery_if)) {
        set(recovery_if, 0.5);
    }
    // Leakage stated at VRRM and 25 °C unless said otherwise (the usual datasheet condition).
    if (has(r, ir)) {
        if (!has(r, ir_vr)) set(ir_vr, number(r, vrrm));
        if (!has(r, ir_temperature)) set(ir_temperature, units::celsius(25.0));
    }
    // Tj max: 125 °C for silicon Schottky (older parts; conservative), 175 °C SiC, else 150 °C
    // (common practice).
    if (!has(r, tj_max)) {
        const double c = *tech == parts::DiodeTechnology::schottky       ? 125.0
                         : *tech == parts::DiodeTechnology::sic_schottky ? 175.0
                                                                         : 150.0;
        set(tj_max, units::celsius(c));
    }
    // Package outline: body size and R_th(j-a) on a minimum pad (parts::package_outline).
    const bool need_outline =
        !has(r, rth_ja) || !has(r, length) || !has(r, width) || !has(r, height);
    if (need_outline) {
        std::optional<parts::PackageOutline> outline;
        if (has(r, package)) outline = parts::package_outline(text(r, package));
        if (!outline) {
            std::string names;
            for (const auto& n : choice_names("package")) names += (names.empty() ? "" : ", ") + n;
            std::string missing;
            for (std::size_t f : {rth_ja, length, width, height}) {
                if (!has(r, f))
                    missing += (missing.empty() ? "" : ", ") + std::string(table[f].name);
            }
            problems.push_back(
                {"package", (has(r, package) ? "unknown package \"" + text(r, package) + "\""
                                             : std::string("no package")) +
                                " and no " + missing +
                                "; give them, or use a known package: " + names});
            return problems;
        }
        r[package] = std::string(outline->name);
        if (!has(r, rth_ja)) set(rth_ja, outline->rth_ja);
        if (!has(r, length)) set(length, outline->length);
        if (!has(r, width)) set(width, outline->width);
        if (!has(r, height)) set(height, outline->height);
    }
    return problems;
}

parts::Inductor inductor_from_record(const Record& r, std::string source,
                                     std::vector<std::string> assumed) {
    using namespace L;
    parts::Inductor p;
    p.id = text(r, id);
    p.source = std::move(source);
    p.family = parts::family_from_string(text(r, family)).value_or(p.family);
    p.inductance = number(r, inductance);
    p.tolerance = number(r, tolerance);
    p.dcr_typ = number(r, dcr_typ);
    p.dcr_max = number(r, dcr_max);
    p.dcr_temperature = number(r, dcr_temperature);
    p.isat = number(r, isat);
    p.sat_drop = number(r, sat_drop);
    p.irms = number(r, irms);
    p.irms_rise = number(r, irms_rise);
    p.srf = opt(r, srf);
    p.shape = parts::shape_from_string(text(r, shape)).value_or(p.shape);
    p.core = {number(r, core_k), number(r, core_alpha), number(r, core_beta)};
    p.b_sat = number(r, b_sat);
    p.core_volume = number(r, core_volume);
    p.ac_factor = number(r, ac_factor);
    p.t_max = number(r, t_max);
    p.mounting = parts::mounting_from_string(text(r, mounting)).value_or(p.mounting);
    p.length = number(r, length);
    p.width = number(r, width);
    p.height = number(r, height);
    p.mass = opt(r, mass);
    p.price = opt(r, price);
    p.currency = text(r, currency);
    p.notes = text(r, notes);
    p.assumed = std::move(assumed);
    return p;
}

parts::Diode diode_from_record(const Record& r, std::string source,
                               std::vector<std::string> assumed) {
    using namespace D;
    parts::Diode p;
    p.id = text(r, id);
    p.source = std::move(source);
    p.technology = parts::technology_from_string(text(r, technology)).value_or(p.technology);
    p.vrrm = number(r, vrrm);
    p.if_avg = number(r, if_avg);
    p.ifsm = opt(r, ifsm);
    for (std::size_t k = 0; k < forward_points; ++k) {
        const std::size_t vf = vf1 + 3 * k;
        if (has(r, vf) && has(r, vf + 1)) {
            p.forward.push_back(
                {number(r, vf), number(r, vf + 1), opt(r, vf + 2).value_or(units::celsius(25.0))});
        }
    }
    if (has(r, spice_is) && has(r, spice_n)) {
        p.spice = parts::SpiceForward{
            number(r, spice_is), number(r, spice_n), opt(r, spice_rs).value_or(0.0),
            opt(r, spice_eg).value_or(1.11), opt(r, spice_xti).value_or(3.0)};
    }
    p.cj = opt(r, cj);
    p.cj_vr = opt(r, cj_vr);
    if (has(r, cjo)) {
        p.spice_cap = parts::SpiceCapacitance{number(r, cjo), opt(r, vj).value_or(1.0),
                                              opt(r, m).value_or(0.5)};
    }
    p.trr = opt(r, trr);
    p.qrr = opt(r, qrr);
    p.recovery_if = opt(r, recovery_if);
    p.tt = opt(r, tt);
    p.ir = opt(r, ir);
    p.ir_vr = opt(r, ir_vr);
    p.ir_temperature = opt(r, ir_temperature);
    p.rth_ja = opt(r, rth_ja).value_or(0.0);
    p.tj_max = opt(r, tj_max).value_or(p.tj_max);
    p.package = text(r, package);
    p.length = opt(r, length).value_or(0.0);
    p.width = opt(r, width).value_or(0.0);
    p.height = opt(r, height).value_or(0.0);
    p.price = opt(r, price);
    p.currency = text(r, currency);
    p.notes = text(r, notes);
    p.assumed = std::move(assumed);
    return p;
}

Record to_record(const parts::Inductor& p) {
    using namespace L;
    Record r(inductor_table.size());
    r[id] = str(p.id);
    r[family] = std::string(parts::to_string(p.family));
    r[inductance] = p.inductance;
    r[tolerance] = p.tolerance;
    r[dcr_typ] = p.dcr_typ;
    r[dcr_max] = p.dcr_max;
    r[dcr_temperature] = p.dcr_temperature;
    r[isat] = p.isat;
    r[sat_drop] = p.sat_drop;
    r[irms] = p.irms;
    r[irms_rise] = p.irms_rise;
    r[srf] = val(p.srf);
    r[shape] = std::string(parts::to_string(p.shape));
    r[core_k] = p.core.k;
    r[core_alpha] = p.core.alpha;
    r[core_beta] = p.core.beta;
    r[b_sat] = p.b_sat;
    r[core_volume] = p.core_volume;
    r[ac_factor] = p.ac_factor;
    r[t_max] = p.t_max;
    r[mounting] = std::string(parts::to_string(p.mounting));
    r[length] = p.length;
    r[width] = p.width;
    r[height] = p.height;
    r[mass] = val(p.mass);
    r[price] = val(p.price);
    r[currency] = str(p.currency);
    r[notes] = str(p.notes);
    return r;
}

Record to_record(const parts::Diode& p) {
    using namespace D;
    Record r(diode_table.size());
    r[id] = str(p.id);
    r[technology] = std::string(parts::to_string(p.technology));
    r[vrrm] = p.vrrm;
    r[if_avg] = p.if_avg;
    r[ifsm] = val(p.ifsm);
    for (std::size_t k = 0; k < forward_points && k < p.forward.size(); ++k) {
        r[vf1 + 3 * k] = p.forward[k].vf;
        r[vf1 + 3 * k + 1] = p.forward[k].current;
        r[vf1 + 3 * k + 2] = p.forward[k].temperature;
    }
    if (p.spice) {
        r[spice_is] = p.spice->is;
        r[spice_n] = p.spice->n;
        r[spice_rs] = p.spice->rs;
        r[spice_eg] = p.spice->eg;
        r[spice_xti] = p.spice->xti;
    }
    r[cj] = val(p.cj);
    r[cj_vr] = val(p.cj_vr);
    if (p.spice_cap) {
        r[cjo] = p.spice_cap->cjo;
        r[vj] = p.spice_cap->vj;
        r[m] = p.spice_cap->m;
    }
    r[trr] = val(p.trr);
    r[qrr] = val(p.qrr);
    r[recovery_if] = val(p.recovery_if);
    r[tt] = val(p.tt);
    r[ir] = val(p.ir);
    r[ir_vr] = val(p.ir_vr);
    r[ir_temperature] = val(p.ir_temperature);
    r[rth_ja] = p.rth_ja;
    r[tj_max] = p.tj_max;
    r[package] = str(p.package);
    r[length] = p.length;
    r[width] = p.width;
    r[height] = p.height;
    r[price] = val(p.price);
    r[currency] = str(p.currency);
    r[notes] = str(p.notes);
    return r;
}

std::string fields_help(PartKind kind) {
    std::ostringstream os;
    os << (kind == PartKind::inductor ? "Inductor" : "Diode")
       << " columns (* required; a header may carry a unit: \"inductance (uH)\"):\n";
    for (const Field& f : fields(kind)) {
        std::string name(f.name);
        if (f.required) name += '*';
        std::string unit;
        if (f.type == FieldType::number && !f.display_unit.empty()) {
            unit.append("[").append(f.display_unit).append("]");
        }
        os << "  " << name;
        for (std::size_t pad = name.size(); pad < 17; ++pad) os << ' ';
        os << unit;
        for (std::size_t pad = unit.size(); pad < 7; ++pad) os << ' ';
        os << f.description;
        if (!f.default_rule.empty()) os << " (default: " << f.default_rule << ")";
        os << '\n';
    }
    return os.str();
}

std::string join_names(const std::vector<std::string>& names) {
    std::string out;
    for (const auto& n : names) {
        if (!out.empty()) out.push_back(',');
        out += n;
    }
    return out;
}

std::vector<std::string> split_names(std::string_view text) {
    std::vector<std::string> out;
    while (!text.empty()) {
        const std::size_t comma = text.find(',');
        if (comma != 0) out.emplace_back(text.substr(0, comma));
        if (comma == std::string_view::npos) break;
        text.remove_prefix(comma + 1);
    }
    return out;
}

} // namespace coilsieve::catalog
