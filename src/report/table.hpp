#pragma once
// Plain-text output: an aligned table for the terminal and RFC 4180 CSV lines for files.
// Cells are strings already formatted (see units::format); this layer only lays them out.

#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

namespace coilsieve::report {

enum class Align { left, right };

struct Column {
    std::string header;
    Align align = Align::left;
};

// Columns separated by two spaces, a line of '-' under the headers, no trailing blanks.
// Widths count UTF-8 code points, so "µH", "Ω" and "°C" take one column per character.
class Table {
public:
    explicit Table(std::vector<Column> columns);

    // Throws std::invalid_argument when the row does not have one cell per column.
    void add_row(std::vector<std::string> cells);

    const std::vector<Column>& columns() const { return columns_; }
    const std::vector<std::vector<std::string>>& rows() const { return rows_; }

    // The table as text, each line ending in '\n'. Line breaks and tabs inside a cell print as
    // spaces so a row stays on one line.
    std::string render() const;

    // Header line and rows as CSV (csv_line each).
    std::string to_csv() const;

private:
    std::vector<Column> columns_;
    std::vector<std::vector<std::string>> rows_;
};

// Columns a UTF-8 string takes on a terminal: code points, with combining marks (U+0300-U+036F)
// zero and East Asian wide or full-width characters two. Invalid bytes count one each.
std::size_t display_width(std::string_view utf8);

// One CSV field per RFC 4180 §2: quoted when it holds a comma, a double quote, CR or LF, with
// inner quotes doubled; otherwise unchanged. Fields with leading or trailing blanks are quoted too,
// so readers that trim unquoted fields keep them.
std::string csv_escape(std::string_view field);

// Fields escaped and joined by commas, ending in CRLF (RFC 4180 §2 rule 1).
std::string csv_line(const std::vector<std::string>& fields);

// A number for a CSV cell: ten significant digits, empty when not finite.
std::string csv_number(double v);

} // namespace coilsieve::report
