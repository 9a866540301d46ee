#include "thermargin/report/response_report.hpp"

#include <nlohmann/json.hpp>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>

#include "report/json_fields.hpp"
#include "thermargin/chain/rtd_class_range.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/report/csv_preamble.hpp"
#include "thermargin/core/text.hpp"
#include "thermargin/report/table.hpp"  // render_csv

namespace thermargin {
namespace {

std::string printed(const char* format, double v) {
  std::string s = printf_number(format, v);
  if (s.starts_with("-") && s.find_first_not_of("-0.") == std::string::npos) s = s.substr(1);  // no "-0.000"
  return s;
}

std::string series_name(const Filter& f) {
  switch (f.kind) {
    case FilterKind::none: return "none";
    case FilterKind::moving_average: return "moving-average-" + std::to_string(f.length);
    case FilterKind::exponential: return "exponential-" + printed("%.6g", f.alpha);
  }
  return "none";
}

std::string settings_sentence(const ResponseAnalysis& a) {
  const ResponseSettings& s = a.settings;
  std::ostringstream o;
  o << "Sensor time constant " << printed("%.4g", s.time_constant) << " s +/- " << printed("%.3g", 100 * s.time_constant_tol)
    << " % (the slowest, " << printed("%.4g", s.time_constant_max()) << " s, is used); a reading every "
    << printed("%.4g", s.reading_period) << " s; the scenario's filter: " << describe(s.filter) << ".\n"
    << "Ramp " << printed("%.4g", s.ramp_per_minute()) << " K/min (either direction); step " << printed("%.4g", s.step)
    << " K, settled within " << printed("%.4g", s.settle_to) << " K. Requirement +/-" << printed("%.3f", a.limit) << " K over "
    << printed("%.2f", a.window_min) << " .. " << printed("%.2f", a.window_max) << " degC.\n"
    << "Static worst case over the window " << printed("%.3f", a.static_wc_max_abs)
    << " K (thermargin budget), of which the noise of an unfiltered reading is up to +/-"
    << printed("%.4f", a.noise_band_unfiltered) << " K.\n";
  return o.str();
}

// A plain aligned table: the first column left, the others right.
std::string aligned(const std::vector<std::vector<std::string>>& rows) {
  std::vector<std::size_t> w;
  for (const auto& r : rows)
    for (std::size_t i = 0; i < r.size(); ++i) {
      if (w.size() <= i) w.push_back(0);
      w[i] = std::max(w[i], r[i].size());
    }
  std::ostringstream o;
  for (std::size_t k = 0; k < rows.size(); ++k) {
    for (std::size_t i = 0; i < rows[k].size(); ++i) {
      const std::string& c = rows[k][i];
      const std::string pad(w[i] - c.size(), ' ');
      o << (i ? "  " : "") << (i == 0 ? c + pad : pad + c);
    }
    o << "\n";
    if (k == 0) {
      std::size_t total = 0;
      for (auto x : w) total += x + 2;
      o << std::string(total - 2, '-') << "\n";
    }
  }
  return o.str();
}

std::vector<std::string> row_cells(const ResponseAnalysis& a, std::size_t i) {
  const ResponseRow& r = a.rows[i];
  std::string mark = r.chosen ? "*" : "";
  if (a.recommended && *a.recommended == i) mark += ">";
  return {mark + describe(r.filter), printed("%.3f", r.delay_s), printed("%.3f", r.ramp_error), printed("%.4g", r.settling_s),
          printed("%.4f", r.noise_factor), printed("%.4f", r.noise_band), printed("%.3f", r.static_max_abs),
          r.readable ? printed("%.3f", r.total_max_abs) : "unreadable", printed("%.3f", r.margin), r.meets ? "yes" : "no"};
}

nlohmann::json row_json(const ResponseRow& r) {
  nlohmann::json j{{"filter", kind_word(r.filter.kind)}};
  if (r.filter.kind == FilterKind::moving_average) j["length"] = r.filter.length;
  if (r.filter.kind == FilterKind::exponential) j["alpha"] = r.filter.alpha;
  j["label"] = describe(r.filter);
  j["chosen"] = r.chosen;
  j["delay_s"] = r.delay_s;
  j["lag_s"] = r.lag_s;
  j["ramp_error"] = r.ramp_error;
  j["settling_s"] = r.settling_s;
  j["settling_readings"] = r.settling_readings;
  j["noise_factor"] = r.noise_factor;
  j["noise_band"] = r.noise_band;
  j["static_max_abs"] = r.static_max_abs;
  j["total_max_abs"] = r.readable ? nlohmann::json(r.total_max_abs) : nlohmann::json(nullptr);
  j["total_at"] = r.total_at;
  j["margin"] = r.margin;
  j["readable"] = r.readable;
  j["meets"] = r.meets;
  return j;
}

}  // namespace

std::string response_text(const Design& d, const ResponseAnalysis& a) {
  std::ostringstream o;
  o << "thermargin response - " << d.title << "\n\n";
  o << (a.recommended ? "RECOMMENDATION: " : "NO FILTER MEETS THE REQUIREMENT: ") << recommendation_text(a) << "\n\n";
  o << settings_sentence(a) << "\n";
  // The static worst case reads the RTD class beyond its rated range: say so (docs/model.md §1).
  if (const std::string note = rtd_class_range_note(d); !note.empty()) o << "RTD class: " << note << ".\n";
  std::vector<std::vector<std::string>> rows{{"filter", "delay (s)", "ramp error (K)", "settling (s)", "noise factor",
                                              "noise band (K)", "static (K)", "total (K)", "margin (K)", "meets"}};
  for (std::size_t i = 0; i < a.rows.size(); ++i) rows.push_back(row_cells(a, i));
  o << aligned(rows);
  o << "(* the scenario's filter; > the recommendation)\n"
       "delay: the filter's lag on a ramp, (N-1)/2 or (1-alpha)/alpha readings; ramp error: ramp x (time constant + "
       "delay);\nsettling: after the step, from the reading at the step until every later reading is within "
       "settle_to;\nnoise band: the budget's noise half-width times the filter's factor (1/sqrt(N), "
       "sqrt(alpha/(2-alpha)));\nstatic: the window's worst case with that noise; total: static + ramp error, against "
       "the limit.\n\n"
    << caution << "\n";
  return o.str();
}

std::string response_csv(const Design& design, const ResponseAnalysis& a) {
  Table t{.header = {"filter", "length", "alpha", "chosen", "recommended", "delay_s", "lag_s", "ramp_error_K", "settling_s",
                     "settling_readings", "noise_factor", "noise_band_K", "static_max_abs_K", "total_max_abs_K",
                     "total_at_degC", "margin_K", "meets"}};
  for (std::size_t i = 0; i < a.rows.size(); ++i) {
    const ResponseRow& r = a.rows[i];
    auto g = [](double v) { return printed("%.10g", v); };
    t.rows.push_back({std::string(kind_word(r.filter.kind)),
                      r.filter.kind == FilterKind::moving_average ? std::to_string(r.filter.length) : "",
                      r.filter.kind == FilterKind::exponential ? g(r.filter.alpha) : "", r.chosen ? "1" : "0",
                      a.recommended && *a.recommended == i ? "1" : "0", g(r.delay_s), g(r.lag_s), g(r.ramp_error),
                      g(r.settling_s), std::to_string(r.settling_readings), g(r.noise_factor), g(r.noise_band),
                      g(r.static_max_abs), r.readable ? g(r.total_max_abs) : "", g(r.total_at), g(r.margin),
                      r.meets ? "1" : "0"});
  }
  return csv_preamble(design) + render_csv(t);
}

std::string response_json(const Design& d, const ResponseAnalysis& a) {
  const ResponseSettings& s = a.settings;
  nlohmann::json j;
  j["command"] = "response";
  j["title"] = d.title;
  j["units"] = {{"time", "s"}, {"error", "K"}, {"ramp", "K/min"}, {"temperature", "degC"}};
  j["settings"] = {{"time_constant", s.time_constant},
                   {"time_constant_tol", s.time_constant_tol},
                   {"time_constant_max", s.time_constant_max()},
                   {"reading_period", s.reading_period},
                   {"filter", row_json(a.rows[a.chosen])["filter"]},
                   {"ramp", s.ramp_per_minute()},
                   {"step", s.step},
                   {"settle_to", s.settle_to}};
  j["requirement"] = {{"limit", a.limit}, {"window_min", a.window_min}, {"window_max", a.window_max}};
  j["static_wc_max_abs"] = a.static_wc_max_abs;
  j["noise_band_unfiltered"] = a.noise_band_unfiltered;
  j["rows"] = nlohmann::json::array();
  for (const ResponseRow& r : a.rows) j["rows"].push_back(row_json(r));
  j["recommendation"] = a.recommended ? row_json(a.rows[*a.recommended]) : nlohmann::json(nullptr);
  j["recommendation_text"] = recommendation_text(a);
  if (!a.recommended) {
    const WhatWouldMeet& w = a.what_would;
    auto opt = [](const auto& v) { return json_fields::optional(v); };
    auto filter_of = [&](const auto& v, std::size_t row) {
      return v ? nlohmann::json(describe(a.rows[row].filter)) : nlohmann::json(nullptr);
    };
    j["what_would_meet"] = {{"static_alone_exceeds", w.static_alone_exceeds},
                            {"unreadable", w.unreadable},
                            {"ramp", opt(w.ramp_per_minute)},
                            {"ramp_filter", filter_of(w.ramp_per_minute, w.ramp_row)},
                            {"time_constant", opt(w.time_constant)},
                            {"time_constant_filter", filter_of(w.time_constant, w.time_constant_row)},
                            {"averaging", opt(w.averaging)}};
  }
  if (const std::string note = rtd_class_range_note(d); !note.empty()) j["rtd_class_note"] = note;
  j["caution"] = std::string(caution);
  return j.dump(2) + "\n";
}

std::string dynamic_error_line(const ResponseSettings& s) {
  const double dyn = dynamic_error(s);
  std::ostringstream o;
  o << "Dynamic error at the stated ramp of " << printed("%.4g", s.ramp_per_minute()) << " K/min ([response]: time constant "
    << printed("%.4g", s.time_constant_max()) << " s at its slowest, " << describe(s.filter) << " every "
    << printed("%.4g", s.reading_period) << " s): " << printed("%.3f", dyn) << " K, "
    << (s.include_dynamic ? "added to the verdict (requirement.include_dynamic = true)"
                          : "not in the verdict (requirement.include_dynamic = false)")
    << "; thermargin response compares filters.";
  return o.str();
}

namespace {

// The readings drawn: at most about 500 per curve (every stride-th reading).
struct Timeline {
  std::size_t count = 0, stride = 1;
  double period = 1.0;
  std::vector<double> times() const {
    std::vector<double> t;
    for (std::size_t k = 0; k < count; k += stride) t.push_back(static_cast<double>(k) * period);
    return t;
  }
  svg::Values pick(const std::vector<double>& v) const {
    svg::Values out;
    for (std::size_t k = 0; k < count; k += stride) out.push_back(v[k]);
    return out;
  }
};

Timeline timeline(double duration, double period) {
  Timeline t;
  t.period = period;
  const double readings = std::min(std::ceil(duration / period) + 1.0, 400000.0);
  t.count = static_cast<std::size_t>(std::max(readings, 2.0));
  t.stride = std::max<std::size_t>(1, (t.count + 499) / 500);
  return t;
}

std::string legend(const ResponseAnalysis& a, std::size_t i) {
  return describe(a.rows[i].filter) + (a.rows[i].chosen ? " (the scenario's)" : "");
}

// The chart both pictures share: before it `first` (the step's band), then
// the medium, the sensor element and the reported temperature of each shown
// filter, every stride-th reading of `tl`.
svg::Chart response_chart(const ResponseAnalysis& a, const std::vector<std::size_t>& shown, const Timeline& tl,
                          const std::vector<double>& medium, const std::vector<double>& sensor, std::vector<svg::Series> first) {
  svg::Chart c;
  c.y.label = "Temperature change (K)";
  const auto t = tl.times();
  c.series = std::move(first);
  c.series.push_back(svg::line("medium", "medium (true)", t, tl.pick(medium), svg::in_slot(0)));
  c.series.push_back(svg::line("sensor", "sensor element", t, tl.pick(sensor), svg::in_slot(1)));
  int n = 2;
  for (std::size_t i : shown)
    c.series.push_back(svg::line(series_name(a.rows[i].filter), legend(a, i), t,
                                 tl.pick(apply_filter(a.rows[i].filter, sensor)), svg::in_slot(n++)));
  return c;
}

// The largest of one figure of the rows shown: how long a picture must run.
double largest_of(const ResponseAnalysis& a, const std::vector<std::size_t>& shown, double ResponseRow::*figure) {
  double m = 0.0;
  for (std::size_t i : shown) m = std::max(m, a.rows[i].*figure);
  return m;
}

Figure ramp_figure(const ResponseAnalysis& a, const std::vector<std::size_t>& shown) {
  const ResponseSettings& s = a.settings;
  const Timeline tl = timeline(4.0 * largest_of(a, shown, &ResponseRow::lag_s) + 10.0 * s.reading_period, s.reading_period);
  const double tau = s.time_constant_max();
  std::vector<double> medium(tl.count);
  for (std::size_t k = 0; k < tl.count; ++k) medium[k] = s.ramp * static_cast<double>(k) * s.reading_period;
  svg::Chart c = response_chart(a, shown, tl, medium, sensor_on_ramp(tau, s.reading_period, s.ramp, tl.count), {});
  c.title = "Following a ramp of " + printed("%.4g", s.ramp_per_minute()) + " K/min";
  c.x.label = "Time since the ramp began (s)";
  c.description = "The medium's temperature, the sensor's own (time constant " + printed("%.4g", tau) +
                  " s) and the reported temperature at each reading for the scenario's filter and its neighbours.";
  return {"response-ramp.svg",
          "The reported temperature lags the ramp by the ramp times (time constant + the filter's delay) once the "
          "transients have passed: " + printed("%.3f", a.rows[a.chosen].ramp_error) + " K for the scenario's filter.",
          std::move(c)};
}

Figure step_figure(const ResponseAnalysis& a, const std::vector<std::size_t>& shown) {
  const ResponseSettings& s = a.settings;
  const Timeline tl =
      timeline(1.3 * largest_of(a, shown, &ResponseRow::settling_s) + 5.0 * s.reading_period, s.reading_period);
  const double tau = s.time_constant_max();
  svg::Chart c = response_chart(a, shown, tl, std::vector<double>(tl.count, s.step),
                                sensor_after_step(tau, s.reading_period, s.step, tl.count),
                                {svg::reference("settle_band", "step \u00b1 " + printed("%.4g", s.settle_to) + " K",
                                                {s.step - s.settle_to, s.step + s.settle_to})});
  c.title = "Settling after a step of " + printed("%.4g", s.step) + " K";
  c.x.label = "Time since the step (s)";
  c.description = "The reported temperature after the medium steps at a reading, for the scenario's filter and its "
                  "neighbours; the band is the step +/- settle_to.";
  const ResponseRow& own = a.rows[a.chosen];
  c.series.push_back(svg::annotation("settled", "settled: " + printed("%.4g", own.settling_s) + " s", own.settling_s,
                                     s.step - step_error(tau, s.reading_period, own.filter, s.step, own.settling_readings)));
  return {"response-step.svg",
          "After a step the scenario's filter is within " + printed("%.4g", s.settle_to) + " K of the new temperature from " +
              printed("%.4g", own.settling_s) + " s on (the slowest sensor of the tolerance).",
          std::move(c)};
}

}  // namespace

std::vector<Figure> response_figures(const ResponseAnalysis& a) {
  const std::vector<std::size_t> shown = pictured_rows(a);
  std::vector<Figure> f;
  if (a.settings.ramp > 0.0) f.push_back(ramp_figure(a, shown));
  f.push_back(step_figure(a, shown));
  return f;
}

std::string response_report_html(const Design& d, const Scenario& scenario, const ResponseAnalysis& a,
                                  const std::string& source) {
  using report::kelvin;
  HtmlDocument doc("Response: " + d.title);
  doc.paragraph("thermargin " + std::string(version) + " response for " +
                (source.empty() ? std::string("the built-in default design") : "scenario " + source) + ".");
  const ResponseRow& own = a.rows[a.chosen];
  doc.verdict(own.meets ? Badge::pass : Badge::fail,
              "The scenario's filter (" + describe(own.filter) + "): total " + kelvin(own.total_max_abs) +
                  (own.meets ? " within " : " outside ") + "\u00b1" + kelvin(a.limit) + ". " +
                  (a.recommended ? "Recommended: " : "") + recommendation_text(a));
  doc.caution(caution);
  doc.preformatted(settings_sentence(a));
  if (const std::string note = rtd_class_range_note(d); !note.empty()) doc.paragraph("RTD class: " + note + ".");
  const auto figures = response_figures(a);
  int n = 0;
  for (const Figure& f : figures) {
    doc.heading(f.file == "response-ramp.svg" ? "Following a ramp" : "Settling after a step");
    doc.chart(f.chart, "Figure " + std::to_string(++n) + ". " + f.caption);
  }
  if (a.settings.ramp == 0.0) doc.paragraph("No ramp is stated (response.ramp = 0): there is no ramp to picture.");
  Table t;
  t.caption = "Every filter compared (* the scenario's, > the recommendation)";
  t.header = {"Filter", "Delay (s)", "Ramp error (K)", "Settling (s)", "Noise factor", "Noise band (K)", "Static (K)",
              "Total (K)", "Margin (K)", "Meets"};
  for (std::size_t i = 0; i < a.rows.size(); ++i) t.rows.push_back(row_cells(a, i));
  doc.table(t);
  doc.paragraph("Closed forms (textbook discrete-time signal processing; first-order response, common practice): the "
                "ramp error is the ramp times (time constant + D), D = (N \u2212 1)/2 readings for a moving average and "
                "(1 \u2212 \u03b1)/\u03b1 for the exponential filter; the filter scales the noise by 1/\u221aN or "
                "\u221a(\u03b1/(2 \u2212 \u03b1)); the settling time is solved exactly from the same sampled model.");
  add_resolved_inputs(doc, d, scenario);
  doc.caution(caution);
  return doc.str();
}

}  // namespace thermargin
