#include "thermargin/tools/fit.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <stdexcept>

// GCC 12 flags Eigen's AVX-512 transpose kernels (-march=native) with a false
// -Wmaybe-uninitialized; keep the build quiet for opt-in -Werror.
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wmaybe-uninitialized"
#include <Eigen/Dense>
#pragma GCC diagnostic pop
// Boost 1.74's pchip.hpp calls isnan unqualified; make std::isnan visible to it.
namespace boost::math::interpolators {
using std::isnan;
}
#include <boost/math/interpolators/pchip.hpp>

#include "thermargin/chain/rt_table.hpp"
#include "thermargin/core/error.hpp"
#include "thermargin/chain/hermite_segments.hpp"
#include "thermargin/core/text.hpp"

namespace thermargin {
namespace {

// A chosen temperature names a data point when it is this close (°C): far
// finer than any thermometer, far coarser than the parser's rounding.
constexpr double same_temperature = 1e-6;

// The weighted Steinhart–Hart fit re-derives its weights from its own slope;
// the slope changes by parts in 10⁶ between passes, so this converges in two
// or three.
constexpr double weight_convergence = 1e-13;
constexpr int max_weight_passes = 50;

enum class Kind { beta, sh3, sh4 };

const char* model_name(Kind k) {
  switch (k) {
    case Kind::beta: return "beta";
    case Kind::sh3: return "steinhart-hart";
    case Kind::sh4: return "steinhart-hart-4";
  }
  return "";
}

int coefficient_count(Kind k) { return k == Kind::beta ? 2 : k == Kind::sh3 ? 3 : 4; }

// A data point as the fits see it.
struct Point {
  double t_kelvin;
  double ln_r;
  double u_ln_r;  // u(R)/R, the standard uncertainty of ln R; 0 without uncertainties
};

// ---------------------------------------------------------------- the models

Eigen::RowVectorXd design_row(Kind k, const Point& p) {
  Eigen::RowVectorXd row(coefficient_count(k));
  const double l = p.ln_r;
  switch (k) {
    case Kind::beta: row << 1.0, 1.0 / p.t_kelvin - 1.0 / t0_kelvin; break;
    case Kind::sh3: row << 1.0, l, l * l * l; break;
    case Kind::sh4: row << 1.0, l, l * l, l * l * l; break;
  }
  return row;
}

// The beta form is linear in ln R, the Steinhart–Hart forms in 1/T.
double target(Kind k, const Point& p) { return k == Kind::beta ? p.ln_r : 1.0 / p.t_kelvin; }

double inverse_temperature(Kind k, const Eigen::VectorXd& x, double l) {
  switch (k) {
    case Kind::beta: return 1.0 / t0_kelvin + (l - x(0)) / x(1);
    case Kind::sh3: return x(0) + l * (x(1) + l * l * x(2));
    case Kind::sh4: return x(0) + l * (x(1) + l * (x(2) + l * x(3)));
  }
  return 0.0;
}

// A curve that gives no positive temperature at this resistance reads 0 K,
// as the curves of ntc.hpp do: a huge, finite residual instead of a NaN.
double model_temperature(Kind k, const Eigen::VectorXd& x, double l) {
  const double inv = inverse_temperature(k, x, l);
  if (!(inv > 0.0)) return 0.0;
  const double t = 1.0 / inv;
  return std::isfinite(t) ? t : 0.0;
}

// d(1/T)/d(ln R) of a Steinhart–Hart form: what turns u(ln R) into u(1/T).
double sh_slope(Kind k, const Eigen::VectorXd& x, double l) {
  return k == Kind::sh3 ? x(1) + 3.0 * x(2) * l * l : x(1) + l * (2.0 * x(2) + 3.0 * l * x(3));
}

// ------------------------------------------------------------ least squares

struct LinearSolution {
  Eigen::VectorXd x;
  std::optional<Eigen::MatrixXd> covariance;
  double chi_squared = 0.0;  // Σ of squared (weighted) residuals
};

// Minimises ‖(X·x − y)/σ‖ (σ = 1 when `sigma` is null). With σ the stated
// standard uncertainties of y, cov(x) = (XᵀWX)⁻¹ (GUM applied to a linear
// estimator); without, the scatter estimates them: s²·(XᵀX)⁻¹, s² = SSR/dof,
// and an exact fit (dof = 0) has no covariance.
LinearSolution solve(Eigen::MatrixXd x, Eigen::VectorXd y, const Eigen::VectorXd* sigma) {
  const Eigen::Index n = x.rows();
  const Eigen::Index p = x.cols();
  if (sigma) {
    for (Eigen::Index i = 0; i < n; ++i) {
      x.row(i) /= (*sigma)(i);
      y(i) /= (*sigma)(i);
    }
  }
  // Columns as unlike as 1 and (ln R)³ ≈ 10³ are brought to unit norm so that
  // the pivoting and the rank decision compare like with like.
  Eigen::VectorXd scale = x.colwise().norm().transpose();
  for (Eigen::Index j = 0; j < p; ++j)
    if (!(scale(j) > 0.0)) scale(j) = 1.0;
  const Eigen::VectorXd inv_scale = scale.cwiseInverse();
  const Eigen::MatrixXd xs = x * inv_scale.asDiagonal();
  const Eigen::ColPivHouseholderQR<Eigen::MatrixXd> qr(xs);

  LinearSolution s;
  s.x = qr.solve(y).cwiseProduct(inv_scale);
  s.chi_squared = (y - x * s.x).squaredNorm();
  if (qr.rank() == p) {
    const Eigen::MatrixXd r = qr.matrixR().topLeftCorner(p, p).triangularView<Eigen::Upper>();
    const Eigen::MatrixXd r_inv = r.triangularView<Eigen::Upper>().solve(Eigen::MatrixXd::Identity(p, p));
    const Eigen::MatrixXd cov_scaled =
        qr.colsPermutation() * (r_inv * r_inv.transpose()) * qr.colsPermutation().transpose();
    const Eigen::MatrixXd cov = inv_scale.asDiagonal() * cov_scaled * inv_scale.asDiagonal();
    const Eigen::Index dof = n - p;
    if (sigma)
      s.covariance = cov;
    else if (dof > 0)
      s.covariance = cov * (s.chi_squared / static_cast<double>(dof));
  }
  return s;
}

// Fits model `k` to the points `use`. With uncertainties the beta form
// weighs ln R by R/u(R) directly; the Steinhart–Hart forms, whose fitted
// quantity is 1/T, carry u(ln R) over to 1/T through the model's own slope
// (the "effective variance" of a point), re-fitting until the weights settle.
LinearSolution fit_points(Kind k, const std::vector<Point>& pts, const std::vector<std::size_t>& use, bool weighted) {
  const auto n = static_cast<Eigen::Index>(use.size());
  Eigen::MatrixXd x(n, coefficient_count(k));
  Eigen::VectorXd y(n);
  for (Eigen::Index i = 0; i < n; ++i) {
    const Point& p = pts[use[static_cast<std::size_t>(i)]];
    x.row(i) = design_row(k, p);
    y(i) = target(k, p);
  }
  if (!weighted) return solve(x, y, nullptr);

  Eigen::VectorXd sigma(n);
  if (k == Kind::beta) {
    for (Eigen::Index i = 0; i < n; ++i) sigma(i) = pts[use[static_cast<std::size_t>(i)]].u_ln_r;
    return solve(x, y, &sigma);
  }
  LinearSolution s = solve(x, y, nullptr);
  for (int pass = 0; pass < max_weight_passes; ++pass) {
    Eigen::VectorXd next(n);
    for (Eigen::Index i = 0; i < n; ++i) {
      const Point& p = pts[use[static_cast<std::size_t>(i)]];
      next(i) = std::abs(sh_slope(k, s.x, p.ln_r)) * p.u_ln_r;
    }
    // A fit whose slope vanished at a point would give it infinite weight;
    // no real thermistor does that, so such a point is merely capped.
    const double floor = 1e-9 * next.maxCoeff();
    for (Eigen::Index i = 0; i < n; ++i) next(i) = std::max(next(i), floor);
    const bool settled =
        pass > 0 && ((next - sigma).cwiseAbs().array() <= weight_convergence * next.array()).all();
    sigma = next;
    s = solve(x, y, &sigma);
    if (settled) break;
  }
  return s;
}

// --------------------------------------------------------- between points

// ln R against 1/T through every data point, monotone between them.
struct Interpolation {
  std::vector<double> inv_t;  // ascending
  std::vector<double> ln_r;
  std::vector<bool> in_window;
  std::optional<boost::math::interpolators::pchip<std::vector<double>>> curve;
};

// The data's interpolant in ln R against 1/T. Its end slopes are PCHIP's
// three-point ones (pchip_end_slope, hermite_segments.hpp), as in the R-T
// table: Boost's default (the end secant) is only first-order and shows up
// as a spurious between-point error in the end intervals.

Interpolation make_interpolation(const std::vector<Point>& pts, const std::vector<bool>& in_window) {
  std::vector<std::size_t> order(pts.size());
  for (std::size_t i = 0; i < order.size(); ++i) order[i] = i;
  std::sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return pts[a].t_kelvin > pts[b].t_kelvin; });
  Interpolation in;
  for (std::size_t i : order) {
    in.inv_t.push_back(1.0 / pts[i].t_kelvin);
    in.ln_r.push_back(pts[i].ln_r);
    in.in_window.push_back(in_window[i]);
  }
  // Boost's PCHIP needs four points; with fewer, the error between points is
  // not assessed (and the result says so).
  const std::size_t n = pts.size();
  if (n >= 4) {
    const auto& x = in.inv_t;
    const auto& y = in.ln_r;
    const double left = pchip_end_slope(x[1] - x[0], x[2] - x[1], (y[1] - y[0]) / (x[1] - x[0]), (y[2] - y[1]) / (x[2] - x[1]));
    const double right = pchip_end_slope(x[n - 1] - x[n - 2], x[n - 2] - x[n - 3], (y[n - 1] - y[n - 2]) / (x[n - 1] - x[n - 2]),
                                   (y[n - 2] - y[n - 3]) / (x[n - 2] - x[n - 3]));
    std::vector<double> xs = x;
    std::vector<double> ys = y;
    in.curve.emplace(std::move(xs), std::move(ys), left, right);
  }
  return in;
}

void assess_between(ModelFit& f, Kind k, const Eigen::VectorXd& x, const Interpolation& in, int samples) {
  if (!in.curve) return;
  f.between_assessed = true;
  for (std::size_t i = 0; i + 1 < in.inv_t.size(); ++i) {
    if (!in.in_window[i] || !in.in_window[i + 1]) continue;
    for (int s = 1; s <= samples; ++s) {
      const double inv_t =
          in.inv_t[i] + (in.inv_t[i + 1] - in.inv_t[i]) * static_cast<double>(s) / static_cast<double>(samples + 1);
      const double t = 1.0 / inv_t;
      const double error = std::abs(model_temperature(k, x, (*in.curve)(inv_t)) - t);
      if (error > f.between_max_error) {
        f.between_max_error = error;
        f.between_max_at = t - kelvin_offset;
      }
    }
  }
}

// -------------------------------------------------------------- one result

ModelFit make_fit(Kind k, const char* method, const std::vector<Point>& pts, const RtData& data,
                  const std::vector<bool>& in_window, const std::vector<std::size_t>& use, bool weighted,
                  const Interpolation& in, int samples) {
  const LinearSolution s = fit_points(k, pts, use, weighted);
  ModelFit f;
  f.model = model_name(k);
  f.method = method;
  f.weighted = weighted;
  f.dof = static_cast<int>(use.size()) - coefficient_count(k);
  f.chi_squared = weighted ? s.chi_squared : 0.0;
  if (f.method != "least-squares")
    for (std::size_t i : use) f.through_celsius.push_back(data.points[i].t_celsius);

  auto u = [&](Eigen::Index i) -> std::optional<double> {
    if (!s.covariance) return std::nullopt;
    return std::sqrt(std::max(0.0, (*s.covariance)(i, i)));
  };
  if (k == Kind::beta) {
    const double r25 = std::exp(s.x(0));
    const auto u_ln = u(0);
    f.coefficients.push_back({"r25", "ohm", r25, u_ln ? std::optional<double>(r25 * *u_ln) : std::nullopt});
    f.coefficients.push_back({"beta", "K", s.x(1), u(1)});
  } else {
    const char* names[] = {"a", "b", "c", "d"};
    for (Eigen::Index i = 0; i < s.x.size(); ++i)
      f.coefficients.push_back({names[i], "1/K", s.x(i), u(i)});
  }

  double sum_sq = 0.0;
  std::size_t count = 0;
  for (std::size_t i = 0; i < pts.size(); ++i) {
    const RtPoint& p = data.points[i];
    const double t_model = model_temperature(k, s.x, pts[i].ln_r);
    const double residual = t_model - pts[i].t_kelvin;
    f.residuals.push_back({p.line, p.t_celsius, p.r_ohm, in_window[i], residual, t_model > 0.0});
    if (!in_window[i]) continue;
    sum_sq += residual * residual;
    ++count;
    if (std::abs(residual) > f.max_residual || count == 1) {
      f.max_residual = std::abs(residual);
      f.max_residual_at = p.t_celsius;
    }
  }
  f.rms_residual = std::sqrt(sum_sq / static_cast<double>(count));
  assess_between(f, k, s.x, in, samples);
  f.worst_error = std::max(f.max_residual, f.between_max_error);
  return f;
}

// ------------------------------------------------------- choosing points

std::string list_temperatures(const RtData& data, const std::vector<std::size_t>& window) {
  std::string text;
  constexpr std::size_t shown = 12;
  for (std::size_t j = 0; j < window.size() && j < shown; ++j) {
    if (j) text += ", ";
    text += printf_number("%g", data.points[window[j]].t_celsius);
  }
  if (window.size() > shown) text += ", ... (" + std::to_string(window.size()) + " points)";
  return text;
}

// The window's points (sorted by temperature) whose temperatures are `wanted`.
std::vector<std::size_t> pick(const RtData& data, const std::vector<std::size_t>& window,
                              const std::vector<double>& wanted, const char* key) {
  std::string given;
  for (double t : wanted) given += (given.empty() ? "" : ", ") + printf_number("%g", t);
  const Where where = command_line(key);
  std::vector<std::size_t> chosen;
  for (double t : wanted) {
    auto it = std::find_if(window.begin(), window.end(), [&](std::size_t i) {
      return std::abs(data.points[i].t_celsius - t) <= same_temperature;
    });
    if (it == window.end())
      reject(where, given,
             "must be temperatures (degC) of data points in " + data.file +
                 " inside the fit window: " + list_temperatures(data, window));
    if (std::find(chosen.begin(), chosen.end(), *it) != chosen.end())
      reject(where, given, "must be distinct temperatures");
    chosen.push_back(*it);
  }
  return chosen;
}

void check_settings(const FitSettings& s) {
  const Where window = command_line("fit.window");
  if (std::isnan(s.t_min) || std::isnan(s.t_max) || s.t_min > s.t_max)
    reject(window, printf_number("%g", s.t_min) + ".." + printf_number("%g", s.t_max), "must be t_min..t_max in degC with t_min <= t_max");
  if (!(s.limit > 0.0) || !std::isfinite(s.limit))
    reject(command_line("fit.limit"), printf_number("%g", s.limit), "must be an error in K > 0");
  if (s.between_samples < 1 || s.between_samples > 100000)
    reject(command_line("fit.between_samples"), std::to_string(s.between_samples),
           "must be a whole number from 1 to 100000");
  if (!s.beta_at.empty() && s.beta_at.size() != 2)
    reject(command_line("fit.beta_at"), std::to_string(s.beta_at.size()) + " temperatures",
           "must be two temperatures in degC, or none for the default");
  if (!s.sh_at.empty() && s.sh_at.size() != 3)
    reject(command_line("fit.sh_at"), std::to_string(s.sh_at.size()) + " temperatures",
           "must be three temperatures in degC, or none for the default");
}

std::string describe(const ModelFit& f) { return f.model + " (" + f.method + ")"; }

FitRecommendation recommend(const FitResult& r, const FitSettings& s) {
  FitRecommendation rec;
  rec.limit = s.limit;
  const std::string window = printf_number("%g", r.window_low) + ".." + printf_number("%g", r.window_high) + " degC";
  for (const char* model : {"beta", "steinhart-hart", "steinhart-hart-4"}) {
    for (std::size_t i = 0; i < r.fits.size(); ++i) {
      const ModelFit& f = r.fits[i];
      if (f.model != model || !(f.worst_error <= s.limit)) continue;
      if (!rec.found || f.worst_error < r.fits[rec.fit].worst_error) rec.fit = i;
      rec.found = true;
    }
    if (rec.found) break;
  }
  if (rec.found) {
    const ModelFit& f = r.fits[rec.fit];
    rec.text = describe(f) + " is the simplest model within " + printf_number("%g", s.limit) + " K over " + window +
               ": its largest error there is " + printf_number("%.3g", f.worst_error) + " K.";
  } else {
    for (std::size_t i = 1; i < r.fits.size(); ++i)
      if (r.fits[i].worst_error < r.fits[rec.fit].worst_error) rec.fit = i;
    const ModelFit& f = r.fits[rec.fit];
    rec.text = "No NTC model meets " + printf_number("%g", s.limit) + " K over " + window + ": the closest, " + describe(f) +
               ", is off by up to " + printf_number("%.3g", f.worst_error) +
               " K. Describe this sensor by its table (or, for a platinum RTD, the rtd model)" +
               (s.extended ? "." : ", or try the four-term form.");
  }
  if (!r.fits.empty() && !r.fits.front().between_assessed)
    rec.text += " The error between data points was not assessed: that needs at least 4 points in the file.";
  return rec;
}

}  // namespace

double ModelFit::value(std::string_view name) const {
  for (const auto& c : coefficients)
    if (c.name == name) return c.value;
  throw std::out_of_range("ModelFit::value: model " + model + " has no coefficient " + std::string(name));
}

BetaCurve beta_through(double t1, double r1, double t2, double r2) {
  const double beta = std::log(r1 / r2) / (1.0 / t1 - 1.0 / t2);
  return {r1 * std::exp(-beta * (1.0 / t1 - 1.0 / t0_kelvin)), beta};
}

std::optional<BetaCurve> beta_curve(const ModelFit& f) {
  if (f.model != "beta") return std::nullopt;
  return BetaCurve{f.value("r25"), f.value("beta")};
}

std::optional<SteinhartHart> steinhart_hart(const ModelFit& f) {
  if (f.model != "steinhart-hart") return std::nullopt;
  return SteinhartHart{f.value("a"), f.value("b"), f.value("c")};
}

namespace {

// A fit whose coefficients or figures overflow (resistances spanning
// hundreds of decades, a mistyped exponent) is not a result: the data is
// refused at the point furthest from the others in ln R, the likely typo.
void require_finite(const ModelFit& f, const RtData& data, const std::vector<Point>& pts,
                    const std::vector<std::size_t>& window) {
  bool finite = std::isfinite(f.max_residual) && std::isfinite(f.rms_residual) && std::isfinite(f.worst_error) &&
                std::isfinite(f.between_max_error);
  for (const auto& c : f.coefficients) finite = finite && std::isfinite(c.value) && (!c.uncertainty || std::isfinite(*c.uncertainty));
  for (const auto& r : f.residuals) finite = finite && std::isfinite(r.residual);
  if (finite) return;
  std::vector<double> ln_r;
  for (std::size_t i : window) ln_r.push_back(pts[i].ln_r);
  std::nth_element(ln_r.begin(), ln_r.begin() + static_cast<std::ptrdiff_t>(ln_r.size() / 2), ln_r.end());
  const double median = ln_r[ln_r.size() / 2];
  std::size_t worst = window.front();
  for (std::size_t i : window)
    if (std::abs(pts[i].ln_r - median) > std::abs(pts[worst].ln_r - median)) worst = i;
  const RtPoint& p = data.points[worst];
  reject_at(data.file, p.line,
            "the " + describe(f) + " fit of this data has no finite coefficients (" + printf_number("%g", p.r_ohm) + " ohm at " +
                printf_number("%g", p.t_celsius) +
                " degC is the resistance furthest from the others): check the data for a mistyped value");
}

}  // namespace

FitResult fit_rt_data(const RtData& data, const FitSettings& settings) {
  check_settings(settings);
  require_monotonic(data);

  FitResult result;
  result.file = data.file;
  result.points_total = data.points.size();
  result.weighted = data.has_uncertainty;

  std::vector<Point> pts;
  std::vector<bool> in_window;
  std::vector<std::size_t> window;  // indices into data.points, by rising temperature
  for (std::size_t i = 0; i < data.points.size(); ++i) {
    const RtPoint& p = data.points[i];
    pts.push_back({p.t_celsius + kelvin_offset, std::log(p.r_ohm), p.u_ohm / p.r_ohm});
    const bool inside = p.t_celsius >= settings.t_min && p.t_celsius <= settings.t_max;
    in_window.push_back(inside);
    if (inside) window.push_back(i);
  }
  std::sort(window.begin(), window.end(),
            [&](std::size_t a, std::size_t b) { return data.points[a].t_celsius < data.points[b].t_celsius; });
  result.points_in_window = window.size();

  const std::size_t needed = settings.extended ? 4 : 3;
  if (window.size() < needed) {
    const bool windowed = window.size() < data.points.size();
    int line = 0;
    for (std::size_t i : window) line = std::max(line, data.points[i].line);
    if (line == 0 && !data.points.empty()) line = data.points.back().line;
    reject_at(data.file, line,
              std::string(data.points.empty() ? "no data points" : "only " + std::to_string(window.size()) +
                                                                       " data point(s)") +
                  (windowed ? " inside the fit window " + printf_number("%g", settings.t_min) + ".." + printf_number("%g", settings.t_max) +
                                  " degC"
                            : "") +
                  "; the " + (settings.extended ? "four-term" : "Steinhart-Hart") + " model needs at least " +
                  std::to_string(needed) + (windowed ? ": widen the window or add points" : ": add points"));
  }
  result.window_low = data.points[window.front()].t_celsius;
  result.window_high = data.points[window.back()].t_celsius;

  std::vector<std::size_t> beta_points;
  if (!settings.beta_at.empty()) {
    beta_points = pick(data, window, settings.beta_at, "fit.beta_at");
  } else {
    auto has = [&](double t) {
      return std::any_of(window.begin(), window.end(),
                         [&](std::size_t i) { return std::abs(data.points[i].t_celsius - t) <= same_temperature; });
    };
    beta_points = has(25.0) && has(85.0) ? pick(data, window, {25.0, 85.0}, "fit.beta_at")
                                         : std::vector<std::size_t>{window.front(), window.back()};
  }

  std::vector<std::size_t> sh_points;
  if (!settings.sh_at.empty()) {
    sh_points = pick(data, window, settings.sh_at, "fit.sh_at");
  } else {
    const double middle = 0.5 * (result.window_low + result.window_high);
    std::size_t best = window[1];
    for (std::size_t j = 1; j + 1 < window.size(); ++j)
      if (std::abs(data.points[window[j]].t_celsius - middle) < std::abs(data.points[best].t_celsius - middle))
        best = window[j];
    sh_points = {window.front(), best, window.back()};
  }

  // The search between points is the fit's cost; a large file with many
  // samples per interval would run for hours, so it is refused before it starts.
  const double comparisons = static_cast<double>(window.size() - 1) * settings.between_samples;
  if (comparisons > max_between_comparisons)
    reject(command_line("fit.between_samples"), std::to_string(settings.between_samples),
           std::to_string(window.size() - 1) + " intervals between the points in the window x " +
               std::to_string(settings.between_samples) + " samples = " + printf_number("%.3g", comparisons) +
               " comparisons per model; at most " + printf_number("%.3g", max_between_comparisons) + ": fewer samples or a narrower window");
  const Interpolation in = make_interpolation(pts, in_window);
  const bool w = data.has_uncertainty;
  const int n = settings.between_samples;
  result.fits.push_back(make_fit(Kind::beta, "two-point", pts, data, in_window, beta_points, w, in, n));
  result.fits.push_back(make_fit(Kind::beta, "least-squares", pts, data, in_window, window, w, in, n));
  result.fits.push_back(make_fit(Kind::sh3, "three-point", pts, data, in_window, sh_points, w, in, n));
  result.fits.push_back(make_fit(Kind::sh3, "least-squares", pts, data, in_window, window, w, in, n));
  if (settings.extended)
    result.fits.push_back(make_fit(Kind::sh4, "least-squares", pts, data, in_window, window, w, in, n));
  for (const auto& f : result.fits) require_finite(f, data, pts, window);
  result.recommendation = recommend(result, settings);
  return result;
}

std::string scenario_snippet(const FitResult& result, std::size_t index) {
  const ModelFit& f = result.fits.at(index);
  std::string text = "# thermargin fit of " + result.file + ": " + describe(f) + ", largest error " +
                     printf_number("%.3g", f.worst_error) + " K over " + printf_number("%g", result.window_low) + ".." +
                     printf_number("%g", result.window_high) + " degC\n";
  if (!(f.worst_error <= result.recommendation.limit))
    text += "# This fit misses the limit of " + printf_number("%g", result.recommendation.limit) +
            " K: use it only if that error is acceptable.\n";
  std::string coefficients;
  for (const auto& c : f.coefficients) coefficients += c.name + " = " + printf_number("%.10g", c.value) + "\n";
  if (f.model == "steinhart-hart-4") {
    text += "# The four-term form 1/T = a + b ln R + c (ln R)^2 + d (ln R)^3 has no scenario model:\n";
    for (const auto& c : f.coefficients) text += "#   " + c.name + " = " + printf_number("%.10g", c.value) + "\n";
    text += "# so the sensor is described by the data as a table, and the firmware by a lookup table.\n";
    text += "# (table_file is read relative to the scenario file: adjust the path if needed.)\n";
    text += "[sensor]\nmodel = table\ntable_file = " + result.file + "\n\n[firmware]\nconversion = table\n";
    return text;
  }
  text += "[sensor]\nmodel = " + f.model + "\n" + coefficients;
  text += "\n[firmware]\nconversion = " + f.model + "\n" + coefficients;
  return text;
}

}  // namespace thermargin

// ------------------------------------------------ platinum RTD data

namespace thermargin {
namespace {

// IEC 60751:2008's coefficients, as rtd.hpp holds them.
constexpr CallendarVanDusen iec60751{};

// The nominal R0 the data stand for: of 100, 500 and 1000 ohm (Pt100 in
// IEC 60751, Pt500 and Pt1000 in common practice) the nearest in ratio.
double nominal_r0(double r0) {
  double best = 100.0;
  for (double n : {500.0, 1000.0})
    if (std::abs(std::log(r0 / n)) < std::abs(std::log(r0 / best))) best = n;
  return best;
}

Eigen::RowVectorXd cvd_row(double t, bool with_c) {
  Eigen::RowVectorXd row(with_c ? 4 : 3);
  row(0) = 1.0;
  row(1) = t;
  row(2) = t * t;
  if (with_c) row(3) = t < 0.0 ? (t - 100.0) * t * t * t : 0.0;
  return row;
}

// The coefficients and their uncertainties from the linear unknowns
// p = (R0, R0·A, R0·B[, R0·C]): A = p1/p0 …, cov = J·cov(p)·Jᵀ (GUM §5.1.2).
void set_coefficients(RtdFit& f, const LinearSolution& s) {
  const Eigen::Index n = s.x.size();
  const double p0 = s.x(0);
  Eigen::VectorXd v(n);
  Eigen::MatrixXd jac = Eigen::MatrixXd::Zero(n, n);
  v(0) = p0;
  jac(0, 0) = 1.0;
  for (Eigen::Index i = 1; i < n; ++i) {
    v(i) = s.x(i) / p0;
    jac(i, 0) = -s.x(i) / (p0 * p0);
    jac(i, i) = 1.0 / p0;
  }
  std::optional<Eigen::MatrixXd> cov;
  if (s.covariance) cov = jac * *s.covariance * jac.transpose();
  static const char* names[] = {"r0", "a", "b", "c"};
  static const char* units[] = {"ohm", "1/degC", "1/degC^2", "1/degC^4"};
  for (Eigen::Index i = 0; i < n; ++i) {
    FitCoefficient c{names[i], units[i], v(i), std::nullopt};
    if (cov) c.uncertainty = std::sqrt(std::max((*cov)(i, i), 0.0));
    f.coefficients.push_back(c);
  }
  f.cvd = {v(0), v(1), v(2), n > 3 ? v(3) : 0.0};
}

// The data against the standard curve with the nominal R0, and the tightest
// class every point of the window meets.
void judge_against_standard(RtdFit& f, const RtData& data, const std::vector<std::size_t>& window) {
  f.nominal_r0 = nominal_r0(f.cvd.r0);
  f.delta_a = f.cvd.a - iec60751.a;
  f.delta_b = f.cvd.b - iec60751.b;
  f.delta_c = f.fitted_c ? f.cvd.c - iec60751.c : 0.0;
  CallendarVanDusen standard = iec60751;
  standard.r0 = f.nominal_r0;
  std::vector<double> deviation;
  for (std::size_t i : window) {
    const RtPoint& p = data.points[i];
    deviation.push_back(temperature_celsius(standard, p.r_ohm) - p.t_celsius);
    if (std::abs(deviation.back()) >= std::abs(f.max_deviation) || deviation.size() == 1) {
      f.max_deviation = deviation.back();
      f.max_deviation_at = p.t_celsius;
    }
  }
  for (RtdClass cls : {RtdClass::AA, RtdClass::A, RtdClass::B, RtdClass::C}) {
    double use = 0.0;
    for (std::size_t j = 0; j < window.size(); ++j)
      use = std::max(use, std::abs(deviation[j]) / class_bound(cls, data.points[window[j]].t_celsius));
    if (use <= 1.0) {
      f.met_class = cls;
      f.class_use = use;
      return;
    }
  }
}

}  // namespace

bool rises_with_temperature(const RtData& data) {
  const auto& p = data.points;
  return p.size() >= 2 && (p[1].r_ohm > p[0].r_ohm) == (p[1].t_celsius > p[0].t_celsius);
}


RtdFit fit_rtd_data(const RtData& data, const FitSettings& settings) {
  check_settings(settings);
  require_monotonic(data);
  if (!data.points.empty() && !rises_with_temperature(data))
    reject_at(data.file, data.points.front().line, 2,
              "the resistance falls with temperature: a platinum RTD's rises (fit this file's NTC models instead)");
  RtdFit f;
  f.file = data.file;
  f.weighted = data.has_uncertainty;
  std::vector<std::size_t> window;
  for (std::size_t i = 0; i < data.points.size(); ++i) {
    const RtPoint& p = data.points[i];
    if (p.t_celsius >= settings.t_min && p.t_celsius <= settings.t_max) window.push_back(i);
  }
  f.points_in_window = window.size();
  for (std::size_t i : window) f.fitted_c = f.fitted_c || data.points[i].t_celsius < 0.0;
  const std::size_t unknowns = f.fitted_c ? 4 : 3;
  if (window.size() < unknowns + 1)
    reject_at(data.file, data.points.empty() ? 0 : data.points.back().line,
              "the Callendar-Van Dusen fit needs at least " + std::to_string(unknowns + 1) + " points in the window (" +
                  (f.fitted_c ? "R0, A, B and C: the window reaches below 0 degC" : "R0, A and B") + "); found " +
                  std::to_string(window.size()));
  const auto n = static_cast<Eigen::Index>(window.size());
  Eigen::MatrixXd x(n, static_cast<Eigen::Index>(unknowns));
  Eigen::VectorXd y(n), sigma(n);
  f.window_low = std::numeric_limits<double>::infinity();
  f.window_high = -f.window_low;
  for (Eigen::Index i = 0; i < n; ++i) {
    const RtPoint& p = data.points[window[static_cast<std::size_t>(i)]];
    x.row(i) = cvd_row(p.t_celsius, f.fitted_c);
    y(i) = p.r_ohm;
    sigma(i) = p.u_ohm;
    f.window_low = std::min(f.window_low, p.t_celsius);
    f.window_high = std::max(f.window_high, p.t_celsius);
  }
  const LinearSolution s = solve(x, y, f.weighted ? &sigma : nullptr);
  f.dof = static_cast<int>(n) - static_cast<int>(unknowns);
  if (f.weighted) f.chi_squared = s.chi_squared;
  set_coefficients(f, s);
  double sum_sq = 0.0;
  bool first = true;
  for (std::size_t i = 0; i < data.points.size(); ++i) {
    const RtPoint& p = data.points[i];
    const bool inside = std::find(window.begin(), window.end(), i) != window.end();
    const double t = temperature_celsius(f.cvd, p.r_ohm);
    const bool solved = t > -kelvin_offset;
    FitResidual r{p.line, p.t_celsius, p.r_ohm, inside, solved ? t - p.t_celsius : -(p.t_celsius + kelvin_offset), solved};
    f.residuals.push_back(r);
    if (!inside) continue;
    sum_sq += r.residual * r.residual;
    if (first || std::abs(r.residual) > std::abs(f.max_residual)) {
      f.max_residual = r.residual;
      f.max_residual_at = p.t_celsius;
      first = false;
    }
  }
  f.rms_residual = std::sqrt(sum_sq / static_cast<double>(n));
  judge_against_standard(f, data, window);
  return f;
}

std::string rtd_scenario_snippet(const RtdFit& f) {
  std::string text = "# thermargin fit of " + f.file + ": Callendar-Van Dusen (least-squares), largest residual " +
                     printf_number("%.3g", std::abs(f.max_residual)) + " K over " + printf_number("%g", f.window_low) + ".." +
                     printf_number("%g", f.window_high) + " degC\n";
  if (!f.fitted_c)
    text += "# No data below 0 degC: C is not fitted and stays IEC 60751's, used below 0 degC only.\n";
  text += "[sensor]\nmodel = rtd\nr0 = " + printf_number("%.10g", f.cvd.r0) + "\ncvd_a = " + printf_number("%.10g", f.cvd.a) +
          "\ncvd_b = " + printf_number("%.10g", f.cvd.b) + "\ncvd_c = " + printf_number("%.10g", f.fitted_c ? f.cvd.c : iec60751.c) + "\n";
  if (f.met_class)
    text += "# The data meet IEC 60751 class " + std::string(to_string(*f.met_class)) +
            " against the standard curve: rtd_class = " + std::string(to_string(*f.met_class)) +
            " describes units bought to that class.\n";
  text += "\n[firmware]\nconversion = exact\n";
  return text;
}

// ------------------------------------------------ a table with limits

namespace {

// The minimum of a unimodal f on [lo, hi] by golden-section search; returns x.
template <class F>
double golden_minimum(F f, double lo, double hi) {
  const double g = 0.5 * (std::sqrt(5.0) - 1.0);
  double a = lo, b = hi, c = b - g * (b - a), d = a + g * (b - a);
  double fc = f(c), fd = f(d);
  for (int i = 0; i < 200 && b - a > 1e-12; ++i) {
    if (fc <= fd) {
      b = d, d = c, fd = fc, c = b - g * (b - a), fc = f(c);
    } else {
      a = c, c = d, fc = fd, d = a + g * (b - a), fd = f(d);
    }
  }
  return 0.5 * (a + b);
}

struct SpreadPoint {
  double t_celsius, distance, upper, lower, slope;  // |L|, h+, h−, |d ln R/dT|
};

// The beta model's largest difference from the limits (K) and where.
std::pair<double, double> spread_difference(const std::vector<SpreadPoint>& pts, double a, double b) {
  double worst = 0.0, at = 0.0;
  for (const auto& p : pts) {
    for (const double diff : {(std::log1p(a) + b * p.distance - p.upper) / p.slope,
                              (-std::log1p(-a) + b * p.distance - p.lower) / p.slope})
      if (std::abs(diff) > std::abs(worst)) worst = diff, at = p.t_celsius;
  }
  return {worst, at};
}

}  // namespace

SpreadFit fit_spread(const RtData& data, const FitSettings& settings) {
  SpreadFit out;
  if (!data.has_limits || data.points.size() < 4) return out;
  const RtTable table(data);
  const auto l25 = table.ln_resistance(t0_kelvin);
  if (!l25) return out;
  std::vector<SpreadPoint> pts;
  for (const auto& p : data.points) {
    if (p.t_celsius < settings.t_min || p.t_celsius > settings.t_max) continue;
    const double t = p.t_celsius + kelvin_offset;
    const auto slope = table.ln_resistance_slope(t);
    if (!slope || *slope == 0.0) continue;
    pts.push_back({p.t_celsius, std::abs(std::log(p.r_ohm) - *l25), std::log(p.r_max_ohm / p.r_ohm),
                   std::log(p.r_ohm / p.r_min_ohm), std::abs(*slope)});
  }
  if (pts.empty()) return out;
  // For each beta tolerance the best R25 tolerance; then the best pair.
  auto best_a = [&](double b) {
    return golden_minimum([&](double a) { return std::abs(spread_difference(pts, a, b).first); }, 0.0, 0.5);
  };
  const double b = golden_minimum([&](double bb) { return std::abs(spread_difference(pts, best_a(bb), bb).first); },
                                  0.0, 0.2);
  const double a = best_a(b);
  const auto [worst, at] = spread_difference(pts, a, b);
  out = {true, a, b, worst, at};
  return out;
}

}  // namespace thermargin
