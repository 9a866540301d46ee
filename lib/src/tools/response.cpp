#include "thermargin/tools/response.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <cstdio>
#include <limits>

namespace thermargin {
namespace {

// ln((1 − ρ^m)/(1 − ρ)) for ρ = e^l > 0, m ≥ 1: the sum 1 + ρ + … + ρ^(m−1)
// in logarithms, without cancellation when ρ is near 1 or overflow when m is large.
double log_geometric_sum(long long m, double l) {
  const double md = static_cast<double>(m);
  if (l == 0.0) return std::log(md);
  if (l > 0.0) {
    // ln(e^x − 1), x > 0: expm1 keeps the digits of a tiny x, the second form avoids overflow.
    auto log_expm1 = [](double x) { return x < 30.0 ? std::log(std::expm1(x)) : x + std::log1p(-std::exp(-x)); };
    return log_expm1(md * l) - log_expm1(l);
  }
  return std::log(-std::expm1(md * l)) - std::log(-std::expm1(l));
}

// The moving average's step error: the mean of the sensor's errors
// ΔT·q^(k−j) over the last N readings, readings before the step having the
// full error ΔT. With a = T_r/τ, q = e^−a.
double moving_average_step_error(double a, int n, double step, long long k) {
  const double nd = static_cast<double>(n);
  if (k >= n - 1) {
    // ΔT·q^(k−N+1)·(1 + q + … + q^(N−1))/N
    return step * std::exp(-a * static_cast<double>(k - n + 1) + log_geometric_sum(n, -a)) / nd;
  }
  // (N − k − 1) readings from before the step, and the k + 1 since.
  return step * ((nd - static_cast<double>(k) - 1.0) + std::exp(log_geometric_sum(k + 1, -a))) / nd;
}

// The exponential filter's step error: e_k = β·e_(k−1) + α·ΔT·q^k with
// e_(−1) = ΔT, β = 1 − α, so e_k = ΔT·[β^(k+1) + α·Σ_(i=0..k) β^(k−i)·q^i].
double exponential_step_error(double a, double alpha, double step, long long k) {
  const double beta = 1.0 - alpha;
  if (beta <= 0.0) return step * std::exp(-a * static_cast<double>(k));  // α = 1: no filter
  const double lb = std::log(beta);
  const double m = static_cast<double>(k + 1);
  // Σ β^(k−i) q^i = β^k · Σ (q/β)^i, i = 0..k.
  const double sum = std::exp(static_cast<double>(k) * lb + log_geometric_sum(k + 1, -a - lb));
  return step * (std::exp(m * lb) + alpha * sum);
}

double max_abs_static(double low, double high, double shrink) {
  return std::max(std::fabs(high - shrink), std::fabs(low + shrink));
}

}  // namespace

double filter_delay_readings(const Filter& f) {
  switch (f.kind) {
    case FilterKind::none: return 0.0;
    case FilterKind::moving_average: return 0.5 * (f.length - 1);
    case FilterKind::exponential: return (1.0 - f.alpha) / f.alpha;
  }
  return 0.0;
}

double noise_factor(const Filter& f) {
  switch (f.kind) {
    case FilterKind::none: return 1.0;
    case FilterKind::moving_average: return 1.0 / std::sqrt(static_cast<double>(f.length));
    case FilterKind::exponential: return std::sqrt(f.alpha / (2.0 - f.alpha));
  }
  return 1.0;
}

double ramp_lag(double tau, double period, const Filter& f, double rate) {
  return rate * (tau + filter_delay_readings(f) * period);
}

double step_error(double tau, double period, const Filter& f, double step, long long k) {
  assert(tau > 0.0 && period > 0.0 && k >= 0);
  const double a = period / tau;
  switch (f.kind) {
    case FilterKind::none: return step * std::exp(-a * static_cast<double>(k));
    case FilterKind::moving_average: return moving_average_step_error(a, f.length, step, k);
    case FilterKind::exponential: return exponential_step_error(a, f.alpha, step, k);
  }
  return step;
}

long long settling_readings(double tau, double period, const Filter& f, double step, double settle_to) {
  // e_k falls monotonically (every filter weight is >= 0 and the sensor's
  // reading rises monotonically), so the first k within the limit is the
  // settling reading: bracket it by doubling, then bisect over whole k.
  auto within = [&](long long k) { return step_error(tau, period, f, step, k) <= settle_to; };
  if (within(0)) return 0;
  long long lo = 0, hi = 1;  // e_lo > settle_to ≥ e_hi once bracketed
  while (!within(hi)) {
    lo = hi;
    if (hi > std::numeric_limits<long long>::max() / 4) return hi;  // beyond any reading count; cannot happen for τ, T_r > 0
    hi *= 2;
  }
  while (hi - lo > 1) {
    const long long mid = lo + (hi - lo) / 2;
    (within(mid) ? hi : lo) = mid;
  }
  return hi;
}

std::vector<double> sensor_on_ramp(double tau, double period, double rate, std::size_t count) {
  // T_s(t) = r·(t − τ·(1 − e^(−t/τ))) for T_m = r·t from a steady start.
  std::vector<double> x(count);
  for (std::size_t k = 0; k < count; ++k) {
    const double t = static_cast<double>(k) * period;
    x[k] = rate * (t + tau * std::expm1(-t / tau));
  }
  return x;
}

std::vector<double> sensor_after_step(double tau, double period, double step, std::size_t count) {
  std::vector<double> x(count);
  for (std::size_t k = 0; k < count; ++k) x[k] = -step * std::expm1(-static_cast<double>(k) * period / tau);
  return x;
}

std::vector<double> apply_filter(const Filter& f, const std::vector<double>& x) {
  std::vector<double> y(x.size());
  if (f.kind == FilterKind::moving_average) {
    // A running sum over the window; the readings before the start are 0.
    double sum = 0.0;
    const auto n = static_cast<std::size_t>(f.length);
    for (std::size_t k = 0; k < x.size(); ++k) {
      sum += x[k];
      if (k >= n) sum -= x[k - n];
      y[k] = sum / static_cast<double>(n);
    }
    return y;
  }
  if (f.kind == FilterKind::exponential) {
    double state = 0.0;
    for (std::size_t k = 0; k < x.size(); ++k) y[k] = state += f.alpha * (x[k] - state);
    return y;
  }
  return x;
}

std::string kind_word(FilterKind k) {
  switch (k) {
    case FilterKind::none: return "none";
    case FilterKind::moving_average: return "moving-average";
    case FilterKind::exponential: return "exponential";
  }
  return "none";
}

std::string describe(const Filter& f) {
  char buf[96];
  switch (f.kind) {
    case FilterKind::none: return "none";
    case FilterKind::moving_average: return "moving average N = " + std::to_string(f.length);
    case FilterKind::exponential: {
      const double inverse = 1.0 / f.alpha;
      if (std::fabs(inverse - std::round(inverse)) < 1e-9 * inverse)
        std::snprintf(buf, sizeof buf, "exponential alpha = %.6g (1/%.0f)", f.alpha, std::round(inverse));
      else
        std::snprintf(buf, sizeof buf, "exponential alpha = %.6g", f.alpha);
      return buf;
    }
  }
  return "none";
}

std::vector<Filter> filter_sweep(const Filter& own) {
  std::vector<Filter> out{Filter{}};
  for (int n = 2; n <= 256; n *= 2) out.push_back({FilterKind::moving_average, n, 1.0});
  for (int d = 2; d <= 256; d *= 2) out.push_back({FilterKind::exponential, 1, 1.0 / d});
  const bool listed = std::any_of(out.begin(), out.end(), [&](const Filter& f) {
    return filter_delay_readings(f) == filter_delay_readings(own) && f.kind == own.kind;
  });
  // N = 1 and α = 1 are no filter at all.
  const bool is_none = own.kind == FilterKind::none || (own.kind == FilterKind::moving_average && own.length == 1) ||
                       (own.kind == FilterKind::exponential && own.alpha == 1.0);
  if (!listed && !is_none) out.push_back(own);
  return out;
}

namespace {

// The window's worst case at one temperature: the band ends and the noise's
// own half-width there (the budget's reading-level source "noise").
struct WindowPoint {
  double t = 0.0;
  double low = 0.0, high = 0.0;
  double noise = 0.0;
  bool readable = true;
};

std::vector<WindowPoint> window_points(const Design& d, const Budget& b) {
  std::vector<WindowPoint> out;
  const std::size_t noise_index = d.inputs.size() + 1;  // inputs, then quantisation, noise, rounding
  for (const BudgetPoint& p : b.points) {
    if (!p.in_window) continue;
    WindowPoint w;
    w.t = p.t;
    w.readable = p.wc.any_ok && p.wc.failed_corners == 0;
    w.low = p.wc.low;
    w.high = p.wc.high;
    w.noise = noise_index < p.wc.own_half_width.size() ? p.wc.own_half_width[noise_index] : 0.0;
    out.push_back(w);
  }
  return out;
}

// The window's largest static |error| with the noise's half-width scaled by
// `factor`, and where.
struct StaticFigure {
  double max_abs = 0.0, at = 0.0, noise = 0.0;
  bool readable = true;
};

StaticFigure static_figure(const std::vector<WindowPoint>& w, double factor) {
  StaticFigure s;
  bool first = true;
  for (const WindowPoint& p : w) {
    if (!p.readable) {
      s.readable = false;
      continue;
    }
    const double v = max_abs_static(p.low, p.high, (1.0 - factor) * p.noise);
    if (first || v > s.max_abs) {
      s.max_abs = v;
      s.at = p.t;
    }
    s.noise = std::max(s.noise, factor * p.noise);
    first = false;
  }
  return s;
}

ResponseRow make_row(const Filter& f, const ResponseSettings& s, const std::vector<WindowPoint>& w, double limit) {
  ResponseRow r;
  r.filter = f;
  const double tau = s.time_constant_max();
  r.delay_s = filter_delay_readings(f) * s.reading_period;
  r.lag_s = tau + r.delay_s;
  r.ramp_error = ramp_lag(tau, s.reading_period, f, s.ramp);
  r.settling_readings = settling_readings(tau, s.reading_period, f, s.step, s.settle_to);
  r.settling_s = static_cast<double>(r.settling_readings) * s.reading_period;
  r.noise_factor = noise_factor(f);
  const StaticFigure st = static_figure(w, r.noise_factor);
  r.noise_band = st.noise;
  r.static_max_abs = st.max_abs;
  r.total_max_abs = st.max_abs + r.ramp_error;
  r.total_at = st.at;
  r.margin = limit - r.total_max_abs;
  r.readable = st.readable;
  r.meets = r.readable && r.margin >= 0.0;
  return r;
}

// More samples per reading with no filter: the smallest adc.averaging M'
// whose noise (the half-width shrinks as √(M/M')) lets the static error plus
// the sensor's own lag meet the limit.
std::optional<int> averaging_that_meets(const Design& d, const ResponseSettings& s, const std::vector<WindowPoint>& w,
                                        double limit) {
  const double lag = ramp_lag(s.time_constant_max(), s.reading_period, Filter{}, s.ramp);
  auto meets = [&](double g) {
    const StaticFigure f = static_figure(w, g);
    return f.readable && f.max_abs + lag <= limit;
  };
  if (!meets(0.0)) return std::nullopt;
  double lo = 0.0, hi = 1.0;  // meets(lo), not meets(hi)
  if (meets(hi)) return d.adc.averaging;
  for (int i = 0; i < 60; ++i) {
    const double mid = 0.5 * (lo + hi);
    (meets(mid) ? lo : hi) = mid;
  }
  if (lo <= 0.0) return std::nullopt;
  const double m = std::ceil(static_cast<double>(d.adc.averaging) / (lo * lo) - 1e-9);
  if (m > 65536.0) return std::nullopt;
  return static_cast<int>(m);
}

WhatWouldMeet what_would_meet(const Design& d, const ResponseAnalysis& a, const std::vector<WindowPoint>& w) {
  WhatWouldMeet out;
  const ResponseSettings& s = a.settings;
  out.static_alone_exceeds = true;
  out.unreadable = std::none_of(a.rows.begin(), a.rows.end(), [](const ResponseRow& r) { return r.readable; });
  if (out.unreadable) out.static_alone_exceeds = false;
  for (std::size_t i = 0; i < a.rows.size(); ++i) {
    const ResponseRow& r = a.rows[i];
    if (!r.readable) continue;
    const double room = a.limit - r.static_max_abs;  // what the ramp's lag may take
    if (room < 0.0) continue;
    out.static_alone_exceeds = false;
    const double rate = room / r.lag_s;  // K/s
    if (!out.ramp_per_minute || rate * 60.0 > *out.ramp_per_minute) {
      out.ramp_per_minute = rate * 60.0;
      out.ramp_row = i;
    }
    if (s.ramp > 0.0) {
      const double tau_max = room / s.ramp - r.delay_s;
      if (tau_max > 0.0) {
        const double tau = tau_max / (1.0 + s.time_constant_tol);
        if (!out.time_constant || tau > *out.time_constant) {
          out.time_constant = tau;
          out.time_constant_row = i;
        }
      }
    }
  }
  out.averaging = averaging_that_meets(d, s, w, a.limit);
  return out;
}

}  // namespace

ResponseAnalysis analyse_response(const Design& d, const Budget& b, const ResponseSettings& s,
                                  const ProgressCallback& progress) {
  ResponseAnalysis a;
  a.settings = s;
  a.limit = d.requirement.max_error;
  a.window_min = d.requirement.window_min;
  a.window_max = d.requirement.window_max;
  a.static_wc_max_abs = b.wc_max_abs;
  const std::vector<WindowPoint> w = window_points(d, b);
  a.noise_band_unfiltered = static_figure(w, 1.0).noise;
  const std::vector<Filter> sweep = filter_sweep(s.filter);
  for (const Filter& f : sweep) {
    a.rows.push_back(make_row(f, s, w, a.limit));
    if (progress) progress(0.5 + 0.5 * static_cast<double>(a.rows.size()) / static_cast<double>(sweep.size()), "filters");
  }
  // The scenario's own filter: the row with its delay and kind (N = 1 and α = 1 are none).
  a.chosen = 0;
  for (std::size_t i = 0; i < a.rows.size(); ++i)
    if (a.rows[i].filter.kind == s.filter.kind && filter_delay_readings(a.rows[i].filter) == filter_delay_readings(s.filter))
      a.chosen = i;
  a.rows[a.chosen].chosen = true;
  // The most margin; between equal margins the faster settling.
  for (std::size_t i = 0; i < a.rows.size(); ++i) {
    const ResponseRow& r = a.rows[i];
    if (!r.meets) continue;
    if (!a.recommended) {
      a.recommended = i;
      continue;
    }
    const ResponseRow& best = a.rows[*a.recommended];
    if (r.margin > best.margin + 1e-12 || (std::fabs(r.margin - best.margin) <= 1e-12 && r.settling_s < best.settling_s))
      a.recommended = i;
  }
  if (!a.recommended) a.what_would = what_would_meet(d, a, w);
  return a;
}

ResponseAnalysis analyse_response(const Chain& chain, const ResponseSettings& s, const ProgressCallback& progress) {
  BudgetOptions o;
  o.monte_carlo = false;
  if (progress) progress(0.0, "worst case and linear budget");
  const Budget b = run_budget(chain, o);
  return analyse_response(chain.design(), b, s, progress);
}

std::vector<std::size_t> pictured_rows(const ResponseAnalysis& a) {
  const ResponseRow& own = a.rows[a.chosen];
  std::vector<std::size_t> out;
  for (std::size_t i = 0; i < a.rows.size(); ++i) {
    const Filter& f = a.rows[i].filter;
    bool take = i == a.chosen;
    if (own.filter.kind == FilterKind::none) {
      take |= (f.kind == FilterKind::moving_average && f.length == 2) || (f.kind == FilterKind::exponential && f.alpha == 0.5);
    } else if (f.kind == own.filter.kind && i != a.chosen) {
      // The nearest lighter and heavier filter of the family.
      const double d = filter_delay_readings(f), mine = filter_delay_readings(own.filter);
      double lighter = -1.0, heavier = std::numeric_limits<double>::infinity();
      for (const ResponseRow& r : a.rows) {
        if (r.filter.kind != own.filter.kind) continue;
        const double x = filter_delay_readings(r.filter);
        if (x < mine) lighter = std::max(lighter, x);
        if (x > mine) heavier = std::min(heavier, x);
      }
      take = d == lighter || d == heavier;
    }
    if (take) out.push_back(i);
  }
  return out;
}

std::string recommendation_text(const ResponseAnalysis& a) {
  char buf[512];
  const ResponseSettings& s = a.settings;
  std::string ramp;
  std::snprintf(buf, sizeof buf, "%.4g K/min", s.ramp_per_minute());
  ramp = buf;
  if (a.recommended) {
    const ResponseRow& r = a.rows[*a.recommended];
    std::snprintf(buf, sizeof buf,
                  "%s: static worst case with its noise %.3f K plus %.3f K of lag at %s = %.3f K within +/-%.3f K "
                  "(margin %.3f K); a %.4g K step settles to %.4g K in %.4g s.",
                  describe(r.filter).c_str(), r.static_max_abs, r.ramp_error, ramp.c_str(), r.total_max_abs, a.limit,
                  r.margin, s.step, s.settle_to, r.settling_s);
    std::string text = buf;
    if (s.ramp == 0.0)
      text += " No ramp is stated (response.ramp = 0): the heaviest filter wins on noise alone; state the fastest "
              "change the product must follow.";
    return text;
  }
  std::snprintf(buf, sizeof buf, "No filter keeps the static worst case plus the lag at %s within +/-%.3f K.",
                ramp.c_str(), a.limit);
  std::string text = buf;
  const WhatWouldMeet& w = a.what_would;
  if (w.unreadable)
    return text + " Some temperature in the window cannot be read at some corner of the tolerances (saturation, "
                  "runaway, outside the table): see `thermargin budget`.";
  if (w.static_alone_exceeds)
    return text + " The static error alone exceeds the limit: no filter, sensor or slower ramp helps; see `thermargin "
                  "budget` for its contributors.";
  std::vector<std::string> ways;
  if (w.ramp_per_minute) {
    std::snprintf(buf, sizeof buf, "a ramp of at most %.3g K/min (%s)", *w.ramp_per_minute,
                  describe(a.rows[w.ramp_row].filter).c_str());
    ways.push_back(buf);
  }
  if (w.time_constant) {
    std::snprintf(buf, sizeof buf, "a faster sensor, time constant at most %.3g s, its tolerance kept (%s)",
                  *w.time_constant, describe(a.rows[w.time_constant_row].filter).c_str());
    ways.push_back(buf);
  }
  if (w.averaging) {
    std::snprintf(buf, sizeof buf, "no filter and %d samples per reading (adc.averaging)", *w.averaging);
    ways.push_back(buf);
  }
  if (ways.empty()) return text + " Nothing within reach meets it alone.";
  text += " Each alone would meet it: ";
  for (std::size_t i = 0; i < ways.size(); ++i) text += (i ? (i + 1 == ways.size() ? "; or " : "; ") : "") + ways[i];
  return text + ".";
}

double dynamic_error(const ResponseSettings& s) {
  return ramp_lag(s.time_constant_max(), s.reading_period, s.filter, s.ramp);
}

Verdict with_dynamic_error(Verdict v, const Requirement& requirement, double dynamic) {
  if (v.basis == Requirement::Basis::monte_carlo) return v;  // refused when the section is read
  v.worst_abs_error += dynamic;
  const double margin = requirement.max_error - v.worst_abs_error;
  v.pass = v.pass && margin >= 0.0;
  v.margin = margin;
  char buf[160];
  std::snprintf(buf, sizeof buf, "; with the dynamic error of %.3f K: %.3f K", dynamic, v.worst_abs_error);
  v.reason += buf;
  return v;
}

}  // namespace thermargin
