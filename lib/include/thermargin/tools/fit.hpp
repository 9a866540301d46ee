// Fitting NTC curve coefficients to resistance–temperature points (the
// library behind `thermargin fit DATA.csv`), and judging each fit by its
// error in kelvin.
//
// Models: the beta form ln R = ln R25 + B·(1/T − 1/T0), with B between two
// points as defined in IEC 60539-1, B = ln(R1/R2) / (1/T1 − 1/T2); the
// Steinhart–Hart form 1/T = A + B·ln R + C·(ln R)³ (Steinhart & Hart,
// Deep-Sea Research 15, 1968); and the four-term form that adds C·(ln R)²
// (then D is the cubic coefficient). Each model is linear in its
// coefficients, so every fit is a (weighted) linear least-squares problem
// solved by column-pivoting Householder QR (Eigen); a fit through exactly as
// many points as coefficients is the same problem with zero degrees of
// freedom. Coefficient uncertainties follow the GUM (JCGM 100:2008, §5.2)
// applied to the linear estimator: (XᵀWX)⁻¹ with the data's stated
// uncertainties, s²·(XᵀX)⁻¹ without. The error between data points is
// measured against a monotone piecewise-cubic (PCHIP, Fritsch & Carlson,
// SIAM J. Numer. Anal. 17, 1980) interpolation of ln R against 1/T.
// docs/fit.md explains the weighting and how to read the results.
#pragma once

#include <cstddef>
#include <limits>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "thermargin/chain/ntc.hpp"
#include "thermargin/chain/rtd.hpp"
#include "thermargin/input/rt_data.hpp"

namespace thermargin {

// What to fit and where. Temperatures in °C, errors in K. A setting that
// cannot be used is refused with an input_error that names it as the command
// line would: fit.window, fit.beta_at, fit.sh_at, fit.limit, fit.between_samples.
struct FitSettings {
  // The window: only points with t_min ≤ t ≤ t_max take part in the fits and
  // in the error figures (residuals are still reported for every point).
  // Default: the whole file.
  double t_min = -std::numeric_limits<double>::infinity();
  double t_max = std::numeric_limits<double>::infinity();

  // The two temperatures of the two-point beta. Empty: 25 and 85 °C when
  // both are data points inside the window (the B25/85 of datasheets), else
  // the lowest and highest data points inside the window. When given, two
  // distinct temperatures of data points inside the window.
  std::vector<double> beta_at;

  // The three temperatures of the three-point Steinhart–Hart. Empty: the
  // lowest and highest data points inside the window and the data point
  // nearest the middle of those two (the lower one on a tie). When given,
  // three distinct temperatures of data points inside the window.
  std::vector<double> sh_at;

  // The error a model may make anywhere in the window to be recommended (K, > 0).
  double limit = 0.1;

  // Also fit the four-term form (needs 4 points in the window).
  bool extended = false;

  // Points sampled strictly between each pair of neighbouring data points
  // when looking for the largest error between them (≥ 1).
  int between_samples = 32;
};

// The most samples between points (intervals in the window × between_samples)
// one fit compares per model: about a minute of one core. Beyond, fit_rt_data
// refuses with the count before any work.
inline constexpr double max_between_comparisons = 5e8;

// One coefficient of a fitted model.
struct FitCoefficient {
  std::string name;   // "r25", "beta"; "a", "b", "c" (and "d" for the four-term form)
  std::string unit;   // "ohm", "K", "1/K"
  double value = 0.0;
  // Standard uncertainty; absent when nothing supports one (an exact fit to
  // data without uncertainties: no degrees of freedom left).
  std::optional<double> uncertainty;
};

// A model's residual at one data point of the file.
struct FitResidual {
  int line = 0;             // line in the file
  double t_celsius = 0.0;
  double r_ohm = 0.0;
  bool in_window = false;
  double residual = 0.0;    // K: the model's temperature at r_ohm minus t_celsius
  // False when the model gives no positive temperature at r_ohm (a curve
  // forced onto data it cannot follow): it then reads 0 K, and the residual
  // is minus the point's absolute temperature.
  bool solved = true;
};

// One model fitted by one method, and how well it describes the data.
struct ModelFit {
  std::string model;   // "beta", "steinhart-hart", "steinhart-hart-4"
  std::string method;  // "two-point", "three-point", "least-squares"
  std::vector<FitCoefficient> coefficients;  // in the model's order
  std::vector<double> through_celsius;       // the chosen points of a point method; empty otherwise

  bool weighted = false;    // the data's uncertainties weighted the fit
  int dof = 0;              // points used minus coefficients
  double chi_squared = 0.0; // Σ (residual/σ)² in the fitted domain; weighted fits only

  std::vector<FitResidual> residuals;  // every data point, in file order

  // Inside the window (K; "at" is the data temperature in °C):
  double max_residual = 0.0;           // largest |residual| at a data point
  double max_residual_at = 0.0;
  double rms_residual = 0.0;
  bool between_assessed = false;       // false with fewer than 4 data points
  double between_max_error = 0.0;      // largest |error| between data points
  double between_max_at = 0.0;
  double worst_error = 0.0;            // max(max_residual, between_max_error)

  // The value of the coefficient `name`; a name the model does not have is a bug.
  double value(std::string_view name) const;
};

struct FitRecommendation {
  bool found = false;         // a model meets the limit everywhere in the window
  std::size_t fit = 0;        // index into FitResult::fits: the recommended fit, or the best one when !found
  double limit = 0.0;         // K
  std::string text;           // one sentence for people
};

struct FitResult {
  std::string file;
  double window_low = 0.0;    // °C: the lowest and highest data temperatures inside the window
  double window_high = 0.0;
  std::size_t points_total = 0;
  std::size_t points_in_window = 0;
  bool weighted = false;      // the file carries uncertainties and the least-squares fits use them
  // In this order: beta two-point, beta least-squares, Steinhart–Hart
  // three-point, Steinhart–Hart least-squares, then (extended) the
  // four-term least-squares.
  std::vector<ModelFit> fits;
  FitRecommendation recommendation;
};

// Fits every model to `data` as `settings` asks. Throws input_error naming the
// file (and line) when the data cannot support a model: fewer points in the
// window than its coefficients, duplicate temperatures, resistance not
// monotonic; or when a chosen temperature is not a data point in the window.
// A model that describes the data badly is a result with large residuals.
FitResult fit_rt_data(const RtData& data, const FitSettings& settings = {});

// The beta curve through two points (IEC 60539-1): B = ln(R1/R2)/(1/T1 − 1/T2),
// R25 = R1·exp(−B·(1/T1 − 1/T0)). Kelvin and ohm; T1 ≠ T2.
BetaCurve beta_through(double t1_kelvin, double r1_ohm, double t2_kelvin, double r2_ohm);

// The fitted curve as the sensor type the rest of the library uses; absent
// for a fit of another model.
std::optional<BetaCurve> beta_curve(const ModelFit& fit);
std::optional<SteinhartHart> steinhart_hart(const ModelFit& fit);

// Lines to paste into a scenario file: the [sensor] and [firmware] sections
// for the fit result.fits[index], every coefficient with %.10g. The
// four-term form has no scenario model: its snippet describes the sensor by
// the data file as a table and lists the coefficients as comments.
std::string scenario_snippet(const FitResult& result, std::size_t index);

// ------------------------------------------------ platinum RTD data

// True when the data's resistance rises with temperature (a platinum RTD or
// another PTC element): the NTC forms cannot follow it, the RTD fit can.
bool rises_with_temperature(const RtData& data);

// The Callendar–Van Dusen equation (IEC 60751:2008, §4.2)
// R(t) = R0·[1 + A·t + B·t² + C·(t − 100 °C)·t³], the C term below 0 °C only,
// fitted by linear least squares in R: the unknowns R0, R0·A, R0·B (and R0·C
// when the window holds points below 0 °C) enter linearly. The data's
// uncertainties, when given, weight the fit (1/u(R)); the coefficients'
// uncertainties are the GUM propagation (JCGM 100:2008 §5.1.2) of the
// estimator's covariance through A = (R0·A)/R0 and so on.
struct RtdFit {
  std::string file;
  double window_low = 0.0, window_high = 0.0;  // °C, the data inside the window
  std::size_t points_in_window = 0;
  bool fitted_c = false;      // the window reaches below 0 °C
  bool weighted = false;
  int dof = 0;
  double chi_squared = 0.0;   // weighted fits only
  CallendarVanDusen cvd;      // the fitted curve (c = 0 when not fitted)
  std::vector<FitCoefficient> coefficients;  // r0 (ohm), a (1/degC), b (1/degC^2)[, c (1/degC^4)]
  std::vector<FitResidual> residuals;        // K: the fitted curve's temperature at r_ohm minus t
  double max_residual = 0.0, max_residual_at = 0.0, rms_residual = 0.0;  // inside the window

  // Against IEC 60751's coefficients (A = 3.9083e-3, B = −5.775e-7,
  // C = −4.183e-12) and the nominal R0 nearest the fitted one (100, 500 or
  // 1000 ohm, the standard's Pt100 and the multiples in common use):
  double nominal_r0 = 100.0;
  double delta_a = 0.0, delta_b = 0.0, delta_c = 0.0;  // fitted − standard
  // The data's own deviation from the standard curve with the nominal R0
  // (K: the standard curve's temperature at each point's resistance minus
  // the point's temperature), largest inside the window and where.
  double max_deviation = 0.0, max_deviation_at = 0.0;
  // The tightest IEC 60751 tolerance class whose bound every point inside the
  // window meets (the class's validity range for the construction is not
  // checked here); absent when none does.
  std::optional<RtdClass> met_class;
  // How much of class `met_class`'s bound the worst point uses (0..1).
  double class_use = 0.0;
};

// Fits the window of `settings` (the other settings are the NTC fits').
// Refused with the file and line: fewer points in the window than
// coefficients + 1 (the fit must have a residual to speak of), data that do
// not rise with temperature, the usual ordering rules.
RtdFit fit_rtd_data(const RtData& data, const FitSettings& settings = {});


// Lines to paste into a scenario file: [sensor] model = rtd with r0, cvd_a,
// cvd_b, cvd_c (%.10g), and [firmware] conversion = exact.
std::string rtd_scenario_snippet(const RtdFit& fit);

// ------------------------------------------------ a table with limits

// The R25 and B tolerances whose spread comes closest to a table's limit
// columns (docs/fit.md). The beta model's spread (IEC 60539-1's B between
// 25 °C and T) reaches, at each temperature, ln R_max − ln R_nom =
// ln(1 + a) + b·|ln R_nom(T) − ln R_nom(25 °C)| above and
// ln R_nom − ln R_min = −ln(1 − a) + b·|…| below (a = r25_tol, b = beta_tol,
// both pushing the same way). The pair minimises the largest difference
// from the table's limits in kelvin (the difference in ln R over the
// curve's |d ln R/dT| at the point), over every point of the window.
struct SpreadFit {
  bool found = false;        // the table has limits and covers 25 °C
  double r25_tol = 0.0;      // fraction
  double beta_tol = 0.0;     // fraction
  double max_difference = 0.0;     // K, the model's limit minus the table's (signed), largest |.|
  double max_difference_at = 0.0;  // °C
};
SpreadFit fit_spread(const RtData& data, const FitSettings& settings = {});

}  // namespace thermargin
