// An R–T table's interpolants as the Monte Carlo kernel reads them
// (monte_carlo_table.hpp).
#include "monte_carlo_table.hpp"

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
  return t;
}

}  // namespace thermargin::mc_detail
