// report::csv_escape / csv_line against RFC 4180 §2, and a round trip through an independent
// reader written here from the RFC's grammar.

#include "report/table.hpp"

#include <gtest/gtest.h>
#include <string>
#include <string_view>
#include <vector>

namespace {

using coilsieve::report::Align;
using coilsieve::report::csv_escape;
using coilsieve::report::csv_line;
using coilsieve::report::Table;

using Record = std::vector<std::string>;

// RFC 4180 §2 grammar: records end in CRLF; a field is either escaped (DQUOTE ... DQUOTE with ""
// for a quote, may hold COMMA, CR, LF) or non-escaped (no COMMA, DQUOTE, CR, LF).
std::vector<Record> read_rfc4180(std::string_view text) {
    std::vector<Record> records;
    Record rec;
    std::string field;
    std::size_t i = 0;
    while (i < text.size()) {
        if (text[i] == '"') {
            ++i;
            while (true) {
                if (i >= text.size()) throw std::runtime_error("unterminated quoted field");
                if (text[i] == '"') {
                    if (i + 1 < text.size() && text[i + 1] == '"') {
                        field += '"';
                        i += 2;
                        continue;
                    }
                    ++i;
                    break;
                }
                field += text[i++];
            }
        } else {
            while (i < text.size() && text[i] != ',' && text[i] != '\r') {
                if (text[i] == '"' || text[i] == '\n') throw std::runtime_error("bad bare field");
                field += text[i++];
            }
        }
        rec.push_back(field);
        field.clear();
        if (i < text.size() && text[i] == ',') {
            ++i;
        } else if (text.substr(i, 2) == "\r\n") {
            records.push_back(rec);
            rec.clear();
            i += 2;
        } else {
            throw std::runtime_error("field not followed by comma or CRLF");
        }
    }
    if (!rec.empty()) throw std::runtime_error("last record lacks CRLF");
    return records;
}

TEST(CsvEscape, QuotesOnlyWhenNeeded) {
    // RFC 4180 §2 rules 5-7.
    EXPECT_EQ(csv_escape("abc"), "abc");
    EXPECT_EQ(csv_escape(""), "");
    EXPECT_EQ(csv_escape("4.70 \u00B5H"), "4.70 \u00B5H");
    EXPECT_EQ(csv_escape("a,b"), "\"a,b\"");
    EXPECT_EQ(csv_escape("say \"hi\""), "\"say \"\"hi\"\"\"");
    EXPECT_EQ(csv_escape("\""), "\"\"\"\"");
    EXPECT_EQ(csv_escape("two\nlines"), "\"two\nlines\"");
    EXPECT_EQ(csv_escape("cr\rhere"), "\"cr\rhere\"");
    EXPECT_EQ(csv_escape(" padded "), "\" padded \"");
}

TEST(CsvLine, JoinsWithCommasAndEndsInCrlf) {
    EXPECT_EQ(csv_line({"a", "b,c", "d"}), "a,\"b,c\",d\r\n");
    EXPECT_EQ(csv_line({"", ""}), ",\r\n");
    EXPECT_EQ(csv_line({"x"}), "x\r\n");
}

TEST(CsvRoundTrip, TrickyFieldsSurvive) {
    const std::vector<Record> records{
        {"id", "L (\u00B5H)", "note"},
        {"p1", "4.70", "plain"},
        {"p,2", "\"quoted\"", "comma, quote \" and\r\nline break"},
        {"", " lead", "trail "},
        {"\"\"", ",", "\n"},
        {"x", "35.0 m\u03A9", "55.0 \u00B0C"},
    };
    std::string text;
    for (const auto& r : records) text += csv_line(r);
    EXPECT_EQ(read_rfc4180(text), records);
}

TEST(CsvRoundTrip, TableToCsv) {
    Table t({{"Part", Align::left}, {"Irms", Align::right}});
    t.add_row({"a,b", "1.20 A"});
    t.add_row({"say \"x\"", "n/a"});
    const std::vector<Record> expected{{"Part", "Irms"}, {"a,b", "1.20 A"}, {"say \"x\"", "n/a"}};
    EXPECT_EQ(read_rfc4180(t.to_csv()), expected);
    EXPECT_EQ(t.to_csv(), "Part,Irms\r\n\"a,b\",1.20 A\r\n\"say \"\"x\"\"\",n/a\r\n");
}

} // namespace
