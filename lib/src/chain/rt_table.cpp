#include "thermargin/chain/rt_table.hpp"

#include <algorithm>
#include <cmath>

// Boost 1.74's pchip.hpp calls isnan unqualified; make std::isnan visible to it.
namespace boost::math::interpolators {
using std::isnan;
}
#include <boost/math/interpolators/pchip.hpp>
#include <boost/math/tools/roots.hpp>

#include "thermargin/chain/hermite_segments.hpp"
#include "thermargin/core/error.hpp"

namespace thermargin {

namespace {


}  // namespace

struct RtTable::Interpolant {
  // Abscissa 1/T must ascend for Boost's interpolator: ascending 1/T is
  // descending T, so the points are stored reversed.
  boost::math::interpolators::pchip<std::vector<double>> f;
  // The same interpolant's pieces (hermite_segments.hpp), evaluated inline:
  // its slope at each point is Boost's derivative there (prime(x_k) returns
  // the stored slope, s_k + 0 + 0).
  HermiteSegments seg;
};

// PCHIP of y against x = 1/T (x ascending) with the shape-preserving end slopes.
std::shared_ptr<const RtTable::Interpolant> RtTable::make_pchip(std::vector<double> x, std::vector<double> y) {
  const std::size_t n = x.size();
  const double left = pchip_end_slope(x[1] - x[0], x[2] - x[1], (y[1] - y[0]) / (x[1] - x[0]),
                                (y[2] - y[1]) / (x[2] - x[1]));
  const double right = pchip_end_slope(x[n - 1] - x[n - 2], x[n - 2] - x[n - 3], (y[n - 1] - y[n - 2]) / (x[n - 1] - x[n - 2]),
                                 (y[n - 2] - y[n - 3]) / (x[n - 2] - x[n - 3]));
  HermiteSegments seg{x, y, {}};
  auto p = std::make_shared<RtTable::Interpolant>(RtTable::Interpolant{{std::move(x), std::move(y), left, right}, {}});
  for (double xk : seg.x) seg.slope.push_back(p->f.prime(xk));
  p->seg = std::move(seg);
  return p;
}

RtTable::RtTable(const RtData& data) : source_(data.file) {
  if (data.points.size() < 4)
    reject_at(data.file, 0,
              "an R-T table needs at least 4 points for the monotone interpolation; found " +
                  std::to_string(data.points.size()));
  require_monotonic(data);
  for (const auto& p : data.points) {
    t_.push_back(p.t_celsius + 273.15);
    lnr_.push_back(std::log(p.r_ohm));
  }
  if (t_.front() > t_.back()) {
    std::reverse(t_.begin(), t_.end());
    std::reverse(lnr_.begin(), lnr_.end());
  }
  t_lo_ = t_.front();
  t_hi_ = t_.back();
  lnr_at_lo_ = lnr_.front();
  lnr_at_hi_ = lnr_.back();
  std::vector<double> x, y;
  for (std::size_t i = t_.size(); i-- > 0;) {
    x.push_back(1.0 / t_[i]);
    y.push_back(lnr_[i]);
  }
  if (data.has_limits) {
    // The points by ascending 1/T (descending temperature), as x.
    std::vector<const RtPoint*> by_x;
    for (const auto& p : data.points) by_x.push_back(&p);
    std::sort(by_x.begin(), by_x.end(), [](const RtPoint* a, const RtPoint* b) { return a->t_celsius > b->t_celsius; });
    std::vector<double> up, down;
    for (const RtPoint* p : by_x) {
      up.push_back(std::log(p->r_max_ohm / p->r_ohm));
      down.push_back(std::log(p->r_ohm / p->r_min_ohm));
    }
    upper_ = make_pchip(x, std::move(up));
    lower_ = make_pchip(x, std::move(down));
  }
  curve_ = make_pchip(std::move(x), std::move(y));
}

std::optional<double> RtTable::spread(double t, bool upper) const {
  if (!covers(t) || !upper_) return std::nullopt;
  return (upper ? upper_ : lower_)->seg.at(1.0 / t);
}

std::optional<double> RtTable::ln_resistance(double t) const {
  if (!covers(t)) return std::nullopt;
  return curve_->seg.at(1.0 / t);
}

const HermiteSegments& RtTable::curve_segments() const { return curve_->seg; }

const HermiteSegments* RtTable::spread_segments(bool upper) const {
  if (!upper_) return nullptr;
  return &(upper ? upper_ : lower_)->seg;
}

std::optional<double> RtTable::ln_resistance_slope(double t) const {
  if (!covers(t)) return std::nullopt;
  return curve_->f.prime(1.0 / t) * (-1.0 / (t * t));
}

std::optional<double> RtTable::temperature_kelvin(double ln_r) const {
  const double lo = std::min(lnr_at_lo_, lnr_at_hi_), hi = std::max(lnr_at_lo_, lnr_at_hi_);
  if (!(ln_r >= lo && ln_r <= hi)) return std::nullopt;
  if (ln_r == lnr_at_lo_) return t_lo_;
  if (ln_r == lnr_at_hi_) return t_hi_;
  // Solve in x = 1/T on the table's span; PCHIP is monotone, so the root is unique.
  auto g = [&](double x) { return curve_->f(x) - ln_r; };
  const double a = 1.0 / t_hi_, b = 1.0 / t_lo_;
  double ga = g(a), gb = g(b);
  if (ga == 0.0) return t_hi_;
  if (gb == 0.0) return t_lo_;
  if ((ga > 0) == (gb > 0)) return std::nullopt;
  std::uintmax_t iterations = 200;
  auto tol = [](double u, double v) { return std::fabs(u - v) <= 1e-15 * std::fabs(u); };
  auto r = boost::math::tools::toms748_solve(g, a, b, ga, gb, tol, iterations);
  return 2.0 / (r.first + r.second);
}

}  // namespace thermargin
