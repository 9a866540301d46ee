// The kernel's block of units (docs/engines.md, "The kernel"): the run's
// constants, the units drawn once, their calibration readings and their
// errors at each temperature. The readings themselves are
// monte_carlo_reading.cpp's.
#include "monte_carlo_kernel.hpp"

#include <algorithm>
#include <cmath>
#include <iterator>
#include <limits>
#include <memory>

#include "thermargin/chain/calibration.hpp"
#include "thermargin/chain/drift.hpp"
#include "thermargin/chain/sensor.hpp"
#include "thermargin/engines/monte_carlo.hpp"

namespace thermargin {
namespace mc_detail {

namespace {

// Readings of a sum of m samples of an ADC of `span` codes.
double reading_count(double span, int m) { return static_cast<double>(m) * (span - 1.0) + 1.0; }

}  // namespace

std::vector<double> conversion_table(const Firmware& fw, int m) {
  // Chain::convert(k / m, true), from the firmware itself.
  std::vector<double> table(static_cast<std::size_t>(reading_count(fw.inputs().adc_span, m)));
  for (std::size_t k = 0; k < table.size(); ++k) {
    const auto t = fw.temperature(static_cast<double>(k) / m);
    table[k] = t ? fw.round_output(*t) : std::numeric_limits<double>::quiet_NaN();
  }
  return table;
}

RunConstants make_constants(const Chain& chain, ConversionCache* cache) {
  const Design& d = chain.design();
  RunConstants c{&chain, &d, philox_key(d.montecarlo.seed), d.adc_span(), d.adc_span() - 1.0, d.adc.averaging,
                 d.adc.noise, {}, false, false, 0.0, 0.0, 0.0, {}, calibration_points(d.firmware.calibration)};
  // The firmware's conversion of every possible reading, once a run (or
  // once for the cache's runs).
  if (reading_count(c.span, c.m) <= static_cast<double>(1u << 22)) {
    c.table_conversion = true;
    const Firmware& fw = chain.firmware();
    auto make = [&fw, m = c.m] { return conversion_table(fw, m); };
    c.conversion = cache ? cache->get({fw.inputs(), c.m}, make) : std::make_shared<const std::vector<double>>(make());
  }
  c.beta_fast = d.sensor.kind == SensorKind::beta;
  c.ln_r25 = std::log(d.sensor.r25);
  c.beta = d.sensor.beta;
  if (d.sensor.kind != SensorKind::rtd)
    if (auto l = nominal_ln_resistance(d.sensor, t0_kelvin)) c.ln_r0 = *l;
  c.rtd = d.sensor.kind == SensorKind::rtd;
  if (c.rtd && d.sensor.rtd_class) c.rtd_line = class_line(*d.sensor.rtd_class);
  if (d.sensor.kind == SensorKind::table) c.table = std::make_shared<const TablePieces>(table_pieces(*d.sensor.table));
  for (const auto& in : d.inputs)
    if (in.source != Source::board_temperature && in.source != Source::adc_precharge)
      c.active.push_back(static_cast<int>(in.source));
  // A drift is folded into its target's row (chain/drift.hpp): copy that row too.
  for (const auto& in : d.inputs)
    if (const int target = static_cast<int>(drift_target(in.source));
        drift_target(in.source) != in.source && std::find(c.active.begin(), c.active.end(), target) == c.active.end())
      c.active.push_back(target);
  c.acquisition = chain.acquisition();
  c.precharge_any = c.acquisition.on && d.adc.precharge == Precharge::any;
  return c;
}

void draw_block(const RunConstants& c, BlockUnits& b, std::uint64_t first, int count) {
  b.first = first;
  b.count = count;
  std::fill(std::begin(b.rise_guess), std::end(b.rise_guess), 0.0);
  for (auto& row : b.dev) std::fill(std::begin(row), std::end(row), 0.0);
  for (int u = 0; u < block_size; ++u) {
    const Deviations dv = draw_unit(*c.d, first + static_cast<std::uint64_t>(u));
    for (int s : c.active) b.dev[s][u] = dv[static_cast<std::size_t>(s)];
    // The sensor's drift over life shifts ln R like R25's tolerance
    // (sensor.hpp): a beta NTC takes their sum, a table or Steinhart–Hart
    // sensor each apart, as SensorUnit does.
    const double drift = b.dev[static_cast<int>(Source::sensor_drift)][u];
    b.ln_r25[u] = std::log1p(b.dev[static_cast<int>(Source::r25)][u]);
    b.ln_drift[u] = std::log1p(drift);
    b.ln_shift[u] = drift != 0.0 ? b.ln_r25[u] + b.ln_drift[u] : b.ln_r25[u];
  }
  // The same expressions read_block took at every temperature.
  const double duty_over_delta = c.d->sensor.dissipation > 0.0 ? c.d->divider.duty / c.d->sensor.dissipation : 0.0;
  const double* d_diss = b.dev[static_cast<int>(Source::dissipation)];
  const double* d_beta = b.dev[static_cast<int>(Source::beta)];
  for (int u = 0; u < block_size; ++u) {
    b.heat_gain[u] = duty_over_delta / (1.0 + d_diss[u]);
    b.beta_unit[u] = (1.0 + d_beta[u]) * c.beta;
  }
}

void calibrate_block(const RunConstants& c, BlockUnits& b) {
  std::fill(std::begin(b.cal_ok), std::end(b.cal_ok), std::uint8_t{1});
  alignas(64) double rep[block_size];
  alignas(64) std::uint8_t st[block_size];
  for (int i = 0; i < c.cal_points; ++i) {
    const double t_cal = c.d->firmware.calibration_at[static_cast<std::size_t>(i)];
    read_block(c, b, t_cal, calibration_reading(i), rep, st, true);
    const Source ref = i == 0 ? Source::calibration_1 : Source::calibration_2;
    for (int u = 0; u < block_size; ++u) {
      b.cal_reported[i][u] = rep[u];
      b.cal_reference[i][u] = t_cal + b.dev[static_cast<int>(ref)][u];
      b.cal_ok[u] &= static_cast<std::uint8_t>(st[u] == 0);
    }
  }
  if (c.cal_points == 2)
    for (int u = 0; u < block_size; ++u)
      if (b.cal_reported[0][u] == b.cal_reported[1][u]) b.cal_ok[u] = 0;
}

// Errors of the block at t; NaN where a reading has no value (status set).
void errors_block(const RunConstants& c, BlockUnits& b, double t, std::uint32_t t_index, double* err,
                  std::uint8_t* status) {
  alignas(64) double rep[block_size];
  read_block(c, b, t, t_index, rep, status);
  const Calibration cal = c.d->firmware.calibration;
  if (cal == Calibration::none) {
    // Without calibration the error is the reading's: branch-free, vectorised.
    const double nan = std::numeric_limits<double>::quiet_NaN();
    for (int u = 0; u < block_size; ++u) err[u] = status[u] == 0 ? rep[u] - t : nan;
    return;
  }
  for (int u = 0; u < block_size; ++u) {
    if (status[u] == 0 && cal != Calibration::none && !b.cal_ok[u])
      status[u] = static_cast<std::uint8_t>(Status::calibration_failed);
    if (status[u] != 0) {
      err[u] = std::numeric_limits<double>::quiet_NaN();
      continue;
    }
    double tr = rep[u];
    if (cal != Calibration::none) {
      CalibrationData k;
      for (int i = 0; i < c.cal_points; ++i) {
        k.reported[i] = b.cal_reported[i][u];
        k.reference[i] = b.cal_reference[i][u];
      }
      tr = apply_calibration(cal, k, tr);
    }
    err[u] = tr - t;
  }
}

void simulate_block_with(const RunConstants& c, const std::vector<double>& temperatures, std::uint64_t first_unit,
                         int count, std::vector<double>& errors) {
  BlockUnits b;
  draw_block(c, b, first_unit, count);
  if (c.cal_points > 0) calibrate_block(c, b);
  errors.assign(static_cast<std::size_t>(count) * temperatures.size(), 0.0);
  alignas(64) double err[block_size];
  alignas(64) std::uint8_t status[block_size];
  for (std::size_t ti = 0; ti < temperatures.size(); ++ti) {
    errors_block(c, b, temperatures[ti], static_cast<std::uint32_t>(ti), err, status);
    for (int u = 0; u < count; ++u) errors[static_cast<std::size_t>(u) + ti * static_cast<std::size_t>(count)] = err[u];
  }
}

}  // namespace mc_detail

using namespace mc_detail;

void simulate_block(const Chain& chain, const std::vector<double>& temperatures, std::uint64_t first_unit, int count,
                    std::vector<double>& errors) {
  simulate_block_with(make_constants(chain), temperatures, first_unit, count, errors);
}

struct BlockKernel::Constants {
  RunConstants c;
};

BlockKernel::BlockKernel(const Chain& chain) : constants_(std::make_unique<Constants>(Constants{make_constants(chain)})) {}
BlockKernel::~BlockKernel() = default;

void BlockKernel::simulate(const std::vector<double>& temperatures, std::uint64_t first_unit, int count,
                           std::vector<double>& errors) const {
  simulate_block_with(constants_->c, temperatures, first_unit, count, errors);
}

}  // namespace thermargin
