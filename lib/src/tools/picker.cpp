// The fixed-resistor picker (picker.hpp): the ranking of the candidates the
// search settled (picker_search.cpp), the rows shown with the figures their
// objective did not need, the Monte Carlo re-check of the top rows and the
// guidance; the entry points beside pick_winner (picker_winner.cpp). The
// pieces share picker_internal.hpp.
#include "thermargin/tools/picker.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <functional>

#include "picker_internal.hpp"
#include "thermargin/core/error.hpp"
#include "thermargin/core/number.hpp"
#include "thermargin/core/parallel.hpp"

namespace thermargin {

namespace picker_detail {

std::string number_text(double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.17g", v);
  return buf;
}

}  // namespace picker_detail

using namespace picker_detail;

std::string_view to_string(Objective o) {
  switch (o) {
    case Objective::worst_case: return "worst-case";
    case Objective::linear: return "linear";
    case Objective::monte_carlo: return "monte-carlo";
    case Objective::sensitivity: return "sensitivity";
  }
  return "worst-case";
}

std::optional<Objective> objective_from_name(std::string_view name) {
  for (Objective o : {Objective::worst_case, Objective::linear, Objective::monte_carlo, Objective::sensitivity})
    if (name == to_string(o)) return o;
  return std::nullopt;
}

std::string_view objective_names() { return "worst-case | linear | monte-carlo | sensitivity"; }

PickResult pick(const Scenario& scenario, const PickOptions& options) {
  const Context ctx = make_context(scenario, options);
  const PickOptions& o = ctx.options;
  PickResult result;
  result.objective = o.objective;
  result.pair_search = ctx.pair;
  result.corners_directed = corners_directed(ctx.design);
  result.tolerance = ctx.design.divider.r_fixed_tol;
  result.tempco = ctx.design.divider.r_fixed_tempco;
  result.window_min = ctx.design.requirement.window_min;
  result.window_max = ctx.design.requirement.window_max;
  result.mc_objective_units = o.objective == Objective::monte_carlo ? ctx.mc_objective_units : 0;
  result.mc_verify_units = o.verify > 0 ? ctx.mc_verify_units : 0;
  result.candidates_label = o.values.empty() ? std::string(to_string(o.series)) + ", " + ohms(o.range_low) + ".." + ohms(o.range_high)
                                             : std::to_string(ctx.values.size()) + " given value" + (ctx.values.size() == 1 ? "" : "s");
  const std::size_t wanted = static_cast<std::size_t>(std::max(o.top, 2));

  // Progress: the screening pass, then the full evaluations (worst case).
  std::function<void(double)> screen_progress;
  if (o.progress) screen_progress = [&](double f) { o.progress(0.8 * std::min(f, 1.0)); };

  std::vector<State> st = search_candidates(ctx, wanted, screen_progress, result);
  result.candidates = st.size();

  // The ranking: feasible first by objective, then the rejected ones.
  std::vector<std::size_t> idx;
  for (std::size_t i = 0; i < st.size(); ++i)
    if (st[i].exact) idx.push_back(i);
  std::sort(idx.begin(), idx.end(), [&](std::size_t a, std::size_t b) { return exact_key(st[a], false) < exact_key(st[b], false); });
  for (const auto& s : st) result.within_constraints += s.constraints.empty();
  const std::size_t shown = std::min<std::size_t>(static_cast<std::size_t>(o.top), idx.size());
  const std::size_t runner = std::min<std::size_t>(2, idx.size());
  const std::size_t keep = std::max(shown, runner);

  // Fill the figures the objective did not need, for the rows shown.
  parallel_for(keep, ctx.threads, [&](std::size_t k) { complete_row(st[idx[k]], ctx); });
  for (std::size_t k = 0; k < keep; ++k) result.rows.push_back(st[idx[k]].row);
  if (result.rows.size() >= 2 && std::isfinite(st[idx[0]].score) && std::isfinite(st[idx[1]].score))
    result.margin = st[idx[1]].score - st[idx[0]].score;

  // Monte Carlo re-check of the top rows.
  const std::size_t verify = std::min<std::size_t>(static_cast<std::size_t>(o.verify), result.rows.size());
  for (std::size_t k = 0; k < verify; ++k) {
    McProgress row_progress;  // the last fifth of the run, a share per row
    if (o.progress)
      row_progress = [&, k](double f) { o.progress(0.8 + 0.2 * (static_cast<double>(k) + std::min(f, 1.0)) / static_cast<double>(verify)); };
    result.rows[k].verify = mc_window(st[idx[k]].built->chain, ctx.window, ctx.mc_verify_units, ctx.threads, row_progress);
  }
  result.rows.resize(shown);

  if (o.guidance && !idx.empty()) add_guidance(result, st, idx, ctx);
  if (o.progress) o.progress(1.0);
  return result;
}

double best_fixed_resistor(const Scenario& scenario, const PickOptions& options) {
  PickOptions o = options;
  o.top = 1;
  o.verify = 0;
  o.guidance = false;
  return pick(scenario, o).winner().r_fixed;
}

std::optional<double> objective_at(const Scenario& scenario, const PickOptions& options, double r_fixed) {
  if (!(r_fixed > 0.0)) reject(command_line("r_fixed"), number_text(r_fixed), "must be a resistance > 0");
  PickOptions o = options;
  o.parallel = false;
  const Context ctx = make_context(scenario, o);
  const Scored s = score_candidate(ctx, {r_fixed, ctx.design.divider.r_parallel});
  if (!std::isfinite(s.score)) return std::nullopt;
  return s.value;
}

}  // namespace thermargin
