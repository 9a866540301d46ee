// Checks of the R–T table sensor (rt_table.hpp): ln R against 1/T by a
// monotone cubic (PCHIP), no extrapolation, an exact inverse. The second
// opinion is SciPy's PchipInterpolator on the same points
// (tests/reference/pchip_table.py, run with Debian's /usr/bin/python3).
// The tables in tests/data/chain/ were generated from the Steinhart–Hart
// equation with the published 10 kΩ coefficients (common practice; see
// tests/data/chain/generate.py).
#include "thermargin/chain/rt_table.hpp"

#include <algorithm>
#include <bit>
#include <cmath>
#include <cstdint>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

// Boost 1.74's interpolators call isnan unqualified (as in rt_table.cpp).
namespace boost::math::interpolators {
using std::isnan;
}
#include <boost/math/interpolators/cubic_hermite.hpp>

#include "cli_run.hpp"
#include "thermargin/core/error.hpp"
#include "thermargin/chain/ntc.hpp"
#include "thermargin/input/rt_data.hpp"

namespace thermargin {
namespace {

const std::string data_dir = testing::data_path("chain/");

// Two implementations of the same interpolant agree to rounding: the cubic
// is evaluated in a different order in each.
constexpr double scipy_relative_tolerance = 1e-12;
constexpr double table_round_trip_tolerance = 1e-9;  // K
// The table is printed to 0.001 Ω; at the hot end (340 Ω) that is 1.5e-6 in ln R.
constexpr double point_tolerance = 1e-12;  // in ln R, at the table's own points
// PCHIP on 5 K steps against the curve it was sampled from: SciPy's
// PchipInterpolator on this file is within 5.65e-5 K of the Steinhart–Hart
// curve over −40…125 °C (computed with /usr/bin/python3, worst near −37 °C).
constexpr double curve_tolerance = 6e-5;  // K

const SteinhartHart generating_curve{1.129148e-3, 2.34125e-4, 8.76741e-8};

RtTable load(const std::string& name) { return RtTable(read_rt_data(data_dir + name)); }

// Runs a reference script and returns the numbers it prints, one a line.
std::vector<double> scipy_table_values(const std::string& arguments) {
  return testing::numbers_printed_by(std::string(THERMARGIN_PYTHON) + " " + testing::reference_script(arguments));
}

// Off-grid temperatures in every interval of the table at `path`, both end
// intervals included, against SciPy's PchipInterpolator on the same file.
void expect_agrees_with_scipy_at(const std::string& path, double t_first, double t_last) {
  const RtTable table(read_rt_data(path));
  std::vector<double> temperatures;
  for (double t = t_first + 0.7; t < t_last; t += 2.9) temperatures.push_back(t);
  temperatures.push_back(t_last - 0.01);
  std::ostringstream args;
  args.precision(17);
  args << "pchip_table.py " << path;
  for (double t : temperatures) args << " " << t;
  const std::vector<double> scipy = scipy_table_values(args.str());
  ASSERT_EQ(scipy.size(), temperatures.size());
  for (std::size_t i = 0; i < temperatures.size(); ++i) {
    const auto l = table.ln_resistance(temperatures[i] + kelvin_offset);
    ASSERT_TRUE(l) << temperatures[i];
    EXPECT_NEAR(std::exp(*l) / scipy[i], 1.0, scipy_relative_tolerance) << temperatures[i] << " degC";
  }
}

void expect_agrees_with_scipy(const std::string& table_name) {
  expect_agrees_with_scipy_at(data_dir + table_name, -40.0, 125.0);
}

TEST(RtTable, AgreesWithScipyPchipOffGridOnADatasheetTable) { expect_agrees_with_scipy("ntc10k_sh_5K.csv"); }

TEST(RtTable, AgreesWithScipyPchipOffGridOnAnUnevenDescendingTable) {
  expect_agrees_with_scipy("ntc10k_sh_uneven_desc.csv");
}

TEST(RtTable, AgreesWithScipyPchipOnTheIncubatorScenariosTable) {
  // The table a shipped scenario reads (scenarios/incubator.ini), -10..90 degC.
  expect_agrees_with_scipy_at(testing::scenario_path("incubator_ntc47k.csv"), -10.0, 90.0);
}

// The table's interpolants are kept as pieces evaluated inline
// (hermite_segments.hpp, which the Monte Carlo kernel vectorises) with the
// arithmetic of Boost.Math's cubic_hermite: Boost's own interpolator on the
// same points and slopes must give the same double at every point, at both
// ends and at 20 000 points between, for the curve and for a limits
// table's two spreads.
void expect_boosts_cubic_hermite_to_the_bit(const HermiteSegments& seg, const std::string& label) {
  boost::math::interpolators::cubic_hermite<std::vector<double>> f(std::vector<double>(seg.x), std::vector<double>(seg.y),
                                                                    std::vector<double>(seg.slope));
  std::vector<double> xs = seg.x;
  const double lo = seg.x.front(), hi = seg.x.back();
  for (int k = 0; k <= 20000; ++k) xs.push_back(lo + (hi - lo) * k / 20000.0);
  for (double x : xs) {
    if (x > hi) x = hi;
    EXPECT_EQ(std::bit_cast<std::uint64_t>(seg.at(x)), std::bit_cast<std::uint64_t>(f(x)))
        << label << " x=" << x << ": " << seg.at(x) << " against " << f(x);
  }
}

TEST(RtTable, InlinePiecesGiveBoostsCubicHermiteToTheBit) {
  for (const char* name : {"ntc10k_sh_5K.csv", "ntc10k_sh_uneven_desc.csv", "ntc10k_sh_0_50.csv"})
    expect_boosts_cubic_hermite_to_the_bit(load(name).curve_segments(), name);
  const RtTable limits(read_rt_data(testing::scenario_path("freezer_probe_ntc10k_limits.csv")));
  ASSERT_TRUE(limits.has_limits());
  expect_boosts_cubic_hermite_to_the_bit(limits.curve_segments(), "limits table, curve");
  expect_boosts_cubic_hermite_to_the_bit(*limits.spread_segments(true), "limits table, upper spread");
  expect_boosts_cubic_hermite_to_the_bit(*limits.spread_segments(false), "limits table, lower spread");
}

TEST(RtTable, PassesThroughItsPoints) {
  const RtData data = read_rt_data(data_dir + "ntc10k_sh_5K.csv");
  const RtTable table(data);
  for (const auto& p : data.points) {
    const auto l = table.ln_resistance(p.t_celsius + kelvin_offset);
    ASSERT_TRUE(l);
    EXPECT_NEAR(*l, std::log(p.r_ohm), point_tolerance) << p.t_celsius;
  }
}

TEST(RtTable, FollowsTheCurveItWasSampledFrom) {
  const RtTable table = load("ntc10k_sh_5K.csv");
  for (double t = -40.0; t <= 125.0; t += 0.1) {
    const auto l = table.ln_resistance(t + kelvin_offset);
    ASSERT_TRUE(l);
    const double t_curve = temperature_kelvin(generating_curve, *l) - kelvin_offset;
    EXPECT_NEAR(t_curve, t, curve_tolerance) << t;
  }
}

TEST(RtTable, InverseRoundTrips) {
  const RtTable table = load("ntc10k_sh_uneven_desc.csv");
  for (double t = -40.0; t <= 125.0; t += 0.37) {
    const auto l = table.ln_resistance(t + kelvin_offset);
    ASSERT_TRUE(l);
    const auto back = table.temperature_kelvin(*l);
    ASSERT_TRUE(back) << t;
    EXPECT_NEAR(*back - kelvin_offset, t, table_round_trip_tolerance) << t;
  }
}

TEST(RtTable, IsMonotoneBetweenPoints) {
  // Fritsch & Carlson (1980): the interpolant keeps the data's monotony.
  const RtTable table = load("ntc10k_sh_uneven_desc.csv");
  double previous = *table.ln_resistance(table.t_min_kelvin());
  for (double t = table.t_min_kelvin() + 0.05; t <= table.t_max_kelvin(); t += 0.05) {
    const double l = *table.ln_resistance(t);
    ASSERT_LT(l, previous) << t;
    previous = l;
  }
}

TEST(RtTable, SlopeAgreesWithCentralDifference) {
  const RtTable table = load("ntc10k_sh_5K.csv");
  constexpr double h = 1e-4, slope_tolerance = 1e-8;  // K; 1/K
  for (double t : {-37.0, 3.3, 25.0, 61.2, 122.0}) {
    const double tk = t + kelvin_offset;
    const double numeric = (*table.ln_resistance(tk + h) - *table.ln_resistance(tk - h)) / (2 * h);
    EXPECT_NEAR(*table.ln_resistance_slope(tk), numeric, slope_tolerance) << t;
  }
}

TEST(RtTable, NeverExtrapolates) {
  const RtTable table = load("ntc10k_sh_0_50.csv");
  EXPECT_TRUE(table.ln_resistance(0.0 + kelvin_offset));
  EXPECT_TRUE(table.ln_resistance(50.0 + kelvin_offset));
  EXPECT_FALSE(table.ln_resistance(-0.01 + kelvin_offset));
  EXPECT_FALSE(table.ln_resistance(50.01 + kelvin_offset));
  EXPECT_FALSE(table.temperature_kelvin(std::log(40e3)));  // colder than 0 °C
  EXPECT_FALSE(table.temperature_kelvin(std::log(3e3)));   // hotter than 50 °C
}

TEST(RtTable, ReadsDescendingFilesAsTheSameCurve) {
  const RtData up = read_rt_data(data_dir + "ntc10k_sh_5K.csv");
  RtData down = up;
  std::reverse(down.points.begin(), down.points.end());
  const RtTable a(up), b(down);
  for (double t = -40.0; t <= 125.0; t += 1.7)
    EXPECT_EQ(*a.ln_resistance(t + kelvin_offset), *b.ln_resistance(t + kelvin_offset)) << t;
}

std::string table_refusal(const std::string& name) {
  try {
    load(name);
  } catch (const input_error& e) {
    return e.what();
  }
  return "";
}

TEST(RtTable, RefusesFewerThanFourPoints) {
  const std::string message = table_refusal("bad_three_points.csv");
  EXPECT_NE(message.find("at least 4 points"), std::string::npos) << message;
}

TEST(RtTable, RefusesANonMonotonicTableNamingTheLine) {
  const std::string message = table_refusal("bad_nonmonotonic.csv");
  EXPECT_NE(message.find("bad_nonmonotonic.csv:5"), std::string::npos) << message;
  EXPECT_NE(message.find("monotonic"), std::string::npos) << message;
}

TEST(RtTable, RefusesAResistanceThatIsNotANumberNamingLineAndColumn) {
  const std::string message = table_refusal("bad_text.csv");
  EXPECT_NE(message.find("bad_text.csv:4"), std::string::npos) << message;
  EXPECT_NE(message.find("bad_text.csv:4:2"), std::string::npos) << message;
}

}  // namespace
}  // namespace thermargin
