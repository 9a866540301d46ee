// `thermargin budget`: error bands across the range and the verdict.
#include <nlohmann/json.hpp>
#include <sstream>

#include "cli.hpp"
#include "commands.hpp"
#include "thermargin/caution.hpp"
#include "thermargin/chain.hpp"
#include "thermargin/nominal.hpp"

namespace thermargin::cli {

namespace {

nlohmann::json number_or_null(double v) { return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr); }

}  // namespace

int run_budget(int argc, char** argv) {
  po::options_description own("budget options");
  if (help_requested("budget", argc, argv, "[FILE] [options]", own, true)) return 0;
  const Invocation inv = parse("budget", argc, argv, own, true, true);
  const Design design = build_design(inv.scenario);
  const Chain chain(design);
  const auto points = nominal_sweep(chain);

  std::ostringstream out;
  if (inv.format == Format::json) {
    nlohmann::json j;
    j["command"] = "budget";
    j["title"] = design.title;
    j["units"] = {{"temperature", "degC"}, {"error", "K"}, {"sensitivity", "LSB/K"}, {"voltage", "V"}};
    j["points"] = nlohmann::json::array();
    for (const auto& p : points) {
      nlohmann::json row{{"t", p.t}};
      if (p.status != Status::ok) {
        row["status"] = std::string(to_string(p.status));
        if (p.status == Status::saturated) row["saturated"] = true;
      } else {
        row["v_node"] = p.v_node;
        row["code"] = p.code;
        row["sensitivity"] = p.sensitivity;
        row["mv_per_k"] = p.mv_per_k;
        row["lsb_in_k"] = number_or_null(p.lsb_in_k);
        row["self_heating"] = p.self_heating;
        row["nominal"] = p.error;
      }
      j["points"].push_back(row);
    }
    j["caution"] = std::string(caution);
    out << j.dump(2) << "\n";
  } else if (inv.format == Format::csv) {
    out << "t_degC,status,v_node_V,code_LSB,sensitivity_LSB_per_K,sensitivity_mV_per_K,lsb_K,self_heating_K,nominal_K\n";
    for (const auto& p : points) {
      out << fixed(p.t, 3) << "," << to_string(p.status);
      if (p.status == Status::ok)
        out << "," << fixed(p.v_node, 6) << "," << fixed(p.code, 3) << "," << fixed(p.sensitivity, 4) << ","
            << fixed(p.mv_per_k, 4) << "," << fixed(p.lsb_in_k, 5) << "," << fixed(p.self_heating, 6) << ","
            << fixed(p.error, 5);
      else
        out << ",,,,,,,";
      out << "\n";
    }
  } else {
    out << design.title << "\n\n";
    TextTable t({"t (degC)", "V node (V)", "code (LSB)", "LSB/K", "mV/K", "1 LSB (K)", "self-heat (K)", "nominal (K)"});
    for (const auto& p : points) {
      if (p.status != Status::ok) {
        t.add({fixed(p.t, 2), std::string(describe(p.status))});
        continue;
      }
      t.add({fixed(p.t, 2), fixed(p.v_node, 4), fixed(p.code, 1), fixed(p.sensitivity, 2), fixed(p.mv_per_k, 3),
             fixed(p.lsb_in_k, 4), fixed(p.self_heating, 4), fixed(p.error, 4)});
    }
    out << t.render() << "\n" << caution << "\n";
  }
  emit(inv, out.str());
  return 0;
}

}  // namespace thermargin::cli
