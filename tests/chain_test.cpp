// Checks of the whole measurement chain (chain.hpp) and of the steps it
// composes: divider (Ohm's and Kirchhoff's laws), supply, ADC (docs/model.md §5),
// the unit spread through the chain, calibration, and the statuses that
// replace numbers (saturation, a sensor outside its table).
//
// The central check is the round trip: with an ideal ADC (24 bits, no
// offset, gain or INL error, continuous readings), no self-heating and the
// exact conversion, firmware(chain(T)) = T for every sensor model, both
// placements, with and without a parallel resistor, and with leads that the
// firmware compensates. Designs are built through Scenario::set and
// build_design, as from the command line, so the schema is exercised too.
#include "thermargin/chain/chain.hpp"

#include <cmath>
#include <string>
#include <utility>
#include <vector>

#include <gtest/gtest.h>

#include "engine_fixture.hpp"
#include "thermargin/chain/adc.hpp"
#include "thermargin/input/scenario.hpp"
#include "thermargin/chain/sensor.hpp"

namespace thermargin {
namespace {

using Keys = testing::Overrides;
using testing::design_with;

constexpr double chain_round_trip_tolerance = 1e-9;  // K (docs/model.md §2's solver tolerance; the chain is exact)
constexpr double voltage_tolerance = 1e-12;    // V, rounding of a few operations on volts
constexpr double code_relative_tolerance = 1e-13;
constexpr double lsb_tolerance = 1e-12;   // LSB, a few roundings of numbers near 1000
constexpr double grid_tolerance = 1e-9;   // K, distance of a rounded output from its grid

// An ideal converter and firmware (engine_fixture.hpp): what is left is the chain's algebra.
Keys chain_ideal(const Keys& extra) { return testing::ideal_converter(extra); }

std::size_t chain_at(Source s) { return static_cast<std::size_t>(s); }

const std::string table_5k = testing::data_path("chain/ntc10k_sh_5K.csv");
const std::string table_0_50 = testing::data_path("chain/ntc10k_sh_0_50.csv");

struct Model {
  const char* name;
  Keys keys;
  const char* r_parallel;
  const char* lead;  // Ω, the same compensated in firmware
};

std::vector<Model> every_chain_model() {
  return {
      {"beta", {{"sensor.model", "beta"}, {"sensor.r25", "10k"}, {"sensor.beta", "3950"}, {"divider.r_fixed", "10k"},
                {"conditions.t_min", "-40"}, {"conditions.t_max", "125"}}, "100k", "5"},
      {"steinhart-hart", {{"sensor.model", "steinhart-hart"}, {"divider.r_fixed", "10k"},
                          {"conditions.t_min", "-40"}, {"conditions.t_max", "125"}}, "100k", "5"},
      {"table", {{"sensor.model", "table"}, {"sensor.table_file", table_5k}, {"divider.r_fixed", "10k"},
                 {"conditions.t_min", "-35"}, {"conditions.t_max", "120"}}, "100k", "5"},
      {"rtd", {{"sensor.model", "rtd"}, {"sensor.r0", "1k"}, {"divider.r_fixed", "1k"},
               {"conditions.t_min", "-200"}, {"conditions.t_max", "850"}}, "220k", "0.5"},
  };
}

// Reported − true over the design's range, each through Chain::evaluate.
void expect_round_trip(const Design& d, const std::string& label) {
  const Chain chain(d);
  const double step = (d.conditions.t_max - d.conditions.t_min) / 40.0;
  for (double t = d.conditions.t_min; t <= d.conditions.t_max + 1e-9; t += step) {
    const Evaluation e = chain.evaluate(nominal_deviations(), t);
    ASSERT_EQ(e.status, Status::ok) << label << " at " << t;
    EXPECT_NEAR(e.error, 0.0, chain_round_trip_tolerance) << label << " at " << t;
    EXPECT_NEAR(e.t_reported, t, chain_round_trip_tolerance) << label << " at " << t;
  }
}

TEST(ChainRoundTrip, ExactConversionReturnsTheTrueTemperatureForEveryModelPlacementShuntAndLead) {
  for (const Model& m : every_chain_model()) {
    for (const char* placement : {"low", "high"}) {
      for (const char* r_parallel : {"none", m.r_parallel}) {
        for (const char* lead : {"0", m.lead}) {
          Keys k = chain_ideal(m.keys);
          k.insert(k.end(), {{"divider.placement", placement},
                             {"divider.r_parallel", r_parallel},
                             {"sensor.lead_resistance", lead},
                             {"firmware.lead_compensation", lead}});
          const Design d = design_with(k);
          expect_round_trip(d, std::string(m.name) + " " + placement + " r_par=" + r_parallel + " lead=" + lead);
        }
      }
    }
  }
}

TEST(ChainRoundTrip, SteinhartHartConversionOfASteinhartHartSensorIsExact) {
  // Fitted through the nominal curve (the default) and given explicitly.
  expect_round_trip(design_with(chain_ideal({{"sensor.model", "steinhart-hart"}, {"firmware.conversion", "steinhart-hart"}})),
                    "fitted");
  expect_round_trip(design_with(chain_ideal({{"sensor.model", "steinhart-hart"},
                                       {"firmware.conversion", "steinhart-hart"},
                                       {"firmware.a", "1.129148e-3"},
                                       {"firmware.b", "2.34125e-4"},
                                       {"firmware.c", "8.76741e-8"},
                                       {"divider.placement", "high"}})),
                    "explicit");
}

TEST(ChainRoundTrip, BetaConversionOfABetaSensorIsExact) {
  expect_round_trip(design_with(chain_ideal({{"sensor.beta", "3435"}, {"firmware.conversion", "beta"}})), "low");
  expect_round_trip(design_with(chain_ideal({{"sensor.r25", "47k"}, {"divider.r_fixed", "47k"}, {"firmware.conversion", "beta"},
                                       {"divider.placement", "high"}, {"divider.r_parallel", "220k"}})),
                    "high with shunt");
}

TEST(ChainRoundTrip, AbsoluteReferenceIsExactWithNominalVoltages) {
  // The firmware scales the ratio by V_ref,nom/V_exc,nom (docs/model.md §6 step 1).
  expect_round_trip(design_with(chain_ideal({{"supply.ratiometric", "false"}, {"supply.v_excitation", "2.5V"},
                                       {"supply.v_reference", "3.0V"}})),
                    "absolute");
}

TEST(ChainRoundTrip, RatiometricReadingDoesNotDependOnTheSupplyVoltage) {
  const Design a = design_with(chain_ideal({{"supply.v_excitation", "3.3V"}}));
  const Design b = design_with(chain_ideal({{"supply.v_excitation", "5V"}}));
  const Chain ca(a), cb(b);
  for (double t : {-20.0, 25.0, 80.0})
    EXPECT_NEAR(ca.front_end(nominal_deviations(), t).x_static / cb.front_end(nominal_deviations(), t).x_static, 1.0,
                code_relative_tolerance);
}

// --- the unit spread through the chain --------------------------------------

TEST(ChainStages, TheFrontEndIsItsAnalogStageThenTheAdcStageToTheBit) {
  // The worst case computes the analog stage once for all corners of the
  // ADC's gain, offset and INL: that stage must not read them, and the two
  // stages must give front_end's numbers exactly.
  const std::vector<Source> adc_sources{Source::adc_gain, Source::adc_offset, Source::adc_inl};
  unsigned state = 12345;  // a fixed sequence of corners (linear congruential)
  auto next_sign = [&] {
    state = state * 1103515245u + 12345u;
    return (state >> 16 & 1) ? 1.0 : -1.0;
  };
  int compared = 0;
  for (const auto& m : every_chain_model()) {
    Keys keys = m.keys;
    keys.insert(keys.end(), {{"divider.r_parallel", m.r_parallel}, {"adc.leakage", "10n"}, {"conditions.board", "0..50"}});
    const Design d = design_with(keys);
    const Chain chain(d);
    ASSERT_GE(d.inputs.size(), 6u) << m.name;
    const double step = (d.conditions.t_max - d.conditions.t_min) / 10.0;
    for (double t = d.conditions.t_min; t <= d.conditions.t_max + 1e-9; t += step)
      for (int corner = 0; corner < 8; ++corner) {
        Deviations dev{};
        for (const auto& in : d.inputs) dev[chain_at(in.source)] = next_sign() * in.bound;
        Deviations analog_only = dev;
        for (Source s : adc_sources) analog_only[chain_at(s)] = 0.0;
        const FrontEnd whole = chain.front_end(dev, t);
        const FrontEnd analog = chain.analog_front_end(analog_only, t);
        const FrontEnd staged = chain.adc_stage(analog, dev);
        EXPECT_EQ(staged.status, whole.status) << m.name << " at " << t;
        EXPECT_EQ(staged.t_element, whole.t_element) << m.name << " at " << t;
        EXPECT_EQ(staged.rise, whole.rise) << m.name << " at " << t;
        EXPECT_EQ(staged.v_node, whole.v_node) << m.name << " at " << t;
        EXPECT_EQ(staged.x_ideal, whole.x_ideal) << m.name << " at " << t;
        EXPECT_EQ(staged.x_static, whole.x_static) << m.name << " at " << t;
        ++compared;
      }
  }
  EXPECT_GE(compared, 300);
}

TEST(ChainSpread, RtdClassFactorMovesTheReadingByExactlyTheClassBound) {
  // docs/model.md §1: R_unit(t) = R_nom(t + k·bound(t)); the exact conversion
  // reads that unit at t + k·bound(t). IEC 60751 class B: 0.30 + 0.005|t|.
  const Design d = design_with(chain_ideal({{"sensor.model", "rtd"}, {"sensor.r0", "100"}, {"divider.r_fixed", "100"},
                                      {"sensor.rtd_class", "B"}, {"conditions.t_min", "-50"}, {"conditions.t_max", "400"}}));
  const Chain chain(d);
  for (double k : {-1.0, 1.0}) {
    Deviations dev{};
    dev[chain_at(Source::rtd_class)] = k;
    for (double t = -50.0; t <= 400.0; t += 25.0)
      EXPECT_NEAR(chain.evaluate(dev, t).error, k * (0.30 + 0.005 * std::fabs(t)), chain_round_trip_tolerance) << k << " " << t;
  }
}

TEST(ChainSpread, R25AndBetaDeviationsMoveTheReadingAsTheBetaEquationSays) {
  // Beta equation (IEC 60539-1): a unit with R25' = R25(1 + δR), B' = B(1 + δβ)
  // has resistance R at T, which the nominal curve reads at T_rep with
  // 1/T_rep = 1/T0 + (ln R/R25)/B = 1/T0 + [ln(1 + δR) + B'(1/T − 1/T0)]/B.
  const double beta = 3950.0;
  const Design d = design_with(chain_ideal({}));
  const Chain chain(d);
  for (const auto& [dr, db] : {std::pair{0.01, 0.0}, {0.0, 0.01}, {-0.02, 0.015}}) {
    Deviations dev{};
    dev[chain_at(Source::r25)] = dr;
    dev[chain_at(Source::beta)] = db;
    for (double t = -20.0; t <= 80.0; t += 5.0) {
      const double tk = t + kelvin_offset;
      const double inv = 1 / t0_kelvin + (std::log1p(dr) + beta * (1 + db) * (1 / tk - 1 / t0_kelvin)) / beta;
      EXPECT_NEAR(chain.evaluate(dev, t).t_reported, 1 / inv - kelvin_offset, chain_round_trip_tolerance) << dr << " " << db << " " << t;
    }
  }
}

// --- divider, supply, ADC ---------------------------------------------------

TEST(Divider, NodeVoltageWithLeakageMatchesNodalAnalysis) {
  // Kirchhoff's current law at the node: (V_exc − V)/R_top = V/R_bottom + I_leak.
  for (const char* placement : {"low", "high"}) {
    const Design d = design_with(chain_ideal({{"divider.placement", placement}, {"adc.leakage", "1u"}}));
    const Chain chain(d);
    for (double leak : {-1e-6, 0.0, 1e-6}) {
      Deviations dev{};
      dev[chain_at(Source::adc_leakage)] = leak;
      for (double t : {-20.0, 25.0, 80.0}) {
        const double r = std::exp(*nominal_ln_resistance(d.sensor, t + kelvin_offset));
        const bool low = std::string(placement) == "low";
        const double r_top = low ? 10e3 : r, r_bottom = low ? r : 10e3;
        const double v = (3.3 / r_top - leak) / (1 / r_top + 1 / r_bottom);
        EXPECT_NEAR(chain.front_end(dev, t).v_node, v, voltage_tolerance) << placement << " " << leak << " " << t;
      }
    }
  }
}

TEST(Divider, FixedResistorTempcoActsAtTheBoardTemperature) {
  // docs/model.md §3: R_fixed·(1 + δ)(1 + α(T_b − 25 °C)). A tempco deviation α
  // equals a tolerance deviation α·(T_b − 25).
  for (const char* board : {"40", "sensor"}) {
    const Design d = design_with(chain_ideal({{"conditions.board", board}}));
    const Chain chain(d);
    for (double t : {-20.0, 25.0, 60.0}) {
      const double t_board = std::string(board) == "sensor" ? t : 40.0;
      Deviations tempco{}, tolerance{};
      tempco[chain_at(Source::r_fixed_tempco)] = 100e-6;
      tolerance[chain_at(Source::r_fixed)] = 100e-6 * (t_board - 25.0);
      EXPECT_NEAR(chain.front_end(tempco, t).v_node, chain.front_end(tolerance, t).v_node, voltage_tolerance) << board << " " << t;
    }
  }
}

TEST(Divider, BoardRangeDeviationIsMeasuredFromItsMiddle) {
  // A board range 10..40 °C sits at 25 °C nominally; a deviation of +15 K
  // puts it at 40 °C.
  const Design range = design_with(chain_ideal({{"conditions.board", "10..40"}}));
  const Design fixed = design_with(chain_ideal({{"conditions.board", "40"}}));
  const Chain a(range), b(fixed);
  Deviations dev{};
  dev[chain_at(Source::r_fixed_tempco)] = 100e-6;
  EXPECT_NEAR(a.front_end(dev, 0.0).v_node, a.front_end(nominal_deviations(), 0.0).v_node, voltage_tolerance);
  dev[chain_at(Source::board_temperature)] = 15.0;
  Deviations dev_fixed{};
  dev_fixed[chain_at(Source::r_fixed_tempco)] = 100e-6;
  EXPECT_NEAR(a.front_end(dev, 0.0).v_node, b.front_end(dev_fixed, 0.0).v_node, voltage_tolerance);
}

TEST(Supply, AbsoluteExcitationAndReferenceScaleTheCode) {
  // x = V/V_ref·2^N (docs/model.md §5) with V ∝ V_exc: +1 % on the excitation is
  // +1 % on the code, +1 % on the reference is the code divided by 1.01.
  const Design d = design_with(chain_ideal({{"supply.ratiometric", "false"}, {"supply.v_excitation", "2.5V"},
                                      {"supply.v_reference", "3.0V"}, {"conditions.board", "45"}}));
  const Chain chain(d);
  const double nominal = chain.front_end(nominal_deviations(), 30.0).x_static;
  Deviations exc{}, ref{}, ref_tempco{};
  exc[chain_at(Source::v_excitation)] = 0.01;
  ref[chain_at(Source::v_reference)] = 0.01;
  ref_tempco[chain_at(Source::v_reference_tempco)] = 0.01 / 20.0;  // at a board 20 K above 25 °C
  EXPECT_NEAR(chain.front_end(exc, 30.0).x_static / nominal, 1.01, code_relative_tolerance);
  EXPECT_NEAR(chain.front_end(ref, 30.0).x_static * 1.01 / nominal, 1.0, code_relative_tolerance);
  EXPECT_NEAR(chain.front_end(ref_tempco, 30.0).x_static * 1.01 / nominal, 1.0, code_relative_tolerance);
}

TEST(Adc, StaticTransferHasGainOffsetAndAMidScaleBow) {
  // docs/model.md §5: x' = x(1 + g) + o + i·4u(1 − u): the bow is 0 at both ends
  // of the span and i at mid-scale.
  const double span = 4096.0;
  EXPECT_EQ(adc_static(0.0, span, 0.0, 0.0, 1.5), 0.0);
  EXPECT_EQ(adc_static(span, span, 0.0, 0.0, 1.5), span);
  EXPECT_EQ(adc_static(span / 2, span, 0.0, 0.0, 1.5), span / 2 + 1.5);
  EXPECT_NEAR(adc_static(1000.0, span, 0.002, -2.0, 0.0), 1000.0 * 1.002 - 2.0, lsb_tolerance);
}

TEST(Adc, QuantiserRoundsHalfUpOrTruncates) {
  EXPECT_EQ(quantize(2.5, Quantizer::round), 3.0);
  EXPECT_EQ(quantize(2.4999, Quantizer::round), 2.0);
  EXPECT_EQ(quantize(-0.5, Quantizer::round), 0.0);  // half up, also below zero
  EXPECT_EQ(quantize(2.999, Quantizer::floor), 2.0);
  EXPECT_EQ(quantize(-0.001, Quantizer::floor), -1.0);
}

TEST(Adc, AReadingIsTheMeanOfItsSamplesAndAnyClampedSampleSaturatesIt) {
  // docs/model.md §5: s = Q(x' + n) clamped to [0, 2^N − 1]; a reading is the mean
  // of M samples; any clamped sample saturates the reading.
  const double no_noise[4] = {0.0, 0.0, 0.0, 0.0};
  const double noise[4] = {0.2, -0.2, 0.7, -0.7};
  EXPECT_EQ(sample_reading(100.1, no_noise, 4, Quantizer::round, 4095).code, 100.0);
  // 100.3, 99.9, 100.8, 99.4 round to 100, 100, 101, 99.
  EXPECT_EQ(sample_reading(100.1, noise, 4, Quantizer::round, 4095).code, (100 + 100 + 101 + 99) / 4.0);
  // 4095.2, 4094.8, 4095.7, 4094.3 round to 4095, 4095, 4096, 4094; the
  // 4096 is clamped to 4095 and the reading saturated.
  const Reading top = sample_reading(4095.0, noise, 4, Quantizer::round, 4095);
  EXPECT_TRUE(top.saturated);
  EXPECT_EQ(top.code, (4095 + 4095 + 4095 + 4094) / 4.0);
  // −0.7 rounds to −1: clamped to 0.
  EXPECT_TRUE(sample_reading(0.0, noise, 4, Quantizer::round, 4095).saturated);
  EXPECT_FALSE(sample_reading(0.2, no_noise, 4, Quantizer::round, 4095).saturated);
}

// --- statuses ---------------------------------------------------------------

TEST(ChainStatus, ContinuousReadingSaturatesOutsideZeroToTheTopCode) {
  // The continuous rule (docs/model.md): saturated outside [0, 2^N − 1].
  EXPECT_FALSE(continuous_reading(0.0, 0.0, 4095.0).saturated);
  EXPECT_FALSE(continuous_reading(4095.0, 0.0, 4095.0).saturated);
  EXPECT_TRUE(continuous_reading(-1e-9, 0.0, 4095.0).saturated);
  EXPECT_TRUE(continuous_reading(4095.0, 1e-9, 4095.0).saturated);
}

TEST(ChainStatus, NodeAboveTheReferenceIsSaturated) {
  // 10k/10k from 3.3 V into a 1.0 V reference: 1.65 V at 25 °C is off scale,
  // 0.37 V at 80 °C is not.
  const Design d = design_with({{"supply.ratiometric", "false"}, {"supply.v_reference", "1.0V"}});
  const Chain chain(d);
  const Evaluation hot = chain.evaluate(nominal_deviations(), 80.0);
  const Evaluation warm = chain.evaluate(nominal_deviations(), 25.0);
  EXPECT_EQ(hot.status, Status::ok);
  EXPECT_EQ(warm.status, Status::saturated);
  EXPECT_GT(warm.code, chain.max_code());
}

TEST(ChainStatus, AReadingShiftedOffScaleIsSaturated) {
  const Design d = design_with({});
  const Chain chain(d);
  ReadingShift down, up;
  down.at_t = -1e6;
  up.at_t = 1e6;
  EXPECT_EQ(chain.evaluate(nominal_deviations(), 25.0, down).status, Status::saturated);
  EXPECT_EQ(chain.evaluate(nominal_deviations(), 25.0, up).status, Status::saturated);
}

TEST(ChainStatus, SensorOutsideItsTableIsOutOfTable) {
  const Design d = design_with(chain_ideal({{"sensor.model", "table"}, {"sensor.table_file", table_0_50},
                                      {"conditions.t_min", "0"}, {"conditions.t_max", "60"}}));
  const Chain chain(d);
  EXPECT_EQ(chain.evaluate(nominal_deviations(), 50.0).status, Status::ok);
  EXPECT_EQ(chain.evaluate(nominal_deviations(), 55.0).status, Status::out_of_table);
  EXPECT_EQ(chain.front_end(nominal_deviations(), 60.0).status, Status::out_of_table);
}

// --- calibration ------------------------------------------------------------

Deviations a_poor_unit() {
  Deviations dev{};
  dev[chain_at(Source::r25)] = 0.03;
  dev[chain_at(Source::beta)] = -0.01;
  dev[chain_at(Source::r_fixed)] = -0.01;
  dev[chain_at(Source::adc_gain)] = 0.002;
  dev[chain_at(Source::adc_offset)] = 1.5;
  return dev;
}

TEST(Calibration, OffsetLeavesOnlyTheReferenceErrorAtTheCalibrationPoint) {
  // calibration.hpp: the unit's error at t_cal becomes the reference's error e.
  const Design none = design_with(chain_ideal({}));
  const Design offset = design_with(chain_ideal({{"firmware.calibration", "offset"}, {"firmware.calibration_at", "25"},
                                           {"firmware.calibration_uncertainty", "0.1"}}));
  const Chain raw(none), calibrated(offset);
  Deviations dev = a_poor_unit();
  dev[chain_at(Source::calibration_1)] = 0.04;
  EXPECT_NEAR(calibrated.evaluate(dev, 25.0).error, 0.04, chain_round_trip_tolerance);
  // Elsewhere the uncalibrated error less its value at 25 °C, plus e.
  const double at_cal = raw.evaluate(dev, 25.0).error;
  EXPECT_GT(std::fabs(at_cal), 0.5);  // the unit is poor before calibration
  for (double t : {-20.0, 0.0, 60.0})
    EXPECT_NEAR(calibrated.evaluate(dev, t).error, raw.evaluate(dev, t).error - at_cal + 0.04, chain_round_trip_tolerance) << t;
}

TEST(Calibration, TwoPointLeavesOnlyTheReferenceErrorsAtBothPoints) {
  const Design d = design_with(chain_ideal({{"firmware.calibration", "two-point"}, {"firmware.calibration_at", "0,60"},
                                      {"firmware.calibration_uncertainty", "0.1"}}));
  const Chain chain(d);
  Deviations dev = a_poor_unit();
  dev[chain_at(Source::calibration_1)] = -0.05;
  dev[chain_at(Source::calibration_2)] = 0.08;
  EXPECT_NEAR(chain.evaluate(dev, 0.0).error, -0.05, chain_round_trip_tolerance);
  EXPECT_NEAR(chain.evaluate(dev, 60.0).error, 0.08, chain_round_trip_tolerance);
}

TEST(Calibration, CalibratesTheSameUnitAtTheSameBoardCorner) {
  // The calibration reading sees every deviation of the unit, the board's
  // included: the error at t_cal is the reference's whatever the board does.
  const Design d = design_with(chain_ideal({{"firmware.calibration", "offset"}, {"firmware.calibration_at", "25"},
                                      {"divider.r_fixed_tempco", "200ppm"}}));
  const Chain chain(d);
  for (double board : {-15.0, 0.0, 15.0}) {
    Deviations dev = a_poor_unit();
    dev[chain_at(Source::r_fixed_tempco)] = 200e-6;
    dev[chain_at(Source::board_temperature)] = board;
    EXPECT_NEAR(chain.evaluate(dev, 25.0).error, 0.0, chain_round_trip_tolerance) << board;
  }
}

TEST(Calibration, OutputIsRoundedBeforeTheCalibrationIsApplied) {
  // docs/model.md §6: step 4 (rounding) comes before step 5 (calibration), so a
  // reported value is a multiple of the resolution shifted by
  // (reference − rounded reading at t_cal): with a reference error of
  // 0.03 K, reported − 0.03 − 25 + round(reading at 25) is a multiple of 0.5.
  const Design d = design_with(chain_ideal({{"firmware.calibration", "offset"}, {"firmware.calibration_at", "25"},
                                      {"firmware.resolution", "0.5"}}));
  const Chain chain(d);
  Deviations dev = a_poor_unit();
  dev[chain_at(Source::calibration_1)] = 0.03;
  const auto k = chain.calibrate(dev, {}, true);
  ASSERT_TRUE(k);
  EXPECT_NEAR(std::remainder(k->reported[0], 0.5), 0.0, grid_tolerance);  // the calibration reading was rounded
  const double shift = k->reference[0] - k->reported[0];
  for (double t = -20.0; t <= 80.0; t += 3.7) {
    const double reported = chain.evaluate(dev, t, {}, true).t_reported;
    EXPECT_NEAR(std::remainder(reported - shift, 0.5), 0.0, grid_tolerance) << t;
  }
}

}  // namespace
}  // namespace thermargin
