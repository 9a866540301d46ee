// Tests of `thermargin response` and budget's dynamic line: the ramp error
// and the settling time of every filter against a SciPy simulation
// (scipy.signal.lsim for the sensor, scipy.signal.lfilter for the filter:
// tests/reference/response_check.py), the JSON fields and the CSV and text
// that carry them, budget's verdict with
// and without requirement.include_dynamic, the report's pictures and --help.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <sstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "cli_run.hpp"
#include "thermargin/core/caution.hpp"

namespace thermargin {
namespace {

using testing::cli_json;
using testing::run_cli;
using testing::shell_quote;

constexpr double kRampTolerance = 1e-9;    // K: both exact; the simulation's float rounding over ~1e4 steps
constexpr double kNoiseTolerance = 1e-12;  // sum of squares of an impulse response against the closed form
constexpr double kCsvDigits = 1e-9;        // relative: the CSV writes 10 significant digits

std::string charger() { return shell_quote(testing::scenario_path("charger_stop.ini")); }

std::string filter_argument(const nlohmann::json& row) {
  const std::string kind = row["filter"];
  if (kind == "moving-average") return "moving-average:" + std::to_string(row["length"].get<int>());
  if (kind == "exponential") {
    char buf[40];
    std::snprintf(buf, sizeof buf, "exponential:%.17g", row["alpha"].get<double>());
    return buf;
  }
  return "none";
}

// The program's rows against SciPy's simulation of the same settings.
void expect_scipy_agrees(const std::string& args) {
  const nlohmann::json j = cli_json("response " + args);
  const nlohmann::json& s = j["settings"];
  char head[256];
  std::snprintf(head, sizeof head, "%.17g %.17g %.17g %.17g %.17g", s["time_constant_max"].get<double>(),
                s["reading_period"].get<double>(), s["ramp"].get<double>(), s["step"].get<double>(),
                s["settle_to"].get<double>());
  std::string filters;
  for (const auto& row : j["rows"]) filters += " " + filter_argument(row);
  const testing::CliOutcome py = testing::run_shell(testing::reference_command("response_check.py", head + filters));
  ASSERT_EQ(py.status, 0) << py.err;
  const nlohmann::json ref = nlohmann::json::parse(py.out);
  ASSERT_EQ(ref.size(), j["rows"].size());
  for (std::size_t i = 0; i < ref.size(); ++i) {
    const auto& row = j["rows"][i];
    SCOPED_TRACE(row["label"].get<std::string>());
    EXPECT_NEAR(row["ramp_error"].get<double>(), ref[i]["ramp_error"].get<double>(), kRampTolerance);
    EXPECT_EQ(row["settling_readings"].get<long long>(), ref[i]["settling_readings"].get<long long>());
    EXPECT_NEAR(row["settling_s"].get<double>(), ref[i]["settling_readings"].get<double>() * s["reading_period"].get<double>(),
                1e-9);
    EXPECT_NEAR(row["noise_factor"].get<double>(), ref[i]["noise_factor"].get<double>(), kNoiseTolerance);
  }
}

TEST(ResponseCli, EveryFilterAgreesWithScipyOnTheChargerScenario) { expect_scipy_agrees(charger()); }

TEST(ResponseCli, EveryFilterAgreesWithScipyForAFastProbeReadOftenWithItsOwnFilter) {
  expect_scipy_agrees(charger() +
                      " --response.time_constant=2.5s --response.time_constant_tol=0 --response.reading_period=100ms"
                      " --response.filter=exponential --response.filter_alpha=0.2 --response.ramp=12"
                      " --response.step=30 --response.settle_to=0.05");
}

TEST(ResponseCli, JsonCarriesTheRowsAndTheRecommendation) {
  const nlohmann::json j = cli_json("response " + charger());
  EXPECT_EQ(j["command"], "response");
  ASSERT_EQ(j["rows"].size(), 17u);
  int chosen = 0;
  for (const auto& r : j["rows"]) {
    for (const char* k : {"filter", "delay_s", "ramp_error", "settling_s", "noise_band", "total_max_abs", "meets"})
      EXPECT_TRUE(r.contains(k)) << k;
    if (r["filter"] == "moving-average") EXPECT_TRUE(r.contains("length"));
    if (r["filter"] == "exponential") EXPECT_TRUE(r.contains("alpha"));
    chosen += r["chosen"].get<bool>();
  }
  EXPECT_EQ(chosen, 1);
  // The scenario's filter: a moving average of 16 every 0.5 s delays by
  // (16 - 1)/2 * 0.5 = 3.75 s; at 1.5 K/min behind a 15 s +20 % sensor the
  // lag is 0.025 K/s * (18 + 3.75) s = 0.54375 K (closed form, by hand).
  for (const auto& r : j["rows"])
    if (r["chosen"].get<bool>()) {
      EXPECT_EQ(r["length"], 16);
      EXPECT_NEAR(r["delay_s"].get<double>(), 3.75, 1e-12);
      EXPECT_NEAR(r["ramp_error"].get<double>(), 0.54375, 1e-12);
    }
  ASSERT_TRUE(j.contains("recommendation"));
  if (!j["recommendation"].is_null()) {
    EXPECT_TRUE(j["recommendation"]["meets"].get<bool>());
    for (const auto& r : j["rows"])
      if (r["meets"].get<bool>()) EXPECT_LE(r["margin"].get<double>(), j["recommendation"]["margin"].get<double>() + 1e-12);
  }
  EXPECT_EQ(j["caution"], std::string(caution));
}

// The text and the CSV carry the JSON's rows (docs/response.md, Output): the
// CSV one line per row, every column the JSON's value to its 10 significant
// digits (kCsvDigits), the caution on a first '#' line; the text the recommendation first,
// one table row per filter marked '*' (the scenario's) and '>' (the
// recommendation), the caution last.
TEST(ResponseCli, CsvAndTextCarryEveryRowOfTheJson) {
  const nlohmann::json j = cli_json("response " + charger());
  const auto& rows = j["rows"];
  std::istringstream csv(testing::cli_output("response " + charger() + " --format csv"));
  std::string line;
  std::getline(csv, line);
  EXPECT_EQ(line, "# " + std::string(caution));
  std::getline(csv, line);
  EXPECT_EQ(line,
            "filter,length,alpha,chosen,recommended,delay_s,lag_s,ramp_error_K,settling_s,settling_readings,noise_factor,"
            "noise_band_K,static_max_abs_K,total_max_abs_K,total_at_degC,margin_K,meets");
  const auto number = [](const std::string& cell, double json) {
    EXPECT_NEAR(std::stod(cell), json, kCsvDigits * std::max(1.0, std::fabs(json))) << cell;
  };
  std::size_t i = 0;
  for (; std::getline(csv, line) && i < rows.size(); ++i) {
    std::vector<std::string> c;
    std::istringstream cells(line);
    for (std::string cell; std::getline(cells, cell, ',');) c.push_back(cell);
    ASSERT_EQ(c.size(), 17u) << line;
    const auto& r = rows[i];
    const bool recommended = !j["recommendation"].is_null() && j["recommendation"]["label"] == r["label"];
    EXPECT_EQ(c[0], r["filter"].get<std::string>());
    EXPECT_EQ(c[1], r.contains("length") ? std::to_string(r["length"].get<int>()) : "");
    if (r.contains("alpha")) number(c[2], r["alpha"].get<double>());
    EXPECT_EQ(c[3], r["chosen"].get<bool>() ? "1" : "0");
    EXPECT_EQ(c[4], recommended ? "1" : "0");
    number(c[5], r["delay_s"].get<double>());
    number(c[7], r["ramp_error"].get<double>());
    number(c[8], r["settling_s"].get<double>());
    EXPECT_EQ(std::stoll(c[9]), r["settling_readings"].get<long long>());
    number(c[11], r["noise_band"].get<double>());
    number(c[13], r["total_max_abs"].get<double>());
    number(c[15], r["margin"].get<double>());
    EXPECT_EQ(c[16], r["meets"].get<bool>() ? "1" : "0");
  }
  EXPECT_EQ(i, rows.size());
  EXPECT_FALSE(std::getline(csv, line)) << line;

  const std::string text = testing::cli_output("response " + charger());
  ASSERT_FALSE(j["recommendation"].is_null());
  const std::string label = j["recommendation"]["label"];
  EXPECT_EQ(text.find("RECOMMENDATION: " + label), text.find("RECOMMENDATION: "));
  EXPECT_NE(text.find("RECOMMENDATION: " + label), std::string::npos) << text;
  for (const auto& r : rows) {
    const std::string mark = r["chosen"].get<bool>() ? "*" : r["label"] == label ? ">" : "";
    EXPECT_NE(text.find("\n" + mark + r["label"].get<std::string>() + "  "), std::string::npos) << r["label"];
  }
  EXPECT_NE(text.find(std::string(caution).substr(0, 40)), std::string::npos);
  EXPECT_GT(text.find(std::string(caution).substr(0, 40)), text.find("RECOMMENDATION: "));
}

TEST(ResponseCli, BudgetAddsTheDynamicErrorOnlyWhenTheRequirementSaysSo) {
  const nlohmann::json with = cli_json("budget " + charger() + " --no-mc");
  const nlohmann::json without = cli_json("budget " + charger() + " --no-mc --requirement.include_dynamic=false");
  const auto& dw = with["window"]["dynamic"];
  EXPECT_TRUE(dw["included"].get<bool>());
  EXPECT_FALSE(without["window"]["dynamic"]["included"].get<bool>());
  EXPECT_NEAR(dw["error"].get<double>(), 0.54375, 1e-12);  // as above, by hand
  EXPECT_NEAR(with["window"]["worst_abs_error"].get<double>() - without["window"]["worst_abs_error"].get<double>(), 0.54375,
              1e-12);
  EXPECT_NEAR(with["window"]["margin"].get<double>(), 2.0 - with["window"]["worst_abs_error"].get<double>(), 1e-12);

  const testing::CliOutcome text = run_cli("budget " + charger() + " --no-mc");
  ASSERT_EQ(text.status, 0) << text.err;
  EXPECT_NE(text.out.find("[static + dynamic]"), std::string::npos);
  EXPECT_NE(text.out.find("added to the verdict (requirement.include_dynamic = true)"), std::string::npos);
  const testing::CliOutcome plain = run_cli("budget " + charger() + " --no-mc --requirement.include_dynamic=false");
  EXPECT_NE(plain.out.find("[static only]"), std::string::npos);
  // The built-in design has no [response] section: no dynamic line at all.
  EXPECT_FALSE(cli_json("budget --no-mc")["window"].contains("dynamic"));
  EXPECT_EQ(run_cli("budget --no-mc").out.find("Dynamic error"), std::string::npos);
}

TEST(ResponseCli, ReportHoldsTheRampAndTheStepForTheFilterAndItsNeighbours) {
  const testing::ScratchDir dir;
  const std::string page = (dir.path / "response.html").string();
  const testing::CliOutcome r =
      run_cli("response " + charger() + " --report " + shell_quote(page) + " --plots " + shell_quote((dir.path / "plots").string()));
  ASSERT_EQ(r.status, 0) << r.err;
  const std::string html = testing::slurp(page);
  EXPECT_NE(html.find(std::string(caution).substr(0, 40)), std::string::npos);
  EXPECT_EQ(dir.names("plots"), (std::vector<std::string>{"response-ramp.svg", "response-step.svg"}));
  for (const char* name : {"data-name=\"moving-average-16\"", "data-name=\"moving-average-8\"", "data-name=\"moving-average-32\"",
                           "data-name=\"medium\"", "data-name=\"sensor\""})
    EXPECT_NE(html.find(name), std::string::npos) << name;
  // Every curve of both pictures is the SciPy simulation at the same readings.
  const nlohmann::json s = cli_json("response " + charger())["settings"];
  char args[160];
  std::snprintf(args, sizeof args, " %.17g %.17g %.17g %.17g", s["time_constant_max"].get<double>(),
                s["reading_period"].get<double>(), s["ramp"].get<double>(), s["step"].get<double>());
  const std::string check = testing::reference_output("response_check.py", "--report " + shell_quote(page) + args);
  EXPECT_EQ(check.substr(0, 3), "ok:") << check;
}

TEST(ResponseCli, UnwritableReportDestinationsAreRefusedBeforeAnyWork) {
  testing::expect_unwritable_report_destinations_refused("response " + charger());
}

TEST(ResponseCli, HelpCarriesTheCautionAndTheResponseKeys) {
  const testing::CliOutcome r = run_cli("response --help");
  EXPECT_EQ(r.status, 0);
  EXPECT_NE(r.out.find(std::string(caution)), std::string::npos);
  EXPECT_NE(r.out.find("--response.time_constant"), std::string::npos);
  EXPECT_NE(run_cli("--help").out.find("response [FILE]"), std::string::npos);
}

}  // namespace
}  // namespace thermargin
