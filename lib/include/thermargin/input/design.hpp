// A design: every setting of the measurement chain, resolved and validated.
//
// Plain structs with documented units and defaults (the defaults are the
// built-in default design, which scenarios/default.ini repeats). A Design is
// built from a scenario (scenario.hpp) and is immutable afterwards; engines
// take it by const reference. Bounds are ± half-widths; relative bounds are
// fractions (0.01 = 1 %), tempcos 1/K (25e-6 = 25 ppm/K).
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "thermargin/chain/ntc.hpp"
#include "thermargin/chain/rt_table.hpp"
#include "thermargin/chain/rtd.hpp"
#include "thermargin/input/sources.hpp"

namespace thermargin {

enum class SensorKind { beta, steinhart_hart, table, rtd };
enum class Placement { low, high };  // where the sensor branch sits: node to ground, or excitation to node
enum class Quantizer { round, floor };
enum class FullScale { pow2, pow2_minus_1 };
enum class Conversion { exact, beta, steinhart_hart, table };
enum class Calibration { none, offset, two_point };
// How many temperatures a calibration reads the unit at (and so how many
// reference readings it takes).
constexpr int calibration_points(Calibration c) { return c == Calibration::none ? 0 : c == Calibration::offset ? 1 : 2; }
enum class TableSpacing { code, temperature };  // how lookup-table points are placed
enum class BoardKind { sensor, fixed, range };

struct SensorSettings {
  SensorKind kind = SensorKind::beta;
  double r25 = 10e3;       // Ω (beta)
  double r25_tol = 0.01;   // ± relative
  double beta = 3950.0;    // K
  double beta_tol = 0.01;  // ± relative
  SteinhartHart sh{};      // 1/K (steinhart-hart)
  std::optional<RtTable> table;
  std::string table_file;
  CallendarVanDusen cvd{};  // rtd; r0 in Ω
  std::optional<RtdClass> rtd_class;  // none: an ideal RTD
  double dissipation = 1.5e-3;   // W/K; 0 switches self-heating off
  double dissipation_tol = 0.0;  // ± relative
  double lead_resistance = 0.0;  // Ω, total of both leads, in series at the sensor
  double drift = 0.0;            // ± relative change of R over life (end of life only)
  RtdConstruction rtd_construction = RtdConstruction::film;  // for the class's validity range
};

struct DividerSettings {
  Placement placement = Placement::low;
  double r_fixed = 10e3;         // Ω
  double r_fixed_tol = 0.01;     // ± relative
  double r_fixed_tempco = 100e-6;  // ± 1/K
  std::optional<double> r_parallel;  // Ω, across the sensor branch on the board
  double r_parallel_tol = 0.0;   // ± relative
  double duty = 1.0;             // fraction of time the divider is powered
  double r_fixed_drift = 0.0;    // ± relative over life (end of life only)
  double c_node = 0.0;           // F, node to ground (docs/model.md §14); 0 = none
  std::optional<double> settle_time;  // s from power-on to the first acquisition; none: always powered
};

struct SupplySettings {
  bool ratiometric = true;
  double v_excitation = 3.3;  // V
  double v_excitation_tol = 0.0, v_excitation_tempco = 0.0;
  double v_reference = 3.3;  // V (absolute only)
  double v_reference_tol = 0.0, v_reference_tempco = 0.0;
  // ± relative over life (end of life only; absolute supply).
  double v_reference_drift = 0.0, v_reference_hysteresis = 0.0, v_excitation_drift = 0.0;
  double r_drive = 0.0;      // Ω in series with the divider's top (docs/model.md §15)
  double r_drive_tol = 0.0;  // ± relative
  // The nominal ADC reference: the excitation when ratiometric.
  double v_reference_nominal() const { return ratiometric ? v_excitation : v_reference; }
};

// What the sampling capacitor holds when an acquisition starts.
enum class Precharge { same, ground, reference, voltage, any };

struct AdcSettings {
  int bits = 12;
  Quantizer quantizer = Quantizer::round;
  double offset = 2.0;       // ± LSB
  double gain_error = 0.002;  // ± relative
  double inl = 1.0;          // ± LSB, peak of the bow
  double noise = 0.5;        // LSB rms at the input
  int averaging = 1;         // samples per reading
  double leakage = 0.0;      // ± A
  double offset_drift = 0.0;  // ± LSB over life (end of life only)
  double gain_drift = 0.0;    // ± relative over life (end of life only)
  // Acquisition (docs/model.md §14): C_s charged through R_sw for t_acq once
  // every 1/sample_rate; c_sample = 0 is an ideal sampler.
  double r_switch = 1e3;      // Ω
  double c_sample = 0.0;      // F
  double t_acq = 1e-6;        // s
  double sample_rate = 10e3;  // Hz, this channel's
  Precharge precharge = Precharge::same;
  double v_precharge = 0.0;   // V, for Precharge::voltage
  bool samples_settle() const { return c_sample > 0.0; }
  double offset_tempco = 0.0;  // ± LSB/K at the board temperature
  double gain_tempco = 0.0;    // ± 1/K at the board temperature
  bool inl_bound = false;      // inl_shape = bound: ± inl at every code; false: the bow
};

struct FirmwareSettings {
  Conversion conversion = Conversion::beta;
  FullScale full_scale = FullScale::pow2;
  double r25 = 10e3, beta = 3950.0;  // for conversion = beta (default: the sensor's)
  std::optional<SteinhartHart> sh;   // for steinhart-hart; none: fitted to the nominal curve
  int table_points = 33;             // for conversion = table
  double table_unit = 0.01;          // K per stored count in the lookup table
  TableSpacing table_spacing = TableSpacing::code;  // points equally spaced in code or in temperature
  double lead_compensation = 0.0;    // Ω subtracted from the inverted branch
  double drive_compensation = 0.0;   // Ω of drive resistance the firmware assumes in the divider's top
  double resolution = 0.1;           // K; 0 = no rounding
  Calibration calibration = Calibration::none;
  std::vector<double> calibration_at;  // °C: one point (offset) or two (two-point)
  double calibration_uncertainty = 0.0;  // ± K of the reference
  // W/K of the calibration medium; nullopt: as in service (the sensor's
  // own constant with the unit's deviation).
  std::optional<double> calibration_dissipation;
};

struct BoardTemperature {
  BoardKind kind = BoardKind::range;
  double min = 10.0, max = 40.0;  // °C (fixed: min == max)
  double middle() const { return 0.5 * (min + max); }
  double half_width() const { return kind == BoardKind::range ? 0.5 * (max - min) : 0.0; }
};

struct Conditions {
  double t_min = -20.0, t_max = 80.0, t_step = 0.5;  // °C
  BoardTemperature board;
  std::vector<double> temperatures() const;  // t_min, t_min + step, ..., t_max (t_max always included)
};

struct Requirement {
  double window_min = 0.0, window_max = 60.0;  // °C
  double max_error = 1.0;                      // ± K
  double yield = 0.99;                         // required fraction of good units
  enum class Basis { worst_case, linear, monte_carlo } basis = Basis::worst_case;  // what the verdict uses
  // Which budget the verdict uses when drift is set: the one at delivery or
  // at end of life (without drift the two are the same).
  enum class At { delivery, end_of_life } at = At::end_of_life;
};

struct MonteCarloSettings {
  std::uint64_t units = 100000;  // 0 = auto (JCGM 101 §7.9 adaptive)
  std::uint64_t seed = 1;
  int threads = 0;  // 0 = all cores
  Distribution distribution = Distribution::normal;
  double sigma_per_tol = 3.0;
  double coverage = 0.9973;
  double noise_k = 3.0;  // worst case: noise enters as ± noise_k·σ/√M
  std::uint64_t max_units = 10000000;  // cap for auto
};

struct Design {
  std::string title = "Default design: 10 kOhm NTC, 12-bit ratiometric ADC";
  SensorSettings sensor;
  DividerSettings divider;
  SupplySettings supply;
  AdcSettings adc;
  FirmwareSettings firmware;
  Conditions conditions;
  Requirement requirement;
  MonteCarloSettings montecarlo;
  std::vector<ToleranceInput> inputs;  // the active toleranced inputs (bound > 0)
  // The drift inputs (bound > 0), active only in the end-of-life design
  // (life.hpp): empty when no drift is set.
  std::vector<ToleranceInput> drift_inputs;
  // Keys the scenario sets that the design's other choices make irrelevant
  // (a supply tolerance on a ratiometric supply, a parallel resistor's
  // tolerance without one): one line each with file, line and key; the
  // values are not used (`thermargin check` prints them).
  std::vector<std::string> notes;

  bool is_ntc() const { return sensor.kind != SensorKind::rtd; }
  // Full scale of the ADC in LSB: 2^bits.
  double adc_span() const { return static_cast<double>(std::uint64_t{1} << adc.bits); }
  // The threads a run asks for: `requested` when >= 0, else the scenario's
  // montecarlo.threads (the run's thread setting, every engine's); 0 means
  // every core (resolve_threads in core/parallel.hpp).
  int threads_or_scenario(int requested) const { return requested >= 0 ? requested : montecarlo.threads; }
};

// The requirement window's test, written once for every engine and tool:
// a temperature of the analysed range is in the window when it lies between
// its edges, with 1e-9 °C of slack so that a range step landing on an edge
// in floating point counts as on it.
inline bool in_requirement_window(const Requirement& q, double t) {
  constexpr double slack = 1e-9;  // °C
  return t >= q.window_min - slack && t <= q.window_max + slack;
}

// The temperatures of `range` inside the requirement window, in order.
inline std::vector<double> window_temperatures(const Requirement& q, const std::vector<double>& range) {
  std::vector<double> out;
  for (double t : range)
    if (in_requirement_window(q, t)) out.push_back(t);
  return out;
}

}  // namespace thermargin
