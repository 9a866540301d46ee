// The covering subset of shipped scenarios a sanitizer build's tests visit
// (tests/sanitizer_scenarios.txt, docs/checks.md "The sanitizer run"): it must
// take every code path the whole set takes, so that the sanitizers see each
// one. Checked in every build against the whole set, so a new scenario with a
// new kind of design shows here until the subset takes it too.
#include <algorithm>
#include <set>
#include <string>
#include <utility>
#include <vector>

#include <gtest/gtest.h>

#include "engine_fixture.hpp"
#include "thermargin/input/design.hpp"

namespace thermargin {
namespace {

// The kinds of code path one design takes: "what=which".
std::set<std::string> paths_of(const std::string& file) {
  const Design d = testing::design_with({}, file);
  std::set<std::string> out;
  out.insert("sensor=" + std::to_string(static_cast<int>(d.sensor.kind)));
  out.insert("conversion=" + std::to_string(static_cast<int>(d.firmware.conversion)));
  out.insert("calibration=" + std::to_string(static_cast<int>(d.firmware.calibration)));
  out.insert("placement=" + std::to_string(static_cast<int>(d.divider.placement)));
  out.insert("ratiometric=" + std::to_string(d.supply.ratiometric));
  if (d.adc.samples_settle()) out.insert("precharge=" + std::to_string(static_cast<int>(d.adc.precharge)));
  out.insert(std::string("drift=") + (d.drift_inputs.empty() ? "none" : "over life"));
  out.insert(std::string("self-heating=") + (d.sensor.dissipation > 0.0 ? "on" : "off"));
  out.insert(std::string("table limits=") + (d.sensor.table && d.sensor.table->has_limits() ? "yes" : "no"));
  return out;
}

std::set<std::string> paths_of(const std::vector<std::string>& files) {
  std::set<std::string> out;
  for (const auto& f : files) out.merge(paths_of(f));
  return out;
}

TEST(SanitizerSubset, TakesEveryPathTheShippedScenariosTake) {
  const auto subset = testing::sanitizer_scenario_files();
  const auto every = testing::every_scenario_file();
  ASSERT_GE(subset.size(), 4u);
  EXPECT_LT(subset.size(), every.size());  // else it saves nothing
  for (const auto& f : subset) EXPECT_NE(std::find(every.begin(), every.end(), f), every.end()) << f << " is not shipped";
  const auto want = paths_of(every), got = paths_of(subset);
  for (const auto& p : want) EXPECT_TRUE(got.count(p)) << "no scenario of the subset takes " << p;
  EXPECT_GE(want.size(), 15u);  // the kinds above do differ across the shipped scenarios
}

}  // namespace
}  // namespace thermargin
