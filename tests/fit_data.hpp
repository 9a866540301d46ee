// The R–T data files of the fit tests: tests/data/fit/, computed from
// published equations by generate.py; none is a measurement.
#pragma once

#include <string>

#include "source_tree.hpp"
#include "thermargin/input/rt_data.hpp"

namespace thermargin::testing {

inline std::string fit_data_file(const std::string& name) { return data_path("fit/" + name); }

// The resistance of the file's point at exactly `t_celsius`; 0 when it has none.
inline double resistance_at(const RtData& data, double t_celsius) {
  double r = 0.0;
  for (const auto& p : data.points)
    if (p.t_celsius == t_celsius) r = p.r_ohm;
  return r;
}

}  // namespace thermargin::testing
