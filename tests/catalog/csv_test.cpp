#include "catalog/csv.hpp"

#include <gtest/gtest.h>

using namespace coilsieve::catalog;

namespace {
std::string message_of(std::string_view text) {
    try {
        parse_csv(text, "f.csv");
    } catch (const CsvError& e) {
        return e.what();
    }
    return "";
}
} // namespace

TEST(Csv, QuotedFieldsWithCommasQuotesAndNewlines) {
    const auto t = parse_csv("a,b,c\n\"x,1\",\"say \"\"hi\"\"\",\"two\nlines\"\n4,5,6\n", "f.csv");
    ASSERT_EQ(t.rows.size(), 2u);
    EXPECT_EQ(t.rows[0].fields[0], "x,1");
    EXPECT_EQ(t.rows[0].fields[1], "say \"hi\"");
    EXPECT_EQ(t.rows[0].fields[2], "two\nlines");
    EXPECT_EQ(t.rows[0].line, 2);
    EXPECT_EQ(t.rows[1].line, 4); // the embedded newline counts as a physical line
}

TEST(Csv, CrlfAndBom) {
    const auto t = parse_csv("\xEF\xBB\xBFid,x\r\n1,2\r\n3,4\r\n", "f.csv");
    EXPECT_EQ(t.header[0], "id");
    ASSERT_EQ(t.rows.size(), 2u);
    EXPECT_EQ(t.rows[1].fields[1], "4");
    EXPECT_EQ(t.rows[1].line, 3);
}

TEST(Csv, NoFinalNewlineAndEmptyLastField) {
    const auto t = parse_csv("a,b\n1,", "f.csv");
    ASSERT_EQ(t.rows.size(), 1u);
    EXPECT_EQ(t.rows[0].fields[1], "");
}

TEST(Csv, UnterminatedQuoteNamesItsLine) {
    const std::string m = message_of("a,b\n1,2\n\"open,3\n4,5\n");
    EXPECT_NE(m.find("f.csv:3:"), std::string::npos) << m;
    EXPECT_NE(m.find("unterminated"), std::string::npos) << m;
}

TEST(Csv, RaggedRow) {
    const std::string m = message_of("a,b\n1,2\n1,2,3\n");
    EXPECT_NE(m.find("f.csv:3:"), std::string::npos) << m;
    EXPECT_NE(m.find("3 fields"), std::string::npos) << m;
}

TEST(Csv, EmptyFileAndHeaderOnly) {
    EXPECT_NE(message_of("").find("empty file"), std::string::npos);
    EXPECT_NE(message_of("\n\n").find("empty file"), std::string::npos);
    EXPECT_NE(message_of("a,b\n").find("header only"), std::string::npos);
}

TEST(Csv, SemicolonDelimiterIsExplained) {
    const std::string m = message_of("id;inductance\nx;10u\n");
    EXPECT_NE(m.find("';'"), std::string::npos) << m;
}

TEST(Csv, QuoteInsideUnquotedField) {
    EXPECT_NE(message_of("a,b\n1,x\"y\n").find("f.csv:2:"), std::string::npos);
}

TEST(Csv, EscapeRoundTrip) {
    const std::vector<std::string> fields{"plain", "with,comma", "with \"quote\"", "two\nlines",
                                          ""};
    const auto t = parse_csv("h1,h2,h3,h4,h5\n" + csv_line(fields) + "\n", "f.csv");
    ASSERT_EQ(t.rows.size(), 1u);
    EXPECT_EQ(t.rows[0].fields, fields);
}
