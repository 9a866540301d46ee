// The lookup table's report as text, CSV and JSON (table_output.hpp).
#include <nlohmann/json.hpp>
#include <cstdio>
#include <iostream>
#include <sstream>

#include "thermargin/report/table_output.hpp"

#include "thermargin/core/number.hpp"
#include "thermargin/report/html_report.hpp"  // csv_cell
#include "thermargin/report/csv_preamble.hpp"
#include "thermargin/report/table.hpp"
#include "thermargin/chain/rtd_class_range.hpp"
#include "thermargin/core/caution.hpp"
#include "thermargin/chain/firmware.hpp"
#include "thermargin/tools/lookup_table.hpp"

namespace thermargin {

namespace {

nlohmann::json error_json(const InterpolationError& e) {
  return {{"max_abs", e.max_abs},       {"max_signed", e.max_signed}, {"max_at_code", e.max_at_code},
          {"max_at", e.max_at_celsius}, {"rms", e.rms},               {"codes_compared", e.assessed},
          {"stride", e.stride},         {"uncovered", e.uncovered}};
}

// What the ADC cannot show (issue 18): the table's points whose codes lie
// beyond 0 .. 2^N - 1, which no reading reaches, and the part of the range
// t_min .. t_max whose nominal readings lie past a rail (the ADC saturates),
// with the temperatures lost; the rail's temperature is the exact
// conversion's at code 0 or 2^N - 1.
struct RangeNotes {
  std::vector<std::size_t> beyond;  // table points
  struct Lost {
    double from = 0.0, to = 0.0;  // °C
    const char* rail = "";
  };
  std::vector<Lost> lost;
};

RangeNotes range_notes(const Design& d, const TableResult& r) {
  RangeNotes n;
  const double top = d.adc_span() - 1.0;
  for (std::size_t k = 0; k < r.table.size(); ++k)
    if (r.table.code(k) < 0 || static_cast<double>(r.table.code(k)) > top) n.beyond.push_back(k);
  const Firmware fw(d);
  for (const auto& [rail, code] : {std::pair{"bottom", 0.0}, std::pair{"top", top}}) {
    const auto at_rail = fw.exact_temperature(code);
    for (double end : {d.conditions.t_min, d.conditions.t_max}) {
      const auto c = fw.exact_code(end);
      if (!at_rail || !c || (code == 0.0 ? *c >= 0.0 : *c <= top)) continue;
      n.lost.push_back({std::min(end, *at_rail), std::max(end, *at_rail), rail});
    }
  }
  return n;
}

std::string range_notes_text(const Design& d, const TableResult& r) {
  const RangeNotes n = range_notes(d, r);
  std::string out;
  if (!n.beyond.empty()) {
    out += std::to_string(n.beyond.size()) + " point(s) lie beyond the ADC's codes 0.." +
           std::to_string(static_cast<long long>(d.adc_span()) - 1) + " (point";
    for (std::size_t k : n.beyond) out += " " + std::to_string(k) + " at code " + std::to_string(r.table.code(k)) + ",";
    out.back() = ')';
    out += ": no reading reaches them; they only bound the interpolation.\n";
  }
  for (const auto& l : n.lost)
    out += "The range is cut short by saturation: from " + fixed(l.from, 2) + " to " + fixed(l.to, 2) +
           " degC the nominal reading is past the ADC's " + l.rail + " rail, and those temperatures are lost.\n";
  return out;
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
  // What the ADC cannot show, only where there is any (range_notes).
  if (const RangeNotes n = range_notes(d, r); !n.beyond.empty() || !n.lost.empty()) {
    j["points_beyond_adc"] = n.beyond;
    j["lost_to_saturation"] = nlohmann::json::array();
    for (const auto& l : n.lost) j["lost_to_saturation"].push_back({{"from", l.from}, {"to", l.to}, {"rail", l.rail}});
  }
  j["caution"] = std::string(caution);
  return j.dump(2) + "\n";
}

std::string to_csv(const Design& d, const TableResult& r) {
  const auto& t = r.table;
  std::ostringstream out;
  out << csv_preamble(d);
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
  out << "thermargin table - " << d.title << "\n\n" << table_summary(d, r) << range_notes_text(d, r) << "\n";
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

std::string table_report_csv(const Design& design, const TableResult& result) { return to_csv(design, result); }

std::string table_report_json(const Design& design, const TableResult& result) { return to_json(design, result); }

}  // namespace thermargin
