// The linear (GUM) budget: the law of propagation on an additive model,
// the standard uncertainty of each distribution, the coverage factor and the
// contributor shares.
#include "thermargin/engines/linear_budget.hpp"

#include <cmath>
#include <map>
#include <cstdio>
#include <memory>

#include <gtest/gtest.h>

#include "engine_fixture.hpp"
#include "jcgm101_additive.hpp"
#include "thermargin/engines/budget.hpp"

namespace thermargin {
namespace {

// Y = X1 + X2 + X3 + X4 (JCGM 101:2008 §9.2), the Xi on four source slots.
using testing::additive;
using testing::four;

TEST(LinearBudget, AdditiveModelOfNormalInputsMatchesJcgm101Section922) {
  // Each Xi ~ N(0, 1) (a ±3 bound at sigma_per_tol = 3): u(y) = 2 and the 95 %
  // interval ±3.92 (JCGM 101 §9.2.2, published figures from memory; exact
  // ±3.919928 from the normal quantile).
  const auto p = propagate(additive, four(Distribution::normal, 3.0), 3.0);
  ASSERT_TRUE(p);
  EXPECT_NEAR(p->u_c, 2.0, 1e-9);
  EXPECT_NEAR(coverage_factor(0.95) * p->u_c, 3.919928, 1e-6);
  for (const auto& t : p->terms) EXPECT_NEAR(t.sensitivity, 1.0, 1e-9);
}

TEST(LinearBudget, AdditiveModelOfRectangularInputsMatchesJcgm101Section923) {
  // Each Xi rectangular on ±√3: u(xi) = a/√3 = 1 (GUM §4.3.7), u(y) = 2,
  // law of propagation ±3.92 (JCGM 101 §9.2.3, from memory).
  const auto p = propagate(additive, four(Distribution::uniform, std::sqrt(3.0)), 3.0);
  ASSERT_TRUE(p);
  EXPECT_NEAR(p->u_c, 2.0, 1e-9);
  EXPECT_NEAR(coverage_factor(0.95) * p->u_c, 3.92, 5e-3);
}

TEST(LinearBudget, OneDominantRectangularInputMatchesJcgm101Section924) {
  // X1–X3 on ±√3, X4 on ±10√3: u(y) = √103 = 10.149, LPU ±19.89
  // (JCGM 101 §9.2.4; exact 19.891462).
  auto in = four(Distribution::uniform, std::sqrt(3.0));
  in[3].bound = 10.0 * std::sqrt(3.0);
  const auto p = propagate(additive, in, 3.0);
  ASSERT_TRUE(p);
  EXPECT_NEAR(p->u_c, std::sqrt(103.0), 1e-9);
  EXPECT_NEAR(coverage_factor(0.95) * p->u_c, 19.891462, 1e-5);
}

TEST(LinearBudget, StandardUncertaintiesFollowTheGum) {
  // GUM §4.3.7 rectangular a/√3, §4.3.9 triangular a/√6; a normal ±a is a/k.
  EXPECT_DOUBLE_EQ(standard_uncertainty({Source::r25, 0.06, Distribution::uniform, 0}, 3), 0.06 / std::sqrt(3.0));
  EXPECT_DOUBLE_EQ(standard_uncertainty({Source::r25, 0.06, Distribution::triangular, 0}, 3), 0.06 / std::sqrt(6.0));
  EXPECT_DOUBLE_EQ(standard_uncertainty({Source::r25, 0.06, Distribution::normal, 0}, 3), 0.02);
  EXPECT_DOUBLE_EQ(standard_uncertainty({Source::r25, 0.06, Distribution::normal, 0}, 2), 0.03);
}

TEST(LinearBudget, GappedUncertaintyMatchesScipyIntegration) {
  // A normal grade (σ = a/3) truncated to the bound with |x| < gap removed:
  // √E[x²] by scipy.integrate.quad, an independent second opinion.
  const double a = 0.05, gap = 0.01;
  const std::string cmd = std::string(THERMARGIN_PYTHON) +
                          " -c \"from scipy import integrate, stats; s=0.05/3; n=stats.norm(0,s);"
                          "m=integrate.quad(lambda x: x*x*n.pdf(x),0.01,0.05)[0]/integrate.quad(n.pdf,0.01,0.05)[0];"
                          "print(repr(m**0.5))\"";
  std::unique_ptr<FILE, int (*)(FILE*)> pipe(popen(cmd.c_str(), "r"), pclose);
  ASSERT_TRUE(pipe);
  double expected = 0.0;
  ASSERT_EQ(std::fscanf(pipe.get(), "%lf", &expected), 1);
  EXPECT_NEAR(standard_uncertainty({Source::r25, a, Distribution::gapped, gap}, 3), expected, 1e-10);
}

TEST(LinearBudget, CoverageFactorIsTheNormalQuantile) {
  // 99.73 % ↔ k = 3.0 (docs/engines.md); 95 % ↔ 1.959964 (normal tables).
  EXPECT_NEAR(coverage_factor(0.9973), 3.0, 1e-3);
  EXPECT_NEAR(coverage_factor(0.95), 1.959964, 1e-6);
}

TEST(LinearBudget, EachShareIsItsTermsVarianceOverTheSumAtEveryTemperatureAndOverTheWindow) {
  // docs/engines.md: a source's share is its row's part of u_c² — (c_i u_i)²
  // with its own second-order terms, or a pair's whole term (JCGM 100
  // 5.1.2) — over u_c² at a temperature, and over the window its summed
  // variance over the window's summed u_c².
  // Recomputed here from the linear terms (a consistency check of the table
  // against the budget's own terms; the terms themselves are checked against
  // the independent model in chain_second_opinion_test.cpp).
  int compared = 0, windows = 0;
  for (const auto& file : testing::scenario_files()) {
    const Design d = testing::design_with({{"montecarlo.units", "1000"}}, file);
    const Chain chain(d);
    BudgetOptions o;
    o.monte_carlo = false;
    const Budget b = run_budget(chain, o);
    std::map<std::string, double> window_var;
    double window_total = 0.0;
    for (const auto& p : b.points) {
      ASSERT_FALSE(p.contributors.empty()) << file << " at " << p.t;  // every scenario reads everywhere
      std::map<std::string, double> var;
      for (const auto& t : p.linear.terms) var[t.name] = t.variance();
      for (const auto& t : p.linear.pairs) var[t.name] = t.variance();
      const double total = p.linear.u_c * p.linear.u_c;
      ASSERT_EQ(p.contributors.size(), var.size());
      for (const auto& c : p.contributors) {
        ASSERT_TRUE(var.count(c.name)) << c.name;
        EXPECT_NEAR(c.share, var[c.name] / total, 1e-12) << file << " at " << p.t << " " << c.name;
        ++compared;
      }
      if (!p.in_window) continue;  // the window's sums take the window's temperatures only
      for (const auto& [name, v] : var) window_var[name] += v;
      window_total += total;
    }
    ASSERT_FALSE(b.window_contributors.empty());
    for (const auto& c : b.window_contributors) {
      EXPECT_NEAR(c.share, window_var[c.name] / window_total, 1e-12) << file << " " << c.name;
      ++windows;
    }
  }
  EXPECT_GT(compared, 1000);
  EXPECT_GT(windows, 6 * 8);
}

TEST(LinearBudget, FloorQuantiserCentresTheBandHalfAnLsbLow) {
  // Truncation's mean error is −½ LSB (IEEE Std 1241): the centre is the
  // error of a reading ½ LSB low, to first order −½ LSB times the slope.
  const Design r = testing::design_with(testing::ideal({{"adc.bits", "10"}}));
  const Design f = testing::design_with(testing::ideal({{"adc.bits", "10"}, {"adc.quantizer", "floor"}}));
  const Chain cr(r), cf(f);
  const auto lr = linear_budget(cr, {25.0}), lf = linear_budget(cf, {25.0});
  EXPECT_DOUBLE_EQ(lf.points[0].centre, cr.evaluate({}, 25.0, ReadingShift{-0.5, {-0.5, -0.5}}).error);
  const double h = 1e-3;
  const double slope = (cr.evaluate({}, 25.0, ReadingShift{h, {0, 0}}).error -
                        cr.evaluate({}, 25.0, ReadingShift{-h, {0, 0}}).error) / (2 * h);
  EXPECT_NEAR(lf.points[0].centre - lr.points[0].centre, -0.5 * slope, 1e-3 * std::fabs(slope));
}

}  // namespace
}  // namespace thermargin
