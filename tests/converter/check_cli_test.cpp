// `coilsieve check` end to end: the real binary, a temporary catalog (filled from the starter
// set) and the reading-lamp example design.

#include "corner_keys.hpp"

#include <array>
#include <cstdio>
#include <filesystem>
#include <gtest/gtest.h>
#include <nlohmann/json.hpp>
#include <string>
#include <sys/wait.h>
#include <unistd.h>

namespace {

struct CommandRun {
    int code = -1;
    std::string out;
};

CommandRun run(const std::string& args) {
    CommandRun r;
    const std::string cmd = std::string(COILSIEVE_EXE) + " " + args + " 2>/dev/null";
    FILE* p = popen(cmd.c_str(), "r");
    if (p == nullptr) return r;
    std::array<char, 4096> buf{};
    std::size_t n = 0;
    while ((n = std::fread(buf.data(), 1, buf.size(), p)) > 0) r.out.append(buf.data(), n);
    const int status = pclose(p);
    r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    return r;
}

class CheckCommand : public ::testing::Test {
protected:
    void SetUp() override {
        dir_ = std::filesystem::temp_directory_path() /
               ("coilsieve-check-test-" + std::to_string(::getpid()));
        std::filesystem::create_directories(dir_);
        db_ = (dir_ / "catalog.db").string();
        design_ = std::string(COILSIEVE_SOURCE_DIR) + "/data/examples/reading-lamp.json";
    }
    void TearDown() override { std::filesystem::remove_all(dir_); }
    std::string base() const {
        return "--db " + db_ + " check " + design_ +
               " --inductor GEN-L-SDF-5x5x4-47u --diode GEN-D-SCH-40V-2A-SMA";
    }
    std::filesystem::path dir_;
    std::string db_, design_;
};

TEST_F(CheckCommand, JsonHasTheDocumentedKeys) {
    const CommandRun r = run(base() + " --json");
    ASSERT_TRUE(r.code == 0 || r.code == 1) << r.out;
    const auto j = nlohmann::json::parse(r.out);
    for (const char* k :
         {"design", "inductor", "diode", "setting", "corners", "feasible", "violations"})
        EXPECT_TRUE(j.contains(k)) << k;
    EXPECT_EQ(j["design"], "reading lamp");
    ASSERT_TRUE(j["corners"].is_array());
    ASSERT_FALSE(j["corners"].empty());
    for (const auto& c : j["corners"]) {
        for (const char* k : test_support::documented_corner_keys) EXPECT_TRUE(c.contains(k)) << k;
        EXPECT_TRUE(c["losses"].contains("total"));
    }
    for (const auto& v : j["violations"])
        for (const char* k : {"limit", "corner", "value", "bound", "message"})
            EXPECT_TRUE(v.contains(k)) << k;
    // The exit code follows the verdict.
    EXPECT_EQ(r.code, j["feasible"].get<bool>() ? 0 : 1);
}

TEST_F(CheckCommand, TextHasTablesVerdictAndCaution) {
    const CommandRun r = run(base() + " --band 15%");
    ASSERT_TRUE(r.code == 0 || r.code == 1) << r.out;
    EXPECT_NE(r.out.find("Operating points"), std::string::npos);
    EXPECT_NE(r.out.find("vin-max hot L-20%"), std::string::npos);
    EXPECT_NE(r.out.find("Core loss is estimated"), std::string::npos);
    EXPECT_NE(r.out.find("Verdict: "), std::string::npos);
    EXPECT_NE(r.out.find("confirm them on the bench"), std::string::npos);
}

TEST_F(CheckCommand, UnknownPartAndWrongSettingAreErrors) {
    EXPECT_NE(run("--db " + db_ + " check " + design_ +
                  " --inductor NO-SUCH-PART --diode GEN-D-SCH-40V-2A-SMA")
                  .code,
              0);
    // A frequency on a hysteretic design is a usage error (exit 2).
    EXPECT_EQ(run(base() + " --frequency 300kHz").code, 2);
}

} // namespace
