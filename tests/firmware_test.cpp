// Checks of the firmware's conversion (firmware.hpp, docs/model.md §6): the
// full-scale convention, the beta and Steinhart–Hart conversions and their
// defaults, the lookup table (its code span, its integer storage, its linear
// interpolation) and the output rounding. Hand formulas are the second
// opinion: the beta equation (IEC 60539-1), the divider inverted by Ohm's law.
#include "thermargin/chain/firmware.hpp"

#include <cmath>
#include <string>
#include <utility>
#include <vector>

#include <gtest/gtest.h>

#include "engine_fixture.hpp"
#include "thermargin/chain/chain.hpp"
#include "thermargin/chain/divider.hpp"
#include "thermargin/input/scenario.hpp"
#include "thermargin/chain/sensor.hpp"

namespace thermargin {
namespace {

using testing::design_with;
using testing::ideal_converter;

constexpr double firmware_exact_tolerance = 1e-9;  // K: the same arithmetic in another order
constexpr double coefficient_tolerance = 1e-15;  // 1/K, Steinhart–Hart coefficients near 1e-4
constexpr double firmware_relative_tolerance = 1e-12;     // one value computed two ways
constexpr double output_tolerance = 1e-12;       // K, rounding and storage arithmetic on numbers near 20

// The beta equation solved for T (IEC 60539-1), in °C.
double beta_temperature(double r, double r25, double beta) {
  return 1.0 / (1.0 / t0_kelvin + std::log(r / r25) / beta) - kelvin_offset;
}

TEST(FirmwareConversion, BetaConversionIsTheBetaEquationOfTheInvertedDivider) {
  // A code c of a 12-bit ADC, FS = 2^12: ρ = c/4096, R = R_fixed ρ/(1 − ρ)
  // for the sensor below the node (Ohm's law), T from the beta equation.
  const Design d = design_with({{"sensor.r25", "10k"}, {"sensor.beta", "3435"}, {"divider.r_fixed", "12k"}});
  const Firmware fw(d);
  for (double code : {300.0, 1000.5, 2048.0, 3900.25}) {
    const double rho = code / 4096.0;
    const double r = 12e3 * rho / (1 - rho);
    EXPECT_NEAR(*fw.temperature(code), beta_temperature(r, 10e3, 3435), firmware_exact_tolerance) << code;
  }
}

TEST(FirmwareConversion, FirmwareBetaMayDifferFromTheSensors) {
  // The firmware uses its own r25/beta: a sensor of B = 3950 read with
  // B = 3900 reads right at 25 °C only.
  const Design d = design_with(ideal_converter({{"firmware.conversion", "beta"}, {"firmware.beta", "3900"}}));
  const Chain chain(d);
  EXPECT_NEAR(chain.evaluate(nominal_deviations(), 25.0).error, 0.0, firmware_exact_tolerance);
  for (double t : {-20.0, 0.0, 60.0, 80.0}) {
    const double r = 10e3 * std::exp(3950 * (1 / (t + kelvin_offset) - 1 / t0_kelvin));
    EXPECT_NEAR(chain.evaluate(nominal_deviations(), t).t_reported, beta_temperature(r, 10e3, 3900), firmware_exact_tolerance) << t;
  }
}

TEST(FirmwareConversion, FullScaleOfTwoToTheNMinusOneReadsTheRatioLarger) {
  // FS = 2^N − 1 (docs/model.md §6): ρ = c/(2^N − 1) while the ADC's code is
  // V/V_ref·2^N; the systematic error is what the inverted divider makes of it.
  const Design d = design_with(ideal_converter({{"adc.bits", "12"}, {"firmware.full_scale", "pow2-minus-1"}}));
  const Chain chain(d);
  for (double t : {-20.0, 25.0, 80.0}) {
    const double r = 10e3 * std::exp(3950 * (1 / (t + kelvin_offset) - 1 / t0_kelvin));
    const double code = r / (10e3 + r) * 4096.0;
    const double rho = code / 4095.0;
    const double expected = beta_temperature(10e3 * rho / (1 - rho), 10e3, 3950);
    const Evaluation e = chain.evaluate(nominal_deviations(), t);
    EXPECT_NEAR(e.t_reported, expected, firmware_exact_tolerance) << t;
    EXPECT_LT(e.error, 0.0) << t;  // a larger ratio is a larger NTC resistance: colder
  }
}

TEST(FirmwareConversion, CodesOutsideTheDividerHaveNoConversion) {
  const Design d = design_with({{"firmware.full_scale", "pow2-minus-1"}});
  const Firmware fw(d);
  EXPECT_FALSE(fw.temperature(0.0));      // ρ = 0: no resistance
  EXPECT_FALSE(fw.temperature(4095.0));   // ρ = 1: an open sensor
  EXPECT_TRUE(fw.temperature(4094.0));
}

TEST(FirmwareConversion, DefaultSteinhartHartPassesThroughTheCurveAtTheRangeEndsAndMiddle) {
  // docs/model.md §6: the firmware's own a/b/c default to the Steinhart–Hart
  // curve through the nominal curve at t_min, the middle and t_max. A Pt1000
  // (IEC 60751) is then read exactly there and not quite between.
  const Design d = design_with(ideal_converter({{"sensor.model", "rtd"}, {"sensor.r0", "1k"}, {"divider.r_fixed", "1k"},
                                                {"firmware.conversion", "steinhart-hart"}, {"conditions.t_min", "0"},
                                                {"conditions.t_max", "250"}}));
  const Chain chain(d);
  for (double t : {0.0, 125.0, 250.0}) EXPECT_NEAR(chain.evaluate(nominal_deviations(), t).error, 0.0, firmware_exact_tolerance) << t;
  EXPECT_GT(std::fabs(chain.evaluate(nominal_deviations(), 60.0).error), 1e-3);
}

TEST(FirmwareConversion, SteinhartHartFittedToABetaCurveIsTheBetaCurve) {
  // A beta curve is 1/T = 1/T0 + (ln R − ln R25)/B: Steinhart–Hart with
  // C = 0, so the three-point fit reproduces it everywhere.
  const Design d = design_with(ideal_converter({{"firmware.conversion", "steinhart-hart"}}));
  const Firmware fw(d);
  EXPECT_NEAR(fw.steinhart_hart().b, 1 / 3950.0, coefficient_tolerance);
  EXPECT_NEAR(fw.steinhart_hart().c, 0.0, coefficient_tolerance);
  const Chain chain(d);
  for (double t = -20.0; t <= 80.0; t += 2.5) EXPECT_NEAR(chain.evaluate(nominal_deviations(), t).error, 0.0, firmware_exact_tolerance) << t;
}

TEST(FirmwareConversion, DefaultBetaOfANonBetaSensorIsTheTwoPointBetaOverTheRange) {
  // For a sensor that is not a beta model, firmware.beta = sensor means the
  // B-value through the nominal curve at t_min and t_max (IEC 60539-1:
  // B = ln(R1/R2)/(1/T1 − 1/T2)), and r25 the value that curve gives at 25 °C.
  const Design d = design_with(ideal_converter({{"sensor.model", "steinhart-hart"}, {"firmware.conversion", "beta"},
                                                {"conditions.t_min", "0"}, {"conditions.t_max", "60"}}));
  const SteinhartHart sh{1.129148e-3, 2.34125e-4, 8.76741e-8};
  const double t1 = kelvin_offset, t2 = 60 + kelvin_offset;
  const double b = (ln_resistance(sh, t1) - ln_resistance(sh, t2)) / (1 / t1 - 1 / t2);
  EXPECT_NEAR(d.firmware.beta / b, 1.0, firmware_relative_tolerance);
  const Chain chain(d);
  EXPECT_NEAR(chain.evaluate(nominal_deviations(), 0.0).error, 0.0, firmware_exact_tolerance);
  EXPECT_NEAR(chain.evaluate(nominal_deviations(), 60.0).error, 0.0, firmware_exact_tolerance);
  EXPECT_GT(std::fabs(chain.evaluate(nominal_deviations(), 30.0).error), 1e-3);
}

TEST(FirmwareConversion, OutputRoundingIsHalfUpToTheResolution) {
  // docs/model.md §6 step 4: ⌊t/r + ½⌋·r, the same half-up rule as the quantiser (docs/model.md §5).
  const Design d = design_with({{"firmware.resolution", "0.1"}});
  const Firmware fw(d);
  EXPECT_NEAR(fw.round_output(21.34), 21.3, output_tolerance);
  EXPECT_NEAR(fw.round_output(21.36), 21.4, output_tolerance);
  EXPECT_NEAR(fw.round_output(21.25), 21.3, output_tolerance);  // half up
  EXPECT_NEAR(fw.round_output(-4.25), -4.2, output_tolerance);  // half up below zero too
  const Design none = design_with({{"firmware.resolution", "0"}});
  EXPECT_EQ(Firmware(none).round_output(21.3456), 21.3456);
}

// --- the lookup table -------------------------------------------------------

// The ideal code of the nominal divider at t (no self-heating, no leakage).
double ideal_code(const Design& d, double t) {
  const double r = std::exp(*nominal_ln_resistance(d.sensor, t + kelvin_offset));
  return divider_ratio(d.divider.placement, d.divider.r_fixed, r) * d.adc_span();
}

// Firmware::monotone_between() lets the worst case convert only the lowest and the
// highest of many readings (docs/engines.md, Worst case): a monotone
// conversion must convert an interval of codes, in one direction. Checked by
// that definition on a sweep of fractional codes over the whole ADC, for
// every kind of conversion that claims it.
TEST(FirmwareConversion, AMonotoneConversionConvertsAnIntervalOfCodesInOrder) {
  const std::vector<std::pair<std::string, Design>> designs{
      {"beta", design_with({})},
      {"steinhart-hart through the curve", design_with({{"firmware.conversion", "steinhart-hart"}})},
      {"lookup table", design_with({{"firmware.conversion", "table"}})},
      {"lookup table in temperature", design_with({{"firmware.conversion", "table"}, {"firmware.table_spacing", "temperature"}})},
      {"exact, Pt100", design_with({}, testing::scenario_path("freezer_pt100_film.ini"))},
      {"exact, R-T table", design_with({}, testing::scenario_path("incubator.ini"))}};
  for (const auto& [name, d] : designs) {
    SCOPED_TRACE(name);
    const Firmware fw(d);
    ASSERT_TRUE(fw.monotone_between(1.0, d.adc_span() - 2.0));
    int converted = 0, gaps = 0, rises = 0, falls = 0;
    bool before = false, after_gap = false;
    double last = 0.0;
    for (double code = 0.0; code <= d.adc_span(); code += 0.37) {
      const auto t = fw.temperature(code);
      if (!t) {
        after_gap = before;
        continue;
      }
      gaps += after_gap;  // a value after a code without one: not an interval
      if (before) {
        rises += *t > last;
        falls += *t < last;
      }
      before = true;
      last = *t;
      ++converted;
    }
    EXPECT_GT(converted, 1000);
    EXPECT_EQ(gaps, 0);
    EXPECT_TRUE(rises == 0 || falls == 0) << rises << " rises, " << falls << " falls";
  }
  // 1/T = a + b·L + c·L³ with c < 0 turns at L = √(b/(−3c)): with
  // b = 2.341e-4 and c = −2e-6, L = 6.25 (R = 517 Ω). Readings on both
  // sides of it are not claimed monotone; readings all below it are.
  const Design turning = design_with({{"firmware.conversion", "steinhart-hart"}, {"firmware.a", "1.129e-3"},
                                      {"firmware.b", "2.341e-4"}, {"firmware.c", "-2e-6"}});
  const Firmware fw(turning);
  const double span = turning.adc_span();
  auto code_at = [&](double r) { return r / (r + 10e3) * span; };  // the default 10 kΩ fixed resistor below the node
  EXPECT_FALSE(fw.monotone_between(code_at(100.0), code_at(10e3)));
  EXPECT_TRUE(fw.monotone_between(code_at(100.0), code_at(400.0)));
  EXPECT_FALSE(fw.monotone_between(code_at(700.0), code_at(10e3)));
}

TEST(FirmwareLookupTable, SpansTheRangeCodesWithAFivePercentMarginEachSide) {
  // docs/model.md: the codes of t_min and t_max, widened by 5 % of their span
  // at each end, within [1, 2^N − 2].
  const Design d = design_with({{"firmware.conversion", "table"}, {"firmware.table_points", "33"}});
  const Firmware fw(d);  // the table lives in the firmware object
  const LookupTable& table = fw.table();
  const double lo = ideal_code(d, d.conditions.t_max), hi = ideal_code(d, d.conditions.t_min);
  const double margin = 0.05 * (hi - lo);
  EXPECT_EQ(table.first_code, static_cast<std::int64_t>(std::floor(lo - margin)));
  EXPECT_EQ(table.stored.size(), 33u);
  EXPECT_GE(static_cast<double>(table.last_code()), hi + margin);
  EXPECT_LT(static_cast<double>(table.last_code() - table.step), hi + margin);  // no more points than needed
}

TEST(FirmwareLookupTable, StoresTheExactConversionAsIntegersOfTheUnit) {
  const Design d = design_with({{"firmware.conversion", "table"}, {"firmware.table_unit", "0.01"}});
  const Firmware fw(d);
  const LookupTable& table = fw.table();
  for (std::size_t k = 0; k < table.stored.size(); ++k) {
    const double code = static_cast<double>(table.first_code + table.step * static_cast<std::int64_t>(k));
    EXPECT_EQ(table.stored[k], std::llround(*fw.exact_temperature(code) / 0.01)) << k;
    EXPECT_NEAR(*fw.temperature(code), static_cast<double>(table.stored[k]) * 0.01, output_tolerance) << k;
  }
}

TEST(FirmwareLookupTable, InterpolatesLinearlyBetweenStoredPoints) {
  const Design d = design_with({{"firmware.conversion", "table"}});
  const Firmware fw(d);
  const LookupTable& table = fw.table();
  for (std::size_t k = 0; k + 1 < table.stored.size(); k += 5) {
    const double c0 = static_cast<double>(table.first_code + table.step * static_cast<std::int64_t>(k));
    const double a = static_cast<double>(table.stored[k]) * table.unit, b = static_cast<double>(table.stored[k + 1]) * table.unit;
    const double quarter = c0 + 0.25 * static_cast<double>(table.step);
    EXPECT_NEAR(*fw.temperature(quarter), a + 0.25 * (b - a), output_tolerance) << k;
  }
  EXPECT_FALSE(fw.temperature(static_cast<double>(table.first_code) - 0.5));
  EXPECT_FALSE(fw.temperature(static_cast<double>(table.last_code()) + 0.5));
}

TEST(FirmwareLookupTable, MoreNodesReadCloserToTheExactConversion) {
  // Linear interpolation's error is h²/8 times the curvature (textbook):
  // 8 times the nodes make it about 64 times smaller (the node spacing is
  // rounded up to whole codes, so a little less).
  auto worst = [](const char* points) {
    const Design d = design_with(ideal_converter({{"adc.bits", "12"}, {"firmware.conversion", "table"},
                                                  {"firmware.table_points", points}, {"firmware.table_unit", "0.0001"}}));
    const Chain chain(d);
    double w = 0.0;
    for (double t = -20.0; t <= 80.0; t += 0.25) w = std::max(w, std::fabs(chain.evaluate(nominal_deviations(), t).error));
    return w;
  };
  const double coarse = worst("17"), fine = worst("129");
  EXPECT_LT(fine, coarse / 50) << coarse << " K with 17 points, " << fine << " K with 129";
  EXPECT_GT(fine, coarse / 80) << coarse << " K with 17 points, " << fine << " K with 129";
}

TEST(FirmwareLookupTable, ATableSensorWhoseTableEndsAtTheRangeStillGetsALookupTable) {
  // Regression: the 5 % margin reached past the sensor table's ends, the first
  // point had no temperature and the lookup table came out empty.
  const Design d =
      design_with(ideal_converter(testing::table_sensor_0_to_50({{"adc.bits", "12"}, {"firmware.conversion", "table"}})));
  const Chain chain(d);
  EXPECT_GE(chain.firmware().table().stored.size(), 30u);
  for (double t = 5.0; t <= 45.0; t += 5.0) {
    const Evaluation e = chain.evaluate(nominal_deviations(), t);
    ASSERT_EQ(e.status, Status::ok) << t;
    EXPECT_LT(std::fabs(e.error), 0.05) << t;
  }
}

}  // namespace
}  // namespace thermargin
