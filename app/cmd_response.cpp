// `thermargin response`: how the reported temperature follows a changing
// one — the sensor's time constant and the firmware's filter on a ramp and
// after a step, the noise the filter leaves, and the filter that keeps the
// static worst case plus the lag within the requirement (docs/response.md).
#include "cli.hpp"
#include "commands.hpp"
#include "thermargin/input/response_section.hpp"
#include "thermargin/report/response_report.hpp"

namespace thermargin::cli {

int run_response(int argc, char** argv) {
  po::options_description own("response options (the [response] section's keys set the sensor, filter, ramp and step)");
  const char* usage =
      "[FILE] [options]\n\n"
      "How the reported temperature follows a changing one: the sensor's time constant and the firmware's filter\n"
      "on a ramp and after a step, the noise the filter leaves, for the scenario's filter and a sweep of moving\n"
      "averages and exponential filters, with the one that keeps the static worst case plus the lag within the\n"
      "requirement. Set them with the --response.* keys below or a [response] section (docs/response.md).";
  if (help_requested("response", argc, argv, usage, own, true, true)) return 0;
  const Invocation inv = parse("response", argc, argv, own, true, true);
  const Design design = build_design(inv.scenario);
  const ResponseSettings settings = read_response_section(inv.scenario);
  BudgetOptions options;
  options.monte_carlo = false;
  require_feasible(design, inv.scenario, options);
  const Chain chain(design);
  const ResponseAnalysis analysis = [&] {
    ProgressLine progress("response", show_progress(inv));
    return analyse_response(chain, settings, progress.callback());
  }();

  std::string text;
  if (inv.format == Format::json) text = response_json(design, analysis);
  else if (inv.format == Format::csv) text = response_csv(design, analysis);
  else text = response_text(design, analysis);
  if (!inv.report.empty()) write_report(inv.report, response_report_html(design, inv.scenario, analysis, inv.file));
  if (!inv.plots.empty()) write_figures("--plots", inv.plots, response_figures(analysis));
  emit(inv, text);
  return 0;
}

}  // namespace thermargin::cli
