#include "thermargin/engines/budget.hpp"

#include "thermargin/engines/window.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <map>
#include <string>

#include "thermargin/engines/unreadable.hpp"
#include "thermargin/input/life.hpp"

namespace thermargin {

std::string_view to_string(Requirement::Basis b) {
  switch (b) {
    case Requirement::Basis::worst_case: return "worst-case";
    case Requirement::Basis::linear: return "linear";
    case Requirement::Basis::monte_carlo: return "monte-carlo";
  }
  return "worst-case";
}

std::string corner_method_text(const Budget& b) {
  const std::string inputs = std::to_string(b.active_inputs) + " active input" + (b.active_inputs == 1 ? "" : "s");
  if (!b.wc_directed) {
    std::string s = "full enumeration of 2^" + std::to_string(b.active_inputs) + " = " + std::to_string(b.wc_corners) +
                    " corners (" + inputs + ")";
    if (b.active_inputs > max_enumerated_inputs) s += ", as --corners enumerate asked";
    return s;
  }
  std::string s = "corners directed by the sensitivities' signs, then improved by flipping inputs (" + inputs;
  if (b.active_inputs > max_enumerated_inputs)
    return s + ", more than the " + std::to_string(max_enumerated_inputs) + " enumerated in full)";
  return s + ", as --corners directed asked)";
}

namespace {


std::vector<Contributor> point_contributors(const LinearPoint& lp, const WorstCasePoint& wp) {
  std::vector<Contributor> out;
  const double var = lp.u_c * lp.u_c;
  for (std::size_t i = 0; i < lp.terms.size(); ++i) {
    const auto& t = lp.terms[i];
    Contributor c{t.name, t.label, var > 0.0 ? t.variance() / var : 0.0,
                  i < wp.own_half_width.size() ? wp.own_half_width[i] : 0.0};
    out.push_back(std::move(c));
  }
  // The pair rows of the second-order terms; their reach is the pair's
  // interaction with both inputs at their bounds.
  for (const auto& t : lp.pairs) out.push_back({t.name, t.label, var > 0.0 ? t.variance() / var : 0.0, t.reach});
  std::stable_sort(out.begin(), out.end(), [](const Contributor& a, const Contributor& b) { return a.share > b.share; });
  return out;
}

constexpr std::size_t leader_count = 3;
// A pair share from which a failed validation is put down to a product of
// inputs: the product of a normal and a uniform input has a kurtosis of 5.4
// against the normal's 3, enough to move a 99.73 % endpoint by several
// per cent once it carries a tenth of the variance.
constexpr double non_normal_pair_share = 0.10;

void set_leaders(Budget& b) {
  std::vector<const Contributor*> by_reach;
  for (const auto& c : b.window_contributors) {
    if (c.share > 0.0 && b.leaders_by_share.size() < leader_count) b.leaders_by_share.push_back(c.name);
    if (c.half_width > 0.0) by_reach.push_back(&c);
  }
  std::stable_sort(by_reach.begin(), by_reach.end(),
                   [](const Contributor* x, const Contributor* y) { return x->half_width > y->half_width; });
  for (std::size_t i = 0; i < by_reach.size() && i < leader_count; ++i) b.leaders_by_reach.push_back(by_reach[i]->name);
  b.leaders_differ = !b.leaders_by_reach.empty() && !b.leaders_by_share.empty() &&
                     b.leaders_by_reach.front() != b.leaders_by_share.front();
}

// "2.01e+11", "about 1.1 hours": sizes and times for the refusal messages.
std::string count_text(double n) {
  char buf[32];
  std::snprintf(buf, sizeof buf, n < 1e6 ? "%.0f" : "%.3g", n);
  return buf;
}

std::string duration_text(double seconds) {
  char buf[64];
  if (seconds < 5400) std::snprintf(buf, sizeof buf, "about %.0f minutes", seconds / 60);
  else if (seconds < 2 * 86400) std::snprintf(buf, sizeof buf, "about %.1f hours", seconds / 3600);
  else std::snprintf(buf, sizeof buf, "about %.0f days", seconds / 86400);
  return buf;
}

}  // namespace

void require_feasible(const Design& d, const Scenario& s, const BudgetOptions& options) {
  const double temperatures = static_cast<double>(d.conditions.temperatures().size());
  const std::string per_core = " of one core";
  if (options.monte_carlo) {
    const bool automatic = d.montecarlo.units == 0;
    const double units = static_cast<double>(automatic ? d.montecarlo.max_units : d.montecarlo.units);
    const double samples = units * temperatures * d.adc.averaging;
    if (samples > max_monte_carlo_samples) {
      const std::string key = automatic ? "montecarlo.max_units" : "montecarlo.units";
      const Setting& at = s.get(key);
      Where where = at.where;
      where.key = key;
      reject(where, at.value,
             (automatic ? "auto may run up to " : "") + count_text(units) + " units x " + count_text(temperatures) +
                 " temperatures x " + std::to_string(d.adc.averaging) + " sample(s) per reading = " + count_text(samples) +
                 " simulated ADC samples, " + duration_text(samples / monte_carlo_samples_per_second) + per_core +
                 "; at most " + count_text(max_monte_carlo_samples) + " are simulated: fewer units" +
                 (automatic ? " (a lower montecarlo.max_units)" : " (or auto)") +
                 ", a coarser conditions.t_step or a narrower t_min..t_max, or budget --no-mc");
    }
  }
  // The automatic choice enumerates at most 2^16 corners, within the limit at
  // the most temperatures conditions.t_step allows; an enumeration asked for may not be.
  const int inputs = static_cast<int>(d.inputs.size());
  if (options.corners == CornerMethod::enumerate) {
    const double evaluations = std::ldexp(1.0, inputs) * temperatures;
    if (evaluations > max_worst_case_evaluations)
      reject(command_line("--corners"), "enumerate",
             std::to_string(inputs) + " active inputs give 2^" + std::to_string(inputs) + " corners x " +
                 count_text(temperatures) + " temperatures = " + count_text(evaluations) + " chain evaluations, " +
                 duration_text(evaluations / worst_case_evaluations_per_second) + per_core + "; at most " +
                 count_text(max_worst_case_evaluations) +
                 " are enumerated: --corners=directed, a coarser conditions.t_step or a narrower t_min..t_max");
  }
}

std::string validation_failure_reason(const BudgetPoint& p, const Design& d) {
  if (!p.mc || p.mc->valid == 0 || p.linear.status != Status::ok) return "";
  const double delta = numerical_tolerance(p.linear.u_c);
  if (linear_validated(p.linear.low, p.linear.high, p.mc->low, p.mc->high, delta)) return "";
  char buf[200];
  if (p.mc->saturated > 0) {
    std::snprintf(buf, sizeof buf, "saturation: %.3g %% of the readings reach a rail, which the linear budget cannot see",
                  100.0 * p.mc->saturated_share());
    return buf;
  }
  if (d.firmware.resolution > 0.0 && d.firmware.resolution >= delta) {
    std::snprintf(buf, sizeof buf,
                  "output rounding: the Monte Carlo endpoints step by the %.3g K resolution, coarser than the "
                  "validation tolerance of %.2g K",
                  d.firmware.resolution, delta);
    return buf;
  }
  double pairs = 0.0;
  for (const auto& c : p.contributors)
    if (is_pair_row(c.name)) pairs += c.share;
  if (pairs >= non_normal_pair_share) {
    std::snprintf(buf, sizeof buf,
                  "a non-normal product: pairs of inputs carry %.0f %% of the variance, and a product is not normal, "
                  "so the normal coverage factor misplaces the endpoints",
                  100.0 * pairs);
    return buf;
  }
  std::snprintf(buf, sizeof buf,
                "the output is not close to normal (endpoints %+.3g and %+.3g K from Monte Carlo's, tolerance %.2g K)",
                p.linear.low - p.mc->low, p.linear.high - p.mc->high, delta);
  return buf;
}

namespace {

// Whether the basis engine could read a window point for every unit.
bool basis_broken(const BudgetPoint& p, Requirement::Basis basis) {
  if (basis == Requirement::Basis::worst_case) return p.wc.failed_corners > 0 || !p.wc.any_ok;
  if (basis == Requirement::Basis::linear) return p.linear.status != Status::ok;
  return false;
}

// The basis engine's largest |error| over the window points it reads for
// every unit: the error of the readable part, apart from where it saturates.
void readable_part(const Budget& b, Verdict& v) {
  const bool wc = v.basis == Requirement::Basis::worst_case;
  v.readable_max_abs = v.readable_at = std::numeric_limits<double>::quiet_NaN();
  for (const auto& p : b.points) {
    if (!p.in_window || basis_broken(p, v.basis)) continue;
    const double e = wc ? std::max(std::fabs(p.wc.low), std::fabs(p.wc.high))
                        : std::max(std::fabs(p.linear.low), std::fabs(p.linear.high));
    if (!(e <= v.readable_max_abs)) {
      v.readable_max_abs = e;
      v.readable_at = p.t;
    }
  }
}

// The verdict by the requirement's basis: the worst case or the linear
// band against the limit (failing where a window temperature cannot be
// read, said apart from the error where it reads), or the Monte Carlo
// yield against the required yield.
void decide_verdict(Budget& b, const Design& d) {
  Verdict& v = b.verdict;
  v.basis = d.requirement.basis;
  const double limit = d.requirement.max_error;
  const bool window_failures = std::any_of(b.points.begin(), b.points.end(),
                                           [&](const BudgetPoint& p) { return p.in_window && basis_broken(p, v.basis); });
  char buf[256];
  if (v.basis == Requirement::Basis::monte_carlo) {
    if (!b.mc) {
      v.pass = false;
      v.reason = "the verdict asks for Monte Carlo, which was not run";
    } else {
      v.worst_abs_error = b.mc->max_abs;
      v.worst_at = b.mc->max_abs_at;
      v.margin = limit - v.worst_abs_error;
      v.pass = b.mc->yield >= d.requirement.yield;
      std::snprintf(buf, sizeof buf, "Monte Carlo yield %.4f %% against the required %.4f %% (%llu units)",
                    100 * b.mc->yield, 100 * d.requirement.yield, static_cast<unsigned long long>(b.mc->units));
      v.reason = buf;
    }
    return;
  }
  const bool wc_basis = v.basis == Requirement::Basis::worst_case;
  const char* engine = wc_basis ? "worst-case" : "linear-budget";
  v.worst_abs_error = wc_basis ? b.wc_max_abs : b.rss_max_abs;
  v.worst_at = wc_basis ? b.wc_max_at : b.rss_max_at;
  v.margin = limit - v.worst_abs_error;
  v.readable_max_abs = v.worst_abs_error;
  v.readable_at = v.worst_at;
  if (!window_failures) {
    v.pass = v.margin >= 0.0;
    std::snprintf(buf, sizeof buf, "%s error up to %.3f K at %.2f degC against the limit of +/-%.3f K", engine,
                  v.worst_abs_error, v.worst_at, limit);
    v.reason = buf;
    return;
  }
  v.pass = false;
  v.unreadable = unreadable_runs(b.points, true);
  readable_part(b, v);
  v.reason = "inside the window, " + describe_runs(v.unreadable) + "; ";
  if (std::isfinite(v.readable_max_abs))
    std::snprintf(buf, sizeof buf, "where every unit reads, the %s error is up to %.3f K at %.2f degC against the limit of +/-%.3f K",
                  engine, v.readable_max_abs, v.readable_at, limit);
  else
    std::snprintf(buf, sizeof buf, "no window temperature is read by every unit");
  v.reason += buf;
}

Budget budget_of(const Chain& chain, const BudgetOptions& options) {
  const Design& d = chain.design();
  const auto temps = d.conditions.temperatures();
  Budget b;
  const WorstCase wc =
      worst_case(chain, temps, {.method = options.corners, .threads = d.threads_or_scenario(options.threads)});
  const LinearBudget lb = linear_budget(chain, temps);
  b.k_p = lb.k_p;
  b.wc_directed = wc.directed;
  b.active_inputs = wc.active_inputs;
  b.wc_corners = wc.corners;
  std::optional<McResult> mc;
  if (options.monte_carlo) {
    McOptions mo;
    mo.progress = options.progress;
    mo.threads = options.threads;
    mc = monte_carlo(chain, temps, mo);
    b.mc = mc->summary;
  }

  std::map<std::string, Contributor> window;  // summed variance and largest half-width
  double window_var = 0.0;
  for (std::size_t i = 0; i < temps.size(); ++i) {
    BudgetPoint p;
    p.t = temps[i];
    p.in_window = in_requirement_window(d.requirement, p.t);
    p.nominal = nominal_point(chain, p.t);
    p.wc = wc.points[i];
    p.linear = lb.points[i];
    if (mc) p.mc = mc->points[i];
    const bool broken = p.nominal.status != Status::ok || p.wc.failed_corners > 0 || p.linear.status != Status::ok ||
                        (p.mc && (p.mc->saturated + p.mc->failed) > 0);
    b.status_points += broken;
    if (p.linear.status == Status::ok) {
      p.contributors = point_contributors(p.linear, p.wc);
      if (p.in_window) {
        window_var += p.linear.u_c * p.linear.u_c;
        for (const auto& c : p.contributors) {
          auto& w = window[c.name];
          w.name = c.name;
          w.label = c.label;
          w.share += c.share * p.linear.u_c * p.linear.u_c;
          w.half_width = std::max(w.half_width, c.half_width);
        }
      }
    }
    if (p.in_window && p.nominal.status == Status::ok && p.nominal.sensitivity != 0.0 &&
        (!b.weakest.found || std::fabs(p.nominal.sensitivity) < b.weakest.lsb_per_k)) {
      b.weakest = {true, p.t, std::fabs(p.nominal.sensitivity), std::fabs(p.nominal.mv_per_k), p.nominal.lsb_in_k};
    }
    b.points.push_back(std::move(p));
  }
  // An engine that could read no temperature of the window has no largest
  // error there: not a number (printed as n/a, null in JSON), never 0 K.
  const double none = std::numeric_limits<double>::quiet_NaN();
  const WindowMax wc_max = window_max(wc.points, d.requirement), rss_max = window_max(lb.points, d.requirement);
  b.wc_max_abs = wc_max.any ? wc_max.max_abs : none;
  b.wc_max_at = wc_max.at;
  b.rss_max_abs = rss_max.any ? rss_max.max_abs : none;
  b.rss_max_at = rss_max.at;
  if (b.mc && std::none_of(b.points.begin(), b.points.end(),
                           [](const BudgetPoint& p) { return p.in_window && p.mc && p.mc->valid > 0; }))
    b.mc->max_abs = b.mc->max_abs_at = none;
  for (auto& [name, c] : window) {
    c.share = window_var > 0.0 ? c.share / window_var : 0.0;
    b.window_contributors.push_back(c);
  }
  std::stable_sort(b.window_contributors.begin(), b.window_contributors.end(),
                   [](const Contributor& x, const Contributor& y) { return x.share > y.share; });
  if (!b.window_contributors.empty()) b.dominant = b.window_contributors.front().label;
  set_leaders(b);

  decide_verdict(b, d);
  return b;
}

}  // namespace

Budget run_budget(const Chain& chain, const BudgetOptions& options) {
  Budget b = budget_of(chain, options);
  const Design& d = chain.design();
  if (!has_drift(d)) return b;
  auto life = std::make_shared<EndOfLife>();
  life->design = at_end_of_life(d);
  life->budget = budget_of(Chain(life->design), options);
  life->delivery_verdict = b.verdict;
  if (d.requirement.at == Requirement::At::end_of_life) {
    b.verdict = life->budget.verdict;
    b.verdict.at = Requirement::At::end_of_life;
    b.verdict.reason = "at end of life: " + b.verdict.reason;
  }
  b.end_of_life = std::move(life);
  return b;
}

}  // namespace thermargin
