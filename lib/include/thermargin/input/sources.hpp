// The toleranced inputs of the measurement chain, as the engines see them.
//
// Every quantity that varies from unit to unit (or reading to reading) is a
// named source with a nominal deviation of 0 and a ± bound; the chain reads
// a unit as one array of deviations. Engines enumerate corners, differentiate
// and sample these arrays without knowing any physics — adding an error
// source means adding it here and using its deviation in one chain step.
// Distributions of a ± bound follow docs/engines.md; the standard uncertainty
// of each follows JCGM 100:2008 §4.3.7 (rectangular a/√3) and §4.3.9
// (triangular a/√6); a normal bound is a/k with k = sigma_per_tol.
#pragma once

#include <array>
#include <string_view>
#include <vector>

#include "thermargin/core/number.hpp"

namespace thermargin {

enum class Source : int {
  r25,                  // NTC resistance at 25 °C, relative
  beta,                 // NTC beta, relative
  rtd_class,            // RTD class factor k in [−1, 1]
  dissipation,          // dissipation constant, relative
  r_fixed,              // fixed resistor, relative
  r_fixed_tempco,       // fixed resistor tempco, 1/K
  r_parallel,           // parallel resistor, relative
  v_excitation,         // absolute supply: excitation, relative
  v_excitation_tempco,  // 1/K
  v_reference,          // absolute supply: reference, relative
  v_reference_tempco,   // 1/K
  adc_offset,           // LSB
  adc_gain,             // relative
  adc_inl,              // LSB, peak of the bow
  adc_leakage,          // A, positive out of the node
  calibration_1,        // K, reference error at the first calibration point
  calibration_2,        // K, at the second
  board_temperature,    // K from the middle of the board range (per reading)
  // Over the product's life (docs/model.md "Over the product's life"): zero
  // at delivery, toleranced inputs at end of life only. Each adds to the
  // initial deviation of the same part (chain/drift.hpp).
  sensor_drift,            // relative change of the element's resistance
  r_fixed_drift,           // relative
  v_excitation_drift,      // relative (absolute supply)
  v_reference_drift,       // relative (absolute supply)
  v_reference_hysteresis,  // relative (absolute supply): thermal hysteresis of the reference
  adc_offset_drift,        // LSB
  adc_gain_drift,          // relative
  // An R-T table with limit columns: the unit's factor z in [−1, 1] between
  // the nominal curve and the limits (sensor.hpp).
  table_spread,
  r_drive,              // drive resistance, relative
  adc_precharge,        // V from V_ref/2: what another channel left on C_s (precharge = any; per reading)
  adc_offset_tempco,    // LSB/K: offset drift with the board temperature
  adc_gain_tempco,      // 1/K: gain drift with the board temperature
  count
};
inline constexpr int source_count = static_cast<int>(Source::count);

// Reading-level sources that are not unit parameters but appear in the
// linear budget and the contributor table.
enum class ReadingSource : int { quantization, noise, resolution, count };
inline constexpr int reading_source_count = static_cast<int>(ReadingSource::count);

struct SourceInfo {
  std::string_view key;    // the scenario key that sets its bound
  std::string_view name;   // short name used in tables and JSON
  std::string_view label;  // what a reviewer reads
  Quantity quantity;       // unit of the deviation
};
const SourceInfo& info(Source s);
const SourceInfo& info(ReadingSource s);

enum class Distribution { normal, uniform, triangular, gapped };
std::string_view to_string(Distribution d);

// One active toleranced input: a source with a non-zero bound.
struct ToleranceInput {
  Source source;
  double bound;  // ± a, in the source's unit
  Distribution distribution = Distribution::normal;
  double gap = 0.0;  // gapped only: |δ| < gap was sorted out, 0 ≤ gap < bound
  // The coverage factor of a normal (or gapped) bound, σ = bound/k
  // (`<key>_k`); 0: montecarlo.sigma_per_tol.
  double k = 0.0;
};

// The coverage factor a normal bound of this input stands for: its own
// `<key>_k`, else the design's sigma_per_tol.
inline double coverage_k(const ToleranceInput& in, double sigma_per_tol) { return in.k > 0.0 ? in.k : sigma_per_tol; }

// Standard uncertainty of a ± bound under its distribution.
// For gapped, the normal's second moment restricted to gap ≤ |δ| (about the
// same as the normal's for small gaps, larger as the gap grows).
double standard_uncertainty(const ToleranceInput& in, double sigma_per_tol);

using Deviations = std::array<double, source_count>;

}  // namespace thermargin
