// `thermargin check`: read and validate a scenario, print every resolved
// value with its unit and where it came from.
#include "cli.hpp"
#include "commands.hpp"
#include "thermargin/input/design.hpp"
#include "thermargin/report/check_output.hpp"

namespace thermargin::cli {

int run_check(int argc, char** argv) {
  po::options_description own("check options");
  own.add_options()("all", "text: every key, not only those that take part in this design and those the scenario sets");
  if (help_requested("check", argc, argv, "[FILE] [options]", own, true, false)) return 0;
  const Invocation inv = parse("check", argc, argv, own, true, false);
  const Design design = build_design(inv.scenario);  // validates everything

  std::string text;
  if (inv.format == Format::json) text = check_json(inv.scenario, design);
  else if (inv.format == Format::csv) text = check_csv(inv.scenario, design);
  else text = check_text(inv.scenario, design, inv.vm.count("all") > 0);
  emit(inv, text);
  return 0;
}

}  // namespace thermargin::cli
