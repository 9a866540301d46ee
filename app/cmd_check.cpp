// `thermargin check`: read and validate a scenario, print every resolved
// value with its unit and where it came from.
#include <nlohmann/json.hpp>
#include <cstdio>
#include <sstream>

#include "cli.hpp"
#include "commands.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/input/design.hpp"

namespace thermargin::cli {

int run_check(int argc, char** argv) {
  po::options_description own("check options");
  if (help_requested("check", argc, argv, "[FILE] [options]", own, true, false)) return 0;
  const Invocation inv = parse("check", argc, argv, own, true, false);
  const Design design = build_design(inv.scenario);  // validates everything

  const auto resolved = resolved_values(inv.scenario, design);

  std::ostringstream out;
  const auto& schema = scenario_schema();
  auto unit_of = [](const KeySpec& k) { return std::string(unit_symbol(k.quantity)); };
  if (inv.format == Format::json) {
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
      const auto& s = inv.scenario.get(k.key);
      const ResolvedValue& r = resolved.at(k.key);
      j["rows"].push_back({{"key", k.key},
                           {"value", s.value},
                           {"unit", unit_of(k)},
                           {"resolved", r.number ? nlohmann::json(*r.number) : nlohmann::json(s.value)},
                           {"as_read", r.text},
                           {"origin", s.where.origin()}});
    }
    j["caution"] = std::string(caution);
    out << j.dump(2) << "\n";
  } else if (inv.format == Format::csv) {
    // resolved: the number the design uses, in the unit column's unit; words and lists as written.
    out << "key,value,unit,origin,resolved\n";
    for (const auto& k : schema) {
      const auto& s = inv.scenario.get(k.key);
      const ResolvedValue& r = resolved.at(k.key);
      char number[32];
      if (r.number) std::snprintf(number, sizeof number, "%.10g", *r.number);
      out << csv_escape(k.key) << "," << csv_escape(s.value) << "," << csv_escape(unit_of(k)) << ","
          << csv_escape(s.where.origin()) << "," << csv_escape(r.number ? std::string(number) : s.value) << "\n";
    }
  } else {
    out << "Scenario: " << design.title << "  (title: " << inv.scenario.get("title").where.origin() << ")\n";
    out << "Valid: every value and combination was accepted. " << design.inputs.size()
        << " toleranced inputs are active"
        << (design.drift_inputs.empty() ? std::string()
                                        : " at delivery, " + std::to_string(design.drift_inputs.size()) +
                                              " more (drift) at end of life")
        << ".\n";
    out << "Each key as written, as read (with its unit) and where it came from.\n\n";
    TextTable t({"key", "as written", "as read", "origin"});
    for (const auto& k : schema) {
      const auto& s = inv.scenario.get(k.key);
      if ((k.key.ends_with("_dist") || k.key.ends_with("_gap")) && s.where.kind == Origin::built_in) continue;
      if (k.key == "title") continue;  // on the first line
      t.add({k.key, s.value.empty() ? "(none)" : s.value, resolved.at(k.key).text, s.where.origin()});
    }
    out << t.render() << "\n" << caution << "\n";
  }
  emit(inv, out.str());
  return 0;
}

}  // namespace thermargin::cli
