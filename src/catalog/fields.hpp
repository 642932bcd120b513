#pragma once
// The declarative field table: one row per catalog field (name, dimension, required, aliases,
// display unit, physical range, default rule, description). It drives header matching, cell
// validation, defaults, export columns, the database columns and the `--help` field lists.

#include "catalog/import.hpp"
#include "units/quantity.hpp"

#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

namespace coilsieve::catalog {

enum class FieldType { number, text };

struct Field {
    std::string_view name; // canonical name (columns.md), also the DB column
    FieldType type;
    units::Dimension dimension; // numbers only
    bool required;
    std::string_view aliases;      // '|'-separated, already normalised (see normalise_header)
    std::string_view display_unit; // unit of export headers and tables ("uH"); "" = SI/plain
    double min;                    // physical range of a given value, SI (numbers only)
    bool min_inclusive;
    double max;
    std::string_view default_rule; // "" = stays empty when missing
    std::string_view description;
};

std::string_view to_string(PartKind k);
std::optional<PartKind> part_kind_from_string(std::string_view s); // "inductor(s)", "diode(s)"

std::span<const Field> fields(PartKind kind);
// Index of a canonical field name in fields(kind); nullopt if unknown.
std::optional<std::size_t> field_index(PartKind kind, std::string_view name);

// Lower case; spaces, underscores, hyphens and dots removed: "I sat" -> "isat".
std::string normalise_header(std::string_view header);

struct HeaderMatch {
    std::size_t field; // index into fields(kind)
    std::string unit;  // unit written in the header ("uH" for "L (uH)"), "" if none
};
// Match a CSV header / JSON key: the mapping file first, then names and aliases
// (case-insensitive, ignoring spaces/underscores/hyphens), with an optional trailing "(unit)" or
// "[unit]". nullopt if unknown.
std::optional<HeaderMatch> match_header(PartKind kind, std::string_view header,
                                        const HeaderMapping& mapping = {});

// A part as generic values, indexed like fields(kind): empty, a number (SI) or text.
using Value = std::variant<std::monostate, double, std::string>;
using Record = std::vector<Value>;

// Parse one cell for a field: numbers through units::parse with the header's unit for bare
// numbers (temperature headers in C/°C/degC: bare numbers are °C anyway). Throws
// units::ParseError with a message saying what would be right. Empty text -> monostate.
Value parse_cell(const Field& field, std::string_view cell, std::string_view header_unit);
// Whether a header unit suits the field ("uH" for inductance); the reason when not.
std::optional<std::string> check_header_unit(const Field& field, std::string_view unit);

// Range and finiteness check of a parsed number; the reason when out of range.
std::optional<std::string> check_range(const Field& field, double si_value);

// Defaults for missing optional fields (the rules are in fields.cpp, one comment each). Adds the
// name of every field that took a default to `assumed`. Expects required fields present and the
// family/technology/package already valid; returns problems (column, reason) it finds itself.
struct RecordProblem {
    std::string field;
    std::string reason;
};
std::vector<RecordProblem> apply_defaults(PartKind kind, Record& record,
                                          std::vector<std::string>& assumed);

// Conversions between a record and a part. The record must be complete (after apply_defaults).
parts::Inductor inductor_from_record(const Record& r, std::string source,
                                     std::vector<std::string> assumed);
parts::Diode diode_from_record(const Record& r, std::string source,
                               std::vector<std::string> assumed);
Record to_record(const parts::Inductor& p);
Record to_record(const parts::Diode& p);

// Valid names of the choice fields, for messages: "family", "technology", "shape", "mounting",
// "package".
std::vector<std::string> choice_names(std::string_view field);
// Canonical spelling of a choice value ("Metal Composite" -> "metal-composite"); nullopt if
// unknown.
std::optional<std::string> canonical_choice(std::string_view field, std::string_view value);

// Text for `--help`: one line per field with unit, required flag, default and description.
std::string fields_help(PartKind kind);

// The assumed list as stored in the database: comma-separated field names.
std::string join_names(const std::vector<std::string>& names);
std::vector<std::string> split_names(std::string_view text);

} // namespace coilsieve::catalog
