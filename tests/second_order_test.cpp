// The second-order terms of the linear budget (JCGM 100:2008 §5.1.2, the
// note to eq. 10) on models whose variance is known in closed form, and on
// the chain where a tempco times the board temperature range dominates.
#include "thermargin/engines/second_order.hpp"

#include <cmath>
#include <tuple>

#include <gtest/gtest.h>

#include "engine_fixture.hpp"
#include "thermargin/engines/budget.hpp"
#include "thermargin/engines/linear_budget.hpp"
#include "thermargin/engines/monte_carlo.hpp"

namespace thermargin {
namespace {

double x(const Deviations& d, Source s) { return d[static_cast<std::size_t>(s)]; }
const StructurallyZero none = [](Source, Source) { return false; };

SecondOrder terms_of(const DeviationModel& m, const std::vector<ToleranceInput>& in, double k = 3.0) {
  const auto first = propagate(m, in, k);
  EXPECT_TRUE(first);
  std::vector<double> c, u;
  for (const auto& t : first->terms) {
    c.push_back(t.sensitivity);
    u.push_back(t.u);
  }
  return second_order_terms(m, in, c, u, first->centre, k, none, 0.0);
}

TEST(SecondOrder, ProductOfZeroMeanInputsIsTheProductOfTheirUncertainties) {
  // JCGM 100 §5.1.2, note to eq. 10: y = x1·x2 with zero means has no
  // first-order sensitivity, and u²(y) = u1²·u2² exactly. By hand: ±0.3 and
  // ±6 normal bounds at k = 3 are u1 = 0.1, u2 = 2, so u(y) = 0.2; c_12 = 1,
  // every third derivative 0, both first-order terms 0.
  const DeviationModel product = [](const Deviations& d) -> std::optional<double> {
    return x(d, Source::r25) * x(d, Source::beta);
  };
  const std::vector<ToleranceInput> in{{Source::r25, 0.3, Distribution::normal, 0.0},
                                       {Source::beta, 6.0, Distribution::normal, 0.0}};
  const auto first = propagate(product, in, 3.0);
  ASSERT_TRUE(first);
  EXPECT_NEAR(first->u_c, 0.0, 1e-12);
  const SecondOrder so = terms_of(product, in);
  ASSERT_EQ(so.pairs.size(), 1u);
  EXPECT_NEAR(so.pairs[0].c_ij, 1.0, 1e-9);
  EXPECT_NEAR(so.pairs[0].c_ijj, 0.0, 1e-6);
  EXPECT_NEAR(so.pairs[0].c_iij, 0.0, 1e-6);
  EXPECT_NEAR(std::sqrt(so.pairs[0].variance), 0.2, 1e-9);
  EXPECT_NEAR(so.own[0], 0.0, 1e-15);
  EXPECT_NEAR(so.own[1], 0.0, 1e-12);
  // The pair's reach: both at their bounds, the interaction alone is 0.3·6.
  EXPECT_NEAR(so.pairs[0].reach, 1.8, 1e-12);
}

TEST(SecondOrder, ProductRuleHoldsForAnyDistributionsOfThePair) {
  // Var(x1·x2) = u1²u2² needs only independence and zero means: a uniform
  // ±√3 (u = 1, GUM §4.3.7) times a triangular ±√6 (u = 1, GUM §4.3.9).
  const DeviationModel product = [](const Deviations& d) -> std::optional<double> {
    return 5.0 * x(d, Source::r25) * x(d, Source::beta);
  };
  const std::vector<ToleranceInput> in{{Source::r25, std::sqrt(3.0), Distribution::uniform, 0.0},
                                       {Source::beta, std::sqrt(6.0), Distribution::triangular, 0.0}};
  const SecondOrder so = terms_of(product, in);
  ASSERT_EQ(so.pairs.size(), 1u);
  EXPECT_NEAR(so.pairs[0].variance, 25.0, 1e-8);
}

TEST(SecondOrder, SquareOfOneInputTakesItsOwnFourthMoment) {
  // y = x²: Var = E[x⁴] − u⁴ = (κ − 1)·u⁴. Normal κ = 3 gives the GUM's
  // ½·c_ii²·u⁴ = 2u⁴; uniform κ = 9/5 (E[x⁴] = a⁴/5 on ±a) gives 0.8·u⁴;
  // triangular κ = 12/5 (E[x⁴] = a⁴/15) gives 1.4·u⁴. By hand.
  const DeviationModel square = [](const Deviations& d) -> std::optional<double> {
    return x(d, Source::r25) * x(d, Source::r25);
  };
  for (const auto& [dist, bound, factor] : {std::tuple{Distribution::normal, 3.0, 2.0},
                                            std::tuple{Distribution::uniform, std::sqrt(3.0), 0.8},
                                            std::tuple{Distribution::triangular, std::sqrt(6.0), 1.4}}) {
    const SecondOrder so = terms_of(square, {{Source::r25, bound, dist, 0.0}});
    EXPECT_NEAR(so.own[0], factor, 1e-8) << to_string(dist);  // u = 1
  }
}

TEST(SecondOrder, CubicTermPairsWithTheSlopeAsTheGumWritesIt) {
  // y = x + x³, x normal with u = 0.1: Var = u² + 2·E[x⁴] + E[x⁶]
  // = u² + 6u⁴ + 15u⁶ (normal moments). The note's terms give
  // c·c_iii·u⁴ = 1·6·u⁴; what is left is the sixth-order 15u⁶ = 1.5e-5.
  const DeviationModel cubic = [](const Deviations& d) -> std::optional<double> {
    const double v = x(d, Source::r25);
    return v + v * v * v;
  };
  const double u = 0.1;
  const std::vector<ToleranceInput> in{{Source::r25, 3 * u, Distribution::normal, 0.0}};
  const SecondOrder so = terms_of(cubic, in);
  EXPECT_NEAR(so.own[0], 6 * std::pow(u, 4), 1e-9);
  const double exact = u * u + 6 * std::pow(u, 4) + 15 * std::pow(u, 6);
  EXPECT_NEAR(u * u + so.own[0], exact, 15 * std::pow(u, 6) + 1e-9);
}

TEST(SecondOrder, KurtosisOfTheDistributions) {
  // E[x⁴]/u⁴: 3 for a normal, 9/5 uniform, 12/5 triangular (by hand); a
  // gapped normal with no gap is the normal truncated at ±3σ: SciPy's
  // excess kurtosis of truncnorm(-3, 3) is -0.1711144, so κ = 2.8288856
  // (/usr/bin/python3: scipy.stats.truncnorm(-3, 3).stats(moments='k') + 3).
  EXPECT_DOUBLE_EQ(kurtosis({Source::r25, 1.0, Distribution::normal, 0.0}, 3.0), 3.0);
  EXPECT_DOUBLE_EQ(kurtosis({Source::r25, 1.0, Distribution::uniform, 0.0}, 3.0), 1.8);
  EXPECT_DOUBLE_EQ(kurtosis({Source::r25, 1.0, Distribution::triangular, 0.0}, 3.0), 2.4);
  EXPECT_NEAR(kurtosis({Source::r25, 1.0, Distribution::gapped, 0.0}, 3.0), 2.8288855636, 1e-6);
}

// An absolute supply whose excitation drifts 150 ppm/K over a -20..70 degC
// board (its middle 25 degC): an ideal converter and sensor otherwise, no
// self-heating, the exact conversion.
testing::Overrides excitation_drift(const testing::Overrides& extra = {}) {
  return testing::with_extra(
      testing::ideal({{"supply.ratiometric", "false"}, {"supply.v_reference", "3.3V"},
                      {"supply.v_excitation_tempco", "150ppm"}, {"conditions.board", "-20..70"},
                      {"firmware.conversion", "exact"}}),
      extra);
}

const BudgetTerm* pair_row(const LinearPoint& p, const std::string& name) {
  for (const auto& t : p.pairs)
    if (t.name == name) return &t;
  return nullptr;
}

TEST(SecondOrderChain, TempcoTimesBoardRangeIsItsOwnRowWorkedByHand) {
  // error = f(α·(T_b − 25)) with f the error of a relative excitation change
  // ε: the reading is ρ(1 + ε), R/R_f = ρ/(1 − ρ), so d ln R/dε = 1/(1 − ρ)
  // = 2 at 25 degC (R = R_f) and, on the beta curve, dT/d ln R = −T²/B.
  // Hence c_ij = f'(0) = −2·298.15²/3950 K, the third derivatives vanish, and
  // u(pair) = |c_ij|·u_α·u_Tb with u_α = 150 ppm/3 (normal, k = 3) and
  // u_Tb = 45/√3 K (GUM §4.3.7). By hand: 45.0134 · 5e-5 · 25.9808 = 0.058474 K.
  const Design d = testing::design_with(excitation_drift());
  const LinearBudget lb = linear_budget(Chain(d), {25.0});
  ASSERT_EQ(lb.points[0].status, Status::ok);
  const BudgetTerm* p = pair_row(lb.points[0], "v_excitation_tempco \u00d7 board_temperature");
  ASSERT_NE(p, nullptr);
  const double c = -2.0 * 298.15 * 298.15 / 3950.0;
  EXPECT_NEAR(p->sensitivity, c, 1e-4 * std::fabs(c));
  const double by_hand = std::fabs(c) * 50e-6 * 45.0 / std::sqrt(3.0);
  EXPECT_NEAR(std::sqrt(p->variance()), by_hand, 1e-4 * by_hand);
  // The first-order budget has next to nothing: both sensitivities vanish,
  // leaving the 24-bit quantiser's 1.5e-6 K.
  EXPECT_LT(linear_budget(Chain(d), {25.0}, BudgetOrder::first).points[0].u_c, 1e-4 * by_hand);
  // The pair's reach: both at their bounds, |f(±150e-6·45)| ≈ 45.01·6.75e-3 = 0.304 K.
  EXPECT_NEAR(p->reach, std::fabs(c) * 150e-6 * 45.0, 0.01);
}

TEST(SecondOrderChain, SharesWithThePairRowsAddToOne) {
  const Design d = testing::design_with(excitation_drift({{"adc.gain_error", "0.2%"}, {"adc.offset", "2"},
                                                          {"adc.bits", "12"}}));
  const LinearBudget lb = linear_budget(Chain(d), {0.0, 25.0, 60.0});
  for (const auto& p : lb.points) {
    ASSERT_EQ(p.status, Status::ok);
    double sum = 0.0;
    for (const auto& t : p.terms) sum += t.variance();
    for (const auto& t : p.pairs) sum += t.variance();
    EXPECT_NEAR(sum / (p.u_c * p.u_c), 1.0, 1e-12) << p.t;
    EXPECT_FALSE(p.pairs.empty()) << p.t;
  }
}

TEST(SecondOrderChain, SummaryNamesTheLeadersByShareAndByReachAndSaysWhenTheyDiffer) {
  // Around 25 degC (a 20..30 degC window): R25 ±1 % (normal, k = 3) moves the reading by T²/B·1 % =
  // 0.225 K at its bound, u = 0.075 K; the excitation tempco over the board
  // range reaches 0.304 K (by hand above) with u = 0.058 K. R25 leads by share
  // of the variance, the tempco (alone and as the pair) by own reach.
  const Design d = testing::design_with(excitation_drift(
      {{"sensor.r25_tol", "1%"}, {"conditions.t_min", "20"}, {"conditions.t_max", "30"}, {"conditions.t_step", "5"},
       {"requirement.window_min", "20"}, {"requirement.window_max", "30"}}));
  const Budget b = run_budget(Chain(d), {.monte_carlo = false, .corners = CornerMethod::enumerate, .progress = {}});
  ASSERT_FALSE(b.leaders_by_share.empty());
  ASSERT_FALSE(b.leaders_by_reach.empty());
  EXPECT_EQ(b.leaders_by_share.front(), "r25");
  EXPECT_TRUE(b.leaders_by_reach.front() == "v_excitation_tempco" ||
              b.leaders_by_reach.front() == "v_excitation_tempco \u00d7 board_temperature")
      << b.leaders_by_reach.front();
  EXPECT_TRUE(b.leaders_differ);
}

TEST(SecondOrderChain, LinearBandMeetsMonteCarloWhereTheTempcoDominates) {
  // The second-order u_c against the Monte Carlo standard deviation of the
  // same design (JCGM 101 §8 compares the two budgets): within the Monte
  // Carlo estimate's scatter, σ·√((κ − 1)/(4N)) with κ ≤ 5.4 (a normal times
  // a uniform: 3·1.8) at three standard errors, while the first-order u_c
  // misses it by far more.
  constexpr double max_kurtosis = 3.0 * 1.8;  // E[(xy)⁴]/u⁴ of a normal times a uniform
  const Design d = testing::design_with(excitation_drift({{"adc.gain_error", "0.1%"}, {"adc.bits", "16"},
                                                          {"montecarlo.units", "200000"}}));
  const Chain chain(d);
  const std::vector<double> temps{10.0, 25.0, 40.0};
  const LinearBudget second = linear_budget(chain, temps), first = linear_budget(chain, temps, BudgetOrder::first);
  const McResult mc = monte_carlo(chain, temps, {});
  for (std::size_t i = 0; i < temps.size(); ++i) {
    const double sigma = mc.points[i].stddev;
    const double scatter = 3.0 * sigma * std::sqrt((max_kurtosis - 1.0) / (4.0 * 200000.0));
    EXPECT_NEAR(second.points[i].u_c, sigma, scatter) << temps[i];
    EXPECT_GT(std::fabs(first.points[i].u_c - sigma), 3.0 * scatter) << temps[i];
  }
}

}  // namespace
}  // namespace thermargin
