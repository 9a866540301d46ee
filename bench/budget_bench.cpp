// Deterministic engines on 201 temperatures: the worst case (every corner
// of 12 active inputs, 4096 corners) and the linear budget, each alone and
// together (wall-clock time: the worst case runs on every core), and a whole
// `budget` without Monte Carlo on the built-in default design.
#include <benchmark/benchmark.h>

#include "thermargin/engines/budget.hpp"
#include "thermargin/input/scenario.hpp"
#include "bench_designs.hpp"

namespace {

using namespace thermargin;

Design twelve_inputs() { return build_design(bench::twelve_inputs_scenario()); }

void BM_WorstCaseTwelveInputs(benchmark::State& state) {
  const Design d = twelve_inputs();
  const Chain chain(d);
  const auto temps = d.conditions.temperatures();
  for (auto _ : state) benchmark::DoNotOptimize(worst_case(chain, temps).points.data());
  state.counters["inputs"] = static_cast<double>(d.inputs.size());
  state.counters["temperatures"] = static_cast<double>(temps.size());
}
BENCHMARK(BM_WorstCaseTwelveInputs)->Unit(benchmark::kMillisecond)->UseRealTime();

// 14 active inputs without calibration (2^14 corners: 8 of the element, 3
// of the node, 3 of the ADC): the staged enumeration with the extreme
// readings converted (docs/engines.md, Worst case).
void BM_WorstCaseFourteenInputs(benchmark::State& state) {
  const Design d = build_design(bench::fourteen_inputs_scenario());
  const Chain chain(d);
  const auto temps = d.conditions.temperatures();
  for (auto _ : state) benchmark::DoNotOptimize(worst_case(chain, temps, {.half_widths = false}).points.data());
  state.counters["inputs"] = static_cast<double>(d.inputs.size());
  state.counters["corner_temperatures_per_s"] = benchmark::Counter(
      static_cast<double>(temps.size()) * static_cast<double>(1LL << d.inputs.size()) * static_cast<double>(state.iterations()),
      benchmark::Counter::kIsRate);
}
BENCHMARK(BM_WorstCaseFourteenInputs)->Unit(benchmark::kMillisecond)->UseRealTime();

void BM_LinearBudgetTwelveInputs(benchmark::State& state) {
  const Design d = twelve_inputs();
  const Chain chain(d);
  const auto temps = d.conditions.temperatures();
  for (auto _ : state) benchmark::DoNotOptimize(linear_budget(chain, temps).points.data());
}
BENCHMARK(BM_LinearBudgetTwelveInputs)->Unit(benchmark::kMillisecond);

// The linear budget with and without its second-order terms on 14 active
// inputs (91 pairs) over 201 temperatures: what the pairs cost.
void BM_LinearBudgetFourteenInputs(benchmark::State& state) {
  const Design d = build_design(bench::fourteen_inputs_scenario());
  const Chain chain(d);
  const auto temps = d.conditions.temperatures();
  const BudgetOrder order = state.range(0) ? BudgetOrder::second : BudgetOrder::first;
  std::size_t pairs = 0;
  for (auto _ : state) {
    const LinearBudget lb = linear_budget(chain, temps, order);
    pairs = lb.points[temps.size() / 2].pairs.size();
    benchmark::DoNotOptimize(lb.points.data());
  }
  state.SetLabel(state.range(0) ? "second order" : "first order");
  state.counters["inputs"] = static_cast<double>(d.inputs.size());
  state.counters["pairs_kept_mid_range"] = static_cast<double>(pairs);
}
BENCHMARK(BM_LinearBudgetFourteenInputs)->Arg(0)->Arg(1)->Unit(benchmark::kMillisecond);

// What issue 3 asks to be well under a second: both deterministic bands.
void BM_WorstCaseAndLinearBudgetTwelveInputs(benchmark::State& state) {
  const Design d = twelve_inputs();
  const Chain chain(d);
  const auto temps = d.conditions.temperatures();
  for (auto _ : state) {
    benchmark::DoNotOptimize(worst_case(chain, temps).points.data());
    benchmark::DoNotOptimize(linear_budget(chain, temps).points.data());
  }
  state.counters["inputs"] = static_cast<double>(d.inputs.size());
  state.counters["temperatures"] = static_cast<double>(temps.size());
}
BENCHMARK(BM_WorstCaseAndLinearBudgetTwelveInputs)->Unit(benchmark::kMillisecond)->UseRealTime();

void BM_BudgetDefaultDesignWithoutMonteCarlo(benchmark::State& state) {
  const Design d = build_design(Scenario());
  const Chain chain(d);
  BudgetOptions o;
  o.monte_carlo = false;
  for (auto _ : state) benchmark::DoNotOptimize(run_budget(chain, o).points.data());
}
BENCHMARK(BM_BudgetDefaultDesignWithoutMonteCarlo)->Unit(benchmark::kMillisecond);

}  // namespace
