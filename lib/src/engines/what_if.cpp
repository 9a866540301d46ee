#include "thermargin/engines/what_if.hpp"

#include "thermargin/engines/window.hpp"

#include <algorithm>
#include <cmath>
#include <set>

namespace thermargin {

namespace {

enum class Change { halve, remove };

// The window's temperatures, as the budget marked them.
std::vector<double> window_temperatures(const Budget& b) {
  std::vector<double> out;
  for (const auto& p : b.points)
    if (p.in_window) out.push_back(p.t);
  return out;
}

WhatIfFigures figures(const Design& d, const std::vector<double>& temps, const WorstCaseOptions& corners) {
  const Chain chain(d);
  const WorstCase wc = worst_case(chain, temps, corners);
  const LinearBudget lb = linear_budget(chain, temps);
  const WindowMax wc_max = window_max(wc.points, d.requirement), rss_max = window_max(lb.points, d.requirement);
  WhatIfFigures f;
  f.wc_max_abs = wc_max.max_abs;
  f.rss_max_abs = rss_max.max_abs;
  f.readable = wc_max.readable && rss_max.readable;
  return f;
}

// The design with one source improved; false when `name` is not a source
// this analysis can change.
bool improve(Design& d, const std::string& name, Change change) {
  const double factor = change == Change::halve ? 0.5 : 0.0;
  if (name == info(ReadingSource::noise).name) {
    d.adc.noise *= factor;
    return true;
  }
  if (name == info(ReadingSource::resolution).name) {
    d.firmware.resolution *= factor;
    return true;
  }
  for (auto it = d.inputs.begin(); it != d.inputs.end(); ++it) {
    if (info(it->source).name != name) continue;
    if (change == Change::remove) {
      d.inputs.erase(it);
    } else {
      it->bound *= factor;
      it->gap *= factor;
    }
    return true;
  }
  return false;
}

std::string key_of(const std::string& name) {
  for (int s = 0; s < source_count; ++s)
    if (info(static_cast<Source>(s)).name == name) return std::string(info(static_cast<Source>(s)).key);
  for (int s = 0; s < reading_source_count; ++s)
    if (info(static_cast<ReadingSource>(s)).name == name) return std::string(info(static_cast<ReadingSource>(s)).key);
  return {};
}

}  // namespace

double basis_figure(const WhatIfFigures& f, Requirement::Basis basis) {
  return basis == Requirement::Basis::linear ? f.rss_max_abs : f.wc_max_abs;
}

std::string_view enough(const WhatIfRow& row, const Requirement& q) {
  if (q.basis == Requirement::Basis::monte_carlo) return "";
  auto within = [&](const WhatIfFigures& f) { return f.readable && basis_figure(f, q.basis) <= q.max_error; };
  if (within(row.halved)) return "halved";
  if (within(row.removed)) return "removed";
  return "";
}

bool judged_against_limit(const WhatIf& w, const Requirement& q) {
  return q.basis != Requirement::Basis::monte_carlo &&
         !(w.as_designed.readable && basis_figure(w.as_designed, q.basis) <= q.max_error);
}

std::string_view enough_phrase(const WhatIfRow& row, const Requirement& q) {
  const std::string_view e = enough(row, q);
  return e == "halved" ? "if halved" : e == "removed" ? "only if removed" : "no";
}

WhatIf what_if(const Chain& chain, const Budget& budget, const WhatIfOptions& options) {
  const Design& d = chain.design();
  const auto temps = window_temperatures(budget);
  WhatIf out;
  if (temps.empty()) return out;

  // The leaders by share (the window table's order) and by own half-width,
  // in that order, once each.
  std::vector<const Contributor*> ranked;
  for (const auto& c : budget.window_contributors) ranked.push_back(&c);
  std::vector<const Contributor*> tried;
  std::set<std::string> seen;
  auto take = [&]() {
    int taken = 0;
    for (const Contributor* c : ranked) {
      if (taken == options.sources) break;
      if (c->name == info(ReadingSource::quantization).name || (c->share <= 0.0 && c->half_width <= 0.0)) continue;
      if (is_pair_row(c->name)) continue;  // a pair is improved through its inputs, which have rows of their own
      ++taken;
      if (seen.insert(c->name).second) tried.push_back(c);
    }
  };
  take();
  std::stable_sort(ranked.begin(), ranked.end(),
                   [](const Contributor* a, const Contributor* b) { return a->half_width > b->half_width; });
  take();

  // Every corner of the designed box once, and per source tried its halved
  // box (as many corners) and its removed one (half as many).
  const int n = static_cast<int>(d.inputs.size());
  const double enumeration =
      std::ldexp(1.0, n) * static_cast<double>(temps.size()) * (1.0 + 1.5 * static_cast<double>(tried.size()));
  out.directed = n > max_enumerated_inputs || enumeration > options.max_evaluations;
  const WorstCaseOptions method{.method = out.directed ? CornerMethod::directed : CornerMethod::enumerate,
                                .half_widths = false,
                                .threads = d.threads_or_scenario(options.threads)};
  out.as_designed = figures(d, temps, method);

  for (const Contributor* c : tried) {
    WhatIfRow row{c->name, c->label, key_of(c->name), {}, {}};
    Design halved = d, removed = d;
    if (!improve(halved, c->name, Change::halve) || !improve(removed, c->name, Change::remove)) continue;
    row.halved = figures(halved, temps, method);
    row.removed = figures(removed, temps, method);
    out.rows.push_back(std::move(row));
  }
  const auto basis = d.requirement.basis;
  std::stable_sort(out.rows.begin(), out.rows.end(), [&](const WhatIfRow& a, const WhatIfRow& b) {
    const double ra = basis_figure(a.removed, basis), rb = basis_figure(b.removed, basis);
    if (ra != rb) return ra < rb;
    return basis_figure(a.halved, basis) < basis_figure(b.halved, basis);
  });
  return out;
}

}  // namespace thermargin
