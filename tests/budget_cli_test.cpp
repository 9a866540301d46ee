// `thermargin budget` as a user runs it: byte-identical output whatever the
// thread count, different seeds giving different draws, the adaptive run
// length, the verdict and --strict's exit status.
#include <string>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "cli_run.hpp"

namespace thermargin {
namespace {

using CliRun = testing::CliOutcome;

CliRun budget(const std::string& args) { return testing::run_cli("budget " + args); }

const std::string quick = " --montecarlo.units=3000 --conditions.t_step=2 --format json";

TEST(BudgetCli, OutputIsByteIdenticalForOneTwoAndEightThreads) {
  const CliRun one = budget(quick + " --montecarlo.threads=1");
  const CliRun two = budget(quick + " --montecarlo.threads=2");
  const CliRun eight = budget(quick + " --montecarlo.threads=8");
  ASSERT_EQ(one.status, 0);
  EXPECT_EQ(one.out, two.out);
  EXPECT_EQ(one.out, eight.out);
}

TEST(BudgetCli, DifferentSeedsDrawDifferentUnits) {
  const CliRun a = budget(quick + " --montecarlo.seed=1");
  const CliRun b = budget(quick + " --montecarlo.seed=2");
  ASSERT_EQ(a.status, 0);
  ASSERT_EQ(b.status, 0);
  const auto ja = nlohmann::json::parse(a.out), jb = nlohmann::json::parse(b.out);
  int differing = 0;
  for (std::size_t i = 0; i < ja["points"].size(); ++i)
    differing += ja["points"][i]["mc_mean"] != jb["points"][i]["mc_mean"];
  EXPECT_GT(differing, 0);
  // The deterministic engines do not depend on the seed.
  EXPECT_EQ(ja["window"]["wc_max_abs"], jb["window"]["wc_max_abs"]);
}

TEST(BudgetCli, AdaptiveRunStopsWhenTheBandsAreStableAndSaysHowManyUnits) {
  // JCGM 101 §7.9: batches of max(100/(1 − p), 10⁴) units; at p = 95 %,
  // 10⁴ units a batch, so the count is a multiple of it, at least two batches.
  // (Without output rounding: a 0.1 K-stepped output makes the endpoints jump
  // between steps and needs millions of units to settle.)
  const CliRun r = budget(" --montecarlo.units=auto --montecarlo.coverage=95% --conditions.t_step=5"
                          " --firmware.resolution=0 --format json");
  ASSERT_EQ(r.status, 0);
  const auto j = nlohmann::json::parse(r.out);
  const auto units = j["window"]["mc_units"].get<std::uint64_t>();
  EXPECT_TRUE(j["window"]["mc_adaptive"].get<bool>());
  EXPECT_TRUE(j["window"]["mc_converged"].get<bool>());
  EXPECT_GE(units, 20000u);
  EXPECT_EQ(units % 10000, 0u);
  EXPECT_LT(units, 10000000u);
}

TEST(BudgetCli, StrictTurnsAFailingVerdictIntoExitThree) {
  // interface.md: a failing verdict exits 0, or 3 with --strict.
  const std::string failing = " --requirement.max_error=0.05 --no-mc --format json";
  const CliRun plain = budget(failing);
  ASSERT_EQ(plain.status, 0);
  EXPECT_EQ(nlohmann::json::parse(plain.out)["window"]["verdict"], "fail");
  EXPECT_EQ(budget(failing + " --strict").status, 3);
  const CliRun loose = budget(" --requirement.max_error=5 --no-mc --strict --format json");
  EXPECT_EQ(loose.status, 0);
  EXPECT_EQ(nlohmann::json::parse(loose.out)["window"]["verdict"], "pass");
}

TEST(BudgetCli, JsonCarriesTheInterfaceFields) {
  const CliRun r = budget(quick);
  ASSERT_EQ(r.status, 0);
  const auto j = nlohmann::json::parse(r.out);
  EXPECT_EQ(j["command"], "budget");
  for (const char* key : {"t", "code", "sensitivity", "self_heating", "nominal", "wc_low", "wc_high", "rss_low",
                          "rss_high", "mc_low", "mc_high", "mc_median", "contributions"})
    EXPECT_TRUE(j["points"][10].contains(key)) << key;
  for (const char* key : {"min", "max", "wc_max_abs", "rss_max_abs", "mc_max_abs", "yield", "yield_low", "yield_high",
                          "dominant", "verdict"})
    EXPECT_TRUE(j["window"].contains(key)) << key;
  EXPECT_TRUE(j.contains("caution"));
}

}  // namespace
}  // namespace thermargin
