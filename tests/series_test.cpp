// Checks of the preferred-number series (series.hpp) against IEC 60063:
// E24 in full as IEC 60063 publishes it, E48/E96/E192 against an
// independent generation with NumPy (round(100·10^(i/n)), run with Debian's
// /usr/bin/python3) and the published exception (E192 holds 920 where the
// formula gives 919), and the nesting of the series.
#include "thermargin/tools/series.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "cli_run.hpp"

namespace thermargin {
namespace {

// Series values are exact decimal numbers built from integers, so they are
// compared exactly.

std::vector<int> numpy_figures(int n) {
  std::ostringstream cmd;
  cmd << THERMARGIN_PYTHON << " -c \"import numpy as np; print(*np.round(100*10**(np.arange(" << n
      << ")/" << n << ")).astype(int))\"";
  return testing::numbers_printed_by<int>(cmd.str());
}

TEST(Series, E24IsThePublishedListWithItsHistoricalValues) {
  // IEC 60063's E24 as published.
  const std::vector<int> published{10, 11, 12, 13, 15, 16, 18, 20, 22, 24, 27, 30,
                                   33, 36, 39, 43, 47, 51, 56, 62, 68, 75, 82, 91};
  EXPECT_EQ(series_figures(Series::e24), published);
  // The historical values 2.7–4.7 and 8.2 are the ones that differ from the
  // rounded geometric progression round(10·10^(i/24)) (IEC 60063).
  std::vector<int> differing;
  for (int i = 0; i < 24; ++i)
    if (std::lround(10.0 * std::pow(10.0, i / 24.0)) != published[static_cast<std::size_t>(i)]) differing.push_back(published[static_cast<std::size_t>(i)]);
  EXPECT_EQ(differing, (std::vector<int>{27, 30, 33, 36, 39, 43, 47, 82}));
}

TEST(Series, E12IsEverySecondE24Value) {
  // IEC 60063 as tabulated in the Wikipedia article "E series of preferred
  // numbers" (read): 1.0 1.2 1.5 1.8 2.2 2.7 3.3 3.9 4.7 5.6 6.8 8.2.
  EXPECT_EQ(series_figures(Series::e12), (std::vector<int>{10, 12, 15, 18, 22, 27, 33, 39, 47, 56, 68, 82}));
}

TEST(Series, E48AndE96AreTheRoundedProgressionAsNumPyGeneratesIt) {
  EXPECT_EQ(series_figures(Series::e48), numpy_figures(48));
  EXPECT_EQ(series_figures(Series::e96), numpy_figures(96));
  // Spot values of E96 (IEC 60063, from memory): the familiar 1 % values.
  const auto& e96 = series_figures(Series::e96);
  for (int v : {100, 102, 249, 301, 332, 499, 681, 750, 909, 976})
    EXPECT_NE(std::find(e96.begin(), e96.end(), v), e96.end()) << v;
}

TEST(Series, E192DiffersFromTheFormulaOnlyAt920) {
  const std::vector<int> formula = numpy_figures(192);
  const auto& e192 = series_figures(Series::e192);
  ASSERT_EQ(e192.size(), formula.size());
  int differences = 0;
  for (std::size_t i = 0; i < e192.size(); ++i) {
    if (e192[i] == formula[i]) continue;
    ++differences;
    EXPECT_EQ(formula[i], 919);  // IEC 60063 publishes 920
    EXPECT_EQ(e192[i], 920);
  }
  EXPECT_EQ(differences, 1);
}

TEST(Series, EachSeriesIsEverySecondValueOfTheNextFinerOne) {
  auto every_second = [](const std::vector<int>& v) {
    std::vector<int> out;
    for (std::size_t i = 0; i < v.size(); i += 2) out.push_back(v[i]);
    return out;
  };
  EXPECT_EQ(every_second(series_figures(Series::e24)), series_figures(Series::e12));
  EXPECT_EQ(every_second(series_figures(Series::e96)), series_figures(Series::e48));
  EXPECT_EQ(every_second(series_figures(Series::e192)), series_figures(Series::e96));
  for (Series s : all_series) EXPECT_EQ(values_per_decade(s), static_cast<int>(series_figures(s).size()));
}

TEST(Series, ValuesInARangeAreExactAndIncludeBothEnds) {
  const auto v = series_values(Series::e96, 1e3, 1e6);
  ASSERT_EQ(v.size(), 289u);  // three decades of 96, and 1 MΩ itself
  EXPECT_EQ(v.front(), 1000.0);
  EXPECT_EQ(v.back(), 1e6);
  const auto e24 = series_values(Series::e24, 4.7e3, 4.7e3);
  ASSERT_EQ(e24.size(), 1u);
  EXPECT_EQ(e24.front(), 4700.0);  // 47·100: no binary rounding of 4.7·1000
  const auto small = series_values(Series::e12, 0.1, 1.0);
  ASSERT_FALSE(small.empty());
  EXPECT_EQ(small.front(), 0.1);
  EXPECT_EQ(small[5], 0.27);  // 27/100, the nearest double to 0.27
  EXPECT_TRUE(series_values(Series::e12, 1.01e3, 1.019e3).empty());
  EXPECT_TRUE(series_values(Series::e12, 2e3, 1e3).empty());
}

TEST(Series, BracketGivesTheNeighboursOrTheValueItself) {
  const SeriesBracket inside = series_bracket(Series::e24, 8037.0);
  EXPECT_EQ(inside.below, 7500.0);
  EXPECT_EQ(inside.above, 8200.0);
  const SeriesBracket member = series_bracket(Series::e96, 10e3);
  EXPECT_EQ(member.below, 10e3);
  EXPECT_EQ(member.above, 10e3);
  const SeriesBracket across = series_bracket(Series::e12, 9.5e3);  // across a decade
  EXPECT_EQ(across.below, 8200.0);
  EXPECT_EQ(across.above, 10e3);
}

TEST(Series, CoarsestSeriesNamesWhereAValueCanBeBought) {
  EXPECT_EQ(coarsest_series(4.7e3), Series::e12);
  EXPECT_EQ(coarsest_series(9.1e3), Series::e24);
  EXPECT_EQ(coarsest_series(10.5e3), Series::e48);
  EXPECT_EQ(coarsest_series(10.2e3), Series::e96);
  EXPECT_EQ(coarsest_series(10.1e3), Series::e192);
  EXPECT_EQ(coarsest_series(9.2e3), Series::e192);  // the 920 exception
  EXPECT_FALSE(coarsest_series(10.3e3));
  EXPECT_FALSE(coarsest_series(9.19e3));
}

TEST(Series, EachSeriesHasTheToleranceIec60063PairsWithIt) {
  // The tolerances the series are paired with: E12 ±10 %, E24 ±5 % (IEC
  // 60063 as tabulated in the Wikipedia article "E series of preferred
  // numbers", read), E48 ±2 %, E96 ±1 %, E192 ±0.5 % and tighter (the same
  // pairing in resistor-value tables of the trade: common practice).
  EXPECT_EQ(series_tolerance(Series::e12), 0.10);
  EXPECT_EQ(series_tolerance(Series::e24), 0.05);
  EXPECT_EQ(series_tolerance(Series::e48), 0.02);
  EXPECT_EQ(series_tolerance(Series::e96), 0.01);
  EXPECT_EQ(series_tolerance(Series::e192), 0.005);
}

TEST(Series, NamesAreReadInEitherCase) {
  EXPECT_EQ(series_from_name("e96"), Series::e96);
  EXPECT_EQ(series_from_name("E192"), Series::e192);
  EXPECT_FALSE(series_from_name("e7"));
  EXPECT_FALSE(series_from_name("96"));
  EXPECT_FALSE(series_from_name(""));
  EXPECT_EQ(to_string(Series::e24), "E24");
}

}  // namespace
}  // namespace thermargin
