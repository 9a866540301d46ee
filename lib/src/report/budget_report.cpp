#include "thermargin/report/budget_report.hpp"

#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <optional>

#include "thermargin/chain/rtd_class_range.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/core/error.hpp"
#include "thermargin/engines/headroom.hpp"
#include "thermargin/engines/monte_carlo.hpp"
#include "thermargin/engines/unreadable.hpp"
#include "thermargin/report/schematic.hpp"
#include "report/budget_internal.hpp"

namespace thermargin {

namespace {

namespace fs = std::filesystem;

using report::bar;
using report::celsius;
using report::kelvin;
using report::num;
using report::pct;

// ---------------------------------------------------------------- which points have which curves

// The rules the JSON output follows (app/cmd_budget.cpp), so that a curve
// has a value exactly where the JSON has the number; a worst case over only
// some corners would understate the band, so it is a gap as well.
bool nominal_ok(const BudgetPoint& p) { return p.nominal.status == Status::ok; }
bool wc_ok(const BudgetPoint& p) { return nominal_ok(p) && p.wc.any_ok && p.wc.failed_corners == 0; }
bool linear_ok(const BudgetPoint& p) { return nominal_ok(p) && p.linear.status == Status::ok; }
bool mc_ok(const BudgetPoint& p) { return nominal_ok(p) && p.mc && p.mc->valid > 0; }

template <class F>
svg::Values column(const Budget& b, F f) {
  svg::Values v;
  v.reserve(b.points.size());
  for (const auto& p : b.points) v.push_back(f(p));
  return v;
}

std::vector<double> temperatures(const Budget& b) {
  std::vector<double> t;
  for (const auto& p : b.points) t.push_back(p.t);
  return t;
}

svg::Axis axis(std::string label, svg::Scale scale = svg::Scale::linear) {
  svg::Axis a;
  a.label = std::move(label);
  a.scale = scale;
  return a;
}

const svg::Axis kTemperatureAxis = axis("Temperature (\u00b0C)");

// Runs of consecutive unreadable temperatures, widened by half a step each
// side (clamped to the range) so a single bad temperature still shows.
std::vector<std::pair<double, double>> hatched_runs(const Budget& b) {
  std::vector<std::pair<double, double>> runs;
  const auto& pts = b.points;
  for (std::size_t i = 0; i < pts.size();) {
    if (!unreadable(pts[i])) {
      ++i;
      continue;
    }
    std::size_t j = i;
    while (j + 1 < pts.size() && unreadable(pts[j + 1])) ++j;
    const double left = i > 0 ? (pts[i - 1].t + pts[i].t) / 2 : pts[i].t;
    const double right = j + 1 < pts.size() ? (pts[j].t + pts[j + 1].t) / 2 : pts[j].t;
    runs.emplace_back(left, right);
    i = j + 1;
  }
  return runs;
}

// The main sources shown as their own curve in the contributor chart: the
// largest window shares, as many as the palette tells apart less one for
// the rest.
std::vector<Contributor> main_sources(const Budget& b) {
  std::vector<Contributor> out;
  const std::size_t most = svg::palette().size() - 1;
  for (const auto& c : b.window_contributors)
    if (c.share > 0.0 && out.size() < most) out.push_back(c);
  return out;
}

std::optional<double> share_at(const BudgetPoint& p, const std::string& name) {
  if (!linear_ok(p) || !(p.linear.u_c > 0.0)) return std::nullopt;
  for (const auto& c : p.contributors)
    if (c.name == name) return 100.0 * c.share;
  return 0.0;
}

// ---------------------------------------------------------------- the charts

Figure error_figure(const Design& d, const Budget& b) {
  const auto t = temperatures(b);
  svg::Chart c;
  c.title = "Error across the range (reported \u2212 true)";
  c.x = kTemperatureAxis;
  c.y = axis("Error (K)");
  c.description =
      "Nominal error, worst-case, linear-budget and Monte Carlo bands against the requirement limits; "
      "the shaded strip is the requirement window, hatched strips are temperatures that cannot be read.";
  c.series.push_back(svg::span("window", "Requirement window", d.requirement.window_min, d.requirement.window_max));
  int k = 0;
  for (const auto& [from, to] : hatched_runs(b)) {
    ++k;
    c.series.push_back(svg::span("unreadable_" + std::to_string(k), k == 1 ? "Cannot be read" : "", from, to, true));
  }
  using Get = double (*)(const BudgetPoint&);
  auto band = [&](const Budget& of, const char* name, const std::string& label, bool (*ok)(const BudgetPoint&), Get low,
                  Get high, int n) {
    auto values = [&](Get get) {
      return column(of, [&](const BudgetPoint& p) { return ok(p) ? std::optional<double>(get(p)) : std::nullopt; });
    };
    c.series.push_back(svg::band(name, label, t, values(low), values(high), svg::in_slot(n)));
  };
  band(b, "wc", "Worst case", wc_ok, [](const BudgetPoint& p) { return p.wc.low; }, [](const BudgetPoint& p) { return p.wc.high; }, 1);
  band(b, "rss", "Linear budget (k = " + num(b.k_p, 2) + ")", linear_ok, [](const BudgetPoint& p) { return p.linear.low; },
       [](const BudgetPoint& p) { return p.linear.high; }, 3);
  if (b.mc)
    band(b, "mc", "Monte Carlo " + pct(b.mc->coverage, 2), mc_ok, [](const BudgetPoint& p) { return p.mc->low; },
         [](const BudgetPoint& p) { return p.mc->high; }, 2);
  if (b.end_of_life)  // over the product's life: the worst case with the drift inputs (docs/model.md §11)
    band(b.end_of_life->budget, "wc_end_of_life", "Worst case at end of life", wc_ok,
         [](const BudgetPoint& p) { return p.wc.low; }, [](const BudgetPoint& p) { return p.wc.high; }, 4);
  c.series.push_back(svg::reference("limit", "\u00b1" + kelvin(d.requirement.max_error) + " limit",
                                    {-d.requirement.max_error, d.requirement.max_error}));
  c.series.push_back(svg::line("nominal", "Nominal", t, column(b, [](const BudgetPoint& p) -> std::optional<double> {
                                 if (!nominal_ok(p)) return std::nullopt;
                                 return p.nominal.error;
                               }),
                               svg::in_slot(0)));
  // Keep the limit lines inside the plot, clear of its frame, whenever the
  // bands allow; bands beyond them take the automatic range, so they show.
  const double limit = d.requirement.max_error, room = 1.2 * limit;
  bool inside = true;
  for (const auto& s : c.series)
    if (s.kind == svg::Kind::line || s.kind == svg::Kind::band)
      for (const auto* v : {&s.y, &s.y_high})
        for (const auto& y : *v) inside = inside && (!y || std::fabs(*y) <= room);
  if (inside && limit > 0.0) {
    c.y.min = -room;
    c.y.max = room;
  }
  return {"error-bands.svg",
          "Error bands across the range. The requirement is met where every band stays between the limit lines "
          "inside the window.",
          std::move(c)};
}

Figure contributor_figure(const Budget& b) {
  const auto t = temperatures(b);
  svg::Chart c;
  c.title = "What the error is made of: share of the combined variance";
  c.x = kTemperatureAxis;
  c.y = axis("Share of u_c\u00b2 (%)");
  c.y.min = 0.0;
  c.y.max = 100.0;
  c.description = "Each main source's share of the linear budget's combined variance at each temperature.";
  const auto main = main_sources(b);
  int next_slot = 0;
  for (const auto& m : main)
    c.series.push_back(svg::line(m.name, m.label, t,
                                 column(b, [&](const BudgetPoint& p) { return share_at(p, m.name); }),
                                 svg::in_slot(next_slot++)));
  std::size_t others = 0;
  for (const auto& w : b.window_contributors) others += w.share > 0.0;
  if (others > main.size())
    c.series.push_back(svg::line("others", "All other sources", t,
                                 column(b,
                                        [&](const BudgetPoint& p) -> std::optional<double> {
                                          if (!linear_ok(p) || !(p.linear.u_c > 0.0)) return std::nullopt;
                                          double rest = 100.0;
                                          for (const auto& m : main) rest -= *share_at(p, m.name);
                                          return std::max(rest, 0.0);
                                        }),
                                 svg::in_slot(next_slot)));
  return {"contributors.svg",
          "Where the uncertainty comes from across the range: a source near 100 % is the one to improve there.",
          std::move(c)};
}

// One curve of the nominal chain across the range over the window's strip:
// the sensitivity, the size of one LSB, the self-heating, the settling.
struct CurveFigure {
  std::string file, title, y_label, description, series, legend, caption;
  int slot = 0;
  bool from_zero = false;  // a linear axis that starts at zero
};

Figure curve_figure(const Design& d, const Budget& b, CurveFigure f, std::optional<double> (*value)(const BudgetPoint&)) {
  svg::Chart c;
  c.title = f.title;
  c.x = kTemperatureAxis;
  c.y = axis(f.y_label);
  if (f.from_zero) c.y.min = 0.0;
  c.description = f.description;
  c.series.push_back(svg::span("window", "Requirement window", d.requirement.window_min, d.requirement.window_max));
  c.series.push_back(svg::line(f.series, f.legend, temperatures(b), column(b, value), svg::in_slot(f.slot)));
  return {f.file, f.caption, std::move(c)};
}

// Two charts rather than one: the sensitivity and the size of one LSB are
// reciprocals in different units (LSB/K and K), which one y axis cannot
// label; each reads directly from a linear axis that starts at zero.
Figure sensitivity_figure(const Design& d, const Budget& b) {
  bool falling = false;
  for (const auto& p : b.points) falling = falling || (nominal_ok(p) && p.nominal.sensitivity < 0.0);
  // The magnitude: the sign only says which way the code runs (falling for
  // an NTC at the low side of the divider).
  return curve_figure(d, b,
                      {"sensitivity.svg", "ADC sensitivity", "|Sensitivity| (LSB/K)", "ADC counts per kelvin of the nominal chain.",
                       "abs_sensitivity", "|Sensitivity|",
                       std::string("Counts per kelvin: the higher, the finer the ADC sees the temperature") +
                           (falling ? "; the code falls as the temperature rises." : "."),
                       0, true},
                      [](const BudgetPoint& p) -> std::optional<double> {
                        if (!nominal_ok(p) || p.nominal.sensitivity == 0.0) return std::nullopt;
                        return std::fabs(p.nominal.sensitivity);
                      });
}

Figure lsb_figure(const Design& d, const Budget& b) {
  Figure f = curve_figure(
      d, b,
      {"lsb-size.svg", "Temperature size of one LSB", "1 LSB (K)",
       "The temperature step of one ADC count (the reciprocal of the sensitivity).", "lsb_in_k", "Size of 1 LSB",
       "The kelvin one count stands for: the smallest step the reading can take before averaging and rounding.", 2, true},
      [](const BudgetPoint& p) -> std::optional<double> {
        if (!nominal_ok(p) || !std::isfinite(p.nominal.lsb_in_k)) return std::nullopt;
        return p.nominal.lsb_in_k;
      });
  if (d.firmware.resolution > 0.0)
    f.chart.series.push_back(
        svg::reference("resolution", "output resolution " + kelvin(d.firmware.resolution, 4), {d.firmware.resolution}));
  return f;
}

Figure self_heating_figure(const Design& d, const Budget& b) {
  return curve_figure(d, b,
                      {"self-heating.svg", "Self-heating of the sensor", "Temperature rise (K)",
                       "How much warmer than the medium the element runs (nominal parts, mean over the duty cycle).",
                       "self_heating", "Self-heating",
                       "The element's rise above the medium it measures; it is part of every error above.", 0, false},
                      [](const BudgetPoint& p) -> std::optional<double> {
                        if (!nominal_ok(p)) return std::nullopt;
                        return p.nominal.self_heating;
                      });
}

// The sampled node's settling error across the range (docs/model.md §14):
// drawn only when the ADC's sampling capacitor is modelled.
Figure settling_figure(const Design& d, const Budget& b) {
  return curve_figure(d, b,
                      {"settling.svg", "Settling of the sampled node", "Acquisition error (K)",
                       "The nominal reading's error from a sampling capacitor that has not settled to the node, and from "
                       "the charge it draws (nominal parts).",
                       "acquisition_error", "Acquisition error",
                       "What the ADC's acquisition adds to the reading: it is part of every error above.", 0, false},
                      [](const BudgetPoint& p) -> std::optional<double> {
                        if (!nominal_ok(p)) return std::nullopt;
                        return p.nominal.acquisition_error;
                      });
}

// ---------------------------------------------------------------- the page's blocks

std::string verdict_detail(const Design& d, const Budget& b) {
  const auto& v = b.verdict;
  std::string s = v.reason;
  // A margin only where the error decides: not beside a window that cannot be read.
  if (v.unreadable.empty() && (v.basis != Requirement::Basis::monte_carlo || b.mc))
    s += v.margin >= 0 ? "; margin " + kelvin(v.margin) + " to spare" : "; over the limit by " + kelvin(-v.margin);
  s += ". Verdict basis: " + std::string(to_string(v.basis)) + ", window " + celsius(d.requirement.window_min) +
       " to " + celsius(d.requirement.window_max) + ".";
  return s;
}

Table margin_table(const Design& d, const Budget& b) {
  const double limit = d.requirement.max_error;
  Table t{.caption = "Largest |error| in the window by engine, against the limit of \u00b1" + kelvin(limit),
          .header = {"Engine", "Max |error| (K)", "At (\u00b0C)", "Margin (K)", "", "How"},
          .rows = {},
          .numeric = {false, true, true, true, false, false}};
  auto row = [&](const std::string& engine, double worst, double at, const std::string& how) {
    t.rows.push_back({engine, num(worst, 3), num(at, 2), num(limit - worst, 3),
                      limit - worst >= 0 ? "within" : "exceeds", how});
  };
  row("Worst case", b.wc_max_abs, b.wc_max_at,
      std::to_string(b.wc_corners) + " corners per temperature, " +
          (b.wc_directed ? "directed by sensitivity signs" : "full enumeration"));
  row("Linear budget", b.rss_max_abs, b.rss_max_at,
      "k = " + num(b.k_p, 3) + " for " + pct(d.montecarlo.coverage, 2) + " coverage (JCGM 100)");
  if (b.mc)
    row("Monte Carlo", b.mc->max_abs, b.mc->max_abs_at,
        std::to_string(b.mc->units) + " units, " + pct(b.mc->coverage, 2) + " coverage (JCGM 101)");
  return t;
}

void yield_block(HtmlDocument& doc, const Design& d, const Budget& b) {
  doc.heading("Production yield");
  if (!b.mc) {
    doc.paragraph("Monte Carlo was not run (--no-mc), so there is no yield estimate.");
    return;
  }
  const auto& m = *b.mc;
  const bool meets = m.yield >= d.requirement.yield;
  const bool sure = m.yield_low >= d.requirement.yield;
  doc.paragraph("Yield " + pct(m.yield, 3) + " of units within \u00b1" + kelvin(d.requirement.max_error) +
                " over the whole window (95 % confidence interval " + pct(m.yield_low, 3) + " to " +
                pct(m.yield_high, 3) + "), against the required " + pct(d.requirement.yield, 3) + ". " +
                (sure    ? "Even the interval's low end meets the requirement."
                 : meets ? "The estimate meets the requirement but the interval's low end does not: run more units."
                         : "The estimate falls short of the requirement."));
  doc.table({.caption = "Monte Carlo yield",
             .header = {"Yield", "95 % interval", "Required", "Failure rate", "Units", "Good units"},
             .rows = {{pct(m.yield, 3), pct(m.yield_low, 3) + " \u2013 " + pct(m.yield_high, 3),
                       pct(d.requirement.yield, 3), budget_writer::failure_rate_text(m), std::to_string(m.units),
                       std::to_string(m.good_units)}},
             .numeric = {}});
}

// The temperatures that cannot be read, as ranges (engines/unreadable.hpp).
void status_block(HtmlDocument& doc, const Budget& b) {
  const auto runs = unreadable_runs(b.points);
  if (runs.empty()) return;
  std::vector<std::vector<std::string>> rows;
  for (const auto& r : runs)
    rows.push_back({r.from == r.to ? num(r.from, 2) : num(r.from, 2) + " to " + num(r.to, 2), r.in_window ? "yes" : "no",
                    std::string(describe(r.status)) + (r.nominal ? "" : " (some units)")});
  doc.heading("Temperatures that cannot be read");
  doc.paragraph("These are gaps in every curve above (and hatched on the error chart), not zeros; \"some units\": the "
                "nominal unit reads there, some worst-case corner does not.");
  doc.table({.caption = {}, .header = {"t (\u00b0C)", "In window", "What happens"}, .rows = rows, .numeric = {false, false, false}});
}

// The circuit as a board checks it by hand: the schematic with the design's
// values and, at t_min, the window's middle and t_max, the node voltage,
// the current, the element's resistance and power and the code (nominal
// parts, engines/headroom.hpp).
void hand_check_block(HtmlDocument& doc, const Design& d) {
  doc.heading("The circuit, checked by hand");
  doc.drawing(chain_schematic_svg(d), "The measurement chain with the design's values.");
  const Chain chain(d);
  const double middle = 0.5 * (d.requirement.window_min + d.requirement.window_max);
  Table t{.caption = "Values to check by hand (nominal parts; the element at its self-heated temperature)",
          .header = {"", "t (\u00b0C)", "Node (V)", "Current (\u00b5A)", "Sensor (\u03a9)", "Sensor power (\u00b5W)", "Code (LSB)"},
          .rows = {},
          .numeric = {false, true, true, true, true, true, true}};
  for (const auto& [what, at] : {std::pair{"t_min", d.conditions.t_min}, std::pair{"window middle", middle},
                                 std::pair{"t_max", d.conditions.t_max}}) {
    const HandCheck h = hand_check(chain, at);
    if (h.status != Status::ok) {
      t.rows.push_back({what, num(at, 2), std::string(describe(h.status)), "", "", "", ""});
      continue;
    }
    t.rows.push_back({what, num(at, 2), num(h.v_node, 4), num(1e6 * h.current, 2), num(h.r_sensor, 1),
                      num(1e6 * h.power, 2), num(h.code, 1)});
  }
  doc.table(t);
  doc.paragraph("Node voltage V = V_exc \u00b7 R_bottom / (R_top + R_drive + R_bottom) (Ohm's law), the current "
                "V_exc / (R_fixed + R_drive + R_branch), the sensor's power P = V_element\u00b2 / R while powered, "
                "the code V / V_ref \u00b7 2^N after the ADC's gain, offset and INL (with a sampling capacitor, "
                "the sample's, which differs from the node by the settling error).");
}

// ---------------------------------------------------------------- files

[[noreturn]] void refuse(const std::string& option, const std::string& path, const std::string& reason) {
  reject(command_line(option), path, reason);
}

struct NamedText {
  std::string name, text;
};

// Writes dir/<name> for every file, all or none: each is first written whole
// under a hidden staging name beside its target, and only when all are
// staged are they renamed into place. On a failure the staged files, and
// `dir` if `created_dir` says the caller made it, are removed, and
// input_error says "<option> = <dir> (command line): cannot write <name>: <reason>".
void write_files(const std::string& option, const std::string& dir, const std::vector<NamedText>& files,
                 bool created_dir) {
  std::vector<fs::path> staged;
  auto clean_up = [&] {
    std::error_code ec;
    for (const auto& s : staged) fs::remove(s, ec);
    if (created_dir) fs::remove(dir, ec);
  };
  // A target that is a directory (or otherwise cannot be replaced) is found
  // before anything is written, so the renames below do not fail half way.
  for (const auto& f : files) {
    const fs::path target = fs::path(dir) / f.name;
    struct stat st {};
    if (::lstat(target.c_str(), &st) == 0) {
      if (S_ISDIR(st.st_mode)) {
        clean_up();
        refuse(option, dir, "cannot write " + f.name + ": it is a directory");
      }
      if (S_ISREG(st.st_mode) && ::access(target.c_str(), W_OK) != 0) {
        clean_up();
        refuse(option, dir, "cannot write " + f.name + ": the file is read-only");
      }
    }
  }
  for (const auto& f : files) {
    const fs::path stage = fs::path(dir) / ("." + f.name + ".staged-" + std::to_string(::getpid()));
    try {
      write_file_atomically(stage.string(), f.text);
    } catch (const input_error& e) {
      clean_up();
      const std::string why = e.what();
      const std::string marker = "cannot write: ";
      const auto at = why.find(marker);
      refuse(option, dir,
             "cannot write " + f.name + (at == std::string::npos ? std::string() : ": " + why.substr(at + marker.size())));
    }
    staged.push_back(stage);
  }
  for (std::size_t i = 0; i < files.size(); ++i) {
    const fs::path target = fs::path(dir) / files[i].name;
    if (::rename(staged[i].c_str(), target.c_str()) != 0) {
      const int err = errno;
      // Earlier renames already put complete files in place; the rest of the
      // staged files are removed so that no stray file is left.
      std::error_code ec;
      for (std::size_t k = i; k < staged.size(); ++k) fs::remove(staged[k], ec);
      refuse(option, dir, "cannot write " + files[i].name + ": " + std::strerror(err));
    }
  }
}

}  // namespace

std::vector<Figure> budget_figures(const Design& design, const Budget& budget) {
  std::vector<Figure> f;
  f.push_back(error_figure(design, budget));
  f.push_back(contributor_figure(budget));
  f.push_back(sensitivity_figure(design, budget));
  f.push_back(lsb_figure(design, budget));
  f.push_back(self_heating_figure(design, budget));
  if (design.adc.samples_settle()) f.push_back(settling_figure(design, budget));
  return f;
}

namespace {

// One source improved at a time: the window's worst case and linear band.
void add_what_if(HtmlDocument& doc, const Design& d, const WhatIf& w) {
  doc.heading("What would help");
  doc.paragraph("The window's largest error with one source improved at a time, everything else as designed: "
                "halved is that source's tolerance (or the noise, the output resolution) halved, roughly the next "
                "better grade; removed is an ideal part, the most that improving it can give. As designed: worst "
                "case " + kelvin(w.as_designed.wc_max_abs) + ", linear band " + kelvin(w.as_designed.rss_max_abs) +
                ", limit \u00b1" + kelvin(d.requirement.max_error) +
                (w.directed ? "; corners directed by the sensitivities." : "; every corner enumerated."));
  // Which single change meets the limit, said where the design misses it.
  const bool judged = judged_against_limit(w, d.requirement);
  Table t{.caption = "Most helpful first (by the verdict's basis)",
          .header = {"Source", "Setting", "Halved: worst case (K)", "Halved: linear (K)", "Removed: worst case (K)",
                     "Removed: linear (K)"},
          .rows = {},
          .numeric = {false, false, true, true, true, true}};
  if (judged) {
    t.header.push_back("Within the limit");
    t.numeric.push_back(false);
  }
  auto cell = [](const WhatIfFigures& f, double v) { return num(v, 3) + (f.readable ? "" : " (unreadable units)"); };
  for (const auto& r : w.rows) {
    std::vector<std::string> row{r.label, r.key, cell(r.halved, r.halved.wc_max_abs), cell(r.halved, r.halved.rss_max_abs),
                                 cell(r.removed, r.removed.wc_max_abs), cell(r.removed, r.removed.rss_max_abs)};
    if (judged) {
      row.push_back(std::string(enough_phrase(r, d.requirement)));
    }
    t.rows.push_back(std::move(row));
  }
  doc.table(t);
  doc.paragraph("One source at a time: two changes together are not the sum of two rows. thermargin grades prices "
                "real part grades against each other.");
}

}  // namespace

std::string budget_report_html(const Design& d, const Scenario& scenario, const Budget& b, const std::string& source,
                               const WhatIf* what_if) {
  const auto figures = budget_figures(d, b);
  HtmlDocument doc("Design review: " + d.title);
  doc.paragraph("thermargin " + std::string(version) + " budget of " +
                (source.empty() ? std::string("the built-in default design") : "scenario " + source) + ": " +
                std::to_string(b.points.size()) + " temperatures from " + celsius(d.conditions.t_min) + " to " +
                celsius(d.conditions.t_max) + "; requirement \u00b1" + kelvin(d.requirement.max_error) + " from " +
                celsius(d.requirement.window_min) + " to " + celsius(d.requirement.window_max) + " with a yield of " +
                pct(d.requirement.yield, 2) + ". Errors are reported minus true temperature, in kelvin.");
  doc.verdict(b.verdict.pass ? Badge::pass : Badge::fail, verdict_detail(d, b));
  doc.caution(caution);
  doc.table(margin_table(d, b));
  if (!b.window_contributors.empty() && b.window_contributors.front().share > 0.0)
    doc.paragraph("The largest contributor over the window is the " + b.window_contributors.front().label + " (" +
                  pct(b.window_contributors.front().share, 1) + " of the combined variance).");
  if (const std::string note = rtd_class_range_note(d); !note.empty()) doc.paragraph("RTD class: " + note + ".");
  yield_block(doc, d, b);
  hand_check_block(doc, d);

  doc.heading("Error across the range");
  doc.chart(figures[0].chart, "Figure 1. " + figures[0].caption);
  if (b.mc) {
    int compared = 0;
    const int validated = budget_writer::validated_points(b, compared);
    doc.paragraph("Linear budget against Monte Carlo (JCGM 101 \u00a78): validated at " + std::to_string(validated) +
                  " of " + std::to_string(compared) + " window temperatures" +
                  (validated == compared ? "; the simple budget can be trusted here."
                                         : "; where they differ, read the Monte Carlo band."));
  }

  doc.heading("What the error is made of");
  doc.chart(figures[1].chart, "Figure 2. " + figures[1].caption);
  Table rank{.caption = "Ranking over the requirement window",
             .header = {"#", "Source", "Share of variance", "", "Own worst case (\u00b1K)"},
             .rows = {},
             .numeric = {true, false, true, false, true}};
  int n = 0;
  for (const auto& c : b.window_contributors)
    if (c.share > 0.0 || c.half_width > 0.0)
      rank.rows.push_back({std::to_string(++n), c.label + " (" + c.name + ")", pct(c.share, 1), bar(c.share),
                           num(c.half_width, 4)});
  doc.fold("The ranking of all " + std::to_string(n) + " sources over the window").table(rank).unfold();
  if (what_if && !what_if->rows.empty()) add_what_if(doc, d, *what_if);

  doc.heading("Sensitivity");
  doc.fold("Figures 3 and 4: ADC counts per kelvin, and the kelvin one count stands for");
  doc.chart(figures[2].chart, "Figure 3. " + figures[2].caption);
  doc.chart(figures[3].chart, "Figure 4. " + figures[3].caption);
  doc.unfold();
  doc.heading("Self-heating");
  doc.fold("Figure 5: the element's rise above the medium").chart(figures[4].chart, "Figure 5. " + figures[4].caption).unfold();
  if (figures.size() > 5) {
    doc.heading("Settling of the sampled node");
    doc.fold("Figure 6: the acquisition error across the range");
    doc.chart(figures[5].chart, "Figure 6. " + figures[5].caption).unfold();
  }

  status_block(doc, b);
  add_resolved_inputs(doc, d, scenario);
  doc.caution(caution);
  return doc.str();
}

void add_resolved_inputs(HtmlDocument& doc, const Design& d, const Scenario& s) {
  doc.heading("Every resolved input");
  doc.paragraph(std::to_string(d.inputs.size()) +
                " toleranced inputs are active. Values as given (the built-in default where no file or option set "
                "one), with their unit and where they came from, as `thermargin check --all` prints them.");
  doc.fold("Every key, by section");
  std::string section;
  Table t;
  auto flush = [&] {
    if (!t.rows.empty()) doc.table(t);
    t = Table{};
  };
  for (const auto& k : scenario_schema()) {
    const auto& v = s.get(k.key);
    if ((k.key.ends_with("_dist") || k.key.ends_with("_gap")) && v.where.kind == Origin::built_in) continue;
    const auto dot = k.key.find('.');
    const std::string sec = dot == std::string::npos ? "(top)" : k.key.substr(0, dot);
    if (sec != section || t.header.empty()) {
      flush();
      section = sec;
      t.caption = sec == "(top)" ? std::string("Top level") : "[" + sec + "]";
      t.header = {"Key", "Value", "Unit", "Origin"};
      t.numeric = {false, false, false, false};
    }
    t.rows.push_back({k.key, v.value.empty() ? "(none)" : v.value, std::string(unit_symbol(k.quantity)),
                      v.where.origin()});
  }
  flush();
  doc.unfold();
}

void check_report_path(const std::string& option, const std::string& path) {
  if (path.empty()) refuse(option, path, "give the name of the HTML file to write");
  std::error_code ec;
  if (fs::is_directory(path, ec)) refuse(option, path, "is a directory; give a file name such as review.html");
  const fs::path parent = fs::path(path).parent_path();
  if (!parent.empty() && !fs::is_directory(parent, ec))
    refuse(option, path, "directory " + parent.string() + " does not exist; give a file in an existing directory");
  // What write_file_atomically would refuse at the end, found now. (Root
  // passes these checks whatever the modes; the write itself still says.)
  // A device or pipe (/dev/stdout) is written in place; a file is replaced
  // through a temporary file beside it.
  struct stat st {};
  const bool exists = ::stat(path.c_str(), &st) == 0;
  if (exists && !S_ISREG(st.st_mode)) return;
  if (exists && ::access(path.c_str(), W_OK) != 0) refuse(option, path, "the file is read-only");
  const std::string dir = parent.empty() ? std::string(".") : parent.string();
  if (::access(dir.c_str(), W_OK) != 0) refuse(option, path, "cannot write in directory " + dir);
}

void check_plots_directory(const std::string& option, const std::string& dir) {
  if (dir.empty()) refuse(option, dir, "give the directory for the SVG files");
  std::error_code ec;
  if (fs::exists(dir, ec) && !fs::is_directory(dir, ec)) refuse(option, dir, "is a file, not a directory");
  if (fs::is_directory(dir, ec)) return;
  const fs::path parent = fs::path(dir).lexically_normal().parent_path();
  if (!parent.empty() && !fs::is_directory(parent, ec))
    refuse(option, dir,
           "directory " + parent.string() + " does not exist; the plots directory is created only inside an existing one");
}

void write_report(const std::string& path, std::string_view html) { write_file_atomically(path, html); }

void write_figures(const std::string& option, const std::string& dir, const std::vector<Figure>& figures) {
  check_plots_directory(option, dir);
  // Render everything first: nothing touches the disk until every file's text exists.
  std::vector<NamedText> files;
  for (const auto& f : figures) files.push_back({f.file, svg::render_document(f.chart)});
  bool created = false;
  std::error_code ec;
  if (!fs::is_directory(dir, ec)) {
    if (::mkdir(dir.c_str(), 0777) != 0) refuse(option, dir, std::string("cannot create it: ") + std::strerror(errno));
    created = true;
  }
  write_files(option, dir, files, created);
}

}  // namespace thermargin
