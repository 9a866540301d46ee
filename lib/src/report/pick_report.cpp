#include "thermargin/report/pick_report.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>
#include <optional>

#include "thermargin/chain/rtd_class_range.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/core/text.hpp"

namespace thermargin {

namespace {

using report::kelvin;
using report::num;
using report::pct;

std::string objective_axis(Objective o) {
  switch (o) {
    case Objective::worst_case: return "Worst-case max |error| in the window (K)";
    case Objective::linear: return "Linear-band max |error| in the window (K)";
    case Objective::monte_carlo: return "Monte Carlo max |error| in the window (K)";
    case Objective::sensitivity: return "Smallest |sensitivity| in the window (LSB/K)";
  }
  return "Objective";
}

std::string page_objective_phrase(Objective o) {
  switch (o) {
    case Objective::worst_case: return "worst case";
    case Objective::linear: return "linear band";
    case Objective::monte_carlo: return "Monte Carlo band";
    case Objective::sensitivity: return "smallest sensitivity";
  }
  return "objective";
}

std::string page_objective_value(Objective o, double v) {
  return maximised(o) ? num(v, 3) + " LSB/K" : kelvin(v, 4);
}

// The value a row plots: its objective where the window could be read (the
// JSON's "objective", null otherwise).
std::optional<double> plotted(const PickRow& r) {
  if (r.status != Status::ok || !std::isfinite(r.objective)) return std::nullopt;
  return r.objective;
}

std::string candidate(const PickResult& res, const PickRow& r) {
  std::string s = ohms(r.r_fixed);
  if (res.pair_search) s += r.r_parallel ? " with " + ohms(*r.r_parallel) + " in parallel" : " with no parallel resistor";
  return s;
}

}  // namespace

std::vector<Figure> pick_figures(const Design& design, const PickResult& res) {
  svg::Chart c;
  c.title = "Candidates: " + page_objective_phrase(res.objective) + " against the fixed resistor";
  c.x.label = "R fixed (\u03a9)";
  c.x.scale = svg::Scale::log10;
  c.x.si_prefix = true;
  c.y.label = objective_axis(res.objective);
  c.description = "Each ranked candidate's objective over the requirement window against its value; hatched regions "
                  "are ruled out by a constraint or because the window cannot be read there; the winner is ringed.";

  // Candidates in order of value, for the curve and the excluded regions.
  std::vector<std::size_t> by_value(res.rows.size());
  std::iota(by_value.begin(), by_value.end(), std::size_t{0});
  std::stable_sort(by_value.begin(), by_value.end(),
                   [&](std::size_t a, std::size_t b) { return res.rows[a].r_fixed < res.rows[b].r_fixed; });

  if (!res.pair_search && !by_value.empty()) {
    // A run of neighbouring ruled-out values becomes one strip reaching
    // half-way (in log R) to the next candidate either side.
    auto r = [&](std::size_t k) { return res.rows[by_value[k]].r_fixed; };
    auto out = [&](std::size_t k) { return !res.rows[by_value[k]].feasible(); };
    const std::size_t n = by_value.size();
    int strips = 0;
    for (std::size_t i = 0; i < n;) {
      if (!out(i)) {
        ++i;
        continue;
      }
      std::size_t j = i;
      while (j + 1 < n && out(j + 1)) ++j;
      const double step_left = i > 0 ? std::sqrt(r(i) / r(i - 1)) : (n > 1 ? std::sqrt(r(1) / r(0)) : 1.1);
      const double step_right = j + 1 < n ? std::sqrt(r(j + 1) / r(j)) : (n > 1 ? std::sqrt(r(n - 1) / r(n - 2)) : 1.1);
      ++strips;
      c.series.push_back(svg::span("excluded_" + std::to_string(strips),
                                   strips == 1 ? "Ruled out (constraint or unreadable)" : "", r(i) / step_left,
                                   r(j) * step_right, true));
      i = j + 1;
    }
  }
  if (!maximised(res.objective))
    c.series.push_back(
        svg::reference("limit", "requirement \u00b1" + kelvin(design.requirement.max_error), {design.requirement.max_error}));

  if (!res.pair_search) {
    std::vector<double> x;
    svg::Values y;
    for (std::size_t k : by_value) {
      x.push_back(res.rows[k].r_fixed);
      y.push_back(plotted(res.rows[k]));
    }
    c.series.push_back(svg::line("objective", "", x, y, svg::in_slot(3, svg::Marker::none)));
  }
  std::vector<double> fx, rx;
  svg::Values fy, ry;
  for (const auto& row : res.rows) {
    if (!plotted(row)) continue;
    (row.feasible() ? fx : rx).push_back(row.r_fixed);
    (row.feasible() ? fy : ry).push_back(plotted(row));
  }
  c.series.push_back(svg::points("feasible", "Within the constraints", fx, fy, svg::in_slot(0)));
  c.series.push_back(svg::points("rejected", "Ruled out", rx, ry, svg::in_slot(2, svg::Marker::cross)));
  if (!res.rows.empty() && plotted(res.winner()))
    c.series.push_back(svg::annotation("winner", (res.winner().feasible() ? "best: " : "least bad: ") + ohms(res.winner().r_fixed),
                                       res.winner().r_fixed, *plotted(res.winner())));
  // Far-off values (a resistor a hundred times too small) would flatten the
  // region that matters; the axis stops at a few times the limit and the
  // caption says so. Clipped points stay in the chart's data.
  std::string clipped;
  if (!maximised(res.objective)) {
    double top = 0.0, best = 0.0;
    for (const auto& row : res.rows)
      if (auto v = plotted(row)) top = std::max(top, *v);
    if (!res.rows.empty() && plotted(res.winner())) best = *plotted(res.winner());
    const double cap = std::max(2.5 * design.requirement.max_error, 1.5 * best);
    if (top > cap && cap > 0.0) {
      c.y.min = 0.0;
      c.y.max = cap;
      clipped = " Values above " + kelvin(cap) + " are off the top of the chart.";
    }
  }
  std::vector<Figure> f;
  f.push_back({"pick-candidates.svg",
               "The ranked candidates: " + page_objective_phrase(res.objective) +
                   (maximised(res.objective) ? " (higher is better)" : " (lower is better)") +
                   " against the resistor's value on a log axis; hatched values are ruled out." + clipped,
               std::move(c)});
  return f;
}

std::string pick_report_html(const Design& d, const Scenario& scenario, const PickResult& res, const PickOptions& o,
                             const std::string& source) {
  const auto figures = pick_figures(d, res);
  HtmlDocument doc("Resistor pick: " + d.title);
  doc.paragraph("thermargin " + std::string(version) + " pick for " +
                (source.empty() ? std::string("the built-in default design") : "scenario " + source) + ": " +
                std::to_string(res.candidates) + " candidates (" + res.candidates_label +
                (res.pair_search ? ", fixed and parallel resistor pairs" : "") + "), ranked by the " +
                page_objective_phrase(res.objective) + " over the window " + num(res.window_min, 1) + " to " +
                num(res.window_max, 1) + " \u00b0C; " + std::to_string(res.within_constraints) +
                " meet every constraint. Fixed-resistor grade " + format_quantity(res.tolerance, Quantity::ratio, 3) +
                ", " + format_quantity(res.tempco, Quantity::tempco, 3) + ".");
  if (res.rows.empty()) {
    doc.verdict(Badge::fail, "No candidate was ranked.");
  } else {
    const PickRow& w = res.winner();
    const bool readable = plotted(w).has_value();
    const bool meets = readable && w.feasible() && (maximised(res.objective) || w.objective <= d.requirement.max_error);
    std::string detail;
    if (!w.feasible()) {
      detail = "No candidate meets every condition; least bad: " + candidate(res, w) + ", ruled out by " +
               join(w.rejected_by, ", ") + ".";
    } else {
      detail = "Best: " + candidate(res, w) + " \u2014 " + page_objective_phrase(res.objective) + " " +
               page_objective_value(res.objective, w.objective) + " over the window";
      if (res.margin && res.rows.size() >= 2)
        detail += ", " + page_objective_value(res.objective, *res.margin) +
                  (maximised(res.objective) ? " more than " : " better than ") + candidate(res, res.rows[1]);
      if (!maximised(res.objective))
        detail += w.objective <= d.requirement.max_error ? "; within the requirement of \u00b1" + kelvin(d.requirement.max_error)
                                                         : "; outside the requirement of \u00b1" + kelvin(d.requirement.max_error);
      detail += ".";
    }
    doc.verdict(meets ? Badge::pass : Badge::fail, detail);
  }
  doc.caution(caution);
  if (const std::string note = rtd_class_range_note(d); !note.empty()) doc.paragraph("RTD class: " + note + ".");

  doc.heading("Candidates");
  doc.chart(figures[0].chart, "Figure 1. " + figures[0].caption);
  std::vector<std::string> constraints;
  const auto& c = o.constraints;
  if (c.max_self_heating) constraints.push_back("self-heating \u2264 " + kelvin(*c.max_self_heating, 4));
  if (c.max_current) constraints.push_back("current \u2264 " + format_quantity(*c.max_current, Quantity::current, 3));
  if (c.max_power) constraints.push_back("power \u2264 " + num(*c.max_power * 1e3, 3) + " mW");
  if (c.min_span) constraints.push_back("ADC span used \u2265 " + pct(*c.min_span, 1));
  if (c.min_sensitivity) constraints.push_back("sensitivity \u2265 " + num(*c.min_sensitivity, 3) + " LSB/K");
  if (c.settles) constraints.push_back("settles to \u00bd LSB");
  doc.paragraph("Constraints: " + (constraints.empty() ? std::string("none") : join(constraints, "; ")) + ".");

  Table t;
  t.caption = "Ranking, best first";
  t.header = {"#", "R fixed"};
  if (res.pair_search) t.header.push_back("R parallel");
  // The columns a reviewer compares; series and dominant source are in the
  // CLI's tables (a wider table would not fit a printed page).
  t.header.insert(t.header.end(), {"Worst case (K)", "Linear (K)"});
  if (res.objective == Objective::monte_carlo) t.header.push_back("MC band (K)");
  t.header.insert(t.header.end(), {"Min LSB/K", "Self-heating (K)", "Current", "ADC span", "Ruled out by"});
  auto opt = [](const std::optional<double>& v) { return v ? num(*v, 4) : std::string("n/a"); };
  for (std::size_t i = 0; i < res.rows.size(); ++i) {
    const PickRow& w = res.rows[i];
    std::vector<std::string> row{std::to_string(i + 1), ohms(w.r_fixed)};
    if (res.pair_search) row.push_back(w.r_parallel ? ohms(*w.r_parallel) : "none");
    row.insert(row.end(), {opt(w.wc_max_abs), opt(w.rss_max_abs)});
    if (res.objective == Objective::monte_carlo) row.push_back(opt(w.mc_max_abs));
    row.insert(row.end(), {num(w.min_sensitivity, 2), num(w.max_self_heating, 4),
                           format_quantity(w.max_current, Quantity::current, 3), pct(w.span, 1),
                           join(w.rejected_by, ", ")});
    t.rows.push_back(std::move(row));
  }
  doc.table(std::move(t));

  if (o.guidance) {
    doc.heading("Guidance");
    doc.paragraph("Analytic values for the objective alone (the constraints are not applied), with the candidates "
                  "either side of each.");
    Table g;
    g.header = {"What", "R", "Objective there", "Below", "Above"};
    auto side = [&](const std::optional<double>& r, const std::optional<double>& obj) {
      if (!r) return std::string("none");
      return ohms(*r) + " (" + (obj ? page_objective_value(res.objective, *obj) : std::string("not readable")) + ")";
    };
    auto add = [&](const std::string& what, const GuidanceValue& v) {
      g.rows.push_back({what, v.r ? ohms(*v.r) : "none", v.objective ? page_objective_value(res.objective, *v.objective) : "",
                        side(v.below, v.below_objective), side(v.above, v.above_objective)});
    };
    const Guidance& gd = res.guidance;
    add("Continuous optimum (" + std::to_string(gd.evaluations) + " evaluations)", gd.optimum);
    add("Largest sensitivity at " + num(gd.t_centre, 1) + " \u00b0C", gd.max_sensitivity);
    add("Three-point linearisation", gd.linearising);
    doc.table(std::move(g));
  }
  add_resolved_inputs(doc, d, scenario);
  doc.caution(caution);
  return doc.str();
}

}  // namespace thermargin
