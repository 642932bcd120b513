#pragma once
// `coilsieve study list | show NAME | rerun NAME [rank options] | diff A B | delete NAME`.

#include "cli/context.hpp"
#include "cli/rank.hpp"

#include <string>
#include <vector>

namespace coilsieve::cli {

struct StudyOptions {
    std::string name;    // show, rerun, delete
    std::string other;   // diff: second study
    bool json = false;   // list, show, diff
    RankCliOptions rank; // rerun
};

int run_study_list(const StudyOptions& o, Context& ctx);
int run_study_show(const StudyOptions& o, Context& ctx);
int run_study_rerun(const StudyOptions& o, Context& ctx);
int run_study_diff(const StudyOptions& o, Context& ctx);
int run_study_delete(const StudyOptions& o, Context& ctx);

std::vector<Command> setup_study(CLI::App& root);

} // namespace coilsieve::cli
