// Worst case: extreme-value analysis over the tolerance box (docs/engines.md).
//
// For each temperature, the minimum and maximum error over every corner of
// the box — each active input at −bound or +bound, the board temperature at
// both ends of its range — with quantisation and noise as an interval on
// each reading ([−½, +½] LSB for round, [−1, 0] for floor, widened by
// ± k_noise·σ/√M) and the output rounding as ±½ resolution. The reading
// intervals need only their ends: the conversion is monotone in the code.
// A calibrated unit is calibrated at the same corner, its calibration
// readings carrying their own independent intervals.
//
// Up to 16 active inputs every corner is enumerated (65 536 corners). Beyond,
// the corners are directed by the signs of the sensitivities at each
// temperature (the two corners a linear model says are extreme): exact for a
// monotone model, and said so in the output.
#pragma once

#include <vector>

#include "thermargin/chain/chain.hpp"

namespace thermargin {

inline constexpr int max_enumerated_inputs = 16;

struct WorstCasePoint {
  double t = 0.0;
  double low = 0.0, high = 0.0;  // K, over the corners that could be evaluated
  int failed_corners = 0;        // corners where the chain reported a status
  Status failure = Status::ok;   // the first such status
  bool any_ok = false;           // at least one corner evaluated
  // Each source's own worst-case half-width (K): that source alone at its
  // bound (reading sources at their interval ends), everything else nominal;
  // a tempco also with the board at either end of its range (it acts only
  // through the board's distance from 25 °C), against that board alone.
  // Indexed like Design::inputs, then quantisation, noise, rounding.
  std::vector<double> own_half_width;
};

struct WorstCase {
  bool directed = false;  // corners directed by sensitivities (> 16 inputs)
  int active_inputs = 0;
  long long corners = 0;  // per temperature
  std::vector<WorstCasePoint> points;
};

enum class CornerMethod { automatic, enumerate, directed };

struct WorstCaseOptions {
  CornerMethod method = CornerMethod::automatic;
  // false leaves own_half_width empty (for callers that read only the band:
  // the picker's ranking, the what-if).
  bool half_widths = true;
  // The enumeration's threads (0: every core). The band does not depend on
  // it: minimum and maximum are exact whatever the split.
  int threads = 0;
};

WorstCase worst_case(const Chain& chain, const std::vector<double>& temperatures, const WorstCaseOptions& options = {});

// The reading interval [lo, hi] in LSB: quantiser plus ± k_noise·σ/√M.
struct ReadingInterval {
  double lo, hi;
};
ReadingInterval reading_interval(const Design& d);

}  // namespace thermargin
