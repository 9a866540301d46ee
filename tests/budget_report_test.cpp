// Tests of thermargin/report/budget_report.hpp and of `thermargin budget --report
// --plots`: the charts hold the budget's own numbers with gaps where a
// reading saturates; every scenario's page is read back by an outside
// reader (tests/reference/report_check.py: Python's html.parser and
// xml.etree) and every plotted series compared with the JSON output of the
// same run; user text is escaped and spreadsheet formulas neutralised
// (Python's csv module reads the CSV); and a destination that cannot be
// written fails with one line, exit status 2 and no partial file.
#include "thermargin/report/budget_report.hpp"

#include <gtest/gtest.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "cli_run.hpp"
#include "engine_fixture.hpp"
#include "thermargin/chain/chain.hpp"
#include "thermargin/core/error.hpp"
#include "thermargin/input/scenario.hpp"

namespace thermargin {
namespace {

namespace fs = std::filesystem;

using testing::cli_command;
using testing::run_cli;
using testing::run_shell;
using testing::shell_quote;
using testing::slurp;
using Outcome = testing::CliOutcome;
using TempDir = testing::ScratchDir;

// Monte Carlo units for the CLI runs: enough for bands and a yield, quick.
constexpr const char* kPageUnits = "--montecarlo.units=2000";

Outcome budget_page(const std::string& args) { return run_cli("budget " + args); }

// Reads the page and the JSON with the outside reader; "ok: 5 charts\n" when they agree.
std::string check_report(const fs::path& html, const fs::path& json, const fs::path& plots = {}) {
  std::string args = shell_quote(html.string()) + " " + shell_quote(json.string());
  if (!plots.empty()) args += " " + shell_quote(plots.string());
  return testing::reference_output("report_check.py", args);
}

Budget page_budget_of(const Design& d) {
  const Chain chain(d);
  return run_budget(chain);
}

// A shipped scenario ("" for the built-in default) with settings from the command line.
Scenario page_scenario(const std::string& file, const testing::Overrides& overrides) {
  return testing::scenario_with(overrides, file.empty() ? "" : testing::scenario_path(file));
}

const svg::Series& series(const Figure& f, const std::string& name) {
  for (const auto& s : f.chart.series)
    if (s.name == name) return s;
  ADD_FAILURE() << "no series " << name << " in " << f.file;
  static const svg::Series none;
  return none;
}

// ------------------------------------------------------------------ the charts in the library

TEST(BudgetFigures, AreFiveChartsWithStableNamesHoldingTheBudgetsOwnNumbers) {
  const Scenario s = page_scenario("fermentation_probe.ini", {{"montecarlo.units", "2000"}});
  const Design d = build_design(s);
  const Budget b = page_budget_of(d);
  const auto figures = budget_figures(d, b);
  std::vector<std::string> files;
  for (const auto& f : figures) files.push_back(f.file);
  EXPECT_EQ(files, (std::vector<std::string>{"error-bands.svg", "contributors.svg", "sensitivity.svg",
                                             "lsb-size.svg", "self-heating.svg"}));
  const auto& nominal = series(figures[0], "nominal");
  const auto& wc = series(figures[0], "wc");
  const auto& sensitivity = series(figures[2], "abs_sensitivity");
  const auto& lsb = series(figures[3], "lsb_in_k");
  const auto& self = series(figures[4], "self_heating");
  ASSERT_EQ(nominal.y.size(), b.points.size());
  for (std::size_t i = 0; i < b.points.size(); ++i) {
    const auto& p = b.points[i];
    ASSERT_EQ(p.nominal.status, Status::ok) << p.t;
    EXPECT_EQ(nominal.x[i], p.t);
    EXPECT_EQ(*nominal.y[i], p.nominal.error);
    EXPECT_EQ(*wc.y[i], p.wc.low);
    EXPECT_EQ(*wc.y_high[i], p.wc.high);
    EXPECT_EQ(*self.y[i], p.nominal.self_heating);
    EXPECT_EQ(*sensitivity.y[i], std::fabs(p.nominal.sensitivity));
    EXPECT_EQ(*lsb.y[i], p.nominal.lsb_in_k);
  }
  // The window strip and the limit lines come from the requirement.
  EXPECT_EQ(series(figures[0], "window").x, (std::vector<double>{d.requirement.window_min, d.requirement.window_max}));
  EXPECT_EQ(series(figures[0], "limit").y, svg::values(std::vector<double>{-0.5, 0.5}));
  // The bands fit within ±0.6 K here, so the limit lines sit inside the plot, not on its frame.
  ASSERT_TRUE(figures[0].chart.y.min && figures[0].chart.y.max);
  EXPECT_LT(*figures[0].chart.y.min, -0.5);
  EXPECT_GT(*figures[0].chart.y.max, 0.5);
}

TEST(BudgetFigures, ContributorSharesAreTheRowVariancesOverTheCombinedVariance) {
  // Second route to the same number: the linear budget's terms (|c|·u plus
  // each row's second-order terms) and u_c, as JCGM 100 eq. 10 and its note
  // define the shares, not the budget's sorted list.
  const Scenario s = page_scenario("battery_charge_guard.ini", {});
  const Design d = build_design(s);
  const Chain chain(d);
  const Budget b = run_budget(chain, {.monte_carlo = false, .corners = CornerMethod::automatic, .progress = {}});
  const auto figures = budget_figures(d, b);
  constexpr double kShareTolerance = 1e-9;  // percent; two orders of summation
  int compared = 0;
  for (const auto& line : figures[1].chart.series) {
    if (line.name == "others") continue;
    for (std::size_t i = 0; i < b.points.size(); ++i) {
      const auto& lp = b.points[i].linear;
      for (const auto& term : lp.terms)
        if (term.name == line.name) {
          EXPECT_NEAR(*line.y[i], 100.0 * term.variance() / (lp.u_c * lp.u_c), kShareTolerance)
              << line.name << " at " << b.points[i].t;
          ++compared;
        }
    }
  }
  EXPECT_GT(compared, 0);
  // The main curves are the window's ranking, largest first.
  EXPECT_EQ(figures[1].chart.series.front().name, b.window_contributors.front().name);
}

TEST(BudgetFigures, SaturatedTemperaturesAreGapsNeverZeros) {
  // A 10 Ω fixed resistor puts the node within one LSB of the rail once the
  // NTC exceeds 4096 · 10 Ω (below about −7 °C): the ADC saturates there.
  const Scenario s = page_scenario("fermentation_probe.ini", {{"conditions.t_min", "-20"},
                                                         {"divider.r_fixed", "10"},
                                                         {"montecarlo.units", "500"}});
  const Design d = build_design(s);
  const Budget b = page_budget_of(d);
  const auto figures = budget_figures(d, b);
  std::vector<double> saturated;
  for (const auto& p : b.points)
    if (p.nominal.status == Status::saturated) saturated.push_back(p.t);
  ASSERT_FALSE(saturated.empty()) << "the design was meant to saturate";
  ASSERT_LT(saturated.size(), b.points.size());
  for (const auto& f : figures)
    for (const auto& line : f.chart.series) {
      if (line.kind != svg::Kind::line && line.kind != svg::Kind::band) continue;
      for (std::size_t i = 0; i < b.points.size(); ++i)
        if (b.points[i].nominal.status == Status::saturated) {
          EXPECT_FALSE(line.y[i].has_value()) << f.file << " " << line.name << " at " << b.points[i].t;
        }
    }
  // Drawn: the saturated temperatures are not in the plotted data at all,
  // and a hatched strip covers them.
  const std::string svg = svg::render(figures[0].chart);
  const auto at = svg.find("data-name=\"nominal\"");
  ASSERT_NE(at, std::string::npos);
  const std::string head = svg.substr(at, svg.find('>', at) - at);
  EXPECT_EQ(head.find("data-x=\"-20 "), std::string::npos) << head.substr(0, 200);
  const auto& strip = series(figures[0], "unreadable_1");
  EXPECT_EQ(strip.kind, svg::Kind::span);
  EXPECT_TRUE(strip.style.hatched);
  EXPECT_LE(strip.x[0], saturated.front());
  EXPECT_GE(strip.x[1], saturated.back());
}

TEST(BudgetReportPage, CarriesTheCautionBeforeAnyChartAndEscapesTheTitle) {
  Scenario s = page_scenario("", {{"montecarlo.units", "500"}});
  s.set("title", "<b>bold</b> & \"quoted\"", Where{Origin::command_line, "", 0, "title"});
  const Design d = build_design(s);
  const Budget b = page_budget_of(d);
  const std::string html = budget_report_html(d, s, b);
  const auto caution_at = html.find("CAUTION: this is an engineering estimate");
  ASSERT_NE(caution_at, std::string::npos);
  EXPECT_LT(caution_at, html.find("<svg"));
  EXPECT_EQ(html.find("<b>bold"), std::string::npos);
  EXPECT_NE(html.find("Design review: &lt;b&gt;bold&lt;/b&gt; &amp; &quot;quoted&quot;"), std::string::npos);
  EXPECT_EQ(std::count(html.begin(), html.end(), '\0'), 0);
}

// ------------------------------------------------------------------ every scenario through the CLI

class EveryScenario : public ::testing::TestWithParam<std::string> {};

TEST_P(EveryScenario, ReportIsWellFormedAndPlotsExactlyTheJsonNumbers) {
  TempDir dir;
  const std::string file = GetParam();
  // --plots into a directory that does not exist yet: it is created.
  const Outcome r = budget_page(shell_quote(file) + " " + kPageUnits + " --format json --output " + shell_quote((dir.path / "b.json").string()) +
                           " --report " + shell_quote((dir.path / "review.html").string()) + " --plots " +
                           shell_quote((dir.path / "slides").string()));
  ASSERT_EQ(r.status, 0) << r.err;
  // A sixth chart, the settling error, when the ADC's sampling capacitor is modelled.
  const bool settling = testing::design_with({}, file).adc.samples_settle();
  EXPECT_EQ(check_report(dir.path / "review.html", dir.path / "b.json", dir.path / "slides"),
            settling ? "ok: 6 charts\n" : "ok: 5 charts\n");
}

INSTANTIATE_TEST_SUITE_P(Scenarios, EveryScenario, ::testing::ValuesIn(testing::scenario_files()),
                         [](const auto& info) {
                           std::string n = fs::path(info.param).stem().string();
                           std::replace(n.begin(), n.end(), '-', '_');
                           return n;
                         });

TEST(BudgetReportCli, SaturationAndNoMonteCarloStillMatchTheJson) {
  TempDir dir;
  const std::string file = shell_quote(testing::scenario_path("fermentation_probe.ini"));
  for (const std::string extra : {" --conditions.t_min=-20 --divider.r_fixed=10", " --no-mc"}) {
    const Outcome r = budget_page(file + " " + kPageUnits + extra + " --format json --output " +
                             shell_quote((dir.path / "b.json").string()) + " --report " +
                             shell_quote((dir.path / "review.html").string()));
    ASSERT_EQ(r.status, 0) << r.err;
    EXPECT_EQ(check_report(dir.path / "review.html", dir.path / "b.json"), "ok: 5 charts\n") << extra;
  }
}

// ------------------------------------------------------------------ user text

TEST(BudgetReportCli, ScenarioTitleWithMarkupAppearsEscaped) {
  TempDir dir;
  const std::string title = "<script>alert(\"x\")</script> Tom & Jerry's \"probe\"";
  std::ofstream(dir.path / "evil.ini") << "title = " << title << "\n";
  const Outcome r = budget_page(shell_quote((dir.path / "evil.ini").string()) + " " + kPageUnits + " --format json --output " +
                           shell_quote((dir.path / "b.json").string()) + " --report " +
                           shell_quote((dir.path / "review.html").string()));
  ASSERT_EQ(r.status, 0) << r.err;
  const std::string html = slurp(dir.path / "review.html");
  EXPECT_EQ(html.find("<script"), std::string::npos);
  EXPECT_NE(html.find("&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; Tom &amp; Jerry&#39;s &quot;probe&quot;"),
            std::string::npos);
  // The outside reader finds the title, unescaped, as the heading (and no script).
  EXPECT_EQ(check_report(dir.path / "review.html", dir.path / "b.json"), "ok: 5 charts\n");
}

TEST(BudgetCsvCli, CellsThatWouldRunAsFormulasAreNeutralised) {
  TempDir dir;
  std::ofstream(dir.path / "formula.ini") << "title = =HYPERLINK(\"http://example.invalid\",\"x\")\n";
  std::ofstream(dir.path / "read.py")
      << "import csv, sys\n"
         "rows = list(csv.reader(l for l in open(sys.argv[1], newline='', encoding='utf-8') if not l.startswith('#')))\n"
         "width = len(rows[0])\n"
         "assert all(len(r) == width for r in rows), 'ragged rows'\n"
         "def number(c):\n"
         "    try:\n"
         "        float(c); return True\n"
         "    except ValueError:\n"
         "        return False\n"
         "bad = [c for r in rows for c in r if c[:1] in ('=', '+', '-', '@', '\\t', '\\r') and not number(c)]\n"
         "print(len(rows), len(bad))\n"
         "for r in rows:\n"
         "    if r[0] == 'title': print(r[1])\n";
  const std::string reader = std::string(THERMARGIN_PYTHON) + " " + shell_quote((dir.path / "read.py").string()) + " ";
  // `check` prints the user's title as a cell: it must come back as text.
  Outcome r = run_cli("check " + shell_quote((dir.path / "formula.ini").string()) + " --format csv --output " +
                      shell_quote((dir.path / "check.csv").string()));
  ASSERT_EQ(r.status, 0) << r.err;
  r = run_shell(reader + shell_quote((dir.path / "check.csv").string()));
  std::istringstream lines(r.out);
  std::string counts, title;
  std::getline(lines, counts);
  std::getline(lines, title);
  EXPECT_EQ(counts.substr(counts.find(' ') + 1), "0") << r.out << r.err;
  EXPECT_EQ(title, "'=HYPERLINK(\"http://example.invalid\",\"x\")");
  // The budget's CSV: every row as wide as the header, no cell a formula.
  r = budget_page(shell_quote((dir.path / "formula.ini").string()) + " " + kPageUnits + " --format csv --output " +
                 shell_quote((dir.path / "b.csv").string()));
  ASSERT_EQ(r.status, 0) << r.err;
  r = run_shell(reader + shell_quote((dir.path / "b.csv").string()));
  EXPECT_EQ(r.out.substr(r.out.find(' ') + 1, 2), "0\n") << r.out << r.err;
}

// ------------------------------------------------------------------ destinations that cannot be written

TEST(BudgetReportCli, MissingDirectoryFailsBeforeAnyWorkWithOneLine) {
  TempDir dir;
  const fs::path target = dir.path / "missing" / "review.html";
  const Outcome r = budget_page(std::string(kPageUnits) + " --report " + shell_quote(target.string()));
  EXPECT_EQ(r.status, 2);
  EXPECT_EQ(r.out, "");  // refused before the analysis printed anything
  EXPECT_EQ(std::count(r.err.begin(), r.err.end(), '\n'), 1) << r.err;
  EXPECT_NE(r.err.find("--report = " + target.string() + " (command line): directory"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("does not exist"), std::string::npos) << r.err;
  EXPECT_TRUE(dir.names().empty());
}

TEST(BudgetPlotsCli, DirectoryWhoseParentIsMissingIsRefusedAndNothingIsCreated) {
  TempDir dir;
  const fs::path target = dir.path / "a" / "b";
  const Outcome r = budget_page(std::string(kPageUnits) + " --plots " + shell_quote(target.string()));
  EXPECT_EQ(r.status, 2);
  EXPECT_EQ(std::count(r.err.begin(), r.err.end(), '\n'), 1) << r.err;
  EXPECT_NE(r.err.find("--plots = " + target.string() + " (command line)"), std::string::npos) << r.err;
  EXPECT_TRUE(dir.names().empty());
}

TEST(BudgetPlotsCli, AFileThatCannotBeReplacedLeavesNoPartialSetOfPlots) {
  // contributors.svg is a directory: found before any file is written, so
  // neither the other three charts nor a staged file appear.
  TempDir dir;
  fs::create_directories(dir.path / "plots" / "contributors.svg");
  const Outcome r = budget_page(std::string(kPageUnits) + " --plots " + shell_quote((dir.path / "plots").string()));
  EXPECT_EQ(r.status, 2);
  EXPECT_EQ(std::count(r.err.begin(), r.err.end(), '\n'), 1) << r.err;
  EXPECT_NE(r.err.find("cannot write contributors.svg"), std::string::npos) << r.err;
  EXPECT_EQ(dir.names("plots"), std::vector<std::string>{"contributors.svg"});
}

TEST(BudgetPlots, WriteFailureHalfwayRemovesTheStagedFilesAndTheNewDirectory) {
  // Library level: the third figure's name is unusable (a name with a slash
  // into a missing directory), so staging fails after two files were staged.
  TempDir dir;
  svg::Chart c;
  c.title = "t";
  c.series.push_back(svg::line("y", "y", {0, 1}, {0.0, 1.0}));
  const std::vector<Figure> figures{{"a.svg", "", c}, {"b.svg", "", c}, {"missing/c.svg", "", c}};
  const fs::path plots = dir.path / "new";
  std::string message;
  try {
    write_figures("--plots", plots.string(), figures);
  } catch (const input_error& e) {
    message = e.what();
  }
  EXPECT_NE(message.find("--plots = " + plots.string() + " (command line): cannot write missing/c.svg"),
            std::string::npos)
      << message;
  EXPECT_TRUE(dir.names().empty());  // the directory this call made is gone again
}

using testing::unprivileged;

TEST(BudgetReportCli, ReadOnlyReportKeepsItsContentsAndNoTemporaryIsLeft) {
  TempDir dir;
  const fs::path target = dir.path / "review.html";
  std::ofstream(target) << "old";
  fs::permissions(target, fs::perms(0444));
  const Outcome r =
      run_shell(unprivileged(cli_command("budget " + std::string(kPageUnits) + " --report " + shell_quote(target.string())), dir.path));
  EXPECT_EQ(r.status, 2) << r.err;
  EXPECT_EQ(std::count(r.err.begin(), r.err.end(), '\n'), 1) << r.err;
  EXPECT_NE(r.err.find(target.string()), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("read-only"), std::string::npos) << r.err;
  EXPECT_EQ(slurp(target), "old");
  EXPECT_EQ(dir.names(), std::vector<std::string>{"review.html"});
}

TEST(BudgetPlotsCli, ReadOnlyChartKeepsItsContentsAndNoOtherChartIsWritten) {
  TempDir dir;
  const fs::path plots = dir.path / "plots";
  fs::create_directory(plots);
  std::ofstream(plots / "sensitivity.svg") << "old";
  fs::permissions(plots / "sensitivity.svg", fs::perms(0444));
  if (::geteuid() == 0) fs::permissions(plots, fs::perms::all);
  const Outcome r =
      run_shell(unprivileged(cli_command("budget " + std::string(kPageUnits) + " --plots " + shell_quote(plots.string())), dir.path));
  EXPECT_EQ(r.status, 2) << r.err;
  EXPECT_NE(r.err.find("cannot write sensitivity.svg: the file is read-only"), std::string::npos) << r.err;
  EXPECT_EQ(slurp(plots / "sensitivity.svg"), "old");
  EXPECT_EQ(dir.names("plots"), std::vector<std::string>{"sensitivity.svg"});
}

TEST(BudgetReportPaths, AreRefusedWithTheOptionThePathAndWhatWouldBeAccepted) {
  TempDir dir;
  auto message = [](auto f) {
    try {
      f();
    } catch (const input_error& e) {
      return std::string(e.what());
    }
    return std::string("(no error)");
  };
  EXPECT_EQ(message([&] { check_report_path("--report", dir.path.string()); }),
            "--report = " + dir.path.string() + " (command line): is a directory; give a file name such as review.html");
  std::ofstream(dir.path / "file") << "x";
  EXPECT_EQ(message([&] { check_plots_directory("--plots", (dir.path / "file").string()); }),
            "--plots = " + (dir.path / "file").string() + " (command line): is a file, not a directory");
  EXPECT_EQ(message([&] { check_plots_directory("--plots", (dir.path / "new").string()); }), "(no error)");
  EXPECT_EQ(message([&] { check_report_path("--report", "review.html"); }), "(no error)");
}

}  // namespace
}  // namespace thermargin
