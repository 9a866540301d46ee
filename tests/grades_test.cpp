// Checks of part grades against cost (grades.hpp) and `thermargin grades`.
//
// Outside references: a catalogue whose answer is worked out by hand from
// the closed-form error of an ideal chain (below, with the reasoning); the
// definition of a Pareto front applied by brute force; the cost formulas
// worked by hand; the picker run on its own over the whole series; the
// budget engines run on their own on the re-picked design; and a second
// opinion from NumPy (tests/reference/grades_second_opinion.py, Debian's
// /usr/bin/python3) that reads the catalogue with Python's csv module and
// computes its own worst cases, yields (a NumPy Monte Carlo), costs, front and
// recommendation, without reading the program's output.
#include "thermargin/tools/grades.hpp"

#include <nlohmann/json.hpp>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "cli_run.hpp"
#include "engine_fixture.hpp"
#include "thermargin/engines/budget.hpp"
#include "thermargin/core/caution.hpp"

namespace thermargin {
namespace {

namespace fs = std::filesystem;
using testing::ideal;
using testing::Overrides;
using testing::scenario_with;

// The closed form below against the engine at 24 bits: the engine's only
// extra is the ±½ LSB reading interval, a few µK there.
constexpr double kClosedFormTolerance = 1e-4;  // K
constexpr double kCostTolerance = 1e-12;       // sums of a few decimal prices
constexpr std::uint64_t kGradesUnits = 2000;         // Monte Carlo units per combination in these tests

using testing::shell_quote;
using Outcome = testing::CliOutcome;
using TempDir = testing::ScratchDir;

Outcome cli(const std::string& args) { return testing::run_cli("grades " + args); }

// --- The catalogue whose answer is known by construction --------------------
//
// An ideal chain (engine_fixture.hpp: no ADC errors, 24 bits, no noise,
// no self-heating, no output rounding, the board at 25 °C) whose only
// tolerances are the NTC's R25 (±a) and B (±b) and the fixed resistor (±f).
// The firmware converts with the sensor's own nominal beta curve and inverts
// the divider with the nominal fixed resistor, so a unit reads the
// resistance R_unit/(1 + δf) and
//     1/T_est = 1/T + [ln(1 + δR) − ln(1 + δf)]/B + δβ·(1/T − 1/T0)
// (docs/model.md §1 for the unit's curve, §3 for the divider). T_est falls as
// 1/T_est rises, so the extreme errors sit at the corners (δR, δf) = (±a, ∓f)
// and δβ = ±b; the B term grows with |1/T − 1/T0|, i.e. away from 25 °C.
//
// Per 1 % of R25 or of the resistor the error is T²·0.00995/B: 0.19 K at
// 0 °C, 0.28 K at 60 °C. A 1 % B spread adds T²·0.01·|1/T − 1/T0|: 0.23 K at
// 0 °C, 0.16 K at 40 °C, but 0.39 K at 60 °C, the window's hot corner.
// With a limit of 0.47 K:
//   window 0..40 °C: r25 1 %, beta 1 %, resistor 0.1 % stays within it
//     (0.44 K at 0 °C: 0.19 + 0.02 + 0.23) and costs 0.10 + 0.05 + 0.03 =
//     0.18; the only cheaper combination, all 1 % at 0.16, reaches 0.66 K.
//   window 0..60 °C: the same parts reach 0.70 K at 60 °C (0.28 + 0.03 +
//     0.39). Tightening R25 to 0.5 % is not enough (0.56 K), nor is the
//     tight B with the 1 % resistor (0.64 K, and 0.50 K with R25 0.5 %);
//     B at 0.2 % with the 0.1 % resistor (0.39 K) is needed: 0.10 + 0.30 +
//     0.03 = 0.43, below r25 0.5 % + B 0.2 % + 0.1 % at 0.58.
// The expensive B grade is needed only because of the window's hot corner.
constexpr const char* kConstructed =
    "slot,grade,unit_cost,settings,notes\n"
    "r25,1%,0.10,sensor.r25_tol=1%,invented prices\n"
    "r25,0.5%,0.25,sensor.r25_tol=0.5%,\n"
    "beta,1%,0.05,sensor.beta_tol=1%,\n"
    "beta,0.2%,0.30,sensor.beta_tol=0.2%,\n"
    "resistor,1%,0.01,divider.r_fixed_tol=1%,\n"
    "resistor,0.1%,0.03,divider.r_fixed_tol=0.1%,\n";
constexpr double kConstructedLimit = 0.47;  // K
constexpr double kBeta = 3950.0;            // K, the default sensor's B

Overrides constructed(double window_max) {
  return ideal({{"requirement.max_error", "0.47"}, {"requirement.window_max", std::to_string(window_max)}});
}

// The closed form above, on the engine's temperature grid (0.5 K steps).
double hand_worst_case(double a, double b, double f, double t_min, double t_max) {
  const double t0 = 298.15;
  double worst = 0.0;
  for (double t = t_min; t <= t_max + 1e-9; t += 0.5) {
    const double T = t + 273.15, x = 1.0 / T - 1.0 / t0;
    for (double sr : {-1.0, 1.0})
      for (double sb : {-1.0, 1.0}) {
        const double u = (std::log1p(sr * a) - std::log1p(-sr * f)) / kBeta + sb * b * x;
        worst = std::max(worst, std::fabs(1.0 / (1.0 / T + u) - T));
      }
  }
  return worst;
}

double fraction(const std::string& grade) { return std::stod(grade) / 100.0; }  // "0.5%" -> 0.005

GradesOptions grades_quick() {
  GradesOptions o;
  o.units = kGradesUnits;
  return o;
}

const GradeRow& row_of(const GradesResult& g, const std::vector<std::string>& grades) {
  for (const auto& r : g.rows) {
    bool same = true;
    for (std::size_t k = 0; k < grades.size(); ++k) same = same && g.grades[k][static_cast<std::size_t>(r.choice[k])] == grades[k];
    if (same) return r;
  }
  ADD_FAILURE() << "no row for the choice";
  return g.rows.front();
}

TEST(Grades, TheHotCornerOfTheWindowForcesTheExpensiveBetaGrade) {
  const Catalogue cat = parse_catalogue(kConstructed, "constructed.csv");
  for (double window_max : {60.0, 40.0}) {
    SCOPED_TRACE("window 0.." + std::to_string(window_max));
    const GradesResult g = evaluate_grades(scenario_with(constructed(window_max)), cat, grades_quick());
    ASSERT_EQ(g.rows.size(), 8u);
    // Every combination's worst case against the closed form.
    for (const auto& r : g.rows) {
      const double a = fraction(g.grades[0][static_cast<std::size_t>(r.choice[0])]);
      const double b = fraction(g.grades[1][static_cast<std::size_t>(r.choice[1])]);
      const double f = fraction(g.grades[2][static_cast<std::size_t>(r.choice[2])]);
      ASSERT_TRUE(r.wc_max_abs);
      EXPECT_NEAR(*r.wc_max_abs, hand_worst_case(a, b, f, 0.0, window_max), kClosedFormTolerance) << g.choice_text(r);
      EXPECT_EQ(r.meets_requirement, *r.wc_max_abs <= kConstructedLimit && r.mc && r.mc->yield >= 0.99) << g.choice_text(r);
    }
    ASSERT_TRUE(g.recommendation);
    const GradeRow& rec = g.rows[*g.recommendation];
    if (window_max == 60.0) {
      EXPECT_EQ(g.choice_text(rec), "r25 = 1%, beta = 0.2%, resistor = 0.1%");
      EXPECT_NEAR(rec.unit_cost, 0.43, kCostTolerance);  // 0.10 + 0.30 + 0.03, by hand
    } else {
      EXPECT_EQ(g.choice_text(rec), "r25 = 1%, beta = 1%, resistor = 0.1%");
      EXPECT_NEAR(rec.unit_cost, 0.18, kCostTolerance);  // 0.10 + 0.05 + 0.03
    }
    // The tool's own figures agree with the hand reasoning's margins.
    EXPECT_LE(*rec.wc_max_abs, kConstructedLimit);
    EXPECT_GT(rec.mc->yield, 0.99);
  }
}

TEST(Grades, RowsAreSortedByCostAndMonteCarloRunsOnlyWhereTheRequirementCanBeMet) {
  const Catalogue cat = parse_catalogue(kConstructed, "constructed.csv");
  const GradesResult g = evaluate_grades(scenario_with(constructed(60.0)), cat, grades_quick());
  for (std::size_t i = 1; i < g.rows.size(); ++i) EXPECT_LE(g.rows[i - 1].unit_cost, g.rows[i].unit_cost);
  // Worst-case basis: the error part of the requirement is deterministic, so
  // a combination over the limit gets no simulation; one within it does.
  for (const auto& r : g.rows) {
    EXPECT_EQ(r.mc_run, *r.wc_max_abs <= kConstructedLimit) << g.choice_text(r);
    if (!r.mc_run) EXPECT_NE(r.verdict.find("over the limit"), std::string::npos) << r.verdict;
  }
  EXPECT_EQ(g.mc_full, 2u);  // (1 %, 0.2 %, 0.1 %) and (0.5 %, 0.2 %, 0.1 %), from the reasoning above
  // Every simulated row used the same units.
  for (const auto& r : g.rows)
    if (r.mc_run) EXPECT_EQ(r.mc->units, kGradesUnits);
}

// --- Costs -----------------------------------------------------------------

TEST(Grades, CostPerGoodUnitIsTheBuildCostSharedByTheGoodUnits) {
  // 100 units at 1.00 with 80 % yield: 100.00 spent plus 20 failed units at
  // 2.00 of scrap or rework is 140.00 for 80 good units, 1.75 each (by hand).
  EXPECT_NEAR(*cost_per_good_unit(1.00, 0.8, 2.00), 1.75, kCostTolerance);
  EXPECT_NEAR(*cost_per_good_unit(0.50, 1.0, 9.00), 0.50, kCostTolerance);  // nothing fails, nothing is lost
  EXPECT_FALSE(cost_per_good_unit(1.00, 0.0, 2.00));                       // no good unit at any price
  EXPECT_EQ(money(0.27), "0.27");
  EXPECT_EQ(money(0.148), "0.148");
  EXPECT_EQ(money(2700.0), "2700.00");
  EXPECT_EQ(money(0.00125), "0.0013");
}

TEST(Grades, SetupCostsAreSpreadOverTheVolumeAndAVolumeIsRequired) {
  // The constructed catalogue with a setup cost column: the 0.5 % R25 grade
  // needs a sorting fixture of 400.
  std::string with_setup;
  std::istringstream in(kConstructed);
  std::string line;
  bool head = true;
  while (std::getline(in, line)) {
    with_setup += line + (head ? ",setup_cost" : line.starts_with("r25,0.5%") ? ",400" : ",") + "\n";
    head = false;
  }
  const Catalogue cat = parse_catalogue(with_setup, "setup.csv");
  GradesOptions o = grades_quick();
  try {
    (void)evaluate_grades(scenario_with(constructed(60.0)), cat, o);
    ADD_FAILURE() << "a setup cost without a volume was accepted";
  } catch (const input_error& e) {
    EXPECT_EQ(std::string(e.what()),
              "--volume = (empty) (command line): the catalogue has setup costs (setup.csv:3:6); give the production "
              "volume they are spread over, e.g. --volume 10000");
  }
  o.volume = 2000.0;
  const GradesResult g = evaluate_grades(scenario_with(constructed(60.0)), cat, o);
  // 0.25 + 0.30 + 0.03 + 400/2000 = 0.78 (by hand).
  const GradeRow& r = row_of(g, {"0.5%", "0.2%", "0.1%"});
  EXPECT_NEAR(r.setup_per_unit, 0.2, kCostTolerance);
  EXPECT_NEAR(r.unit_cost, 0.78, kCostTolerance);
  EXPECT_NEAR(row_of(g, {"1%", "0.2%", "0.1%"}).unit_cost, 0.43, kCostTolerance);
}

// --- The front ---------------------------------------------------------------

bool beats(double cost_a, double err_a, double cost_b, double err_b) {
  const double eps = 1e-9 * std::max(1.0, std::fabs(cost_b));
  return cost_a <= cost_b + eps && err_a <= err_b && (cost_a < cost_b - eps || err_a < err_b);
}

// The definition applied by brute force: on the front exactly when no other
// combination beats it on both cost and error.
void expect_front_by_definition(const GradesResult& g) {
  std::size_t on = 0;
  for (std::size_t i = 0; i < g.rows.size(); ++i) {
    const GradeRow& r = g.rows[i];
    bool beaten = false;
    for (std::size_t j = 0; j < g.rows.size() && r.error; ++j)
      if (j != i && g.rows[j].error) beaten = beaten || beats(g.rows[j].unit_cost, *g.rows[j].error, r.unit_cost, *r.error);
    EXPECT_EQ(r.on_front, r.error.has_value() && !beaten) << g.choice_text(r);
    on += r.on_front;
  }
  EXPECT_EQ(on, g.front.size());
  EXPECT_GE(on, 2u);  // a front of one point would not exercise the definition
}

TEST(Grades, TheFrontHoldsExactlyTheCombinationsNoOtherBeatsOnCostAndError) {
  const Catalogue cat = parse_catalogue(kConstructed, "constructed.csv");
  for (ErrorMeasure by : {ErrorMeasure::worst_case, ErrorMeasure::linear, ErrorMeasure::monte_carlo}) {
    SCOPED_TRACE(std::string(to_string(by)));
    GradesOptions o = grades_quick();
    o.by = by;
    const GradesResult g = evaluate_grades(scenario_with(constructed(60.0)), cat, o);
    expect_front_by_definition(g);
    for (const auto& r : g.rows)
      EXPECT_EQ(r.error, by == ErrorMeasure::worst_case ? r.wc_max_abs
                         : by == ErrorMeasure::linear   ? r.rss_max_abs
                                                        : std::optional<double>(r.mc->max_abs));
  }
}

TEST(Grades, ParetoFrontOnHandMadePoints) {
  // (cost, error): (1, 5) loses to (1, 4) at the same cost; (2, 4) to the
  // cheaper (1, 4); (3, 2) and its twin beat each other in nothing, so both
  // stay; (4, 3) loses to (3, 2); a point without an error is never on it.
  const std::vector<double> cost{1, 1, 2, 3, 3, 4, 0.5};
  const std::vector<std::optional<double>> err{5, 4, 4, 2, 2, 3, std::nullopt};
  EXPECT_EQ(pareto_front(cost, err), (std::vector<bool>{false, true, false, true, true, false, false}));
  // 0.1 + 0.2 is 0.30000000000000004 in binary: the same price as 0.3.
  EXPECT_EQ(pareto_front({0.1 + 0.2, 0.3}, {1.0, 2.0}), (std::vector<bool>{true, false}));
}

// --- Common random numbers ----------------------------------------------------

// The default design with a limit that a few percent of its units miss, so
// yields are neither 0 nor 1 and their equality means something.
Scenario marginal() { return scenario_with({{"requirement.max_error", "0.6"}}); }

constexpr const char* kSmall =
    "slot,grade,unit_cost,settings\n"
    "thermistor,1%,0.10,sensor.r25_tol=1%;sensor.beta_tol=1%\n"
    "thermistor,0.5%,0.22,sensor.r25_tol=0.5%;sensor.beta_tol=0.5%\n"
    "resistor,1%,0.002,divider.r_fixed_tol=1%\n"
    "resistor,0.1%,0.03,divider.r_fixed_tol=0.1%\n";
// The same rows with others among them: every combination index moves.
constexpr const char* kLarger =
    "slot,grade,unit_cost,settings\n"
    "resistor,2%,0.001,divider.r_fixed_tol=2%\n"
    "thermistor,2%,0.06,sensor.r25_tol=2%;sensor.beta_tol=1.5%\n"
    "thermistor,1%,0.10,sensor.r25_tol=1%;sensor.beta_tol=1%\n"
    "resistor,1%,0.002,divider.r_fixed_tol=1%\n"
    "thermistor,0.5%,0.22,sensor.r25_tol=0.5%;sensor.beta_tol=0.5%\n"
    "resistor,0.1%,0.03,divider.r_fixed_tol=0.1%\n";

TEST(Grades, AYieldDoesNotChangeWhenRowsAreAddedToTheCatalogue) {
  GradesOptions o = grades_quick();
  o.mc_all = true;
  const GradesResult small = evaluate_grades(marginal(), parse_catalogue(kSmall, "small.csv"), o);
  const GradesResult larger = evaluate_grades(marginal(), parse_catalogue(kLarger, "larger.csv"), o);
  ASSERT_EQ(larger.rows.size(), 9u);
  int strictly_between = 0;
  for (const auto& r : small.rows) {
    const std::string thermistor = small.grades[0][static_cast<std::size_t>(r.choice[0])];
    const std::string resistor = small.grades[1][static_cast<std::size_t>(r.choice[1])];
    const GradeRow& same = row_of(larger, {resistor, thermistor});  // the larger file names the resistor first
    ASSERT_TRUE(r.mc && same.mc);
    EXPECT_EQ(r.mc->good_units, same.mc->good_units) << small.choice_text(r);
    EXPECT_EQ(r.mc->max_abs, same.mc->max_abs) << small.choice_text(r);
    strictly_between += r.mc->yield > 0.0 && r.mc->yield < 1.0;
  }
  EXPECT_GE(strictly_between, 2);
}

TEST(Grades, ResultsDoNotDependOnTheThreadCount) {
  const Catalogue cat = parse_catalogue(kLarger, "larger.csv");
  GradesOptions o = grades_quick();
  o.mc_all = true;
  o.threads = 1;
  const GradesResult one = evaluate_grades(marginal(), cat, o);
  o.threads = 3;
  const GradesResult three = evaluate_grades(marginal(), cat, o);
  ASSERT_EQ(one.rows.size(), three.rows.size());
  for (std::size_t i = 0; i < one.rows.size(); ++i) {
    EXPECT_EQ(one.rows[i].choice, three.rows[i].choice);
    EXPECT_EQ(one.rows[i].wc_max_abs, three.rows[i].wc_max_abs);
    EXPECT_EQ(one.rows[i].rss_max_abs, three.rows[i].rss_max_abs);
    EXPECT_EQ(one.rows[i].mc->good_units, three.rows[i].mc->good_units);
    EXPECT_EQ(one.rows[i].mc->max_abs, three.rows[i].mc->max_abs);
  }
  EXPECT_EQ(one.recommendation, three.recommendation);
}

TEST(Grades, AYieldEqualsTheMonteCarloEngineRunOnThatDesignAlone) {
  // The combination is exactly the scenario with its settings: the engine
  // run by hand over the window's temperatures gives the same count.
  const GradesResult g = evaluate_grades(marginal(), parse_catalogue(kSmall, "small.csv"), [] {
    GradesOptions o = grades_quick();
    o.mc_all = true;
    return o;
  }());
  const GradeRow& r = row_of(g, {"1%", "0.1%"});
  Design d = testing::design_with({{"requirement.max_error", "0.6"},
                                   {"sensor.r25_tol", "1%"},
                                   {"sensor.beta_tol", "1%"},
                                   {"divider.r_fixed_tol", "0.1%"}});
  const Chain chain(d);
  std::vector<double> window;
  for (double t : d.conditions.temperatures())
    if (t >= d.requirement.window_min && t <= d.requirement.window_max) window.push_back(t);
  McOptions mo;
  mo.units = kGradesUnits;
  EXPECT_EQ(monte_carlo(chain, window, mo).summary.good_units, r.mc->good_units);
}

// --- Monte Carlo basis: the pilot screen ------------------------------------------

TEST(Grades, OnAMonteCarloBasisThePilotStopsOnlyCombinationsThatCannotReachTheYield) {
  const Scenario s = scenario_with({{"requirement.basis", "monte-carlo"}, {"requirement.max_error", "0.5"}});
  const Catalogue cat = parse_catalogue(
      "slot,grade,unit_cost,settings\n"
      "thermistor,3%,0.05,sensor.r25_tol=3%;sensor.beta_tol=2%\n"
      "thermistor,0.2%,0.60,sensor.r25_tol=0.2%;sensor.beta_tol=0.2%\n"
      "resistor,0.1%,0.03,divider.r_fixed_tol=0.1%\n",
      "pilot.csv");
  GradesOptions o;
  o.units = 5000;
  const GradesResult screened = evaluate_grades(s, cat, o);
  o.mc_all = true;
  const GradesResult all = evaluate_grades(s, cat, o);
  const GradeRow& loose = row_of(screened, {"3%", "0.1%"});
  ASSERT_TRUE(loose.mc);
  EXPECT_FALSE(loose.mc_run);
  EXPECT_EQ(loose.mc->units, mc_pilot_units);
  // The full run confirms what the pilot concluded.
  EXPECT_LT(row_of(all, {"3%", "0.1%"}).mc->yield, 0.99);
  const GradeRow& tight = row_of(screened, {"0.2%", "0.1%"});
  EXPECT_TRUE(tight.mc_run);
  EXPECT_EQ(tight.mc->good_units, row_of(all, {"0.2%", "0.1%"}).mc->good_units);
  EXPECT_EQ(screened.recommendation.has_value(), tight.mc->yield >= 0.99);
}

// --- The current parts and the summary ---------------------------------------------

TEST(Grades, TheSummarySaysWhatTheRecommendationChangesAndWhatItCosts) {
  // The scenario's own parts are the cheapest options; "0.01" is 1 % written
  // another way and still matches the catalogue's "1%".
  Overrides o = constructed(60.0);
  o.insert(o.end(), {{"sensor.r25_tol", "0.01"}, {"sensor.beta_tol", "1%"}, {"divider.r_fixed_tol", "1 %"}});
  GradesOptions opt = grades_quick();
  opt.volume = 10000.0;
  const GradesResult g = evaluate_grades(scenario_with(o), parse_catalogue(kConstructed, "constructed.csv"), opt);
  ASSERT_TRUE(g.current_row && g.recommendation);
  EXPECT_EQ(g.choice_text(g.rows[*g.current_row]), "r25 = 1%, beta = 1%, resistor = 1%");
  // 0.43 recommended against 0.16 now: 0.27 more per unit, 2700 over 10 000 units (by hand).
  ASSERT_TRUE(g.saving);
  EXPECT_NEAR(*g.saving, -0.27, kCostTolerance);
  EXPECT_FALSE(g.saving_per_good_unit);
  EXPECT_NE(g.summary.find("it changes beta 1% -> 0.2%; resistor 1% -> 0.1% and keeps r25; it costs 0.27 more per unit "
                           "(2700.00 over 10000 units)"),
            std::string::npos)
      << g.summary;
  EXPECT_NE(g.summary.find("The current parts do not: worst case 0.956 K over the limit of 0.470 K."), std::string::npos)
      << g.summary;
}

TEST(Grades, WithoutACombinationThatMeetsTheRequirementTheSummarySaysSo) {
  const GradesResult g = evaluate_grades(scenario_with(ideal({{"requirement.max_error", "0.1"}})),
                                         parse_catalogue(kConstructed, "constructed.csv"), grades_quick());
  EXPECT_FALSE(g.recommendation);
  EXPECT_EQ(g.summary.rfind("No combination meets the requirement", 0), 0u) << g.summary;
  EXPECT_NE(g.summary.find("The most accurate combination is r25 = 0.5%, beta = 0.2%, resistor = 0.1%"), std::string::npos)
      << g.summary;
}

// --- Re-pick -------------------------------------------------------------------

// grades_quick(), re-picking the fixed resistor over `series` from `low` to `high`.
GradesOptions re_pick_over(Series series, double low, double high) {
  GradesOptions o = grades_quick();
  o.re_pick = true;
  o.pick.series = series;
  o.pick.range_low = low;
  o.pick.range_high = high;
  return o;
}

// `base` with the catalogue's settings of a row's combination.
Scenario scenario_of(const Scenario& base, const Catalogue& cat, const GradeRow& r) {
  Scenario s = base;
  for (std::size_t k = 0; k < cat.slots.size(); ++k)
    for (const auto& st : cat.slots[k].options[static_cast<std::size_t>(r.choice[k])].settings) s.set(st.key, st.value, st.where);
  return s;
}

// The row's re-picked resistor is the one the picker finds on its own, on one
// thread and over the whole series, for the row's design `s`.
void expect_the_pickers_winner(const GradeRow& r, const Scenario& s, const PickOptions& pick) {
  PickOptions whole = pick;
  whole.threads = 1;
  ASSERT_TRUE(r.r_fixed);
  EXPECT_EQ(*r.r_fixed, best_fixed_resistor(s, whole));
}

TEST(Grades, RePickGivesThePickersWinnerOverTheWholeSeriesAndTheEnginesFigures) {
  const Scenario base;
  const Catalogue cat = parse_catalogue(
      "slot,grade,unit_cost,settings\n"
      "thermistor,1%,0.10,sensor.r25_tol=1%;sensor.beta_tol=1%\n"
      "thermistor,0.2%,0.60,sensor.r25_tol=0.2%;sensor.beta_tol=0.2%\n"
      "adc,internal,0,adc.bits=12\n"
      "adc,external-16,1.20,adc.bits=16;adc.offset=4;adc.gain_error=0.05%;adc.inl=2;adc.noise=1\n",
      "repick.csv");
  const GradesOptions o = re_pick_over(Series::e24, 1e3, 100e3);
  const GradesResult g = evaluate_grades(base, cat, o);
  for (const auto& r : g.rows) {
    SCOPED_TRACE(g.choice_text(r));
    Scenario s = scenario_of(base, cat, r);
    ASSERT_NO_FATAL_FAILURE(expect_the_pickers_winner(r, s, o.pick));
    // The figures taken over from the picker are the budget's on that design.
    s.set("divider.r_fixed", std::to_string(*r.r_fixed), Where{Origin::command_line, "", 0, "divider.r_fixed"});
    const Design d = build_design(s);
    BudgetOptions bo;
    bo.monte_carlo = false;
    const Budget b = run_budget(Chain(d), bo);
    EXPECT_DOUBLE_EQ(*r.wc_max_abs, b.wc_max_abs);
    EXPECT_DOUBLE_EQ(*r.rss_max_abs, b.rss_max_abs);
  }
}

TEST(Grades, RePickFollowsAWinnerThatMovesFarBetweenNeighbouringCombinations) {
  // A thermistor slot that changes R25 tenfold moves the best resistor
  // several times over (some 30 E48 steps, where a window of 8 either side
  // would have to move several times) between a combination and its parent
  // in the re-pick's tree; each combination's resistor must still be the one
  // the picker finds over the whole series (best_fixed_resistor: pick() over
  // every E48 value; pick() is checked against a brute-force worst case in
  // picker_test.cpp).
  const Scenario base;
  const Catalogue cat = parse_catalogue(
      "slot,grade,unit_cost,settings\n"
      "thermistor,10k,0.10,sensor.r25=10k\n"
      "thermistor,100k,0.12,sensor.r25=100k\n"
      "resistor,1%,0.002,divider.r_fixed_tol=1%\n"
      "resistor,0.1%,0.03,divider.r_fixed_tol=0.1%;divider.r_fixed_tempco=25ppm\n",
      "decade.csv");
  const GradesOptions o = re_pick_over(Series::e48, 1e3, 1e6);
  const GradesResult g = evaluate_grades(base, cat, o);
  ASSERT_EQ(g.rows.size(), 4u);
  double smallest = 1e9, largest = 0.0;
  for (const auto& r : g.rows) {
    SCOPED_TRACE(g.choice_text(r));
    Scenario s = scenario_of(base, cat, r);
    ASSERT_NO_FATAL_FAILURE(expect_the_pickers_winner(r, s, o.pick));
    smallest = std::min(smallest, *r.r_fixed);
    largest = std::max(largest, *r.r_fixed);
  }
  EXPECT_GT(largest / smallest, 4.0);  // the winners did move that far
}

TEST(Grades, RePickRefusesACatalogueThatGradesTheFixedResistorValue) {
  GradesOptions o = grades_quick();
  o.re_pick = true;
  try {
    (void)evaluate_grades(Scenario(), parse_catalogue("slot,grade,unit_cost,settings\nr,10k,0,divider.r_fixed=10k\n", "r.csv"), o);
    ADD_FAILURE() << "accepted";
  } catch (const input_error& e) {
    EXPECT_EQ(std::string(e.what()),
              "settings = divider.r_fixed=10k (r.csv:2:4): --re-pick chooses divider.r_fixed for every "
              "combination; grade the resistor's tolerance (divider.r_fixed_tol) instead, or drop --re-pick");
  }
}

// --- Settings validated by building the design -----------------------------------------

TEST(Grades, ASettingWithAnUnusableValueIsRefusedNamingItsLineAndColumn) {
  const Catalogue cat =
      parse_catalogue("slot,grade,unit_cost,settings\nthermistor,std,0.1,sensor.r25_tol=1%\nthermistor,odd,0.1,sensor.r25_tol=abc\n",
                      "bad.csv");
  try {
    (void)evaluate_grades(Scenario(), cat, grades_quick());
    ADD_FAILURE() << "accepted";
  } catch (const input_error& e) {
    const std::string m = e.what();
    EXPECT_EQ(m.rfind("sensor.r25_tol = abc (bad.csv:3:4): ", 0), 0u) << m;
    EXPECT_NE(m.find("[set by grade 'odd' of slot 'thermistor', bad.csv:3:4]"), std::string::npos) << m;
  }
  // Valid alone, invalid together: the window outside the range.
  const Catalogue pair = parse_catalogue(
      "slot,grade,unit_cost,settings\nrange,narrow,0,conditions.t_max=50\nwindow,wide,0,requirement.window_max=55\n", "pair.csv");
  try {
    (void)evaluate_grades(scenario_with({{"requirement.window_max", "40"}}), pair, grades_quick());
    ADD_FAILURE() << "accepted";
  } catch (const input_error& e) {
    EXPECT_EQ(std::string(e.what()).rfind("pair.csv: the combination range = narrow, window = wide is not a valid design: ", 0), 0u)
        << e.what();
  }
}

// --- Through the command line ------------------------------------------------------

struct Malformed {
  const char* what;
  std::string csv;
  std::string extra;  // more options
  std::string names;  // the message must hold this (line and column)
};

TEST(GradesCli, AMalformedCatalogueIsRefusedWithOneLineAndExitTwoAndNoOutput) {
  const std::string head = "slot,grade,unit_cost,settings\n";
  const std::vector<Malformed> cases{
      {"unknown column", "slot,grade,price,settings\nx,y,1,\n", "", "header = price (@:1:3)"},
      {"missing column", "slot,grade,settings\nx,y,sensor.r25_tol=1%\n", "", "header = slot,grade,settings (@:1): the required column 'unit_cost' is missing"},
      {"setting naming no key", head + "thermistor,std,0.1,sensor.r25_tolerance=1%\n", "",
       "settings = sensor.r25_tolerance=1% (@:2:4): 'sensor.r25_tolerance' names no scenario key"},
      {"negative cost", head + "thermistor,std,-1,sensor.r25_tol=1%\n", "", "unit_cost = -1 (@:2:3)"},
      {"duplicate grade", head + "thermistor,std,0.1,sensor.r25_tol=1%\nthermistor,std,0.2,sensor.r25_tol=2%\n", "",
       "grade = std (@:3:2): slot 'thermistor' already has this grade (line 2)"},
      {"unusable value", head + "thermistor,std,0.1,sensor.r25_tol=-1%\n", "",
       "(@:2:4): must be"},
      {"setup cost without volume", "slot,grade,unit_cost,settings,setup_cost\nthermistor,std,0.1,,50\n", "",
       "--volume = (empty) (command line): the catalogue has setup costs (@:2:5)"},
      {"re-pick over a graded resistor value", head + "r,10k,0,divider.r_fixed=10k\n", " --re-pick",
       "settings = divider.r_fixed=10k (@:2:4)"},
      {"series without re-pick", head + "thermistor,std,0.1,\n", " --series e24", "--series = e24 (command line): applies only with --re-pick"},
      {"bad measure", head + "thermistor,std,0.1,\n", " --by average", "--by = average (command line): must be one of: worst-case | linear | monte-carlo"},
  };
  for (const auto& c : cases) {
    SCOPED_TRACE(c.what);
    TempDir dir;
    const std::string cat = dir.write("bad.csv", c.csv);
    const fs::path out = dir.path / "out.json";
    const Outcome r =
        cli("--catalogue " + shell_quote(cat) + c.extra + " --units 200 --format json --output " + shell_quote(out.string()));
    EXPECT_EQ(r.status, 2);
    std::string names = c.names;
    if (const auto at = names.find('@'); at != std::string::npos) names.replace(at, 1, cat);
    EXPECT_NE(r.err.find(names), std::string::npos) << r.err;
    EXPECT_EQ(r.err.rfind("thermargin: ", 0), 0u) << r.err;
    EXPECT_EQ(std::count(r.err.begin(), r.err.end(), '\n'), 1) << r.err;
    EXPECT_FALSE(fs::exists(out));
  }
  const Outcome missing = cli("--units 200");
  EXPECT_EQ(missing.status, 2);
  EXPECT_EQ(missing.err, "thermargin: --catalogue (command line): missing; give the CSV of part grades, e.g. --catalogue parts.csv\n");
}

// The ideal design of the constructed catalogue as command-line options.
std::string as_options(const Overrides& o) {
  std::string s;
  for (const auto& [k, v] : o) s += " --" + k + "=" + shell_quote(v);
  return s;
}

TEST(GradesCli, NumPyAgreesOnWorstCaseCostsFrontAndRecommendation) {
  TempDir dir;
  // The constructed catalogue with a setup cost and its prices as before.
  const std::string cat = dir.write("numpy.csv",
                                    "# Invented prices for a test.\n"
                                    "slot,grade,unit_cost,settings,setup_cost\n"
                                    "r25,1%,0.10,sensor.r25_tol=1%,\n"
                                    "r25,0.5%,0.25,sensor.r25_tol=0.5%,400\n"
                                    "beta,1%,0.05,sensor.beta_tol=1%,\n"
                                    "beta,0.2%,0.30,sensor.beta_tol=0.2%,150\n"
                                    "resistor,1%,0.01,divider.r_fixed_tol=1%,\n"
                                    "resistor,0.1%,0.03,\"divider.r_fixed_tol=0.1%\",\n");
  const fs::path json = dir.path / "grades.json";
  const Outcome r = cli("--catalogue " + shell_quote(cat) + as_options(constructed(60.0)) +
                        " --volume 2000 --reject-cost 1.5 --mc-all --units 2000 --format json --output " +
                        shell_quote(json.string()));
  ASSERT_EQ(r.status, 0) << r.err;
  // The second opinion reads the catalogue and the design's figures (B, the
  // window, the volume, the reject cost, the limit, the required yield and
  // the program's unit count), never the program's output.
  const Outcome py = testing::run_shell(testing::reference_command(
      "grades_second_opinion.py", shell_quote(cat) + " 3950 0 60 0.5 2000 1.5 0.47 0.99 2000"));
  ASSERT_EQ(py.status, 0) << py.err;
  const auto tool = nlohmann::json::parse(std::ifstream(json));
  const auto ref = nlohmann::json::parse(py.out);
  ASSERT_EQ(tool["rows"].size(), 8u);
  int compared = 0, on_front = 0, meets = 0;
  for (const auto& row : tool["rows"]) {
    const std::string key = row["choice"]["r25"].get<std::string>() + "|" + row["choice"]["beta"].get<std::string>() + "|" +
                            row["choice"]["resistor"].get<std::string>();
    SCOPED_TRACE(key);
    ASSERT_TRUE(ref["rows"].contains(key));
    const auto& mine = ref["rows"][key];
    EXPECT_NEAR(row["wc_max_abs"].get<double>(), mine["wc_max_abs"].get<double>(), kClosedFormTolerance);
    EXPECT_NEAR(row["unit_cost"].get<double>(), mine["unit_cost"].get<double>(), kCostTolerance);
    // The yields of two independent samples: within the binomial interval of both sizes.
    EXPECT_GE(row["yield"].get<double>(), mine["yield_interval"][0].get<double>());
    EXPECT_LE(row["yield"].get<double>(), mine["yield_interval"][1].get<double>());
    EXPECT_GE(row["cost_per_good_unit"].get<double>(), mine["cost_per_good_unit_interval"][0].get<double>() - kCostTolerance);
    EXPECT_LE(row["cost_per_good_unit"].get<double>(), mine["cost_per_good_unit_interval"][1].get<double>() + kCostTolerance);
    EXPECT_EQ(row["on_front"].get<bool>(), mine["on_front"].get<bool>());
    EXPECT_EQ(row["meets_requirement"].get<bool>(), mine["meets"].get<bool>());
    on_front += mine["on_front"].get<bool>();
    meets += mine["meets"].get<bool>();
    ++compared;
  }
  EXPECT_EQ(compared, 8);
  // Neither answer is trivial: some rows on the front and some off, some meet and some do not.
  EXPECT_GT(on_front, 0);
  EXPECT_LT(on_front, 8);
  EXPECT_GT(meets, 0);
  EXPECT_LT(meets, 8);
  // The model's recommendation is decided beyond its sampling (no cost interval
  // overlaps it, no yield straddles the requirement), so the program must agree.
  ASSERT_TRUE(ref["recommendation_robust"].get<bool>());
  ASSERT_FALSE(tool["recommendation"].is_null());
  const auto& rec = tool["recommendation"]["choice"];
  EXPECT_EQ(rec["r25"].get<std::string>() + "|" + rec["beta"].get<std::string>() + "|" + rec["resistor"].get<std::string>(),
            ref["recommendation"].get<std::string>());
  EXPECT_EQ(tool["caution"].get<std::string>(), std::string(caution));
}

TEST(GradesCli, TextLeadsWithTheRecommendationAndCsvCarriesTheCaution) {
  TempDir dir;
  const std::string cat = dir.write("c.csv", kConstructed);
  const Outcome text = cli("--catalogue " + shell_quote(cat) + as_options(constructed(60.0)) + " --units 500");
  ASSERT_EQ(text.status, 0) << text.err;
  EXPECT_LT(text.out.find("RECOMMENDATION: r25 = 1%, beta = 0.2%, resistor = 0.1% - 0.43 per unit"),
            text.out.find("Cost/accuracy front"));
  EXPECT_NE(text.out.find(std::string(caution)), std::string::npos);
  const Outcome csv = cli("--catalogue " + shell_quote(cat) + as_options(constructed(60.0)) + " --units 500 --format csv");
  ASSERT_EQ(csv.status, 0) << csv.err;
  EXPECT_EQ(csv.out.rfind("# " + std::string(caution) + "\nr25,beta,resistor,r_fixed_ohm,unit_cost,", 0), 0u);
  EXPECT_EQ(std::count(csv.out.begin(), csv.out.end(), '\n'), 2 + 8);
  // --strict: 3 when nothing meets the requirement.
  EXPECT_EQ(cli("--catalogue " + shell_quote(cat) + as_options(ideal({{"requirement.max_error", "0.1"}})) + " --units 200 --strict").status, 3);
}

TEST(GradesCli, EveryShippedCatalogueRunsAgainstTheDesignItIsNamedAfter) {
  // scenarios/<design>_catalogue.csv beside scenarios/<design>.ini: run so
  // that none goes stale, with invented prices said so in the file.
  int found = 0;
  for (const auto& e : fs::directory_iterator(testing::source_path("scenarios"))) {
    const std::string name = e.path().filename().string();
    if (!name.ends_with("_catalogue.csv")) continue;
    SCOPED_TRACE(name);
    ++found;
    const fs::path design = e.path().parent_path() / (name.substr(0, name.size() - std::string("_catalogue.csv").size()) + ".ini");
    ASSERT_TRUE(fs::exists(design));
    std::ostringstream text;
    text << std::ifstream(e.path()).rdbuf();
    EXPECT_NE(text.str().find("INVENTED"), std::string::npos);
    const Outcome r = cli(shell_quote(design.string()) + " --catalogue " + shell_quote(e.path().string()) +
                              " --volume 5000 --units 500 --format json");
    ASSERT_EQ(r.status, 0) << r.err;
    const auto j = nlohmann::json::parse(r.out);
    EXPECT_EQ(j["command"], "grades");
    EXPECT_FALSE(j["rows"].empty());
    EXPECT_FALSE(j["front"].empty());
  }
  EXPECT_GE(found, 1);
}

}  // namespace
}  // namespace thermargin
