// The ADC (docs/model.md §5): static transfer, sampling and averaging.
//
// Ideal input x = V/V_ref·2^N LSB. Static errors per unit:
// x' = x·(1 + g) + o + i·4u(1 − u), u = x/2^N (a bow with peak i LSB at
// mid-scale and none at the ends). A sample is Q(x' + n), n ~ N(0, σ²),
// Q round (half up) or floor, clamped to [0, 2^N − 1]; a reading is the mean
// of M samples, and any clamped sample marks it saturated. Rounding's
// error is uniform on ±½ LSB with standard deviation 1/√12 LSB
// (IEEE Std 1241; signal-processing textbooks).
#pragma once

#include <cmath>

#include "thermargin/input/design.hpp"

namespace thermargin {

// The static transfer x·(1 + g) + o + i·4u(1 − u) in two parts: what the
// unit's ADC deviations give (1 + g, o, 4i) and what the input gives (u and
// 1 − u), so that a loop over many ADC units at one input, or many inputs
// through one unit, computes each part once (the worst case's enumeration);
// the five-argument adc_static below is the two composed.
struct AdcTerms {
  double one_plus_gain = 1.0, offset = 0.0, inl4 = 0.0;
};
inline AdcTerms adc_terms(double gain, double offset, double inl) { return {1.0 + gain, offset, inl * 4.0}; }
inline double adc_static(double x, double u, double one_minus_u, const AdcTerms& a) {
  return x * a.one_plus_gain + a.offset + a.inl4 * u * one_minus_u;
}
// The transfer from the ideal input x over a span of 2^N codes.
inline double adc_static(double x, double span, double gain, double offset, double inl) {
  const double u = x / span;
  return adc_static(x, u, 1.0 - u, adc_terms(gain, offset, inl));
}

inline double quantize(double v, Quantizer q) { return q == Quantizer::round ? std::floor(v + 0.5) : std::floor(v); }

struct Reading {
  double code = 0.0;  // mean of the samples, LSB
  bool saturated = false;
};

// One reading of M samples; `noise` holds the M noise values in LSB.
inline Reading sample_reading(double x_static, const double* noise, int m, Quantizer q, double max_code) {
  Reading r;
  double sum = 0.0;
  for (int k = 0; k < m; ++k) {
    double s = quantize(x_static + noise[k], q);
    if (s < 0.0) {
      s = 0.0;
      r.saturated = true;
    } else if (s > max_code) {
      s = max_code;
      r.saturated = true;
    }
    sum += s;
  }
  r.code = sum / m;
  return r;
}

// A reading with the quantiser replaced by the identity and a shift added
// (the nominal, worst-case and linear engines); saturated outside [0, max_code].
inline Reading continuous_reading(double x_static, double shift, double max_code) {
  const double c = x_static + shift;
  return {c, c < 0.0 || c > max_code};
}

}  // namespace thermargin
