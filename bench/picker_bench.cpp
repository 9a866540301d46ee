// The fixed-resistor picker on the built-in default design: every E96 value
// over 1 kΩ–1 MΩ (289 candidates) ranked by the worst-case objective, with
// and without the analytic guidance (Brent's continuous optimum and the
// neighbours' evaluations), on 1 and 2 threads. The target is under 2 s on
// two cores. For scale, one candidate's full enumeration over the window
// and the cheap screening it is spared for most candidates.
#include <benchmark/benchmark.h>

#include "bench_designs.hpp"
#include "thermargin/engines/linear_budget.hpp"
#include "thermargin/tools/picker.hpp"
#include "thermargin/engines/worst_case.hpp"

namespace {

using namespace thermargin;

void BM_PickE96WorstCase(benchmark::State& state) {
  const Scenario s;
  PickOptions o;  // E96, 1k..1M, worst case, top 10
  o.threads = static_cast<int>(state.range(0));
  o.guidance = state.range(1) != 0;
  std::size_t full = 0, candidates = 0;
  for (auto _ : state) {
    const PickResult r = pick(s, o);
    full = r.evaluated_in_full;
    candidates = r.candidates;
    benchmark::DoNotOptimize(r.rows.data());
  }
  state.counters["candidates"] = static_cast<double>(candidates);
  state.counters["in_full"] = static_cast<double>(full);
}
BENCHMARK(BM_PickE96WorstCase)
    ->ArgNames({"threads", "guidance"})
    ->Args({1, 0})
    ->Args({2, 0})
    ->Args({2, 1})
    ->Unit(benchmark::kMillisecond)
    ->UseRealTime();

// The run of issue 19's goal (bench/run_times.sh: `pick
// bench/fourteen_inputs.ini --series e96`): E96 over 1 kΩ–1 MΩ on the
// 14-input design, worst case, guidance on, as the command runs it.
void BM_PickE96FourteenInputs(benchmark::State& state) {
  const Scenario s = bench::fourteen_inputs_scenario();
  PickOptions o;
  o.threads = static_cast<int>(state.range(0));
  std::size_t full = 0;
  for (auto _ : state) {
    const PickResult r = pick(s, o);
    full = r.evaluated_in_full;
    benchmark::DoNotOptimize(r.rows.data());
  }
  state.counters["in_full"] = static_cast<double>(full);
}
BENCHMARK(BM_PickE96FourteenInputs)->ArgName("threads")->Arg(1)->Arg(2)->Unit(benchmark::kMillisecond)->UseRealTime();

std::vector<double> window(const Design& d) {
  std::vector<double> w;
  for (double t : d.conditions.temperatures())
    if (t >= d.requirement.window_min && t <= d.requirement.window_max) w.push_back(t);
  return w;
}

Design single_threaded() {
  Scenario s;
  s.set("montecarlo.threads", "1", Where{Origin::command_line, "", 0, "montecarlo.threads"});
  return build_design(s);
}

// What a candidate evaluated in full costs (every corner, window only), on
// one thread as the picker runs it.
void BM_OneCandidateFullWorstCase(benchmark::State& state) {
  const Design d = single_threaded();
  const Chain chain(d);
  const auto w = window(d);
  for (auto _ : state) benchmark::DoNotOptimize(worst_case(chain, w, {.threads = 1}).points.data());
}
BENCHMARK(BM_OneCandidateFullWorstCase)->Unit(benchmark::kMillisecond);

// The screening every candidate gets: the linear budget over the window
// (whose sensitivities direct the bounding corners).
void BM_OneCandidateLinearScreen(benchmark::State& state) {
  const Design d = single_threaded();
  const Chain chain(d);
  const auto w = window(d);
  for (auto _ : state) benchmark::DoNotOptimize(linear_budget(chain, w).points.data());
}
BENCHMARK(BM_OneCandidateLinearScreen)->Unit(benchmark::kMillisecond);

}  // namespace
