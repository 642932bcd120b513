// Names of the diode technologies and the table of package outlines.
// tools/gen_starter_catalog.py carries identical package constants (PACKAGES); the starter catalog
// test checks the generated data against this table.

#include "parts/diode.hpp"

#include <algorithm>
#include <array>
#include <cctype>
#include <string>

namespace coilsieve::parts {

namespace {

struct TechnologyEntry {
    DiodeTechnology technology;
    std::string_view name;
};

constexpr std::array<TechnologyEntry, 5> technologies{{
    {DiodeTechnology::schottky, "schottky"},
    {DiodeTechnology::sic_schottky, "sic-schottky"},
    {DiodeTechnology::ultrafast, "ultrafast"},
    {DiodeTechnology::fast, "fast"},
    {DiodeTechnology::standard, "standard"},
}};

struct OutlineEntry {
    std::string_view name;  // canonical name, as the catalog writes it
    std::string_view alias; // JEDEC registration or common alternative name ("" if none)
    double length_mm, width_mm, height_mm;
    double rth_ja; // K/W
    bool smd;
};

// Body length x width x height in mm, nominal. SMA/SMB/SMC (JEDEC DO-214AC/AA/AB), TO-252 and
// SOD-123 as in the domain notes; the other outlines industry-typical (from memory). R_th,ja is
// junction to ambient on a minimum pad (SMD) or with short leads in still air (through-hole):
// common practice, from memory.
constexpr double mm = 1e-3;
constexpr std::array<OutlineEntry, 14> outlines{{
    {"SOD-323", "", 1.7, 1.25, 0.9, 450.0, true},
    {"SOD-123", "", 2.65, 1.55, 1.35, 300.0, true},
    {"SOD-123F", "", 2.7, 1.6, 1.0, 200.0, true},
    {"SMA", "DO-214AC", 4.3, 2.6, 2.4, 100.0, true},
    {"SMB", "DO-214AA", 4.3, 3.6, 2.3, 75.0, true},
    {"SMC", "DO-214AB", 6.85, 5.9, 2.3, 55.0, true},
    {"TO-277", "TO-277A", 6.5, 4.6, 1.1, 60.0, true},
    {"TO-252", "DPAK", 6.1, 6.5, 2.4, 80.0, true},
    {"TO-263", "D2PAK", 10.2, 9.2, 4.5, 62.0, true},
    {"TO-220", "TO-220AC", 10.2, 4.6, 15.9, 62.0, false},
    {"TO-247", "TO-247AC", 15.9, 5.0, 20.9, 40.0, false},
    {"DO-41", "DO-204AL", 5.2, 2.7, 2.7, 60.0, false},
    {"DO-15", "DO-204AC", 7.6, 3.6, 3.6, 50.0, false},
    {"DO-201", "DO-201AD", 9.5, 5.3, 5.3, 40.0, false},
}};

std::string lower(std::string_view s) {
    std::string out;
    out.reserve(s.size());
    for (char c : s) out.push_back(static_cast<char>(std::tolower(static_cast<unsigned char>(c))));
    return out;
}

// Package names compare without case, spaces, '-' or '_': "do214ac", "DO-214AC", "Sod 123".
std::string package_key(std::string_view s) {
    std::string out;
    out.reserve(s.size());
    for (char c : s) {
        if (c == '-' || c == '_' || c == ' ') continue;
        out.push_back(static_cast<char>(std::toupper(static_cast<unsigned char>(c))));
    }
    return out;
}

} // namespace

bool Diode::is_assumed(std::string_view field) const {
    return std::find(assumed.begin(), assumed.end(), field) != assumed.end();
}

std::string_view to_string(DiodeTechnology t) {
    for (const auto& e : technologies) {
        if (e.technology == t) return e.name;
    }
    return "schottky"; // unreachable for a valid enum value
}

std::optional<DiodeTechnology> technology_from_string(std::string_view s) {
    std::string n = lower(s);
    std::replace(n.begin(), n.end(), '_', '-');
    std::replace(n.begin(), n.end(), ' ', '-');
    for (const auto& e : technologies) {
        if (n == e.name) return e.technology;
    }
    return std::nullopt;
}

std::vector<std::string_view> technology_names() {
    std::vector<std::string_view> names;
    names.reserve(technologies.size());
    for (const auto& e : technologies) names.push_back(e.name);
    return names;
}

std::optional<PackageOutline> package_outline(std::string_view name) {
    const std::string key = package_key(name);
    if (key.empty()) return std::nullopt;
    for (const auto& o : outlines) {
        if (key == package_key(o.name) || (!o.alias.empty() && key == package_key(o.alias))) {
            return PackageOutline{o.name,           o.length_mm * mm, o.width_mm * mm,
                                  o.height_mm * mm, o.rth_ja,         o.smd};
        }
    }
    return std::nullopt;
}

} // namespace coilsieve::parts
