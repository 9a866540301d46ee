// The memo of element stages (element_memo.hpp) against the chain itself:
// every evaluation through the memo is Chain::evaluate's, to the bit, on
// every scenario and on designs with a calibration, a calibration medium and
// drift in every stage; units that differ only in the node's and the ADC's
// sources share one element solve.
#include "thermargin/chain/element_memo.hpp"

#include <bit>
#include <cstdint>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "engine_fixture.hpp"
#include "thermargin/input/life.hpp"

namespace thermargin {
namespace {

using testing::design_with;

std::uint64_t bits(double v) { return std::bit_cast<std::uint64_t>(v); }

// The units the engines ask for: nominal, each input at either bound and at
// a thousandth of it (the linear budget's steps), and each input together
// with the first one.
std::vector<Deviations> units_of(const Design& d) {
  std::vector<Deviations> out{Deviations{}};
  for (std::size_t k = 0; k < d.inputs.size(); ++k)
    for (double f : {1.0, -1.0, 1e-3, -1e-3}) {
      Deviations dev{};
      dev[static_cast<std::size_t>(d.inputs[k].source)] = f * d.inputs[k].bound;
      out.push_back(dev);
      if (k == 0) continue;
      dev[static_cast<std::size_t>(d.inputs[0].source)] = d.inputs[0].bound;
      out.push_back(dev);
    }
  return out;
}

TEST(ElementMemo, EveryEvaluationIsTheChainsToTheBit) {
  std::vector<Design> designs = testing::every_scenario_and(
      {{{"firmware.calibration", "offset"}, {"firmware.calibration_at", "40"}},
       {{"firmware.calibration", "two-point"}, {"firmware.calibration_at", "5,55"},
        {"firmware.calibration_uncertainty", "0.05"}, {"firmware.calibration_dissipation", "10mW/K"}}});
  designs.push_back(at_end_of_life(design_with({{"sensor.drift", "2%"}, {"supply.ratiometric", "false"},
                                                {"supply.v_reference", "3.3V"}, {"supply.v_reference_drift", "0.2%"},
                                                {"divider.r_fixed_drift", "0.1%"}, {"adc.offset_drift", "1"}})));
  ReadingShift shifted;
  shifted.at_t = 0.5;
  shifted.at_cal[0] = -0.5;
  shifted.at_cal[1] = 0.25;
  shifted.output_at_t = 0.05;
  int compared = 0;
  for (const Design& d : designs) {
    SCOPED_TRACE(d.title);
    const Chain chain(d);
    const auto all = d.conditions.temperatures();
    for (double t : {all.front(), all[all.size() / 2], all.back()}) {
      ElementMemo memo(chain, t);
      const std::vector<Deviations> units = units_of(d);
      // Twice over: the second pass reads every element stage from the memo.
      for (int pass = 0; pass < 2; ++pass)
        for (const Deviations& dev : units)
          for (const ReadingShift& shift : {ReadingShift{}, shifted}) {
            const Evaluation want = chain.evaluate(dev, t, shift, true);
            const Evaluation got = memo.evaluate(dev, shift, true);
            ASSERT_EQ(got.status, want.status);
            ASSERT_EQ(bits(got.code), bits(want.code));
            ASSERT_EQ(bits(got.t_reported), bits(want.t_reported));
            ASSERT_EQ(bits(got.error), bits(want.error));
            ASSERT_EQ(bits(got.front.rise), bits(want.front.rise));
            ++compared;
          }
    }
  }
  // Hundreds of evaluations a design (the sanitizer build visits the covering
  // subset of the scenarios, so the total follows the number of designs).
  EXPECT_GT(compared, 500 * static_cast<int>(designs.size()));
}

TEST(ElementMemo, UnitsDifferingInTheNodeAndTheAdcShareOneElementSolve) {
  // The default design with a reference and leakage (node) beside the ADC's
  // offset, gain and INL: every corner of those six inputs is one element.
  const Design d = design_with({{"supply.ratiometric", "false"}, {"supply.v_reference", "3.3V"},
                                {"supply.v_reference_tol", "0.2%"}, {"adc.leakage", "20n"}});
  const Chain chain(d);
  ElementMemo memo(chain, 40.0);
  int later_stages = 0;
  for (const auto& in : d.inputs) {
    if (stage_of(in.source) == ChainStage::element) continue;
    ++later_stages;
    for (double sign : {-1.0, 1.0}) {
      Deviations dev{};
      dev[static_cast<std::size_t>(in.source)] = sign * in.bound;
      memo.evaluate(dev);
    }
  }
  EXPECT_GE(later_stages, 5);
  EXPECT_EQ(memo.element_solves(), 1u);
  Deviations sensor{};
  sensor[static_cast<std::size_t>(Source::r25)] = 0.01;
  memo.evaluate(sensor);
  EXPECT_EQ(memo.element_solves(), 2u);
}

}  // namespace
}  // namespace thermargin
