#include "thermargin/worst_case.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "thermargin/linear_budget.hpp"

namespace thermargin {

ReadingInterval reading_interval(const Design& d) {
  const double noise = d.montecarlo.noise_k * d.adc.noise / std::sqrt(static_cast<double>(d.adc.averaging));
  if (d.adc.quantizer == Quantizer::floor) return {-1.0 - noise, noise};
  return {-0.5 - noise, 0.5 + noise};
}

namespace {

int calibration_points(const Design& d) {
  return d.firmware.calibration == Calibration::none ? 0 : d.firmware.calibration == Calibration::offset ? 1 : 2;
}

// The calibrations a unit at one corner can receive: every combination of
// its calibration readings at the ends of their intervals.
std::vector<std::optional<CalibrationData>> corner_calibrations(const Chain& chain, const Deviations& dev,
                                                                const ReadingInterval& q) {
  const int n = calibration_points(chain.design());
  std::vector<std::optional<CalibrationData>> out;
  if (n == 0) return out;
  for (int mask = 0; mask < (1 << n); ++mask) {
    ReadingShift s;
    for (int i = 0; i < n; ++i) s.at_cal[i] = (mask >> i & 1) ? q.hi : q.lo;
    out.push_back(chain.calibrate(dev, s, false));
  }
  return out;
}

// Folds one corner's errors at temperature t into the point.
void visit_corner(const Chain& chain, const Deviations& dev, double t, const ReadingInterval& q,
                  const std::vector<std::optional<CalibrationData>>& cals, WorstCasePoint& p) {
  const FrontEnd fe = chain.front_end(dev, t);
  auto fail = [&](Status s) {
    ++p.failed_corners;
    if (p.failure == Status::ok) p.failure = s;
  };
  if (fe.status != Status::ok) return fail(fe.status);
  const bool calibrated = chain.design().firmware.calibration != Calibration::none;
  for (double shift : {q.lo, q.hi}) {
    const Reading r = continuous_reading(fe.x_static, shift, chain.max_code());
    if (r.saturated) return fail(Status::saturated);
    const auto tr = chain.convert(r.code, false);
    if (!tr) return fail(Status::no_solution);
    if (!calibrated) {
      const double e = *tr - t;
      p.low = p.any_ok ? std::min(p.low, e) : e;
      p.high = p.any_ok ? std::max(p.high, e) : e;
      p.any_ok = true;
      continue;
    }
    for (const auto& k : cals) {
      if (!k) return fail(Status::calibration_failed);
      const double e = apply_calibration(chain.design().firmware.calibration, *k, *tr) - t;
      p.low = p.any_ok ? std::min(p.low, e) : e;
      p.high = p.any_ok ? std::max(p.high, e) : e;
      p.any_ok = true;
    }
  }
}

// Each source's own half-width at t.
std::vector<double> own_half_widths(const Chain& chain, double t, const ReadingInterval& q) {
  const Design& d = chain.design();
  std::vector<double> out;
  const double mid_shift = 0.5 * (q.lo + q.hi);
  ReadingShift centre;
  centre.at_t = centre.at_cal[0] = centre.at_cal[1] = mid_shift;
  const Deviations zero{};
  const Evaluation e0 = chain.evaluate(zero, t, centre, false);
  auto deviation = [&](const Deviations& dev, const ReadingShift& s) {
    const Evaluation e = chain.evaluate(dev, t, s, false);
    return (e.status == Status::ok && e0.status == Status::ok) ? std::fabs(e.error - e0.error) : 0.0;
  };
  for (const auto& in : d.inputs) {
    Deviations dev{};
    double w = 0.0;
    for (double sign : {-1.0, 1.0}) {
      dev[static_cast<std::size_t>(in.source)] = sign * in.bound;
      w = std::max(w, deviation(dev, centre));
    }
    out.push_back(w);
  }
  // Quantisation and noise: the reading (and calibration readings) at the
  // ends of their own parts of the interval.
  const double noise = d.montecarlo.noise_k * d.adc.noise / std::sqrt(static_cast<double>(d.adc.averaging));
  const double quant_half = 0.5;
  for (double half : {quant_half, noise}) {
    double w = 0.0;
    const int n = calibration_points(d);
    for (int mask = 0; mask < (1 << (n + 1)); ++mask) {
      ReadingShift s = centre;
      s.at_t += (mask & 1) ? half : -half;
      for (int i = 0; i < n; ++i) s.at_cal[i] += (mask >> (i + 1) & 1) ? half : -half;
      w = std::max(w, deviation(zero, s));
    }
    out.push_back(w);
  }
  out.push_back(0.5 * d.firmware.resolution);
  return out;
}

}  // namespace

WorstCase worst_case(const Chain& chain, const std::vector<double>& temperatures, CornerMethod method) {
  const Design& d = chain.design();
  WorstCase wc;
  wc.active_inputs = static_cast<int>(d.inputs.size());
  wc.directed = method == CornerMethod::directed ||
                (method == CornerMethod::automatic && wc.active_inputs > max_enumerated_inputs);
  const ReadingInterval q = reading_interval(d);
  const std::size_t nt = temperatures.size();
  wc.points.resize(nt);
  for (std::size_t i = 0; i < nt; ++i) {
    wc.points[i].t = temperatures[i];
    wc.points[i].own_half_width = own_half_widths(chain, temperatures[i], q);
  }
  const int n = wc.active_inputs;
  if (!wc.directed) {
    wc.corners = 1LL << n;
    for (long long mask = 0; mask < wc.corners; ++mask) {
      Deviations dev{};
      for (int k = 0; k < n; ++k)
        dev[static_cast<std::size_t>(d.inputs[static_cast<std::size_t>(k)].source)] =
            (mask >> k & 1) ? d.inputs[static_cast<std::size_t>(k)].bound : -d.inputs[static_cast<std::size_t>(k)].bound;
      const auto cals = corner_calibrations(chain, dev, q);
      for (std::size_t i = 0; i < nt; ++i) visit_corner(chain, dev, temperatures[i], q, cals, wc.points[i]);
    }
  } else {
    wc.corners = 2;
    const LinearBudget lb = linear_budget(chain, temperatures);
    for (std::size_t i = 0; i < nt; ++i) {
      const LinearPoint& lp = lb.points[i];
      if (lp.status != Status::ok) {
        wc.points[i].failure = lp.status;
        wc.points[i].failed_corners = 2;
        continue;
      }
      for (double direction : {-1.0, 1.0}) {
        Deviations dev{};
        for (int k = 0; k < n; ++k) {
          const auto& in = d.inputs[static_cast<std::size_t>(k)];
          const double c = lp.terms[static_cast<std::size_t>(k)].sensitivity;
          dev[static_cast<std::size_t>(in.source)] = (c * direction >= 0.0 ? 1.0 : -1.0) * in.bound;
        }
        visit_corner(chain, dev, temperatures[i], q, corner_calibrations(chain, dev, q), wc.points[i]);
      }
    }
  }
  for (auto& p : wc.points) {
    p.low -= 0.5 * d.firmware.resolution;
    p.high += 0.5 * d.firmware.resolution;
  }
  return wc;
}

}  // namespace thermargin
