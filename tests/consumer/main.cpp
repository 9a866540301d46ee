// Uses the installed library as another C++ program would: the built-in
// default design, validated without any INI text, then its budget (worst
// case and linear budget; Monte Carlo off to keep the check quick). Prints
// the window's worst case and linear band for run.sh to compare with the
// command-line program's JSON of the same design.
#include <cstdio>

#include "thermargin/chain/chain.hpp"
#include "thermargin/engines/budget.hpp"
#include "thermargin/input/scenario.hpp"

int main() {
  thermargin::Scenario scenario;  // the built-in default design
  // Set in code, as a program would (build_design checks it as a file's);
  // the default's own value, so the figures stay comparable with the CLI's.
  scenario.set("divider.r_fixed", "10k");
  const thermargin::Design design = thermargin::build_design(scenario);
  const thermargin::Chain chain(design);
  thermargin::BudgetOptions options;
  options.monte_carlo = false;
  const thermargin::Budget budget = thermargin::run_budget(chain, options);
  std::printf("%.17g %.17g\n", budget.wc_max_abs, budget.rss_max_abs);
  return budget.points.empty() ? 1 : 0;
}
