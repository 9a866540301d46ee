// Designs shared by the benchmarks.
#pragma once

#include "thermargin/input/scenario.hpp"

namespace thermargin::bench {

// The default design (9 active inputs) plus leakage, a parallel resistor's
// tolerance and an offset calibration's reference: 12 active inputs.
inline Scenario twelve_inputs_scenario() {
  Scenario s;
  const Where w{Origin::command_line, "", 0, ""};
  s.set("adc.leakage", "20n", w);
  s.set("divider.r_parallel", "100k", w);
  s.set("divider.r_parallel_tol", "1%", w);
  s.set("firmware.calibration", "offset", w);
  s.set("firmware.calibration_at", "25", w);
  return s;
}

// The default design (9 active inputs) with an absolute supply (the
// excitation's and the reference's tolerances and tempcos) and pin leakage:
// 14 active inputs, 91 pairs for the linear budget's second-order terms.
inline Scenario fourteen_inputs_scenario() {
  Scenario s;
  const Where w{Origin::command_line, "", 0, ""};
  s.set("supply.ratiometric", "false", w);
  s.set("supply.v_reference", "3.3V", w);
  s.set("supply.v_excitation_tol", "0.5%", w);
  s.set("supply.v_excitation_tempco", "50ppm", w);
  s.set("supply.v_reference_tol", "0.2%", w);
  s.set("supply.v_reference_tempco", "20ppm", w);
  s.set("adc.leakage", "20n", w);
  return s;
}

}  // namespace thermargin::bench
