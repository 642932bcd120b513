// report::Table: column alignment, counting a UTF-8 character such as µ, Ω or ° as one column.

#include "report/table.hpp"

#include <gtest/gtest.h>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

namespace {

using coilsieve::report::Align;
using coilsieve::report::Column;
using coilsieve::report::display_width;
using coilsieve::report::Table;

std::vector<std::string> lines_of(const std::string& text) {
    std::vector<std::string> lines;
    std::istringstream in(text);
    for (std::string line; std::getline(in, line);) lines.push_back(line);
    return lines;
}

TEST(DisplayWidth, CountsCodePoints) {
    EXPECT_EQ(display_width(""), 0u);
    EXPECT_EQ(display_width("abc"), 3u);
    EXPECT_EQ(display_width("\u00B5H"), 2u); // µH: 3 bytes, 2 columns
    EXPECT_EQ(display_width("\u03A9"), 1u);  // Ω: 2 bytes
    EXPECT_EQ(display_width("\u00B0C"), 2u); // °C: 3 bytes
    EXPECT_EQ(display_width("35.0 m\u03A9"), 7u);
    EXPECT_EQ(display_width("mm\u00B2"), 3u);
    EXPECT_EQ(display_width("e\u0301"), 1u); // combining acute accent adds nothing
    EXPECT_EQ(display_width("\u4E2D"), 2u);  // a CJK ideograph is double width
    EXPECT_EQ(display_width("\xFF"
                            "a"),
              2u);                        // an invalid byte counts one
    EXPECT_EQ(display_width("\xC2"), 1u); // truncated sequence counts one
}

TEST(Table, AlignsMultibyteUnits) {
    Table t({{"Part", Align::left}, {"L", Align::right}, {"Tj", Align::right}});
    t.add_row({"X1", "4.70 \u00B5H", "55.0 \u00B0C"});
    t.add_row({"LONGER", "100 nH", "125 \u00B0C"});
    t.add_row({"R", "35.0 m\u03A9", "-40.0 \u00B0C"});
    // Written by hand: widths 6, 7 and 8 columns, two blanks between columns.
    const std::string expected = "Part          L        Tj\n"
                                 "------  -------  --------\n"
                                 "X1      4.70 \u00B5H   55.0 \u00B0C\n"
                                 "LONGER   100 nH    125 \u00B0C\n"
                                 "R       35.0 m\u03A9  -40.0 \u00B0C\n";
    EXPECT_EQ(t.render(), expected);
    for (const std::string& line : lines_of(t.render()))
        EXPECT_EQ(display_width(line), 25u) << line;
}

TEST(Table, NoTrailingBlanksWhenLastColumnIsLeftAligned) {
    Table t({{"Value", Align::right}, {"Note", Align::left}});
    t.add_row({"1", "a long note"});
    t.add_row({"22", "x"});
    const std::string expected = "Value  Note\n"
                                 "-----  -----------\n"
                                 "    1  a long note\n"
                                 "   22  x\n";
    EXPECT_EQ(t.render(), expected);
}

TEST(Table, HeaderWiderThanCells) {
    Table t({{"Inductance", Align::right}});
    t.add_row({"1 \u00B5H"});
    EXPECT_EQ(t.render(), "Inductance\n----------\n      1 \u00B5H\n");
}

TEST(Table, EmptyTableRendersHeaderAndRule) {
    Table t({{"A", Align::left}, {"BB", Align::right}});
    EXPECT_EQ(t.render(), "A  BB\n-  --\n");
}

TEST(Table, LineBreaksInCellsStayOnOneLine) {
    Table t({{"A", Align::left}});
    t.add_row({"x\ny"});
    EXPECT_EQ(lines_of(t.render()).size(), 3u);
}

TEST(Table, RowWithWrongCellCountThrows) {
    Table t({{"A", Align::left}, {"B", Align::left}});
    EXPECT_THROW(t.add_row({"only one"}), std::invalid_argument);
    EXPECT_THROW(t.add_row({"1", "2", "3"}), std::invalid_argument);
    EXPECT_TRUE(t.rows().empty());
    EXPECT_THROW(Table(std::vector<Column>{}), std::invalid_argument);
}

} // namespace
