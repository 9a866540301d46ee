// The Monte Carlo engine: JCGM 101 §9.2 through its sampling and interval
// code, the distributions, the kernel against the scalar chain, bands
// against worst case and linear budget, yield against a closed form, and
// reproducibility.
#include "thermargin/engines/monte_carlo.hpp"

#include <boost/math/distributions/normal.hpp>
#include <cmath>
#include <cstdio>
#include <memory>
#include <numeric>

#include <gtest/gtest.h>

#include "engine_fixture.hpp"
#include "jcgm101_additive.hpp"
#include "thermargin/engines/linear_budget.hpp"
#include "thermargin/input/life.hpp"
#include "thermargin/engines/random.hpp"
#include "thermargin/engines/worst_case.hpp"

namespace thermargin {
namespace {

using testing::design_with;
using testing::ideal;
using testing::Overrides;

// --- Counter-based generator -------------------------------------------------

TEST(Philox, MatchesRandom123KnownAnswerVectors) {
  // Random123 tests/kat_vectors, "philox4x32 10" lines (counter, key, output).
  EXPECT_EQ(philox4x32_10({0, 0, 0, 0}, {0, 0}), (Philox4x32Counter{0x6627e8d5, 0xe169c58d, 0xbc57ac4c, 0x9b00dbd8}));
  EXPECT_EQ(philox4x32_10({0xffffffff, 0xffffffff, 0xffffffff, 0xffffffff}, {0xffffffff, 0xffffffff}),
            (Philox4x32Counter{0x408f276d, 0x41c83b0e, 0xa20bc7c6, 0x6d5451fd}));
  EXPECT_EQ(philox4x32_10({0x243f6a88, 0x85a308d3, 0x13198a2e, 0x03707344}, {0xa4093822, 0x299f31d0}),
            (Philox4x32Counter{0xd16cfe09, 0x94fdcceb, 0x5001e420, 0x24126ea1}));
}

// --- JCGM 101 §9.2: Y = X1 + X2 + X3 + X4 -----------------------------------------

using testing::additive;
using testing::four;
constexpr std::uint64_t trials = 1000000;
// With 10⁶ trials the endpoint scatter is about 0.005 (§9.2.3) and 0.01
// (§9.2.4) (JCGM 101:2008 §9.2, from memory): ±0.02 and ±0.04 are safe.
constexpr double scatter = 0.02, scatter_dominant = 0.04;

TEST(MonteCarloJcgm101, NormalInputsGiveTheNormalInterval) {
  const McPoint p = monte_carlo_model(additive, four(Distribution::normal, 3.0), 3.0, 1, trials, 0.95);
  EXPECT_NEAR(p.low, -3.919928, scatter);  // §9.2.2, exact ±3.919928
  EXPECT_NEAR(p.high, 3.919928, scatter);
  EXPECT_NEAR(p.stddev, 2.0, 0.01);
  // The linear budget agrees: validated (JCGM 101 §8).
  const double lpu = coverage_factor(0.95) * 2.0;
  EXPECT_TRUE(linear_validated(-lpu, lpu, p.low, p.high, numerical_tolerance(2.0)));
}

TEST(MonteCarloJcgm101, RectangularInputsGiveTheNarrowerInterval) {
  const McPoint p = monte_carlo_model(additive, four(Distribution::uniform, std::sqrt(3.0)), 3.0, 2, trials, 0.95);
  EXPECT_NEAR(p.low, -3.879407, scatter);  // §9.2.3, Monte Carlo ±3.88 (exact ±3.879407)
  EXPECT_NEAR(p.high, 3.879407, scatter);
}

TEST(MonteCarloJcgm101, OneDominantRectangularInputIsNotValidatedByTheLinearBudget) {
  auto in = four(Distribution::uniform, std::sqrt(3.0));
  in[3].bound = 10.0 * std::sqrt(3.0);
  const McPoint p = monte_carlo_model(additive, in, 3.0, 3, trials, 0.95);
  EXPECT_NEAR(p.low, -17.015814, scatter_dominant);  // §9.2.4, Monte Carlo ±17.0 (exact 17.015814)
  EXPECT_NEAR(p.high, 17.015814, scatter_dominant);
  const double lpu = 19.891462;  // law of propagation, §9.2.4
  EXPECT_FALSE(linear_validated(-lpu, lpu, p.low, p.high, numerical_tolerance(std::sqrt(103.0))));
}

TEST(MonteCarloJcgm101, NumericalToleranceFollowsSection79) {
  // δ = ½·10^l for u written c·10^l with two significant digits.
  EXPECT_DOUBLE_EQ(numerical_tolerance(2.0), 0.05);
  EXPECT_DOUBLE_EQ(numerical_tolerance(10.149), 0.5);
  EXPECT_DOUBLE_EQ(numerical_tolerance(0.0234), 0.0005);
}

// --- Distributions --------------------------------------------------------------

struct Moments {
  double mean, var;
  std::vector<double> sorted;
};
Moments sample(const ToleranceInput& in, std::uint64_t n) {
  Moments m{0, 0, {}};
  for (std::uint64_t u = 0; u < n; ++u)
    m.sorted.push_back(draw_unit({in}, 3.0, 7, u)[static_cast<std::size_t>(in.source)]);
  m.mean = std::accumulate(m.sorted.begin(), m.sorted.end(), 0.0) / static_cast<double>(n);
  for (double x : m.sorted) m.var += (x - m.mean) * (x - m.mean) / static_cast<double>(n - 1);
  std::sort(m.sorted.begin(), m.sorted.end());
  return m;
}

TEST(Distributions, SampleMomentsAndQuantilesMatchClosedForms) {
  constexpr std::uint64_t n = 200000;
  const double a = 1.0;
  // Closed forms: normal σ = a/3; uniform a²/3 (GUM §4.3.7); triangular a²/6
  // (GUM §4.3.9). Tolerances from the sample size: 5 standard errors.
  struct Case {
    Distribution d;
    double var;
  } cases[] = {{Distribution::normal, a * a / 9}, {Distribution::uniform, a * a / 3}, {Distribution::triangular, a * a / 6}};
  for (const auto& c : cases) {
    const Moments m = sample({Source::r25, a, c.d, 0.0}, n);
    const double se_mean = std::sqrt(c.var / n);
    EXPECT_NEAR(m.mean, 0.0, 5 * se_mean) << to_string(c.d);
    EXPECT_NEAR(m.var, c.var, 5 * c.var * std::sqrt(2.0 / n) * 1.5) << to_string(c.d);
  }
  // Quantiles of the normal against Boost.Math's quantile function.
  const Moments m = sample({Source::r25, a, Distribution::normal, 0.0}, n);
  const boost::math::normal_distribution<> nd(0.0, a / 3);
  for (double p : {0.01, 0.1, 0.5, 0.9, 0.99}) {
    const double q = m.sorted[static_cast<std::size_t>(p * n)];
    const double density = boost::math::pdf(nd, boost::math::quantile(nd, p));
    const double se = std::sqrt(p * (1 - p) / n) / density;  // asymptotic s.e. of a sample quantile
    EXPECT_NEAR(q, boost::math::quantile(nd, p), 5 * se) << p;
  }
  // Uniform quantiles are linear: the median and the 10 % point.
  const Moments u = sample({Source::r25, a, Distribution::uniform, 0.0}, n);
  EXPECT_NEAR(u.sorted[n / 10], -0.8, 0.01);
  EXPECT_NEAR(u.sorted[n / 2], 0.0, 0.01);
}

TEST(Distributions, GappedNeverDrawsInsideItsGapAndStaysInItsBound) {
  const ToleranceInput in{Source::r25, 0.05, Distribution::gapped, 0.01};
  const Moments m = sample(in, 100000);
  for (double x : m.sorted) {
    EXPECT_GE(std::fabs(x), 0.01);
    EXPECT_LE(std::fabs(x), 0.05);
  }
  EXPECT_NEAR(std::sqrt(m.var), standard_uncertainty(in, 3.0), 0.01 * standard_uncertainty(in, 3.0));
}

// --- The kernel against the scalar chain -------------------------------------------

// The kernel's block of `units` units from `first` at `temps`, every
// `stride`-th unit compared with the scalar chain's reading: the same error,
// or NaN where the chain has a status instead of a number.
void expect_kernel_matches_the_scalar_chain(const Chain& chain, const std::vector<double>& temps, std::uint64_t first,
                                            int units, int stride, const std::string& label) {
  std::vector<double> errors;
  simulate_block(chain, temps, first, units, errors);
  for (std::size_t ti = 0; ti < temps.size(); ++ti)
    for (int u = 0; u < units; u += stride) {
      // simulate_reading numbers readings by their index in the sweep.
      const Evaluation e = simulate_reading(chain, first + static_cast<std::uint64_t>(u), static_cast<std::uint32_t>(ti), temps[ti]);
      const double k = errors[static_cast<std::size_t>(u) + ti * static_cast<std::size_t>(units)];
      if (e.status != Status::ok) {
        EXPECT_TRUE(std::isnan(k)) << label << " t=" << temps[ti] << " unit " << u;
      } else {
        EXPECT_NEAR(k, e.error, 1e-6) << label << " t=" << temps[ti] << " unit " << u;
      }
    }
}

TEST(MonteCarloKernel, AgreesWithTheScalarChainOnEveryScenario) {
  for (const auto& file : testing::scenario_files()) {
    const Design d = design_with({}, file);
    const Chain chain(d);
    const auto all = d.conditions.temperatures();
    std::vector<double> temps;
    for (std::size_t i = 0; i < all.size(); i += 17) temps.push_back(all[i]);
    expect_kernel_matches_the_scalar_chain(chain, temps, 512, 64, 7, file);
  }
}

TEST(MonteCarloKernel, AgreesWithTheScalarChainUnderStrongSelfHeating) {
  // The kernel's first self-heating step is a Newton step accepted only
  // when its error bound is within the solve's 1e-9 K; with a poorly cooled
  // element and coarse temperature steps many units are refused and iterate
  // as before. Either way each reading must match the scalar chain, whose
  // fixed-point solve is independent of the kernel's.
  for (const char* diss : {"0.5mW/K", "0.15mW/K"}) {
    const Design d = design_with({{"sensor.dissipation", diss}, {"conditions.t_step", "7"}});
    const Chain chain(d);
    expect_kernel_matches_the_scalar_chain(chain, d.conditions.temperatures(), 0, 48, 5, diss);
  }
}

TEST(MonteCarloKernel, AgreesWithTheScalarChainOnAnRtdHeatedByKelvins) {
  // A unit heated by more than 1 K is read by the scalar chain, except an
  // RTD's whose loop gain cannot come near 1 (monte_carlo_reading.cpp,
  // rtd_solution_stands): its reading is then the kernel's own solve, which
  // must match the chain's independent fixed-point solve. A class B
  // Pt1000 against 1 kOhm from 3.3 V in the default design's mounting
  // (about 2 K of rise), and a Pt100 from 5 V with a tenth of that
  // dissipation constant down to −190 °C (some 6–9 K), on a 16-bit ADC so
  // that a hundredth of a kelvin shows in the reading. Leads and a parallel
  // resistor on the second, so that the general branch is taken.
  const std::vector<std::pair<std::string, testing::Overrides>> cases = {
      {"Pt1000, 1 kOhm, 3.3 V",
       {{"sensor.model", "rtd"}, {"sensor.r0", "1k"}, {"sensor.rtd_class", "B"}, {"divider.r_fixed", "1k"},
        {"firmware.conversion", "exact"}, {"adc.bits", "16"}}},
      {"Pt100, cryogenic, leads and a parallel resistor",
       {{"sensor.model", "rtd"}, {"sensor.r0", "100"}, {"sensor.rtd_class", "A"}, {"divider.r_fixed", "220"},
        {"supply.v_excitation", "5V"}, {"sensor.dissipation", "0.15mW/K"}, {"sensor.lead_resistance", "0.5"},
        {"divider.r_parallel", "10k"}, {"firmware.conversion", "exact"}, {"adc.bits", "16"},
        {"conditions.t_min", "-190"}, {"conditions.t_max", "20"}, {"conditions.t_step", "7"},
        {"requirement.window_min", "-150"}, {"requirement.window_max", "0"}}},
  };
  for (const auto& [label, o] : cases) {
    const Design d = design_with(o);
    const Chain chain(d);
    const auto temps = d.conditions.temperatures();
    // The case is what it says: the nominal unit is heated by more than 1 K everywhere.
    for (double t : temps) ASSERT_GT(chain.evaluate(Deviations{}, t).front.rise, 1.0) << label << " t=" << t;
    expect_kernel_matches_the_scalar_chain(chain, temps, 0, 48, 5, label);
  }
}

TEST(MonteCarloKernel, AgreesWithTheScalarChainOnAHeatedTable) {
  // A table sensor without leads or a parallel resistor takes a Newton step
  // first, accepted only where its error term is within the solve's 1e-9 K,
  // its iterate inside the table and in the piece it started from
  // (monte_carlo_reading.cpp, table_newton_first); the others iterate as
  // before, and a unit heated by more than 1 K is read by the scalar chain.
  // The freezer's table with its limit columns, fully on, 16 bits so that a
  // thousandth of a kelvin shows: against its own 100 kOhm from 3.3 V (some
  // 10 mK of rise, nearly every step accepted), against 10 kOhm (a quarter
  // kelvin, most refused; 6 V, up to 0.9 K; 10 V, over 1 K at the warm
  // end), and from 20 °C, where the sweep's first step starts 0.9 K from
  // the solution (a Newton step accepted there regardless of its error term
  // is off by some 3e-4 K, a quarter of an LSB); and a table without limits
  // that ends where the sweep ends (0 and 50 °C), so that units leave it.
  // Each reading must match the scalar chain's independent fixed-point
  // solve. Reading R at the old temperature instead of the iterate makes it
  // fail at 10 points.
  const testing::Overrides heated = {{"divider.duty", "100%"}, {"sensor.dissipation", "1mW/K"}, {"adc.bits", "16"},
                                     {"firmware.resolution", "0"}};
  const std::vector<std::pair<std::string, testing::Overrides>> cases = {
      {"100 kOhm, 3.3 V", {{"divider.r_fixed", "100k"}, {"supply.v_excitation", "3.3V"}}},
      {"10 kOhm, 3.3 V", {{"divider.r_fixed", "10k"}, {"supply.v_excitation", "3.3V"}}},
      {"10 kOhm, 6 V, 7 K steps",
       {{"divider.r_fixed", "10k"}, {"supply.v_excitation", "6V"}, {"conditions.t_step", "7"}}},
      {"10 kOhm, 10 V, 7 K steps",
       {{"divider.r_fixed", "10k"}, {"supply.v_excitation", "10V"}, {"conditions.t_step", "7"}}},
      {"10 kOhm, 6 V, 21..61 degC",
       {{"divider.r_fixed", "10k"}, {"supply.v_excitation", "6V"}, {"conditions.t_min", "21"},
        {"conditions.t_max", "61"}, {"conditions.t_step", "7"}, {"requirement.window_min", "30"},
        {"requirement.window_max", "50"}}},
  };
  for (const auto& [label, o] : cases) {
    const Design d = design_with(testing::with_extra(heated, o), testing::scenario_path("freezer_probe_limits.ini"));
    expect_kernel_matches_the_scalar_chain(Chain(d), d.conditions.temperatures(), 0, 64, 1, "freezer table, " + label);
  }
  const Design edges = design_with(testing::table_sensor_0_to_50(testing::with_extra(
      heated, {{"divider.r_fixed", "10k"}, {"supply.v_excitation", "3.3V"}, {"conditions.t_step", "0.5"}})));
  expect_kernel_matches_the_scalar_chain(Chain(edges), edges.conditions.temperatures(), 256, 64, 1, "table 0..50");
}

TEST(MonteCarloKernel, AgreesWithTheScalarChainOnASteinhartHartSensor) {
  // A Steinhart–Hart sensor's element in a loop of its own (the chain's
  // closed form, then the unit's stretch, shift and drift as SensorUnit
  // takes them) and its Newton first step (monte_carlo_reading.cpp,
  // steinhart_hart_newton_first): the default design with the published
  // 10 kOhm coefficients (the scenario's defaults), R25 and B tolerances,
  // heated by up to a quarter kelvin on a 16-bit ADC without output
  // rounding, in service and at end of life (a 2 % drift), and from 6 V
  // over 21..61 °C in 7 K steps (some 0.9 K, the sweep's first step as far
  // from the solution).
  // Leaving the drift out fails it at 2209 points; accepting every Newton
  // step whatever its error term, at 16.
  const testing::Overrides sh = {{"sensor.model", "steinhart-hart"}, {"divider.r_fixed", "10k"},
                                 {"divider.duty", "100%"},           {"sensor.dissipation", "1mW/K"},
                                 {"adc.bits", "16"},                 {"firmware.resolution", "0"}};
  const Design d = design_with(testing::with_extra(sh, {{"sensor.drift", "2%"}, {"conditions.t_step", "3"}}));
  expect_kernel_matches_the_scalar_chain(Chain(d), d.conditions.temperatures(), 0, 64, 1, "Steinhart-Hart");
  const Design life = at_end_of_life(d);
  expect_kernel_matches_the_scalar_chain(Chain(life), life.conditions.temperatures(), 0, 64, 1, "Steinhart-Hart, life");
  const Design hot = design_with(testing::with_extra(
      sh, {{"supply.v_excitation", "6V"}, {"conditions.t_min", "21"}, {"conditions.t_max", "61"},
           {"conditions.t_step", "7"}, {"requirement.window_min", "30"}, {"requirement.window_max", "50"}}));
  expect_kernel_matches_the_scalar_chain(Chain(hot), hot.conditions.temperatures(), 0, 64, 1, "Steinhart-Hart, 6 V");
}

TEST(MonteCarloKernel, AgreesWithTheScalarChainAtEndOfLife) {
  // Drift over life folded into its part's deviation (chain/drift.hpp): the
  // kernel's rows and the scalar chain must fold it alike. An absolute
  // supply so that every drift acts, hysteresis included; and a sensor whose
  // spread is a table's limit columns.
  const Design drift = design_with(
      {{"supply.ratiometric", "false"}, {"supply.v_reference", "3.3V"}, {"supply.v_reference_tol", "0.5%"},
       {"supply.v_excitation_tol", "0.5%"}, {"sensor.drift", "2%"}, {"divider.r_fixed_drift", "0.5%"},
       {"supply.v_reference_drift", "0.2%"}, {"supply.v_reference_hysteresis", "0.05%"},
       {"supply.v_excitation_drift", "0.3%"}, {"adc.offset_drift", "1"}, {"adc.gain_drift", "0.1%"}});
  ASSERT_EQ(drift.drift_inputs.size(), 7u);
  const Design life = at_end_of_life(drift);
  const auto all = life.conditions.temperatures();
  std::vector<double> temps;
  for (std::size_t i = 0; i < all.size(); i += 23) temps.push_back(all[i]);
  expect_kernel_matches_the_scalar_chain(Chain(life), temps, 256, 64, 5, "every drift");
  const Design limits = design_with({}, testing::scenario_path("freezer_probe_limits.ini"));
  expect_kernel_matches_the_scalar_chain(Chain(limits), limits.conditions.temperatures(), 0, 48, 7, "table limits");
}

TEST(MonteCarloKernel, AgreesWithTheScalarChainWithTheSampledNodeAndTheDrive) {
  // The kernel's vectorised exponentials and the scalar acquisition_map()
  // run the same combination (acquisition.hpp); every kind of node and
  // start, the drive resistance with its tolerance, both placements.
  const std::vector<std::pair<std::string, testing::Overrides>> cases = {
      {"no node capacitor, ground", {{"adc.c_sample", "15p"}, {"adc.precharge", "ground"}, {"adc.t_acq", "200n"}}},
      {"continuous node, any", {{"adc.c_sample", "15p"}, {"adc.precharge", "any"}, {"divider.c_node", "4.7n"}}},
      {"switched node, same, averaged",
       {{"adc.c_sample", "10p"}, {"divider.c_node", "100n"}, {"divider.settle_time", "1ms"}, {"adc.averaging", "4"},
        {"adc.sample_rate", "1k"}}},
      {"drive, high placement, reference",
       {{"adc.c_sample", "20p"}, {"adc.precharge", "reference"}, {"supply.r_drive", "40"}, {"supply.r_drive_tol", "30%"},
        {"divider.placement", "high"}, {"firmware.drive_compensation", "30"}}},
  };
  for (const auto& [label, o] : cases) {
    const Design d = design_with(o);
    const Chain chain(d);
    const auto all = d.conditions.temperatures();
    std::vector<double> temps;
    for (std::size_t i = 0; i < all.size(); i += 23) temps.push_back(all[i]);
    expect_kernel_matches_the_scalar_chain(chain, temps, 256, 64, 5, label);
  }
}

// --- Bands against the other engines -------------------------------------------------

TEST(MonteCarloBands, LieInsideTheWorstCaseBandWithoutNoiseOnEveryScenario) {
  // The calibration reference's bound is read as a certificate's k = 2
  // (docs/model.md §7): 4.6 % of its normal draws lie beyond ±U, so its
  // ±U is no box for the 99.73 % interval. The check holds it at k = 3,
  // where the interval stays inside the box (as for every other bound).
  for (const auto& file : testing::scenario_files()) {
    const Design d = design_with({{"adc.noise", "0"}, {"firmware.calibration_uncertainty_k", "3"}}, file);
    const Chain chain(d);
    const auto temps = d.conditions.temperatures();
    const WorstCase wc = worst_case(chain, temps);
    McOptions o;
    o.units = 4000;
    const McResult mc = monte_carlo(chain, temps, o);
    std::size_t compared = 0;
    for (std::size_t i = 0; i < temps.size(); ++i) {
      const McPoint& p = mc.points[i];
      if (p.valid == 0 || wc.points[i].failed_corners > 0 || !wc.points[i].any_ok) continue;
      // A normal input is untruncated: a draw beyond 3σ can leave the box, so
      // the check uses the coverage interval, which stays inside.
      EXPECT_GE(p.low, wc.points[i].low - 1e-9) << file << " at " << temps[i];
      EXPECT_LE(p.high, wc.points[i].high + 1e-9) << file << " at " << temps[i];
      ++compared;
    }
    EXPECT_EQ(compared, temps.size()) << file << ": every shipped scenario reads at every temperature";
  }
}

TEST(MonteCarloBands, ConvergeToTheLinearBandForSmallNormalTolerances) {
  const Design d = design_with(ideal({{"sensor.r25_tol", "0.1%"},
                                                   {"sensor.beta_tol", "0.1%"},
                                                   {"divider.r_fixed_tol", "0.1%"},
                                                   {"montecarlo.coverage", "95%"}}));
  const Chain chain(d);
  const std::vector<double> temps{-10.0, 30.0, 70.0};
  const LinearBudget lb = linear_budget(chain, temps);
  McOptions o;
  o.units = 200000;
  const McResult mc = monte_carlo(chain, temps, o);
  for (std::size_t i = 0; i < temps.size(); ++i) {
    const double half = 0.5 * (lb.points[i].high - lb.points[i].low);
    EXPECT_NEAR(mc.points[i].low, lb.points[i].low, 0.02 * half) << temps[i];
    EXPECT_NEAR(mc.points[i].high, lb.points[i].high, 0.02 * half) << temps[i];
  }
}

// --- Yield against a closed form ---------------------------------------------------------

TEST(MonteCarloYield, UniformFixedResistorAloneMatchesTheClosedForm) {
  // Only a uniform ±a fixed-resistor tolerance: the firmware infers R/(1 + δ),
  // so 1/T_est = 1/T − ln(1 + δ)/B (beta equation). |error| grows with T, so a
  // unit passes iff it passes at the window's top: ln(1 + δ) between
  // B(1/T − 1/(T − L)) and B(1/T − 1/(T + L)). Yield = that δ-interval's
  // share of [−a, a].
  const double a = 0.02, limit = 0.5, b = 3950.0, t = 60.0 + kelvin_offset;
  const Design d = design_with(ideal({{"divider.r_fixed_tol", "2%"},
                                                   {"montecarlo.distribution", "uniform"},
                                                   {"requirement.max_error", "0.5"},
                                                   {"requirement.window_min", "0"},
                                                   {"requirement.window_max", "60"}}));
  const double d_lo = std::exp(b * (1.0 / t - 1.0 / (t - limit))) - 1.0;
  const double d_hi = std::exp(b * (1.0 / t - 1.0 / (t + limit))) - 1.0;
  const double expected = (std::min(d_hi, a) - std::max(d_lo, -a)) / (2 * a);
  const Chain chain(d);
  McOptions o;
  o.units = 100000;
  const McResult mc = monte_carlo(chain, d.conditions.temperatures(), o);
  const double se = std::sqrt(expected * (1 - expected) / 100000.0);
  EXPECT_NEAR(mc.summary.yield, expected, 5 * se);
  EXPECT_LE(mc.summary.yield_low, mc.summary.yield);
  EXPECT_GE(mc.summary.yield_high, mc.summary.yield);
}

TEST(MonteCarloYield, ClopperPearsonMatchesScipysBetaQuantiles) {
  // Clopper & Pearson (1934): [B(α/2; k, n−k+1), B(1−α/2; k+1, n−k)],
  // computed independently with scipy.stats.beta.ppf.
  const std::string cmd = std::string(THERMARGIN_PYTHON) +
                          " -c \"from scipy.stats import beta; k,n=95,100;"
                          "print(repr(beta.ppf(0.025,k,n-k+1)), repr(beta.ppf(0.975,k+1,n-k)))\"";
  std::unique_ptr<FILE, int (*)(FILE*)> pipe(popen(cmd.c_str(), "r"), pclose);
  ASSERT_TRUE(pipe);
  double lo = 0, hi = 0;
  ASSERT_EQ(std::fscanf(pipe.get(), "%lf %lf", &lo, &hi), 2);
  const Interval i = clopper_pearson(95, 100, 0.05);
  EXPECT_NEAR(i.low, lo, 1e-9);
  EXPECT_NEAR(i.high, hi, 1e-9);
  EXPECT_EQ(clopper_pearson(100, 100, 0.05).high, 1.0);
}

// --- Reproducibility ---------------------------------------------------------------------

TEST(MonteCarloReproducibility, ResultsDependOnlyOnSeedAndUnits) {
  const Design d = design_with({});
  const Chain chain(d);
  const auto temps = d.conditions.temperatures();
  auto run = [&](int threads) {
    McOptions o;
    o.units = 3000;
    o.threads = threads;
    return monte_carlo(chain, temps, o);
  };
  const McResult one = run(1), two = run(2), eight = run(8);
  for (std::size_t i = 0; i < temps.size(); ++i) {
    EXPECT_EQ(one.points[i].low, two.points[i].low);
    EXPECT_EQ(one.points[i].high, eight.points[i].high);
    EXPECT_EQ(one.points[i].mean, eight.points[i].mean);
    EXPECT_EQ(one.points[i].stddev, two.points[i].stddev);
  }
  EXPECT_EQ(one.summary.good_units, eight.summary.good_units);
}

}  // namespace
}  // namespace thermargin

// The comparison with an independent NumPy simulation is in
// chain_second_opinion_test.cpp: every scenario and generated design, every
// distribution, one source at a time, with tolerances derived from the sample
// sizes (docs/checks.md). tests/reference/mc_second_opinion.py stays as the
// NumPy rate bench/run_times.sh measures.

namespace thermargin {
namespace {

TEST(MonteCarloKernel, RunawayIsAStatusNeverAnError) {
  // 50 V into a 100 Ω NTC with 0.1 mW/K (the chain's runaway case): every
  // reading fails, none becomes a band or a yield.
  const Design d = testing::design_with({{"sensor.r25", "100"},
                                         {"divider.r_fixed", "100"},
                                         {"supply.v_excitation", "50V"},
                                         {"sensor.dissipation", "0.1mW/K"}});
  const Chain chain(d);
  const std::vector<double> temps{-20.0, 25.0, 80.0};
  std::vector<double> errors;
  simulate_block(chain, temps, 0, 32, errors);
  for (double e : errors) EXPECT_TRUE(std::isnan(e));
  McOptions o;
  o.units = 1000;
  const McResult mc = monte_carlo(chain, temps, o);
  for (const auto& p : mc.points) {
    EXPECT_EQ(p.valid, 0u);
    EXPECT_EQ(p.failed, 1000u);
  }
  EXPECT_EQ(mc.summary.good_units, 0u);
}

}  // namespace
}  // namespace thermargin
