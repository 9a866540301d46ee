// `thermargin check`: read and validate a scenario, print every resolved
// value with its unit and where it came from.
#include <nlohmann/json.hpp>
#include <sstream>

#include "cli.hpp"
#include "commands.hpp"
#include "thermargin/caution.hpp"
#include "thermargin/design.hpp"

namespace thermargin::cli {

int run_check(int argc, char** argv) {
  po::options_description own("check options");
  if (help_requested("check", argc, argv, "[FILE] [options]", own, true, false)) return 0;
  const Invocation inv = parse("check", argc, argv, own, true, false);
  const Design design = build_design(inv.scenario);  // validates everything

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
    for (const auto& k : schema) {
      const auto& s = inv.scenario.get(k.key);
      j["rows"].push_back({{"key", k.key}, {"value", s.value}, {"unit", unit_of(k)}, {"origin", s.where.origin()}});
    }
    j["caution"] = std::string(caution);
    out << j.dump(2) << "\n";
  } else if (inv.format == Format::csv) {
    out << "key,value,unit,origin\n";
    for (const auto& k : schema) {
      const auto& s = inv.scenario.get(k.key);
      out << csv_escape(k.key) << "," << csv_escape(s.value) << "," << csv_escape(unit_of(k)) << ","
          << csv_escape(s.where.origin()) << "\n";
    }
  } else {
    out << "Scenario: " << design.title << "\n";
    out << "Valid: every value and combination was accepted. " << design.inputs.size()
        << " toleranced inputs are active.\n\n";
    TextTable t({"key", "value", "unit", "origin"});
    for (const auto& k : schema) {
      const auto& s = inv.scenario.get(k.key);
      if ((k.key.ends_with("_dist") || k.key.ends_with("_gap")) && s.where.kind == Origin::built_in) continue;
      t.add({k.key, s.value.empty() ? "(none)" : s.value, unit_of(k), s.where.origin()});
    }
    out << t.render() << "\n" << caution << "\n";
  }
  emit(inv, out.str());
  return 0;
}

}  // namespace thermargin::cli
