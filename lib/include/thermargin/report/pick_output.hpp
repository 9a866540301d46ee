// What `thermargin pick` prints: the ranking (picker.hpp) as text for a
// person, CSV for a spreadsheet and JSON for a program (docs/pick.md).
// Presentation only; the HTML page is pick_report.hpp. Every output keeps
// the caution.
#pragma once

#include <string>

#include "thermargin/input/design.hpp"
#include "thermargin/tools/picker.hpp"

namespace thermargin {

// The verdict line, the ranking table and the guidance.
std::string pick_text(const Design& design, const PickResult& result, const PickOptions& options);

// One line per ranked candidate, every figure to ten significant digits.
std::string pick_csv(const Design& design, const PickResult& result);

// The whole result as JSON (two-space indent, a final newline).
std::string pick_json(const Design& design, const PickResult& result, const PickOptions& options);

}  // namespace thermargin
