#include "thermargin/tools/grades.hpp"

#include "thermargin/core/parallel.hpp"

#include <algorithm>
#include <condition_variable>
#include <cmath>
#include <cstdio>
#include <deque>
#include <exception>
#include <functional>
#include <filesystem>
#include <limits>
#include <map>
#include <mutex>
#include <thread>

#include "thermargin/engines/budget.hpp"
#include "thermargin/engines/conversion_cache.hpp"
#include "thermargin/chain/rtd_class_range.hpp"
#include "thermargin/engines/linear_budget.hpp"
#include "thermargin/engines/window.hpp"
#include "thermargin/tools/series.hpp"
#include "thermargin/input/life.hpp"

namespace thermargin {

namespace {

constexpr double equal_cost = 1e-9;    // relative: sums of decimal prices that are the same amount


std::string num(const char* format, double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, format, v);
  return buf;
}

// Exact text of a value set on the design (the re-picked resistor), read
// back by the number parser to the same double.
std::string exact_text(double v) { return num("%.17g", v); }

void apply(Scenario& s, const GradeOption& o) {
  for (const auto& st : o.settings) s.set(st.key, st.value, st.where);
}

Scenario combination_scenario(const Scenario& base, const Catalogue& cat, const std::vector<int>& choice) {
  Scenario s = base;
  for (std::size_t k = 0; k < cat.slots.size(); ++k) apply(s, cat.slots[k].options[static_cast<std::size_t>(choice[k])]);
  return s;
}

// Combination number i in catalogue order: the last slot varies fastest.
std::vector<int> choice_of(const Catalogue& cat, std::size_t i) {
  std::vector<int> c(cat.slots.size());
  for (std::size_t k = cat.slots.size(); k-- > 0;) {
    const std::size_t n = cat.slots[k].options.size();
    c[k] = static_cast<int>(i % n);
    i /= n;
  }
  return c;
}

std::string choice_label(const Catalogue& cat, const std::vector<int>& choice) {
  std::string out;
  for (std::size_t k = 0; k < cat.slots.size(); ++k)
    out += (k ? ", " : "") + cat.slots[k].name + " = " + cat.slots[k].options[static_cast<std::size_t>(choice[k])].grade;
  return out;
}

// Two texts of one key that mean the same value: equal text, or equal numbers
// once read with the key's quantity, or the same file.
bool same_value(const std::string& key, const Setting& current, const std::string& candidate) {
  if (current.value == candidate) return true;
  namespace fs = std::filesystem;
  if (key.ends_with("_file")) {
    fs::path a(current.value);
    if (a.is_relative() && current.where.kind == Origin::file) a = fs::path(current.where.file).parent_path() / a;
    std::error_code e1, e2;
    const auto ca = fs::weakly_canonical(a, e1), cb = fs::weakly_canonical(fs::path(candidate), e2);
    return !e1 && !e2 && ca == cb;
  }
  const KeySpec* spec = find_key(key);
  try {
    const Where w;
    const double x = parse_quantity(current.value, spec->quantity, w);
    const double y = parse_quantity(candidate, spec->quantity, w);
    return std::fabs(x - y) <= 1e-12 * std::max(std::fabs(x), std::fabs(y));
  } catch (const input_error&) {
    return false;  // words that differ
  }
}

// --- Re-pick ---------------------------------------------------------------

// The fixed resistor a combination gets. With the worst-case objective, the
// picker's winner over the whole list, searched from the anchor
// (pick_winner(): the same row pick() ranks first; the anchor changes only
// the work). With another objective, the picker (its objective, its exact
// branch and bound) over a window of series values around the anchor, moved
// while the winner sits at the window's edge, so the value returned has at
// least re_pick_half_width series values either side that lose to it; when
// no value in the window can be read, the whole list is searched.
struct RePick {
  std::vector<double> values;  // the candidate list (series in range, or given), ascending
  std::size_t anchor = 0;      // index of the scenario's own pick
};

std::size_t nearest_index(const std::vector<double>& values, double r) {
  std::size_t best = 0;
  for (std::size_t i = 1; i < values.size(); ++i)
    if (std::fabs(std::log(values[i] / r)) < std::fabs(std::log(values[best] / r))) best = i;
  return best;
}

PickRow re_pick(const Scenario& s, const PickOptions& base, const std::vector<double>& values, std::size_t anchor) {
  const std::size_t n = values.size();
  const std::size_t h = static_cast<std::size_t>(re_pick_half_width);
  PickOptions o = base;
  o.top = 1;
  o.verify = 0;
  o.guidance = false;
  o.threads = 1;
  o.progress = nullptr;
  if (o.objective == Objective::worst_case) return pick_winner(s, o, values[anchor]);
  std::size_t centre = anchor;
  for (std::size_t round = 0; round <= n; ++round) {
    const std::size_t lo = centre > h ? centre - h : 0, hi = std::min(n - 1, centre + h);
    o.values.assign(values.begin() + static_cast<std::ptrdiff_t>(lo), values.begin() + static_cast<std::ptrdiff_t>(hi) + 1);
    PickResult r = pick(s, o);
    if (!r.winner().feasible()) break;  // nothing readable here: search everything
    const std::size_t w = nearest_index(values, r.winner().r_fixed);
    if ((w == lo && lo > 0) || (w == hi && hi + 1 < n)) {
      centre = w;
      continue;
    }
    return r.rows.front();
  }
  o.values = values;
  return pick(s, o).rows.front();
}

// --- One combination -------------------------------------------------------

struct Figures {  // what the engines say about one distinct design
  std::optional<double> r_fixed;
  Status status = Status::ok;
  double status_at = 0.0;
  std::optional<double> wc_max_abs, rss_max_abs;
  bool mc_run = false;
  std::string mc_skipped;
  std::optional<McSummary> mc;
  bool mc_unreadable = false;  // some Monte Carlo reading in the window did not convert
  Requirement requirement;
  std::string rtd_class_note;  // the RTD class used beyond its rated range (marked, not refused)
  bool end_of_life = false;    // judged at end of life (life.hpp)
};

// `conversions`: the firmware's conversion tables the run's Monte Carlo
// runs share (combinations that change no firmware input share one).
Figures evaluate_design(Scenario s, const GradesOptions& options, const RePick& rp, std::size_t anchor,
                        ConversionCache& conversions) {
  Figures f;
  // The picker has just evaluated the winning design over the same window
  // (the winner's worst case in full, every candidate's linear band): its
  // figures are taken rather than computed again, the worst case being the
  // costliest engine here.
  std::optional<double> picked_wc, picked_rss;
  if (options.re_pick) {
    const PickRow w = re_pick(s, options.pick, rp.values, anchor);
    f.r_fixed = w.r_fixed;
    s.set("divider.r_fixed", exact_text(w.r_fixed), command_line("--re-pick"));
    if (w.status == Status::ok) {
      if (options.corners == CornerMethod::automatic) picked_wc = w.wc_max_abs;
      picked_rss = w.rss_max_abs;
    }
  }
  // On the verdict's basis: at end of life when drift is set and requirement.at says so.
  // One thread an engine: threads are spread over combinations instead.
  const Design built = build_design(s);
  f.end_of_life = judged_at_end_of_life(built);
  const Design d = design_for_verdict(built);
  f.requirement = d.requirement;
  f.rtd_class_note = rtd_class_range_note(d);
  const Chain chain(d);
  const std::vector<double> window = window_temperatures(d.requirement, d.conditions.temperatures());
  // The first window temperature an engine cannot read.
  auto unreadable = [&](Status st, double t) {
    if (f.status != Status::ok) return;
    f.status = st;
    f.status_at = t;
  };

  f.wc_max_abs = picked_wc;
  if (!picked_wc) {
    // The band alone: window_max reads no source's own half-width.
    const WorstCaseOptions wo{.method = options.corners, .half_widths = false, .threads = 1};
    const WindowMax m = window_max(worst_case(chain, window, wo).points, d.requirement);
    if (m.readable) f.wc_max_abs = m.max_abs;
    else unreadable(m.failure, m.failure_at);
  }
  f.rss_max_abs = picked_rss;
  if (!picked_rss) {
    const WindowMax m = window_max(linear_budget(chain, window).points, d.requirement);
    if (m.readable) f.rss_max_abs = m.max_abs;
    else unreadable(m.failure, m.failure_at);
  }

  // Monte Carlo where it can matter (the screening rule in grades.hpp).
  const Requirement& q = d.requirement;
  McOptions mo;
  mo.threads = 1;
  mo.conversions = &conversions;
  const bool full = options.mc_all || options.by == ErrorMeasure::monte_carlo;
  if (!full && q.basis != Requirement::Basis::monte_carlo) {
    const bool wc_basis = q.basis == Requirement::Basis::worst_case;
    const auto& e = wc_basis ? f.wc_max_abs : f.rss_max_abs;
    if (!e) {
      f.mc_skipped = "not run: some reading in the window cannot be converted";
      return f;
    }
    if (*e > q.max_error) {
      f.mc_skipped = std::string("not run: the ") + (wc_basis ? "worst case" : "linear band") +
                     " is over the limit, so no yield can meet the requirement";
      return f;
    }
  }
  if (!full && q.basis == Requirement::Basis::monte_carlo && options.units > mc_pilot_units) {
    mo.units = mc_pilot_units;
    const McSummary pilot = monte_carlo(chain, window, mo).summary;
    const Interval ci = clopper_pearson(pilot.good_units, pilot.units, 2.0 * mc_pilot_alpha);
    if (ci.high < q.yield) {
      f.mc = pilot;
      f.mc_skipped = "stopped after a pilot of " + std::to_string(pilot.units) + " units: the yield is below " +
                     num("%.3f", 100.0 * ci.high) + " % at 99.9 % confidence";
      return f;
    }
  }
  mo.units = options.units;
  const McResult mc = monte_carlo(chain, window, mo);
  f.mc = mc.summary;
  f.mc_run = true;
  for (const auto& p : mc.points) f.mc_unreadable = f.mc_unreadable || p.saturated + p.failed > 0;
  return f;
}

std::string verdict_of(const GradeRow& r, const Requirement& q) {
  const bool mc_basis = q.basis == Requirement::Basis::monte_carlo;
  if (!mc_basis && r.status != Status::ok)
    return "cannot be read in the window: " + std::string(describe(r.status)) + " at " + num("%.2f", r.status_at) + " degC";
  if (!r.within_limit) {
    const bool wc = q.basis == Requirement::Basis::worst_case;
    return std::string(wc ? "worst case " : "linear band ") + num("%.3f", wc ? *r.wc_max_abs : *r.rss_max_abs) +
           " K over the limit of " + num("%.3f", q.max_error) + " K";
  }
  if (!r.mc) return "no yield (" + r.mc_skipped + ")";
  if (!r.mc_run) return "yield below the required " + num("%.2f", 100.0 * q.yield) + " % (" + r.mc_skipped + ")";
  if (r.mc->yield < q.yield)
    return "yield " + num("%.2f", 100.0 * r.mc->yield) + " % below the required " + num("%.2f", 100.0 * q.yield) + " %";
  return "meets the requirement";
}

// --- The paragraph ---------------------------------------------------------

std::string settings_text(const GradeOption& o) {
  std::string out;
  for (const auto& s : o.settings) out += (out.empty() ? "" : ", ") + s.key + " = " + s.value;
  return out.empty() ? "no change to the scenario" : out;
}

std::string summary_of(const GradesResult& g, const Catalogue& cat, const Scenario& scenario) {
  const auto& q = g.requirement;
  std::string req = "+/-" + num("%.3f", q.max_error) + " K over " + num("%.2f", q.window_min) + ".." +
                    num("%.2f", q.window_max) + " degC (" + std::string(to_string(q.basis)) + " basis) with a yield of at least " +
                    num("%.2f", 100.0 * q.yield) + " %";
  if (!g.recommendation) {
    std::string out = "No combination meets the requirement (" + req + ").";
    std::optional<std::size_t> best;
    for (std::size_t i = 0; i < g.rows.size(); ++i)
      if (g.rows[i].error && (!best || *g.rows[i].error < *g.rows[best.value()].error)) best = i;
    if (best)
      out += " The most accurate combination is " + g.choice_text(g.rows[*best]) + ": " + std::string(to_string(g.by)) +
             " error " + num("%.3f", *g.rows[*best].error) + " K at " + money(g.rows[*best].unit_cost) + " per unit.";
    return out;
  }
  const GradeRow& rec = g.rows[*g.recommendation];
  std::string out = "Recommended: " + g.choice_text(rec) + " at " + money(rec.unit_cost) + " per unit";
  if (rec.cost_per_good_unit) out += " (" + money(*rec.cost_per_good_unit) + " per good unit)";
  out += ", the cheapest combination that meets " + req + ".";
  if (rec.r_fixed)
    out += " Its fixed resistor is re-picked: " + format_quantity(*rec.r_fixed, Quantity::resistance, 4) +
           " (the scenario has " + scenario.get("divider.r_fixed").value + ").";
  if (!g.current_row) {
    std::string missing;
    for (std::size_t k = 0; k < g.current.size(); ++k)
      if (!g.current[k]) missing += (missing.empty() ? "'" : ", '") + cat.slots[k].name + "'";
    out += " The scenario's current parts are not all in the catalogue (no option of slot " + missing +
           " has the scenario's values), so no saving is computed. The recommendation sets: ";
    for (std::size_t k = 0; k < cat.slots.size(); ++k)
      out += (k ? "; " : "") + cat.slots[k].name + ": " +
             settings_text(cat.slots[k].options[static_cast<std::size_t>(rec.choice[k])]);
    return out + ".";
  }
  const GradeRow& cur = g.rows[*g.current_row];
  if (*g.current_row == *g.recommendation)
    return out + " These are the scenario's current parts: nothing to change.";
  std::string changes, kept;
  for (std::size_t k = 0; k < cat.slots.size(); ++k) {
    const auto& slot = cat.slots[k];
    if (cur.choice[k] == rec.choice[k]) {
      kept += (kept.empty() ? "" : ", ") + slot.name;
      continue;
    }
    changes += (changes.empty() ? "" : "; ") + slot.name + " " + slot.options[static_cast<std::size_t>(cur.choice[k])].grade +
               " -> " + slot.options[static_cast<std::size_t>(rec.choice[k])].grade;
  }
  out += " Against the scenario's current parts (" + g.choice_text(cur) + ") it changes " + changes;
  if (!kept.empty()) out += " and keeps " + kept;
  const double delta = *g.saving;
  const std::string per = g.saving_per_good_unit ? " per good unit" : " per unit";
  if (std::fabs(delta) <= equal_cost * std::max(1.0, std::fabs(cur.unit_cost))) {
    out += "; the cost is the same";
  } else {
    out += delta > 0 ? "; it saves " + money(delta) + per : "; it costs " + money(-delta) + " more" + per;
    if (g.volume) out += " (" + money(std::fabs(delta) * *g.volume) + " over " + num("%.0f", *g.volume) + " units)";
  }
  out += ". The current parts " + std::string(cur.meets_requirement ? "meet the requirement too." : "do not: " + cur.verdict + ".");
  return out;
}

// Distinct designs: combinations whose settings are the same (a slot that
// only changes the price) are evaluated once; not with a re-pick, where each
// combination is its own design. design_of[i] is combination i's design,
// first_of[j] the first combination of design j.
void distinct_designs(const Catalogue& cat, bool re_pick, std::vector<std::size_t>& design_of,
                      std::vector<std::size_t>& first_of) {
  const std::size_t n = cat.combinations();
  design_of.assign(n, 0);
  std::map<std::string, std::size_t> seen;
  for (std::size_t i = 0; i < n; ++i) {
    std::string key = std::to_string(i);
    if (!re_pick) {
      const auto choice = choice_of(cat, i);
      std::map<std::string, std::string> settings;
      for (std::size_t k = 0; k < cat.slots.size(); ++k)
        for (const auto& st : cat.slots[k].options[static_cast<std::size_t>(choice[k])].settings) settings[st.key] = st.value;
      key.clear();
      for (const auto& [k, v] : settings) key += k + '\x1f' + v + '\x1e';
    }
    const auto [it, fresh] = seen.emplace(key, first_of.size());
    if (fresh) first_of.push_back(i);
    design_of[i] = it->second;
  }
}

// The recommendation: the cheapest row (by the ranking cost) that meets the
// requirement; of rows that cost the same, the first (the more accurate).
std::optional<std::size_t> cheapest_meeting(const GradesResult& g) {
  std::optional<std::size_t> best;
  for (std::size_t i = 0; i < g.rows.size(); ++i) {
    const GradeRow& r = g.rows[i];
    if (!r.meets_requirement || !g.ranking_cost(r)) continue;
    if (!best) {
      best = i;
      continue;
    }
    const GradeRow& b = g.rows[*best];
    const double cr = *g.ranking_cost(r), cb = *g.ranking_cost(b);
    if (cb - cr > equal_cost * std::max(1.0, std::fabs(cb))) best = i;
  }
  return best;
}

// One combination's row: its cost, its figures and the requirement.
GradeRow make_row(const Catalogue& cat, const GradesOptions& options, std::size_t i, const Figures& f) {
  GradeRow r;
  r.index = i;
  r.choice = choice_of(cat, i);
  double setup = 0.0;
  for (std::size_t k = 0; k < cat.slots.size(); ++k) {
    const auto& o = cat.slots[k].options[static_cast<std::size_t>(r.choice[k])];
    r.unit_cost += o.unit_cost;
    setup += o.setup_cost;
  }
  r.setup_per_unit = options.volume ? setup / *options.volume : 0.0;
  r.unit_cost += r.setup_per_unit;
  r.r_fixed = f.r_fixed;
  r.status = f.status;
  r.status_at = f.status_at;
  r.rtd_class_note = f.rtd_class_note;
  r.end_of_life = f.end_of_life;
  r.wc_max_abs = f.wc_max_abs;
  r.rss_max_abs = f.rss_max_abs;
  r.mc_run = f.mc_run;
  r.mc_skipped = f.mc_skipped;
  r.mc = f.mc;
  if (r.mc_run && options.reject_cost) r.cost_per_good_unit = cost_per_good_unit(r.unit_cost, r.mc->yield, *options.reject_cost);
  switch (options.by) {
    case ErrorMeasure::worst_case: r.error = r.wc_max_abs; break;
    case ErrorMeasure::linear: r.error = r.rss_max_abs; break;
    case ErrorMeasure::monte_carlo:
      // Bands of the readings that converted would understate the error
      // where some did not: no figure then.
      if (r.mc_run && !f.mc_unreadable) r.error = r.mc->max_abs;
      break;
  }
  const Requirement& q = f.requirement;
  switch (q.basis) {
    case Requirement::Basis::worst_case: r.within_limit = r.wc_max_abs && *r.wc_max_abs <= q.max_error; break;
    case Requirement::Basis::linear: r.within_limit = r.rss_max_abs && *r.rss_max_abs <= q.max_error; break;
    case Requirement::Basis::monte_carlo: r.within_limit = true; break;
  }
  r.meets_requirement = r.within_limit && r.mc_run && r.mc->yield >= q.yield &&
                        (q.basis == Requirement::Basis::monte_carlo || r.status == Status::ok);
  r.verdict = verdict_of(r, q);
  return r;
}

// Progress's "best so far": a combination that meets the requirement beats
// one that does not, then the cheaper; among those that do not, the smaller
// error.
bool better(const GradeRow& a, const GradeRow& b) {
  if (a.meets_requirement != b.meets_requirement) return a.meets_requirement;
  if (a.meets_requirement) return a.unit_cost < b.unit_cost;
  if (a.error.has_value() != b.error.has_value()) return a.error.has_value();
  return a.error && *a.error < *b.error;
}

std::string best_note(const Catalogue& cat, const GradeRow& r) {
  std::string s = "best so far: ";
  for (std::size_t k = 0; k < cat.slots.size(); ++k)
    s += (k ? ", " : "") + cat.slots[k].name + " " + cat.slots[k].options[static_cast<std::size_t>(r.choice[k])].grade;
  char buf[96];
  if (r.error) std::snprintf(buf, sizeof buf, ": %.3f K, %.4g per unit", *r.error, r.unit_cost);
  else std::snprintf(buf, sizeof buf, ": no error figure, %.4g per unit", r.unit_cost);
  return s + buf + (r.meets_requirement ? ", meets" : "");
}

// The scenario's current parts: the grade of each slot whose settings the
// scenario already has, and the row of that combination.
void find_current(GradesResult& g, const Catalogue& cat, const Scenario& scenario) {
  g.current.resize(cat.slots.size());
  for (std::size_t k = 0; k < cat.slots.size(); ++k)
    for (std::size_t o = 0; o < cat.slots[k].options.size() && !g.current[k]; ++o) {
      bool all = true;
      for (const auto& st : cat.slots[k].options[o].settings) all = all && same_value(st.key, scenario.get(st.key), st.value);
      if (all) g.current[k] = static_cast<int>(o);
    }
  if (std::all_of(g.current.begin(), g.current.end(), [](const auto& c) { return c.has_value(); }))
    for (std::size_t i = 0; i < g.rows.size(); ++i) {
      bool same = true;
      for (std::size_t k = 0; k < cat.slots.size(); ++k) same = same && g.rows[i].choice[k] == *g.current[k];
      if (same) g.current_row = i;
    }
}

// The task scheduler of evaluate_grades: runs task(j) for every task
// reachable from `ready` on up to `threads` threads (run_workers). A task
// returns the tasks it makes ready (its children in the re-pick tree);
// release(j, c) runs for each under the lock before c is queued, so a child
// starts from what its parent found. `progress` gets the share of the
// `count` tasks done, after finished(j) has run under the lock for a task
// that did not throw. Returns each task's exception (none: empty pointers).
template <class Task, class Release, class Done>
std::vector<std::exception_ptr> run_task_tree(std::deque<std::size_t> ready, std::size_t count, int threads, Task&& task,
                                              Release&& release, Done&& finished, const std::function<void(double)>& progress) {
  std::vector<std::exception_ptr> errors(count);
  std::mutex m;
  std::condition_variable cv;
  std::size_t running = 0, done = 0;
  auto work = [&] {
    std::unique_lock<std::mutex> lock(m);
    for (;;) {
      cv.wait(lock, [&] { return !ready.empty() || running == 0; });
      if (ready.empty()) return;  // nothing queued and nothing running: finished
      const std::size_t j = ready.front();
      ready.pop_front();
      ++running;
      lock.unlock();
      std::vector<std::size_t> next;
      try {
        next = task(j);
      } catch (...) {
        errors[j] = std::current_exception();
      }
      lock.lock();
      --running;
      for (std::size_t c : next) {
        release(j, c);
        ready.push_back(c);
      }
      ++done;
      if (!errors[j]) finished(j);
      if (progress) progress(static_cast<double>(done) / static_cast<double>(count));
      cv.notify_all();
    }
  };
  run_workers(threads, [&](int) { work(); });
  return errors;
}

}  // namespace

std::string_view to_string(ErrorMeasure m) {
  switch (m) {
    case ErrorMeasure::worst_case: return "worst-case";
    case ErrorMeasure::linear: return "linear";
    case ErrorMeasure::monte_carlo: return "monte-carlo";
  }
  return "worst-case";
}

ErrorMeasure parse_error_measure(std::string_view text, const Where& where) {
  if (text == "worst-case") return ErrorMeasure::worst_case;
  if (text == "linear") return ErrorMeasure::linear;
  if (text == "monte-carlo") return ErrorMeasure::monte_carlo;
  reject(where, text, "must be one of: worst-case | linear | monte-carlo");
}

std::string money(double v) {
  std::string s = num("%.4f", v);
  while (s.size() > 3 && s.back() == '0' && s[s.size() - 3] != '.') s.pop_back();
  if (s == "-0.00") s = "0.00";
  return s;
}

std::optional<double> cost_per_good_unit(double unit_cost, double yield, double reject_cost) {
  if (!(yield > 0.0)) return std::nullopt;
  return unit_cost / yield + reject_cost * (1.0 - yield) / yield;
}

std::vector<bool> pareto_front(const std::vector<double>& cost, const std::vector<std::optional<double>>& error) {
  const std::size_t n = cost.size();
  std::vector<bool> on(n, false);
  std::vector<std::size_t> order;
  for (std::size_t i = 0; i < n; ++i)
    if (error[i]) order.push_back(i);
  std::sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
    return cost[a] != cost[b] ? cost[a] < cost[b] : *error[a] < *error[b];
  });
  // Groups of equal cost, cheapest first: a point is on the front when no
  // cheaper point is as accurate and none of its own cost is more accurate.
  double best_cheaper = std::numeric_limits<double>::infinity();
  for (std::size_t g = 0; g < order.size();) {
    std::size_t end = g + 1;
    const double c = cost[order[g]];
    while (end < order.size() && cost[order[end]] - c <= equal_cost * std::max(1.0, std::fabs(c))) ++end;
    double gm = *error[order[g]];
    for (std::size_t k = g; k < end; ++k) gm = std::min(gm, *error[order[k]]);
    for (std::size_t k = g; k < end; ++k) {
      const double e = *error[order[k]];
      on[order[k]] = e < best_cheaper && e == gm;
    }
    best_cheaper = std::min(best_cheaper, gm);
    g = end;
  }
  return on;
}

std::string GradesResult::choice_text(const GradeRow& r) const {
  std::string out;
  for (std::size_t k = 0; k < slots.size(); ++k)
    out += (k ? ", " : "") + slots[k] + " = " + grades[k][static_cast<std::size_t>(r.choice[k])];
  return out;
}

std::optional<double> GradesResult::ranking_cost(const GradeRow& r) const {
  if (!reject_cost) return r.unit_cost;
  return r.cost_per_good_unit;
}

void validate_grades(const Scenario& scenario, const Catalogue& cat, const GradesOptions& options) {
  if (options.volume && !(*options.volume >= 1.0 && std::isfinite(*options.volume)))
    reject(command_line("--volume"), num("%g", *options.volume), "must be a number of units >= 1");
  if (options.reject_cost && !(*options.reject_cost >= 0.0 && std::isfinite(*options.reject_cost)))
    reject(command_line("--reject-cost"), num("%g", *options.reject_cost), "must be a cost >= 0 per failed unit");
  if (options.units < 1) reject(command_line("--units"), "0", "must be a whole number of units >= 1");
  if (cat.has_setup_costs() && !options.volume) {
    for (const auto& s : cat.slots)
      for (const auto& o : s.options)
        if (o.setup_cost > 0.0)
          reject(command_line("--volume"), "",
                 "the catalogue has setup costs (" +
                     Where{Origin::catalogue, cat.file, o.line, "", cat.columns.setup_cost}.origin() +
                     "); give the production volume they are spread over, e.g. --volume 10000");
  }
  if (options.re_pick)
    for (const auto& s : cat.slots)
      for (const auto& o : s.options)
        for (const auto& st : o.settings)
          if (st.key == "divider.r_fixed")
            reject(Where{Origin::catalogue, cat.file, st.where.line, cat.column_name(cat.columns.settings), cat.columns.settings},
                   st.key + "=" + st.value,
                   "--re-pick chooses divider.r_fixed for every combination; grade the resistor's tolerance "
                   "(divider.r_fixed_tol) instead, or drop --re-pick");

  // The scenario alone, then each option alone (so that a bad value is
  // reported against the one option that wrote it), then every combination.
  (void)build_design(scenario);
  for (const auto& slot : cat.slots)
    for (const auto& o : slot.options) {
      Scenario s = scenario;
      try {
        apply(s, o);
        (void)build_design(s);
      } catch (const input_error& e) {
        const int line = o.settings.empty() ? o.line : o.settings.front().where.line;
        const Where settings{Origin::catalogue, cat.file, line, "", cat.columns.settings};
        throw input_error(std::string(e.what()) + " [set by grade '" + o.grade + "' of slot '" + slot.name + "', " +
                          settings.origin() + "]");
      }
    }
  if (cat.slots.size() > 1) {
    const std::size_t n = cat.combinations();
    for (std::size_t i = 0; i < n; ++i) {
      const auto choice = choice_of(cat, i);
      try {
        (void)build_design(combination_scenario(scenario, cat, choice));
      } catch (const input_error& e) {
        reject_at(cat.file, 0, "the combination " + choice_label(cat, choice) + " is not a valid design: " + e.what());
      }
    }
  }
}

namespace {

// Re-pick: the candidate list and the scenario's own pick as the anchor
// (checks the pick options before any work, too).
RePick re_pick_setup(const Scenario& scenario, const GradesOptions& options, const Design& base, GradesResult& g) {
  RePick rp;
  if (!options.re_pick) return rp;
  PickOptions o = options.pick;
  o.top = 1;
  o.verify = 0;
  o.guidance = false;
  o.progress = nullptr;
  rp.values = o.values.empty() ? series_values(o.series, o.range_low, o.range_high) : o.values;
  std::sort(rp.values.begin(), rp.values.end());
  rp.values.erase(std::unique(rp.values.begin(), rp.values.end()), rp.values.end());
  g.anchor_r_fixed = pick_winner(scenario, o, base.divider.r_fixed).r_fixed;
  rp.anchor = nearest_index(rp.values, *g.anchor_r_fixed);
  return rp;
}

// The figures of each distinct design (first_of: the combination index of
// each), as tasks. Without a re-pick all are ready at once. With one they
// form a tree over the grid of choices: the parent of a combination is the
// same choice with its last grade that is not the slot's first taken one
// step back, and its resistor search starts at the parent's winner
// (neighbouring grades move the best resistor little, so the search rarely
// has to move). The tree is fixed by the catalogue, so the anchors, and the
// results, do not depend on the threads.
std::vector<Figures> evaluate_designs(const Scenario& scenario, const Catalogue& cat, const GradesOptions& options,
                                      const RePick& rp, const std::vector<std::size_t>& first_of, int threads) {
  std::vector<std::size_t> stride(cat.slots.size(), 1);
  for (std::size_t k = cat.slots.size(); k-- > 1;) stride[k - 1] = stride[k] * cat.slots[k].options.size();
  auto children = [&](std::size_t i) {
    std::vector<std::size_t> out;
    if (!options.re_pick) return out;
    const auto c = choice_of(cat, i);
    std::size_t from = 0;
    for (std::size_t k = 0; k < c.size(); ++k)
      if (c[k] > 0) from = k;
    for (std::size_t k = from; k < c.size(); ++k)
      if (static_cast<std::size_t>(c[k]) + 1 < cat.slots[k].options.size()) out.push_back(i + stride[k]);
    return out;
  };
  std::vector<Figures> figures(first_of.size());
  std::vector<std::size_t> anchor(first_of.size(), rp.anchor);
  ConversionCache conversions;
  std::deque<std::size_t> ready;
  if (options.re_pick) ready.push_back(0);
  else
    for (std::size_t j = 0; j < first_of.size(); ++j) ready.push_back(j);
  // Progress: the share of designs done and the best combination so far
  // (once per design, under the scheduler's lock; never in an engine's loop).
  std::optional<GradeRow> best;
  std::function<void(double)> progress;
  if (options.progress) progress = [&](double f) { options.progress(f, best ? best_note(cat, *best) : std::string()); };
  const auto errors = run_task_tree(
      std::move(ready), first_of.size(), threads,
      [&](std::size_t j) {
        figures[j] = evaluate_design(combination_scenario(scenario, cat, choice_of(cat, first_of[j])), options, rp,
                                     anchor[j], conversions);
        return children(first_of[j]);  // with a re-pick, designs are combinations: j == first_of[j]
      },
      [&](std::size_t j, std::size_t c) { anchor[c] = nearest_index(rp.values, *figures[j].r_fixed); },
      [&](std::size_t j) {
        if (!progress) return;
        GradeRow r = make_row(cat, options, first_of[j], figures[j]);
        if (!best || better(r, *best)) best = std::move(r);
      },
      progress);
  for (const auto& e : errors)  // the first in catalogue order, whatever the threads did
    if (e) std::rethrow_exception(e);
  return figures;
}

// The rows in order, cheapest first (equal costs by error, none last, then
// catalogue order), the cost–error Pareto front and the recommendation.
void rank_rows(GradesResult& g) {
  std::stable_sort(g.rows.begin(), g.rows.end(), [](const GradeRow& a, const GradeRow& b) {
    if (a.unit_cost != b.unit_cost) return a.unit_cost < b.unit_cost;
    if (a.error.has_value() != b.error.has_value()) return a.error.has_value();
    if (a.error && *a.error != *b.error) return *a.error < *b.error;
    return a.index < b.index;
  });
  std::vector<double> cost;
  std::vector<std::optional<double>> err;
  for (const auto& r : g.rows) {
    cost.push_back(r.unit_cost);
    err.push_back(r.error);
  }
  const auto on = pareto_front(cost, err);
  for (std::size_t i = 0; i < g.rows.size(); ++i) {
    g.rows[i].on_front = on[i];
    if (on[i]) g.front.push_back(i);
  }
  g.recommendation = cheapest_meeting(g);
}

}  // namespace

GradesResult evaluate_grades(const Scenario& scenario, const Catalogue& cat, const GradesOptions& options) {
  validate_grades(scenario, cat, options);
  const Design base = build_design(scenario);
  GradesResult g;
  g.by = options.by;
  g.requirement = base.requirement;
  g.volume = options.volume;
  g.reject_cost = options.reject_cost;
  g.units = options.units;
  for (const auto& s : cat.slots) {
    g.slots.push_back(s.name);
    std::vector<std::string> names;
    for (const auto& o : s.options) names.push_back(o.grade);
    g.grades.push_back(std::move(names));
  }
  const RePick rp = re_pick_setup(scenario, options, base, g);

  // Distinct designs: combinations whose settings are the same (a slot
  // that only changes the price) are evaluated once. Not with a re-pick,
  // where each combination's search starts from its parent's winner.
  const std::size_t n = cat.combinations();
  std::vector<std::size_t> design_of;
  std::vector<std::size_t> first_of;  // combination index of each distinct design
  distinct_designs(cat, options.re_pick, design_of, first_of);
  const int threads = static_cast<int>(std::min<std::size_t>(
      static_cast<std::size_t>(resolve_threads(base.threads_or_scenario(options.threads))), first_of.size()));
  const std::vector<Figures> figures = evaluate_designs(scenario, cat, options, rp, first_of, threads);

  // Rows: cost, figures, the requirement.
  g.rows.resize(n);
  for (std::size_t i = 0; i < n; ++i) {
    GradeRow& r = g.rows[i];
    r = make_row(cat, options, i, figures[design_of[i]]);
    if (r.mc_run) ++g.mc_full;
    else if (r.mc) ++g.mc_pilot_only;
  }
  rank_rows(g);

  find_current(g, cat, scenario);
  if (g.recommendation && g.current_row) {
    const GradeRow& rec = g.rows[*g.recommendation];
    const GradeRow& cur = g.rows[*g.current_row];
    g.saving_per_good_unit = g.reject_cost && rec.cost_per_good_unit && cur.cost_per_good_unit;
    g.saving = g.saving_per_good_unit ? *cur.cost_per_good_unit - *rec.cost_per_good_unit : cur.unit_cost - rec.unit_cost;
  }
  g.summary = summary_of(g, cat, scenario);
  return g;
}

}  // namespace thermargin
