// Checks of the platinum RTD curve (rtd.hpp) against IEC 60751: the
// Callendar–Van Dusen equation with the standard's coefficients, its Pt100
// table as printed in IEC 60751:2008 (0.01 Ω), values computed with the
// equation (0.001 Ω), and the tolerance classes of the 2008 edition.
#include "thermargin/chain/rtd.hpp"

#include <cmath>

#include <gtest/gtest.h>

namespace thermargin {
namespace {

const CallendarVanDusen pt100{};  // R0 = 100 Ω and the IEC 60751 A, B, C

// The equation values are given to 0.001 Ω, the printed table to 0.01 Ω:
// half a unit of the last digit either way, inclusive (R(100 °C) is exactly
// 138.5055 Ω, printed 138.506), plus the rounding of double arithmetic.
constexpr double equation_digits = 0.0005 + 1e-9;  // Ω
constexpr double table_digits = 0.005 + 1e-9;      // Ω
// Inverting a value rounded to 0.001 Ω: half that digit over the smallest
// slope in −200…850 °C (0.29 Ω/K at 850 °C) is 0.0017 K.
constexpr double inverse_tolerance = 0.002;  // K
constexpr double rtd_round_trip_tolerance = 1e-9;  // K
constexpr double slope_tolerance = 1e-7;       // Ω/K, central difference with h = 1e-3 K
constexpr double c_term_tolerance = 1e-12;     // Ω, rounding of a difference of numbers near 60 Ω

void expect_equation_value(double t, double r_equation) {
  EXPECT_NEAR(resistance(pt100, t), r_equation, equation_digits) << t << " degC";
  EXPECT_NEAR(temperature_celsius(pt100, r_equation), t, inverse_tolerance) << r_equation << " ohm";
}

// Computed with the IEC 60751 equation and coefficients, to 0.001 Ω (IEC 60751
// prints its table to 0.01 Ω: the printed values are the next test).
TEST(RtdCallendarVanDusen, MatchesTheIec60751EquationAtMinus200C) { expect_equation_value(-200, 18.520); }
TEST(RtdCallendarVanDusen, MatchesTheIec60751EquationAtMinus100C) { expect_equation_value(-100, 60.256); }
TEST(RtdCallendarVanDusen, MatchesTheIec60751EquationAt0C) { expect_equation_value(0, 100.000); }
TEST(RtdCallendarVanDusen, MatchesTheIec60751EquationAt100C) { expect_equation_value(100, 138.506); }
TEST(RtdCallendarVanDusen, MatchesTheIec60751EquationAt200C) { expect_equation_value(200, 175.856); }
TEST(RtdCallendarVanDusen, MatchesTheIec60751EquationAt400C) { expect_equation_value(400, 247.092); }
TEST(RtdCallendarVanDusen, MatchesTheIec60751EquationAt600C) { expect_equation_value(600, 313.708); }
TEST(RtdCallendarVanDusen, MatchesTheIec60751EquationAt850C) { expect_equation_value(850, 390.481); }

TEST(RtdCallendarVanDusen, MatchesThePrintedPt100TableToTwoDecimals) {
  // The Pt100 table as printed in IEC 60751:2008, 0.01 Ω.
  const std::pair<double, double> printed[] = {{-200, 18.52}, {-100, 60.26}, {0, 100.00}, {100, 138.51},
                                               {200, 175.86}, {400, 247.09}, {600, 313.71}};
  for (const auto& [t, r] : printed) EXPECT_NEAR(resistance(pt100, t), r, table_digits) << t;
}

TEST(RtdCallendarVanDusen, CTermActsOnlyBelowZero) {
  // IEC 60751: the C term applies below 0 °C only. Above 0 °C the curve is
  // the quadratic R0 (1 + A t + B t²) exactly; below, it differs by R0 C (t − 100) t³.
  const double t = 150.0;
  EXPECT_DOUBLE_EQ(resistance(pt100, t), 100.0 * (1 + 3.9083e-3 * t - 5.775e-7 * t * t));
  const double tc = -150.0;
  const double quadratic = 100.0 * (1 + 3.9083e-3 * tc - 5.775e-7 * tc * tc);
  EXPECT_NEAR(resistance(pt100, tc) - quadratic, 100.0 * -4.183e-12 * (tc - 100) * tc * tc * tc, c_term_tolerance);
}

TEST(RtdCallendarVanDusen, InverseRoundTripsFromMinus200To850C) {
  for (double t = -200.0; t <= 850.0; t += 0.25)
    ASSERT_NEAR(temperature_celsius(pt100, resistance(pt100, t)), t, rtd_round_trip_tolerance) << t;
  const CallendarVanDusen pt1000{1000.0};
  for (double t = -200.0; t <= 850.0; t += 12.5)
    ASSERT_NEAR(temperature_celsius(pt1000, resistance(pt1000, t)), t, rtd_round_trip_tolerance) << t;
}

TEST(RtdCallendarVanDusen, SlopeAgreesWithCentralDifference) {
  const double h = 1e-3;
  for (double t : {-180.0, -50.0, -0.5, 0.5, 25.0, 300.0, 800.0}) {
    const double numeric = (resistance(pt100, t + h) - resistance(pt100, t - h)) / (2 * h);
    EXPECT_NEAR(resistance_slope(pt100, t), numeric, slope_tolerance) << t;
  }
}

TEST(RtdCallendarVanDusen, MeanCoefficientIsTheFamiliar0385PerKelvin) {
  // α = (R100 − R0)/(100 R0) = 0.00385055 /K for the IEC curve (common practice).
  constexpr double alpha_digits = 5e-12;  // /K, the last digit of 0.00385055 is exact (A + 100 B)
  EXPECT_NEAR((resistance(pt100, 100) - resistance(pt100, 0)) / (100 * 100.0), 0.00385055, alpha_digits);
}

// IEC 60751:2008 tolerance classes, ±(a + b|t|) °C (class C from memory).
constexpr double class_digits = 1e-12;  // K: exact decimal arithmetic

TEST(RtdToleranceClass, ClassAAIsPoint10PlusPoint0017T) {
  EXPECT_NEAR(class_bound(RtdClass::AA, 0), 0.10, class_digits);
  EXPECT_NEAR(class_bound(RtdClass::AA, 100), 0.27, class_digits);
  EXPECT_NEAR(class_bound(RtdClass::AA, -50), 0.185, class_digits);
}

TEST(RtdToleranceClass, ClassAIsPoint15PlusPoint002T) {
  EXPECT_NEAR(class_bound(RtdClass::A, 0), 0.15, class_digits);
  EXPECT_NEAR(class_bound(RtdClass::A, 100), 0.35, class_digits);
  EXPECT_NEAR(class_bound(RtdClass::A, -100), 0.35, class_digits);
}

TEST(RtdToleranceClass, ClassBIsPoint30PlusPoint005T) {
  EXPECT_NEAR(class_bound(RtdClass::B, 0), 0.30, class_digits);
  EXPECT_NEAR(class_bound(RtdClass::B, 100), 0.80, class_digits);
  EXPECT_NEAR(class_bound(RtdClass::B, 250), 1.55, class_digits);
  EXPECT_NEAR(class_bound(RtdClass::B, -200), 1.30, class_digits);
}

TEST(RtdToleranceClass, ClassCIsPoint6PlusPoint01TFromMemory) {
  EXPECT_NEAR(class_bound(RtdClass::C, 0), 0.6, class_digits);
  EXPECT_NEAR(class_bound(RtdClass::C, 100), 1.6, class_digits);
  EXPECT_NEAR(class_bound(RtdClass::C, -100), 1.6, class_digits);
}

TEST(RtdToleranceClass, ClassesAreNestedAtEveryTemperature) {
  for (double t = -200; t <= 850; t += 10) {
    EXPECT_LT(class_bound(RtdClass::AA, t), class_bound(RtdClass::A, t)) << t;
    EXPECT_LT(class_bound(RtdClass::A, t), class_bound(RtdClass::B, t)) << t;
    EXPECT_LT(class_bound(RtdClass::B, t), class_bound(RtdClass::C, t)) << t;
  }
}

}  // namespace
}  // namespace thermargin
