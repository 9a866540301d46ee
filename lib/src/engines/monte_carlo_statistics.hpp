// The Monte Carlo engine's statistics without units × temperatures memory
// (docs/engines.md): per temperature a histogram whose range a pilot of the
// first units sets, the values outside it kept exactly, integer sums; the
// coverage interval, median, mean and standard deviation read from them.
// Not public API.
#pragma once

#include <cstddef>
#include <cstdint>
#include <vector>

#include "thermargin/engines/monte_carlo.hpp"

namespace thermargin::mc_detail {

inline constexpr int histogram_bins = 8192;               // per temperature
inline constexpr std::uint64_t pilot_units = 4096;
inline constexpr double fixed_point_scale = 16777216.0;  // 2^24 per K (and per K²) in the integer sums
inline constexpr double sum_clamp = 1e4;                  // K; beyond this the sums saturate (absurd errors)

// The fixed-point sums' integer: 128 bits, so that no run length overflows it.
__extension__ typedef __int128 wide_sum;

struct Range {
  double lo = -1.0, width = 2.0;  // histogram range per temperature
};

struct Accumulator {
  std::vector<std::uint32_t> hist;  // nt × bins
  std::vector<wide_sum> sum, sumsq;
  std::vector<std::uint64_t> valid, saturated, failed;
  std::vector<std::vector<double>> below, above;  // exact values outside the histogram
  std::uint64_t units = 0, good_units = 0;

  explicit Accumulator(std::size_t nt)
      : hist(nt * histogram_bins, 0), sum(nt, 0), sumsq(nt, 0), valid(nt, 0), saturated(nt, 0), failed(nt, 0),
        below(nt), above(nt) {}

  void merge(const Accumulator& o) {
    for (std::size_t i = 0; i < hist.size(); ++i) hist[i] += o.hist[i];
    for (std::size_t i = 0; i < sum.size(); ++i) {
      sum[i] += o.sum[i];
      sumsq[i] += o.sumsq[i];
      valid[i] += o.valid[i];
      saturated[i] += o.saturated[i];
      failed[i] += o.failed[i];
      below[i].insert(below[i].end(), o.below[i].begin(), o.below[i].end());
      above[i].insert(above[i].end(), o.above[i].begin(), o.above[i].end());
    }
    units += o.units;
    good_units += o.good_units;
  }
};

// The histogram's range from the pilot's smallest and largest value: widened
// by half its width on each side (at least 1 µK); the default range when the
// pilot has no value (lo > hi).
Range pilot_range(double lo, double hi);

// Quantile of rank q in [0, n) from the histogram and the exact tails.
double rank_value(const Accumulator& a, std::size_t ti, const Range& r, double rank);

// Each temperature's point from the accumulated counts (JCGM 101 §7.7).
std::vector<McPoint> summarise(const Accumulator& a, const std::vector<double>& temps, const std::vector<Range>& ranges,
                               double coverage);

}  // namespace thermargin::mc_detail
