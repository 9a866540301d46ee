// A cubic Hermite interpolant's pieces, evaluated inline: ascending
// abscissae, the values and the slopes there. The evaluation is the
// arithmetic of Boost.Math's cubic_hermite (1.74, detail/
// cubic_hermite_detail.hpp: the representation of the Wikipedia page it
// cites), operation for operation, so that it gives the same double; its
// interval is found by a binary search without branches (the same steps for
// every argument), so that the Monte Carlo kernel's loops over a block of
// units can run the same search and the same piece for every unit at once
// (engines/monte_carlo_table.hpp). RtTable keeps its PCHIP in this form
// (rt_table.hpp); the tests hold it to Boost's.
#pragma once

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <vector>

namespace thermargin {

// The piece over [x0, x1] with values y0, y1 and slopes s0, s1 at v: Boost's
// arithmetic, operation for operation.
inline double hermite_piece(double x0, double x1, double y0, double y1, double s0, double s1, double v) {
  const double dx = x1 - x0;
  const double t = (v - x0) / dx;
  return (1 - t) * (1 - t) * (y0 * (1 + 2 * t) + s0 * (v - x0)) + t * t * (y1 * (3 - 2 * t) + dx * s1 * (t - 1));
}

// Its derivative d/dv, from the Hermite basis' derivatives (6t(t − 1),
// (1 − t)(1 − 3t), −6t(t − 1), t(3t − 2)): not Boost's arithmetic, which has
// no such piece; the kernel's Newton step needs it only to within rounding.
inline double hermite_piece_slope(double x0, double x1, double y0, double y1, double s0, double s1, double v) {
  const double dx = x1 - x0;
  const double t = (v - x0) / dx;
  return 6.0 * t * (t - 1.0) * ((y0 - y1) / dx) + s0 * (1.0 - t) * (1.0 - 3.0 * t) + s1 * t * (3.0 * t - 2.0);
}

// PCHIP's end slope (Fritsch, SLATEC PCHIM, 1982; Moler, Numerical Computing
// with MATLAB §3.4): the three-point one-sided formula, set to 0 when its sign
// differs from the end interval's and limited to 3 times that interval's slope
// when the first two slopes differ in sign, which keeps the end monotone.
// h0, m0 are the end interval's width and slope, h1, m1 the next one's.
inline double pchip_end_slope(double h0, double h1, double m0, double m1) {
  const double d = ((2.0 * h0 + h1) * m0 - h0 * m1) / (h0 + h1);
  if ((d > 0.0) != (m0 > 0.0) || d == 0.0) return 0.0;
  if ((m0 > 0.0) != (m1 > 0.0) && std::fabs(d) > 3.0 * std::fabs(m0)) return 3.0 * m0;
  return d;
}

struct HermiteSegments {
  std::vector<double> x, y, slope;  // x ascending, at least two points

  // The piece v falls in, inside [x.front(), x.back()]: upper_bound(x, v) − 1
  // without branches (the first k with x[k] > v, less one), the last piece
  // for v = x.back().
  std::size_t piece(double v) const {
    const double* xs = x.data();
    const double* base = xs;
    std::size_t len = x.size();
    while (len > 1) {
      const std::size_t half = len / 2;
      base = base[half] <= v ? base + half : base;
      len -= half;
    }
    const std::size_t above = static_cast<std::size_t>(base - xs) + (*base <= v ? 1 : 0);
    return (above == x.size() ? above - 1 : above) - 1;
  }

  // Inside [x.front(), x.back()] only (the caller checks the range). v =
  // x.back() is the last value itself (Boost's own special case); the piece
  // below it is read, then discarded.
  double at(double v) const {
    const std::size_t i = piece(v);
    const double r = hermite_piece(x[i], x[i + 1], y[i], y[i + 1], slope[i], slope[i + 1], v);
    return x.back() <= v ? y.back() : r;
  }

  // Bounds of |p'| and |p''| over every piece, for the kernel's Newton step
  // (its error term). On a piece of width h, p' is the quadratic with
  // Bernstein coefficients s0, 3(y1 − y0)/h − s0 − s1, s1, so |p'| is at
  // most the largest of them (the convex hull property), and p'' is linear,
  // 2/h times their differences at the ends. Widened by 1e-6 of themselves
  // for the rounding of these few operations.
  double slope_bound() const {
    double m = 0.0;
    for (std::size_t i = 0; i + 1 < x.size(); ++i) {
      const double b = bernstein_middle(i);
      m = std::max({m, std::fabs(slope[i]), std::fabs(b), std::fabs(slope[i + 1])});
    }
    return m * (1.0 + 1e-6);
  }
  double curvature_bound() const {
    double m = 0.0;
    for (std::size_t i = 0; i + 1 < x.size(); ++i) {
      const double b = bernstein_middle(i), h = x[i + 1] - x[i];
      m = std::max({m, 2.0 / h * std::fabs(b - slope[i]), 2.0 / h * std::fabs(slope[i + 1] - b)});
    }
    return m * (1.0 + 1e-6);
  }

 private:
  double bernstein_middle(std::size_t i) const {
    return 3.0 * (y[i + 1] - y[i]) / (x[i + 1] - x[i]) - slope[i] - slope[i + 1];
  }
};

}  // namespace thermargin
