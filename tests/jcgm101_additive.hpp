// JCGM 101:2008 §9.2's additive model Y = X1 + X2 + X3 + X4, for the engines
// that take a model of their own (the linear budget's propagate, Monte
// Carlo's monte_carlo_model): the Xi on four source slots.
#pragma once

#include <cstddef>
#include <vector>

#include "thermargin/input/sources.hpp"

namespace thermargin::testing {

inline constexpr Source additive_slot[4] = {Source::r25, Source::beta, Source::r_fixed, Source::adc_offset};

inline double additive(const Deviations& d) {
  double y = 0.0;
  for (Source s : additive_slot) y += d[static_cast<std::size_t>(s)];
  return y;
}

// The four Xi, each with `dist` on ±`bound`.
inline std::vector<ToleranceInput> four(Distribution dist, double bound) {
  std::vector<ToleranceInput> in;
  for (Source s : additive_slot) in.push_back({s, bound, dist, 0.0});
  return in;
}

}  // namespace thermargin::testing
