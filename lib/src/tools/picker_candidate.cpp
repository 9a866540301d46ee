// One candidate through the picker's ranking (picker_internal.hpp): its
// design and chain, the nominal profile and the constraints, the screen
// with the worst case's lower bound, the refinement towards its full worst
// case, and the objective evaluated on its own.
#include "picker_internal.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>

#include "thermargin/chain/divider.hpp"
#include "thermargin/engines/linear_budget.hpp"
#include "thermargin/engines/nominal.hpp"
#include "thermargin/input/life.hpp"

namespace thermargin {
namespace picker_detail {

namespace {

// The sampled node's settling over the window: the nominal unit, and for
// precharge = any both rails of what C_s may hold.
void settling_profile(const Built& b, const Context& ctx, NominalProfile& n) {
  const Design& d = b.design;
  n.settling = d.adc.samples_settle();
  if (!n.settling) return;
  std::vector<double> starts{0.0};
  if (d.adc.precharge == Precharge::any) starts = {-0.5 * d.supply.v_reference_nominal(), 0.5 * d.supply.v_reference_nominal()};
  for (double t : ctx.window)
    for (double s : starts) {
      Deviations dev{};
      dev[static_cast<std::size_t>(Source::adc_precharge)] = s;
      const FrontEnd fe = b.chain.analog_front_end(dev, t);
      if (fe.status == Status::ok) n.max_settling_lsb = std::max(n.max_settling_lsb, std::fabs(fe.acquisition_shift));
    }
}

std::vector<std::string> violated(const PickConstraints& c, const NominalProfile& n) {
  std::vector<std::string> out;
  if (c.max_self_heating && n.max_self_heating > *c.max_self_heating) out.emplace_back("max-self-heating");
  if (c.max_current && n.max_current > *c.max_current) out.emplace_back("max-current");
  if (c.max_power && n.max_power > *c.max_power) out.emplace_back("max-power");
  if (c.min_span && n.span < *c.min_span) out.emplace_back("min-span");
  if (c.min_sensitivity && n.min_sensitivity < *c.min_sensitivity) out.emplace_back("min-sensitivity");
  // The reading settles to within ½ LSB (only where the sampling capacitor is modelled).
  if (c.settles && n.settling && n.max_settling_lsb > 0.5) out.emplace_back("settles");
  return out;
}

// The worst case's lower bound from the directed corners at `temps` (with
// their linear budget), and the order in which refine() enumerates: those
// temperatures, largest bound first, then `rest`.
void bound_worst_case(State& s, const std::vector<double>& temps, const LinearBudget& lb, const std::vector<double>& rest) {
  const DirectedBound b = directed_bound(s.built->chain, temps, lb);
  s.bound = b.value;
  std::vector<std::size_t> by_bound(b.at.size());
  std::iota(by_bound.begin(), by_bound.end(), std::size_t{0});
  std::stable_sort(by_bound.begin(), by_bound.end(), [&](std::size_t x, std::size_t y) { return b.at[x] > b.at[y]; });
  for (std::size_t k : by_bound) s.pending.push_back(temps[k]);
  s.pending.insert(s.pending.end(), rest.begin(), rest.end());
  s.directed_at = b.at;
  if (b.status != Status::ok) {
    s.certain_unreadable = true;
    set_status(s, b.status);
  }
  if (s.row.status != Status::ok) {
    // Runaway or a certain unreadable window: nothing to evaluate in full.
    s.score = inf;
    s.exact = true;
  }
  finish_row(s);
}

// The full worst case of a screened candidate.
void evaluate_in_full(State& s, const Context& ctx, int threads) {
  const WindowBand wc = worst_case_band(s.built->chain, ctx.window, CornerMethod::automatic, threads);
  if (wc.status != Status::ok) set_status(s, wc.status);
  else s.row.wc_max_abs = wc.max_abs;
  set_score(s, Objective::worst_case, wc.max_abs);
  finish_row(s);
}

}  // namespace

std::unique_ptr<Built> build(const Context& ctx, const Candidate& c) {
  if (!ctx.pair) {
    // build_design reads divider.r_fixed in one place, into the divider's
    // value (checked > 0, as check_options has), and number_text gives it
    // back to the bit: the validated base design with the value set is the
    // design the scenario with that key set builds, without reading every
    // key (and a table sensor's file) again for each candidate.
    Design d = ctx.design;
    d.divider.r_fixed = c.r_fixed;
    return std::make_unique<Built>(std::move(d));
  }
  Scenario s = ctx.base;
  const Where w = command_line("candidate");
  s.set("divider.r_fixed", number_text(c.r_fixed), w);
  if (ctx.pair) {
    s.set("divider.r_parallel", c.r_parallel ? number_text(*c.r_parallel) : "none", w);
    if (!c.r_parallel) s.set("divider.r_parallel_tol", "0", w);
  }
  return std::make_unique<Built>(build_design(s));
}

NominalProfile nominal_profile(const Built& b, const Context& ctx) {
  const Design& d = b.design;
  NominalProfile n;
  const Deviations zero{};
  for (double t : ctx.range) {
    const FrontEnd fe = b.chain.front_end(zero, t);
    if (fe.status == Status::runaway && n.range_status == Status::ok) n.range_status = Status::runaway;
    if (fe.status != Status::ok) continue;
    n.max_self_heating = std::max(n.max_self_heating, fe.rise);
    // The current through the fixed resistor is the divider's current; with
    // every deviation zero there is no leakage and V_exc is nominal.
    const double v_fixed = d.divider.placement == Placement::low ? d.supply.v_excitation - fe.v_node : fe.v_node;
    n.max_current = std::max(n.max_current, v_fixed / d.divider.r_fixed);
  }
  n.max_power = d.supply.v_excitation * n.max_current;
  double lo = inf, hi = -inf, smin = inf;
  for (double t : ctx.window) {
    const NominalPoint p = nominal_point(b.chain, t);
    if (p.status != Status::ok) {
      if (n.window_status == Status::ok) n.window_status = p.status;
      continue;
    }
    smin = std::min(smin, std::fabs(p.sensitivity));
    lo = std::min(lo, p.code);
    hi = std::max(hi, p.code);
  }
  n.min_sensitivity = std::isfinite(smin) ? smin : 0.0;
  n.span = hi > lo ? (hi - lo) / d.adc_span() : 0.0;
  settling_profile(b, ctx, n);
  return n;
}

void set_status(State& s, Status st) {
  if (s.row.status == Status::ok) s.row.status = st;
}

void finish_row(State& s) {
  s.row.rejected_by.clear();
  if (s.row.status != Status::ok) s.row.rejected_by.emplace_back(to_string(s.row.status));
  s.row.rejected_by.insert(s.row.rejected_by.end(), s.constraints.begin(), s.constraints.end());
}

void set_score(State& s, Objective o, double value) {
  const bool ok = s.row.status == Status::ok;
  s.score = ok ? (maximised(o) ? -value : value) : inf;
  s.row.objective = ok ? value : 0.0;
  s.exact = true;
}

Key exact_key(const State& s, bool objective_only) {
  const bool rejected = !objective_only && !s.row.rejected_by.empty();
  return {rejected ? 1 : 0, s.score, s.c.r_fixed, s.c.r_parallel.value_or(inf)};
}

Key bound_key(const State& s, bool objective_only) {
  if (s.exact) return exact_key(s, objective_only);
  const bool rejected = !objective_only && (!s.constraints.empty() || s.certain_unreadable);
  return {rejected ? 1 : 0, s.certain_unreadable ? inf : s.bound, s.c.r_fixed, s.c.r_parallel.value_or(inf)};
}

namespace {

// The screen's first part: the candidate's design and chain, its nominal
// profile and the constraints.
void screen_nominal(State& s, const Context& ctx) {
  if (!s.built) s.built = build(ctx, s.c);
  PickRow& row = s.row;
  row.r_fixed = s.c.r_fixed;
  row.r_parallel = s.built->design.divider.r_parallel;
  row.series = coarsest_series(s.c.r_fixed);
  const NominalProfile n = nominal_profile(*s.built, ctx);
  row.min_sensitivity = n.min_sensitivity;
  row.max_self_heating = n.max_self_heating;
  row.max_current = n.max_current;
  row.max_power = n.max_power;
  row.span = n.span;
  s.nominal_window_status = n.window_status;
  s.constraints = violated(ctx.options.constraints, n);
  if (n.range_status != Status::ok) set_status(s, n.range_status);
}

// The screen's second part: the objective, except the worst case, which
// gets its lower bound (at the focus's temperatures when one is given).
void screen_objective(State& s, const Context& ctx, const Focus* focus) {
  const Chain& chain = s.built->chain;
  PickRow& row = s.row;
  s.screened = true;
  const Objective o = ctx.options.objective;
  if (o == Objective::sensitivity) {
    if (s.nominal_window_status != Status::ok) set_status(s, s.nominal_window_status);
    set_score(s, o, row.min_sensitivity);
    finish_row(s);
    return;
  }
  if (o == Objective::worst_case) {
    // Only the signs of the first-order sensitivities direct the corners of
    // the lower bound (and whether the budget could be formed says where
    // they were evaluated): the first-order budget, whose sensitivities and
    // status are the second-order budget's to the bit. The rows shown get
    // the linear band and dominant source of the full budget (complete_row).
    const std::vector<double>& temps = focus ? focus->temps : ctx.window;
    bound_worst_case(s, temps, linear_budget(chain, temps, BudgetOrder::first), focus ? focus->rest : std::vector<double>{});
    return;
  }
  // The linear budget gives every row its band and dominant source.
  const LinearBudget lb = linear_budget(chain, ctx.window);
  const LinearWindow lin = linear_window(lb);
  if (lin.band.status == Status::ok) row.rss_max_abs = lin.band.max_abs;
  row.dominant = lin.dominant;
  if (o == Objective::linear) {
    if (lin.band.status != Status::ok) set_status(s, lin.band.status);
    set_score(s, o, lin.band.max_abs);
    finish_row(s);
    return;
  }
  // The Monte Carlo objective.
  const McCheck mc = mc_window(chain, ctx.window, ctx.mc_objective_units, 1);
  if (!mc.readable) set_status(s, Status::saturated);
  row.mc_max_abs = mc.max_abs;
  set_score(s, o, mc.max_abs);
  finish_row(s);
}

}  // namespace

// The first pass over a candidate: its nominal profile and constraints, and
// the objective itself, except the worst case, which gets its lower bound.
void screen(State& s, const Context& ctx, const Focus* focus) {
  screen_nominal(s, ctx);
  screen_objective(s, ctx, focus);
}

// The screen's nominal part, and for the worst case (when the candidate is
// not already settled by its nominal profile) the directed bound at
// ctx.sample only, not yet over the window: that is the largest of the
// window's bounds at some of its temperatures, each formed exactly as the
// screen forms it (linear_budget and directed_bound treat each temperature
// by itself), so a lower bound of the screen's bound. A failure there is a
// failure of the screen too: the candidate is then screened in full at once.
void pre_screen(State& s, const Context& ctx) {
  screen_nominal(s, ctx);
  if (ctx.options.objective != Objective::worst_case || s.row.status != Status::ok || ctx.sample.empty()) {
    screen_objective(s, ctx, nullptr);
    return;
  }
  const DirectedBound b = directed_bound(s.built->chain, ctx.sample, linear_budget(s.built->chain, ctx.sample, BudgetOrder::first));
  if (b.status != Status::ok) {
    screen_objective(s, ctx, nullptr);
    return;
  }
  s.bound = b.value;
  s.screened = false;
}

// A pre-screened candidate screened in full: what screen() gives.
void finish_screen(State& s, const Context& ctx) {
  s.bound = 0.0;
  screen_objective(s, ctx, nullptr);
}

// One step of a screened candidate towards its full worst case: the full
// enumeration at its next pending temperatures — first the probe_count where
// its directed bound is largest (the probes), then each step as many as are
// done. Each temperature's corners do not depend on the other temperatures,
// so the enumeration at some of them is part of the full worst case: its
// largest |error| is a lower bound (and a failure there a certain one), and
// once every window temperature is done it is the full worst case, the same
// number worst_case_band gives over the whole window. A failure past the
// probes is reported as the full evaluation reports it (the first window
// temperature that fails). Returns whether the candidate is now enumerated
// in full.
bool refine(State& s, const Context& ctx) {
  const std::size_t done = ctx.window.size() - s.pending.size();
  const auto take = static_cast<std::ptrdiff_t>(std::min(s.pending.size(), std::max(probe_count, done)));
  const std::vector<double> temps(s.pending.begin(), s.pending.begin() + take);
  s.pending.erase(s.pending.begin(), s.pending.begin() + take);
  const WindowBand wc = worst_case_band(s.built->chain, temps, CornerMethod::automatic, 1);
  if (wc.status != Status::ok) {
    s.pending.clear();
    if (done > 0) {
      evaluate_in_full(s, ctx, 1);
      return true;
    }
    s.certain_unreadable = true;
    set_status(s, wc.status);
    s.score = inf;
    s.exact = true;
    finish_row(s);
    return false;
  }
  s.enumerated = std::max(s.enumerated, wc.max_abs);
  s.bound = std::max(s.bound, s.enumerated);
  if (!s.pending.empty()) return false;
  s.row.wc_max_abs = s.enumerated;
  set_score(s, Objective::worst_case, s.enumerated);
  finish_row(s);
  return true;
}

Scored score_candidate(const Context& ctx, const Candidate& c) {
  const auto b = build(ctx, c);
  const NominalProfile n = nominal_profile(*b, ctx);
  Scored r;
  r.status = n.range_status;
  const Objective o = ctx.options.objective;
  switch (o) {
    case Objective::sensitivity:
      if (r.status == Status::ok) r.status = n.window_status;
      r.value = n.min_sensitivity;
      break;
    case Objective::linear: {
      const LinearWindow w = linear_window(linear_budget(b->chain, ctx.window));
      if (r.status == Status::ok) r.status = w.band.status;
      r.value = w.band.max_abs;
      break;
    }
    case Objective::monte_carlo: {
      const McCheck mc = mc_window(b->chain, ctx.window, ctx.mc_objective_units, ctx.threads);
      if (r.status == Status::ok && !mc.readable) r.status = Status::saturated;
      r.value = mc.max_abs;
      break;
    }
    case Objective::worst_case: {
      const WindowBand wc = worst_case_band(b->chain, ctx.window, CornerMethod::automatic, ctx.threads);
      if (r.status == Status::ok) r.status = wc.status;
      r.value = wc.max_abs;
      break;
    }
  }
  r.score = r.status == Status::ok ? (maximised(o) ? -r.value : r.value) : inf;
  return r;
}

// The figures a shown row has that its objective did not need.
void complete_row(State& s, const Context& ctx) {
  if (!s.row.wc_max_abs && ctx.options.objective != Objective::worst_case) {
    const WindowBand wc = worst_case_band(s.built->chain, ctx.window, CornerMethod::automatic, 1);
    if (wc.status == Status::ok) s.row.wc_max_abs = wc.max_abs;
  }
  if (!s.row.rss_max_abs && s.row.dominant.empty()) {
    const LinearWindow lin = linear_window(linear_budget(s.built->chain, ctx.window));
    if (lin.band.status == Status::ok) s.row.rss_max_abs = lin.band.max_abs;
    s.row.dominant = lin.dominant;
  }
}

}  // namespace picker_detail

}  // namespace thermargin
