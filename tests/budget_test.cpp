// Tests of thermargin/engines/budget.hpp's validation_failure_reason: the
// phrase the budget prints (text under --detail, JSON) where the linear band
// fails its Monte Carlo validation. The rule it explains is JCGM 101:2008 §8
// (the linear coverage interval's endpoints within the numerical tolerance δ
// of the Monte Carlo's, δ half a unit in the last of two significant digits
// of u_c, §7.9.2); each test builds one budget point by hand so that exactly
// one cause applies, and reads the numbers back from the phrase.
#include "thermargin/engines/budget.hpp"

#include <gtest/gtest.h>

#include <string>

#include "engine_fixture.hpp"
#include "thermargin/engines/monte_carlo.hpp"

namespace thermargin {
namespace {

using testing::design_with;
using testing::ideal;

// A linear band of ±0.392 K (u_c = 0.2 K, so δ = 0.005 K) and a Monte Carlo
// interval `shift` wider at the top.
BudgetPoint point(double shift) {
  BudgetPoint p;
  p.linear.status = Status::ok;
  p.linear.u_c = 0.2;
  p.linear.low = -0.392;
  p.linear.high = 0.392;
  McPoint mc;
  mc.valid = 10000;
  mc.low = -0.392;
  mc.high = 0.392 + shift;
  p.mc = mc;
  return p;
}

TEST(ValidationFailureReason, EmptyWhereValidatedOrWithoutMonteCarlo) {
  const Design d = design_with(ideal());
  ASSERT_DOUBLE_EQ(numerical_tolerance(0.2), 0.005);  // JCGM 101 §7.9.2: 0.20 → half of 0.01
  EXPECT_EQ(validation_failure_reason(point(0.004), d), "");  // within δ: validated
  BudgetPoint no_mc = point(0.1);
  no_mc.mc.reset();
  EXPECT_EQ(validation_failure_reason(no_mc, d), "");
  BudgetPoint no_linear = point(0.1);
  no_linear.linear.status = Status::saturated;
  EXPECT_EQ(validation_failure_reason(no_linear, d), "");
}

TEST(ValidationFailureReason, NamesSaturationWithItsShare) {
  BudgetPoint p = point(0.1);
  p.mc->saturated = 10000 / 19;  // 526 of 10 526 readings: 5.00 %
  const std::string why = validation_failure_reason(p, design_with(ideal()));
  EXPECT_EQ(why.rfind("saturation: 5 % of the readings reach a rail", 0), 0u) << why;
}

TEST(ValidationFailureReason, NamesOutputRoundingCoarserThanTheTolerance) {
  const Design d = design_with(ideal({{"firmware.resolution", "0.1"}}));
  const std::string why = validation_failure_reason(point(0.1), d);
  EXPECT_NE(why.find("output rounding"), std::string::npos) << why;
  EXPECT_NE(why.find("0.1 K resolution"), std::string::npos) << why;
  EXPECT_NE(why.find("tolerance of 0.005 K"), std::string::npos) << why;
  // A resolution finer than δ does not explain the failure.
  const std::string finer = validation_failure_reason(point(0.1), design_with(ideal({{"firmware.resolution", "0.001"}})));
  EXPECT_EQ(finer.find("output rounding"), std::string::npos) << finer;
}

TEST(ValidationFailureReason, NamesAProductOfInputsByThePairRowsShare) {
  BudgetPoint p = point(0.1);
  p.contributors = {{"sensor.r25", "", 0.6, 0.0}, {"sensor.r25 \u00d7 sensor.beta", "", 0.25, 0.0},
                    {"adc.offset \u00d7 adc.gain", "", 0.15, 0.0}};
  const std::string why = validation_failure_reason(p, design_with(ideal()));
  EXPECT_EQ(why.rfind("a non-normal product: pairs of inputs carry 40 % of the variance", 0), 0u) << why;
  // Pairs below a tenth of the variance leave the general phrase.
  p.contributors = {{"sensor.r25", "", 0.95, 0.0}, {"sensor.r25 \u00d7 sensor.beta", "", 0.05, 0.0}};
  EXPECT_EQ(validation_failure_reason(p, design_with(ideal())).rfind("the output is not close to normal", 0), 0u);
}

TEST(ValidationFailureReason, OtherwiseGivesBothEndpointOffsetsAndTheTolerance) {
  const std::string why = validation_failure_reason(point(0.1), design_with(ideal()));
  EXPECT_EQ(why, "the output is not close to normal (endpoints +0 and -0.1 K from Monte Carlo's, tolerance 0.005 K)");
}

}  // namespace
}  // namespace thermargin
