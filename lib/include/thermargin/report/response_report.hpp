// The output of `thermargin response` (tools/response.hpp): text, CSV and
// JSON for the terminal and scripts, and a self-contained HTML page with two
// pictures — the reported temperature following a ramp, and settling after a
// step, for the scenario's filter and its neighbours — as standalone SVG
// files for --plots too.
//
// Presentation only: every number comes from analyse_response(), and the
// curves from the same exact discrete-time model (sensor_on_ramp(),
// sensor_after_step(), apply_filter()).
#pragma once

#include <string>
#include <vector>

#include "thermargin/report/budget_report.hpp"
#include "thermargin/tools/response.hpp"

namespace thermargin {

std::string response_text(const Design& design, const ResponseAnalysis& a);
// One row per filter, after the `#` lines of csv_preamble (the caution, the RTD class).
std::string response_csv(const Design& design, const ResponseAnalysis& a);
// {"command": "response", ..., "rows": [...], "recommendation": row | null, ...}
std::string response_json(const Design& design, const ResponseAnalysis& a);

// response-ramp.svg (only with a ramp stated) and response-step.svg. Series
// (data-name): medium (the true temperature), sensor (the slowest sensor's
// own temperature at the readings), one line per pictured filter named
// after it ("none", "moving-average-8", "exponential-0.125"), the step's
// settle band (references at step ± settle_to) and the scenario filter's
// settling time (an annotation).
std::vector<Figure> response_figures(const ResponseAnalysis& a);

std::string response_report_html(const Design& design, const Scenario& scenario, const ResponseAnalysis& a,
                                 const std::string& source = {});

// budget's summary line: the dynamic error at the stated ramp with the
// scenario's filter, and whether the verdict includes it.
std::string dynamic_error_line(const ResponseSettings& s);

}  // namespace thermargin
