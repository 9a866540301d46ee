// The nominal engine (docs/engines.md): every parameter nominal, the quantiser
// and the output rounding replaced by the identity, no noise, the board at
// the middle of its range. Its error is the design's systematic error —
// what remains when every part is perfect: self-heating, the firmware's
// model, its full-scale convention, leads, leakage-free divider inversion.
// Also the sensitivity view: ADC counts and millivolts per kelvin, and the
// temperature size of one LSB, by central differences of the nominal chain.
#pragma once

#include <vector>

#include "thermargin/chain/chain.hpp"

namespace thermargin {

struct NominalPoint {
  double t = 0.0;  // °C, true temperature
  Status status = Status::ok;
  double v_node = 0.0;        // V
  double code = 0.0;          // LSB (continuous)
  double sensitivity = 0.0;   // LSB/K
  double mv_per_k = 0.0;      // mV/K
  double lsb_in_k = 0.0;      // K, the temperature size of one LSB
  double self_heating = 0.0;  // K
  double error = 0.0;         // K
  double acquisition_error = 0.0;  // K, the reading's settling error (docs/model.md §14); 0 with an ideal sampler
};

NominalPoint nominal_point(const Chain& chain, double t_celsius);
std::vector<NominalPoint> nominal_sweep(const Chain& chain);

// The acquisition and settle times the nominal reading at t needs to settle
// to within ½ LSB (docs/model.md §14); zeros with an ideal sampler.
SettlingNeed settling_need_at(const Chain& chain, double t_celsius);

}  // namespace thermargin
