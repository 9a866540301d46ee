// The check's text, CSV and JSON (check_output.hpp): every key of a
// scenario as written, as read with its unit, and where it came from.
#include "thermargin/report/check_output.hpp"

#include <nlohmann/json.hpp>
#include <cstdio>
#include <initializer_list>
#include <sstream>

#include "thermargin/chain/rtd_class_range.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/core/number.hpp"
#include "thermargin/chain/rt_table.hpp"
#include "thermargin/report/html_report.hpp"  // csv_cell
#include "thermargin/report/csv_preamble.hpp"
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
  if (d.adc.inl_bound)
    return "adc.inl_shape = bound (the default): +/- adc.inl at every code, uniform in the linear budget, as a "
           "datasheet's INL is a bound at every code; bow is for a converter whose INL curve is known to bow.";
  return "adc.inl_shape = bow: the INL is zero at both ends of the ADC's range and adc.inl only at mid-scale, so it "
         "is no bound near the ends; use it only when the converter's INL curve is known to bow.";
}

bool starts(const std::string& key, std::initializer_list<const char*> keys) {
  for (const char* k : keys)
    if (key == k) return true;
  return false;
}

}  // namespace

bool key_in_design(const std::string& key, const Design& d) {
  const SensorSettings& se = d.sensor;
  const bool table_limits = se.kind == SensorKind::table && se.table && se.table->has_limits();
  if (starts(key, {"sensor.r25", "sensor.beta"})) return se.kind == SensorKind::beta;
  if (starts(key, {"sensor.r25_tol", "sensor.beta_tol"})) return d.is_ntc() && !table_limits;
  if (starts(key, {"sensor.a", "sensor.b", "sensor.c"})) return se.kind == SensorKind::steinhart_hart;
  if (key == "sensor.table_file") return se.kind == SensorKind::table;
  if (starts(key, {"sensor.r0", "sensor.rtd_class", "sensor.cvd_a", "sensor.cvd_b", "sensor.cvd_c", "sensor.rtd_construction"}))
    return se.kind == SensorKind::rtd;
  if (key == "sensor.dissipation_tol") return se.dissipation > 0.0;
  if (key == "divider.r_parallel_tol") return d.divider.r_parallel.has_value();
  if (key == "divider.settle_time") return d.divider.c_node > 0.0;
  if (starts(key, {"supply.v_reference", "supply.v_reference_tol", "supply.v_reference_tempco", "supply.v_reference_drift",
                   "supply.v_reference_hysteresis", "supply.v_excitation_tol", "supply.v_excitation_tempco",
                   "supply.v_excitation_drift"}))
    return !d.supply.ratiometric;
  if (starts(key, {"supply.r_drive_tol", "firmware.drive_compensation"})) return d.supply.r_drive > 0.0;
  if (starts(key, {"adc.r_switch", "adc.t_acq", "adc.sample_rate", "adc.precharge"})) return d.adc.samples_settle();
  if (key == "adc.inl_shape") return d.adc.inl > 0.0;
  if (starts(key, {"firmware.r25", "firmware.beta"})) return d.firmware.conversion == Conversion::beta;
  if (starts(key, {"firmware.a", "firmware.b", "firmware.c"})) return d.firmware.conversion == Conversion::steinhart_hart;
  if (starts(key, {"firmware.table_points", "firmware.table_unit", "firmware.table_spacing"}))
    return d.firmware.conversion == Conversion::table;
  if (starts(key, {"firmware.calibration_at", "firmware.calibration_uncertainty", "firmware.calibration_dissipation"}))
    return d.firmware.calibration != Calibration::none;
  if (key.starts_with("response.")) return false;  // the [response] section: shown where the scenario sets it
  return true;
}

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
  if (!design.notes.empty()) j["notes"] = design.notes;  // keys set but not used here
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
  out << csv_preamble(design) << "key,value,unit,origin,resolved\n";
  for (const auto& k : schema) {
    const auto& s = scenario.get(k.key);
    const ResolvedValue& r = resolved.at(k.key);
    out << csv_cell(k.key) << "," << csv_cell(s.value) << "," << csv_cell(unit_of(k)) << ","
        << csv_cell(s.where.origin()) << "," << csv_cell(r.number ? significant(*r.number) : s.value) << "\n";
  }
  return out.str();
}

namespace {

// The keys shown, a table per section: `all`, or those in the design and those set.
std::string keys_text(const Scenario& scenario, const Design& design, bool all, int& hidden) {
  const auto resolved = resolved_values(scenario, design);
  std::string out, section;
  Table t;
  auto flush = [&] {
    if (!t.rows.empty()) out += "[" + section + "]\n" + render_text(t, {100, 1}) + "\n";
    t.rows.clear();
  };
  for (const auto& k : scenario_schema()) {
    const auto& s = scenario.get(k.key);
    const bool set = s.where.kind != Origin::built_in;
    if ((k.key.ends_with("_dist") || k.key.ends_with("_gap") || coverage_key(k.key)) && !set) continue;
    if (k.key == "title") continue;  // on the first line
    if (!all && !set && !key_in_design(k.key, design)) {
      ++hidden;
      continue;
    }
    const auto dot = k.key.find('.');
    const std::string sec = k.key.substr(0, dot);
    if (sec != section) flush();
    section = sec;
    t.header = {"key", "as written", "as read", "origin"};
    t.rows.push_back({k.key.substr(dot + 1), s.value.empty() ? "(none)" : s.value, resolved.at(k.key).text, s.where.origin()});
  }
  flush();
  return out;
}

}  // namespace

std::string check_text(const Scenario& scenario, const Design& design, bool all) {
  std::ostringstream out;
  out << "Scenario: " << design.title << "  (title: " << scenario.get("title").where.origin() << ")\n";
  out << "Valid: every value and combination was accepted. " << design.inputs.size()
      << " toleranced inputs are active"
      << (design.drift_inputs.empty() ? std::string()
                                      : " at delivery, " + std::to_string(design.drift_inputs.size()) +
                                            " more (drift) at end of life")
      << ".\n";
  int hidden = 0;
  const std::string keys = keys_text(scenario, design, all, hidden);
  out << (all ? "Every key as written, as read (with its unit) and where it came from, by section.\n\n"
              : "The keys that take part in this design and those the scenario sets, as written, as read (with its\n"
                "unit) and where they came from, by section; " + std::to_string(hidden) +
                    " keys that play no part here: --all.\n\n");
  out << keys;
  if (!design.notes.empty()) {
    out << "Notes: keys set that this design's choices make irrelevant (their values are not used):\n";
    for (const auto& n : design.notes) out << "  " << n << "\n";
    out << "\n";
  }
  out << "The active error sources as the engines draw them: a normal bound is k standard deviations (<key>_k;\n"
         "a calibration certificate's +/-U is k = 2), a uniform bound a/sqrt(3), a triangular a/sqrt(6).\n";
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
