// Tests of the platinum RTD fit in thermargin/tools/fit.hpp (fit_rtd_data):
// IEC 60751's Callendar–Van Dusen coefficients recovered from the
// standard's own table values and from values computed with its equation,
// the tolerance class the data meet, and the CLI's RTD section.
#include <gtest/gtest.h>

#include <nlohmann/json.hpp>

#include <array>
#include <cmath>
#include <sstream>
#include <string>
#include <vector>

#include "cli_run.hpp"
#include "fit_data.hpp"
#include "thermargin/chain/rtd.hpp"
#include "thermargin/core/error.hpp"
#include "thermargin/input/rt_data.hpp"
#include "thermargin/tools/fit.hpp"

namespace thermargin {
namespace {

using testing::fit_data_file;

// IEC 60751:2008, the Callendar–Van Dusen coefficients of the standard curve.
constexpr double iec_a = 3.9083e-3, iec_b = -5.775e-7, iec_c = -4.183e-12, iec_r0 = 100.0;

// The largest shift of R0, A, B, C that rounding every resistance by at most
// `half_step` ohm can cause in a least-squares fit, to first order: the
// linear unknowns p = (R0, R0·A, R0·B, R0·C) move by X⁺·e with |e_i| ≤
// half_step, so |Δp_j| ≤ half_step·Σ_i |X⁺_ji|; then ΔA ≤ (|Δp1| + |A|·|Δp0|)/R0.
// X⁺ = (XᵀX)⁻¹Xᵀ with the columns scaled to unit norm, by Gauss–Jordan
// elimination here (plain arithmetic: the library's Eigen is built for the
// host's vector units, the tests are not, and the two must not share Eigen's
// templates).
std::vector<double> rounding_bound(const RtData& data, double half_step) {
  const std::size_t n = data.points.size();
  std::vector<std::array<double, 4>> x(n);
  std::array<double, 4> norm{};
  for (std::size_t i = 0; i < n; ++i) {
    const double t = data.points[i].t_celsius;
    x[i] = {1.0, t, t * t, t < 0 ? (t - 100.0) * t * t * t : 0.0};
    for (int j = 0; j < 4; ++j) norm[j] += x[i][j] * x[i][j];
  }
  for (int j = 0; j < 4; ++j) norm[j] = std::sqrt(norm[j]);
  for (auto& row : x)
    for (int j = 0; j < 4; ++j) row[j] /= norm[j];
  // [XᵀX | I] reduced to [I | (XᵀX)⁻¹].
  double m[4][8] = {};
  for (int a = 0; a < 4; ++a) {
    for (int b = 0; b < 4; ++b)
      for (const auto& row : x) m[a][b] += row[a] * row[b];
    m[a][4 + a] = 1.0;
  }
  for (int c = 0; c < 4; ++c) {
    int pivot = c;
    for (int r = c + 1; r < 4; ++r)
      if (std::abs(m[r][c]) > std::abs(m[pivot][c])) pivot = r;
    for (int k = 0; k < 8; ++k) std::swap(m[c][k], m[pivot][k]);
    const double d = m[c][c];
    for (int k = 0; k < 8; ++k) m[c][k] /= d;
    for (int r = 0; r < 4; ++r) {
      if (r == c) continue;
      const double f = m[r][c];
      for (int k = 0; k < 8; ++k) m[r][k] -= f * m[c][k];
    }
  }
  std::vector<double> dp(4, 0.0);
  for (int j = 0; j < 4; ++j) {
    for (const auto& row : x) {
      double v = 0.0;
      for (int k = 0; k < 4; ++k) v += m[j][4 + k] * row[k];
      dp[j] += half_step * std::abs(v);
    }
    dp[j] /= norm[j];  // back to the unscaled unknowns
  }
  const double coef[] = {0.0, iec_a, iec_b, iec_c};
  std::vector<double> bound{dp[0]};
  for (int j = 1; j < 4; ++j) bound.push_back(1.01 * (dp[j] + std::abs(coef[j]) * dp[0]) / iec_r0);
  return bound;
}

void expect_iec_coefficients(const RtdFit& f, const std::vector<double>& bound) {
  ASSERT_TRUE(f.fitted_c);
  ASSERT_EQ(f.coefficients.size(), 4u);
  EXPECT_NEAR(f.cvd.r0, iec_r0, bound[0]);
  EXPECT_NEAR(f.cvd.a, iec_a, bound[1]);
  EXPECT_NEAR(f.cvd.b, iec_b, bound[2]);
  EXPECT_NEAR(f.cvd.c, iec_c, bound[3]);
  EXPECT_EQ(f.coefficients[0].name, "r0");
  EXPECT_EQ(f.coefficients[3].name, "c");
  EXPECT_DOUBLE_EQ(f.delta_a, f.cvd.a - iec_a);
}

TEST(RtdFit, RecoversIec60751FromTheStandardsTable) {
  // IEC 60751:2008's Pt100 table, every 50 degC, 0.01 ohm (values from memory,
  // see the file's header): the fit returns the standard's A, B, C and R0 to
  // within what the table's rounding allows.
  const RtData data = read_rt_data(fit_data_file("pt100_iec60751_table.csv"));
  const RtdFit f = fit_rtd_data(data);
  expect_iec_coefficients(f, rounding_bound(data, 0.005));
  EXPECT_DOUBLE_EQ(f.nominal_r0, 100.0);
  // Rounding 0.005 ohm is at most 0.005/0.29 ≈ 0.017 K at the hot end (slope
  // R0·(A + 2B·t) ≈ 0.29 ohm/K at 850 degC, computed with the IEC 60751
  // equation); the fit's residuals stay inside.
  EXPECT_LT(std::abs(f.max_residual), 0.02);
  // The standard's own values meet the tightest class (AA: ±(0.1 + 0.0017|t|)).
  ASSERT_TRUE(f.met_class);
  EXPECT_EQ(*f.met_class, RtdClass::AA);
}

TEST(RtdFit, RecoversIec60751FromValuesComputedWithItsEquation) {
  // Computed with the IEC 60751 equation every 10 degC, rounded to 1 micro-ohm
  // (tests/data/fit/generate.py).
  const RtData data = read_rt_data(fit_data_file("pt100_iec60751.csv"));
  const RtdFit f = fit_rtd_data(data);
  expect_iec_coefficients(f, rounding_bound(data, 0.5e-6));
  EXPECT_LT(std::abs(f.max_residual), 1e-5);
  ASSERT_TRUE(f.coefficients[1].uncertainty);
  // The rounding's scatter gives uncertainties of the rounding's size.
  EXPECT_LT(*f.coefficients[1].uncertainty, rounding_bound(data, 0.5e-6)[1]);
}

// An independent least-squares fit with numpy.linalg.lstsq of the linear
// unknowns (R0, R0·A, R0·B, R0·C) after scaling the columns to unit norm,
// s²·(XᵀX)⁻¹ for their covariance and the
// Jacobian of the ratios for A, B, C (GUM §5.1.2), run with Debian's python3.
constexpr const char* numpy_cvd = R"PY(
import json, sys
import numpy as np
rows = [l.split(',') for l in open(sys.argv[1]) if l[:1].isdigit() or l[:1] == '-']
t = np.array([float(a) for a, b in rows])
r = np.array([float(b) for a, b in rows])
x = np.column_stack([np.ones_like(t), t, t * t, np.where(t < 0, (t - 100.0) * t ** 3, 0.0)])
# Columns brought to unit norm first: 1 and (t - 100)·t³ differ by 10⁹.
norm = np.linalg.norm(x, axis=0)
xs = x / norm
p = np.linalg.lstsq(xs, r, rcond=None)[0] / norm
res = r - x @ p
cov = (res @ res) / (len(t) - 4) * np.linalg.inv(xs.T @ xs) / np.outer(norm, norm)
jac = np.zeros((4, 4))
jac[0, 0] = 1.0
for i in range(1, 4):
    jac[i, 0] = -p[i] / p[0] ** 2
    jac[i, i] = 1.0 / p[0]
u = np.sqrt(np.diag(jac @ cov @ jac.T))
print(json.dumps({"value": [p[0], p[1] / p[0], p[2] / p[0], p[3] / p[0]], "u": list(u)}))
)PY";

TEST(RtdFit, AgreesWithNumpy) {
  const std::string file = fit_data_file("pt100_iec60751_table.csv");
  const testing::ScratchDir dir;
  const auto r = testing::run_shell(std::string(THERMARGIN_PYTHON) + " " + dir.write("cvd.py", numpy_cvd) + " " +
                                    testing::shell_quote(file));
  ASSERT_EQ(r.status, 0) << r.err;
  const auto py = nlohmann::json::parse(r.out);
  const RtdFit f = fit_rtd_data(read_rt_data(file));
  // Two solvers of the same well-posed problem (QR with column scaling here,
  // NumPy's SVD there): agreement to 1e-9 relative (common practice for
  // double-precision least squares of this conditioning).
  for (std::size_t i = 0; i < 4; ++i) {
    EXPECT_NEAR(f.coefficients[i].value, py["value"][i].get<double>(), 1e-9 * std::abs(py["value"][i].get<double>()));
    ASSERT_TRUE(f.coefficients[i].uncertainty);
    EXPECT_NEAR(*f.coefficients[i].uncertainty, py["u"][i].get<double>(), 1e-6 * py["u"][i].get<double>());
  }
}

// A Pt1000 element 0.2 K warm everywhere against the IEC 60751 curve,
// computed with the standard's equation: R(t) = R_IEC(t + 0.2 K)·10.
RtData warm_pt1000(double shift_k, double t_lo, double t_hi) {
  std::ostringstream text;
  text << "t,R\n";
  CallendarVanDusen pt1000;
  pt1000.r0 = 1000.0;
  for (double t = t_lo; t <= t_hi; t += 10.0) text << t << "," << std::to_string(resistance(pt1000, t + shift_k)) << "\n";
  return parse_rt_data(text.str(), "pt1000.csv");
}

TEST(RtdFit, NamesTheClassTheDataMeet) {
  // IEC 60751 class bounds at 0 degC: AA 0.10 K, A 0.15 K, B 0.30 K.
  const RtdFit warm = fit_rtd_data(warm_pt1000(0.2, -50, 200));
  EXPECT_DOUBLE_EQ(warm.nominal_r0, 1000.0);
  ASSERT_TRUE(warm.met_class);
  EXPECT_EQ(*warm.met_class, RtdClass::B);
  // The data's deviation from the standard curve is the shift, read back in K
  // (the standard curve reads each resistance 0.2 K above the point's temperature).
  EXPECT_NEAR(warm.max_deviation, 0.2, 1e-5);
  const RtdFit far = fit_rtd_data(warm_pt1000(5.0, 0, 200));
  EXPECT_FALSE(far.met_class);
  EXPECT_FALSE(far.fitted_c);  // no data below 0 degC: no C
  EXPECT_EQ(far.coefficients.size(), 3u);
}

TEST(RtdFit, RefusesTooFewPointsAndFallingData) {
  EXPECT_THROW(fit_rtd_data(parse_rt_data("t,R\n-10,96.09\n0,100\n10,103.9\n20,107.79\n", "few.csv")), input_error);
  EXPECT_THROW(fit_rtd_data(parse_rt_data("t,R\n0,100\n10,90\n20,80\n30,70\n40,60\n", "ntc.csv")), input_error);
}

TEST(RtdFit, CliShowsTheRtdFitAndItsScenarioLines) {
  const auto r = testing::run_cli("fit " + testing::shell_quote(fit_data_file("pt100_iec60751_table.csv")));
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("RTD RECOMMENDATION"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("model = rtd"), std::string::npos);
  EXPECT_NE(r.out.find("within class AA"), std::string::npos);
  const auto j = testing::cli_json("fit " + testing::shell_quote(fit_data_file("pt100_iec60751_table.csv")));
  const RtdFit want = fit_rtd_data(read_rt_data(fit_data_file("pt100_iec60751_table.csv")));
  EXPECT_EQ(j["rtd"]["coefficients"]["a"].get<double>(), want.cvd.a);
  EXPECT_EQ(j["rtd"]["standard"]["class"], "AA");
}

}  // namespace
}  // namespace thermargin
