// The firmware's conversion from a reading to a temperature (model.md §6).
//
// The firmware knows only nominal values: ρ = c/FS (FS = 2^N or 2^N − 1, a
// convention whose mismatch with the ADC's 2^N is a real systematic error),
// scaled by V_ref,nom/V_exc,nom for an absolute reference; the divider
// inverted with the nominal fixed (and parallel) resistor; the assumed lead
// resistance removed; then a temperature from the firmware's own model:
// `exact` (the nominal curve's inverse), `beta`, `steinhart-hart` (by
// default through the nominal curve at t_min, the middle and t_max) or a
// lookup `table` of P points equally spaced in code with linear
// interpolation, stored as integers exactly as `thermargin table` emits it.
#pragma once

#include <cstdint>
#include <optional>
#include <vector>

#include "thermargin/design.hpp"

namespace thermargin {

// The lookup table the firmware ships: codes c0 + k·step, k = 0..P−1, and
// the stored temperatures as integers in units of `unit` kelvin.
struct LookupTable {
  std::int64_t first_code = 0;
  std::int64_t step = 1;
  double unit = 0.01;  // K per stored count
  std::vector<std::int64_t> stored;
  std::int64_t last_code() const { return first_code + step * static_cast<std::int64_t>(stored.size() - 1); }
  // Linear interpolation between stored points; nullopt outside the table.
  std::optional<double> temperature(double code) const;
};

class Firmware {
 public:
  explicit Firmware(const Design& d);

  // Steps 1–3: the temperature (°C) for a reading in LSB, before rounding;
  // nullopt when the conversion has no solution (a ratio outside (0, 1), a
  // negative resistance, a code outside the lookup table).
  std::optional<double> temperature(double code) const;
  // Step 4: rounding to the output resolution (identity when `exact_output`).
  double round_output(double t) const;

  double full_scale() const { return full_scale_; }
  Conversion conversion() const { return conversion_; }
  const SteinhartHart& steinhart_hart() const { return sh_; }
  const BetaCurve& beta_curve() const { return beta_; }
  const LookupTable& table() const { return table_; }

  // The exact nominal conversion at a code (the table's source of truth).
  std::optional<double> exact_temperature(double code) const;

 private:
  std::optional<double> element_resistance(double code) const;
  const Design* d_;
  Conversion conversion_;
  double full_scale_ = 0.0;
  double ratio_scale_ = 1.0;  // V_ref,nom / V_exc,nom
  BetaCurve beta_{};
  SteinhartHart sh_{};
  LookupTable table_;
};

// Builds the lookup table for a design: P points equally spaced in code over
// the codes of the nominal chain at t_min..t_max, stored in `unit` K.
LookupTable build_lookup_table(const Design& d, const Firmware& exact, int points, double unit);

}  // namespace thermargin
