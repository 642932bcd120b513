#include "catalog/fields.hpp"
#include "catalog/import.hpp"
#include "catalog/store.hpp"

#include <algorithm>
#include <cmath>
#include <fstream>
#include <gtest/gtest.h>
#include <sstream>

using namespace coilsieve;
using namespace coilsieve::catalog;

namespace {

ImportResult inductors(std::string_view text, const HeaderMapping& m = {}) {
    return read_parts(text, "in.csv", PartKind::inductor, "src", m);
}
ImportResult diodes(std::string_view text) {
    return read_parts(text, "d.csv", PartKind::diode, "src");
}

std::string all_problems(const ImportResult& r) {
    std::string s;
    for (const auto& p : r.problems) s += p.to_string() + "\n";
    return s;
}

std::string read_fixture(const std::string& name) {
    std::ifstream in(std::string(COILSIEVE_SOURCE_DIR) + "/tests/catalog/data/" + name);
    std::ostringstream ss;
    ss << in.rdbuf();
    return ss.str();
}

bool contains(const std::string& haystack, const std::string& needle) {
    return haystack.find(needle) != std::string::npos;
}

} // namespace

TEST(Fields, HeaderAliasesAndUnits) {
    auto m = match_header(PartKind::inductor, "L (uH)");
    ASSERT_TRUE(m);
    EXPECT_EQ(fields(PartKind::inductor)[m->field].name, "inductance");
    EXPECT_EQ(m->unit, "uH");
    for (const char* h :
         {"L", "Inductance", "DCR", "DCR (mOhm)", "Isat", "I sat", "I_SAT", "Irms"}) {
        EXPECT_TRUE(match_header(PartKind::inductor, h)) << h;
    }
    for (const char* h : {"Vrrm", "VRRM", "IF(AV)", "Io", "Vf", "Package", "Rth(j-a) [K/W]"}) {
        EXPECT_TRUE(match_header(PartKind::diode, h)) << h;
    }
    EXPECT_EQ(fields(PartKind::diode)[match_header(PartKind::diode, "IF(AV)")->field].name,
              "if_avg");
    EXPECT_EQ(match_header(PartKind::diode, "dcr_typ [mOhm]"), std::nullopt);
    EXPECT_EQ(match_header(PartKind::inductor, "dcr_typ [mOhm]")->unit, "mOhm");
}

TEST(Fields, EveryRequiredFieldOfColumnsMdIsRequired) {
    // columns.md: inductor id, inductance, dcr_typ, isat; diode id, technology, vrrm, if_avg.
    for (const char* n : {"id", "inductance", "dcr_typ", "isat"}) {
        EXPECT_TRUE(fields(PartKind::inductor)[*field_index(PartKind::inductor, n)].required) << n;
    }
    for (const char* n : {"id", "technology", "vrrm", "if_avg"}) {
        EXPECT_TRUE(fields(PartKind::diode)[*field_index(PartKind::diode, n)].required) << n;
    }
    int required = 0;
    for (const auto& f : fields(PartKind::inductor)) required += f.required;
    EXPECT_EQ(required, 4);
}

TEST(Import, HeaderUnitsAndCellUnits) {
    const auto r = inductors("id,L (uH),DCR [mOhm],Isat\nA,10,50,2.5A\nB,4.7uH,0.02,3\n");
    ASSERT_TRUE(r.problems.empty()) << all_problems(r);
    ASSERT_EQ(r.inductors.size(), 2u);
    EXPECT_DOUBLE_EQ(r.inductors[0].inductance, 10e-6);
    EXPECT_DOUBLE_EQ(r.inductors[0].dcr_typ, 0.050);
    EXPECT_DOUBLE_EQ(r.inductors[1].inductance, 4.7e-6); // a cell's own unit wins
    EXPECT_EQ(r.inductors[0].source, "src");
}

TEST(Import, DefaultsAreAppliedAndRecorded) {
    const auto r = inductors("id,inductance,dcr_typ,isat,length (mm),width (mm),height (mm)\n"
                             "A,10u,50m,2.0,20,20,8\n");
    ASSERT_TRUE(r.problems.empty()) << all_problems(r);
    const auto& p = r.inductors.at(0);
    EXPECT_DOUBLE_EQ(p.tolerance, 0.2);
    EXPECT_DOUBLE_EQ(p.sat_drop, 0.3);
    EXPECT_DOUBLE_EQ(p.irms_rise, 40.0);
    EXPECT_DOUBLE_EQ(p.t_max, 398.15);
    EXPECT_DOUBLE_EQ(p.dcr_max, p.dcr_typ);
    EXPECT_DOUBLE_EQ(p.dcr_temperature, 293.15);
    EXPECT_DOUBLE_EQ(p.irms, 0.8 * 2.0);
    EXPECT_EQ(p.family, parts::InductorFamily::shielded_drum_ferrite);
    EXPECT_EQ(p.mounting, parts::Mounting::tht); // largest dimension 20 mm > 15 mm
    const auto& fd = parts::family_defaults(p.family);
    EXPECT_DOUBLE_EQ(p.core_volume, fd.core_volume_fraction * 0.020 * 0.020 * 0.008);
    for (const char* f :
         {"tolerance", "sat_drop", "irms", "irms_rise", "t_max", "dcr_max", "dcr_temperature",
          "family", "shape", "core_k", "b_sat", "core_volume", "ac_factor", "mounting"}) {
        EXPECT_TRUE(p.is_assumed(f)) << f;
    }
    EXPECT_FALSE(p.is_assumed("inductance"));
    EXPECT_FALSE(p.is_assumed("height"));
}

TEST(Import, EveryBadCellIsReportedWithFileLineColumn) {
    const auto r = inductors("id,inductance (uH),dcr_typ (mOhm),isat (A),tolerance\n"
                             "A,-10,50,2,20%\n"
                             "B,nan,50,2,20%\n"
                             "C,1e30,50,2,20%\n"
                             "D,10,50,2,150%\n"
                             "E,10 uF,50,2,20%\n"
                             "F,10,50,inf,20%\n"
                             "G,10,,2,20%\n"
                             "H,10,50,2,20%\n");
    EXPECT_EQ(r.inductors.size(), 1u);
    EXPECT_EQ(r.rejected_lines, (std::vector<int>{2, 3, 4, 5, 6, 7, 8}));
    const std::string s = all_problems(r);
    EXPECT_TRUE(contains(s, "in.csv:2: column \"inductance (uH)\": value \"-10\"")) << s;
    EXPECT_TRUE(contains(s, "in.csv:3: column \"inductance (uH)\": value \"nan\"")) << s;
    EXPECT_TRUE(contains(s, "in.csv:4: column \"inductance (uH)\": value \"1e30\"")) << s;
    EXPECT_TRUE(contains(s, "in.csv:5: column \"tolerance\": value \"150%\"")) << s;
    EXPECT_TRUE(contains(s, "in.csv:6: column \"inductance (uH)\": value \"10 uF\"")) << s;
    EXPECT_TRUE(contains(s, "in.csv:7: column \"isat (A)\"")) << s;
    EXPECT_TRUE(contains(s, "in.csv:8: column \"dcr_typ (mOhm)\": required value missing")) << s;
}

TEST(Import, DcrMaxBelowTypicalIsRejected) {
    const auto r = inductors("id,inductance,dcr_typ,dcr_max,isat\nA,10u,50m,40m,2\n");
    EXPECT_TRUE(r.inductors.empty());
    EXPECT_TRUE(contains(all_problems(r), "column \"dcr_max\"")) << all_problems(r);
}

TEST(Import, UnknownFamilyListsTheValidNames) {
    const auto r = inductors("id,inductance,dcr_typ,isat,family\nA,10u,50m,2,air-core\n");
    const std::string s = all_problems(r);
    EXPECT_TRUE(contains(s, "in.csv:2: column \"family\": unknown family \"air-core\"")) << s;
    EXPECT_TRUE(contains(s, "metal-composite")) << s;
}

TEST(Import, FamilySpellingIsForgiving) {
    const auto r = inductors("id,inductance,dcr_typ,isat,family\nA,10u,50m,2,Metal Composite\n");
    ASSERT_TRUE(r.problems.empty()) << all_problems(r);
    EXPECT_EQ(r.inductors[0].family, parts::InductorFamily::metal_composite);
}

TEST(Import, DuplicateIdNamesBothLines) {
    const auto r = inductors("id,inductance,dcr_typ,isat\nA,10u,50m,2\nB,10u,50m,2\nA,22u,80m,2\n");
    EXPECT_EQ(r.inductors.size(), 2u);
    EXPECT_TRUE(
        contains(all_problems(r), "in.csv:4: column \"id\": duplicate id \"A\" (also on line 2)"))
        << all_problems(r);
}

TEST(Import, WrongHeaderUnitIsReportedOnTheHeader) {
    const auto r = inductors("id,inductance (mA),dcr_typ,isat\nA,10,50m,2\n");
    EXPECT_TRUE(r.fatal);
    EXPECT_TRUE(contains(all_problems(r), "in.csv:1: column \"inductance (mA)\": unit \"mA\""))
        << all_problems(r);
}

TEST(Import, MissingRequiredColumnIsFatal) {
    const auto r = inductors("id,inductance,isat\nA,10u,2\n");
    EXPECT_TRUE(r.fatal);
    EXPECT_TRUE(contains(all_problems(r), "required column missing: dcr_typ")) << all_problems(r);
}

TEST(Import, CsvStructureProblemsAreFatalWithLine) {
    for (auto [text, needle] : std::vector<std::pair<std::string, std::string>>{
             {"", "in.csv:1: empty file"},
             {"id,inductance,dcr_typ,isat\n", "header only"},
             {"id;inductance;dcr_typ;isat\nA;10u;50m;2\n", "';'"},
             {"id,inductance,dcr_typ,isat\nA,10u,\"50m,2\n", "in.csv:2: unterminated"}}) {
        const auto r = inductors(text);
        EXPECT_TRUE(r.fatal) << text;
        EXPECT_TRUE(contains(all_problems(r), needle)) << all_problems(r);
    }
}

TEST(Import, RaggedRowsAreEachReported) {
    const auto r = inductors("id,inductance,dcr_typ,isat\nA,10u,50m,2\nB,10u,50m\nC,1,2,3,4\n");
    EXPECT_EQ(r.inductors.size(), 1u);
    const std::string s = all_problems(r);
    EXPECT_TRUE(contains(s, "in.csv:3: row has 3 fields")) << s;
    EXPECT_TRUE(contains(s, "in.csv:4: row has 5 fields")) << s;
}

TEST(Import, BomAndCrlf) {
    const auto r =
        inductors("\xEF\xBB\xBFid,inductance,dcr_typ,isat\r\nA,10u,50m,2\r\nB,22u,90m,1.5\r\n");
    ASSERT_TRUE(r.problems.empty()) << all_problems(r);
    ASSERT_EQ(r.inductors.size(), 2u);
    EXPECT_EQ(r.inductors[0].id, "A");
    EXPECT_DOUBLE_EQ(r.inductors[1].isat, 1.5);
}

TEST(Import, MappingFileMapsOtherHeaders) {
    const HeaderMapping m{{"Induct. nominal", "inductance"},
                          {"Widerstand", "dcr_typ"},
                          {"Strom", "isat"},
                          {"Teil", "id"}};
    const auto r = inductors(read_fixture("inductors_mapped.csv"), m);
    ASSERT_TRUE(r.problems.empty()) << all_problems(r);
    ASSERT_EQ(r.inductors.size(), 1u);
    EXPECT_DOUBLE_EQ(r.inductors[0].inductance, 6.8e-6);
    EXPECT_DOUBLE_EQ(r.inductors[0].dcr_typ, 0.030);
    EXPECT_DOUBLE_EQ(r.inductors[0].isat, 3.0);
}

TEST(Import, MappingToUnknownFieldIsFatal) {
    const auto r = inductors("id,inductance,dcr_typ,isat\nA,10u,50m,2\n", {{"X", "colour"}});
    EXPECT_TRUE(r.fatal);
    EXPECT_TRUE(contains(all_problems(r), "colour"));
}

TEST(Import, UnknownColumnsAreIgnoredAndListed) {
    const auto r = inductors("id,inductance,dcr_typ,isat,Maker\nA,10u,50m,2,our own\n");
    ASSERT_TRUE(r.problems.empty()) << all_problems(r);
    EXPECT_EQ(r.ignored_columns, (std::vector<std::string>{"Maker"}));
}

TEST(Import, ProblemsAreCapped) {
    std::string text = "id,inductance,dcr_typ,isat\n";
    for (int i = 0; i < 500; ++i) text.append("P").append(std::to_string(i)).append(",-1,50m,2\n");
    const auto r = inductors(text);
    EXPECT_EQ(r.problems.size(), max_problems + 1);
    EXPECT_TRUE(contains(r.problems.back().reason, "300 more problems"))
        << r.problems.back().reason;
    EXPECT_EQ(r.rejected_lines.size(), 500u);
}

// A long file is read in stretches on several threads; what comes out must not depend on how
// many. The file has problems in every stretch (more than the cap in the first), rows of the
// wrong width, and ids that repeat across stretches.
TEST(Import, ALongFileReadsTheSameOnAnyNumberOfThreads) {
    std::string text = "id,inductance,dcr_typ,isat,family\n";
    const int rows = 9000;
    for (int i = 0; i < rows; ++i) {
        const bool repeated = i % 997 == 5; // R0, R1, R2 repeat far apart
        std::string id(1, repeated ? 'R' : 'P');
        id += std::to_string(repeated ? i % 3 : i);
        const bool crowded = i < 2000 || i >= 7000; // over the cap in the first and last half
        if (crowded && i % 8 == 0) text += id + ",-1,50m,2,\n"; // out of range
        else if (i % 1500 == 7) text += id + ",10u,50m\n";      // too few fields
        else if (i % 700 == 3) text += id + ",10u,50m,2,no-such-family\n";
        else text += id + ",10u,50m," + std::to_string(1 + i % 5) + ",\n";
    }
    auto read = [&](unsigned threads) {
        return read_parts(text, "long.csv", PartKind::inductor, "src", {}, threads);
    };
    const ImportResult one = read(1);
    // The file is built to cross the cap and to hold each kind of problem (the cap and the
    // rejected lines are the only trace of problems past it).
    ASSERT_EQ(one.problems.size(), max_problems + 1);
    // Row i is on line i + 2; R2 is first on row 5 and repeats on rows 2996, 5987 and 8978.
    for (int i : {2996, 5987, 8978}) {
        EXPECT_TRUE(std::ranges::binary_search(one.rejected_lines, i + 2)) << "row " << i;
    }
    EXPECT_FALSE(std::ranges::binary_search(one.rejected_lines, 5 + 2));
    EXPECT_TRUE(contains(all_problems(one), "quote fields that contain commas"));
    for (unsigned threads : {2U, 3U, 7U}) {
        const ImportResult many = read(threads);
        EXPECT_EQ(all_problems(many), all_problems(one)) << threads << " threads";
        EXPECT_EQ(many.rows, one.rows);
        EXPECT_EQ(many.rejected_lines, one.rejected_lines);
        EXPECT_EQ(many.part_lines, one.part_lines);
        ASSERT_EQ(many.inductors.size(), one.inductors.size());
        for (std::size_t k = 0; k < one.inductors.size(); ++k) {
            EXPECT_EQ(many.inductors[k].id, one.inductors[k].id);
            EXPECT_EQ(many.inductors[k].isat, one.inductors[k].isat);
            EXPECT_EQ(many.inductors[k].assumed, one.inductors[k].assumed);
        }
    }
}

TEST(Import, DuplicateIdsAreFoundInJsonToo) {
    const auto r = read_parts(R"([{"id": 7, "inductance": "10u", "dcr_typ": "50m", "isat": 2},
                                   {"id": "7", "inductance": "22u", "dcr_typ": "80m", "isat": 2}])",
                              "in.json", PartKind::inductor, "src");
    EXPECT_EQ(r.inductors.size(), 1u);
    EXPECT_TRUE(contains(all_problems(r), "in.json:2: column \"id\": duplicate id \"7\" (also on "
                                          "line 1)"))
        << all_problems(r);
}

TEST(Import, DiodeDefaultsFromPackageAndTechnology) {
    const auto known = choice_names("package");
    ASSERT_FALSE(known.empty()) << "parts::package_outline knows no package";
    const std::string pkg = known.front();
    const auto outline = parts::package_outline(pkg);
    const auto r = diodes("id,technology,vrrm,if_avg,vf1,if1,package\n"
                          "D1,schottky,40V,2A,0.5V,2A," +
                          pkg +
                          "\n"
                          "D2,ultrafast,600,1,1.2,1," +
                          pkg + "\n");
    ASSERT_TRUE(r.problems.empty()) << all_problems(r);
    const auto& s = r.diodes.at(0);
    EXPECT_DOUBLE_EQ(s.rth_ja, outline->rth_ja);
    EXPECT_DOUBLE_EQ(s.height, outline->height);
    EXPECT_DOUBLE_EQ(s.tj_max, 398.15);
    EXPECT_EQ(s.trr.value_or(-1), 0.0);
    ASSERT_EQ(s.forward.size(), 1u);
    EXPECT_DOUBLE_EQ(s.forward[0].temperature, 298.15);
    EXPECT_TRUE(s.is_assumed("rth_ja"));
    EXPECT_TRUE(s.is_assumed("t1"));
    const auto& u = r.diodes.at(1);
    EXPECT_DOUBLE_EQ(u.tj_max, 423.15);
    EXPECT_GT(u.trr.value_or(0), 0.0);
    EXPECT_TRUE(u.is_assumed("trr"));
}

TEST(Import, DiodeProblems) {
    const auto r = diodes("id,technology,vrrm,if_avg,vf1,if1,package\n"
                          "D1,zener,40,2,0.5,2,SMA\n"
                          "D2,schottky,40,2,,,SMA\n"
                          "D3,schottky,40,2,0.5,2,NOPE-99\n"
                          "D4,schottky,-40,2,0.5,2,SMA\n");
    const std::string s = all_problems(r);
    EXPECT_TRUE(contains(
        s, "d.csv:2: column \"technology\": unknown technology \"zener\"; valid: schottky"))
        << s;
    EXPECT_TRUE(contains(s, "d.csv:3: column \"vf1\": no forward characteristic")) << s;
    EXPECT_TRUE(contains(s, "d.csv:4: column \"package\": unknown package \"NOPE-99\"")) << s;
    EXPECT_TRUE(contains(s, "d.csv:5: column \"vrrm\"")) << s;
}

TEST(Import, UnknownPackageIsFineWhenItsDataIsGiven) {
    const auto r = diodes("id,technology,vrrm,if_avg,vf1,if1,package,rth_ja,length,width,height\n"
                          "D1,schottky,40,2,0.5,2,CUSTOM-7,90,5mm,3mm,1mm\n");
    ASSERT_TRUE(r.problems.empty()) << all_problems(r);
    EXPECT_EQ(r.diodes[0].package, "CUSTOM-7");
}

TEST(Import, Json) {
    const auto r = read_parts(R"([
        {"id": "J1", "inductance": "10uH", "dcr_typ": 0.05, "isat": "2 A", "t_max": 150},
        {"id": "J2", "inductance": -1, "dcr_typ": 0.05, "isat": 2},
        "not an object"
    ])",
                              "parts.json", PartKind::inductor, "src");
    ASSERT_EQ(r.inductors.size(), 1u);
    EXPECT_DOUBLE_EQ(r.inductors[0].inductance, 10e-6);
    EXPECT_DOUBLE_EQ(r.inductors[0].t_max, 423.15); // JSON numbers for temperatures are °C
    const std::string s = all_problems(r);
    EXPECT_TRUE(contains(s, "parts.json:2: column \"inductance\"")) << s;
    EXPECT_TRUE(contains(s, "parts.json:3: element is not an object")) << s;
}

TEST(Import, InvalidJsonIsFatalWithLine) {
    const auto r = read_parts("[\n{\"id\": \"A\",\n}\n]", "p.json", PartKind::inductor, "s");
    EXPECT_TRUE(r.fatal);
    EXPECT_TRUE(contains(all_problems(r), "p.json:3: invalid JSON")) << all_problems(r);
}

namespace {
template <class Part> void expect_same(const std::vector<Part>& a, const std::vector<Part>& b) {
    ASSERT_EQ(a.size(), b.size());
    for (std::size_t i = 0; i < a.size(); ++i) {
        const Record ra = to_record(a[i]), rb = to_record(b[i]);
        EXPECT_EQ(a[i].assumed, b[i].assumed) << a[i].id;
        for (std::size_t k = 0; k < ra.size(); ++k) {
            ASSERT_EQ(ra[k].index(), rb[k].index()) << a[i].id << " field " << k;
            if (auto x = std::get_if<double>(&ra[k])) {
                EXPECT_NEAR(*x, std::get<double>(rb[k]), 1e-12 * std::abs(*x))
                    << a[i].id << " " << k;
            } else {
                EXPECT_EQ(ra[k], rb[k]);
            }
        }
    }
}
} // namespace

TEST(Export, CsvAndJsonRoundTripInductors) {
    const auto first = inductors(read_fixture("inductors_small.csv"));
    ASSERT_TRUE(first.problems.empty()) << all_problems(first);
    const auto csv = inductors(export_csv(first.inductors));
    ASSERT_TRUE(csv.problems.empty()) << all_problems(csv);
    expect_same(first.inductors, csv.inductors);
    const auto json = read_parts(export_json(first.inductors), "x.json", PartKind::inductor, "src");
    ASSERT_TRUE(json.problems.empty()) << all_problems(json);
    expect_same(first.inductors, json.inductors);
}

TEST(Export, CsvRoundTripDiodes) {
    const std::string pkg = choice_names("package").at(0);
    const auto first = diodes(
        "id,technology,vrrm,if_avg,vf1,if1,t1,vf2,if2,t2,spice_is,spice_n,cjo,ir,package,notes\n"
        "D1,schottky,40,2,0.45,1,25,0.38,1,125,2e-6,1.1,150p,50u," +
        pkg +
        ",\"a, b\"\n"
        "D2,fast,200,1,1.0,1,,,,,,,,," +
        pkg + ",\n");
    ASSERT_TRUE(first.problems.empty()) << all_problems(first);
    const auto again = diodes(export_csv(first.diodes));
    ASSERT_TRUE(again.problems.empty()) << all_problems(again);
    expect_same(first.diodes, again.diodes);
}

// Values no power part can have are refused at the door rather than giving contradictory figures
// later (an inductance of 1e-300 H gave an RMS current below its average).
TEST(Import, InductanceAndDcrBelowAnyRealPartAreRefused) {
    auto r = inductors("id,inductance,dcr_typ,isat\nA,1e-300,50m,2\n");
    EXPECT_TRUE(r.inductors.empty());
    EXPECT_TRUE(contains(all_problems(r), "column \"inductance\"")) << all_problems(r);
    EXPECT_TRUE(contains(all_problems(r), "1.00 nH")) << all_problems(r);
    r = inductors("id,inductance,dcr_typ,isat\nA,10u,1e-12,2\n");
    EXPECT_TRUE(r.inductors.empty());
    EXPECT_TRUE(contains(all_problems(r), "column \"dcr_typ\"")) << all_problems(r);
    r = inductors("id,inductance,dcr_typ,isat\nA,1n,1u,2\n"); // both at their floors
    EXPECT_EQ(r.inductors.size(), 1u) << all_problems(r);
}
