#include "catalog/csv.hpp"

#include <algorithm>

namespace coilsieve::catalog {
namespace {

std::string where(std::string_view file, int line) {
    return std::string(file) + ":" + std::to_string(line) + ": ";
}

bool blank(const CsvRecord& r) { return r.fields.size() == 1 && r.fields[0].empty(); }

// Count a delimiter outside quotes on the first line, to explain a single-column header.
std::size_t count_unquoted(std::string_view line, char delim) {
    std::size_t n = 0;
    bool quoted = false;
    for (char c : line) {
        if (c == '"') quoted = !quoted;
        else if (c == delim && !quoted) ++n;
    }
    return n;
}

} // namespace

std::vector<CsvRecord> split_csv(std::string_view text, std::string_view file_name) {
    if (text.size() >= 3 && text.substr(0, 3) == "\xEF\xBB\xBF") text.remove_prefix(3);
    std::vector<CsvRecord> records;
    records.reserve(static_cast<std::size_t>(std::count(text.begin(), text.end(), '\n')) + 1);
    CsvRecord current;
    std::string field;
    int line = 1;
    current.line = 1;
    bool in_quotes = false;
    bool field_was_quoted = false;
    int quote_line = 0;
    std::size_t i = 0;
    const std::size_t n = text.size();
    auto end_field = [&] {
        current.fields.push_back(std::move(field));
        field.clear();
        field_was_quoted = false;
    };
    auto end_record = [&] {
        end_field();
        records.push_back(std::move(current));
        current = CsvRecord{};
    };
    while (i < n) {
        const char c = text[i];
        if (in_quotes) {
            if (c == '"') {
                if (i + 1 < n && text[i + 1] == '"') {
                    field.push_back('"');
                    i += 2;
                    continue;
                }
                in_quotes = false;
                ++i;
                // After a closing quote only a delimiter or a line end may follow.
                if (i < n && text[i] != ',' && text[i] != '\r' && text[i] != '\n') {
                    throw CsvError(where(file_name, line) + "unexpected character '" +
                                   std::string(1, text[i]) +
                                   "' after a closing quote; inside a quoted field write a quote "
                                   "as \"\"");
                }
                continue;
            }
            if (c == '\n') ++line;
            field.push_back(c);
            ++i;
            continue;
        }
        if (c == '"') {
            if (!field.empty() || field_was_quoted) {
                throw CsvError(where(file_name, line) +
                               "quote inside an unquoted field; quote the whole field and "
                               "double the inner quotes (\"a \"\"b\"\"\")");
            }
            in_quotes = true;
            field_was_quoted = true;
            quote_line = line;
            ++i;
        } else if (c == ',') {
            end_field();
            ++i;
        } else if (c == '\r' || c == '\n') {
            end_record();
            if (c == '\r' && i + 1 < n && text[i + 1] == '\n') ++i;
            ++i;
            ++line;
            current.line = line;
        } else {
            // Plain characters up to the next delimiter, quote or line end, in one append.
            std::size_t j = i + 1;
            while (j < n && text[j] != ',' && text[j] != '"' && text[j] != '\r' && text[j] != '\n')
                ++j;
            field.append(text.substr(i, j - i));
            i = j;
        }
    }
    if (in_quotes) {
        throw CsvError(where(file_name, quote_line) +
                       "unterminated quoted field (the quote opened here is never closed)");
    }
    if (!field.empty() || !current.fields.empty() || field_was_quoted) end_record();
    return records;
}

CsvTable parse_csv(std::string_view text, std::string_view file_name, bool allow_ragged) {
    std::vector<CsvRecord> records = split_csv(text, file_name);
    std::erase_if(records, blank);
    if (records.empty()) {
        throw CsvError(std::string(file_name) +
                       ":1: empty file; expected a header line and at least one data row");
    }
    CsvTable table;
    table.header = std::move(records.front().fields);
    table.header_line = records.front().line;
    if (table.header.size() == 1) {
        // A one-column header with semicolons or tabs: the file uses another delimiter.
        std::string_view first_line = text.substr(0, text.find_first_of("\r\n"));
        for (char d : {';', '\t'}) {
            if (count_unquoted(first_line, d) > 0) {
                throw CsvError(where(file_name, table.header_line) + "the header is separated by " +
                               (d == ';' ? std::string("';'") : std::string("tabs")) +
                               ", not commas; save the file as comma-separated CSV");
            }
        }
    }
    if (records.size() == 1) {
        throw CsvError(where(file_name, table.header_line) +
                       "header only, no data rows; add at least one part");
    }
    table.rows.reserve(records.size() - 1);
    for (std::size_t r = 1; r < records.size(); ++r) {
        if (!allow_ragged && records[r].fields.size() != table.header.size()) {
            throw CsvError(where(file_name, records[r].line) + "row has " +
                           std::to_string(records[r].fields.size()) +
                           " fields but the header has " + std::to_string(table.header.size()) +
                           "; quote fields that contain commas");
        }
        table.rows.push_back(std::move(records[r]));
    }
    return table;
}

std::string csv_escape(std::string_view field) {
    const bool needs = field.find_first_of(",\"\r\n") != std::string_view::npos ||
                       (!field.empty() && (field.front() == ' ' || field.back() == ' '));
    if (!needs) return std::string(field);
    std::string out = "\"";
    for (char c : field) {
        if (c == '"') out += "\"\"";
        else out.push_back(c);
    }
    out.push_back('"');
    return out;
}

std::string csv_line(const std::vector<std::string>& fields) {
    std::string out;
    for (std::size_t i = 0; i < fields.size(); ++i) {
        if (i) out.push_back(',');
        out += csv_escape(fields[i]);
    }
    return out;
}

} // namespace coilsieve::catalog
