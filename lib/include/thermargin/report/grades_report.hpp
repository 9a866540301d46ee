// The report of `thermargin grades`: what accuracy each combination of part
// grades buys for its cost, as one self-contained HTML page and a standalone
// SVG chart.
//
// Presentation only: every number comes from evaluate_grades() (grades.hpp)
// and is plotted as `grades --format json` prints it. The chart sets each
// combination's unit cost against its error over the requirement window (by
// the chosen measure), joins the cost/accuracy front (the combinations no
// other beats on both), draws the requirement's limit, tells the
// combinations that meet the requirement from those that do not by marker
// shape as well as colour, and rings the recommendation: the cheapest that
// meets it. The page adds the table of every combination, every resolved
// input and the caution.
#pragma once

#include <string>
#include <vector>

#include "thermargin/report/budget_report.hpp"
#include "thermargin/input/catalogue.hpp"
#include "thermargin/tools/grades.hpp"

namespace thermargin {

// The grades chart: grades-front.svg. Series (data-name): meets and misses
// (points: combinations that meet the requirement or not, in row order, each
// at its unit cost and error), front (a line through the front, cheapest
// first), recommended (an annotation), limit (the requirement's max_error).
// A combination without an error figure (some reading in the window cannot
// be converted) is not plotted.
std::vector<Figure> grades_figures(const GradesResult& result);

// The whole HTML page; `source` names the scenario file ("" for the
// built-in default design).
std::string grades_report_html(const Design& design, const Scenario& scenario, const Catalogue& catalogue,
                               const GradesResult& result, const std::string& source = {});

}  // namespace thermargin
