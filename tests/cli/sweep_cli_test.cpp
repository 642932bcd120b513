// `coilsieve sweep` end to end on a small imported catalog: the steps, the best pair at each step
// (the same as a `rank` of a design file holding that value), the "changed" mark, the ratings the
// winner must meet at each load current, and bad --vary input.
#include "cli_run.hpp"

#include <algorithm>
#include <cmath>
#include <nlohmann/json.hpp>
#include <set>
#include <sstream>
#include <vector>

using coilsieve::testing_support::CliTest;
using coilsieve::testing_support::Outcome;
using json = nlohmann::json;

namespace {

class SweepCli : public CliTest {
protected:
    void SetUp() override {
        CliTest::SetUp();
        // Three inductors of different Isat and RMS ratings, three diodes.
        const auto l =
            file("l.csv", coilsieve::testing_support::starter_rows(
                              "inductors.csv", {"GEN-L-MCP-6.6x6.4x3-100u", "GEN-L-SDF-8x8x4-47u",
                                                "GEN-L-MCP-4x4x2-10u"}));
        const auto d = file(
            "d.csv", coilsieve::testing_support::starter_rows(
                         "diodes.csv", {"GEN-D-SCH-60V-2A-SOD-123F", "GEN-D-SCH-40V-1A-SOD-123F",
                                        "GEN-D-SCH-100V-2A-SOD-123F"}));
        ASSERT_EQ(run("parts import '" + l.string() + "' --kind inductor --source hand").code, 0);
        ASSERT_EQ(run("parts import '" + d.string() + "' --kind diode --source hand").code, 0);
        design_ = std::string(COILSIEVE_SOURCE_DIR) + "/data/examples/reading-lamp.json";
    }
    std::string design_;
};

} // namespace

TEST_F(SweepCli, EachStepIsTheRankingOfThatDesign) {
    const Outcome r =
        run("sweep '" + design_ + "' --source hand --vary load.current=0.35A..1.05A:3 --json");
    ASSERT_EQ(r.code, 0) << r.err;
    const json j = json::parse(r.out);
    EXPECT_EQ(j["field"], "load.current");
    ASSERT_EQ(j["steps"].size(), 3u);
    const double expected[] = {0.35, 0.70, 1.05}; // evenly spaced, ends included
    std::string previous;
    std::ifstream in(design_);
    const json base = json::parse(in);
    for (std::size_t i = 0; i < 3; ++i) {
        const json& st = j["steps"][i];
        EXPECT_NEAR(st["value"].get<double>(), expected[i], 1e-12);
        ASSERT_FALSE(st["best"].is_null()) << "step " << i;
        const std::string key = st["best"]["inductor"].get<std::string>() + "+" +
                                st["best"]["diode"].get<std::string>();
        EXPECT_EQ(st["changed"].get<bool>(), i > 0 && key != previous) << "step " << i;
        previous = key;

        // The same design as a file, ranked on its own.
        json d = base;
        d["load"]["current"] = std::to_string(expected[i]) + "A";
        const auto f = file("step" + std::to_string(i) + ".json", d.dump());
        const Outcome rk = run("rank '" + f.string() + "' --source hand --no-save --json");
        ASSERT_EQ(rk.code, 0) << rk.err;
        const json rj = json::parse(rk.out);
        ASSERT_FALSE(rj["results"].empty());
        // The documented shape scripts rely on (README, "Rank the catalog").
        for (const char* k : {"counts", "elapsed_s", "pareto", "pareto_axes"})
            EXPECT_TRUE(rj.contains(k)) << k;
        const json& top = rj["results"][0];
        EXPECT_EQ(top["rank"], 1);
        EXPECT_TRUE(top["inductor"].is_string());
        EXPECT_TRUE(top["diode"].is_string());
        EXPECT_EQ(top["inductor_part"]["id"], top["inductor"]);
        for (const char* k :
             {"setting", "objectives", "score", "pareto", "binding_limit", "corners"})
            EXPECT_TRUE(top.contains(k)) << k;
        EXPECT_TRUE(top["pareto"].is_boolean());
        EXPECT_TRUE(top["objectives"]["loss"].is_number());
        EXPECT_EQ(rj["results"][0]["inductor"], st["best"]["inductor"]) << "step " << i;
        EXPECT_EQ(rj["results"][0]["diode"], st["best"]["diode"]) << "step " << i;
        EXPECT_DOUBLE_EQ(rj["results"][0]["score"].get<double>(),
                         st["best"]["score"].get<double>());

        // The comparator switches off at I + b/2 with b >= 5 % of I (the design's band range), so
        // every corner's peak is at least 1.025·I, and the mean holds I (hysteretic control).
        const auto& corners = rj["results"][0]["corners"];
        ASSERT_FALSE(corners.empty());
        for (const auto& c : corners) {
            EXPECT_GE(c["il_peak"].get<double>(), 1.025 * expected[i]) << c["name"];
            EXPECT_NEAR(c["il_avg"].get<double>(), expected[i], 0.03 * expected[i]) << c["name"];
        }
    }
    // At 1.05 A the 100 µH part is out: its RMS rating is 0.73 A (its catalog row).
    EXPECT_NE(j["steps"][2]["best"]["inductor"], "GEN-L-MCP-6.6x6.4x3-100u");
}

TEST_F(SweepCli, BadVaryIsAUsageErrorNamingTheField) {
    Outcome r = run("sweep '" + design_ + "' --source hand --vary load.colour=1..2:3");
    EXPECT_EQ(r.code, 2);
    EXPECT_NE(r.err.find("load.colour"), std::string::npos) << r.err;
    for (const std::string word : {"load.type", "control.mode", "name"}) {
        r = run("sweep '" + design_ + "' --source hand --vary " + word + "=1..2:2");
        EXPECT_EQ(r.code, 2) << word;
        EXPECT_NE(r.err.find("no numeric field \"" + word + "\""), std::string::npos) << r.err;
    }
    r = run("sweep '" + design_ + "' --source hand --vary load.current=3V..5V:3");
    EXPECT_EQ(r.code, 2);
    EXPECT_NE(r.err.find("current"), std::string::npos) << r.err;
    r = run("sweep '" + design_ + "' --source hand --vary load.current=0.3A..0.5A:1");
    EXPECT_EQ(r.code, 2);
    EXPECT_NE(r.err.find("STEPS"), std::string::npos) << r.err;
}

TEST_F(SweepCli, CsvIsSiNumbersWithTheUnitInTheColumnName) {
    const Outcome r =
        run("sweep '" + design_ + "' --source hand --vary load.current=0.35A..1.05A:3 --csv");
    ASSERT_EQ(r.code, 0) << r.err;
    const auto ls = coilsieve::testing_support::lines(r.out);
    ASSERT_EQ(ls.size(), 4u) << r.out;
    auto cells = [](std::string line) {
        if (!line.empty() && line.back() == '\r') line.pop_back(); // RFC 4180 line ends
        std::vector<std::string> v;
        std::stringstream in(line);
        for (std::string c; std::getline(in, c, ',');) v.push_back(c);
        return v;
    };
    const auto header = cells(ls[0]);
    auto column = [&](const std::string& name) {
        const auto it = std::find(header.begin(), header.end(), name);
        EXPECT_NE(it, header.end()) << name << " in " << ls[0];
        return static_cast<std::size_t>(it - header.begin());
    };
    const std::size_t value = column("load.current_A"), loss = column("loss_W"),
                      eff = column("efficiency"), size = column("size_m3"),
                      changed = column("changed");
    const double expected[] = {0.35, 0.70, 1.05};
    for (std::size_t i = 1; i < ls.size(); ++i) {
        const auto row = cells(ls[i]);
        ASSERT_EQ(row.size(), header.size()) << ls[i];
        for (const std::size_t c : {value, loss, eff, size}) {
            std::size_t used = 0;
            EXPECT_NO_THROW((void)std::stod(row[c], &used)) << row[c];
            EXPECT_EQ(used, row[c].size()) << "not a plain number: " << row[c];
        }
        EXPECT_NEAR(std::stod(row[value]), expected[i - 1], 1e-12);
        EXPECT_GT(std::stod(row[loss]), 0.0);
        EXPECT_LT(std::stod(row[eff]), 1.0);   // a fraction, not a percentage
        EXPECT_LT(std::stod(row[size]), 1e-3); // m³: a few hundred mm³
        EXPECT_TRUE(row[changed] == "0" || row[changed] == "1") << row[changed];
    }
}

TEST_F(SweepCli, AWholeNumberFieldTakesWholeStepsOnly) {
    Outcome r = run("sweep '" + design_ + "' --source hand --vary load.count=3.5..4.5:2");
    EXPECT_EQ(r.code, 2) << r.out;
    EXPECT_NE(r.err.find("load.count"), std::string::npos) << r.err;
    EXPECT_NE(r.err.find("whole number"), std::string::npos) << r.err;
    EXPECT_NE(r.err.find("step 1"), std::string::npos) << r.err;
    r = run("sweep '" + design_ + "' --source hand --vary load.count=3..4:3"); // 3, 3.5, 4
    EXPECT_EQ(r.code, 2) << r.out;
    EXPECT_NE(r.err.find("step 2"), std::string::npos) << r.err;
    r = run("sweep '" + design_ + "' --source hand --vary load.count=3..4:2 --json");
    ASSERT_EQ(r.code, 0) << r.err;
    const json j = json::parse(r.out);
    ASSERT_EQ(j["steps"].size(), 2u);
    EXPECT_EQ(j["steps"][0]["value"].get<double>(), 3.0);
    EXPECT_EQ(j["steps"][1]["value"].get<double>(), 4.0);
}

// Every limit is optional: one the design file leaves out can still be varied, set at each step.
TEST_F(SweepCli, ALimitTheFileLeavesOutCanBeVaried) {
    const Outcome r =
        run("sweep '" + design_ + "' --source hand --vary limits.t_on_min=50ns..150ns:2 --json");
    ASSERT_EQ(r.code, 0) << r.err;
    const json j = json::parse(r.out);
    ASSERT_EQ(j["steps"].size(), 2u);
    EXPECT_DOUBLE_EQ(j["steps"][0]["value"].get<double>(), 50e-9);
    EXPECT_DOUBLE_EQ(j["steps"][1]["value"].get<double>(), 150e-9);
    const Outcome bad = run("sweep '" + design_ + "' --source hand --vary limits.colour=1..2:2");
    EXPECT_EQ(bad.code, 2);
    EXPECT_NE(bad.err.find("no numeric field \"limits.colour\""), std::string::npos) << bad.err;
}

// A fixed band given as a share of the target current is that share at every step of a current
// sweep (15 % of 0.35 A, then of 0.7 A), not the first step's amperes carried along.
TEST_F(SweepCli, ABandShareFollowsEachStepsCurrent) {
    const Outcome r = run("sweep '" + design_ +
                          "' --source hand --band 15% --vary load.current=0.35A..0.7A:2 --json");
    ASSERT_EQ(r.code, 0) << r.err;
    const auto j = json::parse(r.out);
    ASSERT_EQ(j["steps"].size(), 2u);
    const double currents[] = {0.35, 0.7};
    for (std::size_t i = 0; i < 2; ++i) {
        const auto& best = j["steps"][i]["best"];
        ASSERT_FALSE(best.is_null()) << r.out;
        EXPECT_NEAR(best["setting"]["band"].get<double>(), 0.15 * currents[i], 1e-12);
    }
}
