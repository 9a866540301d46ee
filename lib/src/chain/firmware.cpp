#include "thermargin/chain/firmware.hpp"

#include <algorithm>
#include <cmath>
#include <utility>

#include "thermargin/chain/divider.hpp"
#include "thermargin/chain/sensor.hpp"

namespace thermargin {

std::optional<double> LookupTable::temperature(double code) const {
  if (stored.size() < 2) return std::nullopt;
  if (!codes.empty()) {
    // Spaced in temperature: the interval is found by a binary search.
    if (!(code >= static_cast<double>(codes.front()) && code <= static_cast<double>(codes.back()))) return std::nullopt;
    auto it = std::upper_bound(codes.begin(), codes.end(), code,
                               [](double c, std::int64_t node) { return c < static_cast<double>(node); });
    std::size_t k = static_cast<std::size_t>(it - codes.begin()) - 1;
    if (k == codes.size() - 1) --k;
    const double c0 = static_cast<double>(codes[k]), c1 = static_cast<double>(codes[k + 1]);
    const double f = (code - c0) / (c1 - c0);
    const double a = static_cast<double>(stored[k]), b = static_cast<double>(stored[k + 1]);
    return (a + f * (b - a)) * unit;
  }
  const double pos = (code - static_cast<double>(first_code)) / static_cast<double>(step);
  const double last = static_cast<double>(stored.size() - 1);
  if (!(pos >= 0.0 && pos <= last)) return std::nullopt;
  std::size_t k = static_cast<std::size_t>(pos);
  if (k == stored.size() - 1) --k;
  const double f = pos - static_cast<double>(k);
  const double a = static_cast<double>(stored[k]), b = static_cast<double>(stored[k + 1]);
  return (a + f * (b - a)) * unit;
}

Firmware::Firmware(FirmwareInputs in) : in_(std::move(in)), conversion_(in_.conversion) {
  full_scale_ = in_.full_scale == FullScale::pow2 ? in_.adc_span : in_.adc_span - 1.0;
  if (!in_.ratiometric) ratio_scale_ = in_.v_reference / in_.v_excitation;
  beta_ = BetaCurve{in_.fw_r25, in_.fw_beta};
  beta_ln_ = BetaLn(beta_);
  if (in_.fw_sh) {
    sh_ = *in_.fw_sh;
  } else {
    // Through the nominal curve at t_min, the middle and t_max (docs/model.md §6).
    const double t[3] = {in_.t_min + kelvin_offset, 0.5 * (in_.t_min + in_.t_max) + kelvin_offset,
                         in_.t_max + kelvin_offset};
    double l[3];
    bool ok = true;
    for (int i = 0; i < 3; ++i) {
      const auto v = nominal_ln_resistance(in_.sensor, t[i]);
      ok = ok && v.has_value();
      l[i] = v.value_or(0.0);
    }
    if (ok) sh_ = steinhart_hart_through(t, l);
  }
  if (conversion_ == Conversion::table) {
    Firmware exact = *this;
    exact.conversion_ = Conversion::exact;
    table_ = build_lookup_table(exact, in_.table_points, in_.table_unit, in_.table_spacing);
    table_monotone_ = std::is_sorted(table_.stored.begin(), table_.stored.end()) ||
                      std::is_sorted(table_.stored.rbegin(), table_.stored.rend());
  }
}

std::optional<double> Firmware::element_resistance(double code) const {
  const double ratio = code / full_scale_ * ratio_scale_;
  const auto rb = invert_driven_divider(in_.placement, in_.r_fixed, in_.drive_compensation, ratio);
  if (!rb) return std::nullopt;
  return element_from_branch(*rb, in_.r_parallel, in_.lead_compensation);
}

std::optional<double> Firmware::exact_temperature(double code) const {
  const auto r = element_resistance(code);
  if (!r) return std::nullopt;
  const auto t = nominal_temperature(in_.sensor, std::log(*r));
  if (!t) return std::nullopt;
  return *t - kelvin_offset;
}

std::optional<double> Firmware::exact_code(double t_celsius) const {
  const auto l = nominal_ln_resistance(in_.sensor, t_celsius + kelvin_offset);
  if (!l) return std::nullopt;
  // The firmware's own model forward: the lead resistance it assumes and its
  // nominal parts, so that exact_temperature(exact_code(t)) == t.
  const double rb = branch_resistance(std::exp(*l), in_.lead_compensation, in_.r_parallel);
  const double ratio = divider_arms(in_.placement, in_.r_fixed, rb, in_.drive_compensation).ratio();
  return ratio / ratio_scale_ * full_scale_;
}

std::optional<double> Firmware::temperature(double code) const {
  if (conversion_ == Conversion::table) return table_.temperature(code);
  if (conversion_ == Conversion::exact) return exact_temperature(code);
  const auto r = element_resistance(code);
  if (!r) return std::nullopt;
  const double l = std::log(*r);
  const double t = conversion_ == Conversion::beta ? temperature_kelvin(beta_ln_, l) : temperature_kelvin(sh_, l);
  if (!(t > 0.0)) return std::nullopt;
  return t - kelvin_offset;
}

bool Firmware::monotone_between(double lo, double hi) const {
  // 1/T = a + b·L + c·L³ (L = ln R) has the slope b + 3c·L²: positive
  // everywhere when b > 0 and c ≥ 0, else for |L| < √(b/(−3c)) when b > 0.
  // L is monotone in the code, so its ends bound it between. Where 1/T
  // rises, its solutions (1/T > 0) are an interval. The beta form, the
  // Callendar–Van Dusen inverse and an R–T table are monotone; a lookup
  // table is linear between its stored points, so monotone when they are;
  // each step before them (the ratio, the divider and the leads inverted)
  // is monotone with an interval of solutions.
  auto rising = [&](const SteinhartHart& sh) {
    if (!(sh.b > 0.0)) return false;
    if (sh.c >= 0.0) return true;
    const double limit = std::sqrt(sh.b / (-3.0 * sh.c));
    for (double code : {lo, hi}) {
      const auto r = element_resistance(code);
      if (!r || !(std::fabs(std::log(*r)) < limit)) return false;
    }
    return true;
  };
  switch (conversion_) {
    case Conversion::steinhart_hart: return rising(sh_);
    case Conversion::exact: return in_.sensor.kind != SensorKind::steinhart_hart || rising(in_.sensor.sh);
    case Conversion::table: return table_monotone_;
    case Conversion::beta: return true;
  }
  return false;
}

double Firmware::round_output(double t) const {
  const double res = in_.resolution;
  if (res <= 0.0) return t;
  return std::floor(t / res + 0.5) * res;
}

CodeSpan range_codes(const FirmwareInputs& in) {
  const double span_codes = in.adc_span;
  const double v_ratio = in.ratiometric ? 1.0 : in.v_excitation / in.v_reference;
  double lo = span_codes, hi = 0.0;
  // A sensor known only by its R-T table has no curve beyond the table's ends.
  double t_lo = in.t_min, t_hi = in.t_max;
  if (in.sensor.kind == SensorKind::table) {
    t_lo = std::max(t_lo, in.sensor.table->t_min_kelvin() - kelvin_offset);
    t_hi = std::min(t_hi, in.sensor.table->t_max_kelvin() - kelvin_offset);
  }
  for (double t : {t_lo, t_hi}) {
    const auto l = nominal_ln_resistance(in.sensor, t + kelvin_offset);
    const double rb = l ? branch_resistance(std::exp(*l), in.lead_resistance, in.r_parallel) : 0.0;
    const double ratio = divider_arms(in.placement, in.r_fixed, rb, in.r_drive).ratio();
    const double c = l ? ratio * v_ratio * span_codes
                       : (t == t_lo ? 0.0 : span_codes);
    lo = std::min(lo, c);
    hi = std::max(hi, c);
  }
  return {lo, hi};
}

LookupTable build_lookup_table(const Firmware& exact, int points, double unit, TableSpacing spacing) {
  // The ideal codes of the nominal divider (no self-heating, no leakage) at
  // the ends of the range, widened by 5 % of that span at each end so that a
  // unit at the edge of its tolerance still reads inside the table.
  const CodeSpan range = range_codes(exact.inputs());
  const double span_codes = exact.inputs().adc_span;
  const double margin = 0.05 * (range.high - range.low);
  auto solves = [&](std::int64_t c) { return exact.exact_temperature(static_cast<double>(c)).has_value(); };
  LookupTable table;
  table.unit = unit;
  std::int64_t first_code = std::max<std::int64_t>(static_cast<std::int64_t>(std::floor(range.low - margin)), 1);
  std::int64_t last_wanted = std::min<std::int64_t>(static_cast<std::int64_t>(std::ceil(range.high + margin)),
                                                    static_cast<std::int64_t>(span_codes) - 2);
  // The margin may reach past the codes with a solution (a table sensor's
  // ends): the table starts at the first code that has one and ends at the last.
  while (first_code < last_wanted && !solves(first_code)) ++first_code;
  while (last_wanted > first_code && !solves(last_wanted)) --last_wanted;
  auto store = [&](double t) { return static_cast<std::int64_t>(std::llround(t / unit)); };

  if (spacing == TableSpacing::temperature) {
    // Codes nearest to equally spaced temperatures, kept strictly increasing
    // (where the curve is steep, neighbouring temperatures may round to one code).
    const std::int64_t available = last_wanted - first_code + 1;
    const std::int64_t n = std::min<std::int64_t>(points, available);
    if (n < 2) return table;
    const double t_a = *exact.exact_temperature(static_cast<double>(first_code));
    const double t_b = *exact.exact_temperature(static_cast<double>(last_wanted));
    table.first_code = first_code;
    table.step = 0;
    for (std::int64_t k = 0; k < n; ++k) {
      std::int64_t c = first_code;
      if (k == n - 1) {
        c = last_wanted;
      } else if (k > 0) {
        const auto x = exact.exact_code(t_a + (t_b - t_a) * static_cast<double>(k) / static_cast<double>(n - 1));
        c = x ? static_cast<std::int64_t>(std::llround(*x)) : first_code;
        c = std::max(c, table.codes.back() + 1);
        c = std::min(c, last_wanted - (n - 1 - k));  // room for the points still to come
      }
      table.codes.push_back(c);
      table.stored.push_back(store(*exact.exact_temperature(static_cast<double>(c))));
    }
    return table;
  }

  const std::int64_t span = std::max<std::int64_t>(last_wanted - first_code, 1);
  table.step = std::max<std::int64_t>((span + points - 2) / (points - 1), 1);
  // The smallest step that reaches the last code usually overshoots it by up
  // to P − 2 codes; where no solution exists there, the table moves down
  // (as far as the codes below have one) so that every point converts.
  const std::int64_t end = first_code + table.step * (points - 1);
  if (!solves(end)) {
    std::int64_t top = end;
    while (top > last_wanted && !solves(top)) --top;
    std::int64_t moved = first_code - (end - top);
    while (moved < first_code && (moved < 1 || !solves(moved))) ++moved;
    first_code = moved;
  }
  table.first_code = first_code;
  for (int k = 0; k < points; ++k) {
    const auto t = exact.exact_temperature(static_cast<double>(first_code + table.step * k));
    if (!t) break;  // past the last code with a solution the table ends
    table.stored.push_back(store(*t));
  }
  return table;
}

std::optional<BetaCurve> beta_through_curve(const SensorSettings& s, double t_min, double t_max) {
  const double t1 = t_min + kelvin_offset, t2 = t_max + kelvin_offset;
  const auto l1 = nominal_ln_resistance(s, t1), l2 = nominal_ln_resistance(s, t2);
  if (!l1 || !l2) return std::nullopt;
  const double b = (*l1 - *l2) / (1.0 / t1 - 1.0 / t2);
  return BetaCurve{beta_curve_r25(s, t_min, b), b};
}

double beta_curve_r25(const SensorSettings& s, double t_min, double beta) {
  const double t1 = t_min + kelvin_offset;
  return std::exp(*nominal_ln_resistance(s, t1) + beta * (1.0 / t0_kelvin - 1.0 / t1));
}

}  // namespace thermargin
