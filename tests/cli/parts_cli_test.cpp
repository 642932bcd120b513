// Runs the built coilsieve binary (COILSIEVE_EXE) against a temporary catalog.
#include "cli_run.hpp"
#include "units/quantity.hpp"

#include <array>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <gtest/gtest.h>
#include <regex>
#include <sstream>
#include <sys/wait.h>
#include <unistd.h>

namespace fs = std::filesystem;
using coilsieve::units::Dimension;

using coilsieve::testing_support::CliTest;
using coilsieve::testing_support::lines;
using coilsieve::testing_support::Outcome;

TEST_F(CliTest, HelpOnEveryCommandHasAnExample) {
    for (const std::string cmd : {"", "parts ", "parts import ", "parts export ", "parts list ",
                                  "parts show ", "parts sources ", "parts delete "}) {
        const Outcome r = run(cmd + "--help", false);
        EXPECT_EQ(r.code, 0) << cmd;
        EXPECT_TRUE(std::regex_search(r.out, std::regex("Usage: .*coilsieve"))) << cmd << r.out;
        EXPECT_TRUE(std::regex_search(r.out, std::regex("Examples?:\\n  coilsieve ")))
            << cmd << r.out;
    }
    const Outcome imp = run("parts import --help", false);
    EXPECT_TRUE(std::regex_search(imp.out, std::regex("inductance\\*\\s+\\[uH\\]"))) << imp.out;
    EXPECT_TRUE(std::regex_search(imp.out, std::regex("tolerance\\s+\\[%\\].*default: 20 %")))
        << imp.out;
    EXPECT_TRUE(std::regex_search(run("--help", false).out, std::regex("--db"))) << "global --db";
}

TEST_F(CliTest, UsageErrorsExitTwo) {
    EXPECT_EQ(run("parts list capacitors").code, 2);
    EXPECT_EQ(run("parts frobnicate").code, 2);
    const Outcome r = run("parts list inductors --inductance 10u");
    EXPECT_EQ(r.code, 2);
    EXPECT_TRUE(std::regex_search(r.err, std::regex("--inductance: .*MIN\\.\\.MAX"))) << r.err;
    EXPECT_EQ(run("parts list inductors --isat-min 2V").code, 2);
}

TEST_F(CliTest, ListFiltersHold) {
    ASSERT_EQ(
        run("parts import '" + fixture("inductors_small.csv") + "' --kind inductor --source small")
            .code,
        0);
    const Outcome r =
        run("parts list inductors --inductance 10u..22u --isat-min 2A --height-max 4mm");
    ASSERT_EQ(r.code, 0) << r.err;
    const auto ls = lines(r.out);
    ASSERT_GE(ls.size(), 3u);
    // Header: find the columns by name, then parse every row back.
    const std::string& header = ls[0];
    const std::size_t col_l = header.find("  L") + 2;
    ASSERT_NE(header.find("Isat"), std::string::npos);
    int rows = 0;
    for (std::size_t i = 2; i < ls.size(); ++i) {
        const std::string& line = ls[i];
        if (line.find(" parts (") != std::string::npos || line.find(" part (") != std::string::npos)
            break;
        std::smatch m;
        // L, DCR, Isat, Irms, length, width, height are the 4th..10th columns.
        const std::regex row_re(
            "^(\\S+)\\s+(\\S+)\\s+(\\S+)\\s+(\\S+ \\S*H)\\s+(\\S+ \\S*Ω)\\*?\\s+(\\S+ A)\\*?"
            "\\s+(\\S+ A)\\*?\\s+(\\S+ mm)\\*?\\s+(\\S+ mm)\\*?\\s+(\\S+ mm)\\*?");
        ASSERT_TRUE(std::regex_search(line, m, row_re)) << line;
        const double l = coilsieve::units::parse(m[4].str(), Dimension::inductance);
        const double isat = coilsieve::units::parse(m[6].str(), Dimension::current);
        const double h = coilsieve::units::parse(m[10].str(), Dimension::length);
        EXPECT_GE(l, 10e-6 * (1 - 1e-9)) << line;
        EXPECT_LE(l, 22e-6 * (1 + 1e-9)) << line;
        EXPECT_GE(isat, 2.0) << line;
        EXPECT_LE(h, 4e-3 * (1 + 1e-9)) << line;
        ++rows;
    }
    (void)col_l;
    // From the fixture: T-L-10 (10 µH, 2.5 A, 3 mm) and T-L-15 (15 µH, 3 A, 2 mm) qualify;
    // T-L-22 has Isat 1.5 A, T-L-33 is 33 µH, T-L-4u7 is 4.7 µH.
    EXPECT_TRUE(r.out.find("T-L-10") != std::string::npos) << r.out;
    EXPECT_TRUE(r.out.find("T-L-15") != std::string::npos) << r.out;
    EXPECT_TRUE(r.out.find("T-L-22") == std::string::npos) << r.out;
    EXPECT_GE(rows, 2);
}

TEST_F(CliTest, ImportWithOneBadRowWritesNothingAndNamesTheRow) {
    const Outcome before = run("parts sources");
    ASSERT_EQ(before.code, 0) << before.err;
    const std::string bad = fixture("inductors_one_bad.csv");
    const Outcome r = run("parts import '" + bad + "' --kind inductor --source mine");
    EXPECT_EQ(r.code, 1);
    EXPECT_TRUE(std::regex_search(
        r.err,
        std::regex("inductors_one_bad\\.csv:3: column \"inductance \\(uH\\)\": value \"-10\"")))
        << r.err;
    const Outcome after = run("parts sources");
    EXPECT_EQ(after.out.find("mine"), std::string::npos) << after.out;
    const Outcome list = run("parts list inductors --source mine");
    EXPECT_TRUE(list.out.find("OK-1") == std::string::npos);
}

TEST_F(CliTest, SkipBadWritesRejectsFile) {
    const fs::path rejects = dir_ / "rejects.csv";
    const Outcome r = run("parts import '" + fixture("inductors_one_bad.csv") +
                          "' --kind inductor --source mine --skip-bad '" + rejects.string() + "'");
    ASSERT_EQ(r.code, 0) << r.err;
    const std::string text = slurp(rejects);
    EXPECT_TRUE(std::regex_search(
        text, std::regex("\\n[^\\n]*inductors_one_bad\\.csv,3,inductance \\(uH\\),")))
        << text;
    const Outcome list = run("parts list inductors --source mine --csv");
    EXPECT_NE(list.out.find("OK-1"), std::string::npos);
    EXPECT_NE(list.out.find("OK-3"), std::string::npos);
    EXPECT_EQ(list.out.find("BAD-2"), std::string::npos);
}

TEST_F(CliTest, DbOptionAfterTheSubcommandAndExportRoundTrip) {
    const std::string db_opt = "--db '" + db().string() + "'";
    ASSERT_EQ(run("parts import '" + fixture("inductors_small.csv") +
                      "' --kind inductor --source s " + db_opt,
                  false)
                  .code,
              0);
    const fs::path out = dir_ / "out.csv";
    ASSERT_EQ(run("parts export --source s --kind inductor -o '" + out.string() + "'").code, 0);
    const Outcome again =
        run("parts import '" + out.string() + "' --kind inductor --source s --dry-run");
    ASSERT_EQ(again.code, 0) << again.err;
    EXPECT_TRUE(
        std::regex_search(again.out, std::regex("0 added, 0 replaced, 5 unchanged, 0 removed")))
        << again.out;
    const fs::path json = dir_ / "out.json";
    ASSERT_EQ(run("parts export --source s --kind inductor -o '" + json.string() + "'").code, 0);
    EXPECT_EQ(slurp(json).front(), '[');
    const Outcome j =
        run("parts import '" + json.string() + "' --kind inductor --source s --dry-run");
    EXPECT_TRUE(std::regex_search(j.out, std::regex("5 unchanged"))) << j.out << j.err;
}

TEST_F(CliTest, ShowFlagsAssumedValuesAndDeleteRemovesSource) {
    ASSERT_EQ(
        run("parts import '" + fixture("inductors_small.csv") + "' --kind inductor --source s")
            .code,
        0);
    const Outcome show = run("parts show s:T-L-10");
    ASSERT_EQ(show.code, 0) << show.err;
    EXPECT_TRUE(std::regex_search(show.out, std::regex("tolerance\\s+20\\.0 %  \\(assumed\\)")))
        << show.out;
    EXPECT_TRUE(std::regex_search(show.out, std::regex("inductance\\s+10\\.0 µH\\n"))) << show.out;
    EXPECT_EQ(run("parts show NO-SUCH-PART").code, 1);
    const Outcome del = run("parts delete --source s");
    EXPECT_EQ(del.code, 0);
    EXPECT_TRUE(std::regex_search(del.out, std::regex("5 parts"))) << del.out;
    const Outcome gone = run("parts delete --source s");
    EXPECT_EQ(gone.code, 1);
    EXPECT_TRUE(std::regex_search(gone.err, std::regex("no source \"s\""))) << gone.err;
}

TEST_F(CliTest, MappingFile) {
    const Outcome r =
        run("parts import '" + fixture("inductors_mapped.csv") +
            "' --kind inductor --source m --mapping '" + fixture("mapping.json") + "'");
    ASSERT_EQ(r.code, 0) << r.err;
    const Outcome show = run("parts show M-1");
    EXPECT_TRUE(std::regex_search(show.out, std::regex("inductance\\s+6\\.80 µH"))) << show.out;
}

TEST_F(CliTest, ForeignDatabaseIsAnErrorNotACrash) {
    const fs::path foreign = file("foreign.db", std::string(200, 'x'));
    const Outcome r = run("--db '" + foreign.string() + "' parts sources", false);
    EXPECT_EQ(r.code, 1);
    EXPECT_TRUE(std::regex_search(r.err, std::regex("foreign\\.db.*not a coilsieve catalog")))
        << r.err;
}

TEST_F(CliTest, ImportSummaryCountsInWords) {
    std::ifstream in(fixture("inductors_small.csv"));
    std::string header, row;
    std::getline(in, header);
    std::getline(in, row);
    const auto one = file("one.csv", header + "\n" + row + "\n");
    Outcome r = run("parts import '" + one.string() + "' --kind inductor --source one");
    ASSERT_EQ(r.code, 0) << r.err;
    EXPECT_NE(r.out.find("imported 1 inductor of 1 row into"), std::string::npos) << r.out;
    r = run("parts import '" + fixture("inductors_small.csv") +
            "' --kind inductor --source small --dry-run");
    ASSERT_EQ(r.code, 0) << r.err;
    EXPECT_TRUE(
        std::regex_search(r.out, std::regex("would import [0-9]+ inductors of [0-9]+ rows")))
        << r.out;
}
