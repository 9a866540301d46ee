// `thermargin budget`: error bands across the range, the contributors and
// the verdict against the requirement.
#include <nlohmann/json.hpp>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iostream>
#include <sstream>

#include "cli.hpp"
#include "commands.hpp"
#include "thermargin/report/budget_output.hpp"
#include "thermargin/engines/budget.hpp"
#include "thermargin/report/budget_report.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/engines/what_if.hpp"
#include "thermargin/input/response_section.hpp"
#include "thermargin/tools/response.hpp"

namespace thermargin::cli {

int run_budget(int argc, char** argv) {
  po::options_description own("budget options");
  own.add_options()("no-mc", "skip the Monte Carlo engine")(
      "detail", "text: after the first screen, every contributor and the tables per temperature")(
      "corners", po::value<std::string>()->default_value("auto"),
      "worst-case corners: auto (every corner up to 16 active inputs, directed by the sensitivities beyond) | "
      "enumerate (every corner, up to 24 inputs) | directed");
  if (help_requested("budget", argc, argv, "[FILE] [options]", own, true, true, true)) return 0;
  const Invocation inv = parse("budget", argc, argv, own, true, true, true);
  const Design design = build_design(inv.scenario);
  BudgetOptions options;
  options.monte_carlo = inv.vm.count("no-mc") == 0;
  const std::string corners = inv.vm["corners"].as<std::string>();
  if (corners == "enumerate") options.corners = CornerMethod::enumerate;
  else if (corners == "directed") options.corners = CornerMethod::directed;
  else if (corners != "auto") throw input_error("--corners = " + corners + " (command line): must be one of: auto | enumerate | directed");
  if (options.corners == CornerMethod::enumerate && design.inputs.size() > 24)
    throw input_error("--corners = enumerate (command line): " + std::to_string(design.inputs.size()) +
                      " active inputs would give too many corners; at most 24 are enumerated");
  require_feasible(design, inv.scenario, options);
  const Chain chain(design);
  Budget budget = [&] {
    ProgressLine progress("budget: Monte Carlo", show_progress(inv) && options.monte_carlo);
    options.progress = progress.fraction_callback();
    return run_budget(chain, options);
  }();
  // The lag at the stated ramp ([response]), in the verdict when the requirement says so.
  const ResponseSettings response = read_response_section(inv.scenario);
  if (response.include_dynamic) budget.verdict = with_dynamic_error(budget.verdict, design.requirement, dynamic_error(response));
  // What would help: in the text, the JSON and the page (CSV is per temperature),
  // judged on the budget the verdict uses (requirement.at).
  const bool want_help = inv.format != Format::csv || !inv.report.empty();
  const bool life = budget.end_of_life && budget.verdict.at == Requirement::At::end_of_life;
  const WhatIf help = !want_help ? WhatIf{}
                      : life     ? what_if(Chain(budget.end_of_life->design), budget.end_of_life->budget)
                                 : what_if(chain, budget);

  const BudgetExtras extras{&chain, response, inv.vm.count("detail") > 0};
  std::string text;
  if (inv.format == Format::json) text = budget_json(design, budget, help, extras);
  else if (inv.format == Format::csv) text = budget_csv(budget, extras);
  else text = budget_text(design, budget, help, extras);
  if (!inv.report.empty()) write_report(inv.report, budget_report_html(design, inv.scenario, budget, inv.file, &help));
  if (!inv.plots.empty()) write_figures("--plots", inv.plots, budget_figures(design, budget));
  emit(inv, text);
  return (inv.strict && !budget.verdict.pass) ? 3 : 0;
}

}  // namespace thermargin::cli
