// Resistance–temperature points read from a CSV file: the format of a
// datasheet table or of a measurement log, as a spreadsheet exports it.
//
// One point a line: temperature in °C, resistance in Ω, and optionally the
// point's standard uncertainty (in Ω, or relative with `%`). Separators are
// commas, semicolons or tabs; `#` starts a comment; a first line that is not
// numeric is a header. Values accept engineering notation (`10k`, `4k7`).
// Every malformed line is refused with the file, the line and the column.
//
// A datasheet table may carry the unit spread per temperature (docs/model.md,
// "A sensor's tolerance as its datasheet tabulates it"), told apart by the
// header: columns named with "min" and "max" (R_min and R_max in ohm, in
// either order, after the nominal resistance), or one column named with
// "tol" or "%" (± tolerance in %, R_min = R·(1 − p), R_max = R·(1 + p)).
// Without such a header a third column is the uncertainty, as before.
#pragma once

#include <string>
#include <vector>

namespace thermargin {

struct RtPoint {
  double t_celsius;
  double r_ohm;
  double u_ohm;  // standard uncertainty of r_ohm; 0 when the file gives none
  int line;      // line in the file, for messages
  double r_min_ohm = 0.0;  // limits of a table with limits (has_limits), else 0
  double r_max_ohm = 0.0;
};

struct RtData {
  std::string file;
  std::vector<RtPoint> points;  // in file order
  bool has_uncertainty = false;
  bool has_limits = false;  // every point carries r_min_ohm <= r_ohm <= r_max_ohm
};

// Reads and checks the syntax of every line (numbers, positive resistance,
// temperature above absolute zero). Ordering and count are the caller's rules.
RtData read_rt_data(const std::string& path);

// Parses the same format from text already in memory (`name` is used in messages).
RtData parse_rt_data(const std::string& text, const std::string& name);

// Checks that temperatures are strictly increasing or strictly decreasing,
// not duplicated, and that resistance is strictly monotonic with them; the
// message names the first offending line.
void require_monotonic(const RtData& data);

}  // namespace thermargin
