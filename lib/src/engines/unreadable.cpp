#include "thermargin/engines/unreadable.hpp"

#include "thermargin/core/number.hpp"

namespace thermargin {

namespace {

Status status_of(const BudgetPoint& p) {
  if (p.nominal.status != Status::ok) return p.nominal.status;
  if (p.wc.failed_corners > 0 || !p.wc.any_ok) return p.wc.failure == Status::ok ? Status::no_solution : p.wc.failure;
  return p.linear.status;
}

}  // namespace

bool unreadable(const BudgetPoint& p) {
  return p.nominal.status != Status::ok || p.wc.failed_corners > 0 || !p.wc.any_ok || p.linear.status != Status::ok;
}

std::vector<UnreadableRun> unreadable_runs(const std::vector<BudgetPoint>& points, bool window_only) {
  std::vector<UnreadableRun> runs;
  bool open = false;
  for (const auto& p : points) {
    const bool counted = !window_only || p.in_window;
    if (!counted || !unreadable(p)) {
      open = false;
      continue;
    }
    const bool nominal = p.nominal.status != Status::ok;
    if (open && runs.back().in_window == p.in_window && runs.back().status == status_of(p) && runs.back().nominal == nominal) {
      runs.back().to = p.t;
      continue;
    }
    runs.push_back({p.t, p.t, status_of(p), nominal, p.in_window});
    open = true;
  }
  return runs;
}

std::string describe_runs(const std::vector<UnreadableRun>& runs) {
  std::string s;
  for (std::size_t i = 0; i < runs.size(); ++i) {
    const UnreadableRun& r = runs[i];
    const bool same = i > 0 && runs[i - 1].status == r.status;  // "..., and for some units at ..."
    s += same ? ", and " : i > 0 ? "; " + std::string(describe(r.status)) + " " : std::string(describe(r.status)) + " ";
    s += r.nominal ? "" : "for some units ";
    s += r.from == r.to ? "at " + fixed(r.from, 2) + " degC" : "from " + fixed(r.from, 2) + " to " + fixed(r.to, 2) + " degC";
  }
  return s;
}

}  // namespace thermargin
