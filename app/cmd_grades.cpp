// `thermargin grades`: every combination of part grades in a catalogue,
// priced and set against the requirement; the cost/accuracy front and the
// cheapest combination that meets it.
#include <nlohmann/json.hpp>
#include <cmath>
#include <cstdio>
#include <sstream>

#include "cli.hpp"
#include "commands.hpp"
#include "thermargin/report/grades_output.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/engines/budget.hpp"  // to_string(Requirement::Basis)
#include "thermargin/tools/grades.hpp"
#include "thermargin/report/grades_report.hpp"

namespace thermargin::cli {

namespace {

double number_option(const po::variables_map& vm, const char* name) {
  const std::string key = std::string("--") + name;
  const std::string text = vm[name].as<std::string>();
  return parse_quantity(text, Quantity::plain, command_line(key));
}

}  // namespace

int run_grades(int argc, char** argv) {
  po::options_description own("grades options");
  own.add_options()("catalogue", po::value<std::string>(),
                    "the CSV of part grades: slot,grade,unit_cost,settings[,notes][,setup_cost] (docs/grades.md)")(
      "volume", po::value<std::string>(), "production volume the setup costs are spread over (required when there are any)")(
      "reject-cost", po::value<std::string>(),
      "cost of scrapping or reworking a failed unit; adds the cost per good unit and ranks by it")(
      "by", po::value<std::string>()->default_value("worst-case"),
      "error for the front: worst-case | linear | monte-carlo (max |error| over the window)")(
      "units", po::value<std::string>()->default_value("10000"), "Monte Carlo units per combination (same seed for all)")(
      "mc-all", "run Monte Carlo for every combination, not only those that can still meet the requirement")(
      "re-pick", "choose the best fixed resistor for every combination first (the pick command's objective)")(
      "series", po::value<std::string>()->default_value("e96"), "--re-pick: preferred-number series e12 | e24 | e48 | e96 | e192")(
      "range", po::value<std::string>()->default_value("1k..1M"), "--re-pick: candidate values LOW..HIGH in ohms")(
      "pick-objective", po::value<std::string>()->default_value("worst-case"),
      "--re-pick: worst-case | linear | monte-carlo | sensitivity");
  if (help_requested("grades", argc, argv, "[FILE] --catalogue CATALOGUE.csv [options]", own, true, true, true)) return 0;
  const Invocation inv = parse("grades", argc, argv, own, true, true, true);
  const po::variables_map& vm = inv.vm;
  if (!vm.count("catalogue"))
    throw input_error("--catalogue (command line): missing; give the CSV of part grades, e.g. --catalogue parts.csv");

  GradesOptions o;
  o.by = parse_error_measure(vm["by"].as<std::string>(), command_line("--by"));
  if (vm.count("volume")) o.volume = number_option(vm, "volume");
  if (vm.count("reject-cost")) o.reject_cost = number_option(vm, "reject-cost");
  {
    const std::string text = vm["units"].as<std::string>();
    const double u = number_option(vm, "units");
    if (!(u >= 1.0 && u <= 1e8 && u == std::floor(u)))
      reject(command_line("--units"), text, "must be a whole number of units from 1 to 100000000");
    o.units = static_cast<std::uint64_t>(u);
  }
  o.mc_all = vm.count("mc-all") > 0;
  o.re_pick = vm.count("re-pick") > 0;
  for (const char* name : {"series", "range", "pick-objective"})
    if (!o.re_pick && !vm[name].defaulted())
      reject(command_line(std::string("--") + name), vm[name].as<std::string>(), "applies only with --re-pick");
  if (o.re_pick) {
    o.pick.series = parse_series(vm["series"].as<std::string>(), command_line("--series"));
    const ResistanceRange range = parse_range(vm["range"].as<std::string>(), command_line("--range"));
    o.pick.range_low = range.low;
    o.pick.range_high = range.high;
    o.pick.objective = parse_objective(vm["pick-objective"].as<std::string>(), command_line("--pick-objective"));
  }
  const Design design = build_design(inv.scenario);
  const Catalogue cat = read_catalogue(vm["catalogue"].as<std::string>());
  const GradesResult g = [&] {
    ProgressLine progress("grades", show_progress(inv));
    o.progress = progress.callback();
    return evaluate_grades(inv.scenario, cat, o);
  }();

  std::string text;
  if (inv.format == Format::json) text = grades_json(design, cat, g);
  else if (inv.format == Format::csv) text = grades_csv(g);
  else text = grades_text(design, cat, g);
  if (!inv.report.empty()) write_report(inv.report, grades_report_html(design, inv.scenario, cat, g, inv.file));
  if (!inv.plots.empty()) write_figures("--plots", inv.plots, grades_figures(g));
  emit(inv, text);
  return (inv.strict && !g.recommendation) ? 3 : 0;
}

}  // namespace thermargin::cli
