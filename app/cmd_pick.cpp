// `thermargin pick`: rank preferred fixed-resistor values for a scenario by
// an objective over the requirement window, under optional constraints,
// with the analytic guidance beside the ranking (picker.hpp).
#include <nlohmann/json.hpp>
#include <cmath>
#include <cstdio>
#include <sstream>

#include <unistd.h>

#include "cli.hpp"
#include "commands.hpp"
#include "thermargin/report/pick_output.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/report/pick_report.hpp"
#include "thermargin/tools/picker.hpp"

namespace thermargin::cli {

namespace {

// A unit written after a number that the number reader does not know for
// that quantity ("5mW", "2LSB/K"): removed before reading.
std::string without_suffix(std::string text, const std::string& suffix) {
  while (!text.empty() && text.back() == ' ') text.pop_back();
  if (text.size() > suffix.size() && text.ends_with(suffix)) text.resize(text.size() - suffix.size());
  return text;
}

int whole(const po::variables_map& vm, const char* name) {
  const std::string key = std::string("--") + name;
  const Where w = command_line(key.c_str());
  const std::string text = vm[name].as<std::string>();
  const double v = parse_quantity(text, Quantity::integer, w);
  if (v < 0.0 || v > 1e6) reject(w, text, "must be a whole number from 0 to 1000000");
  return static_cast<int>(v);
}

}  // namespace

int run_pick(int argc, char** argv) {
  po::options_description own("pick options");
  own.add_options()("series", po::value<std::string>()->default_value("e96"), "preferred-number series: e12 | e24 | e48 | e96 | e192")(
      "range", po::value<std::string>()->default_value("1k..1M"), "candidate values LOW..HIGH in ohms (engineering notation)")(
      "values", po::value<std::string>(), "explicit candidates instead of a series, e.g. 4k7,10k,22k")(
      "objective", po::value<std::string>()->default_value("worst-case"),
      "worst-case | linear | monte-carlo (smallest max |error| over the window) | sensitivity (largest min LSB/K)")(
      "grade", po::value<std::string>(), "TOL[,TEMPCO] of the resistors picked, e.g. 0.1%,25ppm; 'series' for the tolerance IEC 60063 pairs with the "
      "series (E96: 1%) (default: the scenario's)")(
      "max-self-heating", po::value<std::string>(), "limit on the nominal self-heating anywhere in the range, K")(
      "max-current", po::value<std::string>(), "limit on the divider current while powered, anywhere in the range, A")(
      "max-power", po::value<std::string>(), "limit on the power the divider draws while powered, W")(
      "min-span", po::value<std::string>(), "smallest share of the ADC span the window must use, e.g. 50%")(
      "min-sensitivity", po::value<std::string>(), "smallest ADC sensitivity over the window, LSB/K")(
      "settles", "the reading settles to within 1/2 LSB over the window (with adc.c_sample > 0)")(
      "parallel", "also pick a resistor across the sensor branch (pairs; see docs/pick.md)")(
      "top", po::value<std::string>()->default_value("10"), "rows shown, best first")(
      "verify", po::value<std::string>()->default_value("0"), "re-check this many of the top rows by Monte Carlo")(
      "mc-units", po::value<std::string>(), "Monte Carlo units per candidate (default: montecarlo.units, at most 2000 for "
                                            "the objective, 10000 for --verify)")(
      "no-guidance", "skip the continuous optimum and the analytic values");
  if (help_requested("pick", argc, argv, "[FILE] [options]", own, true, true)) return 0;
  const Invocation inv = parse("pick", argc, argv, own, true, true);
  const po::variables_map& vm = inv.vm;

  PickOptions o;
  if (vm.count("values")) {
    for (const char* other : {"range", "series"})
      if (!vm[other].defaulted())
        reject(command_line((std::string("--") + other).c_str()), vm[other].as<std::string>(),
               "cannot be combined with --values (explicit candidates replace the series and the range)");
    o.values = parse_values(vm["values"].as<std::string>(), command_line("--values"));
  } else {
    o.series = parse_series(vm["series"].as<std::string>(), command_line("--series"));
    const ResistanceRange range = parse_range(vm["range"].as<std::string>(), command_line("--range"));
    o.range_low = range.low;
    o.range_high = range.high;
  }
  o.objective = parse_objective(vm["objective"].as<std::string>(), command_line("--objective"));
  if (vm.count("grade")) {
    const Grade g = parse_grade(vm["grade"].as<std::string>(), command_line("--grade"));
    if (g.series) o.series_grade = true;
    else o.tolerance = g.tolerance;
    o.tempco = g.tempco;
  }
  auto limit = [&](const char* name, Quantity q, const char* unit) -> std::optional<double> {
    if (!vm.count(name)) return std::nullopt;
    const std::string key = std::string("--") + name;
    const std::string text = vm[name].as<std::string>();
    const std::string bare = without_suffix(text, unit);
    const Where w = command_line(key.c_str());
    // The bare number is read; a message shows what was written.
    try {
      return parse_limit(bare, q, w);
    } catch (const input_error&) {
      reject(w, text, std::string("must be a number > 0") + (*unit ? std::string(", optionally followed by ") + unit : "") +
                          " (engineering notation, e.g. " + (q == Quantity::ratio ? "50%" : "5m") + ")");
    }
  };
  o.constraints.max_self_heating = limit("max-self-heating", Quantity::temperature_difference, "K");
  o.constraints.max_current = limit("max-current", Quantity::current, "A");
  o.constraints.max_power = limit("max-power", Quantity::plain, "W");
  o.constraints.min_span = limit("min-span", Quantity::ratio, "");
  o.constraints.min_sensitivity = limit("min-sensitivity", Quantity::lsb, "LSB/K");
  o.constraints.settles = vm.count("settles") > 0;
  if (o.constraints.min_span && *o.constraints.min_span > 1.0)
    reject(command_line("--min-span"), vm["min-span"].as<std::string>(), "must be a share of the ADC span up to 100 %");
  o.parallel = vm.count("parallel") > 0;
  o.top = whole(vm, "top");
  if (o.top < 1) reject(command_line("--top"), vm["top"].as<std::string>(), "must be a whole number >= 1");
  o.verify = whole(vm, "verify");
  if (vm.count("mc-units")) {
    const int u = whole(vm, "mc-units");
    if (u < 1) reject(command_line("--mc-units"), vm["mc-units"].as<std::string>(), "must be a whole number >= 1");
    o.mc_units = static_cast<std::uint64_t>(u);
  }
  o.guidance = vm.count("no-guidance") == 0;
  const Design design = build_design(inv.scenario);
  const PickResult result = [&] {
    ProgressLine progress(o.verify > 0 ? "pick (then --verify)" : "pick", show_progress(inv));
    o.progress = progress.fraction_callback();
    return pick(inv.scenario, o);
  }();

  std::string text;
  if (inv.format == Format::json) text = pick_json(design, result, o);
  else if (inv.format == Format::csv) text = pick_csv(design, result);
  else text = pick_text(design, result, o);
  if (!inv.report.empty()) write_report(inv.report, pick_report_html(design, inv.scenario, result, o, inv.file));
  if (!inv.plots.empty()) write_figures("--plots", inv.plots, pick_figures(design, result));
  emit(inv, text);
  return 0;
}

}  // namespace thermargin::cli
