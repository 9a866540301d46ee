#include "thermargin/engines/random.hpp"

#include <boost/math/distributions/normal.hpp>
#include <numbers>

namespace thermargin {

double draw_deviation(const ToleranceInput& in, double sigma_per_tol, double u1, double u2) {
  sigma_per_tol = coverage_k(in, sigma_per_tol);  // the input's own <key>_k where set
  const double a = in.bound;
  switch (in.distribution) {
    case Distribution::normal:
      return a / sigma_per_tol * std::sqrt(-2.0 * std::log(u1)) * std::cos(2.0 * std::numbers::pi * u2);
    case Distribution::uniform: return a * (2.0 * u1 - 1.0);
    case Distribution::triangular: return a * (u1 + u2 - 1.0);
    case Distribution::gapped: {
      // Inverse CDF on gap ≤ |δ| ≤ a of N(0, (a/k)²), the sign from u2.
      const boost::math::normal_distribution<> n(0.0, a / sigma_per_tol);
      const double lo = boost::math::cdf(n, in.gap), hi = boost::math::cdf(n, a);
      const double x = boost::math::quantile(n, lo + u1 * (hi - lo));
      return u2 < 0.5 ? -x : x;
    }
  }
  return 0.0;
}

}  // namespace thermargin
