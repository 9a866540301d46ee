// The budget's text (budget_output.hpp): one screen a reviewer reads first
// (the verdict, the engines, the yield, the leading sources, the headroom,
// what would help), and behind --detail every table per temperature.
#include <algorithm>
#include <cmath>
#include <sstream>

#include "report/budget_internal.hpp"
#include "thermargin/chain/rtd_class_range.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/core/number.hpp"
#include "thermargin/engines/headroom.hpp"
#include "thermargin/engines/unreadable.hpp"
#include "thermargin/engines/what_if.hpp"
#include "thermargin/report/budget_output.hpp"
#include "thermargin/report/life_report.hpp"
#include "thermargin/report/response_report.hpp"
#include "thermargin/report/settling_summary.hpp"
#include "thermargin/report/table.hpp"
#include "thermargin/tools/response.hpp"

namespace thermargin {

namespace budget_writer {

std::string failure_rate_text(const McSummary& mc) {
  if (mc.good_units < mc.units) return fixed(mc.failures_per_million, 0) + " failures per million";
  const double bound = 1e6 * (1.0 - mc.yield_low);
  return "no failure in " + std::to_string(mc.units) + " units: below " + (bound >= 10.0 ? fixed(bound, 0) : significant(bound, 2)) +
         " per million (95 % upper bound)";
}

std::string run_range(const UnreadableRun& r) {
  return (r.from == r.to ? fixed(r.from, 2) : fixed(r.from, 2) + " .. " + fixed(r.to, 2)) + " degC: " +
         std::string(describe(r.status)) + (r.nominal ? "" : ", some units");
}

int validated_points(const Budget& b, int& compared) {
  int validated = 0;
  compared = 0;
  for (const auto& p : b.points)
    if (p.in_window && p.mc && p.mc->valid > 0 && p.linear.status == Status::ok) {
      ++compared;
      validated += linear_validated(p.linear.low, p.linear.high, p.mc->low, p.mc->high, numerical_tolerance(p.linear.u_c));
    }
  return validated;
}

}  // namespace budget_writer

namespace {

using budget_writer::contributor_at;
using budget_writer::point_ok;

constexpr std::size_t kWidth = 100;  // the text's columns
const TextLayout kLayout{kWidth, 1};


// A current or a power with an SI prefix and three significant digits: "251 uA", "0.62 mW".
std::string si(double v, const char* unit) {
  const char* prefix = "";
  double scaled = v;
  for (const auto& [p, f] : {std::pair{"", 1.0}, std::pair{"m", 1e-3}, std::pair{"u", 1e-6}, std::pair{"n", 1e-9}}) {
    prefix = p;
    scaled = v / f;
    if (std::fabs(v) >= f) break;
  }
  return significant(scaled, 3) + " " + prefix + unit;
}

// A sentence wrapped at the text's width, continuation lines indented.
std::string wrapped(const std::string& text, std::size_t indent = 2, std::size_t first_indent = 0) {
  std::string out, line(first_indent, ' ');
  std::istringstream words(text);
  for (std::string w; words >> w;) {
    if (!line.empty() && line.size() + 1 + w.size() > kWidth) {
      out += line + "\n";
      line = std::string(indent, ' ');
    }
    line += (line.empty() || line.back() == ' ' ? "" : " ") + w;
  }
  return out + line + "\n";
}

// Every line longer than the width wrapped, keeping its indent (the
// paragraphs other writers give: the end-of-life table, the settling fixes).
std::string fit_lines(const std::string& text) {
  std::string out, line;
  std::istringstream in(text);
  while (std::getline(in, line)) {
    if (line.size() <= kWidth) {
      out += line + "\n";
      continue;
    }
    const std::size_t indent = line.find_first_not_of(' ');
    out += wrapped(line.substr(indent), indent + 2, indent);
  }
  return out;
}

// A source in the contributor tables: every active input, and a
// reading-level source (quantisation, noise, rounding) that contributes.
bool shown_contributor(const Design& d, const Contributor& k) {
  if (k.share > 0.0 || k.half_width > 0.0) return true;
  return std::any_of(d.inputs.begin(), d.inputs.end(),
                     [&](const ToleranceInput& in) { return info(in.source).name == k.name; });
}

// ---------------------------------------------------------------- the first screen

std::string verdict_text(const Design& d, const Budget& b, const ResponseSettings& response) {
  const auto& v = b.verdict;
  std::string head = std::string("VERDICT: ") + (v.pass ? "PASS" : "FAIL") + "  " + v.reason;
  // A margin only where the error decides: not beside a window that cannot be read.
  if (v.unreadable.empty() && (v.basis != Requirement::Basis::monte_carlo || b.mc))
    head += " (margin " + fixed(v.margin, 3) + " K)";
  if (response.present) head += response.include_dynamic ? " [static + dynamic]" : " [static only]";
  std::string out = wrapped(head);
  if (response.present) out += wrapped(dynamic_error_line(response));
  std::string window = "Window " + fixed(d.requirement.window_min, 2) + " .. " + fixed(d.requirement.window_max, 2) +
                       " degC, limit +/-" + fixed(d.requirement.max_error, 3) + " K, verdict basis " +
                       std::string(to_string(v.basis)) + " (requirement.basis)";
  if (v.basis != Requirement::Basis::monte_carlo && v.unreadable.empty() && std::isfinite(v.worst_at))
    window += ", smallest margin at " + fixed(v.worst_at, 2) + " degC";
  const auto outside = unreadable_runs(b.points);
  int lost = 0;
  for (const auto& r : outside) lost += !r.in_window;
  if (lost > 0) window += "; outside the window " + std::to_string(lost) + " range(s) cannot be read (--detail)";
  return out + wrapped(window);
}

std::string engines_text(const Design& d, const Budget& b) {
  const double limit = d.requirement.max_error;
  Table s{.header = {"engine", "max |error|", "at (degC)", "margin (K)", "how"}};
  auto row = [&](const std::string& name, double worst, double at, const std::string& how) {
    const bool ok = std::isfinite(worst);
    s.rows.push_back({name, ok ? fixed(worst, 3) + " K" : "n/a", ok ? fixed(at, 2) : "", ok ? fixed(limit - worst, 3) : "",
                      how});
  };
  row("worst case", b.wc_max_abs, b.wc_max_at, corner_method_text(b));
  row("linear budget", b.rss_max_abs, b.rss_max_at,
      "JCGM 100, k = " + fixed(b.k_p, 3) + ", " + percent(d.montecarlo.coverage) + " coverage");
  if (b.mc)
    row("Monte Carlo", b.mc->max_abs, b.mc->max_abs_at,
        "JCGM 101, " + std::to_string(b.mc->units) + " units" +
            (b.mc->adaptive ? (b.mc->converged ? " (adaptive, stable)" : " (adaptive, cap reached)") : ""));
  return "\nLargest |error| in the window, by engine:\n" + render_text(s, kLayout);
}

std::string yield_text(const Design& d, const Budget& b, bool detail) {
  if (!b.mc) return "\nMonte Carlo not run (--no-mc): no yield estimate.\n";
  const McSummary& m = *b.mc;
  std::string out = wrapped("Yield: " + percent(m.yield, 3) + " of " + std::to_string(m.units) + " units within +/-" +
                            fixed(d.requirement.max_error, 3) + " K over the window (95 % interval " + percent(m.yield_low, 3) +
                            " .. " + percent(m.yield_high, 3) + "); " + budget_writer::failure_rate_text(m) +
                            "; required " + percent(d.requirement.yield, 3) + ".");
  int compared = 0;
  const int validated = budget_writer::validated_points(b, compared);
  std::string check = "Linear budget validated by Monte Carlo (JCGM 101 section 8) at " + std::to_string(validated) +
                      " of " + std::to_string(compared) + " window temperatures" +
                      (validated == compared ? ": it can be trusted here." : ": read the Monte Carlo bands.");
  for (const auto& p : b.points)
    if (const std::string why = p.in_window && detail ? validation_failure_reason(p, d) : ""; !why.empty()) {
      check += " First failure at " + fixed(p.t, 2) + " degC: " + why + ".";
      break;
    }
  return "\n" + out + wrapped(check);
}

// The leading sources: the largest shares, and any source that leads by
// reach without being among them.
std::string leaders_text(const Design& d, const Budget& b, bool detail) {
  constexpr std::size_t kShown = 5;
  Table t{.header = {"source (key)", "share", "reach (K)", ""}};
  std::size_t rest = 0;
  for (const auto& c : b.window_contributors) {
    if (!shown_contributor(d, c)) continue;
    const bool reach_leader = std::find(b.leaders_by_reach.begin(), b.leaders_by_reach.end(), c.name) != b.leaders_by_reach.end();
    if (t.rows.size() >= kShown && !reach_leader) {
      ++rest;
      continue;
    }
    const bool first_reach = !b.leaders_by_reach.empty() && b.leaders_by_reach.front() == c.name;
    t.rows.push_back({c.label + " (" + c.name + ")", percent(c.share, 1), fixed(c.half_width, 3),
                      first_reach ? "<- largest reach" : reach_leader ? "<- reach" : ""});
  }
  if (t.rows.empty()) return "";
  std::string out = "\nLeading sources over the window (share of the combined variance; own worst-case reach):\n";
  out += render_text(t, kLayout);
  if (rest > 0) out += "(" + std::to_string(rest) + " more in --detail)\n";
  if (b.leaders_differ && detail)
    out += "A source can reach far at the ends of its range with a small variance: read both columns.\n";
  return out;
}

std::string end_text(const char* where, const HandCheck& h, double max_code) {
  if (h.status != Status::ok) return std::string(where) + " " + fixed(h.t, 2) + " degC " + std::string(describe(h.status));
  const bool low = h.to_bottom <= h.to_top;
  return std::string(where) + " " + fixed(h.t, 2) + " degC code " + fixed(h.code, 0) + ", " +
         fixed(low ? h.to_bottom : h.to_top, 0) + " codes (" + percent((low ? h.to_bottom : h.to_top) / (max_code + 1.0), 1) +
         ") from the " + (low ? "bottom" : "top");
}

std::string headroom_text(const Chain* chain, const Budget& b) {
  std::string out;
  if (chain && !b.points.empty()) {
    const Headroom h = headroom(*chain, b);
    if (h.any)
      out += wrapped("Headroom: node " + fixed(h.v_low, 3) + " .. " + fixed(h.v_high, 3) + " V over the range against the ADC input 0 .. " +
                     fixed(h.v_input, 3) + " V; " + end_text("at", h.at_min, h.max_code) + "; " +
                     end_text("at", h.at_max, h.max_code) + ".");
    if (h.at_min.current > 0.0 && h.at_max.current > 0.0)
      out += wrapped("Divider current " + si(h.at_min.current, "A") + " at " +
                     fixed(h.at_min.t, 2) + " degC, " + si(h.at_max.current, "A") + " at " +
                     fixed(h.at_max.t, 2) + " degC; sensor power " + si(h.at_min.power, "W") +
                     " and " + si(h.at_max.power, "W") +
                     (h.duty < 1.0 ? " while powered (duty " + percent(h.duty, 1) + ")" : "") + ".");
  }
  if (b.weakest.found)
    out += wrapped("Weakest ADC sensitivity in the window: " + fixed(b.weakest.lsb_per_k, 2) + " LSB/K (" +
                   fixed(b.weakest.mv_per_k, 3) + " mV/K) at " + fixed(b.weakest.t, 2) + " degC, where 1 LSB = " +
                   fixed(b.weakest.lsb_in_k, 4) + " K.");
  return out.empty() ? out : "\n" + out;
}

// What would help: one source improved at a time (what_if.hpp); `most`
// rows (0: every row).
std::string what_if_text(const Design& d, const WhatIf& w, std::size_t most) {
  if (w.rows.empty()) return {};
  const bool judged = judged_against_limit(w, d.requirement);
  std::string out = "\n" + wrapped("What would help (one source improved at a time, the rest as designed; worst case / linear "
                                   "over the window in K; as designed " + fixed(w.as_designed.wc_max_abs, 3) + " / " +
                                   fixed(w.as_designed.rss_max_abs, 3) + ", limit +/-" + fixed(d.requirement.max_error, 3) + " K" +
                                   (w.directed ? ", directed corners" : "") + "):");
  std::vector<std::string> head{"source (setting)", "halved", "removed"};
  if (judged) head.push_back("within the limit");
  Table t{.header = head};
  bool unreadable = false;
  auto cell = [&](const WhatIfFigures& f) {
    unreadable |= !f.readable;
    return fixed(f.wc_max_abs, 3) + " / " + fixed(f.rss_max_abs, 3) + (f.readable ? "" : "!");
  };
  std::size_t rest = 0;
  for (const auto& r : w.rows) {
    if (most && t.rows.size() == most) {
      ++rest;
      continue;
    }
    std::vector<std::string> row{r.label + " (" + r.key + ")", cell(r.halved), cell(r.removed)};
    if (judged) row.push_back(std::string(enough_phrase(r, d.requirement)));
    t.rows.push_back(row);
  }
  out += render_text(t, kLayout);
  if (rest) out += "(" + std::to_string(rest) + " more in --detail)\n";
  if (judged && std::none_of(w.rows.begin(), w.rows.end(), [&](const WhatIfRow& r) { return !enough(r, d.requirement).empty(); }))
    out += wrapped("No single part meets the limit: improve several together (try them with --<setting>=<value>), or "
                   "change the design (thermargin pick, thermargin grades).");
  if (!most)
    out += wrapped("halved: the source's tolerance (or noise, output resolution) halved, roughly the next better grade; "
                   "removed: an ideal part. Two changes together are not the sum of two rows.");
  if (unreadable) out += "! some unit cannot be read at some window temperature with that change.\n";
  return out;
}

std::string first_screen(const Design& d, const Budget& b, const WhatIf& w, const BudgetExtras& x, const std::string& settling) {
  std::string out = "thermargin budget - " + d.title + "\n\n";
  out += verdict_text(d, b, x.response);
  out += settling;
  if (b.end_of_life) out += "\n" + end_of_life_text(d, b).substr(0, end_of_life_text(d, b).find_last_not_of('\n') + 1) + "\n";
  out += engines_text(d, b);
  out += yield_text(d, b, x.detail);
  out += leaders_text(d, b, x.detail);
  out += headroom_text(x.chain, b);
  if (const std::string note = rtd_class_range_note(d); !note.empty()) out += wrapped("RTD class: " + note + ".");
  out += what_if_text(d, w, x.detail ? 0 : 4);
  return fit_lines(out);
}

// ---------------------------------------------------------------- behind --detail

std::string contributors_text(const Design& d, const Budget& b) {
  std::string out = "\nEvery contributor over the window (share of the combined variance; own worst-case half-width):\n";
  Table c{.header = {"source", "key", "share", "half-width (K)"}};
  for (const auto& k : b.window_contributors)
    if (shown_contributor(d, k)) c.rows.push_back({k.label, k.name, percent(k.share, 1), fixed(k.half_width, 4)});
  out += render_text(c, kLayout);
  if (std::any_of(b.window_contributors.begin(), b.window_contributors.end(),
                  [&](const Contributor& k) { return shown_contributor(d, k) && k.share == 0.0; }))
    out += wrapped("A share of 0 %: a source that acts only together with another (a tempco with the board temperature "
                   "range) has no first-order sensitivity; its part is in the pair's row (a x b) where that is not "
                   "negligible, and its half-width, the worst case and Monte Carlo include it.");
  const auto runs = unreadable_runs(b.points);
  if (!runs.empty()) {
    out += "\nTemperatures that cannot be read (" + std::to_string(b.status_points) + " with some engine's status):\n";
    for (const auto& r : runs) out += "  " + budget_writer::run_range(r) + (r.in_window ? " (in the window)" : "") + "\n";
  }
  return out;
}

// The per-temperature tables, headed by the CSV's column names: the chain,
// the bands, then each source's share and own half-width.
std::string point_tables(const Budget& b, bool settling) {
  Table chain{.header = {"t_degC", "status", "v_node_V", "code_LSB", "sensitivity_LSB_per_K", "sensitivity_mV_per_K", "lsb_K",
                         "self_heating_K", "nominal_K"}};
  if (settling) chain.header.push_back("acquisition_error_K");
  Table bands{.header = {"t_degC", "wc_low_K", "wc_high_K", "rss_low_K", "rss_high_K", "mc_low_K", "mc_high_K", "mc_median_K",
                         "mc_saturated_share", "dominant"}};
  Table shares{.header = {"t_degC"}}, widths{.header = {"t_degC"}};
  for (const auto& c : b.window_contributors) {
    shares.header.push_back("share_" + c.name + "_pct");
    widths.header.push_back("half_width_" + c.name + "_K");
  }
  auto opt = [](bool ok, double v, int decimals) { return ok ? fixed(v, decimals) : std::string(); };
  for (const auto& p : b.points) {
    const std::string t = fixed(p.t, 3) + (p.in_window ? "" : "*");
    if (!point_ok(p)) {
      chain.rows.push_back({t, std::string(to_string(p.nominal.status))});
      continue;
    }
    const auto& n = p.nominal;
    chain.rows.push_back({t, p.wc.failed_corners ? std::string(to_string(p.wc.failure)) : "ok", fixed(n.v_node, 6),
                          fixed(n.code, 3), fixed(n.sensitivity, 4), fixed(n.mv_per_k, 4), fixed(n.lsb_in_k, 5),
                          fixed(n.self_heating, 6), fixed(n.error, 5)});
    if (settling) chain.rows.back().push_back(fixed(n.acquisition_error, 5));
    const bool lin = p.linear.status == Status::ok, mc = p.mc && p.mc->valid > 0;
    bands.rows.push_back({t, opt(p.wc.any_ok, p.wc.low, 5), opt(p.wc.any_ok, p.wc.high, 5), opt(lin, p.linear.low, 5),
                          opt(lin, p.linear.high, 5), opt(mc, mc ? p.mc->low : 0, 5), opt(mc, mc ? p.mc->high : 0, 5),
                          opt(mc, mc ? p.mc->median : 0, 5), opt(p.mc.has_value(), p.mc ? p.mc->saturated_share() : 0, 6),
                          p.contributors.empty() ? "" : p.contributors.front().name});
    shares.rows.push_back({t});
    widths.rows.push_back({t});
    for (const auto& w : b.window_contributors) {
      const Contributor* c = contributor_at(p, w.name);
      shares.rows.back().push_back(c ? fixed(100.0 * c->share, 4) : "");
      widths.rows.back().push_back(c ? fixed(c->half_width, 6) : "");
    }
  }
  std::string out = "\nPer temperature, the nominal chain (* outside the requirement window):\n" + render_text(chain, kLayout);
  out += "\nPer temperature, the bands in K (dominant: the largest share of the combined variance there):\n" +
         render_text(bands, kLayout);
  out += "\nPer temperature, each source's share of the combined variance in %:\n" + render_text(shares, kLayout);
  out += "\nPer temperature, each source's own worst-case half-width in K:\n" + render_text(widths, kLayout);
  return out;
}

}  // namespace

std::string budget_text(const Design& design, const Budget& budget, const WhatIf& what_if, const BudgetExtras& extras) {
  std::string settling;
  if (extras.chain && design.adc.samples_settle()) {
    const SettlingSummary s = settling_summary(*extras.chain, budget);
    settling = settling_text(design, s);
    if (settling.empty())
      settling = "Acquisition: settling error up to " + fixed(s.max_abs, 4) + " K in the window" +
                 (s.max_abs > 0.0 ? " (at " + fixed(s.at, 2) + " degC).\n" : ".\n");
  }
  std::string out = first_screen(design, budget, what_if, extras, settling);
  if (extras.detail) {
    out += contributors_text(design, budget);
    out += point_tables(budget, design.adc.samples_settle() && extras.chain);
  } else {
    out += "\nMore: --detail (every contributor, the tables per temperature); every value: --format csv|json.\n";
  }
  return out + "\n" + wrapped(std::string(caution), 0);
}

}  // namespace thermargin
