// The temperatures a budget cannot read, as ranges: a run of consecutive
// temperatures where the nominal unit, some worst-case corner or the linear
// budget could not form a reading (saturation, runaway, a sensor outside
// its table, a conversion without a solution). The verdict, the text and
// the review page say "saturates from -20.00 to -2.50 degC" once per run,
// never one line per temperature.
#pragma once

#include <string>
#include <vector>

#include "thermargin/engines/budget.hpp"

namespace thermargin {

// A point that some engine could not read (the nominal unit, a worst-case
// corner, the linear budget).
bool unreadable(const BudgetPoint& p);

// The runs over every temperature of the budget, or (window_only) over the
// requirement window's temperatures only. A run breaks where the window
// begins or ends, so each run is wholly inside or wholly outside it.
std::vector<UnreadableRun> unreadable_runs(const std::vector<BudgetPoint>& points, bool window_only = false);

// "the ADC saturates (a sample at a rail) from -20.00 to -2.50 degC (some
// units)": one phrase per run, joined by "; ".
std::string describe_runs(const std::vector<UnreadableRun>& runs);

}  // namespace thermargin
