// `thermargin table`: the firmware's lookup table for the scenario's chain,
// as a C header or CSV, with its interpolation error and size.
#include <nlohmann/json.hpp>
#include <cstdio>
#include <iostream>
#include <sstream>

#include "cli.hpp"
#include "commands.hpp"
#include "thermargin/report/table_output.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/tools/lookup_table.hpp"

namespace thermargin::cli {

int run_table(int argc, char** argv) {
  po::options_description own("table options");
  own.add_options()("points", po::value<std::string>(), "points in the table, >= 2 [the scenario's firmware.table_points]")(
      "unit", po::value<std::string>(), "storage unit in K, e.g. 0.01 or 0.1 [the scenario's firmware.table_unit]")(
      "type", po::value<std::string>()->default_value("int16"), "C type of the stored values: int16 | int32")(
      "spacing", po::value<std::string>(),
      "code (equal code steps, found by a division) | temperature (equal temperature steps, found by a search) "
      "[the scenario's firmware.table_spacing]")(
      "max-error", po::value<std::string>(), "K: choose the smallest number of points within this error (overrides --points)")(
      "emit", po::value<std::string>(), "write the table itself: c (a C99 header) | csv; without it, the report in --format")(
      "prefix", po::value<std::string>()->default_value("thermargin_lut"), "name prefix of the C header's arrays and macros");
  if (help_requested("table", argc, argv, "[FILE] [options]", own, true, false)) return 0;
  const Invocation inv = parse("table", argc, argv, own, true, false);
  const Design design = build_design(inv.scenario);
  const auto& vm = inv.vm;

  TableSettings s;
  if (vm.count("points")) {
    const std::string text = vm["points"].as<std::string>();
    const double p = parse_quantity(text, Quantity::integer, command_line("table.points"));
    if (!(p >= 2.0 && p <= 1e9)) reject(command_line("table.points"), text, "must be a whole number of points, at least 2");
    s.points = static_cast<int>(p);
  } else {
    s.points = design.firmware.table_points;
    s.points_where = inv.scenario.get("firmware.table_points").where;
    s.points_where.key = "firmware.table_points";
  }
  if (vm.count("unit")) {
    s.unit = parse_quantity(vm["unit"].as<std::string>(), Quantity::temperature_difference, command_line("table.unit"));
  } else {
    s.unit = design.firmware.table_unit;
    s.unit_where = inv.scenario.get("firmware.table_unit").where;
    s.unit_where.key = "firmware.table_unit";
  }
  const std::string type = vm["type"].as<std::string>();
  if (type == "int16") s.type = StorageType::int16;
  else if (type == "int32") s.type = StorageType::int32;
  else reject(command_line("table.type"), type, "must be one of: int16 | int32");
  if (!vm["type"].defaulted()) s.type_where = command_line("table.type");
  const std::string spacing = vm.count("spacing") ? vm["spacing"].as<std::string>()
                                                  : (design.firmware.table_spacing == TableSpacing::code ? "code" : "temperature");
  if (spacing == "code") s.spacing = TableSpacing::code;
  else if (spacing == "temperature") s.spacing = TableSpacing::temperature;
  else reject(command_line("table.spacing"), spacing, "must be one of: code | temperature");
  if (vm.count("max-error"))
    s.max_error = parse_quantity(vm["max-error"].as<std::string>(), Quantity::temperature_difference, command_line("table.max_error"));
  std::string emit_as;
  if (vm.count("emit")) {
    emit_as = vm["emit"].as<std::string>();
    if (emit_as != "c" && emit_as != "csv") reject(command_line("table.emit"), emit_as, "must be one of: c | csv");
    if (!vm["format"].defaulted())
      reject(command_line("table.emit"), emit_as,
             "writes the table itself and takes no --format; drop one of --emit and --format");
  }
  const std::string prefix = vm["prefix"].as<std::string>();
  require_c_prefix(prefix);

  const TableResult r = make_table(design, s);
  std::string text;
  if (emit_as == "c") text = c_header(design, r, prefix);
  else if (emit_as == "csv") text = table_csv(design, r);
  else if (inv.format == Format::json) text = table_report_json(design, r);
  else if (inv.format == Format::csv) text = table_report_csv(design, r);
  else text = table_report_text(design, r);
  emit(inv, text);
  if (!emit_as.empty() && !inv.output.empty())
    std::cout << "Wrote " << inv.output << ": " << table_summary(design, r) << caution << "\n";
  return 0;
}

}  // namespace thermargin::cli
