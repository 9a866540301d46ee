// The grades' text, CSV and JSON (grades_output.hpp): every combination of
// part grades, the cost/accuracy front and the recommendation.
#include <nlohmann/json.hpp>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>

#include "thermargin/report/grades_output.hpp"

#include "report/json_fields.hpp"

#include "thermargin/core/number.hpp"
#include "thermargin/report/html_report.hpp"  // csv_cell
#include "thermargin/report/table.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/engines/budget.hpp"  // to_string(Requirement::Basis)
#include "thermargin/tools/grades.hpp"
#include "thermargin/report/grades_report.hpp"

namespace thermargin {

namespace {

nlohmann::json opt(const std::optional<double>& v) { return json_fields::optional(v); }


std::string opt_fixed(const std::optional<double>& v, int decimals) { return v ? fixed(*v, decimals) : "-"; }


nlohmann::ordered_json row_json(const GradesResult& g, const GradeRow& r) {
  nlohmann::ordered_json choice = nlohmann::ordered_json::object();
  for (std::size_t k = 0; k < g.slots.size(); ++k) choice[g.slots[k]] = g.grades[k][static_cast<std::size_t>(r.choice[k])];
  nlohmann::ordered_json j{{"choice", choice}, {"unit_cost", r.unit_cost}, {"setup_per_unit", r.setup_per_unit}};
  if (r.r_fixed) j["r_fixed"] = *r.r_fixed;
  j["wc_max_abs"] = opt(r.wc_max_abs);
  j["rss_max_abs"] = opt(r.rss_max_abs);
  if (r.status != Status::ok) {
    j["status"] = std::string(to_string(r.status));
    j["status_at"] = r.status_at;
  }
  j["mc_run"] = r.mc_run;
  if (r.mc) {
    j["mc_units"] = r.mc->units;
    json_fields::add_yield(j, *r.mc);
  } else {
    j["yield"] = nullptr;
  }
  if (!r.mc_skipped.empty()) j["mc_skipped"] = r.mc_skipped;
  if (g.reject_cost) j["cost_per_good_unit"] = opt(r.cost_per_good_unit);
  j["error"] = opt(r.error);
  j["on_front"] = r.on_front;
  j["meets_requirement"] = r.meets_requirement;
  j["verdict"] = r.verdict;
  if (!r.rtd_class_note.empty()) j["rtd_class_note"] = r.rtd_class_note;
  return j;
}

std::string to_json(const Design& d, const Catalogue& cat, const GradesResult& g) {
  nlohmann::ordered_json j;
  j["command"] = "grades";
  j["title"] = d.title;
  j["catalogue"] = cat.file;
  j["units"] = {{"temperature", "degC"}, {"error", "K"}, {"cost", "catalogue currency"}, {"r_fixed", "ohm"}};
  j["by"] = std::string(to_string(g.by));
  j["requirement"] = {{"window_min", g.requirement.window_min},
                      {"window_max", g.requirement.window_max},
                      {"max_error", g.requirement.max_error},
                      {"yield", g.requirement.yield},
                      {"basis", std::string(to_string(g.requirement.basis))}};
  j["volume"] = opt(g.volume);
  j["reject_cost"] = opt(g.reject_cost);
  j["mc_units"] = g.units;
  j["mc_seed"] = d.montecarlo.seed;
  j["mc_full_runs"] = g.mc_full;
  j["mc_pilot_only"] = g.mc_pilot_only;
  if (g.anchor_r_fixed) j["re_pick_anchor"] = *g.anchor_r_fixed;
  j["combinations"] = g.rows.size();
  j["rows"] = nlohmann::ordered_json::array();
  for (const auto& r : g.rows) j["rows"].push_back(row_json(g, r));
  j["front"] = nlohmann::ordered_json::array();
  for (std::size_t i : g.front) j["front"].push_back(i);
  j["recommendation"] = g.recommendation ? row_json(g, g.rows[*g.recommendation]) : nlohmann::ordered_json(nullptr);
  nlohmann::ordered_json current = nlohmann::ordered_json::object();
  for (std::size_t k = 0; k < g.slots.size(); ++k)
    current[g.slots[k]] = g.current[k] ? nlohmann::ordered_json(g.grades[k][static_cast<std::size_t>(*g.current[k])])
                                       : nlohmann::ordered_json(nullptr);
  j["current"] = current;
  j["saving"] = opt(g.saving);
  j["saving_basis"] = g.saving ? nlohmann::ordered_json(g.saving_per_good_unit ? "per good unit" : "per unit")
                               : nlohmann::ordered_json(nullptr);
  j["saving_over_volume"] = g.saving && g.volume ? nlohmann::ordered_json(*g.saving * *g.volume) : nlohmann::ordered_json(nullptr);
  j["summary"] = g.summary;
  j["caution"] = std::string(caution);
  return j.dump(2) + "\n";
}

std::string to_csv(const GradesResult& g) {
  std::ostringstream out;
  out << csv_caution_line();
  for (const auto& s : g.slots) out << csv_cell(s) << ",";
  out << "r_fixed_ohm,unit_cost,setup_per_unit,cost_per_good_unit,wc_max_abs_K,rss_max_abs_K,mc_max_abs_K,yield,"
         "yield_low,yield_high,failures_per_million,mc_units,mc_run,error_K,on_front,meets_requirement,recommended,verdict";
  // A combination that uses its RTD class beyond the rated range (docs/model.md
  // §1): a last column, only when some combination does.
  const bool rtd_mark =
      std::any_of(g.rows.begin(), g.rows.end(), [](const GradeRow& r) { return !r.rtd_class_note.empty(); });
  out << (rtd_mark ? ",rtd_class_extrapolated\n" : "\n");
  for (std::size_t i = 0; i < g.rows.size(); ++i) {
    const GradeRow& r = g.rows[i];
    for (std::size_t k = 0; k < g.slots.size(); ++k) out << csv_cell(g.grades[k][static_cast<std::size_t>(r.choice[k])]) << ",";
    auto cell = [](const std::optional<double>& v, int decimals) { return v ? fixed(*v, decimals) : std::string(); };
    out << (r.r_fixed ? fixed(*r.r_fixed, 1) : "") << "," << fixed(r.unit_cost, 6) << "," << fixed(r.setup_per_unit, 6) << ","
        << cell(r.cost_per_good_unit, 6) << "," << cell(r.wc_max_abs, 5) << "," << cell(r.rss_max_abs, 5) << ",";
    if (r.mc)
      out << fixed(r.mc->max_abs, 5) << "," << fixed(r.mc->yield, 6) << "," << fixed(r.mc->yield_low, 6) << ","
          << fixed(r.mc->yield_high, 6) << "," << fixed(r.mc->failures_per_million, 1) << "," << r.mc->units << ",";
    else
      out << ",,,,,,";
    out << (r.mc_run ? 1 : 0) << "," << cell(r.error, 5) << "," << (r.on_front ? 1 : 0) << ","
        << (r.meets_requirement ? 1 : 0) << "," << (g.recommendation == i ? 1 : 0) << "," << csv_cell(r.verdict);
    if (rtd_mark) out << "," << (r.rtd_class_note.empty() ? 0 : 1);
    out << "\n";
  }
  return out.str();
}

std::string yield_text(const GradeRow& r) {
  if (!r.mc) return "-";
  return percent(r.mc->yield) + (r.mc_run ? "" : " (pilot)");
}

std::string to_text(const Design& d, const Catalogue& cat, const GradesResult& g) {
  std::ostringstream out;
  const auto& q = g.requirement;
  out << "thermargin grades - " << d.title << "\n\n";
  out << "Catalogue " << cat.file << ": " << g.slots.size() << " slot(s), " << g.rows.size() << " combination(s)";
  if (g.volume) out << "; setup costs spread over " << fixed(*g.volume, 0) << " units";
  if (g.reject_cost) out << "; a failed unit costs " << money(*g.reject_cost);
  out << ".\nRequirement: +/-" << fixed(q.max_error, 3) << " K over " << fixed(q.window_min, 2) << " .. "
      << fixed(q.window_max, 2) << " degC (" << to_string(q.basis) << " basis"
      << (std::any_of(g.rows.begin(), g.rows.end(), [](const GradeRow& r) { return r.end_of_life; })
              ? ", at end of life: requirement.at, with each grade's drift"
              : "")
      << "), yield at least " << percent(q.yield)
      << ". Error for the front: " << to_string(g.by) << ".\n\n";

  if (g.recommendation) {
    const GradeRow& r = g.rows[*g.recommendation];
    out << "RECOMMENDATION: " << g.choice_text(r) << " - " << money(r.unit_cost) << " per unit";
    if (r.cost_per_good_unit) out << ", " << money(*r.cost_per_good_unit) << " per good unit";
    out << "\n  worst case " << opt_fixed(r.wc_max_abs, 3) << " K, linear band " << opt_fixed(r.rss_max_abs, 3) << " K";
    if (r.mc)
      out << ", Monte Carlo band " << fixed(r.mc->max_abs, 3) << " K; yield " << percent(r.mc->yield, 3) << " (95 % interval "
          << percent(r.mc->yield_low, 3) << " .. " << percent(r.mc->yield_high, 3) << "), "
          << fixed(r.mc->failures_per_million, 0) << " failures per million";
    if (r.r_fixed) out << "; fixed resistor " << ohms(*r.r_fixed, 3);
    out << "\n";
  } else {
    out << "RECOMMENDATION: none - no combination meets the requirement.\n";
  }
  out << "  " << g.summary << "\n\n";

  out << "Cost/accuracy front (" << to_string(g.by)
      << " error; no other combination is both cheaper and more accurate), cheapest first:\n";
  Table f{.header = {"unit cost", "error (K)", "yield", "meets", "combination"}};
  for (std::size_t i : g.front) {
    const GradeRow& r = g.rows[i];
    f.rows.push_back({money(r.unit_cost), opt_fixed(r.error, 3), yield_text(r), r.meets_requirement ? "yes" : "no", g.choice_text(r)});
  }
  out << render_text(f);

  out << "\nAll combinations, cheapest first (F on the front, M meets the requirement, R recommended):\n";
  std::vector<std::string> head{"#"};
  head.insert(head.end(), g.slots.begin(), g.slots.end());
  const bool re_picked = !g.rows.empty() && g.rows.front().r_fixed.has_value();
  if (re_picked) head.push_back("R fixed");
  head.insert(head.end(), {"unit cost"});
  if (g.reject_cost) head.push_back("per good");
  head.insert(head.end(), {"worst (K)", "linear (K)", "MC band (K)", "yield", "95 % interval", "fail/M", "", "verdict"});
  Table t{.header = head};
  for (std::size_t i = 0; i < g.rows.size(); ++i) {
    const GradeRow& r = g.rows[i];
    std::vector<std::string> row{std::to_string(i + 1)};
    for (std::size_t k = 0; k < g.slots.size(); ++k) row.push_back(g.grades[k][static_cast<std::size_t>(r.choice[k])]);
    if (re_picked) row.push_back(ohms(*r.r_fixed, 3));
    row.push_back(money(r.unit_cost));
    if (g.reject_cost) row.push_back(r.cost_per_good_unit ? money(*r.cost_per_good_unit) : "-");
    row.insert(row.end(), {opt_fixed(r.wc_max_abs, 3), opt_fixed(r.rss_max_abs, 3)});
    if (r.mc) {
      row.insert(row.end(), {r.mc_run ? fixed(r.mc->max_abs, 3) : "-", yield_text(r),
                             percent(r.mc->yield_low) + " .. " + percent(r.mc->yield_high), fixed(r.mc->failures_per_million, 0)});
    } else {
      row.insert(row.end(), {"-", "-", "", ""});
    }
    std::string marks;
    if (r.on_front) marks += "F";
    if (r.meets_requirement) marks += "M";
    if (g.recommendation == i) marks += "R";
    if (!r.rtd_class_note.empty()) marks += "X";
    row.push_back(marks);
    row.push_back(r.verdict);
    t.rows.push_back(row);
  }
  out << render_text(t);
  for (const auto& r : g.rows)
    if (!r.rtd_class_note.empty()) {
      out << "X: the RTD class is used beyond its rated range, e.g. " << r.rtd_class_note << ".\n";
      break;
    }
  out << "\nMonte Carlo: " << g.units << " units per combination, seed " << d.montecarlo.seed
      << ", the same units for every combination; run in full for " << g.mc_full << " of " << g.rows.size()
      << " combination(s)";
  if (g.mc_pilot_only) out << ", stopped after a pilot for " << g.mc_pilot_only;
  out << ". Combinations that cannot meet the requirement whatever their yield are not simulated (--mc-all runs "
         "them all; docs/grades.md).\n";
  if (g.anchor_r_fixed)
    out << "Fixed resistor re-picked for every combination (the picker's objective), starting from the scenario's own pick, "
        << ohms(*g.anchor_r_fixed, 3) << ".\n";
  out << "\n" << caution << "\n";
  return out.str();
}

}  // namespace

std::string grades_text(const Design& design, const Catalogue& catalogue, const GradesResult& grades) {
  return to_text(design, catalogue, grades);
}

std::string grades_csv(const GradesResult& grades) { return to_csv(grades); }

std::string grades_json(const Design& design, const Catalogue& catalogue, const GradesResult& grades) {
  return to_json(design, catalogue, grades);
}

}  // namespace thermargin
