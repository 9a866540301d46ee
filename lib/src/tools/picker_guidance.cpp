// The analytic guidance beside the picker's ranking (docs/pick.md): the
// continuous optimum by Brent's method, the largest sensitivity at the
// window's centre and the three-point linearisation, each with its
// neighbours in the series.
#include "picker_internal.hpp"

#include <algorithm>
#include <cmath>
#include <map>

#include <boost/math/tools/minima.hpp>

#include "thermargin/chain/divider.hpp"
#include "thermargin/chain/sensor.hpp"
#include "thermargin/tools/series.hpp"

namespace thermargin {
namespace picker_detail {

namespace {

// The candidates either side of x: the series neighbours, or the nearest
// given values.
std::pair<std::optional<double>, std::optional<double>> neighbours(const Context& ctx, double x) {
  if (ctx.options.values.empty()) {
    const SeriesBracket b = series_bracket(ctx.options.series, x);
    return {b.below, b.above};
  }
  std::optional<double> below, above;
  for (double v : ctx.values) {
    if (v <= x * (1.0 + 1e-12)) below = v;
    if (v >= x * (1.0 - 1e-12) && !above) above = v;
  }
  return {below, above};
}

}  // namespace

// The analytic guidance beside the ranking: the continuous optimum (Brent
// on ln R between the best candidate's neighbours), the largest sensitivity
// at the window centre and the three-point linearisation, each with its
// series neighbours and their objective values.
void add_guidance(PickResult& result, std::vector<State>& st, const std::vector<std::size_t>& idx, const Context& ctx) {
  const PickOptions& o = ctx.options;
  Guidance& g = result.guidance;
  const Design& d = ctx.design;
  const std::optional<double> rp = st[idx[0]].c.r_parallel;
  Design at_rp = d;
  at_rp.divider.r_parallel = rp;
  g.t_centre = 0.5 * (d.requirement.window_min + d.requirement.window_max);
  g.max_sensitivity.r = nominal_branch_resistance(at_rp, g.t_centre);
  const auto r1 = nominal_branch_resistance(at_rp, d.requirement.window_min);
  const auto r3 = nominal_branch_resistance(at_rp, d.requirement.window_max);
  if (r1 && g.max_sensitivity.r && r3) g.linearising.r = linearising_resistor(*r1, *g.max_sensitivity.r, *r3);

  // The best candidate by the objective alone, and Brent between its
  // neighbours (with the same parallel resistor).
  result.evaluated_in_full += settle(st, 1, true, ctx);
  std::size_t best = idx[0];
  for (std::size_t i = 0; i < st.size(); ++i)
    if (st[i].exact && exact_key(st[i], true) < exact_key(st[best], true)) best = i;
  const Candidate& bc = st[best].c;
  if (std::isfinite(st[best].score)) {
    std::vector<double> line;
    for (const auto& s : st)
      if (s.c.r_parallel == bc.r_parallel) line.push_back(s.c.r_fixed);
    std::sort(line.begin(), line.end());
    const auto it = std::lower_bound(line.begin(), line.end(), bc.r_fixed);
    double lo = it == line.begin() ? (o.values.empty() ? o.range_low : bc.r_fixed) : *(it - 1);
    double hi = it + 1 == line.end() ? (o.values.empty() ? o.range_high : bc.r_fixed) : *(it + 1);
    if (hi > lo) {
      int evaluations = 0;
      auto f = [&](double x) {
        ++evaluations;
        const Scored s = score_candidate(ctx, {std::exp(x), bc.r_parallel});
        return std::isfinite(s.score) ? s.score : brent_penalty;
      };
      std::uintmax_t iterations = brent_max_iterations;
      const auto [x, fx] = boost::math::tools::brent_find_minima(f, std::log(lo), std::log(hi), brent_bits, iterations);
      g.evaluations = evaluations;
      if (fx < brent_penalty) {
        g.optimum.r = std::exp(x);
        g.optimum.objective = maximised(o.objective) ? -fx : fx;
      }
    }
  }
  // Neighbours of each guidance value, with their objective values (from
  // the ranking where it evaluated them, else evaluated here).
  std::map<Candidate, std::optional<double>> known;
  for (const auto& s : st)
    if (s.exact) known[s.c] = std::isfinite(s.score) ? std::optional<double>(s.row.objective) : std::nullopt;
  std::vector<std::pair<GuidanceValue*, bool>> values{{&g.optimum, true}, {&g.max_sensitivity, false}, {&g.linearising, false}};
  std::vector<Candidate> missing;
  for (auto& [gv, with_objective] : values) {
    if (!gv->r) continue;
    std::tie(gv->below, gv->above) = neighbours(ctx, *gv->r);
    for (const auto& n : {gv->below, gv->above})
      if (n && !known.count({*n, bc.r_parallel})) missing.push_back({*n, bc.r_parallel});
  }
  std::sort(missing.begin(), missing.end());
  missing.erase(std::unique(missing.begin(), missing.end(),
                            [](const Candidate& a, const Candidate& b) { return !(a < b) && !(b < a); }),
                missing.end());
  std::vector<Scored> scored(missing.size());
  // One candidate at a time with every thread on its temperatures.
  for (std::size_t i = 0; i < missing.size(); ++i) scored[i] = score_candidate(ctx, missing[i]);
  for (std::size_t i = 0; i < missing.size(); ++i)
    known[missing[i]] = std::isfinite(scored[i].score) ? std::optional<double>(scored[i].value) : std::nullopt;
  for (auto& [gv, with_objective] : values) {
    if (gv->below) gv->below_objective = known[{*gv->below, bc.r_parallel}];
    if (gv->above) gv->above_objective = known[{*gv->above, bc.r_parallel}];
  }
}

}  // namespace picker_detail

using namespace picker_detail;

std::optional<double> linearising_resistor(double r1, double r2, double r3) {
  const double den = r1 + r3 - 2.0 * r2;
  const double num = r1 * r2 + r2 * r3 - 2.0 * r1 * r3;
  if (den == 0.0) return std::nullopt;
  const double r = num / den;
  if (!(r > 0.0) || !std::isfinite(r)) return std::nullopt;
  return r;
}

std::optional<double> nominal_branch_resistance(const Design& d, double t_celsius) {
  const auto l = nominal_ln_resistance(d.sensor, t_celsius + kelvin_offset);
  if (!l) return std::nullopt;
  return branch_resistance(std::exp(*l), d.sensor.lead_resistance, d.divider.r_parallel);
}

}  // namespace thermargin
