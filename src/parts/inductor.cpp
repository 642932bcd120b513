// Names of the inductor enums and the construction-family table.
// tools/gen_starter_catalog.py carries identical family constants (FAMILY_DEFAULTS); the starter
// catalog test checks the generated data against this table, so the two cannot drift silently.

#include "parts/inductor.hpp"

#include <algorithm>
#include <array>
#include <cctype>
#include <string>

namespace coilsieve::parts {

namespace {

struct FamilyEntry {
    InductorFamily family;
    std::string_view name;
    FamilyDefaults defaults;
};

// Steinmetz k, alpha, beta in SI (W/m^3, Hz, T). Loss density at 100 kHz, 100 mT is quoted beside
// each row. MnZn ferrite rows sit in the 100-300 mW/cm^3 range of the domain notes (from memory);
// NiZn, metal-composite and powder rows are from memory. b_sat, core volume fraction, ac_factor and
// the energy-density band (J/m^3 of body volume, 1/2*L*Isat^2/V) are common practice / from memory,
// chosen to cover typical catalog ratings of each construction.
constexpr std::array<FamilyEntry, 7> families{{
    // MnZn ferrite drum, 200 mW/cm^3
    {InductorFamily::shielded_drum_ferrite,
     "shielded-drum-ferrite",
     {SaturationShape::hard, {8.0, 1.4, 2.6}, 0.30, 0.50, 1.8, 150.0, 450.0}},
    // MnZn ferrite drum with a partial sleeve, 251 mW/cm^3
    {InductorFamily::semi_shielded_drum,
     "semi-shielded-drum",
     {SaturationShape::hard, {10.0, 1.4, 2.6}, 0.30, 0.45, 1.8, 150.0, 500.0}},
    // NiZn ferrite drum, open magnetic path, 353 mW/cm^3
    {InductorFamily::unshielded_drum,
     "unshielded-drum",
     {SaturationShape::hard, {25.0, 1.35, 2.6}, 0.28, 0.40, 1.6, 100.0, 400.0}},
    // Iron-alloy powder molded around the coil, 794 mW/cm^3
    {InductorFamily::metal_composite,
     "metal-composite",
     {SaturationShape::soft, {100.0, 1.2, 2.1}, 0.50, 0.70, 1.5, 600.0, 2000.0}},
    // Alloy/iron powder toroid, distributed gap, 502 mW/cm^3
    {InductorFamily::powder_toroid,
     "powder-toroid",
     {SaturationShape::soft, {20.0, 1.3, 2.1}, 0.60, 0.35, 2.0, 150.0, 500.0}},
    // Ungapped MnZn toroid: high permeability, little stored energy, 151 mW/cm^3
    {InductorFamily::ferrite_toroid,
     "ferrite-toroid",
     {SaturationShape::hard, {6.0, 1.4, 2.6}, 0.30, 0.35, 2.0, 25.0, 90.0}},
    // Gapped MnZn power ferrite on a bobbin, 156 mW/cm^3
    {InductorFamily::gapped_ferrite_core,
     "gapped-ferrite-core",
     {SaturationShape::hard, {3.5, 1.45, 2.6}, 0.32, 0.40, 2.5, 150.0, 450.0}},
}};

// Lower case with '_' and ' ' read as '-': "Metal_Composite" names the same family.
std::string normalise(std::string_view s) {
    std::string out;
    out.reserve(s.size());
    for (char c : s) {
        if (c == '_' || c == ' ') c = '-';
        out.push_back(static_cast<char>(std::tolower(static_cast<unsigned char>(c))));
    }
    return out;
}

const FamilyEntry& entry(InductorFamily f) {
    for (const auto& e : families) {
        if (e.family == f) return e;
    }
    return families.front(); // unreachable for a valid enum value
}

} // namespace

bool Inductor::is_assumed(std::string_view field) const {
    return std::find(assumed.begin(), assumed.end(), field) != assumed.end();
}

std::string_view to_string(InductorFamily f) { return entry(f).name; }

std::string_view to_string(SaturationShape s) {
    return s == SaturationShape::hard ? "hard" : "soft";
}

std::string_view to_string(Mounting m) { return m == Mounting::smd ? "smd" : "tht"; }

std::optional<InductorFamily> family_from_string(std::string_view s) {
    const std::string n = normalise(s);
    for (const auto& e : families) {
        if (n == e.name) return e.family;
    }
    return std::nullopt;
}

std::optional<SaturationShape> shape_from_string(std::string_view s) {
    const std::string n = normalise(s);
    if (n == "hard") return SaturationShape::hard;
    if (n == "soft") return SaturationShape::soft;
    return std::nullopt;
}

std::optional<Mounting> mounting_from_string(std::string_view s) {
    const std::string n = normalise(s);
    if (n == "smd") return Mounting::smd;
    if (n == "tht") return Mounting::tht;
    return std::nullopt;
}

std::vector<std::string_view> family_names() {
    std::vector<std::string_view> names;
    names.reserve(families.size());
    for (const auto& e : families) names.push_back(e.name);
    return names;
}

const FamilyDefaults& family_defaults(InductorFamily f) { return entry(f).defaults; }

} // namespace coilsieve::parts
