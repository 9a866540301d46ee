// What `thermargin grades` prints: the evaluation (grades.hpp) as text for a
// person, CSV for a spreadsheet and JSON for a program (docs/grades.md).
// Presentation only; the HTML page is grades_report.hpp. Every output keeps
// the caution.
#pragma once

#include <string>

#include "thermargin/input/catalogue.hpp"
#include "thermargin/input/design.hpp"
#include "thermargin/tools/grades.hpp"

namespace thermargin {

// The recommendation, the front and every combination, cheapest first.
std::string grades_text(const Design& design, const Catalogue& catalogue, const GradesResult& grades);

// One line per combination: its grades, costs, errors, yield and marks.
std::string grades_csv(const GradesResult& grades);

// The whole result as JSON (two-space indent, a final newline).
std::string grades_json(const Design& design, const Catalogue& catalogue, const GradesResult& grades);

}  // namespace thermargin
