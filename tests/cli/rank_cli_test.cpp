// `coilsieve rank`, `study rerun` and `sweep` options on a small imported catalog: what the
// command line may change in a design, and what it must refuse before any ranking runs.
#include "cli_run.hpp"

#include <fstream>
#include <nlohmann/json.hpp>
#include <set>
#include <string>
#include <vector>

using coilsieve::testing_support::CliTest;
using coilsieve::testing_support::Outcome;

namespace {

// The header and the rows with these ids from a starter-catalog CSV.
std::string rows_of(const std::string& file, const std::set<std::string>& ids) {
    std::ifstream in(std::string(COILSIEVE_SOURCE_DIR) + "/data/starter/" + file);
    std::string line, out;
    std::getline(in, line);
    out = line + "\n";
    while (std::getline(in, line))
        if (ids.count(line.substr(0, line.find(','))) != 0) out += line + "\n";
    return out;
}

class RankCli : public CliTest {
protected:
    void SetUp() override {
        CliTest::SetUp();
        const auto l = file(
            "l.csv", rows_of("inductors.csv", {"GEN-L-MCP-6.6x6.4x3-100u", "GEN-L-SDF-8x8x4-47u"}));
        const auto d = file("d.csv", rows_of("diodes.csv", {"GEN-D-SCH-60V-2A-SOD-123F",
                                                            "GEN-D-SCH-100V-2A-SOD-123F"}));
        ASSERT_EQ(run("parts import '" + l.string() + "' --kind inductor --source hand").code, 0);
        ASSERT_EQ(run("parts import '" + d.string() + "' --kind diode --source hand").code, 0);
    }
    static std::string example(const std::string& name) {
        std::string path = COILSIEVE_SOURCE_DIR;
        path += "/data/examples/";
        path += name;
        path += ".json";
        return "'" + path + "'";
    }
    static bool has(const std::string& text, const std::string& part) {
        return text.find(part) != std::string::npos;
    }
};

} // namespace

TEST_F(RankCli, AllZeroWeightsAreRefusedAsInADesignFile) {
    const std::string zero =
        " --source hand --weight loss=0 --weight size=0 --weight ripple=0 --weight margin=0";
    for (const std::string& cmd : std::vector<std::string>{
             "rank " + example("reading-lamp") + " --no-save",
             "sweep " + example("reading-lamp") + " --vary supply.nom=20V..24V:2"}) {
        const Outcome r = run(cmd + zero);
        EXPECT_EQ(r.code, 2) << cmd << "\n" << r.out;
        EXPECT_TRUE(has(r.err, "--weight")) << r.err;
        EXPECT_TRUE(has(r.err, "all weights are zero")) << r.err;
    }
    ASSERT_EQ(run("rank " + example("reading-lamp") + " --source hand --study base").code, 0);
    const Outcome r = run("study rerun base --no-save" + zero);
    EXPECT_EQ(r.code, 2) << r.out;
    EXPECT_TRUE(has(r.err, "all weights are zero")) << r.err;
    // One positive weight is enough.
    EXPECT_EQ(run("rank " + example("reading-lamp") + zero + " --weight cost=1 --no-save").code, 0);
}
