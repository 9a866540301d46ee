// The picker's options as read from the command line (picker.hpp): the
// candidate range and values, the series, the objective, the grade and the
// constraints' limits. Each bad value is one input_error naming the option.
// Then the options checked together with the scenario, and the run's
// context made from them (picker_internal.hpp).
#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "picker_internal.hpp"

#include "thermargin/core/error.hpp"
#include "thermargin/core/number.hpp"
#include "thermargin/tools/picker.hpp"
#include "thermargin/core/parallel.hpp"
#include "thermargin/tools/series.hpp"

namespace thermargin {

ResistanceRange parse_range(std::string_view text, const Where& where) {
  const auto dots = text.find("..");
  if (dots == std::string_view::npos)
    reject(where, text, "must be LOW..HIGH in ohms, engineering notation (e.g. 1k..1M)");
  ResistanceRange r;
  r.low = parse_quantity(text.substr(0, dots), Quantity::resistance, where);
  r.high = parse_quantity(text.substr(dots + 2), Quantity::resistance, where);
  if (!(r.low > 0.0 && r.high > r.low)) reject(where, text, "must be LOW..HIGH with 0 < LOW < HIGH (e.g. 1k..1M)");
  return r;
}

std::vector<double> parse_values(std::string_view text, const Where& where) {
  std::vector<double> out;
  std::size_t start = 0;
  for (;;) {
    const auto comma = text.find(',', start);
    const std::string_view item = text.substr(start, comma == std::string_view::npos ? std::string_view::npos : comma - start);
    const double v = parse_quantity(item, Quantity::resistance, where);
    if (!(v > 0.0)) reject(where, text, "every value must be a resistance > 0 (e.g. 4k7,10k,22k)");
    out.push_back(v);
    if (comma == std::string_view::npos) break;
    start = comma + 1;
  }
  return out;
}

Series parse_series(std::string_view text, const Where& where) {
  const auto s = series_from_name(text);
  if (!s) reject(where, text, "must be one of: " + std::string(series_names()));
  return *s;
}

Objective parse_objective(std::string_view text, const Where& where) {
  const auto o = objective_from_name(text);
  if (!o) reject(where, text, "must be one of: " + std::string(objective_names()));
  return *o;
}

Grade parse_grade(std::string_view text, const Where& where) {
  Grade g;
  const auto comma = text.find(',');
  g.series = text.substr(0, comma) == "series";
  if (!g.series) {
    try {
      g.tolerance = parse_quantity(text.substr(0, comma), Quantity::ratio, where);
    } catch (const input_error&) {
      reject(where, text, "expected a fraction such as 0.1% (then optionally a tempco: 0.1%,25ppm), or 'series' for the "
                          "tolerance IEC 60063 pairs with the series (series,25ppm)");
    }
  }
  if (!(g.tolerance >= 0.0 && g.tolerance < 1.0))
    reject(where, text, "the tolerance must be from 0 up to (not including) 100 % (e.g. 0.1% or 0.1%,25ppm)");
  if (comma != std::string_view::npos) {
    g.tempco = parse_quantity(text.substr(comma + 1), Quantity::tempco, where);
    if (!(*g.tempco >= 0.0 && *g.tempco < 0.01))
      reject(where, text, "the tempco must be from 0 up to (not including) 10000 ppm/K (e.g. 0.1%,25ppm)");
  }
  return g;
}

double parse_limit(std::string_view text, Quantity q, const Where& where) {
  const double v = parse_quantity(text, q, where);
  if (!(v > 0.0)) reject(where, text, "must be > 0");
  return v;
}

namespace picker_detail {

namespace {

std::uint64_t default_units(const Design& d, std::uint64_t requested, std::uint64_t cap) {
  if (requested > 0) return requested;
  return d.montecarlo.units == 0 ? cap : std::min(d.montecarlo.units, cap);
}

void check_options(const PickOptions& o) {
  if (o.values.empty()) {
    if (!(o.range_low > 0.0 && o.range_high > o.range_low && std::isfinite(o.range_high)))
      reject(command_line("--range"), ohms(o.range_low) + ".." + ohms(o.range_high),
             "must be LOW..HIGH with 0 < LOW < HIGH, in ohms (engineering notation, e.g. 1k..1M)");
  } else {
    for (double v : o.values)
      if (!(v > 0.0 && std::isfinite(v))) reject(command_line("--values"), number_text(v), "every value must be a resistance > 0");
  }
  if (o.series_grade && !o.tolerance && !o.values.empty())
    reject(command_line("--grade"), "series", "needs candidates from a series (--series, --range), not --values; give TOL[,TEMPCO] instead");
  if (o.top < 1) reject(command_line("--top"), std::to_string(o.top), "must be a whole number >= 1");
  if (o.verify < 0) reject(command_line("--verify"), std::to_string(o.verify), "must be a whole number >= 0");
  if (o.tolerance && !(*o.tolerance >= 0.0 && *o.tolerance < 1.0))
    reject(command_line("--grade"), number_text(*o.tolerance), "the tolerance must be from 0 up to (not including) 100 %");
  if (o.tempco && !(*o.tempco >= 0.0 && *o.tempco < 0.01))
    reject(command_line("--grade"), number_text(*o.tempco), "the tempco must be from 0 up to (not including) 10000 ppm/K");
  const auto positive = [](const std::optional<double>& v, const char* name, const char* unit) {
    if (v && !(*v > 0.0 && std::isfinite(*v))) reject(command_line(name), number_text(*v), std::string("must be > 0 ") + unit);
  };
  positive(o.constraints.max_self_heating, "--max-self-heating", "(K)");
  positive(o.constraints.max_current, "--max-current", "(A)");
  positive(o.constraints.max_power, "--max-power", "(W)");
  positive(o.constraints.min_span, "--min-span", "(a fraction of the ADC span, up to 1)");
  positive(o.constraints.min_sensitivity, "--min-sensitivity", "(LSB/K)");
  if (o.constraints.min_span && *o.constraints.min_span > 1.0)
    reject(command_line("--min-span"), number_text(*o.constraints.min_span), "must be a fraction of the ADC span, at most 1 (100 %)");
}

}  // namespace

Context make_context(const Scenario& scenario, const PickOptions& options) {
  check_options(options);
  Context ctx;
  ctx.options = options;
  ctx.base = scenario;
  ctx.pair = options.parallel;
  int given_threads = 0;
  {
    // Validate the scenario as given before changing it, so that its own
    // mistakes are reported against its own keys.
    const Design given = build_design(scenario);
    given_threads = given.threads_or_scenario(options.threads);
    const Where grade = command_line("--grade");
    if (!options.tolerance && options.series_grade) ctx.options.tolerance = series_tolerance(options.series);
    const std::optional<double>& tolerance = ctx.options.tolerance;
    if (tolerance) ctx.base.set("divider.r_fixed_tol", number_text(*tolerance), grade);
    if (options.tempco) ctx.base.set("divider.r_fixed_tempco", number_text(*options.tempco), grade);
    if (options.parallel) {
      // The parallel resistor's tolerance: the grade's, else the scenario's,
      // else (no parallel resistor in the scenario) the fixed resistor's.
      const double tol = tolerance ? *tolerance
                         : given.divider.r_parallel ? given.divider.r_parallel_tol
                                                    : given.divider.r_fixed_tol;
      ctx.base.set("divider.r_parallel", "1k", grade);  // a placeholder; every candidate sets its own
      ctx.base.set("divider.r_parallel_tol", number_text(tol), grade);
    }
  }
  // The engines run single-threaded inside the picker (each call says so),
  // which spreads candidates (or temperatures) over the threads itself.
  ctx.design = build_design(ctx.base);
  const Design& d = ctx.design;
  ctx.range = d.conditions.temperatures();
  ctx.window = window_temperatures(d.requirement, ctx.range);
  // The pre-screen's temperatures (pre_screen): the window's ends and its
  // middle, where a divider's error is usually largest.
  if (!ctx.window.empty())
    for (std::size_t i : {std::size_t{0}, ctx.window.size() / 2, ctx.window.size() - 1})
      if (ctx.sample.empty() || ctx.sample.back() != ctx.window[i]) ctx.sample.push_back(ctx.window[i]);
  ctx.threads = resolve_threads(given_threads);
  ctx.mc_objective_units = default_units(d, options.mc_units, mc_objective_cap);
  ctx.mc_verify_units = default_units(d, options.mc_units, mc_verify_cap);
  if (options.values.empty()) {
    ctx.values = series_values(options.series, options.range_low, options.range_high);
    if (ctx.values.empty())
      reject(command_line("--range"), ohms(options.range_low) + ".." + ohms(options.range_high),
             "holds no " + std::string(to_string(options.series)) + " value; widen the range or choose a finer series");
  } else {
    ctx.values = options.values;
    std::sort(ctx.values.begin(), ctx.values.end());
    ctx.values.erase(std::unique(ctx.values.begin(), ctx.values.end()), ctx.values.end());
  }
  return ctx;
}

}  // namespace picker_detail

}  // namespace thermargin
