#include "catalog/fields.hpp"
#include "catalog/sqlite.hpp"
#include "catalog/store.hpp"

#include <atomic>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <gtest/gtest.h>
#include <thread>
#include <unistd.h>

using namespace coilsieve;
using namespace coilsieve::catalog;
namespace fs = std::filesystem;

namespace {

class TempDir {
public:
    TempDir() {
        const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
        path_ = fs::temp_directory_path() /
                ("coilsieve-store-" + std::to_string(::getpid()) + "-" + info->name());
        fs::remove_all(path_);
        fs::create_directories(path_);
    }
    ~TempDir() {
        std::error_code ec;
        fs::remove_all(path_, ec);
    }
    fs::path operator/(const std::string& name) const { return path_ / name; }

private:
    fs::path path_;
};

const char* three_inductors = "id,family,inductance,dcr_typ,isat,height (mm)\n"
                              "A,shielded-drum-ferrite,10u,50m,2.5,3\n"
                              "B,metal-composite,15u,80m,3.0,2\n"
                              "C,unshielded-drum,22u,120m,1.5,5\n";

ImportRequest request(PartKind kind, std::string source, std::string text) {
    ImportRequest r;
    r.kind = kind;
    r.source = std::move(source);
    r.file_name = "test.csv";
    r.text = std::move(text);
    return r;
}

// Every row of every table, in a fixed order: equal dumps mean equal database content.
std::string dump(sqlite::Database& db) {
    std::string out;
    for (const char* table : {"source", "inductor", "diode", "study"}) {
        sqlite::Statement st(db, std::string("SELECT * FROM ") + table + " ORDER BY 1");
        out += std::string("# ") + table + "\n";
        while (st.step()) {
            for (int c = 0; c < st.column_count(); ++c) out += st.column_text(c) + "|";
            out += "\n";
        }
    }
    return out;
}

std::vector<std::string> ids(const std::vector<parts::Inductor>& ps) {
    std::vector<std::string> out;
    for (const auto& p : ps) out.push_back(p.id);
    return out;
}

OpenOptions without_starter() { return OpenOptions{.load_starter = false}; }

} // namespace

TEST(Store, NewDatabaseHasSchemaVersionAndApplicationId) {
    TempDir dir;
    Store s(dir / "sub" / "dir" / "c.db", without_starter()); // parent directories are created
    EXPECT_EQ(s.database().scalar_int("PRAGMA user_version"), latest_schema_version());
    EXPECT_EQ(s.database().scalar_int("PRAGMA application_id"), catalog_application_id);
    EXPECT_EQ(s.database().scalar_int("PRAGMA foreign_keys"), 1);
    sqlite::Statement mode(s.database(), "PRAGMA journal_mode");
    ASSERT_TRUE(mode.step());
    EXPECT_EQ(mode.column_text(0), "wal");
    EXPECT_TRUE(s.sources().empty());
}

TEST(Store, DatabaseColumnsAreTheFieldTable) {
    Store s(":memory:", without_starter());
    for (PartKind kind : {PartKind::inductor, PartKind::diode}) {
        std::vector<std::string> columns;
        sqlite::Statement st(s.database(), std::string("PRAGMA table_info(") +
                                               std::string(to_string(kind)) + ")");
        while (st.step()) columns.push_back(st.column_text(1));
        for (const Field& f : fields(kind)) {
            EXPECT_NE(std::find(columns.begin(), columns.end(), f.name), columns.end()) << f.name;
        }
        EXPECT_EQ(columns.size(), fields(kind).size() + 3); // pk, source_id, assumed
    }
}

TEST(Store, MigratesFromVersionOne) {
    TempDir dir;
    const fs::path path = dir / "v1.db";
    {
        sqlite::Database db(path);
        db.exec(migration_sql(1));
        db.exec("PRAGMA application_id = " + std::to_string(catalog_application_id));
        db.exec("PRAGMA user_version = 1");
        db.exec(
            "INSERT INTO source (id, name, part_kind, kind, created, file_name, sha256, row_count) "
            "VALUES (1, 'old', 'inductor', 'import', '2024-01-01T00:00:00Z', 'old.csv', '" +
            std::string(64, 'a') + "', 1)");
        std::string cols = "source_id, assumed";
        std::string vals = "1, ''";
        const Record r = to_record(read_parts("id,inductance,dcr_typ,isat\nX,10u,50m,2\n", "o.csv",
                                              PartKind::inductor, "old")
                                       .inductors.at(0));
        sqlite::Statement ins(db,
                              "INSERT INTO inductor (source_id, assumed, \"id\", family, "
                              "inductance, tolerance, dcr_typ, dcr_max, dcr_temperature, isat, "
                              "sat_drop, irms, irms_rise, shape, core_k, core_alpha, core_beta, "
                              "b_sat, core_volume, ac_factor, t_max, mounting, length, width, "
                              "height) VALUES (1, '', 'X', 'shielded-drum-ferrite', 1e-5, 0.2, "
                              "0.05, 0.05, 293.15, 2, 0.3, 1.6, 40, 'hard', 1, 1.5, 2.5, 0.3, 0, "
                              "1.2, 398.15, 'smd', 0, 0, 0)");
        ins.run();
        (void)r;
    }
    Store s(path, without_starter());
    EXPECT_EQ(s.database().scalar_int("PRAGMA user_version"), 2);
    EXPECT_EQ(s.database().scalar_int("SELECT count(*) FROM sqlite_master WHERE name = 'study'"),
              1);
    const auto found = s.find_inductors("old:X");
    ASSERT_EQ(found.size(), 1u);
    EXPECT_DOUBLE_EQ(found[0].inductance, 1e-5);
    EXPECT_TRUE(s.sources().at(0).name == "old"); // an existing catalog is never re-filled
}

TEST(Store, CheckConstraintsRejectImpossibleRows) {
    Store s(":memory:", without_starter());
    ASSERT_NO_THROW(s.import(request(PartKind::inductor, "s", three_inductors)));
    auto& db = s.database();
    const std::string base =
        "INSERT INTO inductor (source_id, \"id\", family, inductance, tolerance, "
        "dcr_typ, dcr_max, dcr_temperature, isat, sat_drop, irms, irms_rise, "
        "shape, core_k, core_alpha, core_beta, b_sat, core_volume, ac_factor, "
        "t_max, mounting, length, width, height) VALUES (1, ";
    const std::string good =
        "'Z', 'x', 1e-5, 0.2, 0.05, 0.05, 293, 2, 0.3, 1.6, 40, 'hard', 1, 1.5, "
        "2.5, 0.3, 0, 1.2, 398, 'smd', 0, 0, 0)";
    ASSERT_NO_THROW(db.exec(base + good));
    db.exec("DELETE FROM inductor WHERE \"id\" = 'Z'");
    const std::vector<std::string> bad{
        "'Z', 'x', -1e-5, 0.2, 0.05, 0.05, 293, 2, 0.3, 1.6, 40, 'hard', 1, 1.5, 2.5, 0.3, 0, 1.2, "
        "398, 'smd', 0, 0, 0)",
        "'Z', 'x', 1e-5, 0.2, 0, 0.05, 293, 2, 0.3, 1.6, 40, 'hard', 1, 1.5, 2.5, 0.3, 0, 1.2, "
        "398, 'smd', 0, 0, 0)",
        "'Z', 'x', 1e-5, 0.2, 0.05, 0.04, 293, 2, 0.3, 1.6, 40, 'hard', 1, 1.5, 2.5, 0.3, 0, 1.2, "
        "398, 'smd', 0, 0, 0)",
        "'Z', 'x', 1e-5, 0.2, 0.05, 0.05, 293, 0, 0.3, 1.6, 40, 'hard', 1, 1.5, 2.5, 0.3, 0, 1.2, "
        "398, 'smd', 0, 0, 0)",
        "'Z', 'x', 1e-5, 1.5, 0.05, 0.05, 293, 2, 0.3, 1.6, 40, 'hard', 1, 1.5, 2.5, 0.3, 0, 1.2, "
        "398, 'smd', 0, 0, 0)",
        "'Z', 'x', 1e-5, 0.2, 0.05, 0.05, 293, 2, 0.3, 1.6, 40, 'hard', 1, 1.5, 2.5, 0.3, 0, 1.2, "
        "398, 'smd', -1, 0, 0)",
        "'Z', 'x', 1e-5, 0.2, 0.05, 0.05, 293, 2, 0.3, 1.6, 40, 'squishy', 1, 1.5, 2.5, 0.3, 0, "
        "1.2, 398, 'smd', 0, 0, 0)",
        "'A', 'x', 1e-5, 0.2, 0.05, 0.05, 293, 2, 0.3, 1.6, 40, 'hard', 1, 1.5, 2.5, 0.3, 0, 1.2, "
        "398, 'smd', 0, 0, 0)",
    };
    for (const auto& values : bad) {
        try {
            db.exec(base + values);
            ADD_FAILURE() << "accepted: " << values;
        } catch (const sqlite::SqliteError& e) {
            EXPECT_TRUE(e.constraint()) << e.what();
        }
    }
    // Diodes: vrrm > 0 and if_avg > 0, and a forward characteristic.
    EXPECT_THROW(
        db.exec("INSERT INTO diode (source_id, \"id\", technology, vrrm, if_avg, vf1, if1, "
                "rth_ja, tj_max, length, width, height) VALUES (1, 'D', 'schottky', 0, 1, "
                "0.5, 1, 100, 400, 0, 0, 0)"),
        sqlite::SqliteError);
    EXPECT_THROW(
        db.exec("INSERT INTO diode (source_id, \"id\", technology, vrrm, if_avg, "
                "rth_ja, tj_max, length, width, height) VALUES (1, 'D', 'schottky', 40, 1, "
                "100, 400, 0, 0, 0)"),
        sqlite::SqliteError);
    // A part must belong to an existing source.
    EXPECT_THROW(
        db.exec("INSERT INTO inductor (source_id, \"id\", family, inductance, tolerance, "
                "dcr_typ, dcr_max, dcr_temperature, isat, sat_drop, irms, irms_rise, shape, "
                "core_k, core_alpha, core_beta, b_sat, core_volume, ac_factor, t_max, "
                "mounting, length, width, height) VALUES (99, " +
                good),
        sqlite::SqliteError);
}

TEST(Store, FailedImportLeavesTheDatabaseUnchanged) {
    TempDir dir;
    Store s(dir / "c.db", without_starter());
    s.import(request(PartKind::inductor, "mine", three_inductors));
    s.import(request(PartKind::inductor, "other", "id,inductance,dcr_typ,isat\nO,1u,5m,9\n"));
    const std::string before = dump(s.database());
    for (ImportMode mode : {ImportMode::replace, ImportMode::append}) {
        for (const char* source : {"mine", "new-one"}) {
            auto req = request(PartKind::inductor, source,
                               "id,inductance,dcr_typ,isat\nP,1u,5m,9\nQ,2u,6m,8\nR,3u,7m,7\n");
            req.mode = mode;
            req.after_insert = [](std::size_t n) {
                if (n == 2) throw std::runtime_error("injected fault after 2 inserts");
            };
            EXPECT_THROW(s.import(req), std::runtime_error);
            EXPECT_EQ(dump(s.database()), before) << source;
        }
    }
    // A file with one bad row (all-or-nothing): nothing written.
    EXPECT_THROW(s.import(request(PartKind::inductor, "mine",
                                  "id,inductance,dcr_typ,isat\nP,1u,5m,9\nQ,-2u,6m,8\n")),
                 ImportFailed);
    EXPECT_EQ(dump(s.database()), before);
    // The connection is still usable after the rollback.
    EXPECT_NO_THROW(
        s.import(request(PartKind::inductor, "mine", "id,inductance,dcr_typ,isat\nP,1u,5m,9\n")));
    EXPECT_NE(dump(s.database()), before);
}

TEST(Store, ImportFailedNamesFileLineColumn) {
    Store s(":memory:", without_starter());
    try {
        s.import(request(PartKind::inductor, "x",
                         "id,inductance,dcr_typ,isat\nA,1u,5m,9\nB,1u,5m,abc\n"));
        FAIL();
    } catch (const ImportFailed& e) {
        ASSERT_EQ(e.problems().size(), 1u);
        EXPECT_EQ(e.problems()[0].file, "test.csv");
        EXPECT_EQ(e.problems()[0].line, 3);
        EXPECT_EQ(e.problems()[0].column, "isat");
    }
}

TEST(Store, ConcurrentImportsFromTwoConnections) {
    TempDir dir;
    const fs::path path = dir / "c.db";
    { Store init(path, without_starter()); }
    std::atomic<int> ok{0}, busy{0}, other{0};
    auto worker = [&](std::string source) {
        try {
            Store s(path, without_starter());
            std::string text = "id,inductance,dcr_typ,isat\n";
            for (int i = 0; i < 2000; ++i) text += source + std::to_string(i) + ",10u,50m,2\n";
            for (int round = 0; round < 5; ++round)
                s.import(request(PartKind::inductor, source, text));
            ++ok;
        } catch (const sqlite::SqliteError& e) {
            if (e.busy()) ++busy;
            else ++other;
        } catch (...) {
            ++other;
        }
    };
    std::thread a(worker, "a"), b(worker, "b");
    a.join();
    b.join();
    EXPECT_EQ(other.load(), 0);
    EXPECT_EQ(ok.load() + busy.load(), 2);
    Store s(path, without_starter());
    sqlite::Statement check(s.database(), "PRAGMA integrity_check");
    ASSERT_TRUE(check.step());
    EXPECT_EQ(check.column_text(0), "ok");
    for (const auto& src : s.sources()) EXPECT_EQ(src.parts, 2000) << src.name;
}

TEST(Store, StringsThatLookLikeSqlAreStoredVerbatim) {
    Store s(":memory:", without_starter());
    const std::string evil_id = "x'); DROP TABLE inductor; --";
    const std::string evil_notes = "\"; DELETE FROM source; SELECT '";
    s.import(request(PartKind::inductor, "src'--",
                     "id,inductance,dcr_typ,isat,notes\n\"" +
                         std::string("x'); DROP TABLE inductor; --") +
                         "\",10u,50m,2,\"\"\"; DELETE FROM source; SELECT '\"\n"));
    const auto found = s.find_inductors(evil_id);
    ASSERT_EQ(found.size(), 1u);
    EXPECT_EQ(found[0].notes, evil_notes);
    EXPECT_EQ(found[0].source, "src'--");
    EXPECT_EQ(s.query(InductorQuery{.source = "src'--"}).size(), 1u);
}

TEST(Store, RefusesForeignDatabase) {
    TempDir dir;
    {
        sqlite::Database db(dir / "foreign.db");
        db.exec("PRAGMA application_id = 1234; CREATE TABLE t(x)");
    }
    try {
        Store s(dir / "foreign.db", without_starter());
        FAIL();
    } catch (const CatalogError& e) {
        EXPECT_NE(std::string(e.what()).find("not a coilsieve catalog"), std::string::npos)
            << e.what();
    }
    {
        sqlite::Database db(dir / "plain.db"); // no application_id, but someone's tables
        db.exec("CREATE TABLE t(x)");
    }
    EXPECT_THROW(Store(dir / "plain.db", without_starter()), CatalogError);
    std::ofstream(dir / "text.db") << "this is not a database, just some text that is long enough "
                                      "to fill the header of an SQLite file for sure............";
    EXPECT_THROW(Store(dir / "text.db", without_starter()), CatalogError);
}

TEST(Store, RefusesNewerSchema) {
    TempDir dir;
    {
        Store s(dir / "c.db", without_starter());
        s.database().exec("PRAGMA user_version = 99");
    }
    try {
        Store s(dir / "c.db", without_starter());
        FAIL();
    } catch (const CatalogError& e) {
        EXPECT_NE(std::string(e.what()).find("version 99"), std::string::npos) << e.what();
    }
}

TEST(Store, QueriesFilterSortAndLimit) {
    Store s(":memory:", without_starter());
    s.import(request(PartKind::inductor, "s", three_inductors));
    EXPECT_EQ(ids(s.query(InductorQuery{})), (std::vector<std::string>{"A", "B", "C"}));
    EXPECT_EQ(ids(s.query(InductorQuery{.inductance = {12e-6, 30e-6}})),
              (std::vector<std::string>{"B", "C"}));
    EXPECT_EQ(ids(s.query(InductorQuery{.isat_min = 2.0})), (std::vector<std::string>{"A", "B"}));
    EXPECT_EQ(ids(s.query(InductorQuery{.height_max = 3e-3})),
              (std::vector<std::string>{"A", "B"}));
    EXPECT_EQ(ids(s.query(InductorQuery{.family = "metal composite"})),
              (std::vector<std::string>{"B"}));
    EXPECT_EQ(ids(s.query(InductorQuery{.sort = "isat", .descending = true, .limit = 2})),
              (std::vector<std::string>{"B", "A"}));
    EXPECT_THROW(s.query(InductorQuery{.sort = "inductance; DROP TABLE x"}), CatalogError);
    EXPECT_THROW(s.query(InductorQuery{.family = "air"}), CatalogError);
}

TEST(Store, DiodeQueries) {
    Store s(":memory:", without_starter());
    s.import(request(PartKind::diode, "d",
                     "id,technology,vrrm,if_avg,vf1,if1,rth_ja,length,width,height,package\n"
                     "S40,schottky,40,2,0.5,2,100,4mm,2.6mm,2mm,P1\n"
                     "S100,schottky,100,3,0.7,3,90,4mm,2.6mm,2mm,P2\n"
                     "U600,ultrafast,600,1,1.2,1,80,5mm,3mm,2.5mm,P2\n"));
    auto q = s.query(DiodeQuery{.vrrm_min = 60.0});
    ASSERT_EQ(q.size(), 2u);
    EXPECT_EQ(q[0].id, "S100");
    EXPECT_EQ(s.query(DiodeQuery{.if_avg_min = 2.5}).size(), 1u);
    EXPECT_EQ(s.query(DiodeQuery{.technology = "schottky"}).size(), 2u);
    EXPECT_EQ(s.query(DiodeQuery{.package = "p2"}).size(), 2u);
}

TEST(Store, IdsMayRepeatAcrossSources) {
    Store s(":memory:", without_starter());
    s.import(request(PartKind::inductor, "one", three_inductors));
    s.import(request(PartKind::inductor, "two", "id,inductance,dcr_typ,isat\nA,47u,300m,1\n"));
    EXPECT_EQ(s.find_inductors("A").size(), 2u);
    const auto two = s.find_inductors("two:A");
    ASSERT_EQ(two.size(), 1u);
    EXPECT_DOUBLE_EQ(two[0].inductance, 47e-6);
    EXPECT_TRUE(s.find_inductors("three:A").empty());
}

TEST(Store, DeleteSourceTouchesNoOtherSource) {
    Store s(":memory:", without_starter());
    s.import(request(PartKind::inductor, "one", three_inductors));
    s.import(request(PartKind::inductor, "two", three_inductors));
    const std::string fp_two = s.fingerprint({"two"});
    EXPECT_EQ(s.delete_source("one"), 3);
    EXPECT_EQ(s.all_inductors().size(), 3u);
    EXPECT_EQ(s.fingerprint({"two"}), fp_two);
    EXPECT_EQ(s.database().scalar_int("SELECT count(*) FROM inductor"), 3);
    EXPECT_THROW(s.delete_source("one"), CatalogError);
}

TEST(Store, DryRunCountsAndWritesNothing) {
    Store s(":memory:", without_starter());
    s.import(request(PartKind::inductor, "s", three_inductors));
    const std::string before = dump(s.database());
    auto req = request(PartKind::inductor, "s",
                       "id,family,inductance,dcr_typ,isat,height (mm)\n"
                       "A,shielded-drum-ferrite,10u,50m,2.5,3\n" // unchanged
                       "B,metal-composite,15u,80m,3.5,2\n"       // replaced (isat)
                       "D,metal-composite,33u,200m,1,2\n");      // added; C removed
    req.dry_run = true;
    const auto sum = s.import(req);
    EXPECT_FALSE(sum.written);
    EXPECT_EQ(sum.added, 1);
    EXPECT_EQ(sum.replaced, 1);
    EXPECT_EQ(sum.unchanged, 1);
    EXPECT_EQ(sum.removed, 1);
    EXPECT_EQ(dump(s.database()), before);
}

TEST(Store, SkipBadWritesTheGoodRows) {
    Store s(":memory:", without_starter());
    auto req = request(PartKind::inductor, "s",
                       "id,inductance,dcr_typ,isat\nA,1u,5m,9\nB,-1u,5m,9\nC,2u,6m,8\n");
    req.skip_bad = true;
    const auto sum = s.import(req);
    EXPECT_EQ(sum.accepted, 2);
    EXPECT_EQ(sum.rejected, 1);
    EXPECT_EQ(sum.rejected_lines, std::vector<int>{3});
    EXPECT_EQ(ids(s.all_inductors()), (std::vector<std::string>{"A", "C"}));
    // A file with no valid row never empties a source.
    auto none = request(PartKind::inductor, "s", "id,inductance,dcr_typ,isat\nB,-1u,5m,9\n");
    none.skip_bad = true;
    EXPECT_THROW(s.import(none), ImportFailed);
    EXPECT_EQ(s.all_inductors().size(), 2u);
}

TEST(Store, AppendAddsAndRefusesExistingIds) {
    Store s(":memory:", without_starter());
    s.import(request(PartKind::inductor, "s", three_inductors));
    auto more = request(PartKind::inductor, "s", "id,inductance,dcr_typ,isat\nD,1u,5m,9\n");
    more.mode = ImportMode::append;
    EXPECT_EQ(s.import(more).added, 1);
    EXPECT_EQ(s.all_inductors().size(), 4u);
    auto clash =
        request(PartKind::inductor, "s", "id,inductance,dcr_typ,isat\nE,1u,5m,9\nA,1u,5m,9\n");
    clash.mode = ImportMode::append;
    try {
        s.import(clash);
        FAIL();
    } catch (const ImportFailed& e) {
        EXPECT_EQ(e.problems().at(0).line, 3);
        EXPECT_NE(e.problems().at(0).reason.find("\"A\""), std::string::npos);
    }
    EXPECT_EQ(s.all_inductors().size(), 4u);
}

TEST(Store, SourceRecordsFileDigestAndCounts) {
    Store s(":memory:", without_starter());
    s.import(request(PartKind::inductor, "s", three_inductors));
    const auto src = s.sources().at(0);
    EXPECT_EQ(src.kind, "import");
    EXPECT_EQ(src.part_kind, PartKind::inductor);
    EXPECT_EQ(src.parts, 3);
    EXPECT_EQ(src.file_name, "test.csv");
    EXPECT_EQ(src.sha256.size(), 64u);
    EXPECT_EQ(src.created.size(), 20u); // 2024-05-01T12:00:00Z
    EXPECT_EQ(src.created.back(), 'Z');
    EXPECT_THROW(s.import(request(PartKind::inductor, "a:b", three_inductors)), CatalogError);
}

TEST(Store, FingerprintIsStableAndSensitive) {
    TempDir dir;
    std::string fp1;
    {
        Store s(dir / "c.db", without_starter());
        s.import(request(PartKind::inductor, "s", three_inductors));
        fp1 = s.fingerprint();
        EXPECT_EQ(fp1.size(), 64u);
    }
    Store s(dir / "c.db", without_starter());
    EXPECT_EQ(s.fingerprint(), fp1);
    s.import(request(PartKind::inductor, "t", "id,inductance,dcr_typ,isat\nZ,1u,5m,9\n"));
    EXPECT_NE(s.fingerprint(), fp1);
    EXPECT_EQ(s.fingerprint({"s"}), fp1);
}

TEST(Store, ExportImportRoundTripIsUnchanged) {
    Store s(":memory:", without_starter());
    s.import(request(PartKind::inductor, "s", three_inductors));
    for (const std::string& text :
         {export_csv(s.all_inductors()), export_json(s.all_inductors())}) {
        auto req = request(PartKind::inductor, "s", text);
        if (text.front() == '[') req.file_name = "x.json";
        req.dry_run = true;
        const auto sum = s.import(req);
        EXPECT_EQ(sum.unchanged, 3) << text;
        EXPECT_EQ(sum.added + sum.replaced + sum.removed, 0) << text;
    }
}

TEST(Store, NewDatabaseIsFilledFromTheStarterCatalog) {
    Store s(":memory:");
    const bool have_starter = !starter_inductors_csv().empty();
    int starter_sources = 0;
    for (const auto& src : s.sources()) {
        if (src.kind == "starter") {
            ++starter_sources;
            EXPECT_GT(src.parts, 0);
        }
    }
    EXPECT_EQ(starter_sources > 0, have_starter);
}

TEST(Store, DefaultPathFollowsEnvironment) {
    const char* old_db = std::getenv("COILSIEVE_DB");
    const char* old_xdg = std::getenv("XDG_DATA_HOME");
    const std::string keep_db = old_db ? old_db : "", keep_xdg = old_xdg ? old_xdg : "";
    ::unsetenv("COILSIEVE_DB");
    ::setenv("XDG_DATA_HOME", "/tmp/xdg-test", 1);
    EXPECT_EQ(Store::default_path(), fs::path("/tmp/xdg-test/coilsieve/catalog.db"));
    ::setenv("COILSIEVE_DB", "/tmp/elsewhere.db", 1);
    EXPECT_EQ(Store::default_path(), fs::path("/tmp/elsewhere.db"));
    if (old_db) ::setenv("COILSIEVE_DB", keep_db.c_str(), 1);
    else ::unsetenv("COILSIEVE_DB");
    if (old_xdg) ::setenv("XDG_DATA_HOME", keep_xdg.c_str(), 1);
    else ::unsetenv("XDG_DATA_HOME");
}
