// The picker's search over the candidates (picker_internal.hpp): every
// value, every pair, or the reduced pair search, each screened, then
// settled by a best-first branch and bound.
#include "picker_internal.hpp"

#include <algorithm>
#include <atomic>
#include <mutex>
#include <numeric>
#include <set>

#include "thermargin/core/parallel.hpp"

namespace thermargin {
namespace picker_detail {

namespace {

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

// `pre`: pre_screen only (settle finishes the screens it needs).
std::vector<State> screen_all(const std::vector<Candidate>& cands, const Context& ctx,
                              const std::function<void(double)>& progress, std::size_t progress_total, bool pre = false) {
  std::vector<State> st(cands.size());
  std::atomic<std::size_t> done{0};
  std::mutex m;
  parallel_for(cands.size(), ctx.threads, [&](std::size_t i) {
    st[i].c = cands[i];
    if (pre) pre_screen(st[i], ctx);
    else screen(st[i], ctx);
    const std::size_t k = ++done;
    if (progress) {
      const std::lock_guard<std::mutex> lock(m);
      progress(static_cast<double>(k) / static_cast<double>(std::max<std::size_t>(progress_total, 1)));
    }
  });
  return st;
}

// Every pre-screened candidate that could be among the first n by key is
// screened in full, so that the first n are those of the full screens.
// A pre-screened key is a lower bound of the screened one (pre_screen): a
// candidate whose lower bound is past the n-th key of the screened ones
// has n keys before it whatever its screen gives, and the screened keys
// only move up (refine), so it stays behind. The pre-screened ones are
// screened lowest key first, a batch at a time (the batch fixed, so the
// work does not depend on the threads; which ones are screened does not
// change any result, only the work).
void finish_screens(std::vector<State>& st, std::size_t n, bool objective_only, const Context& ctx) {
  const Key past{2, inf, inf, inf};  // after every key
  const std::size_t batch = std::max(n, full_batch);
  for (;;) {
    std::vector<Key> keys;
    for (const auto& s : st)
      if (s.screened) keys.push_back(bound_key(s, objective_only));
    Key nth = past;
    if (n > 0 && keys.size() >= n) {
      std::nth_element(keys.begin(), keys.begin() + static_cast<std::ptrdiff_t>(n - 1), keys.end());
      nth = keys[n - 1];
    }
    std::vector<std::size_t> open;
    for (std::size_t i = 0; i < st.size(); ++i)
      if (!st[i].screened && !(nth < bound_key(st[i], objective_only))) open.push_back(i);
    if (open.empty()) return;
    std::sort(open.begin(), open.end(),
              [&](std::size_t a, std::size_t b) { return bound_key(st[a], objective_only) < bound_key(st[b], objective_only); });
    open.resize(std::min(open.size(), batch));
    parallel_for(open.size(), ctx.threads, [&](std::size_t k) { finish_screen(st[open[k]], ctx); });
  }
}

}  // namespace

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
    finish_screens(st, n, objective_only, ctx);
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
    st = screen_all(cands, ctx, screen_progress, cands.size(), true);
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

}  // namespace picker_detail

}  // namespace thermargin
