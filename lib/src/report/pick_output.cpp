// The picker's text, CSV and JSON (pick_output.hpp): the ranking of
// fixed-resistor values, the constraints and the analytic guidance.
#include <nlohmann/json.hpp>
#include <cmath>
#include <cstdio>
#include <sstream>

#include "thermargin/report/pick_output.hpp"

#include "report/json_fields.hpp"

#include "thermargin/core/number.hpp"
#include "thermargin/report/csv_preamble.hpp"
#include "thermargin/report/html_report.hpp"  // csv_cell
#include "thermargin/report/table.hpp"
#include "thermargin/chain/rtd_class_range.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/input/life.hpp"
#include "thermargin/report/pick_report.hpp"
#include "thermargin/tools/picker.hpp"
#include "thermargin/core/text.hpp"

namespace thermargin {

namespace {


std::string parallel_text(const std::optional<double>& r) { return r ? ohms(*r) : "none"; }
std::string series_text(const std::optional<Series>& s) { return s ? std::string(to_string(*s)) : "-"; }

// Engineering notation in watts (the number reader has no power quantity:
// the current's prefixes with the unit swapped).
std::string watts(double w) {
  std::string s = format_quantity(w, Quantity::current, 3);
  s.back() = 'W';
  return s;
}

// The objective in words, for the verdict line and the guidance.
std::string objective_phrase(Objective o) {
  switch (o) {
    case Objective::worst_case: return "worst case";
    case Objective::linear: return "linear band";
    case Objective::monte_carlo: return "Monte Carlo band";
    case Objective::sensitivity: return "minimum sensitivity";
  }
  return "worst case";
}
std::string objective_unit(Objective o) { return maximised(o) ? "LSB/K" : "K"; }
std::string objective_value(Objective o, double v) { return fixed(v, maximised(o) ? 3 : 4) + " " + objective_unit(o); }

std::string grade_text(const PickResult& r, const PickOptions& o) {
  const std::string tol_from = o.series_grade ? "the " + std::string(to_string(o.series)) + " series' tolerance"
                               : o.tolerance    ? "--grade"
                                                : "scenario";
  const std::string tempco_from = o.tempco ? "--grade" : "scenario";
  return format_quantity(r.tolerance, Quantity::ratio, 3) + " (" + tol_from + "), " +
         format_quantity(r.tempco, Quantity::tempco, 3) + " (" + tempco_from + ")";
}

std::string constraints_text(const PickConstraints& c) {
  std::vector<std::string> v;
  if (c.max_self_heating) v.push_back("self-heating <= " + format_quantity(*c.max_self_heating, Quantity::temperature_difference, 3));
  if (c.max_current) v.push_back("current <= " + format_quantity(*c.max_current, Quantity::current, 3));
  if (c.max_power) v.push_back("power <= " + watts(*c.max_power));
  if (c.min_span) v.push_back("ADC span used >= " + format_quantity(*c.min_span, Quantity::ratio, 3));
  if (c.min_sensitivity) v.push_back("sensitivity >= " + fixed(*c.min_sensitivity, 3) + " LSB/K");
  if (c.settles) v.push_back("settles to 1/2 LSB");
  return v.empty() ? "none" : join(v, "; ");
}

std::string verdict_line(const Design& d, const PickResult& r, const PickOptions& o) {
  const PickRow& w = r.winner();
  std::ostringstream out;
  const std::string label = o.values.empty() ? std::string(to_string(o.series)) : "given";
  std::string value = ohms(w.r_fixed) + " (" + label + ")";
  const auto with = [](const std::optional<double>& p) {
    return p ? " with " + ohms(*p) + " in parallel" : std::string(" with no parallel resistor");
  };
  if (r.pair_search) value += with(w.r_parallel);
  const std::string window = fixed(r.window_min, 1) + ".." + fixed(r.window_max, 1) + " degC";
  if (!w.feasible()) {
    out << "No candidate meets every condition; least bad: " << value << ", rejected by " << join(w.rejected_by, ", ");
    return out.str();
  }
  out << "Best: " << value << " - " << objective_phrase(r.objective) << " " << objective_value(r.objective, w.objective)
      << " over " << window;
  if (r.rows.size() >= 2 && r.margin) {
    const PickRow& u = r.rows[1];
    const std::string other = ohms(u.r_fixed) + (r.pair_search ? with(u.r_parallel) : "");
    if (*r.margin < (maximised(r.objective) ? 0.0005 : 0.00005))
      out << ", level with " << other << " to the digits shown";
    else
      out << ", " << objective_value(r.objective, *r.margin) << (maximised(r.objective) ? " more than " : " better than ") << other;
  }
  // As the report's banner: an error objective against the requirement.
  if (!maximised(r.objective))
    out << (w.objective <= d.requirement.max_error ? "; within" : "; outside") << " the requirement of +/-"
        << fixed(d.requirement.max_error, 3) << " K";
  return out.str();
}

nlohmann::json row_json(const PickRow& w, std::size_t rank, Objective o) {
  nlohmann::json j{{"rank", rank},
                   {"r_fixed", w.r_fixed},
                   {"r_parallel", json_fields::finite(w.r_parallel)},
                   {"series", w.series ? nlohmann::json(std::string(to_string(*w.series))) : nlohmann::json(nullptr)},
                   {"objective", w.status == Status::ok ? nlohmann::json(w.objective) : nlohmann::json(nullptr)},
                   {"objective_unit", objective_unit(o)},
                   {"wc_max_abs", json_fields::finite(w.wc_max_abs)},
                   {"rss_max_abs", json_fields::finite(w.rss_max_abs)},
                   {"mc_max_abs", json_fields::finite(w.mc_max_abs)},
                   {"min_sensitivity", w.min_sensitivity},
                   {"max_self_heating", w.max_self_heating},
                   {"max_current", w.max_current},
                   {"max_power", w.max_power},
                   {"span", w.span},
                   {"dominant", w.dominant},
                   {"status", std::string(to_string(w.status))},
                   {"rejected_by", w.rejected_by.empty() ? nlohmann::json(nullptr) : nlohmann::json(w.rejected_by.front())},
                   {"violations", w.rejected_by}};
  if (w.verify)
    j["verify"] = {{"units", w.verify->units},          {"readable", w.verify->readable},
                   {"mc_max_abs", w.verify->max_abs},   {"yield", w.verify->yield},
                   {"yield_low", w.verify->yield_low},  {"yield_high", w.verify->yield_high}};
  return j;
}

nlohmann::json guidance_json(const GuidanceValue& g) {
  return {{"r", json_fields::finite(g.r)},         {"objective", json_fields::finite(g.objective)},          {"below", json_fields::finite(g.below)},
          {"above", json_fields::finite(g.above)}, {"below_objective", json_fields::finite(g.below_objective)}, {"above_objective", json_fields::finite(g.above_objective)}};
}

std::string to_json(const Design& d, const PickResult& r, const PickOptions& o) {
  nlohmann::json j;
  j["command"] = "pick";
  j["title"] = d.title;
  j["objective"] = std::string(to_string(r.objective));
  j["units"] = {{"resistance", "ohm"}, {"error", "K"},  {"sensitivity", "LSB/K"}, {"self_heating", "K"},
                {"current", "A"},      {"power", "W"}, {"span", "fraction of 2^N"}};
  j["window"] = {{"min", r.window_min}, {"max", r.window_max}, {"max_error", d.requirement.max_error}};
  j["candidates"] = {{"from", r.candidates_label},
                     {"count", r.candidates},
                     {"within_constraints", r.within_constraints},
                     {"evaluated_in_full", r.evaluated_in_full},
                     {"pair_search", r.pair_search},
                     {"reduced_pair_search", r.reduced_pair_search},
                     {"corners_directed", r.corners_directed}};
  j["grade"] = {{"tolerance", r.tolerance}, {"tempco", r.tempco}};
  const auto& c = o.constraints;
  j["constraints"] = {{"max_self_heating", json_fields::finite(c.max_self_heating)}, {"max_current", json_fields::finite(c.max_current)},
                      {"max_power", json_fields::finite(c.max_power)},               {"min_span", json_fields::finite(c.min_span)},
                      {"min_sensitivity", json_fields::finite(c.min_sensitivity)}};
  if (c.settles) j["constraints"]["settles"] = true;
  if (r.mc_objective_units) j["mc_objective_units"] = r.mc_objective_units;
  if (r.mc_verify_units) j["mc_verify_units"] = r.mc_verify_units;
  j["rows"] = nlohmann::json::array();
  for (std::size_t i = 0; i < r.rows.size(); ++i) j["rows"].push_back(row_json(r.rows[i], i + 1, r.objective));
  j["winner"] = j["rows"].front();
  j["margin"] = json_fields::finite(r.margin);
  const Guidance& g = r.guidance;
  if (o.guidance)
    j["guidance"] = {{"continuous_optimum", guidance_json(g.optimum)},
                     {"brent_evaluations", g.evaluations},
                     {"t_centre", g.t_centre},
                     {"max_sensitivity", guidance_json(g.max_sensitivity)},
                     {"three_point", guidance_json(g.linearising)}};
  if (const std::string note = rtd_class_range_note(d); !note.empty()) j["rtd_class_note"] = note;
  j["caution"] = std::string(caution);
  return j.dump(2) + "\n";
}

std::string cell(const std::optional<double>& v, int decimals) { return v ? fixed(*v, decimals) : "n/a"; }

std::string to_csv(const Design& d, const PickResult& r) {
  std::ostringstream out;
  out << csv_preamble(d);
  out << "rank,r_fixed_ohm,r_parallel_ohm,series,objective,wc_max_abs_K,rss_max_abs_K,mc_max_abs_K,"
         "min_sensitivity_LSB_per_K,max_self_heating_K,max_current_A,max_power_W,span,dominant,status,rejected_by,"
         "verify_mc_max_abs_K,verify_yield,verify_yield_low,verify_yield_high\n";
  auto g = [](double v) { return significant(v); };
  auto opt = [&](const std::optional<double>& v) { return v ? g(*v) : std::string(); };
  for (std::size_t i = 0; i < r.rows.size(); ++i) {
    const PickRow& w = r.rows[i];
    out << i + 1 << "," << g(w.r_fixed) << "," << opt(w.r_parallel) << "," << (w.series ? std::string(to_string(*w.series)) : "")
        << "," << (w.status == Status::ok ? g(w.objective) : "") << "," << opt(w.wc_max_abs) << "," << opt(w.rss_max_abs) << ","
        << opt(w.mc_max_abs) << "," << g(w.min_sensitivity) << "," << g(w.max_self_heating) << "," << g(w.max_current) << ","
        << g(w.max_power) << "," << g(w.span) << "," << csv_cell(w.dominant) << "," << to_string(w.status) << ","
        << csv_cell(join(w.rejected_by, ";")) << ",";
    if (w.verify)
      out << g(w.verify->max_abs) << "," << g(w.verify->yield) << "," << g(w.verify->yield_low) << "," << g(w.verify->yield_high);
    else
      out << ",,,";
    out << "\n";
  }
  return out.str();
}

std::string guidance_text(const char* what, const GuidanceValue& v, const PickResult& r, const PickOptions& o,
                          const char* missing) {
  std::ostringstream out;
  out << "  " << what << ": ";
  if (!v.r) return out.str() + missing + "\n";
  out << ohms(*v.r);
  if (v.objective) out << ", " << objective_phrase(r.objective) << " " << objective_value(r.objective, *v.objective);
  const std::string nb = o.values.empty() ? std::string(to_string(o.series)) + " values" : "given values";
  auto side = [&](const std::optional<double>& x, const std::optional<double>& obj) {
    if (!x) return std::string("none");
    return ohms(*x) + " (" + (obj ? objective_value(r.objective, *obj) : std::string("window not readable")) + ")";
  };
  out << "; " << nb << " either side: " << side(v.below, v.below_objective) << ", " << side(v.above, v.above_objective) << "\n";
  return out.str();
}

std::string to_text(const Design& d, const PickResult& r, const PickOptions& o) {
  std::ostringstream out;
  out << "thermargin pick - " << d.title << "\n\n";
  out << verdict_line(d, r, o) << "\n";
  out << "Ranked by the " << objective_phrase(r.objective) << " over the window "
      << (judged_at_end_of_life(d) ? "at end of life " : "")
      << (maximised(r.objective) ? "(largest smallest LSB/K first" : "(smallest largest |error| first")
      << (judged_at_end_of_life(d) ? "; the drift inputs active, requirement.at" : "") << "); "
      << r.candidates << " candidate" << (r.candidates == 1 ? "" : "s") << " (" << r.candidates_label
      << (r.pair_search ? ", fixed and parallel resistor pairs" : "") << (r.reduced_pair_search ? ", reduced pair search" : "")
      << "), " << r.within_constraints << " within the constraints";
  if (r.objective == Objective::worst_case) {
    const char* full = r.corners_directed ? " searched in full" : " enumerated in full";
    out << "; " << r.evaluated_in_full << full;
    if (r.evaluated_in_full < r.candidates)
      out << ", the rest bounded below by directed corners or stopped once a partial" << (r.corners_directed ? " search" : " enumeration")
          << " could not win";
    if (r.corners_directed)
      out << " (more than 16 toleranced inputs: each worst case is searched from the two corners the sensitivities point to, "
             "as budget does, not enumerated)";
  }
  out << ".\n";
  if (r.mc_objective_units) out << "Monte Carlo objective: " << r.mc_objective_units << " units per candidate, the same draws for each.\n";
  out << "Fixed resistor: " << grade_text(r, o) << ". Constraints: " << constraints_text(o.constraints) << ".\n\n";

  std::vector<std::string> head{"rank", "R fixed"};
  if (r.pair_search) head.push_back("R parallel");
  head.insert(head.end(), {"series", "worst case (K)", "linear (K)"});
  if (r.objective == Objective::monte_carlo) head.push_back("MC band (K)");
  head.insert(head.end(), {"min LSB/K", "self-heat (K)", "current", "ADC span", "dominant"});
  const bool verified = !r.rows.empty() && r.rows.front().verify;
  if (verified) head.insert(head.end(), {"verify MC (K)", "yield"});
  head.push_back("rejected by");
  Table t{.header = head};
  for (std::size_t i = 0; i < r.rows.size(); ++i) {
    const PickRow& w = r.rows[i];
    std::vector<std::string> row{std::to_string(i + 1), ohms(w.r_fixed)};
    if (r.pair_search) row.push_back(parallel_text(w.r_parallel));
    row.insert(row.end(), {series_text(w.series), cell(w.wc_max_abs, 4), cell(w.rss_max_abs, 4)});
    if (r.objective == Objective::monte_carlo) row.push_back(cell(w.mc_max_abs, 4));
    row.insert(row.end(), {fixed(w.min_sensitivity, 2), fixed(w.max_self_heating, 4),
                           format_quantity(w.max_current, Quantity::current, 3), fixed(100.0 * w.span, 1) + " %",
                           w.dominant});
    if (verified) {
      if (w.verify) {
        row.push_back(w.verify->readable ? fixed(w.verify->max_abs, 4) : "unreadable");
        row.push_back(fixed(100.0 * w.verify->yield, 2) + " %");
      } else {
        row.insert(row.end(), {"", ""});
      }
    }
    row.push_back(join(w.rejected_by, ", "));
    t.rows.push_back(row);
  }
  out << render_text(t);
  out << "(worst case and linear: largest |error| over the window; min LSB/K: smallest ADC sensitivity there;\n"
         " self-heat and current: largest over t_min..t_max on the nominal chain, current while the divider is powered)\n";
  if (verified)
    out << "Verify: Monte Carlo with " << r.mc_verify_units << " units, band over the window and yield against +/-"
        << fixed(d.requirement.max_error, 3) << " K.\n";

  if (o.guidance) {
    const Guidance& g = r.guidance;
    out << "\nGuidance (the objective alone; the constraints are not applied here):\n";
    out << guidance_text(("Continuous optimum (Brent on ln R, " + std::to_string(g.evaluations) + " evaluations)").c_str(),
                         g.optimum, r, o, "not searched: a single candidate, or none that can read the window");
    out << guidance_text(("Largest sensitivity at the window centre, R = R(" + fixed(g.t_centre, 1) + " degC)").c_str(),
                         g.max_sensitivity, r, o, "none: the sensor curve does not reach the window centre");
    out << guidance_text(("Three-point linearisation through " + fixed(r.window_min, 1) + ", " + fixed(g.t_centre, 1) + ", " +
                          fixed(r.window_max, 1) + " degC")
                             .c_str(),
                         g.linearising, r, o,
                         "no positive value: the curve is straight or bends the other way (R1 + R3 <= 2 R2)");
  }
  if (const std::string note = rtd_class_range_note(d); !note.empty()) out << "\nRTD class: " << note << ".\n";
  out << "\n" << caution << "\n";
  return out.str();
}

}  // namespace

std::string pick_text(const Design& design, const PickResult& result, const PickOptions& options) {
  return to_text(design, result, options);
}

std::string pick_csv(const Design& design, const PickResult& result) { return to_csv(design, result); }

std::string pick_json(const Design& design, const PickResult& result, const PickOptions& options) {
  return to_json(design, result, options);
}

}  // namespace thermargin
