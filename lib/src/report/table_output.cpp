// The lookup table's report as text, CSV and JSON (table_output.hpp).
#include <nlohmann/json.hpp>
#include <cstdio>
#include <iostream>
#include <sstream>

#include "thermargin/report/table_output.hpp"

#include "thermargin/core/number.hpp"
#include "thermargin/report/html_report.hpp"  // csv_cell
#include "thermargin/report/table.hpp"
#include "thermargin/chain/rtd_class_range.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/tools/lookup_table.hpp"

namespace thermargin {

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

std::string table_report_text(const Design& design, const TableResult& result) { return to_text(design, result); }

std::string table_report_csv(const TableResult& result) { return to_csv(result); }

std::string table_report_json(const Design& design, const TableResult& result) { return to_json(design, result); }

}  // namespace thermargin
