// An R–T table's interpolants as the Monte Carlo kernel reads them
// (monte_carlo_table.hpp).
#include "monte_carlo_table.hpp"

#include <algorithm>
#include <cassert>

namespace thermargin::mc_detail {

TablePieces table_pieces(const RtTable& table) {
  const HermiteSegments& curve = table.curve_segments();
  TablePieces t;
  t.n = static_cast<int>(curve.x.size());
  t.x = curve.x;
  t.y = curve.y;
  t.s = curve.slope;
  t.t_lo = table.t_min_kelvin();
  t.t_hi = table.t_max_kelvin();
  t.curve_m1 = curve.slope_bound();
  t.curve_m2 = curve.curvature_bound();
  t.limits = table.has_limits();
  if (t.limits) {
    for (const bool upper : {true, false}) {
      const HermiteSegments& side = *table.spread_segments(upper);
      assert(side.x == curve.x);  // one set of points (RtTable's constructor)
      t.sy.insert(t.sy.end(), side.y.begin(), side.y.end());
      t.ss.insert(t.ss.end(), side.slope.begin(), side.slope.end());
      (upper ? t.upper_m1 : t.lower_m1) = side.slope_bound();
      (upper ? t.upper_m2 : t.lower_m2) = side.curvature_bound();
    }
  }
  // The grid: cells of half the narrowest piece's width (its bound, in
  // monte_carlo_table.hpp, allows up to the whole width), every value of
  // [x.front(), x.back()] in one (the last cell holds x.back()).
  double narrowest = t.x[1] - t.x[0];
  for (int i = 1; i + 1 < t.n; ++i) narrowest = std::min(narrowest, t.x[i + 1] - t.x[i]);
  const double width = narrowest / 2.0, span = t.x.back() - t.x.front();
  if (span / width < 65536.0) {
    const int cells = static_cast<int>(span / width) + 2;
    t.grid_scale = 1.0 / width;
    for (int c = 0; c < cells; ++c)
      t.grid.push_back(static_cast<std::int32_t>(curve.piece(std::min(t.x.front() + c * width, t.x.back()))));
  }
  return t;
}

}  // namespace thermargin::mc_detail
