#include "thermargin/input/rt_data.hpp"

#include <fstream>
#include <sstream>

#include "thermargin/core/error.hpp"
#include "thermargin/chain/ntc.hpp"
#include "thermargin/core/number.hpp"
#include "thermargin/core/text_file.hpp"

namespace thermargin {
namespace {

std::vector<std::string> split_fields(const std::string& line) {
  std::vector<std::string> fields;
  std::string current;
  for (char ch : line) {
    if (ch == ',' || ch == ';' || ch == '\t') {
      fields.push_back(current);
      current.clear();
    } else {
      current += ch;
    }
  }
  fields.push_back(current);
  // Trailing empty fields from a spreadsheet's padding are not columns.
  while (fields.size() > 1 && fields.back().find_first_not_of(" \r") == std::string::npos) fields.pop_back();
  return fields;
}

bool looks_numeric(const std::string& field) {
  for (char ch : field) {
    if (ch == ' ' || ch == '\r') continue;
    return (ch >= '0' && ch <= '9') || ch == '-' || ch == '+' || ch == '.';
  }
  return false;
}

}  // namespace

RtData parse_rt_data(const std::string& text, const std::string& name) {
  RtData data;
  data.file = name;
  int line_no = 0;
  bool seen_content = false;
  for (const std::string& raw : split_lines(text, name)) {
    ++line_no;
    std::string line = raw.substr(0, raw.find('#'));
    if (line.find_first_not_of(" \t\r") == std::string::npos) continue;
    auto fields = split_fields(line);
    if (!seen_content && !looks_numeric(fields[0])) {
      seen_content = true;  // a header line
      continue;
    }
    seen_content = true;
    if (fields.size() < 2 || fields.size() > 3)
      reject_at(name, line_no,
                "expected 2 or 3 columns: temperature (degC), resistance (ohm), optional uncertainty (ohm or %); found " +
                    std::to_string(fields.size()));
    Where w{Origin::file, name, line_no, "temperature", 1};
    RtPoint p{};
    p.line = line_no;
    p.t_celsius = parse_quantity(fields[0], Quantity::temperature, w);
    if (p.t_celsius <= -kelvin_offset) reject(w, fields[0], "must be above absolute zero (-273.15 degC)");
    w.key = "resistance";
    w.column = 2;
    p.r_ohm = parse_quantity(fields[1], Quantity::resistance, w);
    if (!(p.r_ohm > 0.0)) reject(w, fields[1], "must be a resistance > 0");
    if (fields.size() == 3) {
      w.key = "uncertainty";
      w.column = 3;
      const bool relative = fields[2].find('%') != std::string::npos;
      const double u = parse_quantity(fields[2], relative ? Quantity::ratio : Quantity::resistance, w);
      if (!(u > 0.0)) reject(w, fields[2], "must be an uncertainty > 0, in ohm or %");
      p.u_ohm = relative ? u * p.r_ohm : u;
      data.has_uncertainty = true;
    }
    data.points.push_back(p);
  }
  for (const auto& p : data.points)
    if (data.has_uncertainty && p.u_ohm == 0.0)
      reject_at(name, p.line, 3, "the uncertainty is missing here but given on other lines; give it on every line or none");
  return data;
}

RtData read_rt_data(const std::string& path) { return parse_rt_data(read_text_file(path), path); }

void require_monotonic(const RtData& data) {
  const auto& p = data.points;
  if (p.size() < 2) return;
  const bool t_up = p[1].t_celsius > p[0].t_celsius;
  const bool r_up = p[1].r_ohm > p[0].r_ohm;
  for (std::size_t i = 1; i < p.size(); ++i) {
    if (p[i].t_celsius == p[i - 1].t_celsius)
      reject_at(data.file, p[i].line, 1, "duplicate temperature; each temperature may appear once");
    if ((p[i].t_celsius > p[i - 1].t_celsius) != t_up)
      reject_at(data.file, p[i].line, 1,
                "temperatures must be strictly increasing (or strictly decreasing) down the file");
    if (p[i].r_ohm == p[i - 1].r_ohm || (p[i].r_ohm > p[i - 1].r_ohm) != r_up)
      reject_at(data.file, p[i].line, 2, "resistance must change strictly monotonically with temperature");
  }
}

}  // namespace thermargin
