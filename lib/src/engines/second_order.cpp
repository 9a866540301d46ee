#include "thermargin/engines/second_order.hpp"

#include <algorithm>
#include <cmath>

#include <boost/math/distributions/normal.hpp>

namespace thermargin {

double kurtosis(const ToleranceInput& in, double sigma_per_tol) {
  switch (in.distribution) {
    case Distribution::normal: return 3.0;
    case Distribution::uniform: return 9.0 / 5.0;      // E[x⁴] = a⁴/5, u² = a²/3
    case Distribution::triangular: return 12.0 / 5.0;  // E[x⁴] = a⁴/15, u² = a²/6
    case Distribution::gapped: {
      // ∫_0^x t⁴ φ_s(t) dt = −s² x³ φ_s(x) + 3 s² ∫_0^x t² φ_s(t) dt (by parts).
      const double a = in.bound, s = a / coverage_k(in, sigma_per_tol);
      const boost::math::normal_distribution<> n(0.0, s);
      auto m2 = [&](double x) { return s * s * (boost::math::cdf(n, x) - 0.5) - s * s * x * boost::math::pdf(n, x); };
      auto m4 = [&](double x) { return -s * s * x * x * x * boost::math::pdf(n, x) + 3.0 * s * s * m2(x); };
      const double mass = boost::math::cdf(n, a) - boost::math::cdf(n, in.gap);
      if (mass <= 0.0) return 1.0;
      const double var = (m2(a) - m2(in.gap)) / mass, fourth = (m4(a) - m4(in.gap)) / mass;
      return var > 0.0 ? fourth / (var * var) : 1.0;
    }
  }
  return 3.0;
}

namespace {

// The model with inputs i and j (j may equal i: one input) moved by di, dj.
struct Prober {
  const DeviationModel& model;
  const std::vector<ToleranceInput>& inputs;
  Deviations d{};
  std::optional<double> at(std::size_t i, double di, std::size_t j, double dj) {
    const auto si = static_cast<std::size_t>(inputs[i].source), sj = static_cast<std::size_t>(inputs[j].source);
    d[si] += di;
    d[sj] += dj;
    const auto v = model(d);
    d[si] = 0.0;
    d[sj] = 0.0;
    return v;
  }
};

// The interaction of a pair with both at their bounds: what the pair does
// beyond each input alone.
std::optional<double> pair_reach(Prober& p, std::size_t i, std::size_t j, double f0,
                                 std::vector<std::optional<double>>& lo, std::vector<std::optional<double>>& hi) {
  auto single = [&](std::size_t k, int sign) -> std::optional<double> {
    auto& cache = sign > 0 ? hi : lo;
    if (!cache[k]) cache[k] = p.at(k, sign * p.inputs[k].bound, k, 0.0);
    return cache[k];
  };
  double reach = 0.0;
  for (int si : {-1, 1})
    for (int sj : {-1, 1}) {
      const auto both = p.at(i, si * p.inputs[i].bound, j, sj * p.inputs[j].bound);
      const auto a = single(i, si), b = single(j, sj);
      if (!both || !a || !b) return std::nullopt;
      reach = std::max(reach, std::fabs(*both - *a - *b + f0));
    }
  return reach;
}

}  // namespace

SecondOrder second_order_terms(const DeviationModel& model, const std::vector<ToleranceInput>& inputs,
                               const std::vector<double>& c, const std::vector<double>& u, double f0,
                               double sigma_per_tol, const StructurallyZero& zero, double negligible) {
  SecondOrder out;
  const std::size_t n = inputs.size();
  out.own.assign(n, 0.0);
  Prober p{model, inputs};
  std::vector<double> h(n);
  // f(x_i ± h_i), everything else nominal: shared by the diagonal terms and
  // every pair's third derivatives.
  std::vector<std::optional<double>> up(n), down(n), at_lo(n), at_hi(n);
  for (std::size_t i = 0; i < n; ++i) {
    h[i] = second_order_step_fraction * u[i];
    if (!(h[i] > 0.0)) continue;
    up[i] = p.at(i, h[i], i, 0.0);
    down[i] = p.at(i, -h[i], i, 0.0);
    if (zero(inputs[i].source, inputs[i].source)) continue;
    const auto up2 = p.at(i, 2 * h[i], i, 0.0), down2 = p.at(i, -2 * h[i], i, 0.0);
    if (!up[i] || !down[i] || !up2 || !down2) {
      ++out.failed;
      continue;
    }
    const double hi = h[i];
    const double c_ii = (*up[i] - 2.0 * f0 + *down[i]) / (hi * hi);
    const double c_iii = (*up2 - 2.0 * *up[i] + 2.0 * *down[i] - *down2) / (2.0 * hi * hi * hi);
    const double kappa = kurtosis(inputs[i], sigma_per_tol), u4 = u[i] * u[i] * u[i] * u[i];
    out.own[i] += (0.25 * (kappa - 1.0) * c_ii * c_ii + kappa / 3.0 * c[i] * c_iii) * u4;
  }
  for (std::size_t i = 0; i < n; ++i)
    for (std::size_t j = i + 1; j < n; ++j) {
      if (!(h[i] > 0.0 && h[j] > 0.0) || zero(inputs[i].source, inputs[j].source)) continue;
      ++out.pairs_evaluated;
      const auto pp = p.at(i, h[i], j, h[j]), pm = p.at(i, h[i], j, -h[j]);
      const auto mp = p.at(i, -h[i], j, h[j]), mm = p.at(i, -h[i], j, -h[j]);
      if (!pp || !pm || !mp || !mm || !up[i] || !down[i] || !up[j] || !down[j]) {
        ++out.failed;
        continue;
      }
      PairTerm t;
      t.i = i;
      t.j = j;
      const double hi = h[i], hj = h[j];
      t.c_ij = (*pp - *pm - *mp + *mm) / (4.0 * hi * hj);
      // ∂/∂x_i of the second difference in x_j, and the other way round.
      t.c_ijj = ((*pp - 2.0 * *up[i] + *pm) - (*mp - 2.0 * *down[i] + *mm)) / (2.0 * hi * hj * hj);
      t.c_iij = ((*pp - 2.0 * *up[j] + *mp) - (*pm - 2.0 * *down[j] + *mm)) / (2.0 * hj * hi * hi);
      const double u2u2 = u[i] * u[i] * u[j] * u[j];
      t.variance = t.c_ij * t.c_ij * u2u2;
      // Each slope times the third derivative goes to that input's own row,
      // kept or not: it is part of u_c whatever the pair's row.
      out.own[i] += c[i] * t.c_ijj * u2u2;
      out.own[j] += c[j] * t.c_iij * u2u2;
      if (!(t.variance >= negligible)) continue;
      const auto reach = pair_reach(p, i, j, f0, at_lo, at_hi);
      t.reach = reach ? *reach : 0.0;
      out.pairs.push_back(t);
    }
  return out;
}

}  // namespace thermargin
