// The largest error over the requirement window, per engine: what the
// budget's verdict, the picker's objective, the grades' front and the
// what-if table all read, written once. Points outside the window
// (in_requirement_window, design.hpp) are skipped.
#pragma once

#include <limits>
#include <vector>

#include "thermargin/engines/linear_budget.hpp"
#include "thermargin/engines/worst_case.hpp"

namespace thermargin {

struct WindowMax {
  double max_abs = 0.0;  // K, the largest |band end| over the points counted; 0 when none
  double at = std::numeric_limits<double>::quiet_NaN();  // °C, the first point with it; NaN when none
  bool any = false;        // some window point counted
  bool readable = true;    // every window point read by every unit (corner)
  Status failure = Status::ok;  // at the first point not readable
  double failure_at = std::numeric_limits<double>::quiet_NaN();  // °C, that point
};

// Worst case: a point counts when some corner read it (any_ok); it is not
// readable when some corner or every corner could not read it (its failure,
// or no_solution when no corner reported one).
WindowMax window_max(const std::vector<WorstCasePoint>& points, const Requirement& q);

// Linear budget: a point counts when its budget was formed (status ok);
// otherwise it is not readable, with that status.
WindowMax window_max(const std::vector<LinearPoint>& points, const Requirement& q);

}  // namespace thermargin
