// Worst-case engine: closed-form corners, directed against enumerated
// corners, quantisation alone, and first-order agreement with the linear
// budget.
#include "thermargin/engines/worst_case.hpp"

#include <cmath>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "engine_fixture.hpp"
#include "thermargin/engines/linear_budget.hpp"
#include "thermargin/input/life.hpp"

namespace thermargin {
namespace {

using testing::design_with;
using testing::ideal;

constexpr double tight = 1e-6;  // K: agreement where only rounding differs

TEST(WorstCase, FixedResistorToleranceAloneGivesTheHandComputedCorners) {
  // A beta sensor read by the beta conversion with a ±1 % fixed resistor:
  // the firmware infers R/(1 + δ), so 1/T_est = 1/T − ln(1 + δ)/B exactly
  // (beta equation, IEC 60539-1). The band is the error at δ = ±1 %.
  const Design d = design_with(ideal({{"divider.r_fixed_tol", "1%"}}));
  ASSERT_EQ(d.inputs.size(), 1u);
  const Chain chain(d);
  const std::vector<double> temps{-20.0, 0.0, 25.0, 60.0, 80.0};
  const WorstCase wc = worst_case(chain, temps);
  for (std::size_t i = 0; i < temps.size(); ++i) {
    const double t = temps[i] + kelvin_offset;
    auto error = [&](double delta) { return 1.0 / (1.0 / t - std::log(1.0 + delta) / 3950.0) - t; };
    // The 24-bit reading interval (±½ LSB) adds at most a few µK here.
    EXPECT_NEAR(wc.points[i].low, std::min(error(0.01), error(-0.01)), 1e-5) << temps[i];
    EXPECT_NEAR(wc.points[i].high, std::max(error(0.01), error(-0.01)), 1e-5) << temps[i];
  }
}

TEST(WorstCase, OwnHalfWidthsOfTheFixedResistorAndItsTempcoAreTheHandComputedCorners) {
  // The contributor table's own half-width of a source is that source alone
  // at its bound. For the fixed resistor's tolerance δ the error moves by
  // 1/(1/T − ln(1 + δ)/B) − T (beta equation, IEC 60539-1, as above); its
  // tempco α moves R_fixed by α·(T_b − 25 °C), which with the board over
  // 10..40 °C is at most α·15 K at either end of the range.
  const Design d = design_with(ideal({{"divider.r_fixed_tol", "0.5%"},
                                      {"divider.r_fixed_tempco", "100ppm"},
                                      {"conditions.board", "10..40"}}));
  ASSERT_EQ(d.inputs.size(), 3u);  // tolerance, tempco, board range
  const Chain chain(d);
  const std::vector<double> temps{-10.0, 25.0, 70.0};
  const WorstCase wc = worst_case(chain, temps);
  auto index = [&](Source s) {
    for (std::size_t k = 0; k < d.inputs.size(); ++k)
      if (d.inputs[k].source == s) return k;
    ADD_FAILURE() << "inactive source";
    return std::size_t{0};
  };
  for (std::size_t i = 0; i < temps.size(); ++i) {
    const double t = temps[i] + kelvin_offset;
    auto half = [&](double delta) {
      auto error = [&](double x) { return 1.0 / (1.0 / t - std::log(1.0 + x) / 3950.0) - t; };
      return std::max(std::fabs(error(delta)), std::fabs(error(-delta)));
    };
    const auto& own = wc.points[i].own_half_width;
    EXPECT_NEAR(own[index(Source::r_fixed)], half(0.005), 1e-6) << temps[i];
    // The tempco at 10 °C or 40 °C, against the same board without it: the
    // product of a resistor's ratio (1 ± 0.005)·(1 ± 100e-6·15) is not
    // involved, only the tempco's own factor.
    EXPECT_NEAR(own[index(Source::r_fixed_tempco)], half(100e-6 * 15.0), 1e-6) << temps[i];
    EXPECT_GT(own[index(Source::r_fixed_tempco)], 0.0);
    // The board range alone moves nothing when every tempco is nominal.
    EXPECT_NEAR(own[index(Source::board_temperature)], 0.0, 1e-9) << temps[i];
  }
}

TEST(WorstCase, DirectedCornersEqualFullEnumerationOnEveryScenario) {
  for (const auto& file : testing::scenario_files()) {
    const Design d = design_with({}, file);
    const Chain chain(d);
    const auto temps = d.conditions.temperatures();
    const WorstCase full = worst_case(chain, temps, {.method = CornerMethod::enumerate});
    const WorstCase directed = worst_case(chain, temps, {.method = CornerMethod::directed});
    ASSERT_FALSE(full.directed);
    ASSERT_TRUE(directed.directed);
    std::size_t compared = 0;
    for (std::size_t i = 0; i < temps.size(); ++i) {
      if (full.points[i].failed_corners > 0) continue;  // compared where every corner reads
      EXPECT_NEAR(directed.points[i].low, full.points[i].low, tight) << file << " at " << temps[i];
      EXPECT_NEAR(directed.points[i].high, full.points[i].high, tight) << file << " at " << temps[i];
      ++compared;
    }
    EXPECT_EQ(compared, temps.size()) << file << ": no shipped scenario has a failing corner";
  }
}

TEST(WorstCase, RoundQuantiserAloneIsHalfAnLsbOverTheSensitivity) {
  // Rounding's error lies in ±½ LSB (IEEE Std 1241 ideal quantiser): in
  // temperature, ½ LSB divided by the sensitivity in LSB/K, to first order.
  const Design d = design_with(ideal({{"adc.bits", "12"}}));
  ASSERT_TRUE(d.inputs.empty());
  const Chain chain(d);
  const std::vector<double> temps{0.0, 25.0, 50.0};
  const WorstCase wc = worst_case(chain, temps);
  const LinearBudget lb = linear_budget(chain, temps);
  for (std::size_t i = 0; i < temps.size(); ++i) {
    const double h = 1e-3;
    const double sens = (chain.front_end({}, temps[i] + h).x_static - chain.front_end({}, temps[i] - h).x_static) / (2 * h);
    const double half = 0.5 * (wc.points[i].high - wc.points[i].low);
    EXPECT_NEAR(half, 0.5 / std::fabs(sens), 2e-3 * half) << temps[i];
    // The linear budget: k·(1/√12) LSB over the sensitivity (quantisation
    // standard deviation q/√12, signal-processing textbooks).
    const double lin_half = 0.5 * (lb.points[i].high - lb.points[i].low);
    EXPECT_NEAR(lin_half, lb.k_p / std::sqrt(12.0) / std::fabs(sens), 2e-3 * lin_half) << temps[i];
  }
}

TEST(WorstCase, OffsetCalibrationReadingHasItsOwnQuantisationInterval) {
  // docs/engines.md (Worst case): the calibration reading of the same unit carries its own,
  // independent reading interval. With every tolerance zero and an ideal
  // round quantiser, an offset calibration at 25 °C leaves
  // error(t) = e_q(t) − e_q(25 °C), each e_q within ±½ LSB over its own
  // sensitivity (IEEE Std 1241 ideal quantiser): the half-width is
  // ½/|s(t)| + ½/|s(25 °C)| to first order — a full LSB at 25 °C itself,
  // not zero, because the two readings round independently.
  const Design d = design_with(ideal({{"adc.bits", "12"},
                                      {"firmware.calibration", "offset"},
                                      {"firmware.calibration_at", "25"},
                                      {"firmware.calibration_uncertainty", "0"}}));
  ASSERT_TRUE(d.inputs.empty());
  const Chain chain(d);
  auto sensitivity = [&](double t) {
    const double h = 1e-3;
    return std::fabs(chain.front_end({}, t + h).x_static - chain.front_end({}, t - h).x_static) / (2 * h);
  };
  const std::vector<double> temps{0.0, 25.0, 60.0};
  const WorstCase wc = worst_case(chain, temps);
  for (std::size_t i = 0; i < temps.size(); ++i) {
    const double want = 0.5 / sensitivity(temps[i]) + 0.5 / sensitivity(25.0);
    const double half = 0.5 * (wc.points[i].high - wc.points[i].low);
    EXPECT_NEAR(half, want, 2e-3 * want) << temps[i];
    EXPECT_NEAR(0.5 * (wc.points[i].high + wc.points[i].low), 0.0, 2e-3 * want) << temps[i];
  }
}

TEST(WorstCase, LinearSumAgreesToFirstOrderAndTheGapShrinksQuadratically) {
  // The worst case's upper excursion from the nominal error and the linear
  // sum Σ|c_i|·a_i differ in second order: scaling every bound by 1/10 shrinks
  // the gap about 100-fold (Taylor's theorem). A 32-bit ADC keeps
  // quantisation out of it.
  auto gap = [](double scale) {
    auto pct = [&](double v) { return std::to_string(v * scale) + "%"; };
    const Design d = design_with(ideal({{"adc.bits", "32"},
                                        {"sensor.r25_tol", pct(2)},
                                                              {"sensor.beta_tol", pct(2)},
                                                              {"divider.r_fixed_tol", pct(1)},
                                                              {"adc.gain_error", pct(1)}}));
    const Chain chain(d);
    const std::vector<double> temps{-10.0, 60.0};
    const WorstCase wc = worst_case(chain, temps);
    const LinearBudget lb = linear_budget(chain, temps);
    double worst = 0.0;
    for (std::size_t i = 0; i < temps.size(); ++i) {
      double sum = 0.0;
      for (std::size_t k = 0; k < d.inputs.size(); ++k) sum += std::fabs(lb.points[i].terms[k].sensitivity) * d.inputs[k].bound;
      const double excursion = wc.points[i].high - chain.evaluate({}, temps[i]).error;
      worst = std::max(worst, std::fabs(excursion - sum));
    }
    return worst;
  };
  const double coarse = gap(1.0), fine = gap(0.1);
  EXPECT_GT(coarse, 0.0);
  EXPECT_GT(coarse / fine, 50.0);   // second order: about 100
  EXPECT_LT(coarse / fine, 200.0);
}

TEST(WorstCase, ReadingIntervalFollowsTheQuantiserAndNoise) {
  // docs/engines.md: [−½, +½] LSB for round, [−1, 0] for floor, widened by
  // ± k_noise·σ/√M.
  Design d = design_with({{"adc.noise", "0.8"}, {"adc.averaging", "4"}, {"montecarlo.noise_k", "3"}});
  ReadingInterval q = reading_interval(d);
  EXPECT_DOUBLE_EQ(q.lo, -0.5 - 3 * 0.8 / 2);
  EXPECT_DOUBLE_EQ(q.hi, 0.5 + 3 * 0.8 / 2);
  d = design_with({{"adc.noise", "0"}, {"adc.quantizer", "floor"}});
  q = reading_interval(d);
  EXPECT_DOUBLE_EQ(q.lo, -1.0);
  EXPECT_DOUBLE_EQ(q.hi, 0.0);
}

// The worst case by its definition (docs/engines.md), with no worst-case code:
// every corner of the box through Chain::evaluate, with every reading (at t
// and at each calibration point) at either end of its interval and every
// converted temperature at either end of its rounding. A corner fails when
// any of those readings does.
struct ByDefinition {
  double low = 0.0, high = 0.0;
  bool any_ok = false;
  int failed_corners = 0;
  int no_conversion = 0;  // corners whose reading had no conversion
};

ByDefinition every_corner(const Chain& chain, double t) {
  const Design& d = chain.design();
  const ReadingInterval q = reading_interval(d);
  const double rounding = 0.5 * d.firmware.resolution;
  const int readings = 1 + (d.firmware.calibration == Calibration::none ? 0 : d.firmware.calibration == Calibration::offset ? 1 : 2);
  const long long corners = 1LL << d.inputs.size();
  ByDefinition out;
  for (long long mask = 0; mask < corners; ++mask) {
    Deviations dev{};
    for (std::size_t k = 0; k < d.inputs.size(); ++k)
      dev[static_cast<std::size_t>(d.inputs[k].source)] = (mask >> k & 1) ? d.inputs[k].bound : -d.inputs[k].bound;
    double low = 0.0, high = 0.0;
    bool failed = false;
    for (int ends = 0; ends < (1 << (2 * readings)) && !failed; ++ends) {
      ReadingShift s;
      for (int r = 0; r < readings; ++r) {
        const double shift = (ends >> (2 * r) & 1) ? q.hi : q.lo;
        const double output = (ends >> (2 * r + 1) & 1) ? rounding : -rounding;
        (r == 0 ? s.at_t : s.at_cal[r - 1]) = shift;
        (r == 0 ? s.output_at_t : s.output_at_cal[r - 1]) = output;
      }
      const Evaluation e = chain.evaluate(dev, t, s, false);
      if (e.status != Status::ok) {
        failed = true;
        out.no_conversion += e.status == Status::no_solution;
        break;
      }
      low = ends == 0 ? e.error : std::min(low, e.error);
      high = ends == 0 ? e.error : std::max(high, e.error);
    }
    if (failed) {
      ++out.failed_corners;
      continue;
    }
    out.low = out.any_ok ? std::min(out.low, low) : low;
    out.high = out.any_ok ? std::max(out.high, high) : high;
    out.any_ok = true;
  }
  return out;
}

TEST(WorstCase, EnumerationIsEveryCornerThroughTheChainOnEveryScenarioAndCalibration) {
  // The enumeration shares the element's stage of the front end between the
  // corners of the node's and the ADC's inputs, each corner's calibration
  // between the temperatures, and (uncalibrated, monotone conversion)
  // converts only the extreme readings at each temperature; by definition
  // it is every corner evaluated on its own. Both fold the same numbers, so
  // they agree to the bit.
  std::vector<Design> designs = testing::every_scenario_and({
      {{"firmware.calibration", "offset"}, {"firmware.calibration_at", "40"}},
      {{"firmware.calibration", "two-point"}, {"firmware.calibration_at", "5,55"},
       {"firmware.calibration_uncertainty", "0.05"}},
      {{"supply.ratiometric", "false"}, {"supply.v_reference", "3.0"},
       {"supply.v_reference_tol", "0.5%"}, {"adc.leakage", "20n"}},
      {{"adc.offset", "1500"}},  // corners that saturate
      // Readings the firmware's lookup table does not reach (a wide R25 spread):
      // the extreme readings do not convert, and the element corner's corners
      // are taken one by one (docs/engines.md, Worst case).
      {{"sensor.r25_tol", "40%"}, {"firmware.conversion", "table"}},
      // A Steinhart–Hart conversion whose 1/T turns at R = 517 Ω (c < 0): not
      // monotone over these readings, so every reading of every corner is converted.
      {{"firmware.conversion", "steinhart-hart"}, {"firmware.a", "1.129e-3"},
       {"firmware.b", "2.341e-4"}, {"firmware.c", "-2e-6"}},
  });
  // Drift over life in every stage (element, node, ADC), at end of life.
  designs.push_back(at_end_of_life(design_with({{"sensor.drift", "2%"}, {"supply.ratiometric", "false"},
                                                {"supply.v_reference", "3.3V"}, {"supply.v_reference_drift", "0.2%"},
                                                {"adc.offset_drift", "1"}})));
  int compared = 0, with_failures = 0, skipped_gathering = 0, not_monotone = 0;
  for (std::size_t k = 0; k < designs.size(); ++k) {
    const Design& d = designs[k];
    SCOPED_TRACE("design " + std::to_string(k) + ": " + d.title);
    if (d.inputs.size() > 12) continue;  // 2^12 corners × up to 64 reading ends is enough here
    const Chain chain(d);
    const auto all = d.conditions.temperatures();
    const std::vector<double> temps{all.front(), all[all.size() / 3], all[all.size() / 2], all.back()};
    const WorstCase wc = worst_case(chain, temps, {.method = CornerMethod::enumerate});
    not_monotone += !chain.firmware().monotone_between(1.0, d.adc_span() - 2.0);
    for (double t : temps) skipped_gathering += every_corner(chain, t).no_conversion;
    for (std::size_t i = 0; i < temps.size(); ++i) {
      SCOPED_TRACE(temps[i]);
      const ByDefinition want = every_corner(chain, temps[i]);
      EXPECT_EQ(wc.points[i].failed_corners, want.failed_corners);
      ASSERT_EQ(wc.points[i].any_ok, want.any_ok);
      if (want.any_ok) {
        EXPECT_EQ(wc.points[i].low, want.low);
        EXPECT_EQ(wc.points[i].high, want.high);
      }
      ++compared;
      with_failures += want.failed_corners > 0;
    }
  }
  EXPECT_GE(compared, 30);
  EXPECT_GT(with_failures, 0);  // the saturating design exercises the failures
  EXPECT_GT(skipped_gathering, 0);  // the lookup table's ends
  EXPECT_GT(not_monotone, 0);
}

TEST(WorstCase, TheThreadsItIsGivenDoNotMoveTheBand) {
  // The enumeration takes its threads from WorstCaseOptions (not from the
  // Monte Carlo settings) and splits the analog corners between them; its
  // minimum and maximum are exact, so one thread and three give the same
  // bits (docs/engines.md, Worst case). The design's own montecarlo.threads
  // is set apart from both.
  const Design d = design_with({{"divider.r_fixed_tempco", "100ppm"},
                                {"conditions.board", "10..40"},
                                {"montecarlo.threads", "2"}});
  // Enough corners that three threads take part (one per 64 corners at most).
  ASSERT_GE(d.inputs.size(), 8u);
  const Chain chain(d);
  const std::vector<double> temps{-10.0, 25.0, 70.0};
  const WorstCase one = worst_case(chain, temps, {.threads = 1});
  const WorstCase three = worst_case(chain, temps, {.threads = 3});
  ASSERT_FALSE(one.directed);
  ASSERT_EQ(one.points.size(), three.points.size());
  for (std::size_t i = 0; i < temps.size(); ++i) {
    EXPECT_EQ(one.points[i].low, three.points[i].low) << temps[i];
    EXPECT_EQ(one.points[i].high, three.points[i].high) << temps[i];
    EXPECT_EQ(one.points[i].failed_corners, three.points[i].failed_corners) << temps[i];
    EXPECT_LT(one.points[i].low, one.points[i].high) << temps[i];
  }
}

}  // namespace
}  // namespace thermargin
