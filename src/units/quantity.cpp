// Text with units <-> SI doubles. A hand-written scanner (no regex, no heap on the success path)
// because the catalog import sends every cell of 100,000-row files through parse().
//
// Conventions:
// - The number and its SI prefix are turned into one decimal string ("4.7uH" -> "4.7e-6") and
//   converted once by std::from_chars, so parse("4.7uH") is the double nearest to 4.7e-6.
// - IEC 60062 codes: a prefix letter in place of the decimal point ("4u7", "2k2", "n47") carries
//   the prefix and implies the dimension's SI unit; "R" in place of the point ("4R7", "R047") is a
//   plain decimal point, except for a resistance, where it also means ohm, and an inductance,
//   where it means µH as on inductor markings ("4R7" = 4.7 µH). For resistances the
//   capital "K" of IEC 60062 is kilo ("4K7", "10K"). A bare prefix ("10k", "4.7u") is a prefix
//   on the SI unit, for the dimensions that take prefixes.
// - A bare number is in SI units (temperature: °C; ratio: a fraction), or in the default unit
//   when one is given. A unit written in the text (including a code's prefix) wins.

#include "units/quantity.hpp"

#include <algorithm>
#include <array>
#include <charconv>
#include <cmath>
#include <cstddef>
#include <optional>
#include <string>
#include <system_error>

namespace coilsieve::units {
namespace {

// One accepted spelling of a unit: SI value = number * factor * 10^exp10 + offset.
struct UnitDef {
    std::string_view symbol;
    int exp10 = 0;
    double factor = 1.0;
    double offset = 0.0;
    bool prefixable = true;
};

struct Prefix {
    std::string_view symbol;
    int exp10;
};

// "u", the micro sign U+00B5 and the Greek mu U+03BC all mean micro; case matters (m vs M).
constexpr std::array<Prefix, 10> prefixes{{{"f", -15},
                                           {"p", -12},
                                           {"n", -9},
                                           {"u", -6},
                                           {"\u00B5", -6},
                                           {"\u03BC", -6},
                                           {"m", -3},
                                           {"k", 3},
                                           {"M", 6},
                                           {"G", 9}}};

constexpr UnitDef u_inductance[] = {{"H"}};
constexpr UnitDef u_resistance[] = {{"\u03A9"}, {"\u2126"}, {"ohm"}, {"ohms"},
                                    {"Ohm"},    {"Ohms"},   {"R"}};
constexpr UnitDef u_current[] = {{"A"}};
constexpr UnitDef u_voltage[] = {{"V"}};
constexpr UnitDef u_capacitance[] = {{"F"}};
constexpr UnitDef u_frequency[] = {{"Hz"}};
constexpr UnitDef u_power[] = {{"W"}};
constexpr UnitDef u_time[] = {{"s"}};
constexpr UnitDef u_ratio[] = {{"%", -2, 1.0, 0.0, false}};
constexpr UnitDef u_temperature[] = {{"\u00B0C", 0, 1.0, zero_celsius, false},
                                     {"\u2103", 0, 1.0, zero_celsius, false},
                                     {"degC", 0, 1.0, zero_celsius, false},
                                     {"C", 0, 1.0, zero_celsius, false},
                                     {"K", 0, 1.0, 0.0, false}};
constexpr UnitDef u_temperature_difference[] = {{"K", 0, 1.0, 0.0, false},
                                                {"\u00B0C", 0, 1.0, 0.0, false},
                                                {"\u2103", 0, 1.0, 0.0, false},
                                                {"degC", 0, 1.0, 0.0, false},
                                                {"C", 0, 1.0, 0.0, false}};
constexpr UnitDef u_length[] = {{"m"}, {"cm", -2, 1.0, 0.0, false}};
constexpr UnitDef u_area[] = {
    {"m2", 0, 1.0, 0.0, false},   {"m\u00B2", 0, 1.0, 0.0, false},   {"m^2", 0, 1.0, 0.0, false},
    {"mm2", -6, 1.0, 0.0, false}, {"mm\u00B2", -6, 1.0, 0.0, false}, {"mm^2", -6, 1.0, 0.0, false},
    {"cm2", -4, 1.0, 0.0, false}, {"cm\u00B2", -4, 1.0, 0.0, false}, {"cm^2", -4, 1.0, 0.0, false}};
constexpr UnitDef u_volume[] = {
    {"m3", 0, 1.0, 0.0, false},   {"m\u00B3", 0, 1.0, 0.0, false},   {"m^3", 0, 1.0, 0.0, false},
    {"mm3", -9, 1.0, 0.0, false}, {"mm\u00B3", -9, 1.0, 0.0, false}, {"mm^3", -9, 1.0, 0.0, false},
    {"cm3", -6, 1.0, 0.0, false}, {"cm\u00B3", -6, 1.0, 0.0, false}, {"cm^3", -6, 1.0, 0.0, false}};
constexpr UnitDef u_charge[] = {{"C"}, {"Ah", 0, 3600.0}};
constexpr UnitDef u_energy[] = {{"J"}, {"Wh", 0, 3600.0}};
constexpr UnitDef u_thermal_resistance[] = {{"K/W", 0, 1.0, 0.0, false},
                                            {"\u00B0C/W", 0, 1.0, 0.0, false},
                                            {"\u2103/W", 0, 1.0, 0.0, false},
                                            {"degC/W", 0, 1.0, 0.0, false},
                                            {"C/W", 0, 1.0, 0.0, false}};
constexpr UnitDef u_mass[] = {{"g", -3}};
constexpr UnitDef u_battery_capacity[] = {{"Ah", 0, 3600.0}};
constexpr UnitDef u_voltage_per_kelvin[] = {
    {"V/K"}, {"V/\u00B0C"}, {"V/\u2103"}, {"V/degC"}, {"V/C"}};

struct DimInfo {
    Dimension dim;
    std::string_view name;
    std::string_view article;  // "a" / "an" before the name
    std::string_view accepted; // units for messages
    std::string_view example;  // a valid text for messages
    std::span<const UnitDef> units;
    bool prefix_code; // IEC 60062 prefix-as-decimal-point and a bare prefix ("10k") allowed
    // unit_symbol() and format(unit = false): plain = si * plain_scale + plain_offset
    std::string_view symbol;
    std::string_view symbol_ascii;
    double plain_scale;
    double plain_offset;
    // format(): shown = si * shown_scale + shown_offset, printed with a prefix in [min_e3, max_e3]
    std::string_view shown;
    std::string_view shown_ascii;
    double shown_scale;
    double shown_offset;
    int min_e3;
    int max_e3;
};

constexpr std::span<const UnitDef> none{};

// clang-format off
constexpr std::array<DimInfo, 21> dims{{
    {Dimension::dimensionless, "dimensionless number", "a", "no unit", "1.5", none, false,
     "", "", 1.0, 0.0, "", "", 1.0, 0.0, 0, 0},
    {Dimension::ratio, "ratio", "a", "% or a fraction", "20%", u_ratio, false,
     "%", "%", 100.0, 0.0, "%", "%", 100.0, 0.0, 0, 0},
    {Dimension::inductance, "inductance", "an", "H", "4.7uH", u_inductance, true,
     "H", "H", 1.0, 0.0, "H", "H", 1.0, 0.0, -15, 9},
    {Dimension::resistance, "resistance", "a", "\u03A9, ohm or R", "35mOhm", u_resistance, true,
     "\u03A9", "Ohm", 1.0, 0.0, "\u03A9", "Ohm", 1.0, 0.0, -12, 9},
    {Dimension::current, "current", "a", "A", "1.2A", u_current, true,
     "A", "A", 1.0, 0.0, "A", "A", 1.0, 0.0, -15, 9},
    {Dimension::voltage, "voltage", "a", "V", "12V", u_voltage, true,
     "V", "V", 1.0, 0.0, "V", "V", 1.0, 0.0, -15, 9},
    {Dimension::capacitance, "capacitance", "a", "F", "100nF", u_capacitance, true,
     "F", "F", 1.0, 0.0, "F", "F", 1.0, 0.0, -15, 9},
    {Dimension::frequency, "frequency", "a", "Hz", "215kHz", u_frequency, true,
     "Hz", "Hz", 1.0, 0.0, "Hz", "Hz", 1.0, 0.0, -15, 9},
    {Dimension::power, "power", "a", "W", "1.5W", u_power, true,
     "W", "W", 1.0, 0.0, "W", "W", 1.0, 0.0, -15, 9},
    {Dimension::time, "time", "a", "s", "35ns", u_time, true,
     "s", "s", 1.0, 0.0, "s", "s", 1.0, 0.0, -15, 0},
    {Dimension::temperature, "temperature", "a", "\u00B0C, degC, C or K", "55C", u_temperature,
     false, "\u00B0C", "degC", 1.0, -zero_celsius, "\u00B0C", "degC", 1.0, -zero_celsius, 0, 0},
    {Dimension::temperature_difference, "temperature difference", "a", "K or \u00B0C", "40K",
     u_temperature_difference, false, "K", "K", 1.0, 0.0, "K", "K", 1.0, 0.0, 0, 0},
    {Dimension::length, "length", "a", "m or mm", "4.3mm", u_length, true,
     "mm", "mm", 1e3, 0.0, "mm", "mm", 1e3, 0.0, 0, 0},
    {Dimension::area, "area", "an", "mm\u00B2 or m\u00B2", "12mm2", u_area, false,
     "mm\u00B2", "mm^2", 1e6, 0.0, "mm\u00B2", "mm^2", 1e6, 0.0, 0, 0},
    {Dimension::volume, "volume", "a", "mm\u00B3 or m\u00B3", "150mm3", u_volume, false,
     "mm\u00B3", "mm^3", 1e9, 0.0, "mm\u00B3", "mm^3", 1e9, 0.0, 0, 0},
    {Dimension::charge, "charge", "a", "C or Ah", "25nC", u_charge, true,
     "C", "C", 1.0, 0.0, "C", "C", 1.0, 0.0, -15, 9},
    {Dimension::energy, "energy", "an", "J or Wh", "3.5uJ", u_energy, true,
     "J", "J", 1.0, 0.0, "J", "J", 1.0, 0.0, -15, 9},
    {Dimension::thermal_resistance, "thermal resistance", "a", "K/W", "35K/W",
     u_thermal_resistance, false, "K/W", "K/W", 1.0, 0.0, "K/W", "K/W", 1.0, 0.0, 0, 0},
    {Dimension::mass, "mass", "a", "g or kg", "1.2g", u_mass, false,
     "g", "g", 1e3, 0.0, "g", "g", 1e3, 0.0, -6, 3},
    {Dimension::battery_capacity, "battery capacity", "a", "Ah or mAh", "2200mAh",
     u_battery_capacity, false, "mAh", "mAh", 1.0 / 3.6, 0.0, "Ah", "Ah", 1.0 / 3600.0, 0.0, -3, 0},
    {Dimension::voltage_per_kelvin, "voltage per kelvin", "a", "V/K or mV/K", "-2mV/K",
     u_voltage_per_kelvin, true, "V/K", "V/K", 1.0, 0.0, "V/K", "V/K", 1.0, 0.0, -9, 0},
}};
// clang-format on

constexpr bool table_in_enum_order() {
    for (std::size_t i = 0; i < dims.size(); ++i) {
        if (static_cast<std::size_t>(dims[i].dim) != i) return false;
    }
    return true;
}
static_assert(table_in_enum_order(), "dims[] must follow the order of enum Dimension");

const DimInfo& info(Dimension d) {
    const auto i = static_cast<std::size_t>(d);
    if (i >= dims.size()) throw std::invalid_argument("units: unknown Dimension value");
    return dims[i];
}

// A unit resolved from text: SI = number * 10^exp10 * factor + offset.
struct Resolved {
    int exp10 = 0;
    double factor = 1.0;
    double offset = 0.0;
};

bool is_digit(char c) { return c >= '0' && c <= '9'; }

// Bytes of a space character at s[i] (ASCII blank, NBSP, thin or narrow no-break space), or 0.
std::size_t space_len(std::string_view s, std::size_t i) {
    const char c = s[i];
    if (c == ' ' || c == '\t' || c == '\r' || c == '\n') return 1;
    if (c != '\xC2' && c != '\xE2') return 0; // lead bytes of the spaces below
    const std::string_view rest = s.substr(i);
    if (rest.starts_with("\u00A0")) return 2;
    if (rest.starts_with("\u2009") || rest.starts_with("\u202F")) return 3;
    return 0;
}

std::size_t skip_spaces(std::string_view s, std::size_t i) {
    while (i < s.size()) {
        const std::size_t n = space_len(s, i);
        if (n == 0) break;
        i += n;
    }
    return i;
}

std::string_view trim(std::string_view s) {
    s.remove_prefix(skip_spaces(s, 0));
    while (!s.empty()) {
        // Trailing spaces: test the last 1, 2 and 3 bytes.
        std::size_t cut = 0;
        for (std::size_t n = 1; n <= 3 && n <= s.size(); ++n) {
            if (space_len(s, s.size() - n) == n) {
                cut = n;
                break;
            }
        }
        if (cut == 0) break;
        s.remove_suffix(cut);
    }
    return s;
}

std::string quoted(std::string_view text) {
    constexpr std::size_t max_shown = 80;
    std::string q;
    q.reserve(std::min(text.size(), max_shown) + 8);
    q += '"';
    if (text.size() <= max_shown) {
        q += text;
    } else {
        q += text.substr(0, max_shown);
        q += "...";
    }
    q += '"';
    return q;
}

std::string expected_phrase(const DimInfo& di) {
    std::string s = "expected ";
    s += di.article;
    s += ' ';
    s += di.name;
    if (di.dim == Dimension::dimensionless) return s + " such as \"1.5\"";
    s += " (";
    s += di.accepted;
    s += ") such as \"";
    s += di.example;
    s += '"';
    return s;
}

[[noreturn]] void fail(std::string_view text, const std::string& why) {
    throw ParseError(quoted(text) + " " + why);
}

// Length in bytes of a prefix at the start of s, or nullopt.
std::optional<Prefix> prefix_at(std::string_view s) {
    for (const Prefix& p : prefixes) {
        if (s.starts_with(p.symbol)) return p;
    }
    return std::nullopt;
}

// String equality that rejects on length and first byte before calling memcmp (hot path).
bool same(std::string_view a, std::string_view b) {
    return a.size() == b.size() && (a.empty() || (a[0] == b[0] && a == b));
}

std::optional<Resolved> resolve_unit(std::string_view tok, const DimInfo& di,
                                     bool allow_bare_prefix) {
    for (const UnitDef& u : di.units) {
        if (same(tok, u.symbol)) return Resolved{u.exp10, u.factor, u.offset};
    }
    if (tok.empty()) return std::nullopt;
    for (const Prefix& p : prefixes) {
        if (tok[0] != p.symbol[0] || !tok.starts_with(p.symbol)) continue;
        const std::string_view rest = tok.substr(p.symbol.size());
        if (rest.empty()) {
            if (allow_bare_prefix && di.prefix_code) return Resolved{p.exp10, 1.0, 0.0};
            continue;
        }
        for (const UnitDef& u : di.units) {
            if (u.prefixable && same(rest, u.symbol))
                return Resolved{p.exp10 + u.exp10, u.factor, u.offset};
        }
    }
    return std::nullopt;
}

bool is_unit_anywhere(std::string_view sym) {
    for (const DimInfo& di : dims) {
        for (const UnitDef& u : di.units) {
            if (sym == u.symbol) return true;
        }
    }
    return false;
}

// Explains why `tok` is not a unit of `di`; always throws.
[[noreturn]] void fail_unit(std::string_view text, std::string_view tok, const DimInfo& di) {
    if (di.dim == Dimension::dimensionless) {
        fail(text,
             "has a unit \"" + std::string(tok) + "\"; " + expected_phrase(di) + " without a unit");
    }
    // Ask the other dimensions, battery capacity before charge so "2200mAh" is named as such.
    constexpr std::array<Dimension, dims.size()> diagnosis_order = [] {
        std::array<Dimension, dims.size()> order{};
        std::size_t k = 0;
        order[k++] = Dimension::battery_capacity;
        for (const DimInfo& d : dims) {
            if (d.dim != Dimension::battery_capacity) order[k++] = d.dim;
        }
        return order;
    }();
    for (const Dimension od : diagnosis_order) {
        const DimInfo& other = info(od);
        if (other.dim == di.dim || other.dim == Dimension::dimensionless) continue;
        if (resolve_unit(tok, other, false)) {
            std::string why = "is ";
            why += other.article;
            why += ' ';
            why += other.name;
            why += ", expected ";
            why += di.article;
            why += ' ';
            why += di.name;
            why += " (";
            why += di.accepted;
            why += ')';
            fail(text, why);
        }
    }
    if (const auto p = prefix_at(tok)) {
        const std::string_view rest = tok.substr(p->symbol.size());
        for (const UnitDef& u : di.units) {
            if (rest == u.symbol) {
                fail(text, "puts the prefix \"" + std::string(p->symbol) + "\" on \"" +
                               std::string(rest) + "\", which takes no prefix; " +
                               expected_phrase(di));
            }
        }
        if (rest.empty()) {
            fail(text, "has the prefix \"" + std::string(tok) + "\" without a unit; " +
                           expected_phrase(di));
        }
    }
    // A known unit after something that is not a prefix: blame the prefix.
    for (std::size_t cut = 1; cut < tok.size(); ++cut) {
        const std::string_view head = tok.substr(0, cut);
        if (is_unit_anywhere(tok.substr(cut)) && !prefix_at(head)) {
            fail(text, "has the unknown prefix \"" + std::string(head) +
                           "\"; SI prefixes are f p n u \u00B5 m k M G (case matters: m is "
                           "milli, M is mega); " +
                           expected_phrase(di));
        }
    }
    fail(text, "has the unknown unit \"" + std::string(tok) + "\"; " + expected_phrase(di));
}

bool starts_with_ci(std::string_view s, std::string_view word) {
    if (s.size() < word.size()) return false;
    for (std::size_t i = 0; i < word.size(); ++i) {
        char c = s[i];
        if (c >= 'A' && c <= 'Z') c = static_cast<char>(c - 'A' + 'a');
        if (c != word[i]) return false;
    }
    return true;
}

std::optional<Resolved> resolve_default(std::string_view default_unit, const DimInfo& di) {
    const std::string_view tok = trim(default_unit);
    if (tok.empty()) return std::nullopt;
    if (auto r = resolve_unit(tok, di, true)) return r;
    throw ParseError("default unit " + quoted(default_unit) + " is not a unit of " +
                     std::string(di.article) + " " + std::string(di.name) + "; expected " +
                     std::string(di.accepted));
}

double parse_impl(std::string_view text, Dimension expected, const DimInfo& di,
                  const std::optional<Resolved>& default_unit) {
    const std::string_view s = trim(text);
    if (s.empty()) fail(text, "is empty; " + expected_phrase(di));
    const std::size_t n = s.size();

    // Mantissa as decimal text ("-4.7"), completed below with "e<exponent>".
    constexpr std::size_t max_mantissa = 64;
    std::array<char, max_mantissa + 16> buf; // filled before read; no zeroing on the hot path
    std::size_t m = 0;
    auto put = [&](char c) {
        if (m >= max_mantissa) fail(text, "has too many digits; " + expected_phrase(di));
        buf[m++] = c;
    };

    std::size_t i = 0;
    if (s[0] == '+' || s[0] == '-') {
        if (s[0] == '-') put('-');
        i = 1;
    } else if (s.starts_with("\u2212")) { // minus sign, as typeset in data sheets
        put('-');
        i = 3;
    }
    if (starts_with_ci(s.substr(i), "nan") || starts_with_ci(s.substr(i), "inf")) {
        fail(text, "is not a finite number; " + expected_phrase(di));
    }

    std::size_t digits = 0;
    while (i < n && is_digit(s[i])) {
        put(s[i++]);
        ++digits;
    }
    bool code = false;        // IEC 60062 letter as decimal point
    bool r_code = false;      // ... the letter was R
    bool code_prefix = false; // ... the letter was an SI prefix
    int code_exp10 = 0;       // ... of this power of ten
    if (i < n && s[i] == '.') {
        put(s[i++]);
        while (i < n && is_digit(s[i])) {
            put(s[i++]);
            ++digits;
        }
    } else if (i < n) {
        std::size_t len = 0;
        if (s[i] == 'R') {
            len = 1;
        } else if (s[i] == 'K' && expected == Dimension::resistance) {
            len = 1; // IEC 60062 writes the resistance multipliers in capitals: "4K7"
            code_prefix = true;
            code_exp10 = 3;
        } else if (const auto p = prefix_at(s.substr(i))) {
            len = p->symbol.size();
            code_prefix = true;
            code_exp10 = p->exp10;
        }
        // "2m3" is 2 m³, not a code, for a dimension whose units start with a prefix letter.
        const auto unit_here = [&] {
            std::size_t e = i;
            while (e < n && space_len(s, e) == 0) ++e;
            return !di.prefix_code && resolve_unit(s.substr(i, e - i), di, false).has_value();
        };
        if (len > 0 && i + len < n && is_digit(s[i + len]) && !unit_here()) {
            code = true;
            r_code = !code_prefix;
            if (code_prefix && !di.prefix_code) {
                fail(text, "uses an SI prefix as decimal point (IEC 60062), which " +
                               std::string(di.article) + " " + std::string(di.name) +
                               " does not take; " + expected_phrase(di));
            }
            i += len;
            put('.');
            while (i < n && is_digit(s[i])) {
                put(s[i++]);
                ++digits;
            }
        } else {
            code_prefix = false;
        }
    }
    if (digits == 0) fail(text, "does not start with a number; " + expected_phrase(di));

    long exponent = 0;
    if (!code && i < n && (s[i] == 'e' || s[i] == 'E')) {
        std::size_t j = i + 1;
        bool negative = false;
        if (j < n && (s[j] == '+' || s[j] == '-')) negative = s[j++] == '-';
        if (j < n && is_digit(s[j])) {
            while (j < n && is_digit(s[j])) {
                // Saturate: anything this large is out of range anyway.
                exponent = std::min(exponent * 10 + (s[j++] - '0'), 100000L);
            }
            if (negative) exponent = -exponent;
            i = j;
        }
    }

    // The unit: one token after optional spaces, then only spaces.
    i = skip_spaces(s, i);
    const std::size_t tok_begin = i;
    while (i < n && space_len(s, i) == 0) ++i;
    const std::string_view tok = s.substr(tok_begin, i - tok_begin);
    const std::size_t after = skip_spaces(s, i);
    const auto numeric_start = [](std::string_view t) {
        return !t.empty() && (is_digit(t[0]) || t[0] == '.' || t[0] == '+' || t[0] == '-');
    };
    if (numeric_start(tok)) {
        fail(text, "holds two numbers; " + expected_phrase(di));
    }
    if (after < n) {
        if (numeric_start(s.substr(after))) fail(text, "holds two numbers; " + expected_phrase(di));
        fail(text, "has text \"" + std::string(s.substr(after)) + "\" after the unit; " +
                       expected_phrase(di));
    }

    Resolved unit;
    if (tok.empty()) {
        if (code_prefix) {
            unit.exp10 = code_exp10; // "4u7": the prefix on the SI unit
        } else if (r_code && expected == Dimension::resistance) {
            // "4R7": IEC 60062 resistance code, ohms.
        } else if (r_code && expected == Dimension::inductance) {
            unit.exp10 = -6; // "4R7" on an inductor is 4.7 µH (marking practice, from memory)
        } else if (default_unit) {
            unit = *default_unit;
        } else if (expected == Dimension::temperature) {
            unit.offset = zero_celsius; // bare temperature: °C
        }
    } else if (code_prefix) {
        // "4u7H": the prefix came with the code; the unit must be written without one.
        bool found = false;
        for (const UnitDef& u : di.units) {
            if (u.prefixable && tok == u.symbol) {
                unit = Resolved{code_exp10 + u.exp10, u.factor, u.offset};
                found = true;
                break;
            }
        }
        if (!found) {
            if (resolve_unit(tok, di, false)) {
                fail(text, "has a prefix twice (code and unit); " + expected_phrase(di));
            }
            fail_unit(text, tok, di);
        }
    } else if (auto r = resolve_unit(tok, di, true)) {
        unit = *r;
    } else if (tok == "K" && expected == Dimension::resistance) {
        unit.exp10 = 3; // "10K": the IEC 60062 resistance letter
    } else {
        fail_unit(text, tok, di);
    }

    const long total = exponent + unit.exp10;
    buf[m++] = 'e';
    const auto [ptr, ec] = std::to_chars(buf.data() + m, buf.data() + buf.size(), total);
    if (ec != std::errc{}) fail(text, "is out of range; " + expected_phrase(di));
    double value = 0.0;
    const auto res = std::from_chars(buf.data(), ptr, value);
    if (res.ec != std::errc{} || res.ptr != ptr) {
        fail(text, "is out of the range of numbers this program handles; " + expected_phrase(di));
    }
    value = value * unit.factor + unit.offset;
    if (!std::isfinite(value)) fail(text, "is not a finite number; " + expected_phrase(di));
    if (expected == Dimension::temperature && value < 0.0) {
        fail(text, "is below absolute zero (0 K = -273.15 \u00B0C); expected a temperature such "
                   "as \"55C\" or \"328.15K\"");
    }
    return value;
}

// ---- formatting ----

// A value rounded to `sig` significant digits: d1 d2 ... dn x 10^(exp - n + 1).
struct Digits {
    std::array<char, 24> d{};
    int n = 0;
    int exp = 0; // decimal exponent of the first digit
};

Digits round_to(double magnitude, int sig) {
    std::array<char, 48> buf{};
    const auto r = std::to_chars(buf.data(), buf.data() + buf.size(), magnitude,
                                 std::chars_format::scientific, sig - 1);
    Digits out;
    const char* p = buf.data();
    for (; p < r.ptr && *p != 'e'; ++p) {
        if (is_digit(*p) && out.n < static_cast<int>(out.d.size())) out.d[out.n++] = *p;
    }
    if (p < r.ptr) ++p; // 'e'
    if (p < r.ptr && *p == '+') ++p;
    std::from_chars(p, r.ptr, out.exp);
    return out;
}

// Digits with the decimal point after `point` digits (point may be <= 0 or > n).
void append_fixed(std::string& out, const Digits& g, int point) {
    if (point <= 0) {
        out += "0.";
        out.append(static_cast<std::size_t>(-point), '0');
        out.append(g.d.data(), static_cast<std::size_t>(g.n));
        return;
    }
    if (point >= g.n) {
        out.append(g.d.data(), static_cast<std::size_t>(g.n));
        out.append(static_cast<std::size_t>(point - g.n), '0');
        return;
    }
    out.append(g.d.data(), static_cast<std::size_t>(point));
    out += '.';
    out.append(g.d.data() + point, static_cast<std::size_t>(g.n - point));
}

void append_scientific(std::string& out, const Digits& g, int exp) {
    out += g.d[0];
    if (g.n > 1) {
        out += '.';
        out.append(g.d.data() + 1, static_cast<std::size_t>(g.n - 1));
    }
    out += 'e';
    out += std::to_string(exp);
}

// A number without prefix: fixed notation for moderate magnitudes, else "4.70e-6".
std::string plain_number(double v, int sig) {
    if (!std::isfinite(v)) return "n/a";
    if (v == 0.0) return "0";
    std::string out;
    if (v < 0.0) out += '-';
    const Digits g = round_to(std::abs(v), sig);
    if (g.exp >= -5 && g.exp <= 9) {
        append_fixed(out, g, g.exp + 1);
    } else {
        append_scientific(out, g, g.exp);
    }
    return out;
}

std::string_view prefix_symbol(int e3, bool ascii) {
    switch (e3) {
    case -15:
        return "f";
    case -12:
        return "p";
    case -9:
        return "n";
    case -6:
        return ascii ? "u" : "\u00B5";
    case -3:
        return "m";
    case 3:
        return "k";
    case 6:
        return "M";
    case 9:
        return "G";
    default:
        return "";
    }
}

int floor_div3(int e) { return (e >= 0 ? e / 3 : -((-e + 2) / 3)) * 3; }

double pow10_exact(int e) {
    // Powers of ten up to 1e22 are exact doubles.
    static constexpr std::array<double, 23> p{1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,
                                              1e8,  1e9,  1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
                                              1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};
    const int a = std::abs(e);
    const double mag = a < 23 ? p[static_cast<std::size_t>(a)] : std::pow(10.0, a);
    return e >= 0 ? mag : 1.0 / mag;
}

} // namespace

std::string_view dimension_name(Dimension d) { return info(d).name; }

std::string_view unit_symbol(Dimension d, bool ascii) {
    const DimInfo& di = info(d);
    return ascii ? di.symbol_ascii : di.symbol;
}

double parse(std::string_view text, Dimension expected) {
    return parse_impl(text, expected, info(expected), std::nullopt);
}

double parse(std::string_view text, Dimension expected, std::string_view default_unit) {
    const DimInfo& di = info(expected);
    return parse_impl(text, expected, di, resolve_default(default_unit, di));
}

std::string format(double si_value, Dimension d, FormatOptions options) {
    if (!std::isfinite(si_value)) return "n/a";
    const DimInfo& di = info(d);
    const int sig = std::clamp(options.significant, 1, 17);
    if (!options.unit) {
        double v = si_value * di.plain_scale + di.plain_offset;
        if (di.plain_offset != 0.0 && std::abs(v) < 1e-9) v = 0.0; // K -> °C rounding dust
        return plain_number(v, sig);
    }
    double v = si_value * di.shown_scale + di.shown_offset;
    if (di.shown_offset != 0.0 && std::abs(v) < 1e-9) v = 0.0;
    if (!std::isfinite(v)) return "n/a";
    const std::string_view symbol = options.ascii ? di.shown_ascii : di.shown;

    std::string out;
    int e3 = std::clamp(0, di.min_e3, di.max_e3);
    if (v == 0.0) {
        out += '0';
    } else {
        if (v < 0.0) out += '-';
        const Digits g = round_to(std::abs(v), sig);
        e3 = std::clamp(floor_div3(g.exp), di.min_e3, di.max_e3);
        const int point = g.exp - e3 + 1;
        if (point >= -5 && point <= 9) {
            append_fixed(out, g, point);
        } else {
            append_scientific(out, g, g.exp - e3);
        }
    }
    if (!symbol.empty()) {
        out += ' ';
        out += prefix_symbol(e3, options.ascii);
        out += symbol;
    }
    return out;
}

std::string format_in(double si_value, Dimension d, std::string_view unit, int significant) {
    const DimInfo& di = info(d);
    const int sig = std::clamp(significant, 1, 17);
    const std::optional<Resolved> r = resolve_default(unit, di);
    if (!r) {
        // No unit: the bare-number convention of parse().
        const double offset = d == Dimension::temperature ? zero_celsius : 0.0;
        double v = si_value - offset;
        if (offset != 0.0 && std::abs(v) < 1e-9) v = 0.0;
        return plain_number(v, sig);
    }
    double v = (si_value - r->offset) / r->factor;
    if (r->offset != 0.0 && std::abs(v) < 1e-9) v = 0.0;
    // Divide by 10^exp10 with an exact power so "uH" columns print 4.7 and not 4.6999...
    v = r->exp10 < 0 ? v * pow10_exact(-r->exp10) : v / pow10_exact(r->exp10);
    return plain_number(v, sig);
}

} // namespace coilsieve::units
