// `thermargin budget` as a user runs it: byte-identical output whatever the
// thread count, different seeds giving different draws, the adaptive run
// length, the verdict and --strict's exit status.
#include <algorithm>
#include <cmath>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "cli_run.hpp"
#include "source_tree.hpp"

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
  // docs/engines.md (Verdict): a failing verdict exits 0, or 3 with --strict.
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

// 17 active inputs, one more than are enumerated in full: the default
// design's 9 (R25, beta, dissipation, R_fixed, its tempco, the board range,
// ADC offset, gain, INL), an absolute reference (excitation and reference,
// each with tolerance and tempco), a parallel resistor's tolerance, the
// pin's leakage and a two-point calibration's two references.
const std::string seventeen_inputs =
    " --supply.ratiometric=false --supply.v_reference=3.0 --supply.v_excitation_tol=1% --supply.v_excitation_tempco=50ppm"
    " --supply.v_reference_tol=0.5% --supply.v_reference_tempco=25ppm --divider.r_parallel=100k"
    " --divider.r_parallel_tol=1% --adc.leakage=20n --firmware.calibration=two-point --firmware.calibration_at=5,35"
    " --firmware.calibration_uncertainty=0.05 --conditions.t_min=0 --conditions.t_max=40 --conditions.t_step=20 --requirement.window_max=40 --no-mc";

TEST(BudgetCli, BeyondSixteenActiveInputsTheCornersAreDirectedAndEveryOutputSaysSo) {
  // docs/engines.md: full enumeration up to 16 active inputs; beyond, corners
  // directed by the sensitivities, and the output says so.
  const auto directed = testing::cli_json("budget" + seventeen_inputs);
  EXPECT_EQ(directed["window"]["active_inputs"], 17);
  EXPECT_EQ(directed["window"]["wc_method"], "directed corners");
  EXPECT_NE(directed["window"]["wc_method_detail"].get<std::string>().find("17 active inputs, more than the 16"),
            std::string::npos);
  const CliRun text = budget(seventeen_inputs);
  ASSERT_EQ(text.status, 0) << text.err;
  EXPECT_NE(text.out.find("corners directed by the sensitivities' signs"), std::string::npos);
  EXPECT_NE(text.out.find("17 active inputs, more than the 16 enumerated in full"), std::string::npos);
  // And the directed corners find the band every corner gives (2^17 of them).
  const auto full = testing::cli_json("budget" + seventeen_inputs + " --corners=enumerate");
  EXPECT_EQ(full["window"]["wc_method"], "full enumeration");
  EXPECT_EQ(full["window"]["wc_corners"], 131072);
  ASSERT_EQ(full["points"].size(), directed["points"].size());
  for (std::size_t i = 0; i < full["points"].size(); ++i) {
    const auto &a = directed["points"][i], &b = full["points"][i];
    ASSERT_TRUE(b.contains("wc_low")) << b["t"];
    EXPECT_NEAR(a["wc_low"].get<double>(), b["wc_low"].get<double>(), 1e-9) << b["t"];
    EXPECT_NEAR(a["wc_high"].get<double>(), b["wc_high"].get<double>(), 1e-9) << b["t"];
  }
}

TEST(BudgetCli, ContributorTablesPerTemperatureAndForTheWindowAreSharesOfTheCombinedVariance) {
  // JCGM 100:2008 §5.1.2 eq. (10) and its note: u_c² = Σ (c_i·u_i)² + the
  // second-order terms, so a row's share is its variance / u_c², the
  // variance being (c_i·u_i)² from the interface's "contributions" field
  // (u_i·|c_i| in K) plus the row's second-order terms ("variances", K²;
  // a pair row has only those); the shares add up to 100 % at every
  // temperature and over the window, largest first, the first one named
  // dominant.
  const auto j = testing::cli_json("budget " + testing::shell_quote(testing::scenario_path("cold_store_logger.ini")) +
                                   " --no-mc");
  int checked = 0;
  for (const auto& p : j["points"]) {
    ASSERT_TRUE(p.contains("contributors")) << p["t"];
    double var = 0.0, sum = 0.0, previous = 2.0;
    for (const auto& [name, v] : p["variances"].items()) var += v.get<double>();
    EXPECT_NEAR(std::sqrt(var), p["u_c"].get<double>(), 1e-12) << p["t"];
    ASSERT_EQ(p["contributors"].size(), p["variances"].size());
    for (const auto& c : p["contributors"]) {
      const double v = p["variances"][c["source"].get<std::string>()];
      EXPECT_NEAR(c["share"].get<double>(), v / var, 1e-12) << p["t"] << " " << c["source"];
      EXPECT_LE(c["share"].get<double>(), previous);
      EXPECT_GE(c["half_width"].get<double>(), 0.0);
      previous = c["share"];
      sum += c["share"].get<double>();
    }
    EXPECT_NEAR(sum, 1.0, 1e-12) << p["t"];
    ++checked;
  }
  EXPECT_EQ(checked, 81);
  double window = 0.0, previous = 2.0;
  for (const auto& c : j["window"]["contributors"]) {
    EXPECT_LE(c["share"].get<double>(), previous);
    previous = c["share"];
    window += c["share"].get<double>();
  }
  EXPECT_NEAR(window, 1.0, 1e-12);
  EXPECT_EQ(j["window"]["dominant"], j["window"]["contributors"][0]["source"]);

  // The CSV carries the same table per temperature: a share and a
  // half-width column per source; the printed shares add up to 100 %.
  const CliRun csv = budget(testing::shell_quote(testing::scenario_path("cold_store_logger.ini")) + " --no-mc --format csv");
  ASSERT_EQ(csv.status, 0);
  std::istringstream in(csv.out);
  std::string line;
  std::getline(in, line);
  std::vector<std::string> head;
  for (std::stringstream h(line); std::getline(h, line, ',');) head.push_back(line);
  std::vector<std::size_t> shares;
  for (std::size_t i = 0; i < head.size(); ++i)
    if (head[i].starts_with("share_")) shares.push_back(i);
  EXPECT_EQ(shares.size(), j["window"]["contributors"].size());
  EXPECT_NE(std::find(head.begin(), head.end(), "half_width_r25_K"), head.end());
  int rows = 0;
  while (std::getline(in, line)) {
    std::vector<std::string> cells;
    for (std::stringstream c(line); std::getline(c, line, ',');) cells.push_back(line);
    double sum = 0.0;
    for (std::size_t i : shares) sum += std::stod(cells.at(i));
    EXPECT_NEAR(sum, 1.0, 1e-6 * static_cast<double>(shares.size())) << cells[0];  // printed to 6 decimals
    ++rows;
  }
  EXPECT_EQ(rows, 81);

  // The text's summary names the dominant source before any table.
  const CliRun text = budget(testing::shell_quote(testing::scenario_path("cold_store_logger.ini")) + " --no-mc");
  const std::string label = j["window"]["contributors"][0]["label"];
  const auto named = text.out.find("Dominant contributors over the window (share of the combined variance): " + label);
  ASSERT_NE(named, std::string::npos);
  EXPECT_LT(named, text.out.find("Per temperature"));
  EXPECT_NE(text.out.find("Contributors per temperature"), std::string::npos);
}

TEST(BudgetCli, SensitivityViewIsTheDividersSlopeInCountsAndMillivolts) {
  // A beta NTC at the bottom of a ratiometric divider, without self-heating:
  // x = 2^N·R/(R_f + R), so dx/dT = 2^N·R_f·R'/(R_f + R)² with R' = −B·R/T²
  // (beta equation, IEC 60539-1; the derivative by hand), dV/dT the same
  // with V_exc for 2^N (docs/model.md §5: 1 LSB = V_ref/2^N), and one LSB is
  // 1/|dx/dT| kelvin.
  const auto j = testing::cli_json("budget --sensor.dissipation=0 --no-mc");
  const double r25 = 10e3, beta = 3950.0, rf = 10e3, span = 4096.0, v = 3.3;
  double weakest = 1e300, weakest_at = 0.0;
  for (const auto& p : j["points"]) {
    const double t = p["t"].get<double>(), T = t + 273.15;
    const double r = r25 * std::exp(beta * (1.0 / T - 1.0 / 298.15)), dr = -beta * r / (T * T);
    const double slope = rf * dr / ((rf + r) * (rf + r));
    constexpr double central_difference = 1e-6;  // relative, h = 0.01 K
    EXPECT_NEAR(p["sensitivity"].get<double>(), span * slope, central_difference * span * std::fabs(slope)) << t;
    EXPECT_NEAR(p["mv_per_k"].get<double>(), 1e3 * v * slope, central_difference * 1e3 * v * std::fabs(slope)) << t;
    EXPECT_NEAR(p["lsb_in_k"].get<double>(), 1.0 / std::fabs(span * slope), 1e-5 / std::fabs(span * slope)) << t;
    if (p["in_window"].get<bool>() && std::fabs(span * slope) < weakest) {
      weakest = std::fabs(span * slope);
      weakest_at = t;
    }
  }
  // The summary names where the divider is starved: the smallest |LSB/K| in
  // the window (the default window 0..60 °C: at 60 °C).
  EXPECT_EQ(j["window"]["weakest_sensitivity"]["t"].get<double>(), weakest_at);
  EXPECT_EQ(weakest_at, 60.0);
  EXPECT_NEAR(j["window"]["weakest_sensitivity"]["lsb_per_k"].get<double>(), weakest, 1e-6 * weakest);
}

TEST(BudgetCli, VerdictGivesItsBasisMarginAndWhereTheMarginIsSmallest) {
  // docs/engines.md (Verdict): the verdict uses the requirement's basis;
  // the margin is the limit minus the largest |error| of that band in the
  // window, found here from the per-temperature bands themselves.
  for (const std::string basis : {"worst-case", "linear"}) {
    SCOPED_TRACE(basis);
    const auto j = testing::cli_json("budget --no-mc --requirement.basis=" + basis);
    const std::string lo = basis == "linear" ? "rss_low" : "wc_low", hi = basis == "linear" ? "rss_high" : "wc_high";
    double worst = -1.0, at = 0.0;
    for (const auto& p : j["points"]) {
      if (!p["in_window"].get<bool>()) continue;
      const double m = std::max(std::fabs(p[lo].get<double>()), std::fabs(p[hi].get<double>()));
      if (m > worst) {
        worst = m;
        at = p["t"];
      }
    }
    const auto& w = j["window"];
    EXPECT_EQ(w["basis"], basis);
    EXPECT_DOUBLE_EQ(w["worst_abs_error"].get<double>(), worst);
    EXPECT_DOUBLE_EQ(w["worst_at"].get<double>(), at);
    EXPECT_DOUBLE_EQ(w["margin"].get<double>(), w["limit"].get<double>() - worst);
    EXPECT_EQ(w["verdict"], worst <= w["limit"].get<double>() ? "pass" : "fail");
  }
  const CliRun text = budget(" --no-mc --requirement.basis=linear");
  EXPECT_NE(text.out.find("linear-budget error up to"), std::string::npos);
  EXPECT_NE(text.out.find("verdict basis linear"), std::string::npos);
  EXPECT_NE(text.out.find("smallest margin at"), std::string::npos);
}

}  // namespace
}  // namespace thermargin
