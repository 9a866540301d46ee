// Pieces the budget's writers share (not public API): budget_output.cpp
// (CSV, JSON), budget_text.cpp (the text) and budget_report.cpp (the page).
#pragma once

#include <string>

#include "thermargin/engines/budget.hpp"

namespace thermargin::budget_writer {

inline bool point_ok(const BudgetPoint& p) { return p.nominal.status == Status::ok; }

// The share and own half-width of a source at one point; nullptr when the
// point has no linear budget.
inline const Contributor* contributor_at(const BudgetPoint& p, const std::string& name) {
  for (const auto& c : p.contributors)
    if (c.name == name) return &c;
  return nullptr;
}

// The failures of a Monte Carlo run for a person: "12 per million", or with
// no failure among n units the upper end of the 95 % interval, "none in
// 100000 units: below 37 per million (95 % upper bound)" — never "0 per
// million", which n units cannot show.
std::string failure_rate_text(const McSummary& mc);

// The window temperatures where the linear band and the Monte Carlo band
// were both formed (`compared`), and of those where the linear band is
// validated (JCGM 101 §8), the number returned.
int validated_points(const Budget& b, int& compared);

// The runs of temperatures that cannot be read, for a person: "-20.00 ..
// -2.50 degC: the ADC saturates (a sample at a rail), some units".
std::string run_range(const UnreadableRun& r);

}  // namespace thermargin::budget_writer
