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

}  // namespace thermargin::bench
