// The fit's text, CSV and JSON (fit_output.hpp): coefficients, residuals,
// the recommendation and the scenario lines.
#include <nlohmann/json.hpp>
#include <cmath>
#include <cstdio>
#include <optional>
#include <sstream>
#include <tuple>
#include <utility>

#include "thermargin/report/fit_output.hpp"

#include "report/json_fields.hpp"

#include "thermargin/core/number.hpp"
#include "thermargin/report/html_report.hpp"  // csv_cell
#include "thermargin/report/table.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/tools/fit.hpp"
#include "thermargin/input/rt_data.hpp"

namespace thermargin {

namespace {


std::string short_label(const ModelFit& f) {
  const std::string m = f.model == "beta" ? "beta" : f.model == "steinhart-hart" ? "SH" : "SH4";
  const std::string how = f.method == "two-point" ? "2-pt" : f.method == "three-point" ? "3-pt" : "LS";
  return m + " " + how;
}

std::string coefficient_list(const ModelFit& f) {
  std::string s;
  for (const auto& c : f.coefficients) s += (s.empty() ? "" : ", ") + c.name + " = " + significant(c.value, 7);
  return s;
}

// "two-point 25/85": the method, and for a point method the data temperatures it passes through.
std::string method_label(const ModelFit& f) {
  std::string s = f.method;
  for (std::size_t i = 0; i < f.through_celsius.size(); ++i) s += (i ? "/" : " ") + significant(f.through_celsius[i], 6);
  return s;
}

std::string window_text(const FitResult& r) { return significant(r.window_low, 6) + ".." + significant(r.window_high, 6) + " degC"; }

nlohmann::json to_json(const FitResult& r, const std::string& snippet) {
  nlohmann::json j;
  j["command"] = "fit";
  j["file"] = r.file;
  j["units"] = {{"temperature", "degC"}, {"error", "K"}, {"resistance", "ohm"}};
  j["points_total"] = r.points_total;
  j["points_in_window"] = r.points_in_window;
  j["window"] = {{"low", r.window_low}, {"high", r.window_high}};
  j["weighted"] = r.weighted;
  j["rows"] = nlohmann::json::array();
  for (std::size_t i = 0; i < r.fits.size(); ++i) {
    const auto& f = r.fits[i];
    nlohmann::json coefficients = nlohmann::json::object(), uncertainties = nlohmann::json::object(),
                   units = nlohmann::json::object();
    for (const auto& c : f.coefficients) {
      coefficients[c.name] = c.value;
      uncertainties[c.name] = c.uncertainty ? json_fields::finite(*c.uncertainty) : nlohmann::json(nullptr);
      units[c.name] = c.unit;
    }
    nlohmann::json row{{"model", f.model},
                       {"method", f.method},
                       {"coefficients", coefficients},
                       {"uncertainties", uncertainties},
                       {"coefficient_units", units},
                       {"through", f.through_celsius},
                       {"max_residual", f.max_residual},
                       {"max_residual_at", f.max_residual_at},
                       {"rms_residual", f.rms_residual},
                       {"between_assessed", f.between_assessed},
                       {"between_max_error", f.between_assessed ? json_fields::finite(f.between_max_error) : nlohmann::json(nullptr)},
                       {"between_max_at", f.between_assessed ? json_fields::finite(f.between_max_at) : nlohmann::json(nullptr)},
                       {"worst_error", f.worst_error},
                       {"weighted", f.weighted},
                       {"dof", f.dof},
                       {"recommended", r.recommendation.found && r.recommendation.fit == i}};
    if (f.weighted) row["chi_squared"] = f.chi_squared;
    row["residuals"] = nlohmann::json::array();
    for (const auto& p : f.residuals)
      row["residuals"].push_back(
          {{"line", p.line}, {"t", p.t_celsius}, {"r", p.r_ohm}, {"in_window", p.in_window}, {"residual", p.residual},
           {"solved", p.solved}});
    j["rows"].push_back(row);
  }
  const auto& rec = r.recommendation;
  j["recommendation"] = {{"found", rec.found},
                         {"model", r.fits[rec.fit].model},
                         {"method", r.fits[rec.fit].method},
                         {"limit", rec.limit},
                         {"text", rec.text}};
  j["snippet"] = snippet;
  j["caution"] = std::string(caution);
  return j;
}

std::string to_csv(const FitResult& r) {
  Table t{.header = {"model", "method", "r25_ohm", "beta_K", "a", "b", "c", "d", "max_residual_K", "max_residual_at_degC",
                     "rms_residual_K", "between_max_error_K", "between_max_at_degC", "worst_error_K", "dof", "recommended"}};
  for (std::size_t i = 0; i < r.fits.size(); ++i) {
    const auto& f = r.fits[i];
    std::vector<std::string> row{f.model, f.method};
    for (const char* name : {"r25", "beta", "a", "b", "c", "d"}) {
      row.emplace_back();
      for (const auto& c : f.coefficients)
        if (c.name == name) row.back() += significant(c.value, 10);
    }
    row.insert(row.end(), {significant(f.max_residual, 6), significant(f.max_residual_at, 6), significant(f.rms_residual, 6),
                           f.between_assessed ? significant(f.between_max_error, 6) : "",
                           f.between_assessed ? significant(f.between_max_at, 6) : "", significant(f.worst_error, 6),
                           std::to_string(f.dof), r.recommendation.found && r.recommendation.fit == i ? "1" : "0"});
    t.rows.push_back(std::move(row));
  }
  return csv_caution_line() + render_csv(t);
}

std::string to_text(const FitResult& r, const std::string& snippet) {
  std::ostringstream out;
  const auto& rec = r.recommendation;
  out << "thermargin fit - " << r.file << ": " << r.points_total << " points, " << r.points_in_window
      << " inside the window " << window_text(r)
      << (r.weighted ? "; least squares weighted by the stated uncertainties" : "") << "\n\n";
  out << (rec.found ? "RECOMMENDATION: " : "NO RECOMMENDATION: ") << rec.text << "\n\n";

  out << "Models (errors in K over the window; 'between' compares with a smooth curve through the data):\n";
  Table m{.header = {"model", "method", "max |residual|", "at (degC)", "RMS", "between", "at (degC)", "worst", "coefficients"}};
  for (std::size_t i = 0; i < r.fits.size(); ++i) {
    const auto& f = r.fits[i];
    m.rows.push_back({f.model + (rec.found && rec.fit == i ? " *" : ""), method_label(f), fixed(f.max_residual, 4),
           fixed(f.max_residual_at, 2), fixed(f.rms_residual, 4),
           f.between_assessed ? fixed(f.between_max_error, 4) : "not assessed",
           f.between_assessed ? fixed(f.between_max_at, 2) : "", fixed(f.worst_error, 4), coefficient_list(f)});
  }
  out << render_text(m);
  if (rec.found) out << "(* recommended)\n";

  out << "\nCoefficients (standard uncertainty per GUM; none for an exact fit to data without uncertainties):\n";
  Table c{.header = {"model", "method", "coefficient", "value", "uncertainty", "unit"}};
  for (const auto& f : r.fits)
    for (const auto& k : f.coefficients)
      c.rows.push_back({f.model, f.method, k.name, significant(k.value, 10), k.uncertainty ? significant(*k.uncertainty, 3) : "-", k.unit});
  out << render_text(c);
  if (r.weighted) {
    out << "\nWeighted least squares: chi-squared of the residuals in units of the stated uncertainties, against the\n"
           "degrees of freedom (about equal: the model explains the data within their uncertainties; far above: it\n"
           "does not, or the uncertainties are too small, and the coefficient uncertainties above are then too small):\n";
    Table x{.header = {"model", "method", "chi-squared", "dof"}};
    for (const auto& f : r.fits)
      if (f.method == "least-squares") x.rows.push_back({f.model, f.method, significant(f.chi_squared, 4), std::to_string(f.dof)});
    out << render_text(x);
  }

  out << "\nResiduals (model temperature at the point's resistance minus its temperature, K):\n";
  std::vector<std::string> head{"line", "t (degC)", "R (ohm)", "window"};
  for (const auto& f : r.fits) head.push_back(short_label(f));
  Table p{.header = head};
  bool unsolved = false;
  if (!r.fits.empty()) {
    for (std::size_t i = 0; i < r.fits.front().residuals.size(); ++i) {
      const auto& pt = r.fits.front().residuals[i];
      std::vector<std::string> row{std::to_string(pt.line), significant(pt.t_celsius, 6), significant(pt.r_ohm, 7),
                                   pt.in_window ? "in" : "outside"};
      for (const auto& f : r.fits) {
        const auto& res = f.residuals[i];
        row.push_back(fixed(res.residual, 4) + (res.solved ? "" : " (no T)"));
        unsolved = unsolved || !res.solved;
      }
      p.rows.push_back(row);
    }
  }
  out << render_text(p);
  if (unsolved)
    out << "(no T): the model gives no temperature at that resistance; it is counted as reading 0 K.\n";

  out << "\nScenario lines for " << r.fits[rec.fit].model << " (" << r.fits[rec.fit].method << ")"
      << (rec.found ? "; merge them into your scenario file:\n\n"
                    : ", the closest fit; it misses the limit, so merge them into a scenario only if that error is "
                      "acceptable:\n\n")
      << snippet << "\n"
      << caution << "\n";
  return out.str();
}

// ------------------------------------------------ platinum RTD data

nlohmann::json rtd_json(const RtdFit& f, double limit) {
  nlohmann::json coefficients, uncertainties;
  for (const auto& c : f.coefficients) {
    coefficients[c.name] = c.value;
    uncertainties[c.name] = c.uncertainty ? json_fields::finite(*c.uncertainty) : nlohmann::json(nullptr);
  }
  nlohmann::json residuals = nlohmann::json::array();
  for (const auto& r : f.residuals)
    residuals.push_back({{"line", r.line}, {"t", r.t_celsius}, {"r", r.r_ohm}, {"in_window", r.in_window},
                         {"residual", json_fields::finite(r.residual)}, {"solved", r.solved}});
  return {{"model", "callendar-van-dusen"},
          {"method", "least-squares"},
          {"fitted_c", f.fitted_c},
          {"coefficients", coefficients},
          {"uncertainties", uncertainties},
          {"weighted", f.weighted},
          {"dof", f.dof},
          {"chi_squared", f.weighted ? json_fields::finite(f.chi_squared) : nlohmann::json(nullptr)},
          {"max_residual", f.max_residual},
          {"max_residual_at", f.max_residual_at},
          {"rms_residual", f.rms_residual},
          {"meets_limit", std::abs(f.max_residual) <= limit},
          {"standard", {{"nominal_r0", f.nominal_r0},
                        {"delta_a", f.delta_a},
                        {"delta_b", f.delta_b},
                        {"delta_c", f.fitted_c ? json_fields::finite(f.delta_c) : nlohmann::json(nullptr)},
                        {"max_deviation", f.max_deviation},
                        {"max_deviation_at", f.max_deviation_at},
                        {"class", f.met_class ? nlohmann::json(std::string(to_string(*f.met_class))) : nlohmann::json(nullptr)},
                        {"class_use", f.met_class ? json_fields::finite(f.class_use) : nlohmann::json(nullptr)}}},
          {"residuals", residuals},
          {"snippet", rtd_scenario_snippet(f)}};
}

std::string rtd_text(const RtdFit& f, double limit) {
  std::ostringstream out;
  const bool meets = std::abs(f.max_residual) <= limit;
  out << (meets ? "RTD RECOMMENDATION: " : "RTD FIT MISSES THE LIMIT: ")
      << "the resistance rises with temperature, so the data are fitted with the Callendar-Van Dusen equation of "
         "IEC 60751 (least squares, "
      << (f.fitted_c ? "R0, A, B and C: the data reach below 0 degC" : "R0, A and B: no data below 0 degC") << ").\n"
      << "Largest residual " << fixed(f.max_residual, 4) << " K at " << significant(f.max_residual_at, 6) << " degC, RMS "
      << fixed(f.rms_residual, 4) << " K (limit " << significant(limit, 6) << " K).\n\n";
  Table c{.header = {"coefficient", "value", "uncertainty", "unit", "fitted - IEC 60751"}};
  for (const auto& k : f.coefficients) {
    std::string diff = "-";
    if (k.name == "a") diff = significant(f.delta_a, 4);
    if (k.name == "b") diff = significant(f.delta_b, 4);
    if (k.name == "c") diff = significant(f.delta_c, 4);
    if (k.name == "r0") diff = significant(k.value - f.nominal_r0, 6) + " (Pt" + significant(f.nominal_r0, 6) + ")";
    c.rows.push_back({k.name, significant(k.value, 10), k.uncertainty ? significant(*k.uncertainty, 3) : "-", k.unit, diff});
  }
  out << render_text(c);
  if (f.weighted) out << "chi-squared " << significant(f.chi_squared, 4) << " on " << f.dof << " degrees of freedom\n";
  out << "\nAgainst the IEC 60751 curve with R0 = " << significant(f.nominal_r0, 6) << " ohm the data deviate by up to "
      << fixed(f.max_deviation, 4) << " K (at " << significant(f.max_deviation_at, 6) << " degC): "
      << (f.met_class ? "within class " + std::string(to_string(*f.met_class)) + " (" +
                            fixed(100.0 * f.class_use, 0) + " % of its bound at the worst point)"
                      : std::string("outside every class (AA, A, B, C)"))
      << "; the class's validity range for the construction is not checked here.\n\n";
  out << "Residuals of the Callendar-Van Dusen fit (K):\n";
  Table p{.header = {"line", "t (degC)", "R (ohm)", "window", "residual"}};
  for (const auto& r : f.residuals)
    p.rows.push_back({std::to_string(r.line), significant(r.t_celsius, 6), significant(r.r_ohm, 7), r.in_window ? "in" : "outside",
           fixed(r.residual, 4) + (r.solved ? "" : " (no T)")});
  out << render_text(p);
  out << "\nScenario lines for the Callendar-Van Dusen fit; merge them into your scenario file:\n\n"
      << rtd_scenario_snippet(f) << "\nThe NTC models, for comparison:\n\n";
  return out.str();
}

// A table with limits: the R25 and B tolerances that come closest to them.
std::string spread_text(const SpreadFit& s) {
  return "TABLE LIMITS: the beta model's spread closest to the table's limit columns is r25_tol = " +
         significant(100.0 * s.r25_tol, 3) + " %, beta_tol = " + significant(100.0 * s.beta_tol, 3) +
         " %; it differs from the limits by up to " + fixed(s.max_difference, 3) + " K (at " +
         significant(s.max_difference_at, 6) + " degC; positive: wider than the table). Either describe the sensor by the "
         "table with its limits (model = table; r25_tol and beta_tol 0) or by a curve with these tolerances.\n\n";
}

nlohmann::json spread_json(const SpreadFit& s) {
  return {{"r25_tol", s.r25_tol}, {"beta_tol", s.beta_tol}, {"max_difference", s.max_difference},
          {"max_difference_at", s.max_difference_at}};
}

}  // namespace

std::string fit_text(const FitResult& result, const std::string& snippet, const FitExtras& extras) {
  return (extras.rtd ? rtd_text(*extras.rtd, extras.limit) : "") + (extras.spread.found ? spread_text(extras.spread) : "") +
         to_text(result, snippet);
}

std::string fit_csv(const FitResult& result) { return to_csv(result); }

std::string fit_json(const FitResult& result, const std::string& snippet, const FitExtras& extras) {
  nlohmann::json j = to_json(result, snippet);
  if (extras.rtd) j["rtd"] = rtd_json(*extras.rtd, extras.limit);
  if (extras.spread.found) j["spread"] = spread_json(extras.spread);
  return j.dump(2) + "\n";
}

}  // namespace thermargin
