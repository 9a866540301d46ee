// The firmware's conversion from a reading to a temperature (docs/model.md §6).
//
// The firmware knows only nominal values: ρ = c/FS (FS = 2^N or 2^N − 1, a
// convention whose mismatch with the ADC's 2^N is a real systematic error),
// scaled by V_ref,nom/V_exc,nom for an absolute reference; the divider
// inverted with the nominal fixed (and parallel) resistor; the assumed lead
// resistance removed; then a temperature from the firmware's own model:
// `exact` (the nominal curve's inverse), `beta`, `steinhart-hart` (by
// default through the nominal curve at t_min, the middle and t_max) or a
// lookup `table` of P points equally spaced in code or in temperature
// (firmware.table_spacing) with linear interpolation, stored as integers
// exactly as `thermargin table` emits it.
#pragma once

#include <cstdint>
#include <optional>
#include <vector>

#include "thermargin/chain/firmware_inputs.hpp"
#include "thermargin/input/design.hpp"

namespace thermargin {

// Where the points of a lookup table sit: equally spaced in code (the
// firmware finds the interval by one division) or equally spaced in
// temperature (denser in codes where the curve is flat, found by a search).

// The lookup table the firmware ships: codes c0 + k·step, k = 0..P−1 (or
// the listed `codes` when spaced in temperature), and the stored
// temperatures (°C) as integers in units of `unit` kelvin.
struct LookupTable {
  std::int64_t first_code = 0;
  std::int64_t step = 1;
  double unit = 0.01;  // K per stored count
  std::vector<std::int64_t> stored;
  // Spaced in temperature: the code of every point, strictly increasing
  // (first_code and step then describe nothing). Empty: spaced in code.
  std::vector<std::int64_t> codes;
  TableSpacing spacing() const { return codes.empty() ? TableSpacing::code : TableSpacing::temperature; }
  std::size_t size() const { return stored.size(); }
  std::int64_t code(std::size_t k) const {
    return codes.empty() ? first_code + step * static_cast<std::int64_t>(k) : codes[k];
  }
  std::int64_t last_code() const { return code(stored.size() - 1); }
  // Linear interpolation between stored points; nullopt outside the table.
  std::optional<double> temperature(double code) const;
};

class Firmware {
 public:
  // Keeps a copy of what it reads (firmware_inputs.hpp), never the design.
  explicit Firmware(FirmwareInputs in);
  explicit Firmware(const Design& d) : Firmware(firmware_inputs(d)) {}

  // Steps 1–3: the temperature (°C) for a reading in LSB, before rounding;
  // nullopt when the conversion has no solution (a ratio outside (0, 1), a
  // negative resistance, a code outside the lookup table).
  std::optional<double> temperature(double code) const;
  // Whether temperature(code) is monotone over the codes [lo, hi] and has a
  // solution on an interval of codes: every conversion but a Steinhart–Hart
  // polynomial whose 1/T does not rise with ln R over those codes. The worst
  // case then converts only the lowest and highest of many readings
  // (docs/engines.md, Worst case).
  bool monotone_between(double lo, double hi) const;
  // Step 4: rounding to the output resolution (identity when `exact_output`).
  double round_output(double t) const;

  double full_scale() const { return full_scale_; }
  Conversion conversion() const { return conversion_; }
  const SteinhartHart& steinhart_hart() const { return sh_; }
  const BetaCurve& beta_curve() const { return beta_; }
  const LookupTable& table() const { return table_; }
  const FirmwareInputs& inputs() const { return in_; }

  // The exact nominal conversion at a code (the table's source of truth).
  std::optional<double> exact_temperature(double code) const;
  // Its inverse: the (fractional) code at which exact_temperature gives
  // t (°C); nullopt where the nominal curve has no value.
  std::optional<double> exact_code(double t_celsius) const;

 private:
  std::optional<double> element_resistance(double code) const;
  FirmwareInputs in_;
  Conversion conversion_;
  double full_scale_ = 0.0;
  double ratio_scale_ = 1.0;  // V_ref,nom / V_exc,nom
  BetaCurve beta_{};
  BetaLn beta_ln_;  // beta_ with ln R25 taken once (the conversion's)
  SteinhartHart sh_{};
  bool table_monotone_ = true;  // the lookup table's stored points in one direction
  LookupTable table_;
};

// The codes the nominal chain reads at the ends of the range (t_min, t_max;
// a table sensor's range clipped to its table): the ideal divider, without
// self-heating or leakage, in ascending order and not rounded.
struct CodeSpan {
  double low = 0.0, high = 0.0;
};
CodeSpan range_codes(const FirmwareInputs& in);

// Builds the lookup table for a design: P points over the codes of the range
// widened by 5 % of their span at each end, stored in `unit` K. Spaced in
// code, the step is the smallest that reaches the widened range's last code;
// a table that would overshoot the last code with a solution is moved down.
// Spaced in temperature, the points are the codes nearest to P equally
// spaced temperatures between those at the widened range's ends (always
// distinct codes). Fewer than P points come back only when the codes with a
// solution cannot hold P of them.
// The beta curve a firmware assumes for a sensor without one of its own
// (firmware.r25 and firmware.beta = sensor on a Steinhart-Hart, table or
// RTD sensor): B through the nominal curve at t_min and t_max (°C), R25
// then from t_min along that B. nullopt where the curve has no value at an
// end. beta_curve_r25 is R25 for a given B through the curve at t_min.
std::optional<BetaCurve> beta_through_curve(const SensorSettings& s, double t_min, double t_max);
double beta_curve_r25(const SensorSettings& s, double t_min, double beta);

// `exact` is the firmware with the exact conversion, whose inputs it reads.
LookupTable build_lookup_table(const Firmware& exact, int points, double unit,
                               TableSpacing spacing = TableSpacing::code);

}  // namespace thermargin
