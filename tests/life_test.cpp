// Tests of the product's life (input/life.hpp, chain/drift.hpp and the
// budget's end-of-life run): drift inputs are zero at delivery and
// toleranced inputs at end of life. The check values come from the divider
// equation and IEC 60539-1's beta equation computed by hand in the test,
// not from the program's other engines.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <sstream>
#include <string>
#include <vector>

#include "cli_run.hpp"
#include "engine_fixture.hpp"
#include "thermargin/chain/chain.hpp"
#include "thermargin/chain/drift.hpp"
#include "thermargin/core/error.hpp"
#include "thermargin/engines/budget.hpp"
#include "thermargin/engines/worst_case.hpp"
#include "thermargin/input/life.hpp"
#include "thermargin/report/budget_output.hpp"

namespace thermargin {
namespace {

using testing::design_with;
using testing::ideal;

BudgetOptions no_mc() { return {.monte_carlo = false, .corners = CornerMethod::enumerate, .progress = {}}; }

// The reading of the default 10 kOhm / B 3950 NTC under a 10 kOhm fixed
// resistor (sensor node to ground) when the element's resistance is off by
// the factor (1 + s) and the fixed resistor by (1 + f), with a firmware that
// inverts the divider with the nominal R_f and the beta equation
// R = R25·exp(B(1/T − 1/T0)) (IEC 60539-1): the node ratio is
// R/(R + R_f(1 + f)), the firmware's R = R_f·ratio/(1 − ratio).
double reading_by_hand(double t_celsius, double s, double f) {
  const double r25 = 10e3, beta = 3950.0, rf = 10e3, t0 = 298.15;
  const double t = t_celsius + 273.15;
  const double r = r25 * std::exp(beta * (1.0 / t - 1.0 / t0)) * (1.0 + s);
  const double ratio = r / (r + rf * (1.0 + f));
  const double r_read = rf * ratio / (1.0 - ratio);
  return 1.0 / (1.0 / t0 + std::log(r_read / r25) / beta) - 273.15;
}

// A 24-bit ADC's quantisation (half an LSB of ratio, 3e-8) moves the reading
// by about a microkelvin here; the check allows ten times that.
constexpr double hand_tolerance = 1e-5;  // K

TEST(Life, DriftAloneMatchesTheDividerEquationByHand) {
  // Every tolerance zero (the ideal design of engine_fixture.hpp), the
  // firmware's beta equation the sensor's own; drift: the sensor ±2 %, the
  // fixed resistor ±1 %.
  const Design d = design_with(ideal({{"sensor.drift", "2%"}, {"divider.r_fixed_drift", "1%"},
                                      {"conditions.t_min", "0"}, {"conditions.t_max", "60"},
                                      {"conditions.t_step", "60"}, {"requirement.window_min", "0"},
                                      {"requirement.window_max", "60"}}));
  ASSERT_TRUE(has_drift(d));
  ASSERT_EQ(d.drift_inputs.size(), 2u);
  const Budget b = run_budget(Chain(d), no_mc());
  ASSERT_TRUE(b.end_of_life);
  const Budget& e = b.end_of_life->budget;
  ASSERT_EQ(e.points.size(), 2u);
  for (const auto& p : e.points) {
    double lo = 0.0, hi = 0.0;
    for (double s : {-0.02, 0.02})
      for (double f : {-0.01, 0.01}) {
        const double err = reading_by_hand(p.t, s, f) - p.t;
        lo = std::min(lo, err);
        hi = std::max(hi, err);
      }
    EXPECT_NEAR(p.wc.low, lo, hand_tolerance) << p.t;
    EXPECT_NEAR(p.wc.high, hi, hand_tolerance) << p.t;
    EXPECT_GT(hi, 0.3);  // the drift is what moves it: ±2 % of R is about half a kelvin here
  }
  // At delivery the band is the one without drift, bit for bit.
  const Design plain = design_with(ideal({{"conditions.t_min", "0"}, {"conditions.t_max", "60"},
                                          {"conditions.t_step", "60"}, {"requirement.window_min", "0"},
                                          {"requirement.window_max", "60"}}));
  const Budget before = run_budget(Chain(plain), no_mc());
  ASSERT_FALSE(before.end_of_life);
  ASSERT_EQ(before.points.size(), b.points.size());
  for (std::size_t i = 0; i < b.points.size(); ++i) {
    EXPECT_EQ(b.points[i].wc.low, before.points[i].wc.low);
    EXPECT_EQ(b.points[i].wc.high, before.points[i].wc.high);
    EXPECT_EQ(b.points[i].linear.u_c, before.points[i].linear.u_c);
  }
}

std::vector<std::vector<std::string>> csv_rows(const std::string& text) {
  std::vector<std::vector<std::string>> rows;
  std::istringstream in(testing::csv_without_comments(text));
  for (std::string line; std::getline(in, line);) {
    rows.emplace_back();
    std::istringstream cells(line);
    for (std::string cell; std::getline(cells, cell, ',');) rows.back().push_back(cell);
    if (!line.empty() && line.back() == ',') rows.back().emplace_back();  // a last empty cell
  }
  return rows;
}

std::size_t column(const std::vector<std::string>& head, const std::string& name) {
  for (std::size_t i = 0; i < head.size(); ++i)
    if (head[i] == name) return i;
  ADD_FAILURE() << "no column " << name;
  return 0;
}

TEST(Life, CsvCarriesTheEndOfLifeBandsBesideTheDeliveryOnes) {
  // The same design as above: the CSV's eol_wc_* columns at each
  // temperature are the drift's effect through the divider equation by hand
  // (to the CSV's 5 decimals), beside the delivery columns; a design without
  // drift has no such column.
  const testing::Overrides o = ideal({{"sensor.drift", "2%"}, {"divider.r_fixed_drift", "1%"},
                                      {"conditions.t_min", "0"}, {"conditions.t_max", "60"},
                                      {"conditions.t_step", "60"}, {"requirement.window_min", "0"},
                                      {"requirement.window_max", "60"}});
  const Design d = design_with(o);
  const Chain chain(d);
  const Budget b = run_budget(chain, no_mc());
  const auto rows = csv_rows(budget_csv(b, {.chain = &chain}));
  ASSERT_EQ(rows.size(), 3u);
  const auto& head = rows[0];
  const std::size_t t = column(head, "t_degC"), low = column(head, "eol_wc_low_K"), high = column(head, "eol_wc_high_K");
  const std::size_t wc_high = column(head, "wc_high_K");
  for (std::size_t r = 1; r < rows.size(); ++r) {
    ASSERT_EQ(rows[r].size(), head.size());
    const double tc = std::stod(rows[r][t]);
    double lo = 0.0, hi = 0.0;
    for (double s : {-0.02, 0.02})
      for (double f : {-0.01, 0.01}) {
        lo = std::min(lo, reading_by_hand(tc, s, f) - tc);
        hi = std::max(hi, reading_by_hand(tc, s, f) - tc);
      }
    EXPECT_NEAR(std::stod(rows[r][low]), lo, 5e-6 + hand_tolerance) << tc;
    EXPECT_NEAR(std::stod(rows[r][high]), hi, 5e-6 + hand_tolerance) << tc;
    EXPECT_LT(std::fabs(std::stod(rows[r][wc_high])), 1e-3) << tc;  // at delivery: the ideal design's few microkelvin
    EXPECT_TRUE(rows[r][column(head, "eol_rss_high_K")].size() > 0) << tc;
    EXPECT_TRUE(rows[r][column(head, "eol_mc_high_K")].empty()) << tc;  // no Monte Carlo run
  }
  const Design plain = design_with(ideal({}));
  const Chain plain_chain(plain);
  const std::string text = budget_csv(run_budget(plain_chain, no_mc()), {.chain = &plain_chain});
  EXPECT_EQ(text.find("eol_"), std::string::npos);
}

TEST(Life, VerdictFollowsRequirementAt) {
  // ±2 % sensor drift against a 0.3 K limit: about 0.5 K at end of life, a
  // few millikelvin at delivery (the ideal design).
  const testing::Overrides o = ideal({{"sensor.drift", "2%"}, {"requirement.max_error", "0.3"}});
  const Design d_eol = design_with(o);
  const Budget eol = run_budget(Chain(d_eol), no_mc());
  EXPECT_EQ(eol.verdict.at, Requirement::At::end_of_life);  // the default with drift set
  EXPECT_FALSE(eol.verdict.pass);
  EXPECT_NE(eol.verdict.reason.find("at end of life"), std::string::npos);
  EXPECT_TRUE(eol.end_of_life->delivery_verdict.pass);
  const Design d_delivery = design_with(testing::with_extra(o, {{"requirement.at", "delivery"}}));
  const Budget delivery = run_budget(Chain(d_delivery), no_mc());
  EXPECT_EQ(delivery.verdict.at, Requirement::At::delivery);
  EXPECT_TRUE(delivery.verdict.pass);
  EXPECT_FALSE(delivery.end_of_life->budget.verdict.pass);
}

TEST(Life, GradesAndPickRankOnTheVerdictsBasisAndSayIt) {
  // The shipped solar collector probe (its verdict changes from delivery to
  // end of life) with its catalogue, whose grades carry their drift: grades
  // scores the scenario's own parts with the worst case of the end-of-life
  // design (the worst-case engine on the drift inputs made active), not the
  // delivery one; the text of grades and pick says which basis it ranks on.
  const std::string path = testing::scenario_path("solar_collector_life.ini");
  const std::string file = testing::shell_quote(path);
  const std::string cat = " --units 100 --catalogue " +
                          testing::shell_quote(testing::scenario_path("solar_collector_life_catalogue.csv"));
  const Design d = design_with({}, path);
  const auto window_wc = [](const Design& design) {
    double m = 0.0;
    const auto window = window_temperatures(design.requirement, design.conditions.temperatures());
    for (const auto& p : worst_case(Chain(design), window, {.method = CornerMethod::enumerate}).points)
      m = std::max(m, std::max(std::fabs(p.low), std::fabs(p.high)));
    return m;
  };
  const double eol = window_wc(at_end_of_life(d)), delivery = window_wc(d);
  ASSERT_GT(eol, delivery + 0.3);  // about 1.54 K against 0.86 K
  double own_parts = 0.0;
  const nlohmann::json grades = testing::cli_json("grades " + file + cat);
  for (const auto& r : grades["rows"])
    if (r["choice"]["thermistor"] == "epoxy 0.5%" && r["choice"]["resistor"] == "thin film 0.1%")
      own_parts = r["wc_max_abs"].get<double>();
  EXPECT_NEAR(own_parts, eol, 1e-9);
  EXPECT_NE(testing::run_cli("grades " + file + cat).out.find("basis, at end of life: requirement.at"), std::string::npos);
  EXPECT_NE(testing::run_cli("pick " + file + " --values 3k").out.find("over the window at end of life"),
            std::string::npos);
  EXPECT_EQ(testing::run_cli("pick " + file + " --values 3k --requirement.at=delivery").out.find("at end of life"),
            std::string::npos);
}

TEST(Life, DriftFoldsIntoItsPartAndOnlyOnce) {
  Deviations dev{};
  dev[static_cast<std::size_t>(Source::r_fixed)] = 0.01;
  dev[static_cast<std::size_t>(Source::r_fixed_drift)] = 0.02;
  dev[static_cast<std::size_t>(Source::adc_offset)] = 1.0;
  dev[static_cast<std::size_t>(Source::adc_offset_drift)] = 0.5;
  const Deviations once = with_drift(dev);
  EXPECT_DOUBLE_EQ(once[static_cast<std::size_t>(Source::r_fixed)], 1.01 * 1.02 - 1.0);
  EXPECT_DOUBLE_EQ(once[static_cast<std::size_t>(Source::adc_offset)], 1.5);
  EXPECT_EQ(once[static_cast<std::size_t>(Source::r_fixed_drift)], 0.0);
  EXPECT_EQ(with_drift(once), once);
  Deviations none{};
  none[static_cast<std::size_t>(Source::r_fixed)] = 0.01;
  EXPECT_EQ(with_drift(none), none);  // no drift: bit for bit
  // The overload the chain's stages use: the unit itself when it has no
  // drift, else the folded copy.
  Deviations scratch{};
  EXPECT_FALSE(has_drift(none));
  EXPECT_EQ(&with_drift(none, scratch), &none);
  EXPECT_TRUE(has_drift(dev));
  EXPECT_EQ(with_drift(dev, scratch), once);
}

TEST(Life, RtdDriftShiftsTheElement) {
  // A Pt1000 (IEC 60751 coefficients), every tolerance zero, +1 % drift: the
  // exact conversion reads the temperature where R_nom = 1.01·R(t).
  const Design d = design_with(ideal({{"sensor.model", "rtd"}, {"sensor.r0", "1000"}, {"divider.r_fixed", "1k"},
                                      {"firmware.conversion", "exact"}, {"sensor.drift", "1%"},
                                      {"conditions.t_min", "0"}, {"conditions.t_max", "100"},
                                      {"conditions.t_step", "100"}, {"requirement.window_min", "0"},
                                      {"requirement.window_max", "100"}}));
  const Budget b = run_budget(Chain(d), no_mc());
  const auto& p = b.end_of_life->budget.points.back();  // 100 degC
  // IEC 60751 above 0 degC: R/R0 = 1 + A t + B t^2; solve for 1.01·R(100)/R0.
  const double a = 3.9083e-3, bb = -5.775e-7;
  const double target = 1.01 * (1.0 + a * 100.0 + bb * 1e4);
  const double t_read = (-a + std::sqrt(a * a - 4.0 * bb * (1.0 - target))) / (2.0 * bb);
  // The worst case carries the 24-bit quantiser's half LSB: with a Pt1000
  // (about 3.8 ohm/K at 100 degC, IEC 60751) under 1 kOhm the node ratio moves
  // 6.7e-4 per kelvin, so one LSB (6e-8) is 9e-5 K and half of it 4.5e-5 K.
  constexpr double rtd_quantisation = 5e-5;  // K
  EXPECT_NEAR(p.wc.high, t_read - 100.0, rtd_quantisation + hand_tolerance);
  EXPECT_GT(p.wc.high, t_read - 100.0);  // the quantiser's half LSB lies on top, not below
}

TEST(Life, BadDriftIsRefused) {
  EXPECT_THROW(design_with({{"sensor.drift", "-1%"}}), input_error);
  EXPECT_THROW(design_with({{"divider.r_fixed_drift", "100%"}}), input_error);
  EXPECT_THROW(design_with({{"requirement.at", "later"}}), input_error);
}

TEST(Life, ASupplyDriftOnARatiometricSupplyIsANoteAndNotUsed) {
  // The supply's errors cancel in a ratiometric divider (docs/model.md §4):
  // a drift set there plays no part, which check notes (issue 18).
  const Design d = design_with({{"supply.v_reference_drift", "0.1%"}});
  ASSERT_EQ(d.notes.size(), 1u);
  EXPECT_NE(d.notes[0].find("supply.v_reference_drift = 0.1% is not used"), std::string::npos) << d.notes[0];
  EXPECT_TRUE(d.drift_inputs.empty());
}

}  // namespace
}  // namespace thermargin
