// Tests of the `thermargin fit` command: its JSON rows are the library's fits
// (thermargin/tools/fit.hpp, itself checked against NumPy/SciPy in fit_test.cpp),
// its two-point beta is the IEC 60539-1 B-value of the file's points, the
// scenario lines it prints make a scenario that `thermargin check` accepts,
// and bad data or settings give one line and exit status 2. The data files in
// tests/data/fit/ are computed from published equations by generate.py; none
// is a measurement.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <limits>
#include <map>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>
#include <vector>

#include "cli_run.hpp"
#include "fit_data.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/tools/fit.hpp"
#include "thermargin/chain/ntc.hpp"
#include "thermargin/input/rt_data.hpp"

namespace thermargin {
namespace {

namespace fs = std::filesystem;
using testing::cli_json;
using testing::CliOutcome;
using testing::fit_data_file;
using testing::run_cli;
using testing::shell_quote;

// IEC 60539-1's B-value computed here and by the library from the same two
// points: the same closed form, evaluated in a different order.
constexpr double closed_form_rel = 1e-12;

// A scratch directory for this test program, removed when it ends.
const fs::path& scratch() {
  static const testing::ScratchDir dir;
  return dir.path;
}

nlohmann::json fit_json(const std::string& file, const std::string& options) {
  return cli_json("fit " + shell_quote(fit_data_file(file)) + " " + options);
}

// ---------------------------------------------------------------------------

struct RowsCase {
  std::string name;
  std::string file;
  std::string options;
  FitSettings settings;  // what the options ask for
};
void PrintTo(const RowsCase& c, std::ostream* os) { *os << c.name; }

FitSettings make(double t_min, double t_max, double limit, bool extended, std::vector<double> beta_at = {},
                 std::vector<double> sh_at = {}) {
  FitSettings s;
  s.t_min = t_min;
  s.t_max = t_max;
  s.limit = limit;
  s.extended = extended;
  s.beta_at = std::move(beta_at);
  s.sh_at = std::move(sh_at);
  return s;
}

class FitCliRows : public ::testing::TestWithParam<RowsCase> {};

TEST_P(FitCliRows, JsonRowsAreTheLibrarysFits) {
  const RowsCase& c = GetParam();
  const nlohmann::json j = fit_json(c.file, c.options);
  const FitResult want = fit_rt_data(read_rt_data(fit_data_file(c.file)), c.settings);

  EXPECT_EQ(j["command"], "fit");
  EXPECT_EQ(j["caution"].get<std::string>(), std::string(caution));
  EXPECT_EQ(j["points_in_window"].get<std::size_t>(), want.points_in_window);
  ASSERT_EQ(j["rows"].size(), want.fits.size());
  // JSON numbers round-trip doubles exactly (nlohmann::json prints the
  // shortest form that reads back to the same double), so equality is exact.
  for (std::size_t i = 0; i < want.fits.size(); ++i) {
    const auto& row = j["rows"][i];
    const ModelFit& f = want.fits[i];
    SCOPED_TRACE(f.model + " " + f.method);
    EXPECT_EQ(row["model"], f.model);
    EXPECT_EQ(row["method"], f.method);
    ASSERT_EQ(row["coefficients"].size(), f.coefficients.size());
    for (const auto& k : f.coefficients) {
      EXPECT_EQ(row["coefficients"][k.name].get<double>(), k.value) << k.name;
      if (k.uncertainty) EXPECT_EQ(row["uncertainties"][k.name].get<double>(), *k.uncertainty) << k.name;
      else EXPECT_TRUE(row["uncertainties"][k.name].is_null()) << k.name;
    }
    EXPECT_EQ(row["max_residual"].get<double>(), f.max_residual);
    EXPECT_EQ(row["rms_residual"].get<double>(), f.rms_residual);
    EXPECT_EQ(row["worst_error"].get<double>(), f.worst_error);
    EXPECT_EQ(row["between_assessed"].get<bool>(), f.between_assessed);
    if (f.between_assessed) EXPECT_EQ(row["between_max_error"].get<double>(), f.between_max_error);
    ASSERT_EQ(row["residuals"].size(), f.residuals.size());
    for (std::size_t k = 0; k < f.residuals.size(); ++k) {
      EXPECT_EQ(row["residuals"][k]["line"].get<int>(), f.residuals[k].line);
      EXPECT_EQ(row["residuals"][k]["in_window"].get<bool>(), f.residuals[k].in_window);
      EXPECT_EQ(row["residuals"][k]["residual"].get<double>(), f.residuals[k].residual);
      EXPECT_EQ(row["residuals"][k]["solved"].get<bool>(), f.residuals[k].solved);
    }
    EXPECT_EQ(row["recommended"].get<bool>(), want.recommendation.found && want.recommendation.fit == i);
  }
  EXPECT_EQ(j["recommendation"]["found"].get<bool>(), want.recommendation.found);
  EXPECT_EQ(j["recommendation"]["text"], want.recommendation.text);
  EXPECT_EQ(j["snippet"], scenario_snippet(want, want.recommendation.fit));
}

constexpr double inf = std::numeric_limits<double>::infinity();

INSTANTIATE_TEST_SUITE_P(
    Options, FitCliRows,
    ::testing::Values(RowsCase{"defaults", "sh10k_rounded.csv", "", make(-inf, inf, 0.1, false)},
                      RowsCase{"window_limit_extended", "sh10k_rounded.csv", "--window=-20..100 --limit=0.05 --extended",
                               make(-20, 100, 0.05, true)},
                      RowsCase{"chosen_points", "sh10k_rounded.csv", "--beta-at=0,50 --sh-at=-10,30,70 --window=-10..70",
                               make(-10, 70, 0.1, false, {0, 50}, {-10, 30, 70})},
                      RowsCase{"weighted", "sh10k_rounded_u.csv", "--limit 20mK", make(-inf, inf, 0.02, false)},
                      RowsCase{"pt100_no_recommendation", "pt100_iec60751.csv", "", make(-inf, inf, 0.1, false)}),
    [](const auto& info) { return info.param.name; });

TEST(FitCli, TwoPointBetaIsTheIec60539BValueOfTheFilesPoints) {
  // B = ln(R1/R2) / (1/T1 − 1/T2) (IEC 60539-1) with the file's own points at
  // 25 and 85 °C, the B25/85 of datasheets (common practice).
  const RtData data = read_rt_data(fit_data_file("sh10k_rounded.csv"));
  const double r25 = testing::resistance_at(data, 25.0), r85 = testing::resistance_at(data, 85.0);
  ASSERT_GT(r25, 0.0);
  ASSERT_GT(r85, 0.0);
  const double b = std::log(r25 / r85) / (1.0 / (25.0 + kelvin_offset) - 1.0 / (85.0 + kelvin_offset));
  const nlohmann::json j = fit_json("sh10k_rounded.csv", "");
  const auto& row = j["rows"][0];
  ASSERT_EQ(row["model"], "beta");
  ASSERT_EQ(row["method"], "two-point");
  EXPECT_NEAR(row["coefficients"]["beta"].get<double>(), b, closed_form_rel * b);
  EXPECT_NEAR(row["coefficients"]["r25"].get<double>(), r25, closed_form_rel * r25);
}

// ---------------------------------------------------------------------------
// The snippet, pasted into a scenario file, is a scenario `check` accepts.

struct SnippetCase {
  std::string name;
  std::string options;
  std::string model;  // the model the recommendation should pick
};
void PrintTo(const SnippetCase& c, std::ostream* os) { *os << c.name; }

class FitCliSnippet : public ::testing::TestWithParam<SnippetCase> {};

TEST_P(FitCliSnippet, PastedIntoAScenarioPassesCheckWithTheFittedCoefficients) {
  const SnippetCase& c = GetParam();
  const nlohmann::json j = fit_json("sh10k_rounded.csv", c.options);
  ASSERT_TRUE(j["recommendation"]["found"].get<bool>());
  ASSERT_EQ(j["recommendation"]["model"], c.model);
  const fs::path scenario = scratch() / (c.name + ".ini");
  std::ofstream(scenario) << "title = Pasted fit (" << c.name << "), invented demo\n\n" << j["snippet"].get<std::string>();

  const CliOutcome check = run_cli("check " + shell_quote(scenario.string()) + " --format json");
  ASSERT_EQ(check.status, 0) << check.err << "\n" << j["snippet"].get<std::string>();
  const nlohmann::json resolved = nlohmann::json::parse(check.out);
  std::map<std::string, std::string> value;
  for (const auto& row : resolved["rows"]) value[row["key"].get<std::string>()] = row["value"].get<std::string>();
  EXPECT_EQ(value["sensor.model"], c.model);
  EXPECT_EQ(value["firmware.conversion"], c.model);
  // Every coefficient reaches the scenario within the snippet's 10 significant digits.
  std::size_t recommended = 0;
  for (std::size_t i = 0; i < j["rows"].size(); ++i)
    if (j["rows"][i]["recommended"].get<bool>()) recommended = i;
  for (const auto& [name, v] : j["rows"][recommended]["coefficients"].items()) {
    const double fitted = v.get<double>();
    EXPECT_NEAR(std::stod(value["sensor." + name]), fitted, 1e-9 * std::abs(fitted)) << name;
    EXPECT_NEAR(std::stod(value["firmware." + name]), fitted, 1e-9 * std::abs(fitted)) << name;
  }
}

INSTANTIATE_TEST_SUITE_P(Recommendations, FitCliSnippet,
                         ::testing::Values(SnippetCase{"steinhart_hart", "", "steinhart-hart"},
                                           // Over 0..50 °C the least-squares beta is within 0.18 K (docs/fit.md).
                                           SnippetCase{"beta", "--window=0..50 --limit=0.5", "beta"}),
                         [](const auto& info) { return info.param.name; });

// ---------------------------------------------------------------------------
// Text and CSV.

TEST(FitCli, TextPutsTheRecommendationFirstAndEndsWithTheSnippetAndTheCaution) {
  const CliOutcome r = run_cli("fit " + shell_quote(fit_data_file("sh10k_rounded.csv")));
  ASSERT_EQ(r.status, 0) << r.err;
  const auto rec = r.out.find("RECOMMENDATION:");
  const auto models = r.out.find("Models (");
  const auto residuals = r.out.find("Residuals (");
  const auto snippet = r.out.find("[sensor]\nmodel = steinhart-hart");
  const auto warning = r.out.find(std::string(caution));
  ASSERT_NE(rec, std::string::npos) << r.out;
  ASSERT_NE(models, std::string::npos);
  ASSERT_NE(residuals, std::string::npos);
  ASSERT_NE(snippet, std::string::npos);
  ASSERT_NE(warning, std::string::npos);
  EXPECT_LT(rec, models);
  EXPECT_LT(models, residuals);
  EXPECT_LT(residuals, snippet);
  EXPECT_LT(snippet, warning);
}

TEST(FitCli, TextNamesThePointsOfThePointMethodsAndTheChiSquaredOfWeightedFits) {
  const CliOutcome r = run_cli("fit " + shell_quote(fit_data_file("sh10k_rounded_u.csv")) + " --sh-at=0,50,100");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("two-point 25/85 "), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("three-point 0/50/100 "), std::string::npos) << r.out;
  // χ² of each weighted least-squares fit as the library computes it (itself checked against NumPy in fit_test.cpp).
  const FitResult want = fit_rt_data(read_rt_data(fit_data_file("sh10k_rounded_u.csv")));
  const auto table = r.out.find("chi-squared");
  ASSERT_NE(table, std::string::npos) << r.out;
  for (const auto& f : want.fits) {
    if (f.method != "least-squares") continue;
    char figure[64];
    std::snprintf(figure, sizeof figure, "%.4g", f.chi_squared);
    const auto row = r.out.find(f.model + " ", r.out.find("\n" + f.model, table));
    ASSERT_NE(row, std::string::npos) << f.model;
    const std::string line = r.out.substr(row, r.out.find('\n', row) - row);
    EXPECT_NE(line.find(figure), std::string::npos) << line;
    EXPECT_NE(line.find(" " + std::to_string(f.dof)), std::string::npos) << line;
  }
  // Without uncertainties there is no χ² to show; every model has a temperature at every point.
  const CliOutcome plain = run_cli("fit " + shell_quote(fit_data_file("sh10k_rounded.csv")));
  EXPECT_EQ(plain.out.find("chi-squared"), std::string::npos);
  EXPECT_EQ(plain.out.find("(no T)"), std::string::npos);
}

TEST(FitCli, TextMarksResidualsWhereTheModelHasNoTemperature) {
  // NTC curves fitted to a Pt100 curve computed with the IEC 60751 equation: the least-squares beta has
  // none at the hot end.
  const CliOutcome r = run_cli("fit " + shell_quote(fit_data_file("pt100_iec60751.csv")));
  ASSERT_EQ(r.status, 0) << r.err;
  // The 850 degC point in the NTC fits' residuals (the RTD fit's come first, for rising data).
  const auto ntc = r.out.find("The NTC models, for comparison");
  ASSERT_NE(ntc, std::string::npos) << r.out;
  const auto at = r.out.find("\n 110 ", ntc);
  ASSERT_NE(at, std::string::npos) << r.out;
  EXPECT_NE(r.out.substr(at, r.out.find('\n', at + 1) - at).find("-1123.1500 (no T)"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("(no T): the model gives no temperature at that resistance"), std::string::npos);
  EXPECT_NE(r.out.find("NO RECOMMENDATION: No NTC model meets 0.1 K"), std::string::npos);
}

TEST(FitCli, CsvHasOneRowPerFitAfterTheCaution) {
  const CliOutcome r = run_cli("fit " + shell_quote(fit_data_file("sh10k_rounded.csv")) + " --extended --format csv");
  ASSERT_EQ(r.status, 0) << r.err;
  std::istringstream in(r.out);
  std::string line;
  std::getline(in, line);
  EXPECT_EQ(line, "# " + std::string(caution));
  std::getline(in, line);
  EXPECT_TRUE(line.starts_with("model,method,r25_ohm,beta_K,a,b,c,d,max_residual_K")) << line;
  std::vector<std::string> rows;
  while (std::getline(in, line)) rows.push_back(line);
  const FitResult want = fit_rt_data(read_rt_data(fit_data_file("sh10k_rounded.csv")), make(-inf, inf, 0.1, true));
  ASSERT_EQ(rows.size(), want.fits.size());
  for (std::size_t i = 0; i < rows.size(); ++i)
    EXPECT_TRUE(rows[i].starts_with(want.fits[i].model + "," + want.fits[i].method + ",")) << rows[i];
}

// ---------------------------------------------------------------------------
// Bad input: one line, exit status 2, no output file.

// The arguments after `thermargin fit`, DATA/ standing for tests/data/fit/.
using BadCase = testing::RefusalCase;

class FitCliBadInput : public ::testing::TestWithParam<BadCase> {};

TEST_P(FitCliBadInput, IsOneLineWithStatusTwoAndLeavesNoFile) {
  const BadCase& c = GetParam();
  const fs::path dir = scratch() / ("bad_" + c.name);
  fs::create_directories(dir);
  std::string args = c.args;
  for (std::size_t i; (i = args.find("DATA/")) != std::string::npos;)
    args.replace(i, 5, fit_data_file(""));
  const CliOutcome r = run_cli("fit " + args + " --output " + shell_quote((dir / "fit.json").string()) + " --format json");
  testing::expect_refused_in_one_line(r, c.message, dir);
}

INSTANTIATE_TEST_SUITE_P(
    Data, FitCliBadInput,
    ::testing::Values(BadCase{"too_few_points", "DATA/too_few_points.csv", "too_few_points.csv:4: only 2 data point(s)"},
                      BadCase{"duplicate_temperature", "DATA/bad_duplicate_temperature.csv",
                              "bad_duplicate_temperature.csv:5:1: duplicate temperature"},
                      BadCase{"nonmonotonic", "DATA/bad_nonmonotonic.csv",
                              "bad_nonmonotonic.csv:5:2: resistance must change strictly monotonically"},
                      BadCase{"negative", "DATA/bad_negative.csv", "bad_negative.csv:4:2): must be a resistance > 0"},
                      BadCase{"negative_uncertainty", "DATA/bad_negative_uncertainty.csv",
                              "bad_negative_uncertainty.csv:5:3): must be an uncertainty > 0, in ohm or %"},
                      BadCase{"missing_column", "DATA/bad_missing_column.csv", "bad_missing_column.csv:5: expected 2 or 3 columns"},
                      BadCase{"no_file", "", "fit needs a data file"},
                      BadCase{"missing_file", "DATA/no_such_file.csv", "no_such_file.csv"},
                      BadCase{"too_few_in_window", "DATA/sh10k_rounded.csv --window=20..25",
                              "the Steinhart-Hart model needs at least 3"}),
    [](const auto& info) { return info.param.name; });

INSTANTIATE_TEST_SUITE_P(
    Settings, FitCliBadInput,
    ::testing::Values(BadCase{"window_without_dots", "DATA/sh10k_rounded.csv --window=0", "fit.window = 0 (command line)"},
                      BadCase{"window_reversed", "DATA/sh10k_rounded.csv --window=50..0", "fit.window = 50..0 (command line)"},
                      BadCase{"beta_at_one", "DATA/sh10k_rounded.csv --beta-at=25", "fit.beta_at = 25 (command line)"},
                      BadCase{"beta_at_not_a_point", "DATA/sh10k_rounded.csv --beta-at=25,86",
                              "fit.beta_at = 25, 86 (command line): must be temperatures (degC) of data points"},
                      BadCase{"sh_at_two", "DATA/sh10k_rounded.csv --sh-at=0,25", "fit.sh_at = 0,25 (command line)"},
                      BadCase{"negative_limit", "DATA/sh10k_rounded.csv --limit=-1", "fit.limit = -1 (command line)"},
                      BadCase{"unknown_option", "DATA/sh10k_rounded.csv --points=3", "command line: unrecognised option"}),
    [](const auto& info) { return info.param.name; });

}  // namespace
}  // namespace thermargin
