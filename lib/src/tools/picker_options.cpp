// The picker's options as read from the command line (picker.hpp): the
// candidate range and values, the series, the objective, the grade and the
// constraints' limits. Each bad value is one input_error naming the option.
#include <string>
#include <vector>

#include "thermargin/core/error.hpp"
#include "thermargin/core/number.hpp"
#include "thermargin/tools/picker.hpp"
#include "thermargin/tools/series.hpp"

namespace thermargin {

ResistanceRange parse_range(std::string_view text, const Where& where) {
  const auto dots = text.find("..");
  if (dots == std::string_view::npos)
    reject(where, text, "must be LOW..HIGH in ohms, engineering notation (e.g. 1k..1M)");
  ResistanceRange r;
  r.low = parse_quantity(text.substr(0, dots), Quantity::resistance, where);
  r.high = parse_quantity(text.substr(dots + 2), Quantity::resistance, where);
  if (!(r.low > 0.0 && r.high > r.low)) reject(where, text, "must be LOW..HIGH with 0 < LOW < HIGH (e.g. 1k..1M)");
  return r;
}

std::vector<double> parse_values(std::string_view text, const Where& where) {
  std::vector<double> out;
  std::size_t start = 0;
  for (;;) {
    const auto comma = text.find(',', start);
    const std::string_view item = text.substr(start, comma == std::string_view::npos ? std::string_view::npos : comma - start);
    const double v = parse_quantity(item, Quantity::resistance, where);
    if (!(v > 0.0)) reject(where, text, "every value must be a resistance > 0 (e.g. 4k7,10k,22k)");
    out.push_back(v);
    if (comma == std::string_view::npos) break;
    start = comma + 1;
  }
  return out;
}

Series parse_series(std::string_view text, const Where& where) {
  const auto s = series_from_name(text);
  if (!s) reject(where, text, "must be one of: " + std::string(series_names()));
  return *s;
}

Objective parse_objective(std::string_view text, const Where& where) {
  const auto o = objective_from_name(text);
  if (!o) reject(where, text, "must be one of: " + std::string(objective_names()));
  return *o;
}

Grade parse_grade(std::string_view text, const Where& where) {
  Grade g;
  const auto comma = text.find(',');
  g.series = text.substr(0, comma) == "series";
  if (!g.series) {
    try {
      g.tolerance = parse_quantity(text.substr(0, comma), Quantity::ratio, where);
    } catch (const input_error&) {
      reject(where, text, "expected a fraction such as 0.1% (then optionally a tempco: 0.1%,25ppm), or 'series' for the "
                          "tolerance IEC 60063 pairs with the series (series,25ppm)");
    }
  }
  if (!(g.tolerance >= 0.0 && g.tolerance < 1.0))
    reject(where, text, "the tolerance must be from 0 up to (not including) 100 % (e.g. 0.1% or 0.1%,25ppm)");
  if (comma != std::string_view::npos) {
    g.tempco = parse_quantity(text.substr(comma + 1), Quantity::tempco, where);
    if (!(*g.tempco >= 0.0 && *g.tempco < 0.01))
      reject(where, text, "the tempco must be from 0 up to (not including) 10000 ppm/K (e.g. 0.1%,25ppm)");
  }
  return g;
}

double parse_limit(std::string_view text, Quantity q, const Where& where) {
  const double v = parse_quantity(text, q, where);
  if (!(v > 0.0)) reject(where, text, "must be > 0");
  return v;
}

}  // namespace thermargin
