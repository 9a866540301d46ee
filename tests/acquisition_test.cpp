// The sampled node (acquisition.hpp, docs/model.md §14) and the divider's
// drive resistance (divider.hpp, docs/model.md §15), each check against its
// named outside source: RC charging and charge conservation (circuit
// textbooks), the acquisition-time rule printed in ADC datasheets (common
// practice), and SciPy's solve_ivp integrating the two differential
// equations (tests/reference/acquisition.py, Debian's /usr/bin/python3).
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <sstream>
#include <string>

#include "cli_run.hpp"
#include "engine_fixture.hpp"
#include "source_tree.hpp"
#include "thermargin/chain/acquisition.hpp"
#include "thermargin/chain/chain.hpp"
#include "thermargin/chain/divider.hpp"
#include "thermargin/engines/budget.hpp"
#include "thermargin/engines/nominal.hpp"
#include "thermargin/report/settling_summary.hpp"
#include "thermargin/tools/picker.hpp"

namespace thermargin {
namespace {

using testing::design_with;
using testing::ideal;

constexpr double acquisition_exact_tolerance = 1e-12;   // V: closed forms against the exact map, rounding only
constexpr double acquisition_scipy_tolerance = 1e-9;    // V: solve_ivp (Radau, rtol 1e-12) against the exact map
constexpr double kelvin_tolerance = 1e-9;   // K: a closed form read through the beta curve, rounding only
constexpr double printed_tolerance = 6e-6;  // K: CSV and text print 5 decimals (±5e-6) of the JSON's value

AcquisitionModel acquisition_model(double r_sw, double c_s, double c_n, double t_acq, double t_s, bool reset,
                       std::optional<double> settle = std::nullopt, int m = 1) {
  AcquisitionModel a;
  a.on = true;
  a.r_sw = r_sw;
  a.c_s = c_s;
  a.c_n = c_n;
  a.t_acq = t_acq;
  a.t_open = t_s - t_acq;
  a.switched = settle.has_value();
  a.settle = settle.value_or(0.0);
  a.reset = reset;
  a.m = m;
  return a;
}

// RC charging through R_th + R_sw (textbook): with no node capacitor
// V_s = V_th + (V_start − V_th)·e^(−t/((R_th + R_sw)·C_s)).
TEST(Acquisition, WithoutANodeCapacitorIsTheSingleExponential) {
  const double r_th = 47e3, r_sw = 2e3, c_s = 15e-12, t = 1.5e-6, v_th = 1.1, v_start = 0.0;
  const SampleMap s = acquisition_map(acquisition_model(r_sw, c_s, 0.0, t, 1e-4, true), r_th);
  const double expected = v_th + (v_start - v_th) * std::exp(-t / ((r_th + r_sw) * c_s));
  EXPECT_NEAR(s.apply(v_th, v_start), expected, acquisition_exact_tolerance);
  // Switched, precharge = same: C_s starts at 0 V and keeps what it took,
  // so the k-th sample is V_th·(1 − e^(−k·t/τ)); the reading is their mean.
  const double q = std::exp(-t / ((r_th + r_sw) * c_s));
  const SampleMap sw = acquisition_map(acquisition_model(r_sw, c_s, 0.0, t, 1e-4, false, 1e-3, 3), r_th);
  const double mean = v_th * (1.0 - (q + q * q + q * q * q) / 3.0);
  EXPECT_NEAR(sw.apply(v_th, 0.0), mean, acquisition_exact_tolerance);
}

// The minimum acquisition time for ½ LSB after a full-scale step,
// (R_th + R_sw)·C_s·ln 2^(N+1): the rule printed in microcontroller ADC
// datasheets (common practice).
TEST(Acquisition, MinimumAcquisitionTimeForHalfAnLsbIsTheDatasheetRule) {
  const Design d = design_with(ideal({{"adc.bits", "12"}, {"adc.c_sample", "10p"}, {"adc.r_switch", "1k"},
                                      {"adc.precharge", "ground"}, {"adc.sample_rate", "1k"}}));
  const double r_th = 20e3, v_ref = 3.3;
  const SettlingNeed need = settling_need(d, r_th, v_ref, 0.0, v_ref);
  const double rule = (r_th + 1e3) * 10e-12 * std::log(std::pow(2.0, 13));
  EXPECT_NEAR(need.t_acq, rule, 2e-6 * rule);  // the bisection stops at a relative 1e-6
}

// Charge conservation (textbook): a fast switch onto a large, settled node
// capacitor shares the charge, V_s − V_n = C_s/(C_n + C_s)·(V_start − V_n).
// R_th·C_n = 0.1 s against t_acq = 10 µs leaves the divider's recharge
// during the acquisition at some 2e-8 V.
TEST(Acquisition, LargeNodeCapacitorAndFastSwitchShareTheCharge) {
  const double r_th = 1e6, c_n = 100e-9, c_s = 10e-12, v_th = 2.0, v_start = 0.0;
  const SampleMap s = acquisition_map(acquisition_model(100.0, c_s, c_n, 10e-6, 1e-3, true, 10.0), r_th);
  const double step = c_s / (c_n + c_s) * (v_start - v_th);
  // The divider's recharge during the acquisition: 1e-4 of the 2e-4 V step.
  EXPECT_NEAR(s.apply(v_th, v_start) - v_th, step, 5e-8);
  EXPECT_LT(step, -1e-4);  // the step itself is 2e-4 V: the check is not vacuous
}

// The node's mean drop (charge per period over the period, Ohm's law): with
// R_th·C_n ≫ T_s the node sits below V_th by I·R_th, I = C_s·(V_n − V_start)/T_s.
// The node's ripple, C_s/C_n of the step (2.4e-5 V here), bounds the check.
TEST(Acquisition, SlowNodeDropsByTheMeanSamplingCurrentTimesTheResistance) {
  const double r_th = 100e3, c_n = 1e-6, c_s = 20e-12, t_s = 1e-3, v_th = 1.2, v_start = 0.0;
  const double v_s = acquisition_map(acquisition_model(1e3, c_s, c_n, 5e-6, t_s, true), r_th).apply(v_th, v_start);
  const double current = c_s * (v_s - v_start) / t_s;
  EXPECT_NEAR(v_th - v_s, current * r_th, 5e-5);
  EXPECT_GT(v_th - v_s, 2e-3);  // the drop itself is 2.4 mV: the check is not vacuous
}

// A divider powered continuously and sampled back to back (precharge =
// same) draws no charge in its periodic steady state: every sample is V_th.
TEST(Acquisition, ContinuousDividerWithPrechargeSameSettlesExactly) {
  const SampleMap s = acquisition_map(acquisition_model(1e3, 20e-12, 10e-9, 1e-6, 1e-4, false), 50e3);
  EXPECT_NEAR(s.apply(1.3, 0.0), 1.3, acquisition_exact_tolerance);
}

// The closed form of the 2×2 exponential against SciPy's solve_ivp
// (tests/reference/acquisition.py): the periodic steady state (solved as
// the fixed point of the measured one-period map, or reached the long way,
// period after period from power-on) and a switched divider's power-on, to
// 1e-9 V.
struct AcquisitionCase {
  double v_th, r_th, r_sw, c_s, c_n, t_acq, t_s, v_start;
  bool reset;
  std::optional<double> settle;
  int m;
  int periods = 0;  // > 0: the periodic steady state integrated over this many periods
};

double scipy_sample(const AcquisitionCase& c) {
  std::ostringstream cmd;
  cmd.precision(17);
  cmd << THERMARGIN_PYTHON << " '" << testing::source_path("tests/reference/acquisition.py") << "' v_th=" << c.v_th
      << " r_th=" << c.r_th << " r_sw=" << c.r_sw << " c_s=" << c.c_s << " c_n=" << c.c_n << " t_acq=" << c.t_acq
      << " t_s=" << c.t_s << " v_start=" << c.v_start << " reset=" << (c.reset ? 1 : 0)
      << " settle=" << (c.settle ? std::to_string(*c.settle) : std::string("always")) << " m=" << c.m;
  if (c.periods > 0) cmd << " periods=" << c.periods;
  const std::string out = testing::output_of(cmd.str());
  return std::stod(out);
}

TEST(Acquisition, AgreesWithScipySolveIvp) {
  const AcquisitionCase cases[] = {
      {1.2, 50e3, 5e3, 20e-12, 10e-9, 2e-6, 100e-6, 0.0, true, std::nullopt, 1},     // periodic, precharge ground
      {0.8, 200e3, 2e3, 12e-12, 2.2e-9, 1e-6, 50e-6, 3.3, true, std::nullopt, 1},    // periodic, precharge reference
      {1.2, 50e3, 5e3, 20e-12, 100e-9, 2e-6, 100e-6, 0.0, false, 2e-3, 4},            // switched, same, averaged
      {2.1, 100e3, 1e3, 10e-12, 0.0, 0.5e-6, 20e-6, 1.65, true, 1e-3, 2},            // no node capacitor
      // Periodic, reached the long way: the node (R_th·C_n = 12.5 µs) forgets
      // its power-on by e^(−4) each 50 µs period, so after 8 periods it is
      // within 1e-13 V of its periodic steady state.
      {1.2, 50e3, 5e3, 20e-12, 250e-12, 1e-6, 50e-6, 0.0, true, std::nullopt, 1, 8},
  };
  for (const AcquisitionCase& c : cases) {
    const auto m = acquisition_model(c.r_sw, c.c_s, c.c_n, c.t_acq, c.t_s, c.reset, c.settle, c.m);
    const double exact = acquisition_map(m, c.r_th).apply(c.v_th, c.v_start);
    EXPECT_NEAR(exact, scipy_sample(c), acquisition_scipy_tolerance) << "r_th " << c.r_th << " c_n " << c.c_n;
  }
}

// The drive resistance in the divider's top (Ohm's law): a low-placed
// sensor reads R·R_f/(R_f + R_drv) when the firmware assumes no drive
// resistance, and exactly R when it assumes the right one.
TEST(DriveResistance, FirmwareReadsTheDividerWithTheDriveInItsTop) {
  const auto base = ideal({{"firmware.conversion", "exact"}, {"supply.r_drive", "150"}});
  const Design plain = design_with(base);
  const Chain chain(plain);
  const FrontEnd fe = chain.front_end(nominal_deviations(), 25.0);
  const double r = 10e3, rf = 10e3;
  EXPECT_NEAR(fe.v_node, 3.3 * r / (rf + 150.0 + r), 1e-12);
  // The beta curve (IEC 60539-1) read at R' = R·R_f/(R_f + R_drv).
  const double seen = r * rf / (rf + 150.0);
  const double t_seen = 1.0 / (1.0 / 298.15 + std::log(seen / 10e3) / 3950.0) - 273.15;
  EXPECT_NEAR(chain.evaluate(nominal_deviations(), 25.0).t_reported, t_seen, 1e-9);
  const Design compensated = design_with(testing::with_extra(base, {{"firmware.drive_compensation", "150"}}));
  const Chain c2(compensated);
  EXPECT_NEAR(c2.evaluate(nominal_deviations(), 25.0).error, 0.0, 1e-9);
  // High placement: the drive in series with the sensor branch.
  const Design high = design_with(testing::with_extra(base, {{"divider.placement", "high"}, {"firmware.drive_compensation", "150"}}));
  const Chain c3(high);
  EXPECT_NEAR(c3.front_end(nominal_deviations(), 25.0).v_node, 3.3 * rf / (rf + 150.0 + r), 1e-12);
  EXPECT_NEAR(c3.evaluate(nominal_deviations(), 25.0).error, 0.0, 1e-9);
}

// The chain digitises the settled sample; the nominal engine reports the
// settling error in kelvin, and the settle time for ½ LSB is what the
// exact map needs (a slow switched node read too early).
TEST(Acquisition, ChainReadsTheSettledSampleAndReportsItsError) {
  const Design d = design_with(ideal({{"adc.bits", "12"}, {"sensor.r25", "100k"}, {"divider.r_fixed", "100k"},
                                      {"sensor.beta", "4250"}, {"firmware.conversion", "exact"},
                                      {"adc.c_sample", "10p"}, {"divider.c_node", "100n"},
                                      {"divider.settle_time", "2ms"}, {"adc.sample_rate", "1k"}}));
  const Chain chain(d);
  const FrontEnd fe = chain.front_end(nominal_deviations(), 25.0);
  // R_th = 50 kΩ, R_th·C_n = 5 ms: after 2 ms the node has reached 1 − e^(−0.4).
  EXPECT_NEAR(fe.x_ideal / d.adc_span() * 3.3, 1.65 * (1.0 - std::exp(-0.4)), 2e-4 * 1.65);
  const NominalPoint p = nominal_point(chain, 25.0);
  // The beta curve (IEC 60539-1) read at the sampled ratio: V_s = 0.54392 V
  // (the node after 2 ms, less the charge C_s takes) gives R = 19.735 kΩ,
  // 63.30 °C: 38.30 K hot (a low node is a small NTC resistance). The
  // divider's recharge during the 1 µs acquisition is some 0.01 K of it.
  EXPECT_NEAR(p.acquisition_error, 38.30, 0.05);
  const SettlingNeed need = settling_need_at(chain, 25.0);
  // ½ LSB of a node at half scale, with the charge C_s takes from the node
  // (charge conservation: the sample is (C_n·V_n + C_s·0)/(C_n + C_s)):
  // V_th·(C_n·e^(−t/τ) + C_s)/(C_n + C_s) ≤ ½ LSB, about τ·ln 6800 = 44 ms.
  const double half_lsb = 0.5 * 3.3 / 4096, c_n = 100e-9, c_s = 10e-12;
  const double expected = -5e-3 * std::log((half_lsb * (c_n + c_s) / 1.65 - c_s) / c_n);
  EXPECT_NEAR(need.settle, expected, 0.005 * expected);
}

// The summary names settling when it leads, with the settle time the exact
// map needs at the worst temperature (checked against charge conservation
// above), and says nothing for a design that settles.
TEST(Acquisition, SummaryNamesTheFixWithItsNumbersWhenSettlingLeads) {
  const Design d = design_with({}, testing::scenario_path("switched_logger_100k.ini"));
  const Chain chain(d);
  BudgetOptions o;
  o.monte_carlo = false;
  const Budget b = run_budget(chain, o);
  const SettlingSummary s = settling_summary(chain, b);
  ASSERT_TRUE(s.shown);
  EXPECT_GT(s.max_abs, 10.0);
  EXPECT_EQ(s.need.settle, settling_need_at(chain, s.at).settle);
  const std::string text = settling_text(d, s);
  EXPECT_NE(text.find("divider.settle_time >= " + format_quantity(s.need.settle, Quantity::time, 3)), std::string::npos) << text;
  EXPECT_NE(text.find("a longer settle time"), std::string::npos) << text;
  // Settled by a long enough wait, the same design says nothing.
  const Design settled = design_with({{"divider.settle_time", "500ms"}}, testing::scenario_path("switched_logger_100k.ini"));
  const Chain c2(settled);
  EXPECT_FALSE(settling_summary(c2, run_budget(c2, o)).shown);
}

// points[].acquisition_error in every format the budget writes (docs/model.md
// §14, Output). The multiplexed SAR input has no node capacitor and starts
// C_s at mid-reference in the nominal reading (precharge = any), so at every
// temperature the sample is the single exponential of RC charging (textbook),
// V_s = V + (1.65 V − V)·e^(−t_acq/((R_th + R_sw)·C_s)), from the node voltage
// V the JSON reports; with an ideal converter and the firmware's beta
// conversion, the error is the beta curve (IEC 60539-1) read at V_s minus the
// same curve read at V, R = R_f·V/(V_exc − V) for the sensor at the bottom.
// The CSV column and the --detail text carry the same numbers (5 decimals),
// and the JSON's settling summary names the window's largest of them.
TEST(Acquisition, ErrorIsTheSingleExponentialConvertedInJsonCsvAndText) {
  const std::string args = "budget " + testing::shell_quote(testing::scenario_path("mux_sar_high_impedance.ini")) +
                           " --no-mc --adc.offset=0 --adc.gain_error=0 --adc.inl=0 --firmware.resolution=0";
  const auto j = testing::cli_json(args);
  const double r_f = 100e3, v_exc = 3.3, r_sw = 2e3, c_s = 15e-12, t_acq = 4e-6;
  const auto r_of = [&](double v) { return r_f * v / (v_exc - v); };
  const auto t_of = [&](double v) { return 1.0 / (1.0 / 298.15 + std::log(r_of(v) / 100e3) / 4250.0) - 273.15; };
  double largest = 0.0, at = 0.0, largest_anywhere = 0.0;
  for (const auto& p : j["points"]) {
    const double v = p["v_node"].get<double>(), r_th = r_f * r_of(v) / (r_f + r_of(v));
    const double v_s = v + (0.5 * v_exc - v) * std::exp(-t_acq / ((r_th + r_sw) * c_s));
    const double e = p["acquisition_error"].get<double>();
    EXPECT_NEAR(e, t_of(v_s) - t_of(v), kelvin_tolerance) << p["t"];
    largest_anywhere = std::max(largest_anywhere, std::fabs(e));
    if (p["in_window"].get<bool>() && std::fabs(e) > largest) {
      largest = std::fabs(e);
      at = p["t"].get<double>();
    }
  }
  EXPECT_GT(largest_anywhere, 0.5);  // about 1.1 K at 0 °C: the check is not vacuous
  EXPECT_EQ(j["settling"]["max_abs"].get<double>(), largest);
  EXPECT_EQ(j["settling"]["at"].get<double>(), at);
  EXPECT_TRUE(j["settling"]["leading"].get<bool>());

  // CSV: the last column, acquisition_error_K, one row per point.
  std::istringstream csv(testing::csv_without_comments(testing::cli_output(args + " --format csv")));
  std::string line;
  std::getline(csv, line);
  ASSERT_GE(line.size(), 20u);
  EXPECT_EQ(line.substr(line.size() - 20), ",acquisition_error_K") << line;
  std::size_t i = 0;
  for (; std::getline(csv, line) && i < j["points"].size(); ++i)
    EXPECT_NEAR(std::stod(line.substr(line.rfind(',') + 1)), j["points"][i]["acquisition_error"].get<double>(), printed_tolerance) << line;
  EXPECT_EQ(i, j["points"].size());

  // Text: the --detail table whose last column is acquisition_error_K.
  std::istringstream text(testing::cli_output(args + " --detail"));
  while (std::getline(text, line) && line.find("acquisition_error_K") == std::string::npos) {
  }
  ASSERT_FALSE(text.eof()) << "no acquisition_error_K column in the --detail text";
  std::getline(text, line);  // the rule under the header
  for (i = 0; std::getline(text, line) && !line.empty() && i < j["points"].size(); ++i)
    EXPECT_NEAR(std::stod(line.substr(line.find_last_of(' ') + 1)), j["points"][i]["acquisition_error"].get<double>(), printed_tolerance)
        << line;
  EXPECT_EQ(i, j["points"].size());
}

// pick's --settles: on the multiplexed SAR input (4 µs, 15 pF, 2 kΩ switch)
// a 100 kΩ divider leaves tens of LSB unsettled at 10 °C, a 10 kΩ one settles
// (R_th + R_sw ≈ 11.5 kΩ: (R_th + R_sw)·C_s·ln 2^13 ≈ 1.6 µs, the datasheet rule).
TEST(Acquisition, PickRejectsADividerThatDoesNotSettleWhenAsked) {
  const Scenario s = testing::scenario_with({}, testing::scenario_path("mux_sar_high_impedance.ini"));
  PickOptions o;
  o.values = {10e3, 100e3};
  o.top = 2;
  o.guidance = false;
  o.constraints.settles = true;
  const PickResult r = pick(s, o);
  ASSERT_EQ(r.rows.size(), 2u);
  for (const auto& row : r.rows) {
    const bool rejected = std::find(row.rejected_by.begin(), row.rejected_by.end(), "settles") != row.rejected_by.end();
    EXPECT_EQ(rejected, row.r_fixed == 100e3) << row.r_fixed;
  }
}

}  // namespace
}  // namespace thermargin
