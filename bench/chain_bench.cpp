// The cost of the measurement chain: one evaluation of the default design
// (sensor, self-heating, divider, supply, ADC, firmware) and the nominal
// sweep the `budget` command starts from. Speed is shown here, never by a
// timed test.
#include <benchmark/benchmark.h>

#include "thermargin/chain/chain.hpp"
#include "thermargin/engines/nominal.hpp"
#include "thermargin/input/scenario.hpp"

namespace thermargin {
namespace {

// One chain evaluation of the built-in default design at 37 °C, with every
// deviation zero (the nominal unit) and a continuous reading.
void BM_ChainEvaluateDefaultDesign(benchmark::State& state) {
  const Design design = build_design(Scenario());
  const Chain chain(design);
  const Deviations zero = nominal_deviations();
  double t = 37.0;
  for (auto _ : state) {
    benchmark::DoNotOptimize(t);
    const Evaluation e = chain.evaluate(zero, t);
    benchmark::DoNotOptimize(e.error);
  }
}
BENCHMARK(BM_ChainEvaluateDefaultDesign);

// The nominal sweep over 201 temperatures (-20..80 °C in 0.5 K steps, the
// default design's range): one evaluation and two sensitivity front ends a point.
void BM_NominalSweep201Temperatures(benchmark::State& state) {
  Scenario s;
  s.set("conditions.t_min", "-20", Where{Origin::command_line, "", 0, "conditions.t_min"});
  s.set("conditions.t_max", "80", Where{Origin::command_line, "", 0, "conditions.t_max"});
  s.set("conditions.t_step", "0.5", Where{Origin::command_line, "", 0, "conditions.t_step"});
  const Design design = build_design(s);
  const Chain chain(design);
  if (design.conditions.temperatures().size() != 201) state.SkipWithError("the sweep is not 201 temperatures");
  for (auto _ : state) {
    const auto points = nominal_sweep(chain);
    benchmark::DoNotOptimize(points.data());
  }
  state.SetItemsProcessed(state.iterations() * 201);
}
BENCHMARK(BM_NominalSweep201Temperatures);

}  // namespace
}  // namespace thermargin
