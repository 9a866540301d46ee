// Per-unit calibration in production (docs/model.md §7).
//
// `offset`: the unit is read at t_cal against a reference thermometer whose
// own error e is within ± the calibration uncertainty; the firmware stores
// the difference and subtracts it from every later reading, so the unit's
// error at t_cal becomes e. `two-point`: the same at two temperatures,
// stored as a straight line (gain and offset) through the two pairs of
// (reading, reference); between the points the error follows the chain's
// curvature. These are the usual one- and two-point corrections of
// thermometry practice (common practice).
#pragma once

#include "thermargin/input/design.hpp"

namespace thermargin {

// What calibration measured on one unit: the unit's reported temperatures at
// the calibration points and what the reference thermometer said there.
struct CalibrationData {
  double reported[2] = {0.0, 0.0};
  double reference[2] = {0.0, 0.0};
};

inline double apply_calibration(Calibration c, const CalibrationData& k, double t) {
  switch (c) {
    case Calibration::none: return t;
    case Calibration::offset: return t - (k.reported[0] - k.reference[0]);
    case Calibration::two_point: {
      const double slope = (k.reference[1] - k.reference[0]) / (k.reported[1] - k.reported[0]);
      return k.reference[0] + (t - k.reported[0]) * slope;
    }
  }
  return t;
}

}  // namespace thermargin
