// The winner searched from a start value (pick_winner, picker.hpp): the
// start's directed bound chooses a focus; corners of the incumbent's box
// (witnesses) repeated on the other candidates rule most of them out before
// they are screened.
#include "picker_internal.hpp"

#include <algorithm>
#include <cmath>
#include <numeric>

#include "thermargin/core/error.hpp"
#include "thermargin/core/parallel.hpp"
#include "thermargin/engines/linear_budget.hpp"
#include "thermargin/engines/worst_case.hpp"

namespace thermargin {
namespace picker_detail {

namespace {

// Relative margin by which a witness bound must pass the incumbent's worst
// case to rule a candidate out: the bound adds the rounding to |error| where
// the enumeration rounds before it subtracts, which may differ in the last
// bits; a candidate that close is screened and enumerated instead.
constexpr double witness_margin = 1e-9;

// Corners of the incumbent's box, each with its temperature, repeated on a
// candidate not yet screened: the two directed corners at each focus
// temperature.
struct Witness {
  double t = 0.0;
  Deviations corner{};
};

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

std::vector<Witness> witnesses_of(const State& w, const Focus& f) {
  const LinearBudget lb = linear_budget(w.built->chain, f.temps, BudgetOrder::first);  // the signs only
  std::vector<Witness> out;
  for (std::size_t i = 0; i < f.temps.size(); ++i) {
    if (lb.points[i].status != Status::ok) continue;
    for (double direction : {1.0, -1.0}) out.push_back({f.temps[i], directed_corner(w.built->design, lb.points[i], direction)});
  }
  return out;
}

// Stops as soon as the bound passes `enough`.
void witness_bound(const Chain& chain, const std::vector<Witness>& ws, double enough, WitnessBound& b) {
  const Design& d = chain.design();
  const ReadingInterval q = reading_interval(d);
  const double rounding = bound_rounding(d);
  for (const Witness& w : ws) {
    ElementMemo memo(chain, w.t);  // the corner's element stages, for both shifts
    for (double shift : {q.lo, q.hi}) {
      Status failure = Status::ok;
      const auto e = corner_error(memo, w.corner, shift, failure);
      if (!e) {
        b.unreadable = true;
        return;
      }
      b.value = std::max(b.value, std::fabs(*e) + rounding);
      if (b.value > enough) return;
    }
  }
}

std::size_t best_exact(const std::vector<State>& st) {
  std::size_t best = st.size();
  for (std::size_t i = 0; i < st.size(); ++i)
    if (st[i].exact && (best == st.size() || exact_key(st[i], false) < exact_key(st[best], false))) best = i;
  return best;
}

}  // namespace



}  // namespace picker_detail

using namespace picker_detail;

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

}  // namespace thermargin
