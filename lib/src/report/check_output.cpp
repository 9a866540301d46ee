// The check's text, CSV and JSON (check_output.hpp): every key of a
// scenario as written, as read with its unit, and where it came from.
#include "thermargin/report/check_output.hpp"

#include <nlohmann/json.hpp>
#include <cstdio>
#include <sstream>

#include "thermargin/chain/rtd_class_range.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/core/number.hpp"
#include "thermargin/report/html_report.hpp"  // csv_cell
#include "thermargin/report/table.hpp"

namespace thermargin {

namespace {

std::string unit_of(const KeySpec& k) { return std::string(unit_symbol(k.quantity)); }

// A deviation in the unit the scenario writes it in (% and ppm/K as typed).
double shown(Quantity q, double v) { return q == Quantity::ratio ? 100.0 * v : q == Quantity::tempco ? 1e6 * v : v; }

// `<key>_k` of a toleranced key (not montecarlo.noise_k): hidden at its default like _dist and _gap.
bool coverage_key(const std::string& key) {
  return key.ends_with("_k") && find_key(key.substr(0, key.size() - 2)) != nullptr;
}

// Each active input: its bound, distribution, coverage factor and standard
// uncertainty σ as the linear budget and Monte Carlo use them.
struct SourceRow {
  std::string name, unit, distribution, k;
  double bound = 0.0, sigma = 0.0;
};
std::vector<SourceRow> source_rows(const Design& d) {
  std::vector<SourceRow> out;
  for (const auto& in : d.inputs) {
    const SourceInfo& i = info(in.source);
    const bool normal = in.distribution == Distribution::normal || in.distribution == Distribution::gapped;
    char k[32] = "-";
    if (normal) std::snprintf(k, sizeof k, "%g", coverage_k(in, d.montecarlo.sigma_per_tol));
    out.push_back({std::string(i.name), std::string(unit_symbol(i.quantity)), std::string(to_string(in.distribution)), k,
                   shown(i.quantity, in.bound), shown(i.quantity, standard_uncertainty(in, d.montecarlo.sigma_per_tol))});
  }
  return out;
}

// What the INL's shape means, said wherever adc.inl is active (docs/model.md §5).
std::string inl_shape_note(const Design& d) {
  if (!(d.adc.inl > 0.0)) return "";
  if (d.adc.inl_bound) return "adc.inl_shape = bound: +/- adc.inl at every code, uniform in the linear budget.";
  return "adc.inl_shape = bow (the default): the INL is zero at both ends of the ADC's range and adc.inl only at "
         "mid-scale, so it is no bound near the ends; a datasheet's INL is a bound at every code, and "
         "adc.inl_shape = bound is the reading a careful review should use.";
}

}  // namespace

std::string check_json(const Scenario& scenario, const Design& design) {
  const auto resolved = resolved_values(scenario, design);
  std::ostringstream out;
  const auto& schema = scenario_schema();
  nlohmann::json j;
  j["command"] = "check";
  j["title"] = design.title;
  j["valid"] = true;
  j["active_inputs"] = nlohmann::json::array();
  for (const auto& in : design.inputs) j["active_inputs"].push_back(std::string(info(in.source).name));
  if (!design.drift_inputs.empty()) {  // over the product's life: active at end of life only
    j["drift_inputs"] = nlohmann::json::array();
    for (const auto& in : design.drift_inputs) j["drift_inputs"].push_back(std::string(info(in.source).name));
  }
  for (const auto& k : schema) {
    const auto& s = scenario.get(k.key);
    const ResolvedValue& r = resolved.at(k.key);
    j["rows"].push_back({{"key", k.key},
                         {"value", s.value},
                         {"unit", unit_of(k)},
                         {"resolved", r.number ? nlohmann::json(*r.number) : nlohmann::json(s.value)},
                         {"as_read", r.text},
                         {"origin", s.where.origin()}});
  }
  j["sources"] = nlohmann::json::array();
  for (const auto& s : source_rows(design))
    j["sources"].push_back({{"source", s.name}, {"bound", s.bound}, {"unit", s.unit}, {"distribution", s.distribution},
                            {"k", s.k == "-" ? nlohmann::json(nullptr) : nlohmann::json(std::stod(s.k))},
                            {"sigma", s.sigma}});
  if (const std::string n = inl_shape_note(design); !n.empty()) j["inl_shape_note"] = n;
  if (const std::string n = rtd_class_range_note(design); !n.empty()) j["rtd_class_note"] = n;
  j["caution"] = std::string(caution);
  out << j.dump(2) << "\n";
  return out.str();
}

std::string check_csv(const Scenario& scenario, const Design& design) {
  const auto resolved = resolved_values(scenario, design);
  std::ostringstream out;
  const auto& schema = scenario_schema();
  // resolved: the number the design uses, in the unit column's unit; words and lists as written.
  out << "key,value,unit,origin,resolved\n";
  for (const auto& k : schema) {
    const auto& s = scenario.get(k.key);
    const ResolvedValue& r = resolved.at(k.key);
    out << csv_cell(k.key) << "," << csv_cell(s.value) << "," << csv_cell(unit_of(k)) << ","
        << csv_cell(s.where.origin()) << "," << csv_cell(r.number ? significant(*r.number) : s.value) << "\n";
  }
  return out.str();
}

std::string check_text(const Scenario& scenario, const Design& design) {
  const auto resolved = resolved_values(scenario, design);
  std::ostringstream out;
  const auto& schema = scenario_schema();
  out << "Scenario: " << design.title << "  (title: " << scenario.get("title").where.origin() << ")\n";
  out << "Valid: every value and combination was accepted. " << design.inputs.size()
      << " toleranced inputs are active"
      << (design.drift_inputs.empty() ? std::string()
                                      : " at delivery, " + std::to_string(design.drift_inputs.size()) +
                                            " more (drift) at end of life")
      << ".\n";
  out << "Each key as written, as read (with its unit) and where it came from.\n\n";
  Table t{.header = {"key", "as written", "as read", "origin"}};
  for (const auto& k : schema) {
    const auto& s = scenario.get(k.key);
    if ((k.key.ends_with("_dist") || k.key.ends_with("_gap") || coverage_key(k.key)) && s.where.kind == Origin::built_in)
      continue;
    if (k.key == "title") continue;  // on the first line
    t.rows.push_back({k.key, s.value.empty() ? "(none)" : s.value, resolved.at(k.key).text, s.where.origin()});
  }
  out << render_text(t) << "\n";
  out << "The active inputs as the engines draw them: a normal bound is k standard deviations (<key>_k; a\n"
         "calibration certificate's +/-U is k = 2), a uniform bound a/sqrt(3), a triangular a/sqrt(6).\n";
  Table src{.header = {"source", "bound", "unit", "distribution", "k", "sigma"}};
  char b[32], sg[32];
  for (const auto& s : source_rows(design)) {
    std::snprintf(b, sizeof b, "%.6g", s.bound);
    std::snprintf(sg, sizeof sg, "%.6g", s.sigma);
    src.rows.push_back({s.name, b, s.unit, s.distribution, s.k, sg});
  }
  out << render_text(src) << "\n";
  if (const std::string n = inl_shape_note(design); !n.empty()) out << n << "\n";
  if (const std::string n = rtd_class_range_note(design); !n.empty()) out << "RTD class: " << n << ".\n";
  out << caution << "\n";
  return out.str();
}

}  // namespace thermargin
