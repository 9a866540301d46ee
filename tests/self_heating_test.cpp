// Checks of the self-heating solution (self_heating.hpp, chain.cpp):
// T_element = T_true + d·P/δ, P = V_element²/R(T_element) (docs/model.md §2,
// IEC 60539-1's dissipation constant δ = ΔP/ΔT), solved to 1e-9 K, with
// thermal runaway reported as a status. The second opinion is SciPy's brentq
// on T_e − T − d·V_e²/(R(T_e)·δ) = 0 for the same divider
// (tests/reference/self_heating.py, Debian's /usr/bin/python3).
#include "thermargin/chain/self_heating.hpp"

#include <cmath>
#include <optional>
#include <sstream>
#include <string>
#include <utility>
#include <vector>

#include <gtest/gtest.h>

#include "cli_run.hpp"
#include "engine_fixture.hpp"
#include "thermargin/chain/chain.hpp"
#include "thermargin/engines/nominal.hpp"
#include "thermargin/input/scenario.hpp"
#include "thermargin/chain/sensor.hpp"

namespace thermargin {
namespace {

// The fixed point stops when a step is ≤ 1e-9 K; what remains is that step
// times the loop gain (≪ 1 in any design here), plus rounding of ~300 K.
constexpr double heating_solver_tolerance = 2 * self_heating_tolerance;  // K
// brentq is run to xtol 1e-13 K; the two solutions differ by the fixed point's tolerance.
constexpr double heating_scipy_tolerance = 2 * self_heating_tolerance;  // K
constexpr double addition_tolerance = 1e-12;  // K, one rounding of a sum near 300 K

using testing::design_with;
Design design_from_file(const std::string& name) { return design_with({}, testing::scenario_path(name)); }

// --- the solver on rises of known fixed point -------------------------------

TEST(SelfHeatingSolver, ConvergesToTheFixedPointOfALinearRise) {
  // rise(T) = a + g (T − T_true) has the fixed point T_true + a/(1 − g).
  for (double g : {-0.8, -0.3, 0.0, 0.3, 0.8}) {
    const double t_true = 300.0, a = 2.0;
    const SelfHeating r = solve_self_heating(t_true, [&](double t) -> std::optional<double> { return a + g * (t - t_true); });
    ASSERT_EQ(r.outcome, SelfHeating::Outcome::converged) << g;
    EXPECT_NEAR(r.rise, a / (1 - g), heating_solver_tolerance / (1 - std::fabs(g))) << g;
    EXPECT_NEAR(r.t_element, t_true + r.rise, addition_tolerance) << g;
  }
}

TEST(SelfHeatingSolver, ReportsRunawayWhenTheLoopGainReachesOne) {
  // |g| ≥ 1: the iteration cannot contract (docs/model.md §2: runaway is an error,
  // never a number). A negative gain this large needs a rise of at least
  // T²/B (tens of kelvin for an NTC) and is reported the same way.
  for (double g : {1.0, 1.5, 40.0, -1.5}) {
    const SelfHeating r = solve_self_heating(300.0, [&](double t) -> std::optional<double> { return 2.0 + g * (t - 300.0); });
    EXPECT_EQ(r.outcome, SelfHeating::Outcome::runaway) << g;
  }
}

TEST(SelfHeatingSolver, ReportsAnElementThatLeavesItsCurve) {
  const SelfHeating r = solve_self_heating(300.0, [](double t) -> std::optional<double> {
    if (t > 301.0) return std::nullopt;
    return 5.0;
  });
  EXPECT_EQ(r.outcome, SelfHeating::Outcome::out_of_range);
}

// --- the chain's self-heating ---------------------------------------------

// d·P/δ for the element at t_element, computed from the divider by hand:
// branch = (R + lead) ∥ R_par, V_branch = V·branch/(R_fixed + branch),
// V_element = V_branch·R/(R + lead) (Ohm's law; the same for either placement).
double rise_by_hand(const Design& d, double dissipation_deviation, double t_element_celsius) {
  const double r = std::exp(*nominal_ln_resistance(d.sensor, t_element_celsius + kelvin_offset));
  const double series = r + d.sensor.lead_resistance;
  const double branch = d.divider.r_parallel ? series * *d.divider.r_parallel / (series + *d.divider.r_parallel) : series;
  const double v_branch = d.supply.v_excitation * branch / (d.divider.r_fixed + branch);
  const double v_element = v_branch * r / series;
  return d.divider.duty * v_element * v_element / r / (d.sensor.dissipation * (1 + dissipation_deviation));
}

TEST(SelfHeating, RiseEqualsDutyTimesPowerOverDissipation) {
  const std::vector<Design> designs = {
      design_with({{"divider.r_fixed", "3k3"}, {"supply.v_excitation", "5"}, {"sensor.dissipation", "1mW/K"}}),
      design_with({{"divider.placement", "high"}, {"divider.r_fixed", "4k7"}, {"sensor.dissipation", "2mW/K"},
                   {"divider.duty", "25%"}}),
      design_with({{"divider.r_parallel", "47k"}, {"sensor.lead_resistance", "15"}, {"sensor.dissipation", "0.5mW/K"}}),
      design_with({{"sensor.model", "rtd"}, {"sensor.r0", "100"}, {"divider.r_fixed", "220"},
                   {"sensor.dissipation", "3mW/K"}, {"sensor.lead_resistance", "0.8"}})};
  for (const Design& d : designs) {
    const Chain chain(d);
    for (double dissipation_deviation : {0.0, 0.2, -0.2}) {
      Deviations dev{};
      dev[static_cast<std::size_t>(Source::dissipation)] = dissipation_deviation;
      for (double t = -20.0; t <= 80.0; t += 10.0) {
        const FrontEnd fe = chain.front_end(dev, t);
        ASSERT_EQ(fe.status, Status::ok) << t;
        EXPECT_GT(fe.rise, 0.0);
        EXPECT_NEAR(fe.rise, rise_by_hand(d, dissipation_deviation, fe.t_element), heating_solver_tolerance) << t;
        EXPECT_NEAR(fe.t_element, t + fe.rise, addition_tolerance);
      }
    }
  }
}

// T_e (°C) from the SciPy script for a beta-model design, at each temperature.
std::vector<double> scipy_element_temperatures(const Design& d, const std::vector<double>& temperatures) {
  std::ostringstream command;
  command.precision(17);
  command << testing::reference_command("self_heating.py", "") << "r25=" << d.sensor.r25 << " beta=" << d.sensor.beta
          << " r_fixed=" << d.divider.r_fixed << " v_exc=" << d.supply.v_excitation << " duty=" << d.divider.duty
          << " dissipation=" << d.sensor.dissipation << " lead=" << d.sensor.lead_resistance << " t=";
  for (std::size_t i = 0; i < temperatures.size(); ++i) command << (i ? "," : "") << temperatures[i];
  if (d.divider.r_parallel) command << " r_par=" << *d.divider.r_parallel;
  return testing::numbers_printed_by(command.str());
}

void expect_heating_agrees_with_scipy(const Design& d) {
  ASSERT_EQ(d.sensor.kind, SensorKind::beta);
  const Chain chain(d);
  std::vector<double> temperatures;
  for (double t = d.conditions.t_min; t <= d.conditions.t_max; t += (d.conditions.t_max - d.conditions.t_min) / 8)
    temperatures.push_back(t);
  const std::vector<double> scipy = scipy_element_temperatures(d, temperatures);
  ASSERT_EQ(scipy.size(), temperatures.size());
  for (std::size_t i = 0; i < temperatures.size(); ++i) {
    const FrontEnd fe = chain.front_end(nominal_deviations(), temperatures[i]);
    ASSERT_EQ(fe.status, Status::ok) << temperatures[i];
    EXPECT_GT(fe.rise, 0.0);
    EXPECT_NEAR(fe.t_element, scipy[i], heating_scipy_tolerance) << d.title << " at " << temperatures[i];
  }
}

TEST(SelfHeating, AgreesWithScipyBrentqOnTheFermentationProbe) {
  expect_heating_agrees_with_scipy(design_from_file("fermentation_probe.ini"));
}

TEST(SelfHeating, AgreesWithScipyBrentqOnTheHighSideBatteryGuard) {
  expect_heating_agrees_with_scipy(design_from_file("battery_charge_guard.ini"));
}

TEST(SelfHeating, AgreesWithScipyBrentqWithLeadsAndAParallelResistor) {
  // An exaggerated divider so that the rise is large (about a kelvin).
  expect_heating_agrees_with_scipy(design_with({{"divider.r_fixed", "2k2"},
                                        {"supply.v_excitation", "5V"},
                                        {"sensor.dissipation", "1mW/K"},
                                        {"sensor.lead_resistance", "25"},
                                        {"divider.r_parallel", "33k"},
                                        {"divider.placement", "high"}}));
}

TEST(SelfHeating, ZeroDissipationSwitchesItOff) {
  const Design d = design_with({{"sensor.dissipation", "0"}});
  const Chain chain(d);
  for (double t : {-20.0, 25.0, 80.0}) {
    const FrontEnd fe = chain.front_end(nominal_deviations(), t);
    EXPECT_EQ(fe.rise, 0.0);
    EXPECT_EQ(fe.t_element, t);
  }
}

TEST(SelfHeating, AbsurdExcitationIsRunawayNeverANumber) {
  // 50 V into a 100 Ω NTC with 0.1 mW/K: hundreds of watts would be needed
  // to hold the element anywhere near the medium.
  for (const char* r_fixed : {"1", "100"}) {
    const Design d = design_with({{"sensor.r25", "100"},
                                  {"divider.r_fixed", r_fixed},
                                  {"supply.v_excitation", "50V"},
                                  {"sensor.dissipation", "0.1mW/K"}});
    const Chain chain(d);
    for (const NominalPoint& p : nominal_sweep(chain)) {
      EXPECT_EQ(p.status, Status::runaway) << r_fixed << " at " << p.t;
      EXPECT_EQ(p.error, 0.0);  // no number is produced
    }
    Deviations dev{};
    dev[static_cast<std::size_t>(Source::dissipation)] = 0.2;
    EXPECT_EQ(chain.evaluate(dev, 25.0).status, Status::runaway);
  }
}

TEST(SelfHeating, ElementHeatedPastTheEndOfItsTableIsOutOfTable) {
  // A sensor table that ends at 50 °C: the medium at 50 °C is inside it,
  // the self-heated element is not.
  const Design d = design_with(testing::table_sensor_0_to_50());
  const Chain chain(d);
  EXPECT_EQ(chain.front_end(nominal_deviations(), 49.0).status, Status::ok);
  EXPECT_EQ(chain.front_end(nominal_deviations(), 50.0).status, Status::out_of_table);
}

}  // namespace
}  // namespace thermargin
