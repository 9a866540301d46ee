// `thermargin table`: the firmware's lookup table for the scenario's chain,
// as a C header or CSV, with its interpolation error and size.
#include <nlohmann/json.hpp>
#include <cstdio>
#include <iostream>
#include <sstream>

#include "cli.hpp"
#include "commands.hpp"
#include "thermargin/chain/rtd_class_range.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/tools/lookup_table.hpp"

namespace thermargin::cli {

namespace {


nlohmann::json error_json(const InterpolationError& e) {
  return {{"max_abs", e.max_abs},       {"max_signed", e.max_signed}, {"max_at_code", e.max_at_code},
          {"max_at", e.max_at_celsius}, {"rms", e.rms},               {"codes_compared", e.assessed},
          {"stride", e.stride},         {"uncovered", e.uncovered}};
}

std::string to_json(const Design& d, const TableResult& r) {
  const auto& t = r.table;
  nlohmann::json j;
  j["command"] = "table";
  j["title"] = d.title;
  j["units"] = {{"temperature", "degC"}, {"error", "K"}, {"stored", "counts of unit K"}};
  j["spacing"] = t.spacing() == TableSpacing::code ? "code" : "temperature";
  j["points"] = t.size();
  j["first_code"] = t.code(0);
  j["last_code"] = t.last_code();
  if (t.spacing() == TableSpacing::code) j["step"] = t.step;
  j["unit"] = t.unit;
  j["type"] = std::string(to_string(r.type));
  j["size_bytes"] = r.bytes();
  j["range_codes"] = {{"first", r.error.first_code}, {"last", r.error.last_code}};
  j["max_interpolation_error"] = r.error.max_abs;
  j["max_interpolation_error_at_code"] = r.error.max_at_code;
  j["max_interpolation_error_at"] = r.error.max_at_celsius;
  j["rms_interpolation_error"] = r.error.rms;
  j["interpolation_error"] = error_json(r.error);
  if (r.limit) {
    j["max_error_limit"] = *r.limit;
    j["one_fewer"] = r.one_fewer ? error_json(*r.one_fewer) : nlohmann::json(nullptr);
  }
  j["used_by_chain"] = r.used_by_chain;
  j["rows"] = nlohmann::json::array();
  for (std::size_t k = 0; k < t.size(); ++k) {
    nlohmann::json row{{"code", t.code(k)}, {"temperature", stored_celsius(t, k)}, {"stored", t.stored[k]}};
    if (k + 1 < t.size())
      row["max_error_to_next"] = r.interval_max[k] ? nlohmann::json(*r.interval_max[k]) : nlohmann::json(nullptr);
    j["rows"].push_back(row);
  }
  if (const std::string note = rtd_class_range_note(d); !note.empty()) j["rtd_class_note"] = note;
  j["caution"] = std::string(caution);
  return j.dump(2) + "\n";
}

std::string to_csv(const TableResult& r) {
  const auto& t = r.table;
  std::ostringstream out;
  out << "# " << caution << "\n";
  out << "code,temperature_degC,stored,max_error_to_next_K\n";
  for (std::size_t k = 0; k < t.size(); ++k) {
    out << t.code(k) << "," << significant(stored_celsius(t, k)) << "," << t.stored[k] << ","
        << (k + 1 < t.size() && r.interval_max[k] ? fixed(*r.interval_max[k], 6) : std::string()) << "\n";
  }
  return out.str();
}

std::string to_text(const Design& d, const TableResult& r) {
  const auto& t = r.table;
  std::ostringstream out;
  out << "thermargin table - " << d.title << "\n\n" << table_summary(d, r) << "\n";
  int decimals = 0;
  for (double u = t.unit; u < 0.999999 && decimals < 6; u *= 10.0) ++decimals;
  Table tt{.header = {"point", "code", "temperature (degC)", "stored", "largest error to next (K)"}};
  for (std::size_t k = 0; k < t.size(); ++k)
    tt.rows.push_back({std::to_string(k), std::to_string(t.code(k)), fixed(stored_celsius(t, k), decimals),
            std::to_string(t.stored[k]),
            k + 1 == t.size() ? "" : r.interval_max[k] ? fixed(*r.interval_max[k], 4) : "outside the range"});
  out << render_text(tt) << "\n";
  if (const std::string note = rtd_class_range_note(d); !note.empty()) out << "RTD class: " << note << ".\n";
  out << caution << "\n";
  return out.str();
}

}  // namespace

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
  else if (inv.format == Format::json) text = to_json(design, r);
  else if (inv.format == Format::csv) text = to_csv(r);
  else text = to_text(design, r);
  emit(inv, text);
  if (!emit_as.empty() && !inv.output.empty())
    std::cout << "Wrote " << inv.output << ": " << table_summary(design, r) << caution << "\n";
  return 0;
}

}  // namespace thermargin::cli
