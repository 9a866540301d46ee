#include "thermargin/engines/linear_budget.hpp"

#include <algorithm>
#include <cmath>

#include <boost/math/distributions/normal.hpp>

#include "thermargin/chain/element_memo.hpp"
#include "thermargin/engines/second_order.hpp"

namespace thermargin {

namespace {
// Central-difference step as a fraction of each input's bound: small enough
// that curvature does not bias c_i, large enough to stay clear of rounding.
constexpr double relative_step = 1e-3;

// A pair's term is kept when it reaches this fraction of the first-order
// u_c² (0.01 % of the variance: far below any share a table shows, far above
// the chain's numerical noise in the mixed differences, docs/engines.md).
constexpr double negligible_share = 1e-4;

// Pairs whose second derivatives vanish by the chain's structure: the
// offset calibration's reference error is added to the output and appears
// nowhere else; a two-point calibration's output is affine in its two
// reference errors together.
bool structurally_zero(Calibration cal, Source a, Source b) {
  const auto is_ref = [](Source s) { return s == Source::calibration_1 || s == Source::calibration_2; };
  if (cal == Calibration::offset) return is_ref(a) || is_ref(b);
  return is_ref(a) && is_ref(b);
}

// The second-order terms of one point: each input's own curvature into its
// row, the pairs as their own rows.
void add_second_order(LinearPoint& lp, const DeviationModel& model, const Design& d, double first_order_var) {
  const std::size_t n = d.inputs.size();
  std::vector<double> c(n), u(n);
  for (std::size_t i = 0; i < n; ++i) {
    c[i] = lp.terms[i].sensitivity;
    u[i] = lp.terms[i].u;
  }
  const Calibration cal = d.firmware.calibration;
  const SecondOrder so =
      second_order_terms(model, d.inputs, c, u, lp.centre, d.montecarlo.sigma_per_tol,
                         [cal](Source a, Source b) { return structurally_zero(cal, a, b); },
                         negligible_share * first_order_var);
  for (std::size_t i = 0; i < n; ++i) lp.terms[i].second_order = so.own[i];
  for (const PairTerm& p : so.pairs) {
    // The board temperature second: "ADC gain drift × board temperature range".
    const bool swap = d.inputs[p.i].source == Source::board_temperature;
    const SourceInfo &a = info(d.inputs[swap ? p.j : p.i].source), &b = info(d.inputs[swap ? p.i : p.j].source);
    BudgetTerm t;
    t.name = std::string(a.name) + " \u00d7 " + std::string(b.name);
    t.label = std::string(a.label) + " \u00d7 " + std::string(b.label);
    t.sensitivity = p.c_ij;
    t.u = u[p.i] * u[p.j];
    t.contribution = std::fabs(p.c_ij) * t.u;  // variance() = c_ij²·u_i²·u_j² = p.variance
    t.reach = p.reach;
    lp.pairs.push_back(std::move(t));
  }
  lp.second_order_failed = so.failed;
}
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

LinearBudget linear_budget(const Chain& chain, const std::vector<double>& temperatures, BudgetOrder order) {
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
    // Most of the differences move one or two inputs: those of the node and
    // the ADC share the element stages of their unit (element_memo.hpp).
    ElementMemo memo(chain, t);
    auto model = [&](const Deviations& dev, const ReadingShift& shift) -> std::optional<double> {
      const Evaluation e = memo.evaluate(dev, shift, false);
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
    if (order == BudgetOrder::second) {
      // A step the chain cannot read leaves that term out (counted), without
      // failing the point as a first-order failure does.
      const DeviationModel quiet = [&](const Deviations& dev) -> std::optional<double> {
        const Evaluation e = memo.evaluate(dev, centre_shift, false);
        if (e.status != Status::ok) return std::nullopt;
        return e.error;
      };
      add_second_order(lp, quiet, d, var);
      var = 0.0;
      for (const auto& term : lp.terms) var += term.variance();
      for (const auto& term : lp.pairs) var += term.variance();
      var = std::max(var, 0.0);
    }
    lp.u_c = std::sqrt(var);
    lp.low = lp.centre - out.k_p * lp.u_c;
    lp.high = lp.centre + out.k_p * lp.u_c;
    out.points.push_back(std::move(lp));
  }
  return out;
}

}  // namespace thermargin
