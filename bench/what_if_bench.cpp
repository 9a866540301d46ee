// What would help, on the built-in default design (9 active inputs, the
// window's 121 temperatures) and on a 12-input variant: the price of the
// budget's what-if section, next to BM_BudgetDefaultDesignWithoutMonteCarlo.
#include <benchmark/benchmark.h>

#include "bench_designs.hpp"
#include "thermargin/input/scenario.hpp"
#include "thermargin/engines/what_if.hpp"

namespace {

using namespace thermargin;

void run(benchmark::State& state, const Scenario& s) {
  const Design d = build_design(s);
  const Chain chain(d);
  BudgetOptions o;
  o.monte_carlo = false;
  const Budget b = run_budget(chain, o);
  std::size_t rows = 0;
  for (auto _ : state) {
    const WhatIf w = what_if(chain, b);
    rows = w.rows.size();
    benchmark::DoNotOptimize(w.rows.data());
  }
  state.counters["inputs"] = static_cast<double>(d.inputs.size());
  state.counters["sources_tried"] = static_cast<double>(rows);
}

void BM_WhatIfDefaultDesign(benchmark::State& state) { run(state, Scenario()); }
BENCHMARK(BM_WhatIfDefaultDesign)->Unit(benchmark::kMillisecond);

void BM_WhatIfTwelveInputs(benchmark::State& state) { run(state, bench::twelve_inputs_scenario()); }
BENCHMARK(BM_WhatIfTwelveInputs)->Unit(benchmark::kMillisecond);

}  // namespace
