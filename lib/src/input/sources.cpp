#include "thermargin/input/sources.hpp"

#include <cmath>

#include <boost/math/distributions/normal.hpp>

namespace thermargin {

const SourceInfo& info(Source s) {
  static const std::array<SourceInfo, source_count> table{{
      {"sensor.r25_tol", "r25", "sensor R25 tolerance", Quantity::ratio},
      {"sensor.beta_tol", "beta", "sensor beta tolerance", Quantity::ratio},
      {"sensor.rtd_class", "rtd_class", "RTD tolerance class", Quantity::plain},
      {"sensor.dissipation_tol", "dissipation", "dissipation constant", Quantity::ratio},
      {"divider.r_fixed_tol", "r_fixed", "fixed resistor tolerance", Quantity::ratio},
      {"divider.r_fixed_tempco", "r_fixed_tempco", "fixed resistor tempco", Quantity::tempco},
      {"divider.r_parallel_tol", "r_parallel", "parallel resistor tolerance", Quantity::ratio},
      {"supply.v_excitation_tol", "v_excitation", "excitation voltage", Quantity::ratio},
      {"supply.v_excitation_tempco", "v_excitation_tempco", "excitation tempco", Quantity::tempco},
      {"supply.v_reference_tol", "v_reference", "reference voltage", Quantity::ratio},
      {"supply.v_reference_tempco", "v_reference_tempco", "reference tempco", Quantity::tempco},
      {"adc.offset", "adc_offset", "ADC offset", Quantity::lsb},
      {"adc.gain_error", "adc_gain", "ADC gain error", Quantity::ratio},
      {"adc.inl", "adc_inl", "ADC non-linearity (INL)", Quantity::lsb},
      {"adc.leakage", "adc_leakage", "ADC pin leakage", Quantity::current},
      {"firmware.calibration_uncertainty", "calibration_1", "calibration reference (point 1)",
       Quantity::temperature_difference},
      {"firmware.calibration_uncertainty", "calibration_2", "calibration reference (point 2)",
       Quantity::temperature_difference},
      {"conditions.board", "board_temperature", "board temperature range", Quantity::temperature_difference},
      {"sensor.drift", "sensor_drift", "sensor drift over life", Quantity::ratio},
      {"divider.r_fixed_drift", "r_fixed_drift", "fixed resistor drift over life", Quantity::ratio},
      {"supply.v_excitation_drift", "v_excitation_drift", "excitation drift over life", Quantity::ratio},
      {"supply.v_reference_drift", "v_reference_drift", "reference drift over life", Quantity::ratio},
      {"supply.v_reference_hysteresis", "v_reference_hysteresis", "reference thermal hysteresis", Quantity::ratio},
      {"adc.offset_drift", "adc_offset_drift", "ADC offset drift over life", Quantity::lsb},
      {"adc.gain_drift", "adc_gain_drift", "ADC gain drift over life", Quantity::ratio},
      {"sensor.table_file", "table_spread", "sensor spread (R-T table limits)", Quantity::plain},
      {"supply.r_drive_tol", "r_drive", "divider drive resistance", Quantity::ratio},
      {"adc.precharge", "adc_precharge", "sampling capacitor's start (precharge = any)", Quantity::voltage},
      {"adc.offset_tempco", "adc_offset_tempco", "ADC offset drift", Quantity::lsb_per_kelvin},
      {"adc.gain_tempco", "adc_gain_tempco", "ADC gain drift", Quantity::tempco},
  }};
  return table[static_cast<std::size_t>(s)];
}

const SourceInfo& info(ReadingSource s) {
  static const std::array<SourceInfo, reading_source_count> table{{
      {"adc.bits", "quantization", "ADC quantisation", Quantity::lsb},
      {"adc.noise", "noise", "ADC noise", Quantity::lsb},
      {"firmware.resolution", "resolution", "output rounding", Quantity::temperature_difference},
  }};
  return table[static_cast<std::size_t>(s)];
}

std::string_view to_string(Distribution d) {
  switch (d) {
    case Distribution::normal: return "normal";
    case Distribution::uniform: return "uniform";
    case Distribution::triangular: return "triangular";
    case Distribution::gapped: return "gapped";
  }
  return "normal";
}

double standard_uncertainty(const ToleranceInput& in, double sigma_per_tol) {
  sigma_per_tol = coverage_k(in, sigma_per_tol);  // the input's own <key>_k where set
  const double a = in.bound;
  switch (in.distribution) {
    case Distribution::normal: return a / sigma_per_tol;
    case Distribution::uniform: return a / std::sqrt(3.0);     // GUM §4.3.7
    case Distribution::triangular: return a / std::sqrt(6.0);  // GUM §4.3.9
    case Distribution::gapped: {
      // Normal N(0, s²) truncated to |x| ≥ g and |x| ≤ a (the grade's bound):
      // E[x²] over that set, s = a / sigma_per_tol.
      const double s = a / sigma_per_tol;
      const boost::math::normal_distribution<> n(0.0, s);
      auto partial = [&](double x) {  // ∫_0^x t² φ(t) dt = s²(Φ(x) − ½) − s² x φ(x)
        return s * s * (boost::math::cdf(n, x) - 0.5) - s * s * x * boost::math::pdf(n, x);
      };
      const double mass = boost::math::cdf(n, a) - boost::math::cdf(n, in.gap);
      if (mass <= 0.0) return a;
      return std::sqrt((partial(a) - partial(in.gap)) / mass);
    }
  }
  return a;
}

}  // namespace thermargin
