// Determinism of the commands that draw random numbers (docs/engines.md: Monte
// Carlo results depend only on the seed and the units, never on the thread
// count): the same inputs give byte-identical output run after run and for
// 1, 2 and 8 worker threads, in every format. budget is covered by
// budget_cli_test.cpp; here are pick (its Monte Carlo objective and
// --verify) and grades (its screened Monte Carlo per combination). A
// different seed must change the draws, so the comparison can fail.
#include <unistd.h>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <string>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "cli_run.hpp"

namespace thermargin {
namespace {

namespace fs = std::filesystem;

using Outcome = testing::CliOutcome;
using testing::run_cli;

// Runs `args` with 1, 2 and 8 threads and once more with 2; all four outputs
// must be the same bytes. Returns the output.
std::string same_for_every_thread_count(const std::string& args) {
  const Outcome one = run_cli(args + " --montecarlo.threads=1");
  EXPECT_EQ(one.status, 0) << args;
  EXPECT_FALSE(one.out.empty()) << args;
  for (const char* threads : {"2", "8", "2"}) {
    const Outcome other = run_cli(args + " --montecarlo.threads=" + threads);
    EXPECT_EQ(other.status, 0) << args;
    EXPECT_TRUE(other.out == one.out) << args << " differs with " << threads << " threads";
  }
  return one.out;
}

const std::string pick_verify = "pick --values=3k3,4k7,10k,22k --verify=3 --mc-units=3000 --no-guidance";
const std::string pick_mc = "pick --values=4k7,10k,22k --objective=monte-carlo --mc-units=1500 --no-guidance";

// The text and CSV printers are compared once, 1 thread against 8.
void same_text_and_csv(const std::string& args) {
  for (const char* format : {"csv", "text"}) {
    const Outcome one = run_cli(args + " --format " + format + " --montecarlo.threads=1");
    const Outcome eight = run_cli(args + " --format " + format + " --montecarlo.threads=8");
    EXPECT_EQ(one.status, 0) << format;
    EXPECT_FALSE(one.out.empty()) << format;
    EXPECT_TRUE(one.out == eight.out) << args << " --format " << format << " differs with 8 threads";
  }
}

TEST(Determinism, PickVerifyIsByteIdenticalAcrossRunsAndThreadCounts) {
  same_for_every_thread_count(pick_verify + " --format json");
  same_text_and_csv(pick_verify);
}

TEST(Determinism, PickMonteCarloObjectiveIsByteIdenticalAcrossThreadCounts) {
  same_for_every_thread_count(pick_mc + " --format json");
}

TEST(Determinism, PickVerifyDrawsOtherUnitsWithAnotherSeed) {
  const auto a = nlohmann::json::parse(run_cli(pick_verify + " --format json --montecarlo.seed=1").out);
  const auto b = nlohmann::json::parse(run_cli(pick_verify + " --format json --montecarlo.seed=2").out);
  ASSERT_TRUE(a["rows"][0].contains("verify"));
  int differing = 0;
  for (std::size_t i = 0; i < a["rows"].size(); ++i)
    if (a["rows"][i].contains("verify")) differing += a["rows"][i]["verify"] != b["rows"][i]["verify"];
  EXPECT_GT(differing, 0);
  // The deterministic ranking does not depend on the seed.
  EXPECT_EQ(a["rows"][0]["wc_max_abs"], b["rows"][0]["wc_max_abs"]);
}

class GradesDeterminism : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = fs::temp_directory_path() / ("thermargin_determinism_" + std::to_string(::getpid()));
    fs::create_directories(dir_);
    // Two slots of two grades: four combinations, each simulated with the same units.
    std::ofstream(dir_ / "parts.csv") << "slot,grade,unit_cost,settings\n"
                                         "thermistor,1%,0.12,sensor.r25_tol=1%;sensor.beta_tol=1%\n"
                                         "thermistor,3%,0.05,sensor.r25_tol=3%;sensor.beta_tol=2%\n"
                                         "resistor,1%,0.002,divider.r_fixed_tol=1%\n"
                                         "resistor,0.1%,0.03,divider.r_fixed_tol=0.1%;divider.r_fixed_tempco=25ppm\n";
    args_ = "grades --catalogue '" + (dir_ / "parts.csv").string() + "' --units=3000 --mc-all --conditions.t_step=2";
  }
  void TearDown() override { fs::remove_all(dir_); }
  fs::path dir_;
  std::string args_;
};

TEST_F(GradesDeterminism, GradesIsByteIdenticalAcrossRunsAndThreadCounts) {
  same_for_every_thread_count(args_ + " --format json");
  same_text_and_csv(args_);
}

TEST_F(GradesDeterminism, GradesDrawsOtherUnitsWithAnotherSeed) {
  const auto a = nlohmann::json::parse(run_cli(args_ + " --format json --montecarlo.seed=1").out);
  const auto b = nlohmann::json::parse(run_cli(args_ + " --format json --montecarlo.seed=2").out);
  ASSERT_EQ(a["rows"].size(), 4u);
  int differing = 0;
  for (std::size_t i = 0; i < a["rows"].size(); ++i) differing += a["rows"][i]["mc_max_abs"] != b["rows"][i]["mc_max_abs"];
  EXPECT_GT(differing, 0);
}

}  // namespace
}  // namespace thermargin
