#include "thermargin/engines/window.hpp"

#include <algorithm>
#include <cmath>

#include "thermargin/input/design.hpp"

namespace thermargin {

namespace {

void count(WindowMax& m, double t, double low, double high) {
  const double v = std::max(std::fabs(low), std::fabs(high));
  if (!m.any || v > m.max_abs) {
    m.max_abs = v;
    m.at = t;
    m.any = true;
  }
}

void fail(WindowMax& m, double t, Status s) {
  if (!m.readable) return;
  m.readable = false;
  m.failure = s;
  m.failure_at = t;
}

}  // namespace

WindowMax window_max(const std::vector<WorstCasePoint>& points, const Requirement& q) {
  WindowMax m;
  for (const auto& p : points) {
    if (!in_requirement_window(q, p.t)) continue;
    if (p.failed_corners > 0 || !p.any_ok)
      fail(m, p.t, p.failed_corners > 0 && p.failure != Status::ok ? p.failure : Status::no_solution);
    if (p.any_ok) count(m, p.t, p.low, p.high);
  }
  return m;
}

WindowMax window_max(const std::vector<LinearPoint>& points, const Requirement& q) {
  WindowMax m;
  for (const auto& p : points) {
    if (!in_requirement_window(q, p.t)) continue;
    if (p.status != Status::ok) fail(m, p.t, p.status);
    else count(m, p.t, p.low, p.high);
  }
  return m;
}

}  // namespace thermargin
