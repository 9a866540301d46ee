// The report of `thermargin pick`: which fixed resistor, and why, as one
// self-contained HTML page and a standalone SVG chart.
//
// Presentation only: every number comes from pick() (picker.hpp) and is
// plotted as `pick --format json` prints it. The chart puts each ranked
// candidate's objective (its worst-case, linear-band or Monte Carlo max
// |error| over the requirement window, or its smallest ADC sensitivity)
// against its value on a log axis, because preferred-number series are
// spaced evenly in log R (IEC 60063); candidates that a constraint or a
// reading that cannot be converted rules out lie in hatched excluded
// regions, and the winner is ringed. The page adds the ranking table, the
// analytic guidance, every resolved input and the caution.
#pragma once

#include <string>
#include <vector>

#include "thermargin/report/budget_report.hpp"
#include "thermargin/tools/picker.hpp"

namespace thermargin {

// The pick chart: pick-candidates.svg. Series (data-name): objective (a
// line through the candidates sorted by value, a gap where the window cannot
// be read), feasible and rejected (points, in ranking order), winner (an
// annotation), limit (the requirement's max_error, error objectives only)
// and excluded_N (hatched spans, one per run of neighbouring candidates
// ruled out for the same first reason; single-resistor searches only).
std::vector<Figure> pick_figures(const Design& design, const PickResult& result);

// The whole HTML page; `options` are the ones pick() ran with (for the
// constraints and the grade), `source` names the scenario file ("" for the
// built-in default design).
std::string pick_report_html(const Design& design, const Scenario& scenario, const PickResult& result,
                             const PickOptions& options, const std::string& source = {});

}  // namespace thermargin
