// The Monte Carlo engine's statistics (monte_carlo_statistics.hpp), the
// same code applied to a model given as a function (JCGM 101 §9), and the
// JCGM 101 tolerance and validation rules.
#include "monte_carlo_statistics.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include <boost/math/distributions/binomial.hpp>

#include "monte_carlo_streams.hpp"

namespace thermargin {
namespace mc_detail {

Range pilot_range(double lo, double hi) {
  if (!(lo <= hi)) return {};
  const double span = hi - lo;
  const double pad = std::max(0.5 * span, 1e-6);
  return {lo - pad, span + 2 * pad};
}

// Quantile of rank q in [0, n) from the histogram and the exact tails.
double rank_value(const Accumulator& a, std::size_t ti, const Range& r, double rank) {
  std::vector<double> lo = a.below[ti], hi = a.above[ti];
  std::sort(lo.begin(), lo.end());
  std::sort(hi.begin(), hi.end());
  if (rank < static_cast<double>(lo.size())) return lo[static_cast<std::size_t>(rank)];
  double k = rank - static_cast<double>(lo.size());
  const std::uint32_t* h = &a.hist[ti * histogram_bins];
  const double width = r.width / histogram_bins;
  for (int bin = 0; bin < histogram_bins; ++bin) {
    if (k < h[bin]) return r.lo + width * (bin + (k + 0.5) / h[bin]);
    k -= h[bin];
  }
  const auto idx = std::min<std::size_t>(static_cast<std::size_t>(k), hi.size() - 1);
  return hi.empty() ? r.lo + r.width : hi[idx];
}

std::vector<McPoint> summarise(const Accumulator& a, const std::vector<double>& temps, const std::vector<Range>& ranges,
                               double coverage) {
  std::vector<McPoint> out(temps.size());
  for (std::size_t ti = 0; ti < temps.size(); ++ti) {
    McPoint& p = out[ti];
    p.t = temps[ti];
    p.valid = a.valid[ti];
    p.saturated = a.saturated[ti];
    p.failed = a.failed[ti];
    if (p.valid == 0) continue;
    const auto n = static_cast<long double>(p.valid);
    const long double mean = static_cast<long double>(a.sum[ti]) / n;
    const long double mean_k = mean / fixed_point_scale;
    const long double var =
        p.valid > 1 ? (static_cast<long double>(a.sumsq[ti]) / fixed_point_scale - mean_k * mean_k * n) / (n - 1) : 0.0L;
    p.mean = static_cast<double>(mean_k);
    p.stddev = static_cast<double>(std::sqrt(std::max(var, 0.0L)));
    // Probabilistically symmetric interval (JCGM 101 §7.7): the values of
    // ranks ⌊(1 − p)/2·M⌋ and ⌈(1 + p)/2·M⌉ − 1.
    const double m = static_cast<double>(p.valid);
    const double r_lo = std::floor(0.5 * (1.0 - coverage) * m);
    const double r_hi = std::max(std::ceil(0.5 * (1.0 + coverage) * m) - 1.0, r_lo);
    p.low = rank_value(a, ti, ranges[ti], r_lo);
    p.high = rank_value(a, ti, ranges[ti], r_hi);
    p.median = rank_value(a, ti, ranges[ti], std::floor(0.5 * (m - 1.0)));
  }
  return out;
}

}  // namespace mc_detail

using namespace mc_detail;

double McPoint::saturated_share() const {
  const auto n = valid + saturated + failed;
  return n ? static_cast<double>(saturated) / static_cast<double>(n) : 0.0;
}

McPoint monte_carlo_model(const std::function<double(const Deviations&)>& model,
                          const std::vector<ToleranceInput>& inputs, double sigma_per_tol, std::uint64_t seed,
                          std::uint64_t units, double coverage) {
  // The same draws, histogram, pilot range and interval code as the chain's
  // engine, for a model given as a function (JCGM 101 §9 test cases).
  const std::vector<double> one{0.0};
  std::vector<Range> ranges(1);
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  for (std::uint64_t u = 0; u < std::min(units, pilot_units); ++u) {
    const double y = model(draw_unit(inputs, sigma_per_tol, seed, u));
    lo = std::min(lo, y);
    hi = std::max(hi, y);
  }
  ranges[0] = pilot_range(lo, hi);
  Accumulator acc(1);
  const double inv_width = histogram_bins / ranges[0].width;
  for (std::uint64_t u = 0; u < units; u += block_size) {
    double s1 = 0.0, s2 = 0.0;
    const std::uint64_t end = std::min(units, u + block_size);
    for (std::uint64_t k = u; k < end; ++k) {
      const double y = model(draw_unit(inputs, sigma_per_tol, seed, k));
      acc.valid[0]++;
      s1 += y;
      s2 += y * y;
      const double pos = (y - ranges[0].lo) * inv_width;
      if (pos < 0.0) acc.below[0].push_back(y);
      else if (pos >= histogram_bins) acc.above[0].push_back(y);
      else acc.hist[static_cast<std::size_t>(pos)]++;
    }
    acc.sum[0] += static_cast<long long>(std::floor(s1 * fixed_point_scale + 0.5));
    acc.sumsq[0] += static_cast<long long>(std::floor(s2 * fixed_point_scale + 0.5));
  }
  acc.units = units;
  return summarise(acc, one, ranges, coverage).front();
}

double numerical_tolerance(double u, int significant) {
  if (!(u > 0.0)) return 0.0;
  const double l = std::floor(std::log10(u)) - (significant - 1);
  return 0.5 * std::pow(10.0, l);
}

bool linear_validated(double lin_low, double lin_high, double mc_low, double mc_high, double delta) {
  return std::fabs(lin_low - mc_low) <= delta && std::fabs(lin_high - mc_high) <= delta;
}

Interval clopper_pearson(std::uint64_t k, std::uint64_t n, double alpha) {
  using boost::math::binomial_distribution;
  const auto trials = static_cast<double>(n), successes = static_cast<double>(k);
  if (n == 0) return {0.0, 1.0};
  return {binomial_distribution<>::find_lower_bound_on_p(trials, successes, alpha / 2,
                                                         binomial_distribution<>::clopper_pearson_exact_interval),
          binomial_distribution<>::find_upper_bound_on_p(trials, successes, alpha / 2,
                                                         binomial_distribution<>::clopper_pearson_exact_interval)};
}

}  // namespace thermargin
