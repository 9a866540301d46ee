#include "thermargin/input/rt_data.hpp"

#include <cctype>
#include <fstream>
#include <sstream>

#include "thermargin/core/error.hpp"
#include "thermargin/chain/ntc.hpp"
#include "thermargin/core/number.hpp"
#include "thermargin/core/text_file.hpp"
#include "thermargin/core/text.hpp"

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

// The columns of the unit spread, read from the header's names (rt_data.hpp);
// 0: none (1-based columns otherwise).
struct LimitColumns {
  int min = 0, max = 0, tolerance = 0;
  bool any() const { return tolerance > 0 || (min > 0 && max > 0); }
};

// The limit columns stand right after the resistance: a tolerance in column
// 3, R_min and R_max in columns 3 and 4 (either order); a header naming them
// elsewhere is refused here, before any line is read against it.
LimitColumns limit_columns(const std::vector<std::string>& header, const std::string& name, int line_no) {
  LimitColumns c;
  for (std::size_t i = 2; i < header.size(); ++i) {
    const std::string heading = lower_ascii(header[i]);
    const int col = static_cast<int>(i) + 1;
    if (heading.find("min") != std::string::npos) c.min = col;
    else if (heading.find("max") != std::string::npos) c.max = col;
    else if (heading.find("tol") != std::string::npos) c.tolerance = col;
  }
  if (c.tolerance > 0) c.min = c.max = 0;
  const bool tolerance_misplaced = c.tolerance > 0 && c.tolerance != 3;
  const bool limits_misplaced = c.tolerance == 0 && c.min > 0 && c.max > 0 && c.min + c.max != 7;
  if (tolerance_misplaced || limits_misplaced)
    reject_at(name, line_no,
              "the header names the unit spread in the wrong column: a tolerance column must be column 3, R_min "
              "and R_max columns 3 and 4, right after temperature (degC) and resistance (ohm)");
  return c;
}

// The number of columns a line must have, checked before any is read.
void check_column_count(const std::vector<std::string>& fields, const LimitColumns& c, const std::string& name,
                        int line_no) {
  const std::string found = "; found " + std::to_string(fields.size());
  if (!c.any() && (fields.size() < 2 || fields.size() > 3))
    reject_at(name, line_no,
              "expected 2 or 3 columns: temperature (degC), resistance (ohm), optional uncertainty (ohm or %)" + found);
  if (c.tolerance > 0 && fields.size() != 3)
    reject_at(name, line_no, "expected 3 columns: temperature (degC), resistance (ohm), +/- tolerance (%)" + found);
  if (c.tolerance == 0 && c.any() && fields.size() != 4)
    reject_at(name, line_no, "expected 4 columns: temperature (degC), resistance (ohm), R_min and R_max (ohm)" + found);
}

// The limits of one line of a table with limits (its column count checked);
// refused where they do not enclose the nominal resistance.
void read_limits(const std::vector<std::string>& fields, const LimitColumns& c, const std::string& name, int line_no,
                 RtPoint& p) {
  if (c.tolerance > 0) {
    Where w{Origin::file, name, line_no, "tolerance", c.tolerance};
    const std::string& f = fields[static_cast<std::size_t>(c.tolerance - 1)];
    const double tol = f.find('%') != std::string::npos ? parse_quantity(f, Quantity::ratio, w)
                                                        : parse_quantity(f, Quantity::plain, w) / 100.0;
    if (!(tol >= 0.0 && tol < 1.0)) reject(w, f, "must be a +/- tolerance in % from 0 up to (not including) 100 %");
    p.r_min_ohm = p.r_ohm * (1.0 - tol);
    p.r_max_ohm = p.r_ohm * (1.0 + tol);
    return;
  }
  Where w{Origin::file, name, line_no, "r_min", c.min};
  const std::string& fmin = fields[static_cast<std::size_t>(c.min - 1)];
  p.r_min_ohm = parse_quantity(fmin, Quantity::resistance, w);
  if (!(p.r_min_ohm > 0.0 && p.r_min_ohm <= p.r_ohm))
    reject(w, fmin, "must be a resistance > 0 and not above the nominal resistance of the line");
  w.key = "r_max";
  w.column = c.max;
  const std::string& fmax = fields[static_cast<std::size_t>(c.max - 1)];
  p.r_max_ohm = parse_quantity(fmax, Quantity::resistance, w);
  if (!(p.r_max_ohm >= p.r_ohm)) reject(w, fmax, "must be a resistance not below the nominal resistance of the line");
}

}  // namespace

RtData parse_rt_data(const std::string& text, const std::string& name) {
  RtData data;
  data.file = name;
  int line_no = 0;
  bool seen_content = false;
  LimitColumns limits;
  for (const std::string& raw : split_lines(text, name)) {
    ++line_no;
    std::string line = raw.substr(0, raw.find('#'));
    if (line.find_first_not_of(" \t\r") == std::string::npos) continue;
    auto fields = split_fields(line);
    if (!seen_content && !looks_numeric(fields[0])) {
      seen_content = true;  // a header line
      limits = limit_columns(fields, name, line_no);
      data.has_limits = limits.any();
      continue;
    }
    seen_content = true;
    check_column_count(fields, limits, name, line_no);
    Where w{Origin::file, name, line_no, "temperature", 1};
    RtPoint p{};
    p.line = line_no;
    p.t_celsius = parse_quantity(fields[0], Quantity::temperature, w);
    if (p.t_celsius <= -kelvin_offset) reject(w, fields[0], "must be above absolute zero (-273.15 degC)");
    w.key = "resistance";
    w.column = 2;
    p.r_ohm = parse_quantity(fields[1], Quantity::resistance, w);
    if (!(p.r_ohm > 0.0)) reject(w, fields[1], "must be a resistance > 0");
    if (limits.any()) {
      read_limits(fields, limits, name, line_no, p);
    } else if (fields.size() == 3) {
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
