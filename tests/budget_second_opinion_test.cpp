// The worst-case band of `thermargin budget` on a shipped scenario against
// an independent SciPy re-implementation of docs/model.md (tests/reference/
// budget_worst_case.py: Python's configparser reads the same file, every
// corner of the box is enumerated with NumPy and the self-heating equation
// solved by scipy.optimize.brentq). Nothing of thermargin is shared.
#include <cmath>
#include <string>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "cli_run.hpp"
#include "source_tree.hpp"

namespace thermargin {
namespace {

// thermargin solves the self-heating to 1e-9 K (docs/model.md §2), brentq to
// 1e-12 K; the rest is the same closed forms evaluated in another order.
constexpr double self_heating_tolerance = 1e-8;  // K

TEST(BudgetSecondOpinion, DefaultScenarioWorstCaseBandMatchesScipyAtEveryTemperature) {
  const std::string scenario = testing::scenario_path("default.ini");
  const testing::CliOutcome py = testing::run_shell(testing::reference_command("budget_worst_case.py", testing::shell_quote(scenario)));
  ASSERT_EQ(py.status, 0) << py.err;
  const auto want = nlohmann::json::parse(py.out);
  const auto got = testing::cli_json("budget " + testing::shell_quote(scenario) + " --no-mc");
  // 9 active inputs (R25, beta, dissipation, R_fixed, its tempco, the board
  // range, ADC offset, gain, INL): every one of 2^9 corners, both ways.
  EXPECT_EQ(want["corners"].get<long long>(), 512);
  EXPECT_EQ(got["window"]["wc_corners"].get<long long>(), 512);
  EXPECT_EQ(got["window"]["wc_method"], "full enumeration");
  ASSERT_EQ(got["points"].size(), want["t"].size());
  for (std::size_t i = 0; i < want["t"].size(); ++i) {
    const auto& p = got["points"][i];
    ASSERT_DOUBLE_EQ(p["t"].get<double>(), want["t"][i].get<double>());
    ASSERT_TRUE(p.contains("wc_low")) << p["t"];
    EXPECT_NEAR(p["wc_low"].get<double>(), want["wc_low"][i].get<double>(), self_heating_tolerance) << p["t"];
    EXPECT_NEAR(p["wc_high"].get<double>(), want["wc_high"][i].get<double>(), self_heating_tolerance) << p["t"];
  }
}

}  // namespace
}  // namespace thermargin
