// Tests of thermargin/report/pick_report.hpp and of `thermargin pick --report
// --plots`: the pick page and chart, built from pick() in process and by the
// CLI, read back by an outside reader (tests/reference/report_choice_check.py:
// Python's html.parser and xml.etree) and held against `thermargin pick
// --format json` run with the same options on the same scenario; candidates
// whose window cannot be read are gaps and lie, with those a constraint rules
// out, in hatched regions; the value axis is logarithmic; a destination that
// cannot be written fails with one line, exit status 2 and nothing written.
#include "thermargin/report/pick_report.hpp"

#include <gtest/gtest.h>

#include <nlohmann/json.hpp>

#include <algorithm>
#include <filesystem>
#include <string>
#include <vector>

#include "cli_run.hpp"
#include "engine_fixture.hpp"

namespace thermargin {
namespace {

namespace fs = std::filesystem;

using testing::shell_quote;

const std::string kScenario = testing::scenario_path("fermentation_probe.ini");
// Ohm values from far too small (the ADC saturates: 1 and 10 ohm against a
// 10 kohm NTC) to far too large, and a self-heating limit that rules out the
// low ones: every kind of row a pick chart has.
const std::string kValues = "1,10,1k,4k7,10k,12k,22k,47k,100k";
// Fewer for the pair search, which tries every pair (and "none" in parallel).
const std::string kPairValues = "1,4k7,12k,47k";
constexpr double kMaxSelfHeating = 0.06;  // K
constexpr double kLimit = 0.5;            // K, the scenario's requirement.max_error

PickOptions pick_page_options(bool parallel) {
  PickOptions o;
  o.values = parse_values(parallel ? kPairValues : kValues, Where{Origin::command_line, "", 0, "--values"});
  o.constraints.max_self_heating = kMaxSelfHeating;
  o.parallel = parallel;
  o.top = 100;
  return o;
}

Scenario pick_page_scenario() { return testing::scenario_with({}, kScenario); }

// What the outside reader (tests/reference/report_choice_check.py) says of
// the page and the plots against the JSON: "ok: 1 chart\n" when they agree.
std::string reader_says(const fs::path& html, const fs::path& json, const fs::path& plots) {
  return testing::reference_output("report_choice_check.py", "pick " + shell_quote(html.string()) + " " +
                                                                 shell_quote(json.string()) + " " + std::to_string(kLimit) +
                                                                 " " + shell_quote(plots.string()));
}

// The same pick through the CLI (JSON) and in process (report), compared by the outside reader.
// `cli_extra` goes to the CLI only, to show that the reader notices two different runs.
std::string cli_and_report_agree(bool parallel, const testing::ScratchDir& dir, const std::string& cli_extra = "") {
  const fs::path json = dir.path / "pick.json", html = dir.path / "pick.html", plots = dir.path / "plots";
  const std::string ran = testing::cli_output("pick " + shell_quote(kScenario) + " --values " +
                                             (parallel ? kPairValues : kValues) + " --max-self-heating 0.06 --top 100" +
                                             (parallel ? " --parallel" : "") + cli_extra + " --format json --output " +
                                             shell_quote(json.string()));
  if (!ran.empty()) return "CLI: " + ran;
  const Scenario s = pick_page_scenario();
  const Design d = build_design(s);
  const PickOptions o = pick_page_options(parallel);
  const PickResult r = pick(s, o);
  write_report(html.string(), pick_report_html(d, s, r, o, kScenario));
  write_figures("--plots", plots.string(), pick_figures(d, r));
  return reader_says(html, json, plots);
}

TEST(PickReport, ChartAndTablesMatchThePickJson) {
  testing::ScratchDir dir;
  EXPECT_EQ(cli_and_report_agree(false, dir), "ok: 1 chart\n");
}

TEST(PickReport, PairSearchMatchesThePickJsonToo) {
  testing::ScratchDir dir;
  EXPECT_EQ(cli_and_report_agree(true, dir), "ok: 1 chart\n");
}

TEST(PickReport, TheReaderNoticesWhenThePageAndTheJsonAreDifferentRuns) {
  // A smaller current limit on the CLI rules out more values than the page
  // shows as ruled out.
  testing::ScratchDir dir;
  const std::string out = cli_and_report_agree(false, dir, " --max-current 150u");
  EXPECT_EQ(out.rfind("FAIL: ", 0), 0u) << out;
}

TEST(PickFigures, UnreadableCandidatesAreGapsInsideTheRuledOutRegion) {
  const Scenario s = pick_page_scenario();
  const Design d = build_design(s);
  const PickResult r = pick(s, pick_page_options(false));
  const auto f = pick_figures(d, r);
  ASSERT_EQ(f.size(), 1u);
  EXPECT_EQ(f[0].file, "pick-candidates.svg");
  EXPECT_EQ(f[0].chart.x.scale, svg::Scale::log10);
  const svg::Series* curve = nullptr;
  std::vector<const svg::Series*> strips;
  for (const auto& series : f[0].chart.series) {
    if (series.name == "objective") curve = &series;
    if (series.name.starts_with("excluded_")) strips.push_back(&series);
  }
  ASSERT_NE(curve, nullptr);
  ASSERT_FALSE(strips.empty());
  int unreadable = 0;
  for (std::size_t i = 0; i < curve->x.size(); ++i) {
    const double ohm = curve->x[i];
    const auto row = std::find_if(r.rows.begin(), r.rows.end(), [&](const PickRow& w) { return w.r_fixed == ohm; });
    ASSERT_NE(row, r.rows.end());
    if (row->status != Status::ok) {
      ++unreadable;
      EXPECT_FALSE(curve->y[i].has_value()) << ohm;  // a gap, never a zero
    }
    bool inside = false;
    for (const auto* sp : strips) inside = inside || (sp->x[0] <= ohm && ohm <= sp->x[1]);
    EXPECT_EQ(inside, !row->feasible()) << ohm;
  }
  EXPECT_GE(unreadable, 1) << "1 ohm against a 10 kohm NTC was meant to saturate";
}

// ------------------------------------------------------------------ through the CLI

// The fermentation probe over E12 from 1 kohm to 1 Mohm (37 values), every
// row kept, with the self-heating limit that rules out 1 to 10 kohm (the
// bead dissipates more with a smaller fixed resistor); temperatures every
// 5 K keep the run short.
const std::string kCliPick = shell_quote(kScenario) + " --series e12 --range 1k..1M --max-self-heating 0.06 --top 100" +
                             " --conditions.t_step=5";

TEST(PickReportCli, FermentationProbeReportAndPlotsHoldTheNumbersOfTheSameRunsJson) {
  testing::ScratchDir dir;
  const fs::path json = dir.path / "pick.json", html = dir.path / "pick.html", plots = dir.path / "slides";
  // --plots into a directory that does not exist yet: it is created.
  const auto r = testing::run_cli("pick " + kCliPick + " --format json --output " + shell_quote(json.string()) + " --report " +
                                  shell_quote(html.string()) + " --plots " + shell_quote(plots.string()));
  ASSERT_EQ(r.status, 0) << r.err;
  // The run has what the chart must show: ruled-out values (a hatched
  // region), values within the limit, and a winner among them.
  const auto j = nlohmann::json::parse(testing::slurp(json));
  ASSERT_EQ(j["rows"].size(), 37u);
  std::size_t ruled_out = 0;
  for (const auto& row : j["rows"]) ruled_out += !row["violations"].empty();
  EXPECT_GT(ruled_out, 0u);
  EXPECT_LT(ruled_out, j["rows"].size());
  EXPECT_TRUE(j["winner"]["violations"].empty());
  EXPECT_EQ(reader_says(html, json, plots), "ok: 1 chart\n");
}

TEST(PickReportCli, ADestinationThatCannotBeWrittenIsRefusedBeforeAnyWorkWithOneLine) {
  // A missing directory, a read-only file, a plots directory two levels
  // down, a plots path that is a file.
  testing::expect_unwritable_report_destinations_refused("pick " + kCliPick);
}

}  // namespace
}  // namespace thermargin
