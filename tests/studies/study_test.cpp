// Saved studies through the command functions: save, list, rerun with a lock, diff, a catalog
// import that adds a better part, an unchanged rerun, delete; and bad input.
#include "catalog/store.hpp"
#include "cli/rank.hpp"
#include "cli/study.hpp"
#include "design/design_json.hpp"
#include "fixtures.hpp"
#include "studies/study_store.hpp"

#include <filesystem>
#include <fstream>
#include <gtest/gtest.h>
#include <sstream>
#include <unistd.h>

using namespace coilsieve;
namespace fs = std::filesystem;

namespace {

class StudyFlow : public ::testing::Test {
protected:
    void SetUp() override {
        dir_ = fs::temp_directory_path() /
               ("coilsieve-study-" + std::to_string(::getpid()) + "-" +
                ::testing::UnitTest::GetInstance()->current_test_info()->name());
        fs::remove_all(dir_);
        fs::create_directories(dir_);
        db_ = (dir_ / "catalog.db").string();
        {
            catalog::Store store(db_, catalog::OpenOptions{false});
            import(store, fixtures::inductors(), fixtures::diodes());
        }
        design_ = (dir_ / "lamp.json").string();
        std::ofstream(design_) << design::to_json(fixtures::lamp()).dump(2);
    }
    void TearDown() override { fs::remove_all(dir_); }

    static void import(catalog::Store& store, const std::vector<parts::Inductor>& ls,
                       const std::vector<parts::Diode>& ds) {
        catalog::ImportRequest r;
        r.kind = catalog::PartKind::inductor;
        r.source = "hand";
        r.file_name = "hand-inductors.csv";
        r.text = catalog::export_csv(ls);
        store.import(r);
        r.kind = catalog::PartKind::diode;
        r.file_name = "hand-diodes.csv";
        r.text = catalog::export_csv(ds);
        store.import(r);
    }

    // Runs a command function, returning its exit code; output in out_.
    template <class Fn> int run(Fn&& fn) {
        out_.str("");
        err_.str("");
        cli::Context ctx(cli::GlobalOptions{db_}, out_, err_);
        return fn(ctx);
    }
    cli::RankCliOptions rank_options(std::string study) {
        cli::RankCliOptions o;
        o.design_file = design_;
        o.study = std::move(study);
        o.threads = 2;
        return o;
    }
    studies::Study get(const std::string& name) {
        catalog::Store store(db_, catalog::OpenOptions{false});
        return studies::StudyStore(store.database()).get(name);
    }

    fs::path dir_;
    std::string db_, design_;
    std::ostringstream out_, err_;
};

std::vector<std::string> keys(const nlohmann::json& list) {
    std::vector<std::string> k;
    for (const auto& p : list) k.push_back(p["key"].get<std::string>());
    return k;
}

} // namespace

TEST_F(StudyFlow, SaveListRerunDiffDelete) {
    ASSERT_EQ(run([&](auto& c) { return cli::run_rank(rank_options("s1"), c); }), 0) << out_.str();
    EXPECT_NE(out_.str().find("L-BIG"), std::string::npos) << out_.str();
    EXPECT_NE(out_.str().find("Saved as study s1"), std::string::npos);

    cli::StudyOptions list;
    ASSERT_EQ(run([&](auto& c) { return cli::run_study_list(list, c); }), 0);
    EXPECT_NE(out_.str().find("s1"), std::string::npos);

    // Rerun with a lock on the small inductor: a new study whose parent is s1.
    cli::StudyOptions rerun;
    rerun.name = "s1";
    rerun.rank = rank_options("s2");
    rerun.rank.design_file.clear();
    rerun.rank.lock_inductor = "L-SMALL";
    ASSERT_EQ(run([&](auto& c) { return cli::run_study_rerun(rerun, c); }), 0) << out_.str();
    const auto s1 = get("s1");
    const auto s2 = get("s2");
    ASSERT_TRUE(s2.parent_id.has_value());
    EXPECT_EQ(*s2.parent_id, s1.id);
    EXPECT_EQ(s2.parent_name, "s1");
    for (const auto& k : keys(s2.results["results"]))
        EXPECT_NE(k.find("L-SMALL"), std::string::npos);

    const auto d = studies::diff_studies(s1, s2);
    EXPECT_EQ(d.left_top, (std::vector<std::string>{"hand:L-BIG + hand:D-40V"}));
    EXPECT_TRUE(d.entered_top.empty());
    ASSERT_EQ(d.option_changes.size(), 1u);
    EXPECT_EQ(d.option_changes[0].path, "options.lock_inductor");
    EXPECT_TRUE(d.design_changes.empty());
    EXPECT_FALSE(d.catalog_changed);

    cli::StudyOptions diff;
    diff.name = "s1";
    diff.other = "s2";
    ASSERT_EQ(run([&](auto& c) { return cli::run_study_diff(diff, c); }), 0);
    EXPECT_NE(out_.str().find("Left the top list:\n  hand:L-BIG + hand:D-40V"), std::string::npos)
        << out_.str();

    cli::StudyOptions del;
    del.name = "s2";
    ASSERT_EQ(run([&](auto& c) { return cli::run_study_delete(del, c); }), 0);
    EXPECT_THROW(get("s2"), studies::StudyError);
    EXPECT_THROW(run([&](auto& c) { return cli::run_study_delete(del, c); }), cli::UsageError);
}

TEST_F(StudyFlow, UnchangedRerunGivesIdenticalResults) {
    ASSERT_EQ(run([&](auto& c) { return cli::run_rank(rank_options("a"), c); }), 0);
    cli::StudyOptions rerun;
    rerun.name = "a";
    rerun.rank.study = "b";
    ASSERT_EQ(run([&](auto& c) { return cli::run_study_rerun(rerun, c); }), 0);
    auto ra = get("a").results, rb = get("b").results;
    ra.erase("elapsed_s");
    rb.erase("elapsed_s");
    EXPECT_EQ(ra, rb);
    const auto d = studies::diff_studies(get("a"), get("b"));
    EXPECT_TRUE(d.entered_top.empty() && d.left_top.empty() && d.design_changes.empty() &&
                d.option_changes.empty() && !d.catalog_changed);
    for (const auto& c : d.common) EXPECT_TRUE(c.changes.empty()) << c.key;
}

TEST_F(StudyFlow, ImportedBetterPartEntersTheDiff) {
    ASSERT_EQ(run([&](auto& c) { return cli::run_rank(rank_options("before"), c); }), 0);
    {
        // L-BEST: the L-BIG winding in a smaller body with lower resistance (by construction
        // better on loss and on size than L-BIG).
        auto ls = fixtures::inductors();
        ls.push_back(fixtures::inductor("L-BEST", 100e-6, 0.05, 2.5, 2.5, 8e-3, 8e-3, 4e-3));
        catalog::Store store(db_, catalog::OpenOptions{false});
        import(store, ls, fixtures::diodes());
    }
    cli::StudyOptions rerun;
    rerun.name = "before";
    rerun.rank.study = "after";
    ASSERT_EQ(run([&](auto& c) { return cli::run_study_rerun(rerun, c); }), 0);
    const auto d = studies::diff_studies(get("before"), get("after"));
    EXPECT_TRUE(d.catalog_changed);
    EXPECT_NE(std::find(d.entered_top.begin(), d.entered_top.end(), "hand:L-BEST + hand:D-40V"),
              d.entered_top.end());
    EXPECT_NE(
        std::find(d.entered_pareto.begin(), d.entered_pareto.end(), "hand:L-BEST + hand:D-40V"),
        d.entered_pareto.end());
    EXPECT_NE(std::find(d.left_pareto.begin(), d.left_pareto.end(), "hand:L-BIG + hand:D-40V"),
              d.left_pareto.end());
}

TEST_F(StudyFlow, BadInput) {
    auto o = rank_options("");
    o.no_save = true;
    o.lock_inductor = "NO-SUCH-PART";
    try {
        run([&](auto& c) { return cli::run_rank(o, c); });
        FAIL();
    } catch (const cli::UsageError& e) {
        EXPECT_NE(std::string(e.what()).find("NO-SUCH-PART"), std::string::npos);
    }
    o = rank_options("");
    o.limits = {"height<=3A"};
    try {
        run([&](auto& c) { return cli::run_rank(o, c); });
        FAIL();
    } catch (const cli::UsageError& e) {
        EXPECT_NE(std::string(e.what()).find("length"), std::string::npos) << e.what();
    }
    o.limits = {"f_sw>=500kHz", "f_sw<=100kHz"};
    try {
        run([&](auto& c) { return cli::run_rank(o, c); });
        FAIL();
    } catch (const cli::UsageError& e) {
        const std::string m = e.what();
        EXPECT_NE(m.find("500 kHz"), std::string::npos) << m;
        EXPECT_NE(m.find("100 kHz"), std::string::npos) << m;
    }
    o.limits = {"wobble<=3"};
    try {
        run([&](auto& c) { return cli::run_rank(o, c); });
        FAIL();
    } catch (const cli::UsageError& e) {
        EXPECT_NE(std::string(e.what()).find("efficiency_min"), std::string::npos) << e.what();
    }
    // No feasible pair: exit 1 with the limit that removed everything.
    o.limits = {"efficiency>=99.9%"};
    EXPECT_EQ(run([&](auto& c) { return cli::run_rank(o, c); }), 1);
    EXPECT_NE(out_.str().find("No inductor-diode pair meets every limit"), std::string::npos);
    EXPECT_NE(out_.str().find("efficiency_min"), std::string::npos) << out_.str();
}

TEST(Limits, ShortFormsAndUnits) {
    auto d = fixtures::lamp();
    cli::apply_limit(d, "height<=3mm");
    EXPECT_DOUBLE_EQ(*d.limits.height_max, 3e-3);
    cli::apply_limit(d, "load_ripple<=10%");
    EXPECT_DOUBLE_EQ(*d.limits.load_ripple, 0.1);
    cli::apply_limit(d, "f_sw<=500kHz");
    EXPECT_DOUBLE_EQ(*d.limits.f_sw_max, 5e5);
    cli::apply_limit(d, "f_sw>=30kHz");
    EXPECT_DOUBLE_EQ(d.limits.f_sw_min, 3e4);
    cli::apply_limit(d, "efficiency>=90%");
    EXPECT_DOUBLE_EQ(*d.limits.efficiency_min, 0.9);
    cli::apply_limit(d, "tj_max<=100C");
    EXPECT_NEAR(*d.limits.tj_max, 373.15, 1e-9);
    EXPECT_THROW(cli::apply_limit(d, "efficiency<=90%"), cli::UsageError); // wrong direction
    cli::apply_weight(d, "size=2");
    EXPECT_DOUBLE_EQ(d.weights.size, 2.0);
    cli::apply_weight(d, "cost = 0.3");
    EXPECT_DOUBLE_EQ(d.weights.cost, 0.3);
    EXPECT_DOUBLE_EQ(d.weights.size, 2.0);
    EXPECT_THROW(cli::apply_weight(d, "beauty=2"), cli::UsageError);
}

TEST(Limits, ParetoListIsCheckedLikeTheDesignFile) {
    auto d = fixtures::lamp();
    cli::apply_pareto(d, "loss, size,ripple");
    ASSERT_EQ(d.pareto.size(), 3u);
    EXPECT_EQ(d.pareto[2], design::Objective::ripple);
    auto message = [&](const char* list) {
        try {
            cli::apply_pareto(d, list);
        } catch (const cli::UsageError& e) {
            return std::string(e.what());
        }
        return std::string("(no error)");
    };
    EXPECT_NE(message("loss").find("at least two"), std::string::npos) << message("loss");
    EXPECT_NE(message("loss,loss").find("listed twice"), std::string::npos);
    EXPECT_NE(message("loss,beauty").find("unknown objective \"beauty\""), std::string::npos);
    EXPECT_NE(message("loss,beauty").find("margin"), std::string::npos); // lists the known ones
    EXPECT_EQ(d.pareto.size(), 3u) << "a rejected list leaves the design as it was";
}
