#include "thermargin/engines/linear_budget.hpp"

#include <cmath>

#include <boost/math/distributions/normal.hpp>

namespace thermargin {

namespace {
// Central-difference step as a fraction of each input's bound: small enough
// that curvature does not bias c_i, large enough to stay clear of rounding.
constexpr double relative_step = 1e-3;
}  // namespace

double coverage_factor(double p) {
  const boost::math::normal_distribution<> n;
  return boost::math::quantile(n, 0.5 + 0.5 * p);
}

double quantizer_mean(Quantizer q) { return q == Quantizer::floor ? -0.5 : 0.0; }

std::optional<Propagation> propagate(const std::function<std::optional<double>(const Deviations&)>& model,
                                     const std::vector<ToleranceInput>& inputs, double sigma_per_tol) {
  Propagation p;
  Deviations d{};
  const auto centre = model(d);
  if (!centre) return std::nullopt;
  p.centre = *centre;
  double var = 0.0;
  for (const auto& in : inputs) {
    const auto i = static_cast<std::size_t>(in.source);
    const double h = in.bound * relative_step;
    d[i] = h;
    const auto up = model(d);
    d[i] = -h;
    const auto down = model(d);
    d[i] = 0.0;
    if (!up || !down) return std::nullopt;
    BudgetTerm t;
    t.name = std::string(info(in.source).name);
    t.label = std::string(info(in.source).label);
    t.sensitivity = (*up - *down) / (2 * h);
    t.u = standard_uncertainty(in, sigma_per_tol);
    t.contribution = std::fabs(t.sensitivity) * t.u;
    var += t.contribution * t.contribution;
    p.terms.push_back(std::move(t));
  }
  p.u_c = std::sqrt(var);
  return p;
}

LinearBudget linear_budget(const Chain& chain, const std::vector<double>& temperatures) {
  const Design& d = chain.design();
  LinearBudget out;
  out.k_p = coverage_factor(d.montecarlo.coverage);
  const double mean_shift = quantizer_mean(d.adc.quantizer);
  const int cal_points = calibration_points(d.firmware.calibration);
  ReadingShift centre_shift;
  centre_shift.at_t = mean_shift;
  centre_shift.at_cal[0] = centre_shift.at_cal[1] = mean_shift;

  for (double t : temperatures) {
    LinearPoint lp;
    lp.t = t;
    Status failure = Status::ok;
    auto model = [&](const Deviations& dev, const ReadingShift& shift) -> std::optional<double> {
      const Evaluation e = chain.evaluate(dev, t, shift, false);
      if (e.status != Status::ok) {
        if (failure == Status::ok) failure = e.status;
        return std::nullopt;
      }
      return e.error;
    };
    const auto prop = propagate([&](const Deviations& dev) { return model(dev, centre_shift); }, d.inputs,
                                d.montecarlo.sigma_per_tol);
    if (!prop) {
      lp.status = failure == Status::ok ? Status::no_solution : failure;
      out.points.push_back(std::move(lp));
      continue;
    }
    lp.centre = prop->centre;
    lp.terms = prop->terms;
    // The reading-level sources: the reading at t and each calibration
    // reading are independent, so their variances add; the output rounding
    // applies to each converted reading in the same way.
    const Deviations zero{};
    auto slope_over_readings = [&](bool output) -> std::optional<double> {
      double sum_sq = 0.0;
      for (int r = 0; r <= cal_points; ++r) {
        constexpr double h = 1e-3;  // LSB, or K for the output
        ReadingShift up = centre_shift, down = centre_shift;
        double& u_ref = output ? (r == 0 ? up.output_at_t : up.output_at_cal[r - 1]) : (r == 0 ? up.at_t : up.at_cal[r - 1]);
        double& d_ref = output ? (r == 0 ? down.output_at_t : down.output_at_cal[r - 1]) : (r == 0 ? down.at_t : down.at_cal[r - 1]);
        u_ref += h;
        d_ref -= h;
        const auto a = model(zero, up), b = model(zero, down);
        if (!a || !b) return std::nullopt;
        const double c = (*a - *b) / (2 * h);
        sum_sq += c * c;
      }
      return std::sqrt(sum_sq);
    };
    const auto slope = slope_over_readings(false);
    const auto output_slope = slope_over_readings(true);
    if (!slope || !output_slope) {
      lp.status = failure == Status::ok ? Status::no_solution : failure;
      out.points.push_back(std::move(lp));
      continue;
    }
    auto reading_term = [&](ReadingSource s, double sensitivity, double u) {
      BudgetTerm term{std::string(info(s).name), std::string(info(s).label), sensitivity, u,
                      std::fabs(sensitivity) * u};
      lp.terms.push_back(std::move(term));
    };
    reading_term(ReadingSource::quantization, *slope, 1.0 / std::sqrt(12.0));
    reading_term(ReadingSource::noise, *slope, d.adc.noise / std::sqrt(static_cast<double>(d.adc.averaging)));
    reading_term(ReadingSource::resolution, *output_slope, d.firmware.resolution / std::sqrt(12.0));
    double var = 0.0;
    for (const auto& term : lp.terms) var += term.contribution * term.contribution;
    lp.u_c = std::sqrt(var);
    lp.low = lp.centre - out.k_p * lp.u_c;
    lp.high = lp.centre + out.k_p * lp.u_c;
    out.points.push_back(std::move(lp));
  }
  return out;
}

}  // namespace thermargin
