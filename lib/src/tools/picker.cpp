#include "thermargin/tools/picker.hpp"

#include "thermargin/core/parallel.hpp"
#include "picker_bounds.hpp"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstdio>
#include <exception>
#include <limits>
#include <map>
#include <memory>
#include <mutex>
#include <numeric>
#include <set>
#include <thread>
#include <tuple>

#include <boost/math/tools/minima.hpp>

#include "thermargin/chain/divider.hpp"
#include "thermargin/engines/linear_budget.hpp"
#include "thermargin/engines/monte_carlo.hpp"
#include "thermargin/engines/nominal.hpp"
#include "thermargin/chain/sensor.hpp"
#include "thermargin/engines/worst_case.hpp"
#include "thermargin/input/life.hpp"

namespace thermargin {

namespace {

using namespace picker_detail;

constexpr double inf = std::numeric_limits<double>::infinity();
// Refinements of the worst case (settle) and candidates screened per round
// (pick_winner) go in batches of at most this many candidates whatever the
// thread count, so the work done (and every number reported) does not
// depend on the machine.
constexpr std::size_t full_batch = 4;
// Brent stops when ln R is known to 2^(1−bits)·|ln R|: about 3e-4 (0.03 %
// in R) for kilohms, a fortieth of the 1.2 % step of E192.
constexpr int brent_bits = 16;
constexpr std::uintmax_t brent_max_iterations = 60;
// Stands for an unreadable window inside Brent's arithmetic (which needs
// finite values to fit its parabolas).
constexpr double brent_penalty = 1e30;
// Temperatures at which a worst-case bound is tightened by the full
// enumeration before a candidate is evaluated in full.
constexpr std::size_t probe_count = 3;
// Candidates of the reduced pair search refined around this many pairs.
constexpr std::size_t pair_refine_count = 3;


std::string number_text(double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.17g", v);
  return buf;
}

std::string ohms(double v) { return format_quantity(v, Quantity::resistance, 4); }

struct Candidate {
  double r_fixed = 0.0;
  std::optional<double> r_parallel;
  bool operator<(const Candidate& o) const {
    return std::make_pair(r_fixed, r_parallel.value_or(inf)) < std::make_pair(o.r_fixed, o.r_parallel.value_or(inf));
  }
};

struct Context {
  Scenario base;  // the grade applied
  Design design;  // the base design, validated once
  PickOptions options;
  bool pair = false;
  int threads = 1;
  std::vector<double> window;  // the analysed temperatures inside the requirement window
  std::vector<double> range;   // every analysed temperature
  std::uint64_t mc_objective_units = 0, mc_verify_units = 0;
  std::vector<double> values;  // the r_fixed candidates, ascending
};

// A candidate's design and its chain (which points into the design): the
// design the verdict is judged on, at end of life when drift is set and
// requirement.at says so (life.hpp), so that candidates rank on that basis.
struct Built {
  Design design;
  Chain chain;
  explicit Built(Design d) : design(design_for_verdict(d)), chain(design) {}
  Built(const Built&) = delete;
  Built& operator=(const Built&) = delete;
};

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

// The nominal chain over the range and the window: what the constraints
// and the sensitivity objective read.
struct NominalProfile {
  Status range_status = Status::ok;   // thermal runaway anywhere in the range
  Status window_status = Status::ok;  // the nominal reading in the window
  double min_sensitivity = 0.0, max_self_heating = 0.0, max_current = 0.0, max_power = 0.0, span = 0.0;
  bool settling = false;         // the ADC's sampling capacitor is modelled (docs/model.md §14)
  double max_settling_lsb = 0.0;  // the largest |settled − node| in LSB over the window, either precharge rail
};

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

// One candidate through the ranking.
struct State {
  Candidate c;
  std::unique_ptr<Built> built;
  PickRow row;
  std::vector<std::string> constraints;  // violated constraints (nominal)
  bool exact = false;         // score is the full objective
  double score = inf;         // objective in minimisation form (−LSB/K for sensitivity); inf: unreadable
  // Worst case before the full evaluation: a lower bound of score, from the
  // directed corners, then tightened by the full enumeration at more and
  // more of the window's temperatures (refine()).
  double bound = 0.0;
  std::vector<double> pending;  // °C, not yet enumerated, in the order they will be
  double enumerated = 0.0;      // K, the largest |error| the enumeration has found so far
  std::vector<double> directed_at;  // K, the directed bound at each window temperature
  bool certain_unreadable = false;
};

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

using Key = std::tuple<int, double, double, double>;

Key exact_key(const State& s, bool objective_only) {
  const bool rejected = !objective_only && !s.row.rejected_by.empty();
  return {rejected ? 1 : 0, s.score, s.c.r_fixed, s.c.r_parallel.value_or(inf)};
}

Key bound_key(const State& s, bool objective_only) {
  if (s.exact) return exact_key(s, objective_only);
  const bool rejected = !objective_only && (!s.constraints.empty() || s.certain_unreadable);
  return {rejected ? 1 : 0, s.certain_unreadable ? inf : s.bound, s.c.r_fixed, s.c.r_parallel.value_or(inf)};
}

// Where the screen forms a worst-case candidate's lower bound: by default at
// every window temperature (with the linear budget every row shows); in
// pick_winner's search at a few (the row's linear figures are then filled
// for the winner only, by complete_row).
struct Focus {
  std::vector<double> temps;  // °C, where the bound is formed
  std::vector<double> rest;   // °C, the other window temperatures, in the order to enumerate them
};

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

// The first pass over a candidate: its nominal profile and constraints, and
// the objective itself, except the worst case, which gets its lower bound.
void screen(State& s, const Context& ctx, const Focus* focus = nullptr) {
  if (!s.built) s.built = build(ctx, s.c);
  const Chain& chain = s.built->chain;
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
  s.constraints = violated(ctx.options.constraints, n);
  if (n.range_status != Status::ok) set_status(s, n.range_status);

  const Objective o = ctx.options.objective;
  if (o == Objective::sensitivity) {
    if (n.window_status != Status::ok) set_status(s, n.window_status);
    set_score(s, o, n.min_sensitivity);
    finish_row(s);
    return;
  }
  if (o == Objective::worst_case && focus) {
    bound_worst_case(s, focus->temps, linear_budget(chain, focus->temps), focus->rest);
    return;
  }
  // The linear budget is cheap and gives every row its band and dominant
  // source; for the worst case it also tells whether the directed corners
  // below were evaluated (they are, where the budget could be formed).
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
  if (o == Objective::monte_carlo) {
    const McCheck mc = mc_window(chain, ctx.window, ctx.mc_objective_units, 1);
    if (!mc.readable) set_status(s, Status::saturated);
    row.mc_max_abs = mc.max_abs;
    set_score(s, o, mc.max_abs);
    finish_row(s);
    return;
  }
  // Worst case: a lower bound first (the full enumeration only where the
  // bound says a candidate could reach the top).
  bound_worst_case(s, ctx.window, lb, {});
}

// The full worst case of a screened candidate.
void evaluate_in_full(State& s, const Context& ctx, int threads) {
  const WindowBand wc = worst_case_band(s.built->chain, ctx.window, CornerMethod::automatic, threads);
  if (wc.status != Status::ok) set_status(s, wc.status);
  else s.row.wc_max_abs = wc.max_abs;
  set_score(s, Objective::worst_case, wc.max_abs);
  finish_row(s);
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

// Best-first branch and bound: the n best keys become known exactly. Each
// round sorts the candidates by their key (exact, or a lower bound) and
// refines the most promising ones a step (refine(): the enumeration at more
// of the window's temperatures) until the first n in that order are all
// exact: every other candidate's true key is at least its bound, so behind
// them. A candidate that cannot win is mostly left after a few temperatures.
// Keys with `objective_only` ignore the constraints. Returns the candidates
// enumerated in full.
std::size_t settle(std::vector<State>& st, std::size_t n, bool objective_only, const Context& ctx) {
  std::vector<std::size_t> order(st.size());
  std::size_t evaluated = 0;
  for (;;) {
    std::iota(order.begin(), order.end(), std::size_t{0});
    std::sort(order.begin(), order.end(),
              [&](std::size_t a, std::size_t b) { return bound_key(st[a], objective_only) < bound_key(st[b], objective_only); });
    // Only the first n can block: a candidate behind them is refined when
    // the ones before it are exact or have fallen behind it. Done when the
    // first n are exact.
    std::vector<std::size_t> batch;
    for (std::size_t k = 0; k < std::min(n, order.size()) && batch.size() < full_batch; ++k)
      if (!st[order[k]].exact) batch.push_back(order[k]);
    if (batch.empty()) break;
    std::vector<char> in_full(batch.size(), 0);
    parallel_for(batch.size(), ctx.threads, [&](std::size_t i) { in_full[i] = refine(st[batch[i]], ctx) ? 1 : 0; });
    evaluated += static_cast<std::size_t>(std::count(in_full.begin(), in_full.end(), 1));
  }
  return evaluated;
}

// The objective at one candidate, evaluated in full on its own (Brent, the
// guidance neighbours, objective_at): the threads split its temperatures.
struct Scored {
  Status status = Status::ok;
  double value = 0.0;  // objective unit
  double score = inf;  // minimisation form; inf when unreadable
};

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

std::uint64_t default_units(const Design& d, std::uint64_t requested, std::uint64_t cap) {
  if (requested > 0) return requested;
  return d.montecarlo.units == 0 ? cap : std::min(d.montecarlo.units, cap);
}

void check_options(const PickOptions& o) {
  if (o.values.empty()) {
    if (!(o.range_low > 0.0 && o.range_high > o.range_low && std::isfinite(o.range_high)))
      reject(command_line("--range"), ohms(o.range_low) + ".." + ohms(o.range_high),
             "must be LOW..HIGH with 0 < LOW < HIGH, in ohms (engineering notation, e.g. 1k..1M)");
  } else {
    for (double v : o.values)
      if (!(v > 0.0 && std::isfinite(v))) reject(command_line("--values"), number_text(v), "every value must be a resistance > 0");
  }
  if (o.series_grade && !o.tolerance && !o.values.empty())
    reject(command_line("--grade"), "series", "needs candidates from a series (--series, --range), not --values; give TOL[,TEMPCO] instead");
  if (o.top < 1) reject(command_line("--top"), std::to_string(o.top), "must be a whole number >= 1");
  if (o.verify < 0) reject(command_line("--verify"), std::to_string(o.verify), "must be a whole number >= 0");
  if (o.tolerance && !(*o.tolerance >= 0.0 && *o.tolerance < 1.0))
    reject(command_line("--grade"), number_text(*o.tolerance), "the tolerance must be from 0 up to (not including) 100 %");
  if (o.tempco && !(*o.tempco >= 0.0 && *o.tempco < 0.01))
    reject(command_line("--grade"), number_text(*o.tempco), "the tempco must be from 0 up to (not including) 10000 ppm/K");
  const auto positive = [](const std::optional<double>& v, const char* name, const char* unit) {
    if (v && !(*v > 0.0 && std::isfinite(*v))) reject(command_line(name), number_text(*v), std::string("must be > 0 ") + unit);
  };
  positive(o.constraints.max_self_heating, "--max-self-heating", "(K)");
  positive(o.constraints.max_current, "--max-current", "(A)");
  positive(o.constraints.max_power, "--max-power", "(W)");
  positive(o.constraints.min_span, "--min-span", "(a fraction of the ADC span, up to 1)");
  positive(o.constraints.min_sensitivity, "--min-sensitivity", "(LSB/K)");
  if (o.constraints.min_span && *o.constraints.min_span > 1.0)
    reject(command_line("--min-span"), number_text(*o.constraints.min_span), "must be a fraction of the ADC span, at most 1 (100 %)");
}

Context make_context(const Scenario& scenario, const PickOptions& options) {
  check_options(options);
  Context ctx;
  ctx.options = options;
  ctx.base = scenario;
  ctx.pair = options.parallel;
  int given_threads = 0;
  {
    // Validate the scenario as given before changing it, so that its own
    // mistakes are reported against its own keys.
    const Design given = build_design(scenario);
    given_threads = given.threads_or_scenario(options.threads);
    const Where grade = command_line("--grade");
    if (!options.tolerance && options.series_grade) ctx.options.tolerance = series_tolerance(options.series);
    const std::optional<double>& tolerance = ctx.options.tolerance;
    if (tolerance) ctx.base.set("divider.r_fixed_tol", number_text(*tolerance), grade);
    if (options.tempco) ctx.base.set("divider.r_fixed_tempco", number_text(*options.tempco), grade);
    if (options.parallel) {
      // The parallel resistor's tolerance: the grade's, else the scenario's,
      // else (no parallel resistor in the scenario) the fixed resistor's.
      const double tol = tolerance ? *tolerance
                         : given.divider.r_parallel ? given.divider.r_parallel_tol
                                                    : given.divider.r_fixed_tol;
      ctx.base.set("divider.r_parallel", "1k", grade);  // a placeholder; every candidate sets its own
      ctx.base.set("divider.r_parallel_tol", number_text(tol), grade);
    }
  }
  // The engines run single-threaded inside the picker (each call says so),
  // which spreads candidates (or temperatures) over the threads itself.
  ctx.design = build_design(ctx.base);
  const Design& d = ctx.design;
  ctx.range = d.conditions.temperatures();
  ctx.window = window_temperatures(d.requirement, ctx.range);
  ctx.threads = resolve_threads(given_threads);
  ctx.mc_objective_units = default_units(d, options.mc_units, mc_objective_cap);
  ctx.mc_verify_units = default_units(d, options.mc_units, mc_verify_cap);
  if (options.values.empty()) {
    ctx.values = series_values(options.series, options.range_low, options.range_high);
    if (ctx.values.empty())
      reject(command_line("--range"), ohms(options.range_low) + ".." + ohms(options.range_high),
             "holds no " + std::string(to_string(options.series)) + " value; widen the range or choose a finer series");
  } else {
    ctx.values = options.values;
    std::sort(ctx.values.begin(), ctx.values.end());
    ctx.values.erase(std::unique(ctx.values.begin(), ctx.values.end()), ctx.values.end());
  }
  return ctx;
}

// The pairs of the reduced search: a coarse grid (the E12 values among the
// candidates), then every candidate pair within one coarse step of the best
// coarse pairs.
std::vector<Candidate> coarse_pairs(const std::vector<double>& coarse) {
  std::vector<Candidate> out;
  for (double rf : coarse) {
    out.push_back({rf, std::nullopt});
    for (double rp : coarse) out.push_back({rf, rp});
  }
  return out;
}

// The candidates within one coarse step of x on the coarse grid.
std::vector<double> around(const std::vector<double>& values, const std::vector<double>& coarse, double x) {
  const auto it = std::lower_bound(coarse.begin(), coarse.end(), x);
  const double lo = it == coarse.begin() ? values.front() : *(it - 1);
  const double hi = (it == coarse.end() || it + 1 == coarse.end()) ? values.back() : *(it + 1);
  std::vector<double> out;
  for (double v : values)
    if (v >= lo && v <= hi) out.push_back(v);
  return out;
}

std::vector<State> screen_all(const std::vector<Candidate>& cands, const Context& ctx,
                              const std::function<void(double)>& progress, std::size_t progress_total) {
  std::vector<State> st(cands.size());
  std::atomic<std::size_t> done{0};
  std::mutex m;
  parallel_for(cands.size(), ctx.threads, [&](std::size_t i) {
    st[i].c = cands[i];
    screen(st[i], ctx);
    const std::size_t k = ++done;
    if (progress) {
      const std::lock_guard<std::mutex> lock(m);
      progress(static_cast<double>(k) / static_cast<double>(std::max<std::size_t>(progress_total, 1)));
    }
  });
  return st;
}

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

// --- The winner searched from a start value ----------------------------------

// The search's focus, from the start value's full screen: the window
// temperatures where its directed bound is largest and the window's ends;
// the other temperatures follow by its directed bound, largest first.
Focus focus_of(const State& start, const Context& ctx) {
  std::vector<std::size_t> by_bound(start.directed_at.size());
  std::iota(by_bound.begin(), by_bound.end(), std::size_t{0});
  std::stable_sort(by_bound.begin(), by_bound.end(),
                   [&](std::size_t x, std::size_t y) { return start.directed_at[x] > start.directed_at[y]; });
  std::vector<char> in(ctx.window.size(), 0);
  for (std::size_t k = 0; k < std::min(probe_count, by_bound.size()); ++k) in[by_bound[k]] = 1;
  if (!ctx.window.empty()) in.front() = in.back() = 1;
  Focus f;
  for (std::size_t i = 0; i < ctx.window.size(); ++i)
    if (in[i]) f.temps.push_back(ctx.window[i]);
  for (std::size_t i : by_bound)
    if (!in[i]) f.rest.push_back(ctx.window[i]);
  return f;
}

// Corners of the incumbent's box, each with its temperature, repeated on a
// candidate not yet screened: the two directed corners at each focus
// temperature.
struct Witness {
  double t = 0.0;
  Deviations corner{};
};

std::vector<Witness> witnesses_of(const State& w, const Focus& f) {
  const LinearBudget lb = linear_budget(w.built->chain, f.temps);
  std::vector<Witness> out;
  for (std::size_t i = 0; i < f.temps.size(); ++i) {
    if (lb.points[i].status != Status::ok) continue;
    for (double direction : {1.0, -1.0}) out.push_back({f.temps[i], directed_corner(w.built->design, lb.points[i], direction)});
  }
  return out;
}

// What the witnesses say of a candidate's worst case: each is a corner the
// full enumeration visits, read at both ends of the reading interval with
// the output unrounded, so |error| plus the rounding directed_bound adds is
// a lower bound of the candidate's worst case (the argument of
// directed_bound); a reading one of them cannot convert fails the
// enumeration too, so the candidate cannot be read in its window.
struct WitnessBound {
  double value = 0.0;  // K
  bool unreadable = false;
};

// Stops as soon as the bound passes `enough`.
void witness_bound(const Chain& chain, const std::vector<Witness>& ws, double enough, WitnessBound& b) {
  const Design& d = chain.design();
  const ReadingInterval q = reading_interval(d);
  const double rounding = bound_rounding(d);
  for (const Witness& w : ws)
    for (double shift : {q.lo, q.hi}) {
      Status failure = Status::ok;
      const auto e = corner_error(chain, w.corner, w.t, shift, failure);
      if (!e) {
        b.unreadable = true;
        return;
      }
      b.value = std::max(b.value, std::fabs(*e) + rounding);
      if (b.value > enough) return;
    }
}

// Relative margin by which a witness bound must pass the incumbent's worst
// case to rule a candidate out: the bound adds the rounding to |error| where
// the enumeration rounds before it subtracts, which may differ in the last
// bits; a candidate that close is screened and enumerated instead.
constexpr double witness_margin = 1e-9;

std::size_t best_exact(const std::vector<State>& st) {
  std::size_t best = st.size();
  for (std::size_t i = 0; i < st.size(); ++i)
    if (st[i].exact && (best == st.size() || exact_key(st[i], false) < exact_key(st[best], false))) best = i;
  return best;
}

// The candidates screened and settled: every value (or every pair, up to
// full_pair_search_limit values), or the reduced pair search (E12 pairs
// first, then the neighbourhoods of the best few). Counts what was
// evaluated in full into `result`.
std::vector<State> search_candidates(const Context& ctx, std::size_t wanted, const std::function<void(double)>& screen_progress,
                                     PickResult& result) {
  std::vector<State> st;
  if (!ctx.pair) {
    std::vector<Candidate> cands;
    for (double v : ctx.values) cands.push_back({v, ctx.design.divider.r_parallel});
    st = screen_all(cands, ctx, screen_progress, cands.size());
    result.evaluated_in_full = settle(st, wanted, false, ctx);
  } else if (ctx.values.size() <= full_pair_search_limit) {
    std::vector<Candidate> cands;
    for (double rf : ctx.values) {
      cands.push_back({rf, std::nullopt});
      for (double rp : ctx.values) cands.push_back({rf, rp});
    }
    st = screen_all(cands, ctx, screen_progress, cands.size());
    result.evaluated_in_full = settle(st, wanted, false, ctx);
  } else {
    result.reduced_pair_search = true;
    std::vector<double> coarse;
    for (double v : ctx.values)
      if (const auto s = coarsest_series(v); s && *s == Series::e12) coarse.push_back(v);
    if (coarse.size() < 2) coarse = {ctx.values.front(), ctx.values.back()};
    const std::vector<Candidate> first = coarse_pairs(coarse);
    st = screen_all(first, ctx, screen_progress, 2 * first.size());
    result.evaluated_in_full = settle(st, pair_refine_count, false, ctx);
    std::vector<std::size_t> idx;
    for (std::size_t i = 0; i < st.size(); ++i)
      if (st[i].exact) idx.push_back(i);
    std::sort(idx.begin(), idx.end(), [&](std::size_t a, std::size_t b) { return exact_key(st[a], false) < exact_key(st[b], false); });
    std::set<Candidate> seen(first.begin(), first.end());
    std::vector<Candidate> refine;
    for (std::size_t k = 0; k < std::min(pair_refine_count, idx.size()); ++k) {
      const Candidate& best = st[idx[k]].c;
      const std::vector<double> rfs = around(ctx.values, coarse, best.r_fixed);
      // "none" sits beyond the largest value: its neighbours are the top of the list.
      std::vector<double> rps = best.r_parallel ? around(ctx.values, coarse, *best.r_parallel)
                                                : around(ctx.values, coarse, ctx.values.back());
      std::vector<std::optional<double>> parallels(rps.begin(), rps.end());
      if (!best.r_parallel) parallels.push_back(std::nullopt);
      for (double rf : rfs)
        for (const auto& rp : parallels) {
          const Candidate c{rf, rp};
          if (seen.insert(c).second) refine.push_back(c);
        }
    }
    std::vector<State> more = screen_all(refine, ctx, nullptr, refine.size());
    for (auto& s : more) st.push_back(std::move(s));
    result.evaluated_in_full += settle(st, wanted, false, ctx);
  }
  return st;
}

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

}  // namespace

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
    result.rows[k].verify = mc_window(st[idx[k]].built->chain, ctx.window, ctx.mc_verify_units, ctx.threads);
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

PickRow pick_winner(const Scenario& scenario, const PickOptions& options, double start) {
  if (!(start > 0.0 && std::isfinite(start))) reject(command_line("start"), number_text(start), "must be a resistance > 0");
  PickOptions o = options;
  o.top = 1;
  o.verify = 0;
  o.guidance = false;
  o.progress = nullptr;
  const Context ctx = make_context(scenario, o);
  const bool enumerated = static_cast<int>(ctx.design.inputs.size()) <= max_enumerated_inputs;
  if (ctx.pair || o.objective != Objective::worst_case || !enumerated) return pick(scenario, o).rows.front();

  const std::vector<double>& values = ctx.values;
  const std::size_t n = values.size();
  std::vector<std::unique_ptr<Built>> built(n);
  std::vector<char> screened(n, 0), ruled_out(n, 0);
  std::vector<WitnessBound> bounds(n);
  std::vector<State> st;
  auto admit = [&](const std::vector<std::size_t>& idx, const Focus* f) {
    std::vector<State> more(idx.size());
    parallel_for(idx.size(), ctx.threads, [&](std::size_t k) {
      State& s = more[k];
      s.c = {values[idx[k]], ctx.design.divider.r_parallel};
      s.built = std::move(built[idx[k]]);
      screen(s, ctx, f);
    });
    for (std::size_t k = 0; k < idx.size(); ++k) {
      screened[idx[k]] = 1;
      st.push_back(std::move(more[k]));
    }
  };

  // The start value, screened in full (its directed bound over the window
  // chooses the focus), then rounds: witnesses repeated on every candidate
  // not yet screened or ruled out, the few with the smallest bound screened
  // at the focus, the winner so far from a branch and bound over the
  // screened ones, and its witnesses for the next round, until no
  // candidate remains.
  std::size_t first = 0;
  for (std::size_t i = 1; i < n; ++i)
    if (std::fabs(std::log(values[i] / start)) < std::fabs(std::log(values[first] / start))) first = i;
  admit({first}, nullptr);
  const Focus focus = focus_of(st.front(), ctx);
  // Until a candidate is exact the bounds only rank (and an unreadable
  // corner rules out: an unreadable candidate ranks after any readable one).
  double enough = inf;
  std::vector<Witness> ws = witnesses_of(st.front(), focus);
  for (;;) {
    std::vector<std::size_t> open;
    for (std::size_t i = 0; i < n; ++i)
      if (!screened[i] && !ruled_out[i]) open.push_back(i);
    parallel_for(open.size(), ctx.threads, [&](std::size_t k) {
      const std::size_t i = open[k];
      if (!built[i]) built[i] = build(ctx, {values[i], ctx.design.divider.r_parallel});
      witness_bound(built[i]->chain, ws, enough, bounds[i]);
      ruled_out[i] = bounds[i].unreadable || bounds[i].value > enough;
    });
    std::vector<std::size_t> next;
    for (std::size_t i : open)
      if (!ruled_out[i]) next.push_back(i);
    if (next.empty()) break;
    std::stable_sort(next.begin(), next.end(), [&](std::size_t a, std::size_t b) { return bounds[a].value < bounds[b].value; });
    next.resize(std::min(next.size(), full_batch));
    admit(next, &focus);
    settle(st, 1, false, ctx);
    const State& w = st[best_exact(st)];
    // No feasible candidate yet (readable, within the limits): any feasible
    // one would win, whatever its bound.
    if (!w.row.feasible()) return pick(scenario, o).rows.front();
    enough = w.score + witness_margin * std::fabs(w.score);
    ws = witnesses_of(w, focus);
  }
  settle(st, 1, false, ctx);
  if (!st[best_exact(st)].row.feasible()) return pick(scenario, o).rows.front();
  State& winner = st[best_exact(st)];
  complete_row(winner, ctx);
  return winner.row;
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
