#include "thermargin/firmware.hpp"

#include <algorithm>
#include <cmath>

#include "thermargin/divider.hpp"
#include "thermargin/sensor.hpp"

namespace thermargin {

std::optional<double> LookupTable::temperature(double code) const {
  if (stored.size() < 2) return std::nullopt;
  const double pos = (code - static_cast<double>(first_code)) / static_cast<double>(step);
  const double last = static_cast<double>(stored.size() - 1);
  if (!(pos >= 0.0 && pos <= last)) return std::nullopt;
  std::size_t k = static_cast<std::size_t>(pos);
  if (k == stored.size() - 1) --k;
  const double f = pos - static_cast<double>(k);
  const double a = static_cast<double>(stored[k]), b = static_cast<double>(stored[k + 1]);
  return (a + f * (b - a)) * unit;
}

Firmware::Firmware(const Design& d) : d_(&d), conversion_(d.firmware.conversion) {
  const double span = d.adc_span();
  full_scale_ = d.firmware.full_scale == FullScale::pow2 ? span : span - 1.0;
  if (!d.supply.ratiometric) ratio_scale_ = d.supply.v_reference / d.supply.v_excitation;
  beta_ = BetaCurve{d.firmware.r25, d.firmware.beta};
  if (d.firmware.sh) {
    sh_ = *d.firmware.sh;
  } else {
    // Through the nominal curve at t_min, the middle and t_max (model.md §6).
    const double t[3] = {d.conditions.t_min + kelvin_offset,
                         0.5 * (d.conditions.t_min + d.conditions.t_max) + kelvin_offset,
                         d.conditions.t_max + kelvin_offset};
    double l[3];
    bool ok = true;
    for (int i = 0; i < 3; ++i) {
      const auto v = nominal_ln_resistance(d.sensor, t[i]);
      ok = ok && v.has_value();
      l[i] = v.value_or(0.0);
    }
    if (ok) sh_ = steinhart_hart_through(t, l);
  }
  if (conversion_ == Conversion::table) {
    Firmware exact = *this;
    exact.conversion_ = Conversion::exact;
    table_ = build_lookup_table(d, exact, d.firmware.table_points, d.firmware.table_unit);
  }
}

std::optional<double> Firmware::element_resistance(double code) const {
  const double ratio = code / full_scale_ * ratio_scale_;
  const auto rb = invert_divider(d_->divider.placement, d_->divider.r_fixed, ratio);
  if (!rb) return std::nullopt;
  return element_from_branch(*rb, d_->divider.r_parallel, d_->firmware.lead_compensation);
}

std::optional<double> Firmware::exact_temperature(double code) const {
  const auto r = element_resistance(code);
  if (!r) return std::nullopt;
  const auto t = nominal_temperature(d_->sensor, std::log(*r));
  if (!t) return std::nullopt;
  return *t - kelvin_offset;
}

std::optional<double> Firmware::temperature(double code) const {
  if (conversion_ == Conversion::table) return table_.temperature(code);
  if (conversion_ == Conversion::exact) return exact_temperature(code);
  const auto r = element_resistance(code);
  if (!r) return std::nullopt;
  const double l = std::log(*r);
  const double t = conversion_ == Conversion::beta ? temperature_kelvin(beta_, l) : temperature_kelvin(sh_, l);
  if (!(t > 0.0)) return std::nullopt;
  return t - kelvin_offset;
}

double Firmware::round_output(double t) const {
  const double res = d_->firmware.resolution;
  if (res <= 0.0) return t;
  return std::floor(t / res + 0.5) * res;
}

LookupTable build_lookup_table(const Design& d, const Firmware& exact, int points, double unit) {
  // The ideal codes of the nominal divider (no self-heating, no leakage) at
  // the ends of the range, widened by 5 % of that span at each end so that a
  // unit at the edge of its tolerance still reads inside the table.
  const double span_codes = d.adc_span();
  const double v_ratio = d.supply.ratiometric ? 1.0 : d.supply.v_excitation / d.supply.v_reference;
  double lo = span_codes, hi = 0.0;
  // A sensor known only by its R-T table has no curve beyond the table's ends.
  double t_lo = d.conditions.t_min, t_hi = d.conditions.t_max;
  if (d.sensor.kind == SensorKind::table) {
    t_lo = std::max(t_lo, d.sensor.table->t_min_kelvin() - kelvin_offset);
    t_hi = std::min(t_hi, d.sensor.table->t_max_kelvin() - kelvin_offset);
  }
  for (double t : {t_lo, t_hi}) {
    const auto l = nominal_ln_resistance(d.sensor, t + kelvin_offset);
    const double rb = l ? branch_resistance(std::exp(*l), d.sensor.lead_resistance, d.divider.r_parallel) : 0.0;
    const double c = l ? divider_ratio(d.divider.placement, d.divider.r_fixed, rb) * v_ratio * span_codes
                       : (t == t_lo ? 0.0 : span_codes);
    lo = std::min(lo, c);
    hi = std::max(hi, c);
  }
  const double margin = 0.05 * (hi - lo);
  LookupTable table;
  table.unit = unit;
  std::int64_t first_code = std::max<std::int64_t>(static_cast<std::int64_t>(std::floor(lo - margin)), 1);
  const std::int64_t last_wanted = std::min<std::int64_t>(static_cast<std::int64_t>(std::ceil(hi + margin)),
                                                          static_cast<std::int64_t>(span_codes) - 2);
  // The margin may reach past the codes with a solution (a table sensor's
  // ends): the table starts at the first code that has one.
  while (first_code < last_wanted && !exact.exact_temperature(static_cast<double>(first_code))) ++first_code;
  const std::int64_t span = std::max<std::int64_t>(last_wanted - first_code, 1);
  table.first_code = first_code;
  table.step = std::max<std::int64_t>((span + points - 2) / (points - 1), 1);
  for (int k = 0; k < points; ++k) {
    const auto t = exact.exact_temperature(static_cast<double>(first_code + table.step * k));
    if (!t) break;  // past the last code with a solution the table ends
    table.stored.push_back(static_cast<std::int64_t>(std::llround(*t / unit)));
  }
  return table;
}

}  // namespace thermargin
