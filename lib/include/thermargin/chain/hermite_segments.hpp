// A cubic Hermite interpolant's pieces, evaluated inline: ascending
// abscissae, the values and the slopes there. The evaluation is the
// arithmetic of Boost.Math's cubic_hermite (1.74, detail/
// cubic_hermite_detail.hpp: the representation of the Wikipedia page it
// cites), operation for operation, so that it gives the same double; its
// interval is found by a binary search without branches (the same steps for
// every argument), so that the Monte Carlo kernel's loop over a block of
// units can evaluate it with the rest of the element's stage. RtTable keeps
// its PCHIP in this form (rt_table.hpp); the tests hold it to Boost's.
#pragma once

#include <cstddef>
#include <vector>

namespace thermargin {

struct HermiteSegments {
  std::vector<double> x, y, slope;  // x ascending, at least two points

  // Inside [x.front(), x.back()] only (the caller checks the range).
  double at(double v) const {
    const double* xs = x.data();
    // upper_bound(x, v) − 1 without branches: the first k with x[k] > v, less one.
    const double* base = xs;
    std::size_t len = x.size();
    while (len > 1) {
      const std::size_t half = len / 2;
      base = base[half] <= v ? base + half : base;
      len -= half;
    }
    const std::size_t above = static_cast<std::size_t>(base - xs) + (*base <= v ? 1 : 0);
    // v = x.back() is the last value itself (Boost's own special case);
    // the interval below it is read, then discarded.
    const bool last = above == x.size();
    const std::size_t i = (last ? above - 1 : above) - 1;
    const double x0 = xs[i], x1 = xs[i + 1];
    const double y0 = y[i], y1 = y[i + 1];
    const double s0 = slope[i], s1 = slope[i + 1];
    const double dx = x1 - x0;
    const double t = (v - x0) / dx;
    const double r = (1 - t) * (1 - t) * (y0 * (1 + 2 * t) + s0 * (v - x0)) + t * t * (y1 * (3 - 2 * t) + dx * s1 * (t - 1));
    return last ? y.back() : r;
  }
};

}  // namespace thermargin
