// The commands of the thermargin program; each returns its exit status.
#pragma once

namespace thermargin::cli {

int run_check(int argc, char** argv);
int run_budget(int argc, char** argv);
int run_fit(int argc, char** argv);
int run_table(int argc, char** argv);
int run_pick(int argc, char** argv);
int run_grades(int argc, char** argv);
int run_response(int argc, char** argv);

}  // namespace thermargin::cli
