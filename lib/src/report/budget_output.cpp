// The budget's text, CSV and JSON (budget_output.hpp): error bands across the
// range, the contributors and the verdict against the requirement.
#include <nlohmann/json.hpp>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iostream>
#include <sstream>

#include "thermargin/report/budget_output.hpp"

#include "thermargin/core/number.hpp"
#include "thermargin/report/html_report.hpp"  // csv_cell
#include "thermargin/report/table.hpp"
#include "thermargin/engines/budget.hpp"
#include "thermargin/report/budget_report.hpp"
#include "thermargin/chain/rtd_class_range.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/input/life.hpp"
#include "thermargin/report/life_report.hpp"
#include "thermargin/report/response_report.hpp"
#include "thermargin/tools/response.hpp"
#include "thermargin/report/settling_summary.hpp"
#include "thermargin/engines/what_if.hpp"

namespace thermargin {

namespace {

nlohmann::json num(double v) { return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr); }

std::string pct(double v, int decimals = 2) { return fixed(100.0 * v, decimals) + " %"; }

bool point_ok(const BudgetPoint& p) { return p.nominal.status == Status::ok; }

nlohmann::json what_if_json(const Design& d, const WhatIf& w) {
  auto figures = [](const WhatIfFigures& f) {
    return nlohmann::json{{"wc_max_abs", f.wc_max_abs}, {"rss_max_abs", f.rss_max_abs}, {"readable", f.readable}};
  };
  nlohmann::json j{{"corners", w.directed ? "directed" : "every corner"}, {"as_designed", figures(w.as_designed)}};
  j["rows"] = nlohmann::json::array();
  for (const auto& r : w.rows) {
    const std::string_view e = enough(r, d.requirement);
    j["rows"].push_back({{"source", r.name},
                         {"label", r.label},
                         {"key", r.key},
                         {"halved", figures(r.halved)},
                         {"removed", figures(r.removed)},
                         {"within_limit", e.empty() ? nlohmann::json(nullptr) : nlohmann::json(std::string(e))}});
  }
  return j;
}

// One temperature of the budget: the nominal chain, each engine's band and
// the contributor table there.
nlohmann::json point_json(const BudgetPoint& p, const Design& d) {
  nlohmann::json r{{"t", p.t}, {"in_window", p.in_window}};
  if (!point_ok(p)) {
    r["status"] = std::string(to_string(p.nominal.status));
    if (p.nominal.status == Status::saturated) r["saturated"] = true;
    return r;
  }
  r["v_node"] = p.nominal.v_node;
  r["code"] = p.nominal.code;
  r["sensitivity"] = p.nominal.sensitivity;
  r["mv_per_k"] = p.nominal.mv_per_k;
  r["lsb_in_k"] = num(p.nominal.lsb_in_k);
  r["self_heating"] = p.nominal.self_heating;
  r["nominal"] = p.nominal.error;
  if (p.wc.any_ok) {
    r["wc_low"] = p.wc.low;
    r["wc_high"] = p.wc.high;
  }
  if (p.wc.failed_corners > 0) {
    r["wc_failed_corners"] = p.wc.failed_corners;
    r["wc_failure"] = std::string(to_string(p.wc.failure));
  }
  if (p.linear.status == Status::ok) {
    r["rss_low"] = p.linear.low;
    r["rss_high"] = p.linear.high;
    r["u_c"] = p.linear.u_c;
    nlohmann::json contributions = nlohmann::json::object();
    for (const auto& t : p.linear.terms) contributions[t.name] = t.contribution;
    r["contributions"] = contributions;
    // Each row's part of u_c² in K²: (c·u)² plus its second-order terms;
    // the pair rows' whole term (docs/engines.md).
    nlohmann::json variances = nlohmann::json::object();
    for (const auto& t : p.linear.terms) variances[t.name] = t.variance();
    for (const auto& t : p.linear.pairs) variances[t.name] = t.variance();
    r["variances"] = variances;
    // The contributor table at this temperature: share of u_c² and the
    // source's own worst-case half-width, largest share first.
    nlohmann::json table = nlohmann::json::array();
    for (const auto& c : p.contributors)
      table.push_back({{"source", c.name}, {"share", c.share}, {"half_width", c.half_width}});
    r["contributors"] = table;
  }
  if (p.mc) {
    if (p.mc->valid > 0) {
      r["mc_low"] = p.mc->low;
      r["mc_high"] = p.mc->high;
      r["mc_median"] = p.mc->median;
      r["mc_mean"] = p.mc->mean;
      r["mc_stddev"] = p.mc->stddev;
    }
    r["mc_saturated_share"] = p.mc->saturated_share();
    if (p.mc->failed > 0) r["mc_failed"] = p.mc->failed;
    if (p.linear.status == Status::ok && p.mc->valid > 0)
      r["linear_validated"] = linear_validated(p.linear.low, p.linear.high, p.mc->low, p.mc->high,
                                               numerical_tolerance(p.linear.u_c));
    if (const std::string why = validation_failure_reason(p, d); !why.empty()) r["linear_validation_reason"] = why;
  }
  if (!rtd_class_rated_at(d, p.t)) r["rtd_class_extrapolated"] = true;
  return r;
}

nlohmann::json to_json(const Design& d, const Budget& b) {
  nlohmann::json j;
  j["command"] = "budget";
  j["title"] = d.title;
  j["units"] = {{"temperature", "degC"}, {"error", "K"}, {"sensitivity", "LSB/K"}, {"self_heating", "K"},
                {"voltage", "V"}};
  j["points"] = nlohmann::json::array();
  for (const auto& p : b.points) j["points"].push_back(point_json(p, d));
  const auto& v = b.verdict;
  nlohmann::json w{{"min", d.requirement.window_min},
                   {"max", d.requirement.window_max},
                   {"limit", d.requirement.max_error},
                   {"wc_max_abs", b.wc_max_abs},
                   {"wc_max_at", b.wc_max_at},
                   {"rss_max_abs", b.rss_max_abs},
                   {"rss_max_at", b.rss_max_at},
                   {"dominant", b.window_contributors.empty() ? "" : b.window_contributors.front().name},
                   {"verdict", v.pass ? "pass" : "fail"},
                   {"basis", std::string(to_string(v.basis))},
                   {"worst_abs_error", num(v.worst_abs_error)},
                   {"margin", num(v.margin)},
                   {"worst_at", num(v.worst_at)},
                   {"reason", v.reason},
                   {"wc_method", b.wc_directed ? "directed corners" : "full enumeration"},
                   {"wc_method_detail", corner_method_text(b)},
                   {"active_inputs", b.active_inputs},
                   {"max_enumerated_inputs", max_enumerated_inputs},
                   {"wc_corners", b.wc_corners},
                   {"status_points", b.status_points},
                   {"k_p", b.k_p}};
  if (b.mc) {
    w["mc_max_abs"] = b.mc->max_abs;
    w["yield"] = b.mc->yield;
    w["yield_low"] = b.mc->yield_low;
    w["yield_high"] = b.mc->yield_high;
    w["failures_per_million"] = b.mc->failures_per_million;
    w["mc_units"] = b.mc->units;
    w["mc_adaptive"] = b.mc->adaptive;
    w["mc_converged"] = b.mc->converged;
  }
  w["weakest_sensitivity"] = nullptr;
  if (b.weakest.found)
    w["weakest_sensitivity"] = {{"t", b.weakest.t},
                                {"lsb_per_k", b.weakest.lsb_per_k},
                                {"mv_per_k", b.weakest.mv_per_k},
                                {"lsb_in_k", num(b.weakest.lsb_in_k)}};
  w["contributors"] = nlohmann::json::array();
  for (const auto& c : b.window_contributors)
    w["contributors"].push_back({{"source", c.name}, {"label", c.label}, {"share", c.share}, {"half_width", c.half_width}});
  w["leaders_by_share"] = b.leaders_by_share;
  w["leaders_by_reach"] = b.leaders_by_reach;
  w["leaders_differ"] = b.leaders_differ;
  j["window"] = w;
  if (const std::string note = rtd_class_range_note(d); !note.empty()) j["rtd_class_note"] = note;
  j["caution"] = std::string(caution);
  return j;
}

// The share and own half-width of a source at one point; nullptr when the
// point has no linear budget.
const Contributor* contributor_at(const BudgetPoint& p, const std::string& name) {
  for (const auto& c : p.contributors)
    if (c.name == name) return &c;
  return nullptr;
}

std::string to_csv(const Budget& b) {
  std::ostringstream out;
  std::vector<std::string> head{"t_degC", "in_window", "status", "v_node_V", "code_LSB", "sensitivity_LSB_per_K",
                                "sensitivity_mV_per_K", "lsb_K", "self_heating_K", "nominal_K", "wc_low_K", "wc_high_K",
                                "rss_low_K", "rss_high_K", "mc_low_K", "mc_high_K", "mc_median_K", "mc_saturated_share",
                                "dominant"};
  // The contributor table per temperature: each source's share of u_c² and
  // its own worst-case half-width, in the order of the window's ranking.
  for (const auto& c : b.window_contributors) {
    head.push_back("share_" + c.name);
    head.push_back("half_width_" + c.name + "_K");
  }
  for (std::size_t i = 0; i < head.size(); ++i) out << (i ? "," : "") << head[i];
  out << "\n";
  for (const auto& p : b.points) {
    out << fixed(p.t, 3) << "," << (p.in_window ? 1 : 0) << ",";
    if (!point_ok(p)) {
      out << to_string(p.nominal.status) << std::string(head.size() - 3, ',') << "\n";
      continue;
    }
    out << (p.wc.failed_corners ? std::string(to_string(p.wc.failure)) : std::string("ok")) << ","
        << fixed(p.nominal.v_node, 6) << "," << fixed(p.nominal.code, 3) << "," << fixed(p.nominal.sensitivity, 4) << "," << fixed(p.nominal.mv_per_k, 4) << ","
        << fixed(p.nominal.lsb_in_k, 5) << "," << fixed(p.nominal.self_heating, 6) << "," << fixed(p.nominal.error, 5) << ",";
    out << (p.wc.any_ok ? fixed(p.wc.low, 5) : "") << "," << (p.wc.any_ok ? fixed(p.wc.high, 5) : "") << ",";
    const bool lin = p.linear.status == Status::ok;
    out << (lin ? fixed(p.linear.low, 5) : "") << "," << (lin ? fixed(p.linear.high, 5) : "") << ",";
    const bool mc = p.mc && p.mc->valid > 0;
    out << (mc ? fixed(p.mc->low, 5) : "") << "," << (mc ? fixed(p.mc->high, 5) : "") << ","
        << (mc ? fixed(p.mc->median, 5) : "") << "," << (p.mc ? fixed(p.mc->saturated_share(), 6) : "") << ",";
    out << csv_cell(p.contributors.empty() ? "" : p.contributors.front().name);
    for (const auto& w : b.window_contributors) {
      const Contributor* c = contributor_at(p, w.name);
      out << "," << (c ? fixed(c->share, 6) : "") << "," << (c ? fixed(c->half_width, 6) : "");
    }
    out << "\n";
  }
  return out.str();
}

// The leaders by own worst-case reach, under the dominant contributors, and
// whether they are led by another source than the shares.
std::string leaders_by_reach_text(const Budget& b) {
  std::string s = "Largest own worst-case reach over the window:";
  for (std::size_t i = 0; i < b.leaders_by_reach.size(); ++i)
    for (const auto& c : b.window_contributors)
      if (c.name == b.leaders_by_reach[i]) s += std::string(i ? "," : "") + " " + c.label + " " + fixed(c.half_width, 3) + " K";
  if (!b.leaders_differ) return s + "\n";
  return s + "\n  (not the leader by share: a source can reach far at the ends of its range with a small variance)\n";
}

// A source in the text's contributor tables: every active input, and a
// reading-level source (quantisation, noise, rounding) that contributes.
bool shown_contributor(const Design& d, const Contributor& k) {
  if (k.share > 0.0 || k.half_width > 0.0) return true;
  return std::any_of(d.inputs.begin(), d.inputs.end(),
                     [&](const ToleranceInput& in) { return info(in.source).name == k.name; });
}

// What would help: one source improved at a time (what_if.hpp).
std::string what_if_text(const Design& d, const WhatIf& w) {
  std::ostringstream out;
  if (w.rows.empty()) return {};
  out << "\nWhat would help over the window (one source improved at a time, the rest as designed; as designed: "
      << "worst case " << fixed(w.as_designed.wc_max_abs, 3) << " K, linear " << fixed(w.as_designed.rss_max_abs, 3)
      << " K; limit +/-" << fixed(d.requirement.max_error, 3) << " K"
      << (w.directed ? "; directed corners" : "") << "):\n";
  // Which single change meets the limit, said where the design misses it.
  const bool judged = judged_against_limit(w, d.requirement);
  std::vector<std::string> head{"source (setting)", "halved: wc (K)", "lin (K)", "removed: wc (K)", "lin (K)"};
  if (judged) head.push_back("within the limit");
  Table t{.header = head};
  bool unreadable = false;
  auto cell = [&](const WhatIfFigures& f, double v) {
    unreadable |= !f.readable;
    return fixed(v, 3) + (f.readable ? "" : "!");
  };
  for (const auto& r : w.rows) {
    std::vector<std::string> row{r.label + " (" + r.key + ")", cell(r.halved, r.halved.wc_max_abs),
                                 cell(r.halved, r.halved.rss_max_abs), cell(r.removed, r.removed.wc_max_abs),
                                 cell(r.removed, r.removed.rss_max_abs)};
    if (judged) {
      row.push_back(std::string(enough_phrase(r, d.requirement)));
    }
    t.rows.push_back(row);
  }
  out << render_text(t);
  if (judged && std::none_of(w.rows.begin(), w.rows.end(),
                             [&](const WhatIfRow& r) { return !enough(r, d.requirement).empty(); }))
    out << "No single part meets the limit: improve several together (try them with overrides), or change the "
           "design (thermargin pick, thermargin grades).\n";
  out << "halved: the source's tolerance (or noise, output resolution) halved, roughly the next better grade; "
         "removed: an ideal part.\nOne source at a time: two changes together are not the sum of two rows; try them "
         "with --<setting>=<value>.\n";
  if (unreadable) out << "! some unit cannot be read at some window temperature with that change.\n";
  return out.str();
}

// The table per temperature: the nominal chain and every engine's band.
std::string points_text(const Budget& b) {
  std::ostringstream out;
  out << "\nPer temperature (errors in K; LSB/K and mV/K are the ADC sensitivity, 1 LSB its size in K;"
         " dominant: the largest share of the combined variance there):\n";
  std::vector<std::string> head{"t (degC)", "node (V)", "code", "LSB/K", "mV/K", "1 LSB (K)", "self-heat", "nominal", "wc low",
                                "wc high", "lin low", "lin high"};
  if (b.mc) {
    head.insert(head.end(), {"mc low", "mc high", "mc median"});
  }
  head.push_back("dominant");
  Table t{.header = head};
  for (const auto& p : b.points) {
    std::vector<std::string> row{fixed(p.t, 2) + (p.in_window ? "" : "*")};
    if (!point_ok(p)) {
      row.push_back(std::string(describe(p.nominal.status)));
      t.rows.push_back(row);
      continue;
    }
    row.insert(row.end(), {fixed(p.nominal.v_node, 4), fixed(p.nominal.code, 1), fixed(p.nominal.sensitivity, 2), fixed(p.nominal.mv_per_k, 3),
                           fixed(p.nominal.lsb_in_k, 4), fixed(p.nominal.self_heating, 4), fixed(p.nominal.error, 4)});
    if (p.wc.any_ok && p.wc.failed_corners == 0) row.insert(row.end(), {fixed(p.wc.low, 4), fixed(p.wc.high, 4)});
    else row.insert(row.end(), {std::string(to_string(p.wc.failure)), ""});
    if (p.linear.status == Status::ok) row.insert(row.end(), {fixed(p.linear.low, 4), fixed(p.linear.high, 4)});
    else row.insert(row.end(), {std::string(to_string(p.linear.status)), ""});
    if (b.mc) {
      if (p.mc && p.mc->valid > 0) row.insert(row.end(), {fixed(p.mc->low, 4), fixed(p.mc->high, 4), fixed(p.mc->median, 4)});
      else row.insert(row.end(), {"n/a", "", ""});
    }
    row.push_back(p.contributors.empty() ? "" : p.contributors.front().name + " " + pct(p.contributors.front().share, 0));
    t.rows.push_back(row);
  }
  out << render_text(t);
  out << "(* outside the requirement window)\n";
  return out.str();
}

// The contributor table at every temperature (shares in %).
std::string point_contributors_text(const Design& d, const Budget& b) {
  std::ostringstream out;
  // The contributor table at every temperature, one column per source that
  // counts somewhere in the window, in the window's order.
  std::vector<const Contributor*> shown;
  for (const auto& k : b.window_contributors)
    if (shown_contributor(d, k)) shown.push_back(&k);
  out << "\nContributors per temperature (share of the combined variance in %; each source's own worst-case "
         "half-width per temperature is in --format csv and json):\n";
  std::vector<std::string> chead{"t (degC)"};
  for (const auto* k : shown) chead.push_back(k->name);
  Table ct{.header = chead};
  for (const auto& p : b.points) {
    std::vector<std::string> row{fixed(p.t, 2) + (p.in_window ? "" : "*")};
    for (const auto* k : shown) {
      const Contributor* here = contributor_at(p, k->name);
      row.push_back(here ? fixed(100.0 * here->share, 1) : "n/a");
    }
    ct.rows.push_back(row);
  }
  out << render_text(ct);
  return out.str();
}

// `response`: the [response] section when the scenario states one (docs/response.md).
std::string to_text(const Design& d, const Budget& b, const WhatIf& w, const ResponseSettings& response) {
  std::ostringstream out;
  const auto& v = b.verdict;
  out << "thermargin budget - " << d.title << "\n\n";
  out << "VERDICT: " << (v.pass ? "PASS" : "FAIL") << "  " << v.reason;
  if (v.basis != Requirement::Basis::monte_carlo || b.mc) out << " (margin " << fixed(v.margin, 3) << " K)";
  if (response.present) out << (response.include_dynamic ? " [static + dynamic]" : " [static only]");
  out << "\n";
  if (response.present) out << dynamic_error_line(response) << "\n";
  out << "Window " << fixed(d.requirement.window_min, 2) << " .. " << fixed(d.requirement.window_max, 2)
      << " degC, limit +/-" << fixed(d.requirement.max_error, 3) << " K, verdict basis " << to_string(v.basis)
      << " (requirement.basis)";
  if (v.basis != Requirement::Basis::monte_carlo && std::isfinite(v.worst_at))
    out << ", smallest margin at " << fixed(v.worst_at, 2) << " degC";
  out << "\n";
  // What a reviewer asks next: which parts to blame, and where the ADC sees least.
  std::string dominant;
  for (std::size_t i = 0; i < b.window_contributors.size() && i < 3; ++i) {
    const auto& c = b.window_contributors[i];
    if (!(c.share > 0.0)) break;
    dominant += (i ? ", " : "") + c.label + " " + pct(c.share, 1);
  }
  if (!dominant.empty()) out << "Dominant contributors over the window (share of the combined variance): " << dominant << "\n";
  out << (b.end_of_life ? "\n" + end_of_life_text(d, b) : "");
  if (!b.leaders_by_reach.empty()) out << leaders_by_reach_text(b);
  if (const std::string note = rtd_class_range_note(d); !note.empty()) out << "RTD class: " << note << ".\n";
  if (b.weakest.found)
    out << "Weakest ADC sensitivity in the window: " << fixed(b.weakest.lsb_per_k, 2) << " LSB/K ("
        << fixed(b.weakest.mv_per_k, 3) << " mV/K) at " << fixed(b.weakest.t, 2) << " degC, where 1 LSB = "
        << fixed(b.weakest.lsb_in_k, 4) << " K\n";
  out << "\n";
  Table s{.header = {"engine", "max |error| in window", "at", "notes"}};
  s.rows.push_back({"worst case", fixed(b.wc_max_abs, 3) + " K", fixed(b.wc_max_at, 2) + " degC", corner_method_text(b)});
  s.rows.push_back({"linear budget", fixed(b.rss_max_abs, 3) + " K", fixed(b.rss_max_at, 2) + " degC",
         "k = " + fixed(b.k_p, 3) + " for " + pct(d.montecarlo.coverage) + " coverage"});
  if (b.mc) {
    s.rows.push_back({"Monte Carlo", fixed(b.mc->max_abs, 3) + " K", fixed(b.mc->max_abs_at, 2) + " degC",
           std::to_string(b.mc->units) + " units" + (b.mc->adaptive ? (b.mc->converged ? " (adaptive, stable)" : " (adaptive, cap reached)") : "")});
  }
  out << render_text(s);
  if (b.mc) {
    out << "\nYield: " << pct(b.mc->yield, 3) << " of units within +/-" << fixed(d.requirement.max_error, 3)
        << " K over the window (95 % interval " << pct(b.mc->yield_low, 3) << " .. " << pct(b.mc->yield_high, 3)
        << "), " << fixed(b.mc->failures_per_million, 0) << " failures per million; required " << pct(d.requirement.yield, 3)
        << ".\n";
    int validated = 0, compared = 0;
    for (const auto& p : b.points)
      if (p.in_window && p.mc && p.mc->valid > 0 && p.linear.status == Status::ok) {
        ++compared;
        validated += linear_validated(p.linear.low, p.linear.high, p.mc->low, p.mc->high, numerical_tolerance(p.linear.u_c));
      }
    out << "Linear budget against Monte Carlo (JCGM 101 section 8): validated at " << validated << " of " << compared
        << " window temperatures" << (validated == compared ? "; the simple budget can be trusted here.\n"
                                                            : "; read the Monte Carlo bands where they differ.\n");
    for (const auto& p : b.points)
      if (const std::string why = p.in_window ? validation_failure_reason(p, d) : ""; !why.empty()) {
        out << "First failure at " << fixed(p.t, 2) << " degC, because of " << why << ".\n";
        break;
      }
  }
  if (b.status_points > 0)
    out << "\nNote: " << b.status_points
        << " temperature(s) have readings that cannot be converted (saturation, runaway, outside the table); see the table.\n";

  out << "\nContributors over the window (share of the combined variance; own worst-case half-width):\n";
  Table c{.header = {"source", "share", "half-width (K)"}};
  for (const auto& k : b.window_contributors)
    if (shown_contributor(d, k)) c.rows.push_back({k.label + " (" + k.name + ")", pct(k.share, 1), fixed(k.half_width, 4)});
  out << render_text(c);
  if (std::any_of(b.window_contributors.begin(), b.window_contributors.end(),
                  [&](const Contributor& k) { return shown_contributor(d, k) && k.share == 0.0; }))
    out << "A share of 0 %: a source that acts only together with another (a tempco with the board temperature\n"
           "range) has no first-order sensitivity; its part is in the pair's row (a x b) where that is not\n"
           "negligible, and its half-width, the worst case and Monte Carlo include it.\n";
  out << what_if_text(d, w);

  out << points_text(b);
  out << point_contributors_text(d, b);
  out << "(* outside the requirement window; n/a: no linear budget at that temperature)\n\n" << caution << "\n";
  return out.str();
}

// The sampled node's settling error (docs/model.md §14), only when the ADC
// has a sampling capacitor: points[].acquisition_error and "settling" in
// JSON, a last CSV column, a paragraph in the text after the verdict.
enum class Out { text, csv, json };
void add_settling(const Chain& chain, const Budget& b, Out f, std::string& text, nlohmann::json* j) {
  const Design& d = chain.design();
  if (!d.adc.samples_settle()) return;
  const SettlingSummary s = settling_summary(chain, b);
  if (j) {
    for (std::size_t i = 0; i < b.points.size(); ++i)
      if (point_ok(b.points[i])) (*j)["points"][i]["acquisition_error"] = b.points[i].nominal.acquisition_error;
    (*j)["settling"] = {{"max_abs", s.max_abs}, {"at", s.at}, {"leading", s.shown},
                        {"t_acq_needed", num(s.need.t_acq)}, {"settle_time_needed", num(s.need.settle)}};
  } else if (f == Out::csv) {
    std::istringstream in(text);
    std::string out, line;
    for (std::size_t i = 0; std::getline(in, line); ++i) {
      const BudgetPoint* p = i > 0 && i <= b.points.size() ? &b.points[i - 1] : nullptr;
      out += line + "," + (i == 0 ? "acquisition_error_K" : p && point_ok(*p) ? fixed(p->nominal.acquisition_error, 5) : "") + "\n";
    }
    text = out;
  } else {
    std::string para = settling_text(d, s);
    if (para.empty())
      para = "Acquisition: settling error up to " + fixed(s.max_abs, 4) + " K in the window" +
             (s.max_abs > 0.0 ? " (at " + fixed(s.at, 2) + " degC).\n" : ".\n");
    const auto cut = text.find("\n\n", text.find("\n\n") + 2);  // after the verdict's lines
    text.insert(cut == std::string::npos ? text.size() : cut + 1, para);
  }
}

}  // namespace

std::string budget_text(const Design& design, const Budget& budget, const WhatIf& what_if, const BudgetExtras& extras) {
  std::string text = to_text(design, budget, what_if, extras.response);
  if (extras.chain) add_settling(*extras.chain, budget, Out::text, text, nullptr);
  return text;
}

std::string budget_csv(const Budget& budget, const BudgetExtras& extras) {
  std::string text = to_csv(budget);
  if (extras.chain) add_settling(*extras.chain, budget, Out::csv, text, nullptr);
  return text;
}

std::string budget_json(const Design& design, const Budget& budget, const WhatIf& what_if, const BudgetExtras& extras) {
  nlohmann::json j = to_json(design, budget);
  j["what_if"] = what_if_json(design, what_if);
  const ResponseSettings& response = extras.response;
  if (response.present)
    j["window"]["dynamic"] = {{"ramp", response.ramp_per_minute()},
                              {"error", dynamic_error(response)},
                              {"included", response.include_dynamic},
                              {"line", dynamic_error_line(response)}};
  if (budget.end_of_life) {  // over the product's life: the end-of-life window beside the delivery one
    j["window"]["verdict_at"] = std::string(to_string(budget.verdict.at));
    j["window"]["end_of_life"] = to_json(budget.end_of_life->design, budget.end_of_life->budget)["window"];
  }
  std::string text;
  if (extras.chain) add_settling(*extras.chain, budget, Out::json, text, &j);
  return j.dump(2) + "\n";
}

}  // namespace thermargin
