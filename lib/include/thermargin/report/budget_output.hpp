// What `thermargin budget` prints: the budget (budget.hpp) and what would
// help (what_if.hpp) as text for a person, CSV per temperature for a
// spreadsheet, and JSON for a program (docs/engines.md names its fields).
// Presentation only: every number comes from run_budget() and what_if(); the
// HTML page is budget_report.hpp. Every output keeps the caution.
#pragma once

#include <string>

#include "thermargin/engines/budget.hpp"
#include "thermargin/engines/what_if.hpp"
#include "thermargin/input/response_section.hpp"

namespace thermargin {

// The report for a terminal: the verdict, the engines' largest errors over
// the window, the contributors, what would help and the table per temperature.
// What the command adds beside the budget: the chain it ran (for the sampled
// node's settling summary, when the ADC has a sampling capacitor) and the
// scenario's [response] section (the dynamic error line).
struct BudgetExtras {
  const Chain* chain = nullptr;
  ResponseSettings response;
};

std::string budget_text(const Design& design, const Budget& budget, const WhatIf& what_if,
                        const BudgetExtras& extras = {});

// One line per temperature: the bands, the sensitivity and each source's
// share and half-width (in the order of the window's ranking).
std::string budget_csv(const Budget& budget, const BudgetExtras& extras = {});

// The whole budget as JSON (two-space indent, a final newline), with
// "what_if" after "caution".
std::string budget_json(const Design& design, const Budget& budget, const WhatIf& what_if,
                        const BudgetExtras& extras = {});

}  // namespace thermargin
