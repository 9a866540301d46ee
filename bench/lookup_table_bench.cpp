// The cost of `thermargin table`: one table with its error measured at every
// code of the range, and the upward search for the smallest P that meets an
// error limit (docs/table.md explains why it is a scan, not a bisection), on
// the default 12-bit design and on the same design read by a 16-bit ADC.
// Speed is shown here, never by a timed test.
#include <benchmark/benchmark.h>

#include <string>

#include "thermargin/tools/lookup_table.hpp"
#include "thermargin/input/scenario.hpp"

namespace thermargin {
namespace {

Design design_with_bits(int bits) {
  Scenario s;
  s.set("adc.bits", std::to_string(bits), Where{Origin::command_line, "", 0, "adc.bits"});
  return build_design(s);
}

// 33 points spaced in code (or in temperature), the error at every code.
void BM_TableWithError(benchmark::State& state) {
  const Design d = design_with_bits(static_cast<int>(state.range(0)));
  TableSettings s;
  s.spacing = state.range(1) ? TableSpacing::temperature : TableSpacing::code;
  for (auto _ : state) {
    const TableResult r = make_table(d, s);
    benchmark::DoNotOptimize(r.error.max_abs);
  }
}
BENCHMARK(BM_TableWithError)->ArgNames({"bits", "by_temperature"})->Args({12, 0})->Args({12, 1})->Args({16, 0})->Args({16, 1})
    ->Unit(benchmark::kMillisecond);

// The smallest P within 0.02 K (about 120 points at 12 bits).
void BM_SmallestTableWithin20mK(benchmark::State& state) {
  const Design d = design_with_bits(static_cast<int>(state.range(0)));
  TableSettings s;
  s.spacing = state.range(1) ? TableSpacing::temperature : TableSpacing::code;
  s.max_error = 0.02;
  for (auto _ : state) {
    const TableResult r = make_table(d, s);
    benchmark::DoNotOptimize(r.table.size());
  }
}
BENCHMARK(BM_SmallestTableWithin20mK)->ArgNames({"bits", "by_temperature"})->Args({12, 0})->Args({12, 1})->Args({16, 0})
    ->Args({16, 1})->Unit(benchmark::kMillisecond);

}  // namespace
}  // namespace thermargin
