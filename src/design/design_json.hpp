#pragma once
// The JSON design file: reading with full validation, and writing back the effective design.
// Quantities are strings with units ("24V", "700mA", "55C", "25%") or bare numbers in SI units
// (temperatures: bare numbers are °C). to_json writes SI numbers and round-trips exactly.
// control.band / band_range: "25%" or a bare number is a fraction of the target current, "0.2A" a
// current. A `weights` object given in the file counts only the weights it names (others are 0);
// without one, or with an empty one, the defaults of design.hpp apply. Battery termination and
// pre-charge currents left out take the chemistry preset (loads/load.hpp) and are stored
// explicitly.

#include "design/design.hpp"

#include <filesystem>
#include <nlohmann/json.hpp>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace coilsieve::design {

// A design file that cannot be used. what() = "<file>: <json path>: <problem>; <what is right>".
class DesignError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

// Read and validate a design. `file_name` is used in messages and as the default name.
// Throws DesignError.
Design read_design(const nlohmann::json& j, std::string_view file_name);

// Read a design file (JSON; // and /* */ comments allowed). Throws DesignError.
Design load_design_file(const std::filesystem::path& path);

// Checks a design changed in code (e.g. by command-line options) by the rules a design file
// meets; `origin` stands for the file name in messages. Throws DesignError.
void validate(const Design& d, std::string_view origin);

// The effective design with every value written out in SI numbers (temperatures in °C), so that
// read_design(to_json(d)) == d. Switch fields that took the default are left out, so they are
// defaulted again (and reported as such) when read back.
nlohmann::json to_json(const Design& d);

// nlohmann_json ADL hooks (from_json reports errors against the name "<json>").
void to_json(nlohmann::json& j, const Design& d);
void from_json(const nlohmann::json& j, Design& d);

// One line per switch default in use, e.g. "rise_time = 20 ns (default)", for reports.
std::vector<std::string> switch_default_notes(const Switch& s);

} // namespace coilsieve::design
