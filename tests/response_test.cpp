// Following a changing temperature (tools/response.hpp, docs/response.md):
// the exact discrete-time model against the closed forms of a first-order
// lag (common practice) and of the moving average and exponential filter
// (textbook discrete-time signal processing), the settling search against
// its definition, and the analysis's bookkeeping. The SciPy second opinion
// is in response_cli_test.cpp.
#include "thermargin/tools/response.hpp"

#include <cmath>
#include <numeric>
#include <vector>

#include <gtest/gtest.h>

#include "engine_fixture.hpp"
#include "source_tree.hpp"
#include "thermargin/engines/worst_case.hpp"

namespace thermargin {
namespace {

using testing::design_with;
using testing::ideal;

constexpr double kExact = 1e-12;        // relative: closed form against recursion, double rounding only
constexpr double kSteady = 1e-9;        // K: a ramp's lag once every transient has decayed below it
constexpr double kFirstOrder = 1e-2;    // relative: the noise's half-width taken at the nominal point, not at the worst corner

Filter moving_average(int n) { return {FilterKind::moving_average, n, 1.0}; }
Filter exponential(double a) { return {FilterKind::exponential, 1, a}; }

std::vector<Filter> filters() {
  return {Filter{}, moving_average(1), moving_average(2), moving_average(3), moving_average(16), moving_average(256),
          exponential(1.0), exponential(0.5), exponential(0.3), exponential(1.0 / 256)};
}

TEST(ResponseClosedForms, FilterDelayOnARampIsHalfTheWindowOrOneMinusAlphaOverAlpha) {
  // Textbook discrete-time signal processing: a moving average of N delays a
  // ramp by (N - 1)/2 samples, the exponential filter by (1 - alpha)/alpha.
  // Held here against the filters run over the ramp x_k = k.
  for (const Filter& f : filters()) {
    SCOPED_TRACE(describe(f));
    std::vector<double> ramp(40000);
    std::iota(ramp.begin(), ramp.end(), 0.0);
    const std::vector<double> y = apply_filter(f, ramp);
    const double expected = f.kind == FilterKind::moving_average ? (f.length - 1) / 2.0
                            : f.kind == FilterKind::exponential  ? (1.0 - f.alpha) / f.alpha
                                                                 : 0.0;
    EXPECT_NEAR(ramp.back() - y.back(), expected, 1e-6);
    EXPECT_NEAR(filter_delay_readings(f), expected, 1e-15);
  }
}

TEST(ResponseClosedForms, NoiseFactorIsTheRootSumOfSquaresOfTheImpulseResponse) {
  // White noise of variance s^2 through a filter with impulse response h has
  // variance s^2 * sum h^2; for the moving average 1/N, for the exponential
  // filter alpha/(2 - alpha) (textbook discrete-time signal processing).
  for (const Filter& f : filters()) {
    SCOPED_TRACE(describe(f));
    std::vector<double> impulse(20000, 0.0);
    impulse[0] = 1.0;
    const std::vector<double> h = apply_filter(f, impulse);
    const double rss = std::sqrt(std::inner_product(h.begin(), h.end(), h.begin(), 0.0));
    EXPECT_NEAR(noise_factor(f), rss, 1e-12);
  }
  EXPECT_DOUBLE_EQ(noise_factor(moving_average(16)), 0.25);                  // 1/sqrt(16)
  EXPECT_DOUBLE_EQ(noise_factor(exponential(0.5)), std::sqrt(1.0 / 3.0));   // sqrt(0.5/1.5)
}

TEST(ResponseClosedForms, FirstOrderSensorLagsARampByRateTimesTau) {
  // A first-order system lags a ramp of r K/s by r*tau after its transient
  // (common practice); sampled exactly, so at the readings too.
  const double tau = 8.0, period = 0.5, rate = 2.0 / 60.0;
  const std::vector<double> x = sensor_on_ramp(tau, period, rate, 2000);
  const double t_end = 1999 * period;
  EXPECT_NEAR(rate * t_end - x.back(), rate * tau, kSteady);
  // The sensor's own reading at one time constant after a step: 63.2 % (IEC 60539-1's definition).
  const std::vector<double> s = sensor_after_step(tau, period, 1.0, 17);
  EXPECT_NEAR(s[16], 1.0 - std::exp(-1.0), 1e-15);
  EXPECT_NEAR(s[16], 0.632, 5e-4);
}

TEST(ResponseClosedForms, ReportedTemperatureLagsARampByRateTimesTauPlusTheFilterDelay) {
  const double tau = 8.0, period = 0.5, rate = 1.5 / 60.0;
  for (const Filter& f : filters()) {
    SCOPED_TRACE(describe(f));
    const std::size_t count = 40000;
    const std::vector<double> y = apply_filter(f, sensor_on_ramp(tau, period, rate, count));
    const double medium = rate * static_cast<double>(count - 1) * period;
    EXPECT_NEAR(medium - y.back(), ramp_lag(tau, period, f, rate), kSteady);
    EXPECT_NEAR(ramp_lag(tau, period, f, rate), rate * (tau + filter_delay_readings(f) * period), 1e-15);
  }
}

TEST(ResponseStep, ClosedFormErrorEqualsTheRecursionAtEveryReading) {
  // The closed form of step_error() against running the sensor's samples
  // through the filter, including alpha = 1 - q, where the two geometric
  // ratios of the exponential filter's sum coincide.
  const double tau = 10.0, period = 1.0, step = 7.0;
  std::vector<Filter> fs = filters();
  fs.push_back(exponential(1.0 - std::exp(-period / tau)));
  fs.push_back(exponential(1.0 - std::exp(-period / tau) + 1e-9));
  for (const Filter& f : fs) {
    SCOPED_TRACE(describe(f));
    const std::size_t count = 3000;
    const std::vector<double> y = apply_filter(f, sensor_after_step(tau, period, step, count));
    for (std::size_t k = 0; k < count; k += 7)
      ASSERT_NEAR(step_error(tau, period, f, step, static_cast<long long>(k)), step - y[k], kExact * step) << k;
  }
}

TEST(ResponseStep, SettlingIsTheFirstReadingFromWhichTheErrorStaysWithinTheLimit) {
  const double tau = 12.0, period = 0.5, step = 10.0, limit = 0.2;
  for (const Filter& f : filters()) {
    SCOPED_TRACE(describe(f));
    const long long k = settling_readings(tau, period, f, step, limit);
    ASSERT_GT(k, 0);
    EXPECT_LE(step_error(tau, period, f, step, k), limit);
    EXPECT_GT(step_error(tau, period, f, step, k - 1), limit);
    // and it stays within: the recursion from k on
    const std::vector<double> y = apply_filter(f, sensor_after_step(tau, period, step, static_cast<std::size_t>(k) + 5000));
    for (std::size_t i = static_cast<std::size_t>(k); i < y.size(); ++i) ASSERT_LE(step - y[i], limit + 1e-12) << i;
  }
  EXPECT_EQ(settling_readings(tau, period, Filter{}, step, step), 0);  // within the limit from the step on
}

TEST(ResponseStep, UnfilteredSettlingIsTauTimesTheLogOfTheStepOverTheLimit) {
  // First order (common practice): e(t) = step*exp(-t/tau), so the first
  // reading within s is ceil(tau/T * ln(step/s)); to 1 % that is 4.6 tau.
  EXPECT_EQ(settling_readings(18.0, 0.5, Filter{}, 10.0, 0.5), static_cast<long long>(std::ceil(36.0 * std::log(20.0))));
  const double tau = 5.0, period = 1e-3;
  EXPECT_NEAR(settling_readings(tau, period, Filter{}, 1.0, 0.01) * period, 4.605 * tau, 1e-3 * tau);
}

TEST(ResponseStep, LongTimeConstantsAndHeavyFiltersSettleWithoutOverflow) {
  // A slow probe read a thousand times a second: some ten million readings.
  const long long k = settling_readings(3600.0, 1e-3, exponential(1.0 / 256), 50.0, 0.01);
  EXPECT_NEAR(static_cast<double>(k) * 1e-3, 3600.0 * std::log(5000.0), 1.0);  // the filter adds 0.26 s
  EXPECT_GT(settling_readings(1.0, 1.0, moving_average(65536), 10.0, 0.01), 65000);
}

TEST(ResponseSweep, ListsNoneThePowersOfTwoAndTheScenarioFilterOnce) {
  EXPECT_EQ(filter_sweep(Filter{}).size(), 17u);
  EXPECT_EQ(filter_sweep(moving_average(16)).size(), 17u);
  EXPECT_EQ(filter_sweep(moving_average(1)).size(), 17u);  // N = 1 is no filter
  EXPECT_EQ(filter_sweep(moving_average(10)).size(), 18u);
  EXPECT_EQ(filter_sweep(exponential(0.2)).size(), 18u);
}

ResponseSettings settings(double ramp_per_min, Filter f) {
  ResponseSettings s;
  s.time_constant = 15.0;
  s.time_constant_tol = 0.2;
  s.reading_period = 0.5;
  s.filter = f;
  s.ramp = ramp_per_min / 60.0;
  s.step = 10.0;
  s.settle_to = 0.5;
  s.present = true;
  return s;
}

TEST(ResponseAnalysis, TotalIsTheStaticWorstCaseWithFilteredNoisePlusTheRampError) {
  const Design d = design_with({{"adc.noise", "2"}});
  const ResponseAnalysis a = analyse_response(Chain(d), settings(1.5, moving_average(16)));
  ASSERT_EQ(a.rows.size(), 17u);
  EXPECT_TRUE(a.rows[a.chosen].chosen);
  EXPECT_EQ(a.rows[a.chosen].filter.length, 16);
  EXPECT_NEAR(a.rows[0].static_max_abs, a.static_wc_max_abs, 1e-12);  // no filter: the budget's own worst case
  for (const ResponseRow& r : a.rows) {
    SCOPED_TRACE(describe(r.filter));
    EXPECT_NEAR(r.total_max_abs, r.static_max_abs + r.ramp_error, 1e-12);
    EXPECT_NEAR(r.noise_band, r.noise_factor * a.noise_band_unfiltered, 1e-12);
    EXPECT_LE(r.static_max_abs, a.static_wc_max_abs + 1e-12);
    EXPECT_NEAR(r.ramp_error, 1.5 / 60.0 * (18.0 + r.delay_s), 1e-12);  // tau at its slowest, 15 s + 20 %
    EXPECT_EQ(r.meets, r.total_max_abs <= d.requirement.max_error);
  }
}

TEST(ResponseAnalysis, FilteredNoiseShiftMatchesTheWorstCaseRunWithTheNoiseScaled) {
  // Consistency of the first-order shortcut: the window's worst case with
  // the noise scaled by the filter's factor, run through the worst-case
  // engine itself, against the budget's band with the noise half-width scaled.
  const Design d = design_with({{"adc.noise", "3"}});
  const ResponseAnalysis a = analyse_response(Chain(d), settings(0.0, Filter{}));
  int compared = 0;
  for (const ResponseRow& r : a.rows) {
    if (r.filter.kind != FilterKind::moving_average) continue;
    SCOPED_TRACE(describe(r.filter));
    ++compared;
    const Design scaled = design_with({{"adc.noise", std::to_string(3.0 * r.noise_factor)}});
    std::vector<double> window;
    for (double t : scaled.conditions.temperatures())
      if (t >= scaled.requirement.window_min && t <= scaled.requirement.window_max) window.push_back(t);
    const WorstCase wc = worst_case(Chain(scaled), window, {.half_widths = false});
    double m = 0.0;
    for (const auto& p : wc.points) m = std::max({m, std::fabs(p.low), std::fabs(p.high)});
    EXPECT_NEAR(r.static_max_abs, m, kFirstOrder * m);
    EXPECT_GE(r.static_max_abs, m - 1e-9);  // here on the safe side: the worst corner reads the noise larger
  }
  EXPECT_GT(compared, 0);  // the moving averages of the candidate filters
}

TEST(ResponseAnalysis, RecommendsTheMostMarginOrSaysWhatWouldMeet) {
  const Design d = design_with({{"adc.noise", "2"}, {"requirement.max_error", "2.5"}});
  const ResponseAnalysis a = analyse_response(Chain(d), settings(1.5, moving_average(16)));
  ASSERT_TRUE(a.recommended.has_value());
  for (const ResponseRow& r : a.rows)
    if (r.meets) EXPECT_LE(r.margin, a.rows[*a.recommended].margin + 1e-12);

  // A ramp far too fast: nothing meets; the fastest ramp that some filter
  // meets is (limit - static)/(tau_max + D) for that filter.
  const ResponseAnalysis fast = analyse_response(Chain(d), settings(60.0, Filter{}));
  ASSERT_FALSE(fast.recommended.has_value());
  ASSERT_TRUE(fast.what_would.ramp_per_minute.has_value());
  double best = 0.0;
  for (const ResponseRow& r : fast.rows)
    best = std::max(best, (d.requirement.max_error - r.static_max_abs) / r.lag_s * 60.0);
  EXPECT_NEAR(*fast.what_would.ramp_per_minute, best, 1e-9);
  ASSERT_TRUE(fast.what_would.time_constant.has_value());
  // That sensor meets the limit with its best filter, at the stated ramp.
  ResponseSettings faster = settings(60.0, Filter{});
  faster.time_constant = *fast.what_would.time_constant * (1 - 1e-9);
  EXPECT_TRUE(analyse_response(Chain(d), faster).recommended.has_value());
  EXPECT_NE(recommendation_text(fast).find("No filter keeps"), std::string::npos);
}

TEST(ResponseBudget, DynamicErrorIsAddedToTheVerdictsWorstError) {
  Verdict v;
  v.basis = Requirement::Basis::worst_case;
  v.pass = true;
  v.worst_abs_error = 0.8;
  v.margin = 0.2;
  v.reason = "worst-case error up to 0.800 K";
  Requirement q;
  q.max_error = 1.0;
  const Verdict w = with_dynamic_error(v, q, 0.3);
  EXPECT_FALSE(w.pass);
  EXPECT_NEAR(w.worst_abs_error, 1.1, 1e-12);
  EXPECT_NEAR(w.margin, -0.1, 1e-12);
  EXPECT_NE(w.reason.find("dynamic error of 0.300 K"), std::string::npos);
  EXPECT_TRUE(with_dynamic_error(v, q, 0.2).pass);
}

}  // namespace
}  // namespace thermargin

namespace thermargin {
namespace {

TEST(ResponseAnalysis, MoreSamplesPerReadingThatItNamesMeetTheLimitWithNoFilter) {
  // A slow ramp and a limit the noise decides: no filter meets it, the
  // averaging the analysis names does (re-run with that adc.averaging).
  const std::string file = testing::scenario_path("charger_stop.ini");
  const testing::Overrides tight{{"requirement.max_error", "1.2"}, {"response.ramp", "0.1"}};
  const Scenario sc = testing::scenario_with(tight, file);
  const Design da = build_design(sc);
  const ResponseAnalysis a = analyse_response(Chain(da), read_response_section(sc));
  ASSERT_FALSE(a.recommended.has_value());
  ASSERT_TRUE(a.what_would.averaging.has_value());
  EXPECT_GT(*a.what_would.averaging, 1);
  testing::Overrides more = tight;
  more.push_back({"adc.averaging", std::to_string(*a.what_would.averaging)});
  more.push_back({"response.filter", "none"});
  const Scenario sm = testing::scenario_with(more, file);
  const Design db = build_design(sm);
  const ResponseAnalysis b = analyse_response(Chain(db), read_response_section(sm));
  EXPECT_TRUE(b.rows[b.chosen].meets) << b.rows[b.chosen].total_max_abs;
  EXPECT_NE(recommendation_text(a).find("samples per reading (adc.averaging)"), std::string::npos);
}

}  // namespace
}  // namespace thermargin
