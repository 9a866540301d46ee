#include "thermargin/chain/ntc.hpp"

#include <cmath>

#include <Eigen/Dense>

namespace thermargin {

BetaLn::BetaLn(const BetaCurve& c) : ln_r25(std::log(c.r25)), beta(c.beta) {}

double temperature_kelvin(const BetaLn& c, double ln_r) {
  const double inv = 1.0 / t0_kelvin + (ln_r - c.ln_r25) / c.beta;
  return inv > 0.0 ? 1.0 / inv : 0.0;
}

double ln_resistance(const BetaCurve& c, double t) { return ln_resistance(BetaLn(c), t); }

double ln_resistance_slope(const BetaCurve& c, double t) { return -c.beta / (t * t); }

double temperature_kelvin(const BetaCurve& c, double ln_r) { return temperature_kelvin(BetaLn(c), ln_r); }

double ln_resistance(const SteinhartHart& s, double t) {
  if (s.c == 0.0) return (1.0 / t - s.a) / s.b;
  const double x = (s.a - 1.0 / t) / s.c;
  const double q = s.b / (3.0 * s.c);
  const double y = std::sqrt(q * q * q + 0.25 * x * x);
  return std::cbrt(y - 0.5 * x) - std::cbrt(y + 0.5 * x);
}

double ln_resistance_slope(const SteinhartHart& s, double t) {
  // d(1/T)/d lnR = B + 3C ln²R, and d(1/T)/dT = −1/T².
  const double l = ln_resistance(s, t);
  return -1.0 / (t * t * (s.b + 3.0 * s.c * l * l));
}

double temperature_kelvin(const SteinhartHart& s, double ln_r) {
  const double inv = s.a + s.b * ln_r + s.c * ln_r * ln_r * ln_r;
  return inv > 0.0 ? 1.0 / inv : 0.0;
}

SteinhartHart steinhart_hart_through(const double t[3], const double l[3]) {
  Eigen::Matrix3d m;
  Eigen::Vector3d y;
  for (int i = 0; i < 3; ++i) {
    m(i, 0) = 1.0;
    m(i, 1) = l[i];
    m(i, 2) = l[i] * l[i] * l[i];
    y(i) = 1.0 / t[i];
  }
  const Eigen::Vector3d x = m.colPivHouseholderQr().solve(y);
  return {x(0), x(1), x(2)};
}

}  // namespace thermargin
