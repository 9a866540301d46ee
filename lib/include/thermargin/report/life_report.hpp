// Over the product's life in the budget's text: the window at delivery and at
// end of life side by side (engines, yield, verdict of each), which one the
// verdict uses (requirement.at) and the drift inputs that lead at end of
// life. Presentation only: every number comes from run_budget() (budget.hpp).
#pragma once

#include <string>

#include "thermargin/engines/budget.hpp"

namespace thermargin {

// The section, ending in a blank line; empty when the design sets no drift.
std::string end_of_life_text(const Design& design, const Budget& budget);

}  // namespace thermargin
