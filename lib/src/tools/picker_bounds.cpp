#include "picker_bounds.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>

#include "thermargin/core/parallel.hpp"
#include "thermargin/engines/monte_carlo.hpp"

namespace thermargin::picker_detail {

// Worst case over the window, the temperatures split between threads (each
// temperature's corners are independent of the others, so the result does
// not depend on the split).
WindowBand worst_case_band(const Chain& chain, const std::vector<double>& temps, CornerMethod method, int threads) {
  const std::size_t parts = std::max<std::size_t>(1, std::min<std::size_t>(temps.size(), static_cast<std::size_t>(std::max(threads, 1))));
  std::vector<WorstCase> results(parts);
  parallel_for(parts, threads, [&](std::size_t i) {
    const std::vector<double> part(temps.begin() + static_cast<std::ptrdiff_t>(i * temps.size() / parts),
                                   temps.begin() + static_cast<std::ptrdiff_t>((i + 1) * temps.size() / parts));
    results[i] = worst_case(chain, part, {.method = method, .half_widths = false, .threads = 1});
  });
  WindowBand b;
  for (const auto& r : results)
    for (const auto& p : r.points) {
      if (p.failed_corners > 0 || !p.any_ok) {
        if (b.status == Status::ok) b.status = p.failure == Status::ok ? Status::no_solution : p.failure;
        continue;
      }
      b.max_abs = std::max({b.max_abs, std::fabs(p.low), std::fabs(p.high)});
    }
  return b;
}

// The linear band over the window and its dominant source: the largest
// summed variance over the window's points, as budget.cpp ranks them.
LinearWindow linear_window(const LinearBudget& lb) {
  LinearWindow w;
  std::map<std::string, double> variance;
  for (const auto& p : lb.points) {
    if (p.status != Status::ok) {
      if (w.band.status == Status::ok) w.band.status = p.status;
      continue;
    }
    w.band.max_abs = std::max({w.band.max_abs, std::fabs(p.low), std::fabs(p.high)});
    for (const auto& t : p.terms) variance[t.name] += t.contribution * t.contribution;
  }
  double largest = 0.0;
  for (const auto& [name, v] : variance)
    if (v > largest) {
      largest = v;
      w.dominant = name;
    }
  return w;
}

McCheck mc_window(const Chain& chain, const std::vector<double>& temps, std::uint64_t units, int threads,
                  const McProgress& progress) {
  McOptions mo;
  mo.progress = progress;
  mo.units = units;
  mo.threads = std::max(threads, 1);
  const McResult r = monte_carlo(chain, temps, mo);
  McCheck c;
  c.units = r.summary.units;
  for (const auto& p : r.points) c.readable = c.readable && p.saturated == 0 && p.failed == 0 && p.valid > 0;
  c.max_abs = r.summary.max_abs;
  c.yield = r.summary.yield;
  c.yield_low = r.summary.yield_low;
  c.yield_high = r.summary.yield_high;
  return c;
}

bool corners_directed(const Design& d) { return static_cast<int>(d.inputs.size()) > max_enumerated_inputs; }

// The corner a linear model calls extreme in `direction` (+1 up, −1 down):
// the start of the worst-case engine's directed search (a zero sensitivity
// takes +bound going up and −bound going down, as there).
Deviations directed_corner(const Design& d, const LinearPoint& lp, double direction) {
  Deviations dev{};
  for (std::size_t k = 0; k < d.inputs.size(); ++k) {
    const ToleranceInput& in = d.inputs[k];
    dev[static_cast<std::size_t>(in.source)] = ((lp.terms[k].sensitivity >= 0.0) == (direction > 0.0) ? 1.0 : -1.0) * in.bound;
  }
  return dev;
}

// What the bound adds to an unrounded |error| for the output rounding.
double bound_rounding(const Design& d) {
  return d.firmware.calibration == Calibration::two_point ? 0.0 : 0.5 * d.firmware.resolution;
}

// The unrounded error at one corner with the readings shifted by `rs`;
// none (and `failure` set) where the chain fails.
std::optional<double> corner_error(ElementMemo& memo, const Deviations& dev, const ReadingShift& rs, Status& failure) {
  const Evaluation e = memo.evaluate(dev, rs, false);
  if (e.status != Status::ok) {
    if (failure == Status::ok) failure = e.status;
    return std::nullopt;
  }
  return e.error;
}

// Every reading at one end of the reading interval.
std::optional<double> corner_error(ElementMemo& memo, const Deviations& dev, double shift, Status& failure) {
  ReadingShift rs;
  rs.at_t = rs.at_cal[0] = rs.at_cal[1] = shift;
  return corner_error(memo, dev, rs, failure);
}

// The reading shifts at which a directed design's start corner is read:
// the reading at t at either end of its interval, and each calibration
// reading independently at either end of its own, as the engine reads a
// corner (it fails the corner when any of them fails).
std::vector<ReadingShift> engine_shifts(const Design& d, const ReadingInterval& q) {
  const int cal_points = calibration_points(d.firmware.calibration);
  std::vector<ReadingShift> out;
  for (double at_t : {q.lo, q.hi})
    for (int mask = 0; mask < (1 << cal_points); ++mask) {
      ReadingShift rs;
      rs.at_t = at_t;
      for (int k = 0; k < 2; ++k) rs.at_cal[k] = (k < cal_points && (mask >> k & 1)) ? q.hi : q.lo;
      out.push_back(rs);
    }
  return out;
}

DirectedBound directed_bound(const Chain& chain, const std::vector<double>& temps, const LinearBudget& lb) {
  const Design& d = chain.design();
  const ReadingInterval q = reading_interval(d);
  const double rounding = bound_rounding(d);
  const bool directed = corners_directed(d);
  std::vector<ReadingShift> shifts;
  if (directed) shifts = engine_shifts(d, q);
  else
    for (double shift : {q.lo, q.hi}) {
      ReadingShift rs;
      rs.at_t = rs.at_cal[0] = rs.at_cal[1] = shift;
      shifts.push_back(rs);
    }
  DirectedBound b;
  b.at.assign(temps.size(), 0.0);
  for (std::size_t i = 0; i < temps.size(); ++i) {
    const LinearPoint& lp = lb.points[i];
    if (lp.status != Status::ok) continue;
    ElementMemo memo(chain, temps[i]);
    for (double direction : {-1.0, 1.0}) {
      const Deviations dev = directed_corner(d, lp, direction);
      Status failure = Status::ok;
      double highest = -inf, lowest = inf;
      for (const ReadingShift& rs : shifts) {
        const auto e = corner_error(memo, dev, rs, failure);
        if (!e) continue;
        highest = std::max(highest, *e);
        lowest = std::min(lowest, *e);
      }
      if (directed) {
        // The engine reads a corner in full or not at all.
        if (failure != Status::ok) continue;
        b.at[i] = std::max(b.at[i], direction > 0.0 ? highest + rounding : rounding - lowest);
        continue;
      }
      if (failure != Status::ok && b.status == Status::ok) b.status = failure;
      if (highest >= lowest) b.at[i] = std::max(b.at[i], std::max(std::fabs(highest), std::fabs(lowest)) + rounding);
    }
  }
  for (double v : b.at) b.value = std::max(b.value, v);
  return b;
}

}  // namespace thermargin::picker_detail
