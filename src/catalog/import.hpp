#pragma once
// Reading a user's part list (CSV or JSON) into validated parts. Pure: text in, parts and
// problems out; the store writes them. Contract shared by the store, the CLI and the tests.

#include "parts/diode.hpp"
#include "parts/inductor.hpp"

#include <map>
#include <string>
#include <string_view>
#include <vector>

namespace coilsieve::catalog {

enum class PartKind { inductor, diode };

// One problem with one cell or row: printed as `FILE:LINE: column "X": reason`.
struct ImportProblem {
    std::string file;
    int line = 0;       // 1-based physical line of the row in the file (JSON: element index + 1)
    std::string column; // header as written in the file ("" for a whole-row problem)
    std::string reason;
    std::string to_string() const;
};

// Extra header -> field-name mapping, e.g. {"Induct. nominal": "inductance"}.
using HeaderMapping = std::map<std::string, std::string>;

struct ImportResult {
    std::vector<parts::Inductor> inductors; // kind == inductor: the rows that passed
    std::vector<parts::Diode> diodes;       // kind == diode
    std::vector<int> part_lines;            // line of each accepted part, parallel to the above
    std::vector<ImportProblem> problems;    // every problem found (capped)
    std::vector<int> rejected_lines;        // lines of rows that failed
    int rows = 0;                           // data rows read
    // The file could not be read as a table at all (CSV structure, JSON syntax, a missing
    // required column): nothing may be imported from it, not even with skip-bad.
    bool fatal = false;
    std::vector<std::string> ignored_columns; // headers that match no field (not an error)
};

// At most this many problems are listed; one more line says how many were left out.
inline constexpr std::size_t max_problems = 200;

// Parse and validate a CSV (RFC 4180) or JSON (array of objects) text; `file_name` is used in
// messages and to choose the format (".json" -> JSON, else CSV). Defaults are applied and recorded
// in each part's `assumed`. `source` is set on every part. A long CSV's rows are read on up to
// `threads` threads; the result is the same for any number.
ImportResult read_parts(std::string_view text, std::string_view file_name, PartKind kind,
                        std::string_view source, const HeaderMapping& mapping = {},
                        unsigned threads = 2);

} // namespace coilsieve::catalog
