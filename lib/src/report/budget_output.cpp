// The budget's text, CSV and JSON (budget_output.hpp): error bands across the
// range, the contributors and the verdict against the requirement.
#include <nlohmann/json.hpp>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iostream>
#include <iterator>
#include <sstream>

#include "thermargin/report/budget_output.hpp"

#include "report/budget_internal.hpp"
#include "report/json_fields.hpp"

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

using budget_writer::contributor_at;
using budget_writer::point_ok;


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
  r["lsb_in_k"] = json_fields::finite(p.nominal.lsb_in_k);
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
                   {"worst_abs_error", json_fields::finite(v.worst_abs_error)},
                   {"margin", json_fields::finite(v.margin)},
                   {"worst_at", json_fields::finite(v.worst_at)},
                   {"reason", v.reason},
                   {"wc_method", b.wc_directed ? "directed corners" : "full enumeration"},
                   {"wc_method_detail", corner_method_text(b)},
                   {"active_inputs", b.active_inputs},
                   {"max_enumerated_inputs", max_enumerated_inputs},
                   {"wc_corners", b.wc_corners},
                   {"status_points", b.status_points},
                   {"k_p", b.k_p}};
  if (b.mc) {
    json_fields::add_yield(w, *b.mc);
    w["mc_units"] = b.mc->units;
    w["mc_adaptive"] = b.mc->adaptive;
    w["mc_converged"] = b.mc->converged;
  }
  w["weakest_sensitivity"] = nullptr;
  if (b.weakest.found)
    w["weakest_sensitivity"] = {{"t", b.weakest.t},
                                {"lsb_per_k", b.weakest.lsb_per_k},
                                {"mv_per_k", b.weakest.mv_per_k},
                                {"lsb_in_k", json_fields::finite(b.weakest.lsb_in_k)}};
  w["contributors"] = nlohmann::json::array();
  for (const auto& c : b.window_contributors)
    w["contributors"].push_back({{"source", c.name}, {"label", c.label}, {"share", c.share}, {"half_width", c.half_width}});
  w["leaders_by_share"] = b.leaders_by_share;
  w["leaders_by_reach"] = b.leaders_by_reach;
  w["leaders_differ"] = b.leaders_differ;
  if (!v.unreadable.empty()) {  // the window cannot be read everywhere: where, and the error where it reads
    w["unreadable"] = nlohmann::json::array();
    for (const auto& r : v.unreadable)
      w["unreadable"].push_back({{"from", r.from}, {"to", r.to}, {"status", std::string(to_string(r.status))},
                                 {"every_unit", r.nominal}});
    w["readable_max_abs"] = json_fields::finite(v.readable_max_abs);
    w["readable_at"] = json_fields::finite(v.readable_at);
  }
  j["window"] = w;
  if (const std::string note = rtd_class_range_note(d); !note.empty()) j["rtd_class_note"] = note;
  j["caution"] = std::string(caution);
  return j;
}

// The end-of-life bands at one temperature (docs/model.md §11): worst case,
// linear and Monte Carlo, each low and high; empty where an engine has none.
constexpr const char* eol_columns[] = {"eol_wc_low_K",  "eol_wc_high_K", "eol_rss_low_K",
                                       "eol_rss_high_K", "eol_mc_low_K",  "eol_mc_high_K"};
std::string eol_cells(const BudgetPoint& p) {
  const auto cell = [](bool has, double v) { return has ? fixed(v, 5) : std::string(); };
  const bool ok = point_ok(p), lin = ok && p.linear.status == Status::ok, mc = ok && p.mc && p.mc->valid > 0;
  return cell(ok && p.wc.any_ok, p.wc.low) + "," + cell(ok && p.wc.any_ok, p.wc.high) + "," + cell(lin, p.linear.low) +
         "," + cell(lin, p.linear.high) + "," + cell(mc, mc ? p.mc->low : 0.0) + "," + cell(mc, mc ? p.mc->high : 0.0);
}

// d: the design, for the RTD class's rated range (a column only when some
// temperature of the design lies beyond it); null leaves that column out.
std::string to_csv(const Budget& b, const Design* d) {
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
  // Beyond the RTD class's rated range (docs/model.md §1), and the window at
  // end of life beside the delivery one (§11): columns only for such designs.
  const bool rtd_mark = d && !rtd_class_range_note(*d).empty();
  if (rtd_mark) head.push_back("rtd_class_extrapolated");
  const Budget* eol = b.end_of_life ? &b.end_of_life->budget : nullptr;
  if (eol) head.insert(head.end(), std::begin(eol_columns), std::end(eol_columns));
  for (std::size_t i = 0; i < head.size(); ++i) out << (i ? "," : "") << head[i];
  out << "\n";
  for (std::size_t i = 0; i < b.points.size(); ++i) {
    const BudgetPoint& p = b.points[i];
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
    if (rtd_mark) out << "," << (rtd_class_rated_at(*d, p.t) ? 0 : 1);
    if (eol) out << "," << (i < eol->points.size() ? eol_cells(eol->points[i]) : std::string(5, ','));
    out << "\n";
  }
  return out.str();
}

// The sampled node's settling error (docs/model.md §14), only when the ADC
// has a sampling capacitor: points[].acquisition_error and "settling" in
// JSON, a last CSV column, a paragraph in the text after the verdict.
enum class Out { csv, json };
void add_settling(const Chain& chain, const Budget& b, Out f, std::string& text, nlohmann::json* j) {
  const Design& d = chain.design();
  if (!d.adc.samples_settle()) return;
  const SettlingSummary s = settling_summary(chain, b);
  if (j) {
    for (std::size_t i = 0; i < b.points.size(); ++i)
      if (point_ok(b.points[i])) (*j)["points"][i]["acquisition_error"] = b.points[i].nominal.acquisition_error;
    (*j)["settling"] = {{"max_abs", s.max_abs}, {"at", s.at}, {"leading", s.shown},
                        {"t_acq_needed", json_fields::finite(s.need.t_acq)}, {"settle_time_needed", json_fields::finite(s.need.settle)}};
  } else if (f == Out::csv) {
    std::istringstream in(text);
    std::string out, line;
    for (std::size_t i = 0; std::getline(in, line); ++i) {
      const BudgetPoint* p = i > 0 && i <= b.points.size() ? &b.points[i - 1] : nullptr;
      out += line + "," + (i == 0 ? "acquisition_error_K" : p && point_ok(*p) ? fixed(p->nominal.acquisition_error, 5) : "") + "\n";
    }
    text = out;
  }
}

}  // namespace

std::string budget_csv(const Budget& budget, const BudgetExtras& extras) {
  std::string text = to_csv(budget, extras.chain ? &extras.chain->design() : nullptr);
  if (extras.chain) add_settling(*extras.chain, budget, Out::csv, text, nullptr);
  return csv_caution_line() + text;
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
