// Tests of thermargin/core/progress.hpp: the one form every long run shows
// on a terminal (what, share done, time left, the best so far), the time
// left as the elapsed time scaled by what remains (common practice for a
// run of even pace), nothing at all when disabled.
#include "thermargin/core/progress.hpp"

#include <cstdio>
#include <string>

#include <gtest/gtest.h>

#include "cli_run.hpp"

namespace thermargin {
namespace {

TEST(ProgressLine, SaysWhatTheShareDoneAndTheTimeLeft) {
  // 25 % in 10 s: the remaining 75 % at the same pace take 30 s.
  EXPECT_EQ(ProgressLine::format("grades", 0.25, 10.0, ""), "grades:  25 % done, about 30 s left");
  // 10 % in 20 s: 180 s left, said in minutes.
  EXPECT_EQ(ProgressLine::format("Monte Carlo", 0.10, 20.0, ""), "Monte Carlo:  10 % done, about 3 min left");
}

TEST(ProgressLine, GivesNoEstimateTooEarlyOrWhenDone) {
  EXPECT_EQ(ProgressLine::format("pick", 0.01, 5.0, ""), "pick:   1 % done");
  EXPECT_EQ(ProgressLine::format("pick", 0.50, 0.2, ""), "pick:  50 % done");
  EXPECT_EQ(ProgressLine::format("pick", 1.0, 9.0, ""), "pick: 100 % done");
}

TEST(ProgressLine, CarriesTheBestSoFarAndFitsItsWidth) {
  const std::string note = "best so far: sensor 1 %, resistor 0.1 %, 0.42 K at 1.93 per unit";
  EXPECT_EQ(ProgressLine::format("grades", 0.5, 4.0, note), "grades:  50 % done, about 4 s left; " + note);
  const std::string line = ProgressLine::format("grades", 0.5, 4.0, std::string(200, 'x'), 100);
  EXPECT_EQ(line.size(), 100u);
  EXPECT_EQ(line.substr(97), "...");
}

TEST(ProgressLine, WritesNothingWhenDisabledAndClearsItsLineWhenDone) {
  char buffer[512] = {};
  std::FILE* out = fmemopen(buffer, sizeof buffer, "w");
  ASSERT_NE(out, nullptr);
  {
    ProgressLine off("grades", false, out);
    EXPECT_FALSE(off.callback());
    off.update(0.5);
  }
  std::fflush(out);
  EXPECT_EQ(std::string(buffer), "");
  {
    ProgressLine on("grades", true, out);
    ASSERT_TRUE(on.callback());
    on.update(1.0, "done");
  }
  std::fclose(out);
  const std::string written(buffer);
  EXPECT_NE(written.find("\rgrades: 100 % done; done"), std::string::npos) << written;
  EXPECT_EQ(written.back(), '\r') << "the line is cleared at the end";
}

// The commands: `grades` with its standard error on a pseudo-terminal
// (tests/reference/stderr_on_a_terminal.py, Python's pty) shows the line
// with the share done and the best combination so far; on a pipe, or with
// --quiet, standard error stays empty.
const std::string grades_run = "grades " + testing::shell_quote(testing::scenario_path("fermentation_probe.ini")) +
                               " --catalogue " +
                               testing::shell_quote(testing::scenario_path("fermentation_probe_catalogue.csv")) +
                               " --units 100 --volume 5000 --conditions.t_step=10";

TEST(ProgressOfACommand, GradesShowsItsProgressOnATerminal) {
  const testing::CliOutcome r =
      testing::run_shell(testing::reference_command("stderr_on_a_terminal.py", testing::cli_command(grades_run)));
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("grades: "), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("% done"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("grades: 100 % done; best so far: "), std::string::npos) << r.out;
}

TEST(ProgressOfACommand, IsSilentOnAPipeAndWithQuiet) {
  const testing::CliOutcome piped = testing::run_cli(grades_run);
  ASSERT_EQ(piped.status, 0) << piped.err;
  EXPECT_EQ(piped.err, "");
  const testing::CliOutcome quiet =
      testing::run_shell(testing::reference_command("stderr_on_a_terminal.py", testing::cli_command(grades_run + " --quiet")));
  ASSERT_EQ(quiet.status, 0) << quiet.err;
  EXPECT_EQ(quiet.out.find("% done"), std::string::npos) << quiet.out;
}

}  // namespace
}  // namespace thermargin
