// Part grades against cost at the size a purchasing review asks for: a
// catalogue of 4 slots × 4 options (256 combinations) on the built-in
// default design, each combination's fixed resistor re-picked from E96 over
// 1 kΩ..1 MΩ by the worst case, and a Monte Carlo yield of 10⁴ units for
// every combination that can still meet the requirement. Target: under 30 s
// of wall time on two cores. Prices are invented.
#include <benchmark/benchmark.h>

#include <string>

#include "thermargin/input/catalogue.hpp"
#include "thermargin/tools/grades.hpp"

namespace {

using namespace thermargin;

constexpr const char* kCatalogue =
    "slot,grade,unit_cost,settings\n"
    "thermistor,3%,0.05,sensor.r25_tol=3%;sensor.beta_tol=2%\n"
    "thermistor,1%,0.10,sensor.r25_tol=1%;sensor.beta_tol=1%\n"
    "thermistor,0.5%,0.22,sensor.r25_tol=0.5%;sensor.beta_tol=0.5%\n"
    "thermistor,0.2%,0.60,sensor.r25_tol=0.2%;sensor.beta_tol=0.2%\n"
    "resistor,5%,0.001,divider.r_fixed_tol=5%;divider.r_fixed_tempco=200ppm\n"
    "resistor,1%,0.002,divider.r_fixed_tol=1%;divider.r_fixed_tempco=100ppm\n"
    "resistor,0.1%,0.03,divider.r_fixed_tol=0.1%;divider.r_fixed_tempco=25ppm\n"
    "resistor,0.05%,0.08,divider.r_fixed_tol=0.05%;divider.r_fixed_tempco=10ppm\n"
    "adc,internal,0,adc.offset=2;adc.gain_error=0.2%;adc.inl=1\n"
    "adc,trimmed,0.05,adc.offset=0.5;adc.gain_error=0.05%;adc.inl=0.5\n"
    "adc,external-12,0.40,adc.offset=1;adc.gain_error=0.1%;adc.inl=0.5;adc.noise=0.3\n"
    "adc,external-16,1.20,adc.bits=16;adc.offset=4;adc.gain_error=0.05%;adc.inl=2;adc.noise=1\n"
    "averaging,1,0,adc.averaging=1\n"
    "averaging,4,0.01,adc.averaging=4\n"
    "averaging,16,0.03,adc.averaging=16\n"
    "averaging,64,0.08,adc.averaging=64\n";

// 10^4 Monte Carlo units per combination on the benchmark's thread count.
GradesOptions yield_1e4(const benchmark::State& state) {
  GradesOptions o;
  o.units = 10000;
  o.threads = static_cast<int>(state.range(0));
  return o;
}

void BM_Grades256RePickE96Yield1e4(benchmark::State& state) {
  const Scenario scenario;
  const Catalogue cat = parse_catalogue(kCatalogue, "bench.csv");
  GradesOptions o = yield_1e4(state);
  o.re_pick = true;
  o.pick.series = Series::e96;
  o.pick.range_low = 1e3;
  o.pick.range_high = 1e6;
  GradesResult g;
  for (auto _ : state) {
    g = evaluate_grades(scenario, cat, o);
    benchmark::DoNotOptimize(g.rows.data());
  }
  state.counters["combinations"] = static_cast<double>(g.rows.size());
  state.counters["monte_carlo_runs"] = static_cast<double>(g.mc_full);
  state.counters["front"] = static_cast<double>(g.front.size());
}
BENCHMARK(BM_Grades256RePickE96Yield1e4)->Arg(2)->Iterations(1)->Unit(benchmark::kSecond)->UseRealTime();

// The same catalogue without the re-pick: the engines alone.
void BM_Grades256Yield1e4(benchmark::State& state) {
  const Scenario scenario;
  const Catalogue cat = parse_catalogue(kCatalogue, "bench.csv");
  const GradesOptions o = yield_1e4(state);
  for (auto _ : state) {
    const GradesResult g = evaluate_grades(scenario, cat, o);
    benchmark::DoNotOptimize(g.rows.data());
  }
}
BENCHMARK(BM_Grades256Yield1e4)->Arg(2)->Iterations(1)->Unit(benchmark::kSecond)->UseRealTime();

// The run of issue 19's goal (bench/run_times.sh): the Pt1000 hot plate
// against bench/pt1000_oven_catalogue.csv, 54 combinations, each through
// every engine, 10^4-unit yields, a volume of 10^4.
void BM_GradesPt1000Oven54Yield1e4(benchmark::State& state) {
  Scenario scenario;
  scenario.load_file(std::string(THERMARGIN_SOURCE_DIR) + "/scenarios/hot_plate_pt1000.ini");
  const Catalogue cat = read_catalogue(std::string(THERMARGIN_SOURCE_DIR) + "/bench/pt1000_oven_catalogue.csv");
  GradesOptions o = yield_1e4(state);
  o.volume = 1e4;
  GradesResult g;
  for (auto _ : state) {
    g = evaluate_grades(scenario, cat, o);
    benchmark::DoNotOptimize(g.rows.data());
  }
  state.counters["monte_carlo_runs"] = static_cast<double>(g.mc_full);
}
BENCHMARK(BM_GradesPt1000Oven54Yield1e4)->Arg(2)->Iterations(1)->Unit(benchmark::kSecond)->UseRealTime();

}  // namespace
