// What `thermargin check` prints: every key of the scenario as written, as
// read (with its unit) and where it came from, as text for a person, CSV for
// a spreadsheet and JSON for a program. `design` is the scenario validated
// (build_design). Every output keeps the caution.
#pragma once

#include <string>

#include "thermargin/input/design.hpp"
#include "thermargin/input/scenario.hpp"

namespace thermargin {

std::string check_text(const Scenario& scenario, const Design& design);
std::string check_csv(const Scenario& scenario, const Design& design);  // key,value,unit,origin,resolved
std::string check_json(const Scenario& scenario, const Design& design);  // two-space indent, final newline

}  // namespace thermargin
