// What the budget's output says about the sampled node (docs/model.md §14):
// the settling error across the range and, when it is among the leading
// errors, the fixes with their numbers. Every writer (text, CSV, JSON, the
// review page) calls these; nothing is printed for an ideal sampler.
#pragma once

#include <cmath>
#include <string>

#include "thermargin/chain/chain.hpp"
#include "thermargin/engines/budget.hpp"

namespace thermargin {

struct SettlingSummary {
  bool shown = false;         // settling is among the leading errors of the window
  double max_abs = 0.0;       // K, largest |acquisition error| in the window
  double at = 0.0;            // °C, where
  SettlingNeed need;          // for ½ LSB at that temperature
};

// Leading: the settling error reaches a quarter of the limit or of the
// window's worst case, or the precharge (precharge = any) is one of the
// three largest contributors.
SettlingSummary settling_summary(const Chain& chain, const Budget& b);

// One paragraph for the text output; empty when not shown.
std::string settling_text(const Design& d, const SettlingSummary& s);

}  // namespace thermargin
