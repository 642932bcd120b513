#pragma once
// An inductor as a catalog stores it: plain data in SI units, no behaviour.
// The physics of a part (L(I), DCR(T), core loss) lives in parts/inductor_model.hpp.

#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace coilsieve::parts {

enum class InductorFamily {
    shielded_drum_ferrite,
    semi_shielded_drum,
    unshielded_drum,
    metal_composite,
    powder_toroid,
    ferrite_toroid,
    gapped_ferrite_core,
};

// How inductance falls with DC bias: hard = flat then a sharp knee (ferrite);
// soft = a gradual fall from low currents (powder, metal composite).
enum class SaturationShape { hard, soft };

enum class Mounting { smd, tht };

// Steinmetz coefficients in SI: P_v [W/m^3] = k * f[Hz]^alpha * B_peak[T]^beta.
struct Steinmetz {
    double k = 0.0;
    double alpha = 0.0;
    double beta = 0.0;
};

struct Inductor {
    std::string id;     // unique within its source
    std::string source; // name of the source it came from
    InductorFamily family = InductorFamily::shielded_drum_ferrite;
    double inductance = 0.0;         // H, nominal, zero bias
    double tolerance = 0.2;          // fraction: 0.2 = ±20 %
    double dcr_typ = 0.0;            // Ω at dcr_temperature
    double dcr_max = 0.0;            // Ω at dcr_temperature
    double dcr_temperature = 293.15; // K, temperature at which DCR is stated
    double isat = 0.0;               // A
    double sat_drop = 0.3;           // fraction: L(isat) = L0 * (1 - sat_drop)
    double irms = 0.0;               // A, rated RMS current
    double irms_rise = 40.0;         // K, temperature rise at irms
    std::optional<double> srf;       // Hz, self-resonant frequency
    SaturationShape shape = SaturationShape::hard;
    Steinmetz core;           // core-loss coefficients (family default when assumed)
    double b_sat = 0.3;       // T, flux density at isat, for the flux-swing estimate
    double core_volume = 0.0; // m^3 (family fraction of body volume when assumed)
    double ac_factor = 1.0;   // R_ac / DCR at 100 kHz for the ripple current
    double t_max = 398.15;    // K, maximum operating (hot-spot) temperature
    Mounting mounting = Mounting::smd;
    double length = 0.0;         // m
    double width = 0.0;          // m
    double height = 0.0;         // m
    std::optional<double> mass;  // kg
    std::optional<double> price; // per unit, in `currency`
    std::string currency;
    std::string notes;
    // Names of the fields (as in parts/fields.hpp) that took a default instead of a given value.
    std::vector<std::string> assumed;

    double volume() const { return length * width * height; }
    double footprint() const { return length * width; }
    bool is_assumed(std::string_view field) const;
};

std::string_view to_string(InductorFamily f);
std::string_view to_string(SaturationShape s);
std::string_view to_string(Mounting m);
// Parse readable names ("shielded-drum-ferrite", "metal-composite", ...); nullopt if unknown.
std::optional<InductorFamily> family_from_string(std::string_view s);
std::optional<SaturationShape> shape_from_string(std::string_view s);
std::optional<Mounting> mounting_from_string(std::string_view s);
// All family names, for messages that list the valid choices.
std::vector<std::string_view> family_names();

// Typical values of a construction family, used when a part's list leaves a field out.
struct FamilyDefaults {
    SaturationShape shape;
    Steinmetz core;
    double b_sat;                // T
    double core_volume_fraction; // of the body volume
    double ac_factor;            // R_ac/DCR at 100 kHz
    double energy_density_min;   // J/m^3 of body volume, ½·L·Isat² / V, band for checks
    double energy_density_max;
};
const FamilyDefaults& family_defaults(InductorFamily f);

} // namespace coilsieve::parts
