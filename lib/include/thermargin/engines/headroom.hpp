// The design's headroom, as a reviewer checks it by hand (nominal parts):
// the node voltage over the range against the ADC's input range, how many
// codes each end of the range stays from a rail, and the divider's current
// and the sensor's power at the ends. Ohm's law on the divider
// (docs/model.md §3) and P = V²/R on the element (§2); the element sits at
// its self-heated temperature, as in the chain.
#pragma once

#include "thermargin/engines/budget.hpp"

namespace thermargin {

// One temperature, nominal parts.
struct HandCheck {
  double t = 0.0;              // °C
  Status status = Status::ok;  // the nominal reading's
  double v_node = 0.0;         // V
  double code = 0.0;           // LSB, continuous
  double to_bottom = 0.0;      // codes from code 0
  double to_top = 0.0;         // codes from the largest code
  double r_sensor = 0.0;       // Ω, the element at its own temperature
  double current = 0.0;        // A through the divider while powered
  double power = 0.0;          // W in the element while powered
};

struct Headroom {
  bool any = false;                     // some temperature reads
  double v_low = 0.0, v_high = 0.0;     // V, the node over the range
  double t_v_low = 0.0, t_v_high = 0.0; // °C, where
  double v_input = 0.0;                 // V, the ADC's input range is 0 .. v_input (its reference)
  double max_code = 0.0;                // the largest code
  double duty = 1.0;                    // the divider's share of time powered
  HandCheck at_min, at_max;             // at t_min and t_max of the range
};

HandCheck hand_check(const Chain& chain, double t_celsius);
Headroom headroom(const Chain& chain, const Budget& budget);

}  // namespace thermargin
