// Tests of the Monte Carlo kernel's R–T table (lib/src/engines/
// monte_carlo_table.hpp, not public API): the block's search, through its
// grid or the binary search step by step across 256 units at once, finds
// the same piece as the table's own scalar search (HermiteSegments::piece),
// and the block's evaluation of that piece gives the table's ln R and
// spread (RtTable::ln_resistance, RtTable::spread) to the bit, at every
// point of the table, just above and below each, at both ends and at
// 20 000 points between. The scalar
// interpolant is itself held to Boost.Math's cubic_hermite bit for bit and
// to SciPy's PchipInterpolator (rt_table_test.cpp). Built like the kernel's
// files in a native build (-O2 -march=native, tests/CMakeLists.txt), so on
// an AVX2 machine the block's search here is a vector loop.
#include <gtest/gtest.h>

#include <bit>
#include <cmath>
#include <cstdint>
#include <string>
#include <vector>

#include "engines/monte_carlo_table.hpp"
#include "source_tree.hpp"
#include "thermargin/chain/rt_table.hpp"
#include "thermargin/input/rt_data.hpp"

namespace thermargin {
namespace {

using mc_detail::block_size;

// Every point of the table, its neighbours on either side (inside the
// range) and 20 000 points spread over it, as arguments 1/T.
std::vector<double> arguments_over(const HermiteSegments& seg) {
  const double lo = seg.x.front(), hi = seg.x.back();
  std::vector<double> v;
  for (double x : seg.x)
    for (double w : {x, std::nextafter(x, lo - 1.0), std::nextafter(x, hi + 1.0)})
      if (w >= lo && w <= hi) v.push_back(w);
  for (int k = 0; k <= 20000; ++k) v.push_back(std::min(hi, lo + (hi - lo) * k / 20000.0));
  return v;
}

template <bool Limits>
void expect_block_is_the_table(const RtTable& table, bool grid, const std::string& label) {
  mc_detail::TablePieces pieces = mc_detail::table_pieces(table);
  ASSERT_FALSE(pieces.grid.empty()) << label;
  if (!grid) pieces.grid.clear();  // the binary search, as a table of too many cells takes
  const mc_detail::TableView view(pieces);
  const HermiteSegments& curve = table.curve_segments();
  std::vector<double> v = arguments_over(curve);
  v.resize((v.size() + block_size - 1) / block_size * block_size, curve.x.back());
  int compared = 0;
  for (std::size_t first = 0; first < v.size(); first += block_size) {
    alignas(64) std::int32_t piece[block_size];
    mc_detail::pieces_block(pieces, &v[first], piece);
    for (int u = 0; u < block_size; ++u) {
      const double x = v[first + static_cast<std::size_t>(u)];
      ASSERT_EQ(static_cast<std::size_t>(piece[u]), curve.piece(x)) << label << " x=" << x;
      const double t = 1.0 / x;  // the table's own functions take T
      for (double z : {0.0, 0.7, -1.3}) {
        double expected = curve.at(x);
        if (Limits && z != 0.0) expected += z * (z > 0.0 ? table.spread_segments(true) : table.spread_segments(false))->at(x);
        const double got = mc_detail::table_ln_at<Limits>(view, piece[u], x, z);
        ASSERT_EQ(std::bit_cast<std::uint64_t>(got), std::bit_cast<std::uint64_t>(expected))
            << label << " x=" << x << " z=" << z << ": " << got << " against " << expected;
      }
      // Through the table's public functions of T where 1/T rounds back to x.
      if (1.0 / t == x && table.covers(t))
        EXPECT_EQ(std::bit_cast<std::uint64_t>(*table.ln_resistance(t)),
                  std::bit_cast<std::uint64_t>(mc_detail::table_ln_at<Limits>(view, piece[u], x, 0.0)));
      ++compared;
    }
  }
  EXPECT_GT(compared, 20000) << label;
}

TEST(MonteCarloTable, BlockSearchAndPiecesAreTheTablesOwnAtEveryPoint) {
  // Both searches: the grid's (every table here) and the binary one.
  for (const bool grid : {true, false}) {
    for (const char* name : {"ntc10k_sh_5K.csv", "ntc10k_sh_uneven_desc.csv", "ntc10k_sh_0_50.csv"}) {
      const RtTable table(read_rt_data(testing::data_path(std::string("chain/") + name)));
      expect_block_is_the_table<false>(table, grid, name);
    }
    const RtTable incubator(read_rt_data(testing::scenario_path("incubator_ntc47k.csv")));
    expect_block_is_the_table<false>(incubator, grid, "incubator");
    const RtTable limits(read_rt_data(testing::scenario_path("freezer_probe_ntc10k_limits.csv")));
    ASSERT_TRUE(limits.has_limits());
    expect_block_is_the_table<true>(limits, grid, "freezer limits");
  }
}

TEST(MonteCarloTable, BoundsHoldTheSlopeAndCurvatureOfEveryPiece) {
  // The Newton step's error term rests on these bounds (monte_carlo_reading.cpp,
  // table_newton_first): p' and p'' sampled over every piece (p'' by central
  // differences of the piece's own derivative) stay within them.
  const RtTable limits(read_rt_data(testing::scenario_path("freezer_probe_ntc10k_limits.csv")));
  for (const HermiteSegments* seg :
       {&limits.curve_segments(), limits.spread_segments(true), limits.spread_segments(false)}) {
    const double m1 = seg->slope_bound(), m2 = seg->curvature_bound();
    double max1 = 0.0, max2 = 0.0;
    for (std::size_t i = 0; i + 1 < seg->x.size(); ++i) {
      const double x0 = seg->x[i], x1 = seg->x[i + 1], h = (x1 - x0) * 1e-4;
      const auto d = [&](double v) {
        return hermite_piece_slope(x0, x1, seg->y[i], seg->y[i + 1], seg->slope[i], seg->slope[i + 1], v);
      };
      const auto p = [&](double v) {
        return hermite_piece(x0, x1, seg->y[i], seg->y[i + 1], seg->slope[i], seg->slope[i + 1], v);
      };
      for (int k = 1; k < 100; ++k) {
        const double v = x0 + (x1 - x0) * k / 100.0;
        // The slope is the piece's own: against its central difference.
        EXPECT_NEAR(d(v), (p(v + h) - p(v - h)) / (2.0 * h), 1e-6 * (std::fabs(d(v)) + 1.0)) << i << " " << v;
        max1 = std::max(max1, std::fabs(d(v)));
        max2 = std::max(max2, std::fabs((d(v + h) - d(v - h)) / (2.0 * h)));
      }
    }
    EXPECT_LE(max1, m1);
    EXPECT_LE(max2, m2);
    // And they are bounds, not wild overestimates: within a factor of 4.
    EXPECT_GT(max1, m1 / 4.0);
    EXPECT_GT(max2, m2 / 4.0);
  }
}

}  // namespace
}  // namespace thermargin
