// Physical limits are results, resource limits are refusals (DEVELOPERS.md
// "Three kinds of failure", docs/refusals.md).
//
// A design that saturates the ADC, runs away thermally, leaves its sensor's
// R–T table or gives the firmware a reading it cannot convert is analysed:
// the command exits 0, each affected temperature carries its status in every
// output format (JSON "status", the CSV status column, the text table's
// phrase), the run is summarised (the verdict's reason, the text's note), and
// no printed number anywhere is nan or inf. A request beyond what the
// machine can do in reasonable time is refused up front with exit 2 and the
// count it would have produced.

#include <algorithm>
#include <cstdio>
#include <regex>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "cli_run.hpp"
#include "engine_fixture.hpp"
#include "thermargin/core/number.hpp"

#include "thermargin/engines/budget.hpp"
#include "thermargin/chain/chain.hpp"
#include "thermargin/input/scenario.hpp"

namespace thermargin {
namespace {

using Outcome = testing::CliOutcome;
using testing::run_cli;

// A number that is not one, as C's printf, JSON libraries or a person would write it.
bool prints_non_finite(const std::string& text) {
  static const std::regex bad(R"((^|[^A-Za-z_])[-+]?(nan|inf|infinity)($|[^A-Za-z_]))", std::regex::icase);
  return std::regex_search(text, bad);
}

std::vector<std::string> split(const std::string& line, char sep) {
  std::vector<std::string> cells;
  std::string cell;
  std::istringstream in(line);
  while (std::getline(in, cell, sep)) cells.push_back(cell);
  if (!line.empty() && line.back() == sep) cells.emplace_back();
  return cells;
}

// One physical limit: a design that reaches it and the status it must show.
struct Limit {
  const char* what;
  std::string args;  // the design, as options (a scenario file where needed)
  Status status;
  bool in_window;    // some temperature inside the requirement window reaches it
};

const std::string limits_quick = " --montecarlo.units=2000 --conditions.t_step=5";

std::vector<Limit> limits() {
  return {
      // 10k/10k from 3.3 V into a 1.0 V reference: the node is above the
      // reference while the NTC is above 4.35 kOhm, below about 45 degC.
      {"saturation at the ADC rail", "--supply.ratiometric=false --supply.v_reference=1.0V" + limits_quick, Status::saturated, true},
      // 50 V across 100 Ohm + 1 Ohm into an element that sheds 0.1 mW/K: no
      // stable self-heating anywhere.
      {"thermal runaway",
       "--sensor.r25=100 --divider.r_fixed=1 --supply.v_excitation=50V --sensor.dissipation=0.1mW/K" + limits_quick,
       Status::runaway, true},
      // A table from 0 to 50 degC analysed from -20 to 80 degC.
      {"a sensor outside its table",
       "--sensor.model=table --sensor.table_file=" + testing::data_path("chain/ntc10k_sh_0_50.csv") +
           " --firmware.conversion=exact --requirement.window_min=10 --requirement.window_max=40" + limits_quick,
       Status::out_of_table, false},
      // The firmware subtracts 1 MOhm of "lead resistance" from a 10k NTC:
      // every reading leaves a negative resistance, which has no temperature.
      {"a firmware conversion with no solution", "--firmware.lead_compensation=1M" + limits_quick, Status::no_solution, true},
  };
}

TEST(PhysicalLimits, AreReportedPerTemperatureAndSummarisedInJsonWithNoNumberThatIsNotFinite) {
  for (const Limit& l : limits()) {
    SCOPED_TRACE(l.what);
    const Outcome r = run_cli("budget " + l.args + " --format json");
    ASSERT_EQ(r.status, 0) << r.err;
    EXPECT_TRUE(r.err.empty()) << r.err;
    EXPECT_FALSE(prints_non_finite(r.out));
    const auto j = nlohmann::json::parse(r.out);
    int reached = 0;
    for (const auto& p : j["points"]) {
      if (p.value("status", "ok") != to_string(l.status)) continue;
      ++reached;
      for (const char* field : {"nominal", "code", "wc_low", "wc_high", "rss_low", "rss_high", "mc_low", "mc_high"})
        EXPECT_FALSE(p.contains(field)) << p["t"] << " " << field;
      if (l.status == Status::saturated) {
        EXPECT_EQ(p.value("saturated", false), true) << p["t"];
      }
    }
    EXPECT_GT(reached, 0);
    // The run's summary: every temperature some engine could not read is counted.
    EXPECT_GE(j["window"]["status_points"].get<int>(), reached);
    // The window's summary: a limit inside the window fails the verdict and says why.
    // The window's summary: a limit inside the window fails the verdict and
    // says where, apart from the error where the window reads.
    if (l.in_window) {
      EXPECT_EQ(j["window"]["verdict"], "fail");
      const std::string reason = j["window"]["reason"];
      EXPECT_EQ(reason.rfind("inside the window, ", 0), 0u) << reason;
      ASSERT_TRUE(j["window"].contains("unreadable")) << reason;
      bool named = false;
      for (const auto& run : j["window"]["unreadable"]) {
        named = named || run["status"] == std::string(to_string(l.status));
        EXPECT_NE(reason.find(fixed(run["from"].get<double>(), 2)), std::string::npos) << reason;
      }
      EXPECT_TRUE(named) << reason;
    }
  }
}

TEST(PhysicalLimits, AWindowWithNoReadableTemperatureHasNoLargestErrorRatherThanZero) {
  const std::string design = "budget --firmware.lead_compensation=1M" + limits_quick;
  const auto j = nlohmann::json::parse(run_cli(design + " --format json").out);
  EXPECT_EQ(j["window"]["verdict"], "fail");
  for (const char* field : {"wc_max_abs", "wc_max_at", "rss_max_abs", "mc_max_abs", "margin"})
    EXPECT_TRUE(j["window"][field].is_null()) << field << " = " << j["window"][field];
  const Outcome text = run_cli(design);
  ASSERT_EQ(text.status, 0) << text.err;
  for (const char* engine : {"\nworst case ", "\nlinear budget ", "\nMonte Carlo "}) {
    const auto at = text.out.find(engine);
    ASSERT_NE(at, std::string::npos) << engine;
    const std::string row = text.out.substr(at + 1, text.out.find('\n', at + 1) - at - 1);
    EXPECT_NE(row.find("n/a"), std::string::npos) << row;
    EXPECT_EQ(row.find("0.000 K"), std::string::npos) << row;
  }
}

TEST(PhysicalLimits, AreReportedPerTemperatureInCsvWithEmptyCellsNotNumbers) {
  for (const Limit& l : limits()) {
    SCOPED_TRACE(l.what);
    const Outcome r = run_cli("budget " + l.args + " --format csv");
    ASSERT_EQ(r.status, 0) << r.err;
    EXPECT_FALSE(prints_non_finite(r.out));
    std::istringstream in(testing::csv_without_comments(r.out));
    std::string line;
    std::getline(in, line);
    const auto head = split(line, ',');
    ASSERT_GE(head.size(), 9u);
    ASSERT_EQ(head[2], "status");
    const std::size_t nominal = static_cast<std::size_t>(std::find(head.begin(), head.end(), "nominal_K") - head.begin());
    ASSERT_LT(nominal, head.size()) << "no nominal_K column";
    // The status column holds the nominal reading's status, or else the
    // first status some worst-case corner met (its numbers are then there).
    int unreadable = 0;
    while (std::getline(in, line)) {
      const auto cells = split(line, ',');
      ASSERT_EQ(cells.size(), head.size()) << line;
      if (!cells[nominal].empty()) continue;
      EXPECT_NE(cells[2], "ok") << "a row with no nominal error and no status: " << line;
      for (std::size_t i = 3; i < cells.size(); ++i) EXPECT_TRUE(cells[i].empty()) << head[i] << ": " << line;
      unreadable += cells[2] == to_string(l.status);
    }
    EXPECT_GT(unreadable, 0);
  }
}

TEST(PhysicalLimits, AreNamedInTheTextTableAndCountedInItsNote) {
  for (const Limit& l : limits()) {
    SCOPED_TRACE(l.what);
    const Outcome r = run_cli("budget " + l.args + " --detail");
    ASSERT_EQ(r.status, 0) << r.err;
    EXPECT_FALSE(prints_non_finite(r.out));
    // Rows of the per-temperature table of the nominal chain that say it in
    // its status column (the verdict line may too).
    const auto table = r.out.find("\nPer temperature, the nominal chain");
    ASSERT_NE(table, std::string::npos);
    int rows = 0;
    std::istringstream in(r.out.substr(table, r.out.find("\nPer temperature, the bands") - table));
    const std::regex says("^-?[0-9.]+\\*? +" + std::string(to_string(l.status)) + "( |$)");
    for (std::string line; std::getline(in, line);) rows += std::regex_search(line, says);
    EXPECT_GT(rows, 0) << "no row says: " << to_string(l.status);
    // The ranges that cannot be read, named with what happens there.
    std::smatch m;
    ASSERT_TRUE(std::regex_search(r.out, m, std::regex(R"(Temperatures that cannot be read \((\d+) with some engine's status\))")));
    EXPECT_GE(std::stoi(m[1]), rows);
    EXPECT_NE(r.out.find(std::string(describe(l.status)), m.position(0)), std::string::npos);
    if (l.in_window) {
      EXPECT_NE(r.out.find("VERDICT: FAIL"), std::string::npos);
    }
  }
}

TEST(PhysicalLimits, PickAndTablePrintNoNumberThatIsNotFiniteForTheseDesigns) {
  for (const Limit& l : limits()) {
    SCOPED_TRACE(l.what);
    for (const char* format : {"text", "csv", "json"}) {
      const Outcome pick = run_cli("pick " + l.args + " --values=1k,10k,100k --no-guidance --format " + format);
      EXPECT_EQ(pick.status, 0) << format << ": " << pick.err;
      EXPECT_FALSE(prints_non_finite(pick.out)) << format;
      const Outcome table = run_cli("table " + l.args + " --points=9 --format " + format);
      if (table.status == 0) {
        EXPECT_FALSE(prints_non_finite(table.out)) << format;
      } else {
        EXPECT_EQ(table.status, 2) << format << ": a table that cannot be made is refused: " << table.err;
      }
    }
  }
}

// The detector itself, on what printf and nlohmann write and on what is fine.
TEST(PhysicalLimits, TheNonFiniteDetectorFindsNanAndInfAndPassesOrdinaryWords) {
  for (const char* bad : {"-nan", "x,nan,y", "inf", "-inf K", "NaN", "Infinity", "1,INF\n"})
    EXPECT_TRUE(prints_non_finite(bad)) << bad;
  for (const char* fine : {"information", "infinite", "nano", "finance", "1.5e-3", "null", "n/a"})
    EXPECT_FALSE(prints_non_finite(fine)) << fine;
}

TEST(ResourceLimits, AHugeRangeOrStepIsRefusedWithTheCountItWouldProduce) {
  // -20..80 degC in 1 uK steps: 100 000 001 temperatures.
  const Outcome r = run_cli("check --conditions.t_step=1u");
  EXPECT_EQ(r.status, 2);
  EXPECT_EQ(r.err, "thermargin: conditions.t_step = 1u (command line): gives 100000001 temperatures; at most 100001 "
                   "are analysed\n");
  // -270..1000 degC in 10 mK steps: 127 001 temperatures.
  const Outcome wide = run_cli("check --conditions.t_min=-270 --conditions.t_max=1000 --conditions.t_step=0.01 "
                              "--requirement.window_min=0");
  EXPECT_EQ(wide.status, 2);
  EXPECT_NE(wide.err.find("gives 127001 temperatures; at most 100001"), std::string::npos) << wide.err;
  // The largest range accepted: exactly 100 001 temperatures.
  EXPECT_EQ(testing::design_with({{"conditions.t_step", "1m"}}).conditions.temperatures().size(), 100001u);
  EXPECT_EQ(run_cli("check --conditions.t_step=1m").status, 0);
}

}  // namespace
}  // namespace thermargin

namespace thermargin {
namespace {

Design with_units(const std::string& units, const std::string& averaging = "1") {
  return testing::design_with({{"montecarlo.units", units}, {"adc.averaging", averaging}});
}

TEST(ResourceLimits, AMonteCarloRunOfHoursIsRefusedUpFrontWithItsSizeAndEstimate) {
  // 1e9 units x 201 temperatures (-20..80 degC in 0.5 K) x 1 sample = 2.01e11 > 2e11.
  const Outcome r = run_cli("budget --montecarlo.units=1e9 --format json");
  EXPECT_EQ(r.status, 2);
  EXPECT_TRUE(r.out.empty());
  EXPECT_EQ(r.err, "thermargin: montecarlo.units = 1e9 (command line): 1e+09 units x 201 temperatures x 1 sample(s) per "
                   "reading = 2.01e+11 simulated ADC samples, about 67 minutes of one core; at most 2e+11 are simulated: "
                   "fewer units (or auto), a coarser conditions.t_step or a narrower t_min..t_max, or budget --no-mc\n");
  // Averaging multiplies the samples: 1e8 x 201 x 16 = 3.2e11.
  const Outcome averaged = run_cli("budget --montecarlo.units=1e8 --adc.averaging=16");
  EXPECT_EQ(averaged.status, 2);
  EXPECT_NE(averaged.err.find("montecarlo.units = 1e8 (command line): 1e+08 units x 201 temperatures x 16 sample(s)"),
            std::string::npos)
      << averaged.err;
  // auto may run up to its cap, which is then the key named.
  const Outcome automatic = run_cli("budget --montecarlo.units=auto --montecarlo.max_units=1e9");
  EXPECT_EQ(automatic.status, 2);
  EXPECT_NE(automatic.err.find("montecarlo.max_units = 1e9 (command line): auto may run up to 1e+09 units"), std::string::npos)
      << automatic.err;
  // The same design without the Monte Carlo run is analysed.
  EXPECT_EQ(run_cli("budget --montecarlo.units=1e9 --no-mc --conditions.t_step=10").status, 0);
  // The limit itself, through the library: 2e11 / 201 = 995 024 875 units.
  BudgetOptions o;
  Scenario s;
  EXPECT_NO_THROW(require_feasible(with_units("995000000"), s, o));
  EXPECT_THROW(require_feasible(with_units("995100000"), s, o), input_error);
  EXPECT_THROW(require_feasible(with_units("62200000", "16"), s, o), input_error);  // 62.2e6 x 201 x 16 = 2.0003e11
  o.monte_carlo = false;
  EXPECT_NO_THROW(require_feasible(with_units("1e9"), s, o));
}

TEST(ResourceLimits, EnumeratingEveryCornerForHoursIsRefusedWithTheCount) {
  // 17 active inputs at 100 001 temperatures: 2^17 x 100001 = 1.31e10 corner evaluations.
  const std::string design =
      " --conditions.t_step=1m --supply.ratiometric=false --supply.v_reference=3.3V --supply.v_excitation_tol=1%"
      " --supply.v_excitation_tempco=50ppm --supply.v_reference_tol=0.5% --supply.v_reference_tempco=20ppm"
      " --adc.leakage=10n --divider.r_parallel=100k --divider.r_parallel_tol=1% --firmware.calibration=two-point"
      " --firmware.calibration_at=0,60";
  const Outcome r = run_cli("budget --no-mc --corners=enumerate" + design);
  EXPECT_EQ(r.status, 2);
  EXPECT_NE(r.err.find("--corners = enumerate (command line): 17 active inputs give 2^17 corners x 100001 temperatures = "
                       "1.31e+10 chain evaluations"),
            std::string::npos)
      << r.err;
  EXPECT_EQ(r.err.find('\n'), r.err.size() - 1);
}

}  // namespace
}  // namespace thermargin
