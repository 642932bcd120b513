// `coilsieve rank`, `study rerun` and `sweep` options on a small imported catalog: what the
// command line may change in a design, and what it must refuse before any ranking runs.
#include "catalog/sqlite.hpp"
#include "cli_run.hpp"

#include <fstream>
#include <nlohmann/json.hpp>
#include <set>
#include <string>
#include <vector>

using coilsieve::testing_support::CliTest;
using coilsieve::testing_support::Outcome;

namespace {

class RankCli : public CliTest {
protected:
    void SetUp() override {
        CliTest::SetUp();
        const auto l = file(
            "l.csv", coilsieve::testing_support::starter_rows(
                         "inductors.csv", {"GEN-L-MCP-6.6x6.4x3-100u", "GEN-L-SDF-8x8x4-47u"}));
        const auto d =
            file("d.csv",
                 coilsieve::testing_support::starter_rows(
                     "diodes.csv", {"GEN-D-SCH-60V-2A-SOD-123F", "GEN-D-SCH-100V-2A-SOD-123F"}));
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

TEST_F(RankCli, AFixedSettingThatCanNeverWorkIsRefusedUpFront) {
    // The lamp's target is 700 mA: a band of 200 % or more takes the valley to zero or below.
    Outcome r = run("rank " + example("reading-lamp") + " --source hand --no-save --band 300%");
    EXPECT_EQ(r.code, 2) << r.out;
    EXPECT_TRUE(has(r.err, "--band 300%")) << r.err;
    EXPECT_TRUE(has(r.err, "200 %")) << r.err;
    r = run("rank " + example("reading-lamp") + " --source hand --no-save --band 1.4A");
    EXPECT_EQ(r.code, 2) << r.out;
    r = run("check " + example("reading-lamp") +
            " --inductor GEN-L-MCP-6.6x6.4x3-100u --diode GEN-D-SCH-60V-2A-SOD-123F --band 300%");
    EXPECT_EQ(r.code, 2) << r.out;
    EXPECT_TRUE(has(r.err, "--band 300%")) << r.err;
    EXPECT_NE(run("rank " + example("reading-lamp") + " --source hand --no-save --band 150%").code,
              2);
    // The charger's limits are 50 kHz to 1 MHz.
    for (const std::string f : {"5MHz", "10kHz"}) {
        r = run("rank " + example("two-cell-charger") + " --source hand --no-save --frequency " +
                f);
        EXPECT_EQ(r.code, 2) << f << "\n" << r.out;
        EXPECT_TRUE(has(r.err, "--frequency " + f)) << r.err;
        EXPECT_TRUE(has(r.err, "f_sw_min..f_sw_max")) << r.err;
        EXPECT_TRUE(r.out.empty()) << "no ranking is run: " << r.out;
    }
    EXPECT_NE(
        run("rank " + example("two-cell-charger") + " --source hand --no-save --frequency 300kHz")
            .code,
        2);
    // A new limit that rules out a study's fixed frequency.
    ASSERT_NE(run("rank " + example("two-cell-charger") +
                  " --source hand --frequency 600kHz --study fixed")
                  .code,
              2);
    r = run("study rerun fixed --no-save --limit 'f_sw<=500kHz'");
    EXPECT_EQ(r.code, 2) << r.out;
    EXPECT_TRUE(has(r.err, "the study's fixed frequency")) << r.err;
}

TEST_F(RankCli, ATakenStudyNameIsRefusedBeforeRanking) {
    const std::string rank = "rank " + example("reading-lamp") + " --source hand ";
    ASSERT_EQ(run(rank + "--study lamp").code, 0);
    Outcome r = run(rank + "--study lamp");
    EXPECT_EQ(r.code, 2);
    EXPECT_TRUE(r.out.empty()) << "no ranking is run: " << r.out;
    EXPECT_TRUE(has(r.err, "--study lamp")) << r.err;
    EXPECT_TRUE(has(r.err, "exists already")) << r.err;
    r = run("study rerun lamp --study lamp");
    EXPECT_EQ(r.code, 2);
    EXPECT_TRUE(r.out.empty()) << r.out;
    EXPECT_TRUE(has(r.err, "--study lamp")) << r.err;
}

TEST_F(RankCli, ARankingThatCannotBeSavedIsPrintedAndTheFailureExplained) {
    ASSERT_EQ(run("rank " + example("reading-lamp") + " --source hand --no-save").code, 0);
    {
        // A database that refuses new studies (as a read-only file would; this runs as any user).
        coilsieve::catalog::sqlite::Database catalog(db());
        catalog.exec("CREATE TRIGGER refuse BEFORE INSERT ON study BEGIN "
                     "SELECT RAISE(ABORT, 'refused by the test'); END");
    }
    const Outcome r = run("rank " + example("reading-lamp") + " --source hand --study lamp");
    EXPECT_EQ(r.code, 1);
    EXPECT_TRUE(has(r.out, "GEN-L-MCP-6.6x6.4x3-100u")) << "the ranking is printed: " << r.out;
    EXPECT_FALSE(has(r.out, "Saved as study")) << r.out;
    EXPECT_TRUE(has(r.err, "could not be saved")) << r.err;
    EXPECT_TRUE(has(r.err, db().string())) << r.err;
    EXPECT_TRUE(has(r.err, "--no-save")) << r.err;
    for (const char* sql : {"INSERT", "TRIGGER", "refused by the test"})
        EXPECT_FALSE(has(r.err, sql)) << r.err;
}

TEST_F(RankCli, LimitsTakeInclusiveBoundsOrTheDesignFilesNames) {
    const std::string rank = "rank " + example("reading-lamp") + " --source hand ";
    for (const std::string bad : {"height<3mm", "efficiency>90%"}) {
        const Outcome r = run(rank + "--no-save --limit '" + bad + "'");
        EXPECT_EQ(r.code, 2) << bad << "\n" << r.out;
        EXPECT_TRUE(has(r.err, "--limit \"" + bad + "\"")) << r.err;
        EXPECT_TRUE(has(r.err, "use <= or >=")) << r.err;
        EXPECT_TRUE(r.out.empty()) << r.out;
    }
    for (const std::string bad : {"height==3mm", "height=<3mm", "height=3mm"}) {
        const Outcome r = run(rank + "--no-save --limit '" + bad + "'");
        EXPECT_EQ(r.code, 2) << bad << "\n" << r.out;
        EXPECT_TRUE(has(r.err, "NAME<=VALUE")) << r.err;
        EXPECT_TRUE(has(r.err, "height_max=3mm")) << r.err;
        EXPECT_FALSE(has(r.err, "does not start with a number")) << r.err;
    }
    // LIMIT=VALUE with the design file's name sets that limit.
    ASSERT_NE(run(rank + "--study h --limit 'height_max=3mm'").code, 2);
    const Outcome r = run("study show h --json");
    ASSERT_EQ(r.code, 0) << r.err;
    const auto j = nlohmann::json::parse(r.out);
    EXPECT_DOUBLE_EQ(j["design"]["limits"]["height_max"].get<double>(), 0.003);
    // The controller's minimum pulses, in time units; a maximum is the wrong direction.
    ASSERT_NE(run(rank + "--study p --limit 't_on_min>=150ns' --limit 't_off_min=0.1us' " +
                  "--limit 'current_error<=2%'")
                  .code,
              2);
    const auto p = nlohmann::json::parse(run("study show p --json").out);
    EXPECT_DOUBLE_EQ(p["design"]["limits"]["current_error"].get<double>(), 0.02);
    EXPECT_DOUBLE_EQ(p["design"]["limits"]["t_on_min"].get<double>(), 150e-9);
    EXPECT_DOUBLE_EQ(p["design"]["limits"]["t_off_min"].get<double>(), 100e-9);
    // Every short form the unknown-name message lists works, and none takes `=`.
    ASSERT_NE(run(rank + "--study s --limit 't_inductor<=90C' --limit 'f_sw>=100kHz'").code, 2);
    const auto sh = nlohmann::json::parse(run("study show s --json").out);
    EXPECT_DOUBLE_EQ(sh["design"]["limits"]["t_inductor_max"].get<double>(), 90.0); // in °C
    EXPECT_DOUBLE_EQ(sh["design"]["limits"]["f_sw_min"].get<double>(), 100e3);
    const Outcome listed = run(rank + "--no-save --limit 'bogus<=1'");
    EXPECT_TRUE(has(listed.err, "t_inductor<=")) << listed.err;
    EXPECT_TRUE(has(listed.err, "f_sw>=")) << listed.err;
    EXPECT_TRUE(has(run(rank + "--no-save --limit 'f_sw=500kHz'").err, "NAME=VALUE"));
    const Outcome wrong = run(rank + "--no-save --limit 't_on_min<=150ns'");
    EXPECT_EQ(wrong.code, 2);
    EXPECT_TRUE(has(wrong.err, "t_on_min>=VALUE")) << wrong.err;
}

// The exit codes the README and --help give: a bad design file is a usage error in every command.
TEST_F(RankCli, ABadDesignFileExitsTwoInEveryCommand) {
    const auto bad = file("bad.json", R"({"name": "x", "supply": {"min": "20V"}})");
    const std::string d = "'" + bad.string() + "'";
    for (const std::string& cmd : std::vector<std::string>{
             "rank " + d + " --source hand --no-save",
             "sweep " + d + " --vary supply.nom=20V..24V:2",
             "check " + d +
                 " --inductor GEN-L-MCP-6.6x6.4x3-100u --diode GEN-D-SCH-60V-2A-SOD-123F"}) {
        const Outcome r = run(cmd);
        EXPECT_EQ(r.code, 2) << cmd << "\n" << r.err;
        EXPECT_TRUE(has(r.err, "bad.json")) << r.err;
    }
}

// The README's required diode fields: a known package, or rth_ja with the three dimensions.
TEST_F(RankCli, ADiodeNeedsAPackageOrItsThermalResistanceAndSize) {
    const std::string head = "id,technology,vrrm,if_avg,vf1,if1";
    const std::string row = "X1,schottky,40V,1A,0.5V,1A";
    auto import = [&](const std::string& extra_head, const std::string& extra_row) {
        const auto f = file("d1.csv", head + extra_head + "\n" + row + extra_row + "\n");
        return run("parts import '" + f.string() + "' --kind diode --source t --dry-run");
    };
    Outcome r = import("", "");
    EXPECT_EQ(r.code, 1);
    EXPECT_TRUE(has(r.err, "package")) << r.err;
    EXPECT_EQ(import(",rth_ja", ",100").code, 1);
    EXPECT_EQ(import(",rth_ja,length,width,height", ",100,3mm,2mm,1mm").code, 0);
    EXPECT_EQ(import(",package", ",SMA").code, 0);
}

TEST_F(RankCli, ANetlistThatCannotBeWrittenSaysWhatToCheck) {
    const Outcome r = run("check " + example("reading-lamp") +
                          " --inductor hand:GEN-L-MCP-6.6x6.4x3-100u"
                          " --diode hand:GEN-D-SCH-60V-2A-SOD-123F --netlist '" +
                          (dir_ / "no-such-folder" / "x.cir").string() + "'");
    EXPECT_EQ(r.code, 1) << r.out;
    EXPECT_TRUE(has(r.err, "x.cir")) << r.err;
    EXPECT_TRUE(has(r.err, "check that the folder exists and is writable")) << r.err;
}

// A damaged catalog: the error names the file and what to do, not the SQL that met the damage.
TEST_F(RankCli, ADamagedCatalogIsNamedWithWhatToDo) {
    ASSERT_EQ(run("parts list inductors --limit 1").code, 0); // the starter catalog, checkpointed
    std::filesystem::resize_file(db(), 200000);
    const Outcome r = run("parts list inductors");
    EXPECT_EQ(r.code, 1) << r.out;
    EXPECT_TRUE(has(r.err, "catalog " + db().string())) << r.err;
    EXPECT_TRUE(has(r.err, "damaged")) << r.err;
    EXPECT_TRUE(has(r.err, "--db")) << r.err;
    EXPECT_FALSE(has(r.err, "SELECT")) << r.err;
}

// A part list without body sizes: `check` says what that means, and a ranking leaves it out.
TEST_F(RankCli, AnInductorWithoutABodySizeIsFlaggedAndLeftOut) {
    const auto l = file("nodim.csv", "id,inductance (uH),dcr_typ,isat\nNO-SIZE,100,665m,2.12\n");
    ASSERT_EQ(run("parts import '" + l.string() + "' --kind inductor --source nodim").code, 0);
    const Outcome c = run("check " + example("reading-lamp") +
                          " --inductor NO-SIZE --diode hand:GEN-D-SCH-60V-2A-SOD-123F");
    EXPECT_TRUE(has(c.out, "has no body size")) << c.out << c.err;
    const Outcome r = run("rank " + example("reading-lamp") +
                          " --source hand --source nodim --no-save --why NO-SIZE");
    EXPECT_TRUE(has(r.out, "body_size")) << r.out;
    EXPECT_TRUE(has(r.out, "screened out")) << r.out;
}
