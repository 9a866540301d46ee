// What would help: one source improved at a time, checked against the
// beta equation in closed form, the GUM's combination rule and the
// geometry of the tolerance box.
#include "thermargin/engines/what_if.hpp"

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "engine_fixture.hpp"

namespace thermargin {
namespace {

using testing::design_with;
using testing::ideal;

BudgetOptions what_if_no_mc() {
  BudgetOptions o;
  o.monte_carlo = false;
  return o;
}

const WhatIfRow* row_named(const WhatIf& w, const std::string& name) {
  for (const auto& r : w.rows)
    if (r.name == name) return &r;
  return nullptr;
}

TEST(WhatIf, HalvedFixedResistorToleranceGivesTheBetaEquationAtHalfTheBound) {
  // Only a ±1 % fixed resistor on an ideal converter, low-side sensor, beta
  // conversion: the firmware infers R/(1 + δ), so 1/T_est = 1/T − ln(1 + δ)/B
  // exactly (beta equation, IEC 60539-1). Halved, the window's worst case is
  // that error at δ = ±0.5 %; removed, nothing is left but the 24-bit
  // reading interval (a few µK).
  const Design d = design_with(ideal({{"divider.r_fixed_tol", "1%"}, {"divider.placement", "low"}}));
  ASSERT_EQ(d.inputs.size(), 1u);
  const Chain chain(d);
  const Budget b = run_budget(chain, what_if_no_mc());
  const WhatIf w = what_if(chain, b);
  const WhatIfRow* r = row_named(w, "r_fixed");
  ASSERT_NE(r, nullptr);
  double expected = 0.0;
  for (double t : d.conditions.temperatures()) {
    if (t < d.requirement.window_min || t > d.requirement.window_max) continue;
    const double tk = t + kelvin_offset;
    for (double delta : {0.005, -0.005})
      expected = std::max(expected, std::fabs(1.0 / (1.0 / tk - std::log(1.0 + delta) / 3950.0) - tk));
  }
  EXPECT_NEAR(r->halved.wc_max_abs, expected, 1e-5);
  EXPECT_LT(r->removed.wc_max_abs, 1e-4);
  EXPECT_NEAR(w.as_designed.wc_max_abs, b.wc_max_abs, 1e-12);
  EXPECT_FALSE(w.directed);
}

constexpr double pair_threshold_slack = 1e-3;  // relative; see below

TEST(WhatIf, RemovingASourceTakesItsTermOutOfTheCombinedUncertainty) {
  // u_c² = Σ (c_i·u_i)² + the second-order terms (JCGM 100:2008 §5.1.2 eq.
  // 10 and its note): without source i the band is centre ± k·√(u_c² − the
  // source's own row − its pair rows) at every temperature, the other
  // derivatives unchanged (all are taken where source i is 0). Checked for
  // every source tried on the default. The tolerance allows for pairs near
  // the 1e-4 threshold, which is relative to the first-order variance and
  // so moves when a source goes: each such pair is below 1e-4 of u_c².
  const Design d = design_with({});
  const Chain chain(d);
  const Budget b = run_budget(chain, what_if_no_mc());
  const WhatIf w = what_if(chain, b);
  ASSERT_GE(w.rows.size(), 3u);
  for (const auto& r : w.rows) {
    if (r.name == "noise" || r.name == "resolution") continue;  // settings, not bounds
    double expected = 0.0;
    for (const auto& p : b.points) {
      if (!p.in_window) continue;
      double u2 = p.linear.u_c * p.linear.u_c;
      for (const auto& term : p.linear.terms)
        if (term.name == r.name) u2 -= term.variance();
      for (const auto& pair : p.linear.pairs)
        if (pair.name.starts_with(r.name + " \u00d7 ") || pair.name.ends_with(" \u00d7 " + r.name)) u2 -= pair.variance();
      const double half = b.k_p * std::sqrt(std::max(u2, 0.0));
      expected = std::max({expected, std::fabs(p.linear.centre - half), std::fabs(p.linear.centre + half)});
    }
    EXPECT_NEAR(r.removed.rss_max_abs, expected, pair_threshold_slack * expected) << r.name;
  }
}

TEST(WhatIf, ImprovingOnePartNeverWidensTheWorstCaseOfAnyScenario) {
  // The removed source's box is a face-section of the designed one and the
  // halved box lies inside it: for a chain monotone in each input (the
  // directed-corner test shows it is, on every scenario) the extremes cannot
  // grow. And the tried sources are real ones with their scenario keys.
  for (const auto& file : testing::scenario_files()) {
    const Design d = design_with({}, file);
    const Chain chain(d);
    const Budget b = run_budget(chain, what_if_no_mc());
    const WhatIf w = what_if(chain, b);
    EXPECT_FALSE(w.rows.empty()) << file;
    std::size_t compared = 0;
    for (const auto& r : w.rows) {
      EXPECT_NE(r.name, "quantization") << file;
      EXPECT_FALSE(r.key.empty()) << file << " " << r.name;
      if (!w.as_designed.readable || !r.removed.readable || !r.halved.readable) continue;
      EXPECT_LE(r.removed.wc_max_abs, w.as_designed.wc_max_abs + 1e-9) << file << " " << r.name;
      EXPECT_LE(r.halved.wc_max_abs, w.as_designed.wc_max_abs + 1e-9) << file << " " << r.name;
      ++compared;
    }
    EXPECT_EQ(compared, w.rows.size()) << file << ": every shipped scenario reads its window";
  }
}

TEST(WhatIf, RemovedEqualsTheBudgetOfTheDesignWithThatToleranceSetToZero) {
  // The same question asked through the scenario: sensor.r25_tol = 0.
  const Design d = design_with({});
  const Chain chain(d);
  const WhatIf w = what_if(chain, run_budget(chain, what_if_no_mc()));
  const WhatIfRow* r = row_named(w, "r25");
  ASSERT_NE(r, nullptr);
  EXPECT_EQ(r->key, "sensor.r25_tol");
  const Design d0 = design_with({{"sensor.r25_tol", "0"}});
  const Budget b0 = run_budget(Chain(d0), what_if_no_mc());
  EXPECT_NEAR(r->removed.wc_max_abs, b0.wc_max_abs, 1e-12);
  EXPECT_NEAR(r->removed.rss_max_abs, b0.rss_max_abs, 1e-9);
}

TEST(WhatIf, MostHelpfulFirstByTheVerdictsBasis) {
  const Design d = design_with({});
  const Chain chain(d);
  const WhatIf w = what_if(chain, run_budget(chain, what_if_no_mc()));
  for (std::size_t i = 1; i < w.rows.size(); ++i)
    EXPECT_LE(w.rows[i - 1].removed.wc_max_abs, w.rows[i].removed.wc_max_abs);
}

TEST(WhatIf, BeyondTheEnumerationLimitCornersAreDirectedAndSaid) {
  const Design d = design_with({});
  const Chain chain(d);
  WhatIfOptions o;
  o.max_evaluations = 10;  // far below 2^9 corners x 121 temperatures
  const WhatIf w = what_if(chain, run_budget(chain, what_if_no_mc()), o);
  EXPECT_TRUE(w.directed);
  const WhatIf full = what_if(chain, run_budget(chain, what_if_no_mc()));
  ASSERT_EQ(w.rows.size(), full.rows.size());
  // Directed corners equal enumeration on this design (worst_case_test).
  EXPECT_NEAR(w.as_designed.wc_max_abs, full.as_designed.wc_max_abs, 1e-6);
}

}  // namespace
}  // namespace thermargin
