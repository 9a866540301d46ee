// Tests of R–T tables that carry the unit spread (R_min/R_max or ±% columns;
// docs/model.md §12): the two identities with the beta model's spread
// (IEC 60539-1's beta equation, computed in the test), fit_spread() giving
// back the tolerances a table was made from, and the refusals.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include <unistd.h>

#include "engine_fixture.hpp"
#include "thermargin/chain/chain.hpp"
#include "thermargin/chain/rt_table.hpp"
#include "thermargin/core/error.hpp"
#include "thermargin/engines/worst_case.hpp"
#include "thermargin/input/rt_data.hpp"
#include "thermargin/tools/fit.hpp"

namespace thermargin {
namespace {

using testing::design_with;
using testing::ideal;
using testing::Overrides;

constexpr double r25 = 10e3, beta = 3950.0, t0 = 298.15;

// IEC 60539-1's beta equation: R = R25·exp(B·(1/T − 1/T0)).
double limits_beta_r(double t_celsius, double r25_factor = 1.0, double beta_factor = 1.0) {
  return r25 * r25_factor * std::exp(beta * beta_factor * (1.0 / (t_celsius + 273.15) - 1.0 / t0));
}

std::string write_table(const std::string& name, const std::string& text) {
  const auto path = std::filesystem::temp_directory_path() / ("thermargin_" + std::to_string(::getpid()) + "_" + name);
  std::ofstream(path) << text;
  return path.string();
}

// Every 5 degC from -20 to 80 degC, to 17 digits.
std::string table_text(bool percent, double r25_tol, double beta_tol) {
  std::ostringstream out;
  out.precision(17);
  out << (percent ? "t_degC,r_ohm,tol_pct\n" : "t_degC,r_ohm,r_min_ohm,r_max_ohm\n");
  for (int t = -20; t <= 80; t += 5) {
    out << t << "," << limits_beta_r(t);
    if (percent) {
      out << "," << 100.0 * r25_tol << "\n";
      continue;
    }
    // Both tolerances pushing the same way: R up when (1 + b) raises B·(1/T − 1/T0).
    const double s = t < 25 ? 1.0 : -1.0;
    out << "," << limits_beta_r(t, 1.0 - r25_tol, 1.0 - s * beta_tol) << "," << limits_beta_r(t, 1.0 + r25_tol, 1.0 + s * beta_tol)
        << "\n";
  }
  return out.str();
}

Overrides common(const std::string& step) {
  return ideal({{"firmware.conversion", "beta"}, {"firmware.r25", "10k"}, {"firmware.beta", "3950"},
                {"conditions.t_min", "-20"}, {"conditions.t_max", "80"}, {"conditions.t_step", step},
                {"requirement.window_min", "-20"}, {"requirement.window_max", "80"}});
}

TEST(TableLimits, ConstantPercentColumnIsTheR25Tolerance) {
  // ln R_unit = ln R_nom + z·ln(1 ± δ) at z = ±1 is the beta model's
  // ln(1 + δR) at δR = ±δ with no B tolerance: the same worst case, to the
  // interpolation error of the table's nominal curve, bounded below.
  const std::string file = write_table("pct.csv", table_text(true, 0.01, 0.0));
  const Design table = design_with(testing::with_extra(
      common("2.5"), {{"sensor.model", "table"}, {"sensor.table_file", file}, {"sensor.r25_tol", "0"},
                      {"sensor.beta_tol", "0"}}));
  const Design model = design_with(testing::with_extra(common("2.5"), {{"sensor.r25_tol", "1%"}, {"sensor.beta_tol", "0"}}));
  ASSERT_EQ(table.inputs.size(), 1u);
  EXPECT_EQ(table.inputs.front().source, Source::table_spread);
  const auto temps = table.conditions.temperatures();
  const WorstCase a = worst_case(Chain(table), temps, {.method = CornerMethod::enumerate});
  const WorstCase b = worst_case(Chain(model), temps, {.method = CornerMethod::enumerate});
  // The bound: the table's curve against the beta equation, in K, at every temperature.
  const RtTable& curve = *table.sensor.table;
  for (std::size_t i = 0; i < temps.size(); ++i) {
    const double t = temps[i] + 273.15;
    const double interpolation_k =
        std::abs(*curve.ln_resistance(t) - std::log(limits_beta_r(temps[i]))) / (beta / (t * t)) + 1e-9;
    EXPECT_NEAR(a.points[i].low, b.points[i].low, 2.0 * interpolation_k + 1e-6) << temps[i];
    EXPECT_NEAR(a.points[i].high, b.points[i].high, 2.0 * interpolation_k + 1e-6) << temps[i];
    EXPECT_GT(a.points[i].high, 0.1);  // the spread is there: 1 % is at least 0.15 K over this range
  }
  std::filesystem::remove(file);
}

TEST(TableLimits, LimitsFromR25AndBTolerancesReproduceTheBetaModel) {
  // Limits from r25_tol = 1 % and beta_tol = 0.5 % by the beta equation: at
  // each table temperature the corner of (δR, δβ) that moves R furthest is
  // z = ±1, so the worst-case bands agree there (h is exact at the points).
  const std::string file = write_table("minmax.csv", table_text(false, 0.01, 0.005));
  const Design table = design_with(testing::with_extra(
      common("5"), {{"sensor.model", "table"}, {"sensor.table_file", file}}));
  const Design model =
      design_with(testing::with_extra(common("5"), {{"sensor.r25_tol", "1%"}, {"sensor.beta_tol", "0.5%"}}));
  EXPECT_EQ(table.sensor.r25_tol, 0.0);
  const auto temps = table.conditions.temperatures();
  const WorstCase a = worst_case(Chain(table), temps, {.method = CornerMethod::enumerate});
  const WorstCase b = worst_case(Chain(model), temps, {.method = CornerMethod::enumerate});
  for (std::size_t i = 0; i < temps.size(); ++i) {
    EXPECT_NEAR(a.points[i].low, b.points[i].low, 1e-6) << temps[i];
    EXPECT_NEAR(a.points[i].high, b.points[i].high, 1e-6) << temps[i];
  }
  // And fit_spread gives the two tolerances back.
  const SpreadFit s = fit_spread(read_rt_data(file));
  ASSERT_TRUE(s.found);
  EXPECT_NEAR(s.r25_tol, 0.01, 1e-6);
  EXPECT_NEAR(s.beta_tol, 0.005, 1e-6);
  EXPECT_LT(std::abs(s.max_difference), 1e-3);
  std::filesystem::remove(file);
}

TEST(TableLimits, ToleranceKeysBesideLimitsAreRefused) {
  const std::string file = write_table("refuse.csv", table_text(true, 0.01, 0.0));
  // The built-in defaults (1 % each) give way to the table's limits.
  const Design d = design_with({{"sensor.model", "table"}, {"sensor.table_file", file}});
  EXPECT_EQ(d.sensor.r25_tol, 0.0);
  EXPECT_EQ(d.sensor.beta_tol, 0.0);
  EXPECT_TRUE(std::any_of(d.inputs.begin(), d.inputs.end(),
                          [](const ToleranceInput& in) { return in.source == Source::table_spread; }));
  try {
    design_with({{"sensor.model", "table"}, {"sensor.table_file", file}, {"sensor.beta_tol", "0.5%"}});
    FAIL() << "no refusal";
  } catch (const input_error& e) {
    EXPECT_NE(std::string(e.what()).find("sensor.beta_tol"), std::string::npos) << e.what();
  }
  std::filesystem::remove(file);
}

void expect_refused(const std::string& text, const std::string& where) {
  try {
    parse_rt_data(text, "limits.csv");
    FAIL() << "no refusal for " << text;
  } catch (const input_error& e) {
    EXPECT_NE(std::string(e.what()).find(where), std::string::npos) << e.what();
  }
}

TEST(TableLimits, BadLimitsAreRefusedWithLineAndColumn) {
  expect_refused("t,r,r_min,r_max\n0,32000,31000,33000\n25,10000,10100,10200\n", "limits.csv:3:3");
  expect_refused("t,r,r_min,r_max\n0,32000,31000,33000\n25,10000,9900,9950\n", "limits.csv:3:4");
  expect_refused("t,r,tol\n0,32000,1\n25,10000,100\n", "limits.csv:3:3");
  expect_refused("t,r,tol\n0,32000,-1\n", "limits.csv:2:3");
  expect_refused("t,r,r_min,r_max\n0,32000,31000\n", "limits.csv:2");
}

}  // namespace
}  // namespace thermargin
