// The sensing element of one unit: its nominal curve and its unit spread.
//
// NTC spread (docs/model.md §1): ln R_unit(T) = ln R_nom(T0) + ln(1 + δR)
// + (1 + δβ)·(ln R_nom(T) − ln R_nom(T0)); exact for the beta model,
// the same stretch for Steinhart–Hart and tables. RTD spread: the class
// bound of IEC 60751 times a per-unit factor k ∈ [−1, 1],
// R_unit(t) = R_nom(t + k·bound(t)).
#pragma once

#include <optional>

#include "thermargin/input/design.hpp"

namespace thermargin {

// The sensor's nominal curve alone: the fields of SensorSettings that
// nominal_ln_resistance and nominal_temperature read, and nothing else (the
// same functions are one template over both types, so reading another field
// does not compile for this one). The firmware's inputs hold it
// (firmware_inputs.hpp).
struct NominalCurve {
  SensorKind kind = SensorKind::beta;
  double r25 = 0.0, beta = 0.0;
  SteinhartHart sh{};
  std::optional<RtTable> table;
  CallendarVanDusen cvd{};
  bool operator==(const NominalCurve&) const = default;
};
NominalCurve nominal_curve(const SensorSettings& s);

// ln R (Ω) of the nominal curve at t_kelvin; nullopt outside a table.
std::optional<double> nominal_ln_resistance(const SensorSettings& s, double t_kelvin);
std::optional<double> nominal_ln_resistance(const NominalCurve& s, double t_kelvin);

// The nominal curve's temperature (K) at resistance exp(ln_r); nullopt when
// there is none (outside a table, a non-physical resistance).
std::optional<double> nominal_temperature(const SensorSettings& s, double ln_r);
std::optional<double> nominal_temperature(const NominalCurve& s, double ln_r);

// d ln R / dT of the nominal curve (1/K).
std::optional<double> nominal_ln_resistance_slope(const SensorSettings& s, double t_kelvin);

// What every unit's element of one design shares: the nominal curve's
// constants that SensorUnit takes (a beta curve with ln R25 taken, ln
// R_nom(T0) of an NTC, an RTD's class line). A chain keeps one, so that a
// unit is made without taking them again; the values are those
// SensorUnit(s, ...) takes itself, to the bit.
struct SensorCurve {
  BetaLn beta;
  ClassLine rtd_line;
  double ln_r0 = 0.0;
  SensorCurve() = default;
  explicit SensorCurve(const SensorSettings& s);
};

// A unit's element: the nominal curve with the unit's deviations applied.
class SensorUnit {
 public:
  // table_z: the unit's factor between the nominal curve and the limits of a
  // table that carries them (docs/model.md §12): ln R_unit = ln R_nom + z·h(T).
  // drift: the element's change of resistance over life, any model
  // (docs/model.md §11): ln R_unit + ln(1 + drift).
  SensorUnit(const SensorSettings& s, double delta_r25, double delta_beta, double rtd_k, double table_z = 0.0,
             double drift = 0.0);
  // The same with the curve's constants given (`curve` is SensorCurve(s)).
  SensorUnit(const SensorSettings& s, const SensorCurve& curve, double delta_r25, double delta_beta, double rtd_k,
             double table_z = 0.0, double drift = 0.0);
  // A beta curve's unit inline (the self-heating solve's step), the other
  // models in sensor.cpp; the same arithmetic either way.
  std::optional<double> ln_resistance(double t_kelvin) const {
    if (!beta_unit_) return curve_ln_resistance(t_kelvin);
    const double l = thermargin::ln_resistance(beta_, t_kelvin);
    if (shift_ == 0.0 && stretch_ == 1.0) return drift_shift_ == 0.0 ? l : l + drift_shift_;
    const double unit = ln_r0_ + shift_ + stretch_ * (l - ln_r0_);
    return drift_shift_ == 0.0 ? unit : unit + drift_shift_;
  }

 private:
  std::optional<double> curve_ln_resistance(double t_kelvin) const;
  // nominal_ln_resistance(*s_, t), a beta curve's ln R25 taken once.
  std::optional<double> nominal(double t_kelvin) const;
  const SensorSettings* s_;
  BetaLn beta_;          // the beta model's curve
  ClassLine rtd_line_;   // the RTD's class bound (rtd_class set)
  double ln_r0_ = 0.0;   // ln R_nom(T0) (NTC)
  double shift_ = 0.0;   // ln(1 + δR)
  double stretch_ = 1.0; // 1 + δβ
  double rtd_k_ = 0.0;
  double table_z_ = 0.0;
  double drift_shift_ = 0.0;  // ln(1 + drift)
  bool beta_unit_ = false;    // the beta model, no table spread: ln_resistance inline
};

}  // namespace thermargin
