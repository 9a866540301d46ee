// The picker's window figures for one candidate chain (picker.cpp ranks
// with them): the worst-case and linear bands over the window, the Monte
// Carlo check, and the directed lower bound of the worst case. Not public API.
#pragma once

#include <cstdint>
#include <limits>
#include <optional>
#include <string>
#include <vector>

#include "thermargin/chain/chain.hpp"
#include "thermargin/chain/element_memo.hpp"
#include "thermargin/engines/linear_budget.hpp"
#include "thermargin/engines/monte_carlo.hpp"
#include "thermargin/engines/worst_case.hpp"
#include "thermargin/tools/picker.hpp"

namespace thermargin::picker_detail {

inline constexpr double inf = std::numeric_limits<double>::infinity();

// The largest |error| of a band over the window, or the first status that
// stopped it.
struct WindowBand {
  Status status = Status::ok;
  double max_abs = 0.0;
};

struct LinearWindow {
  WindowBand band;
  std::string dominant;
};

// A lower bound of the worst case over the window: at each temperature the
// two corners a linear model calls extreme (each input at the bound the sign
// of its sensitivity points to), each read at both ends of the reading
// interval, calibration readings at the same end, outputs not rounded.
//
// Up to max_enumerated_inputs these are corners of the box the full
// enumeration visits, and the error is monotone in each output rounding
// (worst_case.hpp), so an unrounded value lies between the enumeration's
// extremes: |error| here is a lower bound of the full worst case. Without
// calibration, or with an offset calibration, the rounding at t moves the
// error by ±½ resolution (or more) on its own, so that much is added; a
// two-point calibration scales it by its gain, so nothing is added there. A
// reading these corners cannot convert fails the full enumeration as well.
//
// Beyond, the worst case is the engine's directed search, which starts from
// exactly these two corners and leaves a start only for a corner further out
// in its own direction — or, when the start cannot be read, for any corner
// it can read. So only the upward corner's largest error bounds the upper
// extreme from below and only the downward corner's smallest error the lower
// one, and a corner that cannot be read bounds nothing and proves nothing:
// the search may recover from it (the budget then reads the window).
//
// Where the linear budget could not be formed no corner is known: the bound
// stays 0 there (the full evaluation decides).
struct DirectedBound {
  double value = 0.0;           // K
  Status status = Status::ok;   // first failure at a visited corner (enumerated designs only)
  std::vector<double> at;       // K, the bound at each temperature (0 where unknown)
};

// Worst case over the window, the temperatures split between threads (each
// temperature's corners are independent of the others, so the result does
// not depend on the split).
WindowBand worst_case_band(const Chain& chain, const std::vector<double>& temps, CornerMethod method, int threads);

// The linear band over the window and its dominant source: the largest
// summed variance over the window's points, as budget.cpp ranks them.
LinearWindow linear_window(const LinearBudget& lb);

McCheck mc_window(const Chain& chain, const std::vector<double>& temps, std::uint64_t units, int threads,
                  const McProgress& progress = {});

bool corners_directed(const Design& d);

// The corner a linear model calls extreme in `direction` (+1 up, −1 down):
// the start of the worst-case engine's directed search (a zero sensitivity
// takes +bound going up and −bound going down, as there).
Deviations directed_corner(const Design& d, const LinearPoint& lp, double direction);

// What the bound adds to an unrounded |error| for the output rounding.
double bound_rounding(const Design& d);

// The unrounded error at one corner with the readings shifted by `rs`, at
// the memo's temperature (a corner read at several shifts shares its
// element stages); none (and `failure` set) where the chain fails.
std::optional<double> corner_error(ElementMemo& memo, const Deviations& dev, const ReadingShift& rs, Status& failure);

// Every reading at one end of the reading interval.
std::optional<double> corner_error(ElementMemo& memo, const Deviations& dev, double shift, Status& failure);

// The reading shifts at which a directed design's start corner is read:
// the reading at t at either end of its interval, and each calibration
// reading independently at either end of its own, as the engine reads a
// corner (it fails the corner when any of them fails).
std::vector<ReadingShift> engine_shifts(const Design& d, const ReadingInterval& q);

DirectedBound directed_bound(const Chain& chain, const std::vector<double>& temps, const LinearBudget& lb);

}  // namespace thermargin::picker_detail
