// Tests of thermargin/tools/fit.hpp: published spot values (the 10 kΩ
// Steinhart–Hart coefficients, IEC 60539-1's B-value, IEC 60751's Pt100),
// an independent second opinion from NumPy/SciPy run as /usr/bin/python3,
// and the refusal of bad data. The data files in tests/data/fit/ are computed
// from published equations by tests/data/fit/generate.py; none is a measurement.
#include "thermargin/tools/fit.hpp"

#include <gtest/gtest.h>

#include <Eigen/Dense>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <functional>
#include <nlohmann/json.hpp>
#include <string>
#include <tuple>
#include <vector>

#include "cli_run.hpp"
#include "fit_data.hpp"
#include "thermargin/core/error.hpp"
#include "thermargin/chain/ntc.hpp"
#include "thermargin/core/number.hpp"
#include "thermargin/input/rt_data.hpp"

namespace thermargin {
namespace {

using testing::fit_data_file;

// The widely published 10 kΩ Steinhart–Hart coefficients (common practice).
constexpr double sh_a = 1.129148e-3;
constexpr double sh_b = 2.34125e-4;
constexpr double sh_c = 8.76741e-8;

// Points computed to 17 digits from a curve give back its coefficients to
// about the conditioning of the fit (≈1e5 after column scaling) times the
// double rounding: 1e-9 relative leaves a wide margin.
constexpr double recover_rel = 1e-9;
// Two solvers (Eigen QR here, LAPACK SVD in NumPy) on the same least-squares
// problem agree to its condition number times machine epsilon. Observed when
// these tolerances were set: coefficients 5e-13 (three-term) and 4e-10 (the
// four-term form, whose ln R, ln²R, ln³R columns are nearly collinear),
// uncertainties 2e-12, residuals 2e-11 K. Stopping the weighted fit's
// re-weighting after one pass moves the uncertainties by 1e-6: caught.
constexpr double numpy_coef_rel = 1e-8;
constexpr double numpy_u_rel = 1e-9;
constexpr double numpy_residual_k = 1e-9;
constexpr double exact_rel = 1e-12;         // closed-form formulas evaluated two ways

FitResult fit_file(const std::string& name, const FitSettings& s = {}) { return fit_rt_data(read_rt_data(fit_data_file(name)), s); }

const ModelFit& find(const FitResult& r, const std::string& model, const std::string& method) {
  for (const auto& f : r.fits)
    if (f.model == model && f.method == method) return f;
  throw std::runtime_error("no fit " + model + " " + method);
}
const ModelFit& find(FitResult&&, const std::string&, const std::string&) = delete;  // would dangle

double rel(double got, double want) { return std::abs(got - want) / std::abs(want); }

// Runs a Python script with Debian's interpreter (python3-numpy, python3-scipy)
// and returns its JSON output.
nlohmann::json run_fit_python(const std::string& script, const std::string& args) {
  const testing::ScratchDir dir;
  const std::string command = std::string(THERMARGIN_PYTHON) + " " + dir.write("second_opinion.py", script) + " " + args;
  const testing::CliOutcome r = testing::run_shell(command);
  if (r.status != 0) throw std::runtime_error(command + " failed:\n" + r.out + r.err);
  return nlohmann::json::parse(r.out);
}

// An independent least-squares fit with numpy.linalg.lstsq, following
// docs/fit.md: beta fits ln R with weights R/u(R); the Steinhart–Hart forms fit
// 1/T with u(1/T) = |d(1/T)/d ln R|·u(R)/R from the fitted curve, iterated.
// Covariance (XᵀWX)⁻¹ with uncertainties, s²(XᵀX)⁻¹ without (via the SVD).
constexpr const char* numpy_fit = R"PY(
import json, sys
import numpy as np
path, model, tmin, tmax = sys.argv[1], sys.argv[2], float(sys.argv[3]), float(sys.argv[4])
rows = []
for line in open(path):
    line = line.split('#')[0].strip()
    if not line:
        continue
    try:
        rows.append([float(v) for v in line.split(',')])
    except ValueError:
        pass  # the header
d = np.array(rows)
T = d[:, 0] + 273.15
R = d[:, 1]
l = np.log(R)
u = d[:, 2] / R if d.shape[1] > 2 else None
inside = (d[:, 0] >= tmin) & (d[:, 0] <= tmax)
if model == 'beta':
    X, y = np.column_stack([np.ones_like(l), 1 / T - 1 / 298.15]), l
elif model == 'steinhart-hart':
    X, y = np.column_stack([np.ones_like(l), l, l ** 3]), 1 / T
else:
    X, y = np.column_stack([np.ones_like(l), l, l ** 2, l ** 3]), 1 / T
Xi, yi = X[inside], y[inside]

def lstsq(sig):
    return np.linalg.lstsq(Xi / sig[:, None], yi / sig, rcond=None)[0]

sig = np.ones_like(yi)
c = lstsq(sig)
if u is not None:
    if model == 'beta':
        sig = u[inside]
        c = lstsq(sig)
    else:
        for _ in range(10):
            li = l[inside]
            slope = c[1] + 3 * c[2] * li ** 2 if model == 'steinhart-hart' else c[1] + 2 * c[2] * li + 3 * c[3] * li ** 2
            sig = np.abs(slope) * u[inside]
            c = lstsq(sig)
Xw, yw = Xi / sig[:, None], yi / sig
scale = np.linalg.norm(Xw, axis=0)
_, s, vt = np.linalg.svd(Xw / scale, full_matrices=False)
cov = (vt.T / s ** 2) @ vt / np.outer(scale, scale)
ssr = float(np.sum((yw - Xw @ c) ** 2))
if u is None:
    cov *= ssr / (len(yi) - X.shape[1])
Tm = 1 / (1 / 298.15 + (l - c[0]) / c[1]) if model == 'beta' else 1 / (X @ c)
print(json.dumps({'coef': c.tolist(), 'u': np.sqrt(np.diag(cov)).tolist(),
                  'residuals': (Tm - T).tolist(), 'chi2': ssr}))
)PY";

// Compares a fit with NumPy's on the same file and window.
void expect_agrees_with_numpy(const std::string& file, const std::string& model, FitSettings s = {}) {
  const FitResult r = fit_file(file, s);
  const ModelFit& f = find(r, model, "least-squares");
  char window[128];
  std::snprintf(window, sizeof window, " %.17g %.17g", std::max(s.t_min, -1e300), std::min(s.t_max, 1e300));
  const auto py = run_fit_python(numpy_fit, fit_data_file(file) + " " + model + window);
  const auto& coef = py["coef"];
  ASSERT_EQ(coef.size(), f.coefficients.size());
  for (std::size_t i = 0; i < coef.size(); ++i) {
    double mine = f.coefficients[i].value;
    double mine_u = f.coefficients[i].uncertainty.value();
    if (model == "beta" && i == 0) {  // NumPy fits ln R25
      mine_u /= mine;
      mine = std::log(mine);
    }
    EXPECT_LT(rel(mine, coef[i].get<double>()), numpy_coef_rel) << file << " " << model << " coefficient " << i;
    EXPECT_LT(rel(mine_u, py["u"][i].get<double>()), numpy_u_rel) << file << " " << model << " u of coefficient " << i;
  }
  ASSERT_EQ(py["residuals"].size(), f.residuals.size());
  for (std::size_t i = 0; i < f.residuals.size(); ++i)
    EXPECT_NEAR(f.residuals[i].residual, py["residuals"][i].get<double>(), numpy_residual_k)
        << file << " " << model << " line " << f.residuals[i].line;
  if (r.weighted) EXPECT_LT(rel(f.chi_squared, py["chi2"].get<double>()), numpy_u_rel);
}

void expect_input_error(const std::function<void()>& action, const std::vector<std::string>& parts) {
  try {
    action();
    ADD_FAILURE() << "no input_error";
  } catch (const input_error& e) {
    for (const auto& part : parts) EXPECT_NE(std::string(e.what()).find(part), std::string::npos) << e.what();
  }
}

// ------------------------------------------------------------ Steinhart–Hart

TEST(FitSteinhartHart, RecoversPublishedCoefficients) {
  const FitResult r = fit_file("sh10k_exact.csv");
  for (const char* method : {"least-squares", "three-point"}) {
    const ModelFit& f = find(r, "steinhart-hart", method);
    EXPECT_LT(rel(f.value("a"), sh_a), recover_rel) << method;
    EXPECT_LT(rel(f.value("b"), sh_b), recover_rel) << method;
    EXPECT_LT(rel(f.value("c"), sh_c), recover_rel) << method;
    EXPECT_LT(f.max_residual, 1e-9) << method;
  }
}

// The Steinhart–Hart equation (Steinhart & Hart 1968) with the common-practice
// coefficients gives R(0 °C) = 32650.375, R(25 °C) = 9999.854,
// R(50 °C) = 3601.035, R(100 °C) = 678.4235 Ω, rounded as printed here. Rounding to the printed digit moves
// each ln R by at most δ = (half a unit of the last digit)/R, which moves that
// point's 1/T by |B + 3C ln²R|·δ; the coefficients of the exact fit through
// three points then move by at most Σ |M⁻¹|·|δ(1/T)|. That bound, computed
// here, is the precision those rounded values allow.
void expect_three_point_within_rounding(const std::vector<double>& at, const std::vector<double>& half_units) {
  FitSettings s;
  s.sh_at = at;
  const FitResult r = fit_file("sh10k_reference.csv", s);
  const ModelFit& f = find(r, "steinhart-hart", "three-point");
  ASSERT_EQ(f.through_celsius, at);

  const RtData data = read_rt_data(fit_data_file("sh10k_reference.csv"));
  Eigen::Matrix3d m;
  Eigen::Vector3d shift;
  for (int i = 0; i < 3; ++i) {
    double r_ohm = 0;
    for (const auto& p : data.points)
      if (p.t_celsius == at[static_cast<std::size_t>(i)]) r_ohm = p.r_ohm;
    const double l = std::log(r_ohm);
    m.row(i) << 1.0, l, l * l * l;
    shift(i) = std::abs(sh_b + 3 * sh_c * l * l) * half_units[static_cast<std::size_t>(i)] / r_ohm;
  }
  const Eigen::Vector3d bound = m.inverse().cwiseAbs() * shift;
  // The bound is small against the coefficients: the check is not vacuous.
  EXPECT_LT(bound(2) / sh_c, 1e-3);
  EXPECT_NEAR(f.value("a"), sh_a, bound(0));
  EXPECT_NEAR(f.value("b"), sh_b, bound(1));
  EXPECT_NEAR(f.value("c"), sh_c, bound(2));
  // Through its three points the fit is exact.
  for (const auto& p : f.residuals)
    if (std::find(at.begin(), at.end(), p.t_celsius) != at.end()) EXPECT_NEAR(p.residual, 0.0, 1e-9);
}

TEST(FitSteinhartHart, ThreePointThroughReferenceValuesReproducesCoefficients) {
  // The default points: the window's ends (0, 100 °C) and the point nearest the middle (50 °C).
  expect_three_point_within_rounding({0, 50, 100}, {0.0005, 0.0005, 0.00005});
  expect_three_point_within_rounding({0, 25, 100}, {0.0005, 0.0005, 0.00005});
}

TEST(FitSteinhartHart, ThreePointMatchesTheLibrarysClosedFormThroughThePoints) {
  FitSettings s;
  s.sh_at = {-20, 40, 110};
  const FitResult r = fit_file("sh10k_rounded.csv", s);
  const ModelFit& f = find(r, "steinhart-hart", "three-point");
  const RtData data = read_rt_data(fit_data_file("sh10k_rounded.csv"));
  double t[3], l[3];
  int k = 0;
  for (const auto& p : data.points)
    if (p.t_celsius == -20 || p.t_celsius == 40 || p.t_celsius == 110) {
      t[k] = p.t_celsius + kelvin_offset;
      l[k++] = std::log(p.r_ohm);
    }
  ASSERT_EQ(k, 3);
  const SteinhartHart want = steinhart_hart_through(t, l);
  EXPECT_LT(rel(f.value("a"), want.a), recover_rel);
  EXPECT_LT(rel(f.value("b"), want.b), recover_rel);
  EXPECT_LT(rel(f.value("c"), want.c), recover_rel);
  EXPECT_FALSE(f.coefficients[0].uncertainty.has_value());  // exact fit, no data uncertainty: nothing to say
}

TEST(FitSteinhartHart, LeastSquaresAgreesWithNumPy) {
  expect_agrees_with_numpy("sh10k_rounded.csv", "steinhart-hart");
  FitSettings s;
  s.t_min = -10;
  s.t_max = 90;
  expect_agrees_with_numpy("sh10k_rounded.csv", "steinhart-hart", s);
}

TEST(FitSteinhartHart, WeightedLeastSquaresAgreesWithNumPy) {
  expect_agrees_with_numpy("sh10k_rounded_u.csv", "steinhart-hart");
}

TEST(FitSteinhartHart, WeightedChiSquaredFitsTheRoundingUncertainty) {
  // The file's uncertainties are those of rounding to 4 digits (JCGM 100:2008
  // §4.3.7), and the curve is the right one, so χ² should be a plausible draw
  // from the χ² distribution with the fit's degrees of freedom (central 99.8 %
  // from scipy.stats.chi2); the beta form, the wrong curve, is far outside it.
  const FitResult r = fit_file("sh10k_rounded_u.csv");
  const ModelFit& sh = find(r, "steinhart-hart", "least-squares");
  const ModelFit& beta = find(r, "beta", "least-squares");
  ASSERT_EQ(sh.dof, 31);
  const auto py = run_fit_python(R"PY(
import json, sys
from scipy.stats import chi2
print(json.dumps([chi2.ppf(0.001, int(sys.argv[1])), chi2.ppf(0.999, int(sys.argv[1]))]))
)PY", "31");
  EXPECT_GT(sh.chi_squared, py[0].get<double>());
  EXPECT_LT(sh.chi_squared, py[1].get<double>());
  EXPECT_GT(beta.chi_squared, 1000 * py[1].get<double>());
}

TEST(FitSteinhartHart, ExtendedFormAgreesWithNumPy) {
  FitSettings s;
  s.extended = true;
  expect_agrees_with_numpy("sh10k_rounded.csv", "steinhart-hart-4", s);
  expect_agrees_with_numpy("sh10k_rounded_u.csv", "steinhart-hart-4", s);
}

TEST(FitSteinhartHart, ExtendedFormRecoversThreeTermCurve) {
  // A three-term curve is the four-term form with c = 0 and d = C.
  FitSettings s;
  s.extended = true;
  const FitResult r = fit_file("sh10k_exact.csv", s);
  const ModelFit& f = find(r, "steinhart-hart-4", "least-squares");
  EXPECT_LT(f.max_residual, 1e-6);
  EXPECT_LT(std::abs(f.value("c")) * 12.7 * 12.7, 1e-12);  // the ln²R term stays below 1e-12 /K over the data
  EXPECT_LT(rel(f.value("d"), sh_c), 1e-4);
}

// --------------------------------------------------------------------- beta

TEST(FitBeta, TwoPointEqualsIec60539Definition) {
  const RtData data = read_rt_data(fit_data_file("sh10k_exact.csv"));
  const double r25 = testing::resistance_at(data, 25), r85 = testing::resistance_at(data, 85);
  // IEC 60539-1: B = ln(R1/R2) / (1/T1 − 1/T2).
  const double b25_85 = std::log(r25 / r85) / (1 / 298.15 - 1 / 358.15);
  const FitResult r = fit_rt_data(data);
  const ModelFit& f = find(r, "beta", "two-point");
  EXPECT_EQ(f.through_celsius, (std::vector<double>{25, 85}));  // the default when both are data points
  EXPECT_LT(rel(f.value("beta"), b25_85), exact_rel);
  EXPECT_LT(rel(f.value("r25"), r25), exact_rel);  // the curve passes through R(25 °C)
  EXPECT_NEAR(f.residuals[13].residual, 0.0, 1e-9);  // 25 °C is the 14th point
  const BetaCurve closed = beta_through(298.15, r25, 358.15, r85);
  EXPECT_LT(rel(closed.beta, b25_85), exact_rel);
  EXPECT_LT(rel(closed.r25, r25), exact_rel);
  // Chosen away from 25 °C, R25 comes from the curve through the two points.
  const BetaCurve off = beta_through(273.15, 32650.374707926923, 373.15, 678.42351102339057);
  EXPECT_LT(rel(off.r25 * std::exp(off.beta * (1 / 273.15 - 1 / 298.15)), 32650.374707926923), exact_rel);
  EXPECT_LT(rel(off.r25 * std::exp(off.beta * (1 / 373.15 - 1 / 298.15)), 678.42351102339057), exact_rel);
}

TEST(FitBeta, TwoPointFallsBackToWindowEnds) {
  FitSettings s;
  s.t_min = 0;
  s.t_max = 60;
  const FitResult r = fit_file("sh10k_exact.csv", s);
  const ModelFit& f = find(r, "beta", "two-point");
  EXPECT_EQ(f.through_celsius, (std::vector<double>{0, 60}));
  const RtData data = read_rt_data(fit_data_file("sh10k_exact.csv"));
  double r0 = 0, r60 = 0;
  for (const auto& p : data.points) {
    if (p.t_celsius == 0) r0 = p.r_ohm;
    if (p.t_celsius == 60) r60 = p.r_ohm;
  }
  EXPECT_LT(rel(f.value("beta"), std::log(r0 / r60) / (1 / 273.15 - 1 / 333.15)), exact_rel);  // IEC 60539-1
  EXPECT_EQ(r.window_low, 0);
  EXPECT_EQ(r.window_high, 60);
}

TEST(FitBeta, TwoPointUncertaintyFollowsGumPropagation) {
  const RtData data = read_rt_data(fit_data_file("sh10k_rounded_u.csv"));
  const FitResult r = fit_rt_data(data);
  const ModelFit& f = find(r, "beta", "two-point");
  const RtPoint* p25 = nullptr;
  const RtPoint* p85 = nullptr;
  for (const auto& p : data.points) {
    if (p.t_celsius == 25) p25 = &p;
    if (p.t_celsius == 85) p85 = &p;
  }
  ASSERT_TRUE(p25 && p85);
  // JCGM 100:2008 eq. (10) on B = (ln R1 − ln R2)/(1/T1 − 1/T2), u(ln R) = u(R)/R.
  const double u_b = std::hypot(p25->u_ohm / p25->r_ohm, p85->u_ohm / p85->r_ohm) / (1 / 298.15 - 1 / 358.15);
  EXPECT_LT(rel(f.coefficients[1].uncertainty.value(), u_b), exact_rel);
  // With T1 = T0 the curve's R25 is R1 itself, so u(R25) = u(R1).
  EXPECT_LT(rel(f.coefficients[0].uncertainty.value(), p25->u_ohm), exact_rel);
}

TEST(FitBeta, LeastSquaresAgreesWithNumPy) {
  expect_agrees_with_numpy("sh10k_rounded.csv", "beta");
  expect_agrees_with_numpy("sh10k_rounded_u.csv", "beta");
}

TEST(FitBeta, LeastSquaresRecoversABetaCurve) {
  // R25 = 10 kΩ, B = 3950 K: a common catalogue pairing (common practice);
  // points from the beta equation itself, so the fit must give it back.
  std::string text = "t,R\n";
  for (int t = -30; t <= 120; t += 10) {
    char line[64];
    std::snprintf(line, sizeof line, "%d,%.17g\n", t, 10000.0 * std::exp(3950.0 * (1 / (t + 273.15) - 1 / 298.15)));
    text += line;
  }
  const FitResult r = fit_rt_data(parse_rt_data(text, "beta3950.csv"));
  const ModelFit& f = find(r, "beta", "least-squares");
  EXPECT_LT(rel(f.value("r25"), 10000.0), exact_rel);
  EXPECT_LT(rel(f.value("beta"), 3950.0), exact_rel);
  EXPECT_LT(f.worst_error, 1e-9);
}

TEST(FitData, FileOrderDoesNotMatter) {
  // The same points listed from hot to cold give the same fits.
  const RtData up = read_rt_data(fit_data_file("sh10k_rounded_u.csv"));
  RtData down = up;
  std::reverse(down.points.begin(), down.points.end());
  const FitResult a = fit_rt_data(up);
  const FitResult b = fit_rt_data(down);
  ASSERT_EQ(a.fits.size(), b.fits.size());
  for (std::size_t i = 0; i < a.fits.size(); ++i) {
    EXPECT_EQ(a.fits[i].through_celsius.size(), b.fits[i].through_celsius.size());
    for (std::size_t j = 0; j < a.fits[i].coefficients.size(); ++j)
      EXPECT_LT(rel(a.fits[i].coefficients[j].value, b.fits[i].coefficients[j].value), 1e-12) << a.fits[i].model;
    EXPECT_NEAR(a.fits[i].worst_error, b.fits[i].worst_error, 1e-12) << a.fits[i].model;
  }
}

// ------------------------------------------------------------ between points

// SciPy's PchipInterpolator: the same interior slopes as Boost's pchip
// (weighted harmonic mean) and the same three-point end slopes that fit.cpp
// gives Boost, so the two interpolations must agree over every interval.
constexpr const char* scipy_between = R"PY(
import json, sys
import numpy as np
from scipy.interpolate import PchipInterpolator
path, model, samples, tmin, tmax = sys.argv[1], sys.argv[2], int(sys.argv[3]), float(sys.argv[4]), float(sys.argv[5])
c = [float(v) for v in sys.argv[6:]]
rows = []
for line in open(path):
    line = line.split('#')[0].strip()
    try:
        rows.append([float(v) for v in line.split(',')])
    except ValueError:
        pass
d = np.array(rows)
order = np.argsort(-d[:, 0])
x = 1 / (d[order, 0] + 273.15)
t = d[order, 0]
f = PchipInterpolator(x, np.log(d[order, 1]))
worst, at = 0.0, None
for i in range(len(x) - 1):
    if not (tmin <= t[i] <= tmax and tmin <= t[i + 1] <= tmax):
        continue
    for s in range(1, samples + 1):
        xs = x[i] + (x[i + 1] - x[i]) * s / (samples + 1)
        l = f(xs)
        inv = 1 / 298.15 + (l - np.log(c[0])) / c[1] if model == 'beta' else c[0] + c[1] * l + c[2] * l ** 3
        e = abs(1 / inv - 1 / xs)
        if e > worst:
            worst, at = e, 1 / xs - 273.15
print(json.dumps({'worst': worst, 'at': at}))
)PY";

TEST(FitBetweenPoints, MatchesScipyPchip) {
  for (const auto& [file, lo, hi] : {std::tuple{"sh10k_rounded.csv", -40.0, 125.0}, std::tuple{"sh10k_rounded.csv", -10.0, 60.0},
                                      std::tuple{"sh10k_reference.csv", 0.0, 100.0}}) {
    FitSettings s;
    s.t_min = lo;
    s.t_max = hi;
    s.between_samples = 16;
    const FitResult r = fit_file(file, s);
    for (const char* model : {"beta", "steinhart-hart"}) {
      const ModelFit& f = find(r, model, "least-squares");
      ASSERT_TRUE(f.between_assessed);
      char window[64];
      std::snprintf(window, sizeof window, " 16 %g %g", lo, hi);
      std::string args = fit_data_file(file) + " " + model + window;
      for (const auto& c : f.coefficients) {
        char buf[40];
        std::snprintf(buf, sizeof buf, " %.17g", c.value);
        args += buf;
      }
      const auto py = run_fit_python(scipy_between, args);
      EXPECT_NEAR(f.between_max_error, py["worst"].get<double>(), numpy_residual_k) << file << " " << model;
      EXPECT_NEAR(f.between_max_at, py["at"].get<double>(), 1e-9) << file << " " << model;
      EXPECT_EQ(f.worst_error, std::max(f.max_residual, f.between_max_error));
    }
  }
}

TEST(FitBetweenPoints, NotAssessedWithThreePoints) {
  const FitResult r = fit_rt_data(parse_rt_data("0,32650.375\n50,3601.035\n100,678.4235\n", "three.csv"));
  EXPECT_FALSE(r.fits[0].between_assessed);
  EXPECT_NE(r.recommendation.text.find("not assessed"), std::string::npos);
}

// --------------------------------------------------------------- residuals

TEST(FitResiduals, AreModelTemperatureMinusPointTemperatureAndCountOnlyInsideTheWindow) {
  FitSettings s;
  s.t_min = -20;
  s.t_max = 100;
  const FitResult r = fit_file("sh10k_rounded.csv", s);
  const ModelFit& f = find(r, "beta", "two-point");
  ASSERT_EQ(f.residuals.size(), 34u);
  double worst = 0, sum_sq = 0;
  int inside = 0;
  for (const auto& p : f.residuals) {
    // The beta equation solved for T (IEC 60539-1 form), minus the point's temperature.
    const double t_model = 1 / (1 / 298.15 + std::log(p.r_ohm / f.value("r25")) / f.value("beta")) - 273.15;
    EXPECT_NEAR(p.residual, t_model - p.t_celsius, 1e-9) << p.line;
    EXPECT_EQ(p.in_window, p.t_celsius >= -20 && p.t_celsius <= 100);
    if (!p.in_window) continue;
    worst = std::max(worst, std::abs(p.residual));
    sum_sq += p.residual * p.residual;
    ++inside;
  }
  EXPECT_EQ(inside, 25);
  EXPECT_EQ(r.points_in_window, 25u);
  EXPECT_DOUBLE_EQ(f.max_residual, worst);
  EXPECT_DOUBLE_EQ(f.rms_residual, std::sqrt(sum_sq / inside));
  // Outside the window the beta curve strays further than inside it.
  EXPECT_GT(std::abs(f.residuals.front().residual), f.max_residual);
}

// -------------------------------------------------------------- Pt100 (PTC)

TEST(FitPt100, TableFileMatchesIec60751) {
  // Pt100 values computed with the IEC 60751 equation and coefficients, to 0.001 Ω.
  const std::vector<std::pair<double, double>> table = {{-200, 18.520}, {-100, 60.256}, {0, 100.000},
                                                        {200, 175.856}, {400, 247.092}, {600, 313.708},
                                                        {850, 390.481}};
  const RtData data = read_rt_data(fit_data_file("pt100_iec60751.csv"));
  for (const auto& [t, r] : table)
    for (const auto& p : data.points)
      if (p.t_celsius == t) EXPECT_NEAR(p.r_ohm, r, 0.0005 + 1e-9) << t;
}

TEST(FitPt100, NtcModelsReportLargeResidualsAndNoneIsRecommended) {
  FitSettings s;
  s.extended = true;
  const FitResult r = fit_file("pt100_iec60751.csv", s);
  ASSERT_EQ(r.fits.size(), 5u);
  EXPECT_GT(find(r, "beta", "two-point").max_residual, 1.0);
  EXPECT_GT(find(r, "beta", "least-squares").max_residual, 1.0);
  for (const auto& f : r.fits) {
    EXPECT_GT(f.worst_error, 0.1) << f.model << " " << f.method;
    EXPECT_TRUE(std::isfinite(f.worst_error) && std::isfinite(f.rms_residual)) << f.model << " " << f.method;
    for (const auto& c : f.coefficients) EXPECT_TRUE(std::isfinite(c.value)) << f.model << " " << c.name;
    for (const auto& p : f.residuals) EXPECT_TRUE(std::isfinite(p.residual)) << f.model << " " << p.line;
  }
  EXPECT_FALSE(r.recommendation.found);
  EXPECT_NE(r.recommendation.text.find("No NTC model meets 0.1 K"), std::string::npos) << r.recommendation.text;
  // A curve with no positive temperature at a resistance reads 0 K there, and says so.
  std::size_t unsolved = 0;
  for (const auto& f : r.fits)
    for (const auto& p : f.residuals) {
      const double t_model = p.residual + p.t_celsius + kelvin_offset;
      EXPECT_EQ(p.solved, t_model > 0.0) << f.model << " " << f.method << " line " << p.line;
      if (!p.solved) {
        ++unsolved;
        EXPECT_EQ(p.residual, -(p.t_celsius + kelvin_offset)) << f.model << " line " << p.line;
      }
    }
  EXPECT_GT(unsolved, 0u);  // the least-squares beta of a PTC has no temperature at its hot end
}

// ----------------------------------------------------------- recommendation

TEST(FitRecommendation, PicksTheSimplestModelWithinTheLimit) {
  // Rounding R to 4 digits leaves ≈0.01 K of scatter; the beta form is off by
  // kelvins over −40…125 °C, so Steinhart–Hart is the simplest that meets 0.1 K.
  const FitResult r = fit_file("sh10k_rounded.csv");
  ASSERT_TRUE(r.recommendation.found) << r.recommendation.text;
  const ModelFit& best = r.fits[r.recommendation.fit];
  EXPECT_EQ(best.model, "steinhart-hart");
  EXPECT_LE(best.worst_error, 0.1);
  EXPECT_GT(find(r, "beta", "least-squares").worst_error, 0.1);
  EXPECT_GT(find(r, "beta", "two-point").worst_error, 0.1);

  FitSettings loose;
  loose.limit = find(r, "beta", "least-squares").worst_error * 1.01;
  const FitResult rl = fit_file("sh10k_rounded.csv", loose);
  EXPECT_EQ(rl.fits[rl.recommendation.fit].model, "beta");

  FitSettings strict;
  strict.limit = 1e-5;
  strict.extended = true;
  const FitResult rs = fit_file("sh10k_rounded.csv", strict);
  EXPECT_FALSE(rs.recommendation.found);
  for (const auto& f : rs.fits) EXPECT_GE(f.worst_error, rs.fits[rs.recommendation.fit].worst_error);
}

// ------------------------------------------------------------------ snippet

double snippet_value(const std::string& text, const std::string& section, const std::string& key) {
  const auto at = text.find("[" + section + "]");
  const auto line = text.find("\n" + key + " = ", at);
  if (at == std::string::npos || line == std::string::npos) throw std::runtime_error(section + "." + key + " missing");
  const auto start = line + key.size() + 4;
  // Read back as a scenario file reads it: the engineering-number parser.
  return parse_quantity(text.substr(start, text.find('\n', start) - start),
                        key == "r25" ? Quantity::resistance : Quantity::plain, Where{Origin::file, "snippet", 0, key});
}

TEST(FitSnippet, CarriesTheCoefficientsToTenDigits) {
  const FitResult r = fit_file("sh10k_rounded.csv");
  for (std::size_t i = 0; i < r.fits.size(); ++i) {
    const ModelFit& f = r.fits[i];
    const std::string text = scenario_snippet(r, i);
    EXPECT_NE(text.find("[sensor]\nmodel = " + f.model + "\n"), std::string::npos) << text;
    EXPECT_NE(text.find("[firmware]\nconversion = " + f.model + "\n"), std::string::npos) << text;
    for (const auto& c : f.coefficients) {
      EXPECT_LT(rel(snippet_value(text, "sensor", c.name), c.value), 5e-10) << text;  // %.10g
      EXPECT_LT(rel(snippet_value(text, "firmware", c.name), c.value), 5e-10) << text;
    }
  }
}

TEST(FitSnippet, SaysWhenTheFitMissesTheLimit) {
  // A Pt100 (values computed with the IEC 60751 equation) is no NTC: the closest fit's lines carry the warning.
  const FitResult pt = fit_file("pt100_iec60751.csv");
  ASSERT_FALSE(pt.recommendation.found);
  EXPECT_NE(scenario_snippet(pt, pt.recommendation.fit).find("# This fit misses the limit of 0.1 K"), std::string::npos);
  const FitResult ntc = fit_file("sh10k_rounded.csv");
  ASSERT_TRUE(ntc.recommendation.found);
  EXPECT_EQ(scenario_snippet(ntc, ntc.recommendation.fit).find("misses the limit"), std::string::npos);
  EXPECT_NE(scenario_snippet(ntc, 0).find("misses the limit"), std::string::npos);  // the two-point beta is off by kelvins
}

TEST(FitSnippet, FourTermFormFallsBackToTheTable) {
  FitSettings s;
  s.extended = true;
  const FitResult r = fit_file("sh10k_rounded.csv", s);
  const std::string text = scenario_snippet(r, 4);
  EXPECT_NE(text.find("model = table\ntable_file = " + fit_data_file("sh10k_rounded.csv") + "\n"), std::string::npos) << text;
  EXPECT_NE(text.find("conversion = table\n"), std::string::npos) << text;
}

// ----------------------------------------------------------------- bad data

TEST(FitData, TooFewPointsNameTheFileAndLine) {
  expect_input_error([] { fit_file("too_few_points.csv"); }, {"too_few_points.csv:4", "at least 3"});
  FitSettings s;
  s.t_min = 0;
  s.t_max = 5;  // 0 and 5 °C, lines 12 and 13
  expect_input_error([&] { fit_file("sh10k_exact.csv", s); }, {"sh10k_exact.csv:13", "window", "at least 3"});
  FitSettings ext;
  ext.extended = true;
  ext.t_min = 0;
  ext.t_max = 10;
  expect_input_error([&] { fit_file("sh10k_exact.csv", ext); }, {"sh10k_exact.csv:14", "at least 4"});
}

TEST(FitData, PercentUncertaintyIsRelativeToTheResistance) {
  // The third column in % is the relative standard uncertainty u(R)/R
  // (JCGM 100:2008 §5.1.6, from memory): the same file written in % gives the
  // same weighted fits as in ohm, and differs from fitting with the
  // percentages read as ohms (which would weigh the points otherwise).
  const RtData in_ohm = read_rt_data(fit_data_file("sh10k_rounded_u.csv"));
  std::string percent = "t,R,u\n", as_ohm = "t,R,u\n";
  for (const auto& p : in_ohm.points) {
    char line[128];
    std::snprintf(line, sizeof line, "%g,%.17g,%.17g", p.t_celsius, p.r_ohm, 100.0 * p.u_ohm / p.r_ohm);
    percent += std::string(line) + "%\n";
    as_ohm += std::string(line) + "\n";
  }
  const RtData in_percent = parse_rt_data(percent, "percent.csv");
  ASSERT_TRUE(in_percent.has_uncertainty);
  for (std::size_t i = 0; i < in_ohm.points.size(); ++i)
    EXPECT_LT(rel(in_percent.points[i].u_ohm, in_ohm.points[i].u_ohm), exact_rel) << in_ohm.points[i].line;
  const FitResult a = fit_rt_data(in_ohm), b = fit_rt_data(in_percent), wrong = fit_rt_data(parse_rt_data(as_ohm, "ohm.csv"));
  ASSERT_EQ(a.fits.size(), b.fits.size());
  for (std::size_t i = 0; i < a.fits.size(); ++i)
    for (std::size_t j = 0; j < a.fits[i].coefficients.size(); ++j) {
      EXPECT_LT(rel(b.fits[i].coefficients[j].value, a.fits[i].coefficients[j].value), 1e-12) << a.fits[i].model;
      EXPECT_LT(rel(b.fits[i].coefficients[j].uncertainty.value(), a.fits[i].coefficients[j].uncertainty.value()), 1e-9)
          << a.fits[i].model;
    }
  const ModelFit& sh = find(a, "steinhart-hart", "least-squares");
  EXPECT_GT(rel(find(wrong, "steinhart-hart", "least-squares").coefficients[0].uncertainty.value(),
                sh.coefficients[0].uncertainty.value()),
            0.5);
}

TEST(FitData, NegativeOrZeroUncertaintyIsRejected) {
  expect_input_error([] { fit_file("bad_negative_uncertainty.csv"); },
                     {"uncertainty = -0.5% (", "bad_negative_uncertainty.csv:5:3", "> 0"});
  expect_input_error([] { fit_rt_data(parse_rt_data("0,32650,1\n25,10000,0\n50,3601,1\n", "zero.csv")); },
                     {"uncertainty = 0 (zero.csv:2:3)", "> 0"});
}

TEST(FitData, DuplicateTemperatureIsRejected) {
  expect_input_error([] { fit_file("bad_duplicate_temperature.csv"); }, {"bad_duplicate_temperature.csv:5", "duplicate"});
}

TEST(FitData, NonMonotonicResistanceIsRejected) {
  expect_input_error([] { fit_file("bad_nonmonotonic.csv"); }, {"bad_nonmonotonic.csv:5", "monoton"});
}

TEST(FitData, NegativeResistanceIsRejected) {
  expect_input_error([] { fit_file("bad_negative.csv"); }, {"bad_negative.csv:4", "resistance"});
}

TEST(FitData, MissingColumnIsRejected) {
  expect_input_error([] { fit_file("bad_missing_column.csv"); }, {"bad_missing_column.csv:5", "columns"});
}

TEST(FitData, ChosenTemperaturesMustBeDataPointsInTheWindow) {
  FitSettings s;
  s.beta_at = {27, 85};
  expect_input_error([&] { fit_file("sh10k_exact.csv", s); }, {"fit.beta_at = 27, 85", "sh10k_exact.csv", "-40, -35"});
  FitSettings w;
  w.t_max = 50;
  w.sh_at = {0, 25, 75};
  expect_input_error([&] { fit_file("sh10k_exact.csv", w); }, {"fit.sh_at", "inside the fit window"});
  FitSettings same;
  same.beta_at = {25, 25};
  expect_input_error([&] { fit_file("sh10k_exact.csv", same); }, {"fit.beta_at", "distinct"});
}

TEST(FitData, InvalidSettingsAreRejected) {
  FitSettings window;
  window.t_min = 50;
  window.t_max = 0;
  expect_input_error([&] { fit_file("sh10k_exact.csv", window); }, {"fit.window = 50..0"});
  FitSettings limit;
  limit.limit = 0;
  expect_input_error([&] { fit_file("sh10k_exact.csv", limit); }, {"fit.limit = 0", "> 0"});
  FitSettings three;
  three.beta_at = {0, 25, 50};
  expect_input_error([&] { fit_file("sh10k_exact.csv", three); }, {"fit.beta_at", "two temperatures"});
}

}  // namespace
}  // namespace thermargin
