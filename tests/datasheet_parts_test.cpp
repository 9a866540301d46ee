// Parts as their datasheets state them (docs/model.md §1, §5, §7): coverage
// factors of a bound, the INL as a bound at every code, the ADC's drift with
// the board temperature, the RTD classes' validity ranges and the
// calibration medium's own dissipation.
#include <cmath>
#include <sstream>
#include <string>

#include <gtest/gtest.h>

#include "cli_run.hpp"
#include "engine_fixture.hpp"
#include "thermargin/chain/chain.hpp"
#include "thermargin/chain/rtd_class_range.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/engines/budget.hpp"
#include "thermargin/engines/linear_budget.hpp"
#include "thermargin/report/budget_output.hpp"

namespace thermargin {
namespace {

using testing::design_with;
using testing::ideal;
using testing::ideal_converter;

const BudgetTerm* term(const LinearPoint& p, const std::string& name) {
  for (const auto& t : p.terms)
    if (t.name == name) return &t;
  return nullptr;
}

const ToleranceInput* input(const Design& d, Source s) {
  for (const auto& in : d.inputs)
    if (in.source == s) return &in;
  return nullptr;
}

TEST(CoverageFactor, CalibrationCertificateIsReadWithKOfTwo) {
  // JCGM 100:2008 §6 (§6.2.1, §6.3.1): a certificate's expanded uncertainty
  // U = k·u_c with k = 2, so ±0.1 K stands for u = 0.05 K. The linear
  // budget reports that u_i for the reference's row.
  const Design d = design_with(ideal({{"firmware.calibration", "offset"}, {"firmware.calibration_at", "25"},
                                      {"firmware.calibration_uncertainty", "0.1"}}));
  const LinearBudget lb = linear_budget(Chain(d), {25.0}, BudgetOrder::first);
  const BudgetTerm* t = term(lb.points[0], "calibration_1");
  ASSERT_NE(t, nullptr);
  EXPECT_DOUBLE_EQ(t->u, 0.05);
  EXPECT_NEAR(t->sensitivity, 1.0, 1e-9);  // the reference's error is the calibrated error at t_cal
}

TEST(CoverageFactor, AnyToleranceCanStateItsOwnK) {
  // A resistor tolerance given as a 2-sigma bound: u = 1 % / 2 (JCGM 100 §6
  // again); the others keep montecarlo.sigma_per_tol = 3.
  const Design d = design_with(ideal({{"divider.r_fixed_tol", "1%"}, {"divider.r_fixed_tol_k", "2"},
                                      {"sensor.r25_tol", "1%"}}));
  EXPECT_DOUBLE_EQ(standard_uncertainty(*input(d, Source::r_fixed), d.montecarlo.sigma_per_tol), 0.005);
  EXPECT_DOUBLE_EQ(standard_uncertainty(*input(d, Source::r25), d.montecarlo.sigma_per_tol), 0.01 / 3.0);
}

TEST(InlShape, BoundIsUniformInTheBudgetAndAppliesAtEveryCode) {
  // GUM §4.3.7: a bound with no more known about it is rectangular, u = a/√3.
  const Design d = design_with(ideal({{"adc.inl", "2"}, {"adc.inl_shape", "bound"}, {"adc.bits", "12"}}));
  const ToleranceInput* inl = input(d, Source::adc_inl);
  ASSERT_NE(inl, nullptr);
  EXPECT_EQ(inl->distribution, Distribution::uniform);
  const LinearBudget lb = linear_budget(Chain(d), {25.0}, BudgetOrder::first);
  EXPECT_DOUBLE_EQ(term(lb.points[0], "adc_inl")->u, 2.0 / std::sqrt(3.0));
  // At the deviation +2 LSB every reading is 2 LSB up, wherever it sits in
  // the ADC's range (the bow would give less away from mid-scale).
  const Chain chain(d);
  Deviations dev{};
  dev[static_cast<std::size_t>(Source::adc_inl)] = 2.0;
  for (double t : {-20.0, 25.0, 80.0}) {
    const FrontEnd fe = chain.front_end(dev, t);
    EXPECT_NEAR(fe.x_static - fe.x_ideal, 2.0, 1e-9) << t;
  }
  const Design bow = design_with(ideal({{"adc.inl", "2"}, {"adc.inl_shape", "bow"}, {"adc.bits", "12"}}));
  const FrontEnd fe = Chain(bow).front_end(dev, -20.0);
  const double u = fe.x_ideal / 4096.0;
  EXPECT_NEAR(fe.x_static - fe.x_ideal, 2.0 * 4.0 * u * (1.0 - u), 1e-9);  // the bow of docs/model.md §5
}

TEST(AdcDrift, OffsetAndGainDriftWithTheBoardTemperature) {
  // o + δo_tc·(T_b − 25 °C), g + δg_tc·(T_b − 25 °C): with the board at
  // 45 °C, 0.01 LSB/K is 0.2 LSB of offset and 50 ppm/K is 0.1 % of gain.
  const Design d = design_with(ideal({{"adc.offset_tempco", "0.01"}, {"adc.gain_tempco", "50ppm"},
                                      {"conditions.board", "45"}, {"adc.bits", "12"}}));
  ASSERT_NE(input(d, Source::adc_offset_tempco), nullptr);
  ASSERT_NE(input(d, Source::adc_gain_tempco), nullptr);
  const Chain chain(d);
  Deviations dev{};
  dev[static_cast<std::size_t>(Source::adc_offset_tempco)] = 0.01;
  FrontEnd fe = chain.front_end(dev, 30.0);
  EXPECT_NEAR(fe.x_static - fe.x_ideal, 0.2, 1e-9);
  dev = {};
  dev[static_cast<std::size_t>(Source::adc_gain_tempco)] = 50e-6;
  fe = chain.front_end(dev, 30.0);
  EXPECT_NEAR(fe.x_static / fe.x_ideal, 1.001, 1e-12);
  // A board held at 25 degC leaves the drift no effect: not an active input.
  const Design at25 = design_with(ideal({{"adc.offset_tempco", "0.01"}, {"conditions.board", "25"}}));
  EXPECT_EQ(input(at25, Source::adc_offset_tempco), nullptr);
}

TEST(RtdClassRange, ValidityRangesOfIec60751ByConstructionAtBothEnds) {
  // IEC 60751:2008 (from memory, not read): wire-wound AA -50..250, A
  // -100..450, B and C -196..600 degC; film AA 0..150, A -30..300, B
  // -50..500, C -50..600 degC. Each end is rated, a tenth of a kelvin
  // beyond it is not.
  struct Row {
    const char* cls;
    const char* construction;
    double lo, hi;
  };
  const Row rows[] = {{"AA", "wire-wound", -50, 250}, {"A", "wire-wound", -100, 450}, {"B", "wire-wound", -196, 600},
                      {"C", "wire-wound", -196, 600}, {"AA", "film", 0, 150},         {"A", "film", -30, 300},
                      {"B", "film", -50, 500},        {"C", "film", -50, 600}};
  for (const Row& r : rows) {
    const Design d = design_with({{"sensor.model", "rtd"}, {"sensor.rtd_class", r.cls},
                                  {"sensor.rtd_construction", r.construction}, {"sensor.dissipation", "0"}});
    const std::string what = std::string(r.cls) + " " + r.construction;
    EXPECT_TRUE(rtd_class_rated_at(d, r.lo)) << what;
    EXPECT_TRUE(rtd_class_rated_at(d, r.hi)) << what;
    EXPECT_FALSE(rtd_class_rated_at(d, r.lo - 0.1)) << what;
    EXPECT_FALSE(rtd_class_rated_at(d, r.hi + 0.1)) << what;
  }
}

TEST(RtdClassRange, ADesignBeyondTheRangeIsMarkedNotRefused) {
  // Class AA film over -20..80 degC: rated from 0 only.
  const Design d = design_with({{"sensor.model", "rtd"}, {"sensor.rtd_class", "AA"}, {"sensor.dissipation", "0"}});
  EXPECT_EQ(rtd_class_range_note(d),
            "class AA (film) is rated over 0..150 degC (IEC 60751:2008); beyond it, at -20 to 0 degC, the bound is "
            "extrapolated");
  const Design inside = design_with({{"sensor.model", "rtd"}, {"sensor.rtd_class", "AA"}, {"sensor.dissipation", "0"},
                                     {"sensor.rtd_construction", "wire-wound"}});
  EXPECT_EQ(rtd_class_range_note(inside), "");
}

TEST(RtdClassRange, BudgetCsvMarksEachTemperatureBeyondTheRange) {
  // Class AA film, rated from 0 degC (the ranges above, from memory): the
  // CSV's rtd_class_extrapolated is 1 at -20 and -10 degC, 0 from 0 degC on;
  // a design inside its range has no such column.
  const auto csv = [](const testing::Overrides& o) {
    const Design d = design_with(o);
    const Chain chain(d);
    return budget_csv(run_budget(chain, {.monte_carlo = false, .corners = CornerMethod::enumerate, .progress = {}}),
                      {.chain = &chain});
  };
  const testing::Overrides aa{{"sensor.model", "rtd"}, {"sensor.rtd_class", "AA"}, {"sensor.dissipation", "0"},
                              {"conditions.t_min", "-20"}, {"conditions.t_max", "20"}, {"conditions.t_step", "10"},
                              {"requirement.window_min", "-20"}, {"requirement.window_max", "20"}};
  std::istringstream in(testing::csv_without_comments(csv(aa)));
  std::string line;
  std::getline(in, line);
  ASSERT_TRUE(line.ends_with(",rtd_class_extrapolated")) << line;
  for (const char* want : {"-20.000,", "-10.000,", "0.000,", "10.000,", "20.000,"}) {
    ASSERT_TRUE(std::getline(in, line));
    EXPECT_TRUE(line.starts_with(want)) << line;
    EXPECT_EQ(line.back(), line[0] == '-' ? '1' : '0') << line;
  }
  EXPECT_EQ(csv(testing::with_extra(aa, {{"sensor.rtd_construction", "wire-wound"}})).find("rtd_class_extrapolated"),
            std::string::npos);
}

TEST(RtdClassRange, ResponsePickAndGradesMarkTheExtrapolatedClass) {
  // The shipped freezer monitor reads a class A film element down to
  // -80 degC, rated from -30 degC (the ranges above, from memory): the
  // response's text, JSON and page, the pick page and the grades CSV (one
  // column, 1 for each combination beyond its class's range) all say so.
  const std::string file = testing::shell_quote(testing::scenario_path("freezer_pt100_film.ini"));
  const std::string note = "class A (film) is rated over -30..300 degC (IEC 60751:2008); beyond it, at -80 to -30 degC";
  const testing::ScratchDir dir;
  const std::string page = (dir.path / "r.html").string(), pick_page = (dir.path / "p.html").string();
  const testing::CliOutcome text = testing::run_cli("response " + file + " --report " + testing::shell_quote(page));
  ASSERT_EQ(text.status, 0) << text.err;
  EXPECT_NE(text.out.find("RTD class: " + note), std::string::npos);
  EXPECT_NE(testing::slurp(page).find("RTD class: " + note), std::string::npos);
  EXPECT_NE(testing::cli_json("response " + file).value("rtd_class_note", "").find(note), std::string::npos);
  ASSERT_EQ(testing::run_cli("pick " + file + " --values 1k --report " + testing::shell_quote(pick_page)).status, 0);
  EXPECT_NE(testing::slurp(pick_page).find("RTD class: " + note), std::string::npos);
  const std::string catalogue = dir.write("c.csv",
                                          "slot,grade,unit_cost,settings\n"
                                          "sensor,A film,3,sensor.rtd_class=A;sensor.rtd_construction=film\n"
                                          "sensor,A wire,5,sensor.rtd_class=A;sensor.rtd_construction=wire-wound\n");
  const testing::CliOutcome csv =
      testing::run_cli("grades " + file + " --units 200 --format csv --catalogue " + testing::shell_quote(catalogue));
  ASSERT_EQ(csv.status, 0) << csv.err;
  std::istringstream in(csv.out);
  std::string line;
  std::getline(in, line);  // the caution
  std::getline(in, line);
  EXPECT_TRUE(line.ends_with(",verdict,rtd_class_extrapolated")) << line;
  std::getline(in, line);
  EXPECT_TRUE(line.starts_with("A film,") && line.ends_with(",1")) << line;
  std::getline(in, line);
  EXPECT_TRUE(line.starts_with("A wire,") && line.ends_with(",0")) << line;  // wire-wound A: rated from -100 degC
}

TEST(RtdClassRange, PickTableResponseAndCheckCsvSayItInACommentLine) {
  // These CSVs have no per-temperature rows: the line after the caution
  // carries the note (the freezer monitor's class A film element read down to
  // -80 degC, rated from -30 degC: the ranges above, from memory). A design
  // inside its class's range (the default NTC design) has no such line.
  const std::string file = testing::shell_quote(testing::scenario_path("freezer_pt100_film.ini"));
  const std::string line = "# RTD class: class A (film) is rated over -30..300 degC (IEC 60751:2008); beyond it, at "
                           "-80 to -30 degC, the bound is extrapolated.\n";
  const std::string caution_line = "# " + std::string(caution) + "\n";
  for (const std::string command : {"pick --values 1k --format csv", "table --format csv", "table --emit csv",
                                    "response --format csv", "check --format csv"}) {
    const testing::CliOutcome with_note = testing::run_cli(command + " " + file);
    ASSERT_EQ(with_note.status, 0) << command << ": " << with_note.err;
    const auto at = with_note.out.find(line);
    ASSERT_NE(at, std::string::npos) << command << "\n" << with_note.out.substr(0, 400);
    if (command != "table --emit csv") EXPECT_EQ(with_note.out.substr(0, at), caution_line) << command;  // the second line
    const testing::CliOutcome without = testing::run_cli(command);
    ASSERT_EQ(without.status, 0) << command << ": " << without.err;
    EXPECT_EQ(without.out.find("# RTD class"), std::string::npos) << command;
  }
}

// The element's temperature in a medium at t with dissipation constant δ,
// by hand: T_e = t + P/δ, P = V_e²/R(T_e), V_e = V·R/(R_f + R), R the beta
// curve R25·exp(B(1/T − 1/T0)); iterated to convergence (a contraction:
// dP/dT/δ is about 0.004 here).
double element_rise(double t, double delta) {
  const double r25 = 10e3, b = 3950.0, rf = 10e3, v = 3.3;
  double te = t;
  for (int i = 0; i < 200; ++i) {
    const double r = r25 * std::exp(b * (1.0 / (te + 273.15) - 1.0 / 298.15));
    const double ve = v * r / (rf + r);
    te = t + ve * ve / r / delta;
  }
  return te - t;
}

TEST(CalibrationMedium, StirredBathLeavesTheDifferenceOfTheTwoRises) {
  // Offset calibration at 25 degC in a stirred bath whose dissipation
  // constant is ten times the service value: the calibration removes the
  // bath's rise, so the calibrated error at 25 degC is the service rise
  // minus the bath rise, computed by hand (element_rise above). With the
  // default (the service medium) the two cancel.
  const auto with = [](const char* medium) {
    testing::Overrides o = ideal_converter({{"sensor.r25_tol", "0"}, {"sensor.beta_tol", "0"},
                                            {"divider.r_fixed_tol", "0"}, {"divider.r_fixed_tempco", "0"},
                                            {"sensor.dissipation", "1.5mW/K"}, {"sensor.dissipation_tol", "0"},
                                            {"firmware.calibration", "offset"}, {"firmware.calibration_at", "25"},
                                            {"firmware.calibration_uncertainty", "0"}, {"conditions.board", "25"}});
    if (medium) o.push_back({"firmware.calibration_dissipation", medium});
    return design_with(o);
  };
  const double service = element_rise(25.0, 1.5e-3), bath = element_rise(25.0, 15e-3);
  EXPECT_GT(service, 0.05);  // a real rise: about 0.18 K
  const Design d = with("15mW/K");
  const Evaluation e = Chain(d).evaluate(Deviations{}, 25.0);
  ASSERT_EQ(e.status, Status::ok);
  EXPECT_NEAR(e.error, service - bath, 1e-8);
  const Design same = with(nullptr);
  EXPECT_NEAR(Chain(same).evaluate(Deviations{}, 25.0).error, 0.0, 1e-8);
}

}  // namespace
}  // namespace thermargin
