// An R–T table sensor in the Monte Carlo kernel (docs/engines.md, "A table
// sensor at NTC speed"): the table's interpolants as arrays the block's
// loops read by index, the piece of every unit found through a grid (or
// HermiteSegments' own binary search run step by step across the block),
// and the pieces evaluated with Boost's arithmetic (hermite_piece), so that
// each stage is a loop the compiler vectorises and gives the chain's values
// to the bit. Not public API; the tests hold the block's search and pieces
// to the table's own (monte_carlo_table_test.cpp).
#pragma once

#include <algorithm>
#include <cstdint>
#include <vector>

#include "monte_carlo_streams.hpp"
#include "thermargin/chain/hermite_segments.hpp"
#include "thermargin/chain/rt_table.hpp"

namespace thermargin::mc_detail {

struct TablePieces {
  int n = 0;                   // points
  std::vector<double> x;       // 1/T ascending: the curve's and the spreads' (rt_table.cpp builds all three on them)
  std::vector<double> y, s;    // the curve's ln R and its slopes there
  // The spreads, without limits empty: the upper side's n values, then the
  // lower side's (offset n), so that one index reads either side.
  std::vector<double> sy, ss;
  bool limits = false;
  double t_lo = 0.0, t_hi = 0.0;  // K, the table's range
  // For the Newton step's error term: bounds of |p'| (m1) and |p''| (m2)
  // over the whole table (HermiteSegments::slope_bound, curvature_bound),
  // the curve's and each side's of the spread.
  double curve_m1 = 0.0, curve_m2 = 0.0;
  double upper_m1 = 0.0, upper_m2 = 0.0, lower_m1 = 0.0, lower_m2 = 0.0;
  // The search's grid: cells of width at most half the narrowest piece
  // over [x.front(), x.back()], each holding the piece of its left edge
  // (HermiteSegments::piece); empty where it would take more than 2^16 cells
  // (the binary search then).
  std::vector<std::int32_t> grid;
  double grid_scale = 0.0;  // 1/width
};

TablePieces table_pieces(const RtTable& table);

// The arrays of a TablePieces as plain pointers, taken once before a
// block's loop (so that the compiler sees them as loop invariants).
struct TableView {
  const double *x, *y, *s, *sy, *ss;
  int n;
  bool limits;
  double x_last, y_last, upper_last, lower_last;  // the values at x.back()
  explicit TableView(const TablePieces& t)
      : x(t.x.data()), y(t.y.data()), s(t.s.data()), sy(t.sy.data()), ss(t.ss.data()), n(t.n), limits(t.limits),
        x_last(t.x.back()), y_last(t.y.back()), upper_last(t.limits ? t.sy[t.n - 1] : 0.0),
        lower_last(t.limits ? t.sy.back() : 0.0) {}
  // The same view on the arrays as given (a function's __restrict
  // parameters, so that its loop may gather from them and store elsewhere).
  TableView(const TableView& v, const double* x_, const double* y_, const double* s_, const double* sy_,
            const double* ss_)
      : TableView(v) {
    x = x_, y = y_, s = s_, sy = sy_, ss = ss_;
  }
};

// The piece of each v[u] (HermiteSegments::piece), v[u] inside [x.front(),
// x.back()]. With the grid: v's cell, computed, is within one of its true
// cell, so v is within 1.01 cell widths of the left edge of the cell
// computed, closer than any two points of the table: its piece is the
// edge's, one below or one above, which one comparison each way settles
// (the last piece for v = x.back(), as there). A gather of the grid and two
// of x, in one loop. Without the grid, the table's own binary search step
// by step across the block (a loop and a gather a step).
[[gnu::always_inline]] inline void pieces_block(const TableView t, const std::int32_t* __restrict grid, int cells,
                                                double scale, const double* __restrict v,
                                                std::int32_t* __restrict piece) {
  const double* xs = t.x;
  const int n = t.n;
  if (cells > 0) {
    const double x0 = xs[0];
    for (int u = 0; u < block_size; ++u) {
      const int cell = std::min(static_cast<int>((v[u] - x0) * scale), cells - 1);
      int p = grid[cell];
      p -= v[u] < xs[p] ? 1 : 0;
      p += ((p < n - 2) & (v[u] >= xs[p + 1])) ? 1 : 0;
      piece[u] = p;
    }
    return;
  }
  for (int u = 0; u < block_size; ++u) piece[u] = 0;
  for (int len = n; len > 1;) {
    const int half = len / 2;
    for (int u = 0; u < block_size; ++u) piece[u] = xs[piece[u] + half] <= v[u] ? piece[u] + half : piece[u];
    len -= half;
  }
  for (int u = 0; u < block_size; ++u) {
    const int above = piece[u] + (xs[piece[u]] <= v[u] ? 1 : 0);
    piece[u] = (above == n ? above - 1 : above) - 1;
  }
}

[[gnu::always_inline]] inline void pieces_block(const TablePieces& t, const double* __restrict v,
                                                std::int32_t* __restrict piece) {
  pieces_block(TableView(t), t.grid.data(), static_cast<int>(t.grid.size()), t.grid_scale, v, piece);
}

// The side of the spread a unit's share z reads: its offset in sy, ss.
inline int side_offset(const TableView& t, double z) { return z > 0.0 ? 0 : t.n; }

// The table's ln R for a unit's share z of the spread at v in piece i
// (RtTable::ln_resistance, plus z times RtTable::spread with limits): the
// same pieces and the same special case at x.back() as HermiteSegments::at.
// Limits is t.limits, a template argument so that a block's loop has no
// condition (its loads would be masked gathers, which do not vectorise).
template <bool Limits>
inline double table_ln_at(const TableView& t, int i, double v, double z) {
  const double x0 = t.x[i], x1 = t.x[i + 1];
  const bool last = t.x_last <= v;
  const double c = hermite_piece(x0, x1, t.y[i], t.y[i + 1], t.s[i], t.s[i + 1], v);
  double l = last ? t.y_last : c;
  if constexpr (Limits) {
    const int o = side_offset(t, z), j = o + i;
    const double h = hermite_piece(x0, x1, t.sy[j], t.sy[j + 1], t.ss[j], t.ss[j + 1], v);
    const double spread = last ? (z > 0.0 ? t.upper_last : t.lower_last) : h;
    l = z != 0.0 ? l + z * spread : l;
  }
  return l;
}

// d/dv of the same (not at x.back(), which the Newton step never reads).
template <bool Limits>
inline double table_ln_slope_at(const TableView& t, int i, double v, double z) {
  const double x0 = t.x[i], x1 = t.x[i + 1];
  double d = hermite_piece_slope(x0, x1, t.y[i], t.y[i + 1], t.s[i], t.s[i + 1], v);
  if constexpr (Limits) {
    const int j = side_offset(t, z) + i;
    d += z * hermite_piece_slope(x0, x1, t.sy[j], t.sy[j + 1], t.ss[j], t.ss[j + 1], v);
  }
  return d;
}

// An NTC unit's ln R from its curve's, a table's or a Steinhart–Hart
// curve's (SensorUnit::ln_resistance): the stretch about T0 and the shift,
// then the drift, skipped where they are 0 as there.
inline double ntc_unit_ln(double l, double ln_r0, double shift, double stretch, double drift) {
  const double unit = (shift == 0.0 && stretch == 1.0) ? l : ln_r0 + shift + stretch * (l - ln_r0);
  return drift == 0.0 ? unit : unit + drift;
}

}  // namespace thermargin::mc_detail
