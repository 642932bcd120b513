// Text table and CSV writer.

#include "report/table.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>
#include <stdexcept>
#include <utility>

namespace coilsieve::report {
namespace {

// Decodes one UTF-8 sequence at s[i]; returns the code point and advances i. Invalid or truncated
// sequences yield U+FFFD and advance by one byte.
char32_t next_code_point(std::string_view s, std::size_t& i) {
    const auto b0 = static_cast<unsigned char>(s[i]);
    std::size_t len = 0;
    char32_t cp = 0;
    if (b0 < 0x80) {
        ++i;
        return b0;
    } else if ((b0 & 0xE0) == 0xC0) {
        len = 2;
        cp = b0 & 0x1Fu;
    } else if ((b0 & 0xF0) == 0xE0) {
        len = 3;
        cp = b0 & 0x0Fu;
    } else if ((b0 & 0xF8) == 0xF0) {
        len = 4;
        cp = b0 & 0x07u;
    } else {
        ++i;
        return 0xFFFD;
    }
    if (i + len > s.size()) {
        ++i;
        return 0xFFFD;
    }
    for (std::size_t k = 1; k < len; ++k) {
        const auto b = static_cast<unsigned char>(s[i + k]);
        if ((b & 0xC0) != 0x80) {
            ++i;
            return 0xFFFD;
        }
        cp = (cp << 6) | (b & 0x3Fu);
    }
    i += len;
    return cp;
}

bool is_combining(char32_t c) {
    return (c >= 0x0300 && c <= 0x036F) || (c >= 0x20D0 && c <= 0x20FF) || c == 0x200B;
}

bool is_wide(char32_t c) {
    return (c >= 0x1100 && c <= 0x115F) || (c >= 0x2E80 && c <= 0xA4CF && c != 0x303F) ||
           (c >= 0xAC00 && c <= 0xD7A3) || (c >= 0xF900 && c <= 0xFAFF) ||
           (c >= 0xFE30 && c <= 0xFE4F) || (c >= 0xFF00 && c <= 0xFF60) ||
           (c >= 0xFFE0 && c <= 0xFFE6) || (c >= 0x1F300 && c <= 0x1F64F) ||
           (c >= 0x1F900 && c <= 0x1F9FF) || (c >= 0x20000 && c <= 0x3FFFD);
}

void append_cell(std::string& out, std::string_view cell) {
    for (const char c : cell) out += (c == '\n' || c == '\r' || c == '\t') ? ' ' : c;
}

} // namespace

std::size_t display_width(std::string_view utf8) {
    std::size_t width = 0;
    std::size_t i = 0;
    while (i < utf8.size()) {
        const char32_t c = next_code_point(utf8, i);
        if (is_combining(c)) continue;
        width += is_wide(c) ? 2 : 1;
    }
    return width;
}

Table::Table(std::vector<Column> columns) : columns_(std::move(columns)) {
    if (columns_.empty()) throw std::invalid_argument("report::Table needs at least one column");
}

void Table::add_row(std::vector<std::string> cells) {
    if (cells.size() != columns_.size()) {
        throw std::invalid_argument("report::Table row " + std::to_string(rows_.size() + 1) +
                                    " has " + std::to_string(cells.size()) +
                                    " cells; the table has " + std::to_string(columns_.size()) +
                                    " columns");
    }
    rows_.push_back(std::move(cells));
}

std::string Table::render() const {
    const std::size_t n = columns_.size();
    std::vector<std::size_t> width(n, 0);
    for (std::size_t c = 0; c < n; ++c) width[c] = display_width(columns_[c].header);
    for (const auto& row : rows_) {
        for (std::size_t c = 0; c < n; ++c) width[c] = std::max(width[c], display_width(row[c]));
    }

    std::string out;
    auto line = [&](auto&& cell_of) {
        const std::size_t start = out.size();
        for (std::size_t c = 0; c < n; ++c) {
            if (c > 0) out += "  ";
            const std::string_view cell = cell_of(c);
            const std::size_t pad = width[c] - std::min(width[c], display_width(cell));
            if (columns_[c].align == Align::right) out.append(pad, ' ');
            append_cell(out, cell);
            if (columns_[c].align == Align::left) out.append(pad, ' ');
        }
        // No trailing blanks (a left-aligned last column pads them).
        while (out.size() > start && out.back() == ' ') out.pop_back();
        out += '\n';
    };
    line([&](std::size_t c) -> std::string_view { return columns_[c].header; });
    const std::string dashes(*std::max_element(width.begin(), width.end()), '-');
    line([&](std::size_t c) { return std::string_view(dashes).substr(0, width[c]); });
    for (const auto& row : rows_) {
        line([&](std::size_t c) -> std::string_view { return row[c]; });
    }
    return out;
}

std::string Table::to_csv() const {
    std::vector<std::string> header;
    header.reserve(columns_.size());
    for (const auto& col : columns_) header.push_back(col.header);
    std::string out = csv_line(header);
    for (const auto& row : rows_) out += csv_line(row);
    return out;
}

std::string csv_escape(std::string_view field) {
    const bool edge_blank = !field.empty() && (field.front() == ' ' || field.front() == '\t' ||
                                               field.back() == ' ' || field.back() == '\t');
    if (!edge_blank && field.find_first_of(",\"\r\n") == std::string_view::npos) {
        return std::string(field);
    }
    std::string out;
    out.reserve(field.size() + 2);
    out += '"';
    for (const char c : field) {
        if (c == '"') out += '"';
        out += c;
    }
    out += '"';
    return out;
}

std::string csv_line(const std::vector<std::string>& fields) {
    std::string out;
    for (std::size_t i = 0; i < fields.size(); ++i) {
        if (i > 0) out += ',';
        out += csv_escape(fields[i]);
    }
    out += "\r\n";
    return out;
}

std::string csv_number(double v) {
    if (!std::isfinite(v)) return {};
    std::ostringstream os;
    os.precision(10);
    os << v;
    return os.str();
}

} // namespace coilsieve::report
