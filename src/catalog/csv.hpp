#pragma once
// CSV per RFC 4180: quoted fields with embedded commas, quotes ("") and newlines; CRLF or LF line
// ends; a leading UTF-8 BOM is skipped. Errors name the file and the physical line.

#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace coilsieve::catalog {

class CsvError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

struct CsvRecord {
    int line = 0; // 1-based physical line where the record starts
    std::vector<std::string> fields;
};

struct CsvTable {
    std::vector<std::string> header;
    int header_line = 1;
    std::vector<CsvRecord> rows; // blank lines are skipped
};

// Parse the whole text. Throws CsvError for: empty file, header only (no data rows), an
// unterminated quote, a row whose field count differs from the header's (unless `allow_ragged`:
// then the caller checks each row's size), a quote inside an unquoted field, and a file that seems
// to use another delimiter (';' or tab).
CsvTable parse_csv(std::string_view text, std::string_view file_name, bool allow_ragged = false);

// Lower-level: split into records without any header/row-count checks (still checks quotes).
std::vector<CsvRecord> split_csv(std::string_view text, std::string_view file_name);

// Quote a field for output if it needs it (comma, quote, CR/LF, or leading/trailing space).
std::string csv_escape(std::string_view field);
// One output line (without line end) from fields.
std::string csv_line(const std::vector<std::string>& fields);

} // namespace coilsieve::catalog
