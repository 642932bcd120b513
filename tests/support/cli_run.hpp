#pragma once
// Runs the built coilsieve binary (COILSIEVE_EXE) against a catalog in a temporary directory.
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <gtest/gtest.h>
#include <set>
#include <sstream>
#include <string>
#include <sys/wait.h>
#include <unistd.h>
#include <vector>

namespace coilsieve::testing_support {

namespace fs = std::filesystem;

// The header and the rows with these ids from a starter-catalog CSV (data/starter/FILE).
inline std::string starter_rows(const std::string& file, const std::set<std::string>& ids) {
    std::ifstream in(std::string(COILSIEVE_SOURCE_DIR) + "/data/starter/" + file);
    std::string line, out;
    std::getline(in, line);
    out = line + "\n";
    while (std::getline(in, line))
        if (ids.count(line.substr(0, line.find(','))) != 0) out += line + "\n";
    return out;
}

struct Outcome {
    int code = -1;
    std::string out;
    std::string err;
};

class CliTest : public ::testing::Test {
protected:
    void SetUp() override {
        dir_ = fs::temp_directory_path() /
               ("coilsieve-cli-" + std::to_string(::getpid()) + "-" +
                ::testing::UnitTest::GetInstance()->current_test_info()->name());
        fs::remove_all(dir_);
        fs::create_directories(dir_);
    }
    void TearDown() override {
        std::error_code ec;
        fs::remove_all(dir_, ec);
    }

    // Runs `coilsieve ARGS` with the catalog in the temp dir (unless args name their own --db).
    Outcome run(const std::string& args, bool with_db = true) {
        const std::string out = (dir_ / "stdout").string(), err = (dir_ / "stderr").string();
        std::string cmd = std::string("'") + COILSIEVE_EXE + "' ";
        if (with_db) cmd += "--db '" + db().string() + "' ";
        cmd += args + " >'" + out + "' 2>'" + err + "'";
        const int status = std::system(cmd.c_str());
        Outcome r;
        r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
        r.out = slurp(out);
        r.err = slurp(err);
        return r;
    }

    fs::path db() const { return dir_ / "catalog.db"; }
    fs::path file(const std::string& name, const std::string& text) const {
        std::ofstream(dir_ / name, std::ios::binary) << text;
        return dir_ / name;
    }
    static std::string fixture(const std::string& name) {
        return std::string(COILSIEVE_SOURCE_DIR) + "/tests/catalog/data/" + name;
    }
    static std::string slurp(const fs::path& p) {
        std::ifstream in(p, std::ios::binary);
        std::ostringstream ss;
        ss << in.rdbuf();
        return ss.str();
    }

    fs::path dir_;
};

inline std::vector<std::string> lines(const std::string& text) {
    std::vector<std::string> out;
    std::istringstream in(text);
    for (std::string l; std::getline(in, l);) out.push_back(l);
    return out;
}

} // namespace coilsieve::testing_support
