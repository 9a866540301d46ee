// Worst-case engine: closed-form corners, directed against enumerated
// corners, quantisation alone, and first-order agreement with the linear
// budget.
#include "thermargin/worst_case.hpp"

#include <cmath>

#include <gtest/gtest.h>

#include "engine_fixture.hpp"
#include "thermargin/linear_budget.hpp"

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

TEST(WorstCase, DirectedCornersEqualFullEnumerationOnEveryScenario) {
  for (const auto& file : testing::scenario_files()) {
    const Design d = design_with({}, file);
    const Chain chain(d);
    const auto temps = d.conditions.temperatures();
    const WorstCase full = worst_case(chain, temps, CornerMethod::enumerate);
    const WorstCase directed = worst_case(chain, temps, CornerMethod::directed);
    ASSERT_FALSE(full.directed);
    ASSERT_TRUE(directed.directed);
    for (std::size_t i = 0; i < temps.size(); ++i) {
      if (full.points[i].failed_corners > 0) continue;  // compared where every corner reads
      EXPECT_NEAR(directed.points[i].low, full.points[i].low, tight) << file << " at " << temps[i];
      EXPECT_NEAR(directed.points[i].high, full.points[i].high, tight) << file << " at " << temps[i];
    }
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
  // model.md §7: [−½, +½] LSB for round, [−1, 0] for floor, widened by
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

}  // namespace
}  // namespace thermargin
