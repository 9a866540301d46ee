// The design-review report of `thermargin budget`: one self-contained HTML
// page and the same charts as standalone SVG files for slides.
//
// Presentation only: every number comes from run_budget() (budget.hpp) and
// is plotted exactly as `budget --format json` prints it, so a reviewer can
// trust that the picture and the table are the same analysis. The page
// opens with what a review decides on (the verdict, the margin of each
// engine, the yield with its confidence interval) and the caution, then
// shows the error bands across the range, what the error is made of (each
// source's share of the combined variance, JCGM 100:2008 §5.1.2, and its
// ranking over the requirement window), the ADC's sensitivity and the
// self-heating, and ends with every resolved input, its unit and origin. A
// temperature whose reading saturates or cannot be converted is a gap in
// every curve and a hatched strip on the error chart, never a zero. The
// charts, their stable file names and the helpers that write them are
// shared with the other commands' reports.
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "thermargin/engines/budget.hpp"
#include "thermargin/report/html_report.hpp"
#include "thermargin/input/scenario.hpp"
#include "thermargin/report/svg_chart.hpp"
#include "thermargin/engines/what_if.hpp"

namespace thermargin {

// A chart of a report with the file name it gets under --plots.
struct Figure {
  std::string file;     // stable name: "error-bands.svg"
  std::string caption;  // what the reader should see in it
  svg::Chart chart;
};

// The budget's charts, in report order: error-bands.svg, contributors.svg,
// sensitivity.svg, lsb-size.svg, self-heating.svg. Series names (data-name)
// follow the JSON fields: nominal; wc, rss, mc (bands of wc_low/wc_high,
// ...); limit (the ±max_error lines), window, unreadable_N (hatched strips);
// the contributors' share lines by source name ("others" for the rest);
// abs_sensitivity (|sensitivity|); lsb_in_k and resolution; self_heating.
std::vector<Figure> budget_figures(const Design& design, const Budget& budget);

// The whole HTML page. `scenario` supplies every resolved value with its
// origin (what `thermargin check` prints); `source` names the scenario file
// for the reader ("" for the built-in default design).
// `what_if`, when given, adds the section "What would help" (what_if.hpp).
std::string budget_report_html(const Design& design, const Scenario& scenario, const Budget& budget,
                               const std::string& source = {}, const WhatIf* what_if = nullptr);

// Appends "Every resolved input", the section every report page ends with:
// one table per scenario section with each key's value, unit and origin, as
// `thermargin check` prints them (distribution and gap keys only when set).
void add_resolved_inputs(HtmlDocument& page, const Design& design, const Scenario& scenario);

// Refuses a --report or --plots destination before any work is done, so a
// long analysis never ends in "cannot write". `option` names the option in
// the message: "--report = out/review.html (command line): directory out does
// not exist". A report needs its directory to exist, and a file it replaces
// must be writable; a plots directory may be missing as long as its parent
// exists (write_figures creates it).
void check_report_path(const std::string& option, const std::string& path);
void check_plots_directory(const std::string& option, const std::string& dir);

// Writes the report whole or not at all (write_file_atomically).
void write_report(const std::string& path, std::string_view html);

// Writes each figure as dir/<file> (render_document), all or none: every file
// is first written whole beside its target and only then renamed into place,
// and on any failure the new files, and the directory if this call created
// it, are removed again. Throws input_error with one line naming the option,
// the path and the reason.
void write_figures(const std::string& option, const std::string& dir, const std::vector<Figure>& figures);

}  // namespace thermargin
