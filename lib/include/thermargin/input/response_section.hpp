// The scenario's [response] section and requirement.include_dynamic
// (docs/response.md): how fast the sensor follows the medium, how the
// firmware filters its readings, and the ramp and step the reading must
// follow.
//
// Read here, apart from the Design, because only the commands that follow a
// changing temperature (`response`, and `budget`'s dynamic line) use it;
// but validated with every other section: build_design() calls it, so a bad
// value is refused whoever set it (a scenario file, the command line, a
// catalogue's setting, a program's Scenario::set), and every command that
// reads a scenario calls it when the options are read (app/cli.cpp), before
// any work whatever the command.
#pragma once

#include <string>

#include "thermargin/input/scenario.hpp"

namespace thermargin {

enum class FilterKind { none, moving_average, exponential };

// The firmware's filter of successive readings x_k:
//   none            y_k = x_k
//   moving-average  y_k = (x_k + x_{k-1} + ... + x_{k-N+1}) / N
//   exponential     y_k = y_{k-1} + alpha·(x_k − y_{k-1})
struct Filter {
  FilterKind kind = FilterKind::none;
  int length = 1;      // N ≥ 1 (moving average)
  double alpha = 1.0;  // in (0, 1] (exponential)
};

struct ResponseSettings {
  double time_constant = 10.0;      // s, τ > 0 (nominal)
  double time_constant_tol = 0.0;   // ± relative, [0, 1)
  double reading_period = 1.0;      // s, T_r > 0
  Filter filter;                    // the scenario's choice
  double ramp = 0.0;                // K/s (the key is in K/min); 0 = no ramp stated
  double step = 10.0;               // K > 0
  double settle_to = 0.1;           // K > 0
  bool present = false;             // some [response] key was set by a file or the command line
  bool include_dynamic = false;     // requirement.include_dynamic

  double time_constant_max() const { return time_constant * (1.0 + time_constant_tol); }
  double ramp_per_minute() const { return ramp * 60.0; }
};

// Reads and validates the section. Refused with input_error naming file,
// line and key: a time constant or reading period that is not > 0, a
// tolerance outside [0, 100 %), N < 1 (or above 65536), alpha outside
// (0, 1], an unknown filter, a negative ramp, a step or settle_to not > 0,
// a ramp with no limit to meet (requirement.max_error never stated by the
// scenario or the command line), include_dynamic without a [response]
// section, or with requirement.basis = monte-carlo (a yield has no room for
// an added error).
ResponseSettings read_response_section(const Scenario& s);

}  // namespace thermargin
