// Tests of thermargin/report/grades_report.hpp and of `thermargin grades --report
// --plots`: the grades page and chart, built from evaluate_grades() in
// process and by the CLI, read back by an outside reader
// (tests/reference/report_choice_check.py: Python's html.parser and
// xml.etree) and held against `thermargin grades --format json` run with
// the same catalogue on the same scenario, with and without a combination
// that meets the requirement; grade names from the catalogue are user text;
// a destination that cannot be written fails with one line, exit status 2
// and nothing written.
#include "thermargin/report/grades_report.hpp"

#include <gtest/gtest.h>

#include <nlohmann/json.hpp>

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "cli_run.hpp"
#include "engine_fixture.hpp"

namespace thermargin {
namespace {

namespace fs = std::filesystem;

using testing::shell_quote;
using testing::slurp;

const std::string kGradesScenario = testing::scenario_path("fermentation_probe.ini");
constexpr std::uint64_t kGradesPageUnits = 2000;  // Monte Carlo units per combination: quick, enough for a yield

// Three slots, twelve combinations; invented prices. One grade name carries
// markup and an ampersand, as a user's catalogue may.
constexpr const char* kCatalogue =
    "slot,grade,unit_cost,settings,notes\n"
    "thermistor,1%,0.10,sensor.r25_tol=1%;sensor.beta_tol=1%,loose\n"
    "thermistor,0.5%,0.18,sensor.r25_tol=0.5%;sensor.beta_tol=0.5%,\n"
    "thermistor,<b>0.2%</b> & co,0.45,sensor.r25_tol=0.2%;sensor.beta_tol=0.3%,\n"
    "resistor,1%,0.002,divider.r_fixed_tol=1%;divider.r_fixed_tempco=100ppm,\n"
    "resistor,0.1%,0.02,divider.r_fixed_tol=0.1%;divider.r_fixed_tempco=25ppm,\n"
    "adc,internal,0,adc.gain_error=0.1%;adc.offset=1;adc.inl=1,\n"
    "adc,external,1.20,adc.gain_error=0.02%;adc.offset=0.5;adc.inl=0.5,\n";

// What the outside reader (tests/reference/report_choice_check.py) says of
// the page and the plots against the JSON: "ok: 1 chart\n" when they agree.
std::string grades_reader_says(const fs::path& html, const fs::path& json, const fs::path& plots) {
  return testing::reference_output("report_choice_check.py", "grades " + shell_quote(html.string()) + " " +
                                                                 shell_quote(json.string()) + " " + shell_quote(plots.string()));
}

// `max_error` overrides the requirement ("" keeps the scenario's 0.5 K).
// `cli_extra` goes to the CLI only, to show that the reader notices two different runs.
std::string grades_cli_and_report_agree(const testing::ScratchDir& dir, const std::string& max_error, const std::string& cli_extra = "") {
  const fs::path cat = dir.path / "grades.csv", json = dir.path / "grades.json", html = dir.path / "grades.html",
                 plots = dir.path / "plots";
  std::ofstream(cat) << kCatalogue;
  const std::string over = max_error.empty() ? "" : " --requirement.max_error=" + max_error;
  const std::string ran = testing::cli_output("grades " + shell_quote(kGradesScenario) + over + " --catalogue " +
                                             shell_quote(cat.string()) + " --units " + std::to_string(kGradesPageUnits) +
                                             " --format json --output " + shell_quote(json.string()) + cli_extra);
  if (!ran.empty()) return "CLI: " + ran;
  const Scenario s = testing::scenario_with(
      max_error.empty() ? testing::Overrides{} : testing::Overrides{{"requirement.max_error", max_error}}, kGradesScenario);
  const Design d = build_design(s);
  const Catalogue c = read_catalogue(cat.string());
  GradesOptions o;
  o.units = kGradesPageUnits;
  const GradesResult g = evaluate_grades(s, c, o);
  write_report(html.string(), grades_report_html(d, s, c, g, kGradesScenario));
  write_figures("--plots", plots.string(), grades_figures(g));
  return grades_reader_says(html, json, plots);
}

TEST(GradesReport, ChartAndTableMatchTheGradesJsonWithARecommendation) {
  testing::ScratchDir dir;
  EXPECT_EQ(grades_cli_and_report_agree(dir, ""), "ok: 1 chart\n");
  const std::string html = slurp(dir.path / "grades.html");
  EXPECT_EQ(html.find("<b>0.2%"), std::string::npos);
  EXPECT_NE(html.find("&lt;b&gt;0.2%&lt;/b&gt; &amp; co"), std::string::npos);
  EXPECT_NE(html.find("class=\"verdict pass\""), std::string::npos);
}

TEST(GradesReport, NoCombinationMeetingTheRequirementIsAFailWithNothingRinged) {
  testing::ScratchDir dir;
  EXPECT_EQ(grades_cli_and_report_agree(dir, "0.1"), "ok: 1 chart\n");
  EXPECT_NE(slurp(dir.path / "grades.html").find("class=\"verdict fail\""), std::string::npos);
}

TEST(GradesReport, TheReaderNoticesWhenThePageAndTheJsonAreDifferentRuns) {
  // The CLI measures error by the linear band, the page by the worst case.
  testing::ScratchDir dir;
  const std::string out = grades_cli_and_report_agree(dir, "", " --by linear");
  EXPECT_EQ(out.rfind("FAIL: ", 0), 0u) << out;
}

// ------------------------------------------------------------------ through the CLI

// The fermentation probe with its demo catalogue (36 combinations, one grade
// with a setup cost, hence --volume); few Monte Carlo units and temperatures
// every 5 K keep the run short.
const std::string kCliGrades = shell_quote(kGradesScenario) + " --catalogue " +
                               shell_quote(testing::scenario_path("fermentation_probe_catalogue.csv")) +
                               " --volume 5000 --units 500 --conditions.t_step=5";

TEST(GradesReportCli, FermentationProbeReportAndPlotsHoldTheNumbersOfTheSameRunsJson) {
  testing::ScratchDir dir;
  const fs::path json = dir.path / "grades.json", html = dir.path / "grades.html", plots = dir.path / "slides";
  // --plots into a directory that does not exist yet: it is created.
  const auto r = testing::run_cli("grades " + kCliGrades + " --format json --output " + shell_quote(json.string()) +
                                  " --report " + shell_quote(html.string()) + " --plots " + shell_quote(plots.string()));
  ASSERT_EQ(r.status, 0) << r.err;
  // The run has what the chart must show: a front of several combinations
  // and a recommendation.
  const auto j = nlohmann::json::parse(slurp(json));
  EXPECT_EQ(j["combinations"], 36);
  EXPECT_GE(j["front"].size(), 2u);
  EXPECT_FALSE(j["recommendation"].is_null());
  EXPECT_EQ(grades_reader_says(html, json, plots), "ok: 1 chart\n");
}

TEST(GradesReportCli, ADestinationThatCannotBeWrittenIsRefusedBeforeAnyWorkWithOneLine) {
  // A missing directory, a read-only file, a plots directory two levels
  // down, a plots path that is a file.
  testing::expect_unwritable_report_destinations_refused("grades " + kCliGrades);
}

}  // namespace
}  // namespace thermargin
