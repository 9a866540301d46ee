#include "thermargin/report/grades_report.hpp"

#include <algorithm>
#include <cmath>
#include <optional>

#include "thermargin/core/caution.hpp"

namespace thermargin {

namespace {

using report::kelvin;
using report::num;
using report::pct;

std::string measure_phrase(ErrorMeasure m) {
  switch (m) {
    case ErrorMeasure::worst_case: return "worst-case";
    case ErrorMeasure::linear: return "linear-band";
    case ErrorMeasure::monte_carlo: return "Monte Carlo band";
  }
  return "worst-case";
}

std::string opt_k(const std::optional<double>& v) { return v ? num(*v, 3) : std::string("\u2013"); }

}  // namespace

std::vector<Figure> grades_figures(const GradesResult& g) {
  svg::Chart c;
  c.title = "Cost against accuracy of every combination of grades";
  c.x.label = "Unit cost (catalogue currency)";
  c.y.label = "Max |error| in the window, " + measure_phrase(g.by) + " (K)";
  c.description = "Each combination's unit cost and error; the line joins the cost/accuracy front; the ring marks the "
                  "cheapest combination that meets the requirement.";
  c.series.push_back(
      svg::reference("limit", "requirement \u00b1" + kelvin(g.requirement.max_error), {g.requirement.max_error}));
  std::vector<double> fx;
  svg::Values fy;
  for (std::size_t i : g.front) {
    if (!g.rows[i].error) continue;
    fx.push_back(g.rows[i].unit_cost);
    fy.push_back(g.rows[i].error);
  }
  svg::Style front = svg::in_slot(3);
  front.marker = svg::Marker::none;
  c.series.push_back(svg::line("front", "Cost/accuracy front", fx, fy, front));
  std::vector<double> mx, nx;
  svg::Values my, ny;
  for (const auto& r : g.rows) {
    if (!r.error) continue;
    (r.meets_requirement ? mx : nx).push_back(r.unit_cost);
    (r.meets_requirement ? my : ny).push_back(r.error);
  }
  c.series.push_back(svg::points("meets", "Meets the requirement", mx, my, svg::in_slot(0)));
  svg::Style miss = svg::in_slot(2);
  miss.marker = svg::Marker::cross;
  c.series.push_back(svg::points("misses", "Does not", nx, ny, miss));
  if (g.recommendation && g.rows[*g.recommendation].error) {
    const GradeRow& r = g.rows[*g.recommendation];
    c.series.push_back(svg::annotation("recommended", "recommended", r.unit_cost, *r.error));
  }
  // Room above the limit line and below the cheapest, so neither sits on the frame.
  c.y.min = 0.0;
  std::vector<Figure> f;
  f.push_back({"grades-front.svg",
               "Every combination at its unit cost and " + measure_phrase(g.by) +
                   " error; lower and further left is better. The front joins those no other combination beats on "
                   "both.",
               std::move(c)});
  return f;
}

std::string grades_report_html(const Design& d, const Scenario& scenario, const Catalogue& cat, const GradesResult& g,
                               const std::string& source) {
  const auto figures = grades_figures(g);
  const auto& q = g.requirement;
  HtmlDocument doc("Part grades: " + d.title);
  std::string intro = "thermargin " + std::string(version) + " grades for " +
                      (source.empty() ? std::string("the built-in default design") : "scenario " + source) +
                      " with catalogue " + cat.file + ": " + std::to_string(g.slots.size()) + " svg::in_slot(s), " +
                      std::to_string(g.rows.size()) + " combination(s). Requirement \u00b1" + kelvin(q.max_error) +
                      " from " + num(q.window_min, 2) + " to " + num(q.window_max, 2) + " \u00b0C with a yield of at least " +
                      pct(q.yield, 2) + "; Monte Carlo with " + std::to_string(g.units) + " units per combination.";
  if (g.volume) intro += " Setup costs spread over " + num(*g.volume, 0) + " units.";
  if (g.reject_cost) intro += " A failed unit costs " + money(*g.reject_cost) + "; ranked by cost per good unit.";
  doc.paragraph(intro);
  if (g.recommendation) {
    const GradeRow& r = g.rows[*g.recommendation];
    doc.verdict(Badge::pass, "Recommended: " + g.choice_text(r) + " at " + money(r.unit_cost) + " per unit \u2014 " +
                          (r.wc_max_abs ? "worst case " + kelvin(*r.wc_max_abs) : std::string("worst case n/a")) +
                          (r.mc ? ", yield " + pct(r.mc->yield, 3) : std::string()) + ".");
  } else {
    doc.verdict(Badge::fail, "No combination in the catalogue meets the requirement.");
  }
  doc.caution(caution);
  if (!g.summary.empty()) doc.paragraph(g.summary);
  for (const GradeRow& r : g.rows)  // X in the table: the RTD class used beyond its rated range (docs/model.md §1)
    if (!r.rtd_class_note.empty()) {
      doc.paragraph("X: the RTD class is used beyond its rated range, e.g. " + r.rtd_class_note + ".");
      break;
    }

  doc.heading("Cost against accuracy");
  doc.chart(figures[0].chart, "Figure 1. " + figures[0].caption);

  Table t;
  t.caption = "Every combination, cheapest first (F on the front, M meets the requirement, R recommended)";
  t.header = {"#"};
  for (const auto& s : g.slots) t.header.push_back(s);
  // The Monte Carlo band and each row's verdict in words are in the CLI's
  // tables and JSON; with them this table would not fit a printed page.
  t.header.insert(t.header.end(), {"Unit cost", "Worst case (K)", "Linear (K)", "Yield", "95 % interval", ""});
  t.numeric.assign(t.header.size(), false);
  for (std::size_t k = 1 + g.slots.size(); k < 1 + g.slots.size() + 5; ++k) t.numeric[k] = true;
  t.numeric[0] = true;
  for (std::size_t i = 0; i < g.rows.size(); ++i) {
    const GradeRow& r = g.rows[i];
    std::vector<std::string> row{std::to_string(i + 1)};
    for (std::size_t k = 0; k < g.slots.size(); ++k) row.push_back(g.grades[k][static_cast<std::size_t>(r.choice[k])]);
    row.insert(row.end(), {money(r.unit_cost), opt_k(r.wc_max_abs), opt_k(r.rss_max_abs),
                           r.mc ? pct(r.mc->yield, 2) + (r.mc_run ? "" : " pilot") : "\u2013",
                           r.mc ? num(100 * r.mc->yield_low, 2) + "\u2013" + num(100 * r.mc->yield_high, 2) + " %" : "",
                           std::string(r.on_front ? "F" : "") + (r.meets_requirement ? "M" : "") +
                               (g.recommendation == i ? "R" : "") + (r.rtd_class_note.empty() ? "" : "X")});
    t.rows.push_back(std::move(row));
  }
  doc.table(std::move(t));
  add_resolved_inputs(doc, d, scenario);
  doc.caution(caution);
  return doc.str();
}

}  // namespace thermargin
