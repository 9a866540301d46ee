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

// The report for a terminal, at most 100 columns wide: one screen first (the
// verdict, the engines' largest errors with their margins, the yield, the
// leading sources by share and by reach, the headroom, the divider's current
// and the sensor's power, what would help), then with `detail` every
// contributor, the unreadable temperatures and the tables per temperature,
// headed by the CSV's column names (split to fit the width).
// What the command adds beside the budget: the chain it ran (the headroom,
// and the sampled node's settling summary when the ADC has a sampling
// capacitor), the scenario's [response] section (the dynamic error line),
// and whether the text goes into detail (--detail).
struct BudgetExtras {
  const Chain* chain = nullptr;
  ResponseSettings response;
  bool detail = false;
};

std::string budget_text(const Design& design, const Budget& budget, const WhatIf& what_if,
                        const BudgetExtras& extras = {});

// The caution as a `#` line (csv_caution_line), the header, then one line per
// temperature: the bands, the sensitivity and each source's share and
// half-width (in the order of the window's ranking).
std::string budget_csv(const Budget& budget, const BudgetExtras& extras = {});

// The whole budget as JSON (two-space indent, a final newline), with
// "what_if" after "caution".
std::string budget_json(const Design& design, const Budget& budget, const WhatIf& what_if,
                        const BudgetExtras& extras = {});

}  // namespace thermargin
