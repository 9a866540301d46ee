// What `thermargin check` prints: every key of the scenario as written, as
// read (with its unit) and where it came from, as text for a person, CSV for
// a spreadsheet and JSON for a program. `design` is the scenario validated
// (build_design). Every output keeps the caution.
#pragma once

#include <string>

#include "thermargin/input/design.hpp"
#include "thermargin/input/scenario.hpp"

namespace thermargin {

// Whether a key takes part in this design: a key of the sensor model in
// use, a tolerance of a part that is there, a supply tolerance of an
// absolute supply, the sampling keys of an ADC with a sampling capacitor,
// the calibration keys of a calibrated unit ...; every key of a section
// that has no such choice (conditions, requirement, montecarlo).
bool key_in_design(const std::string& key, const Design& design);

// The text, by default the keys that take part in this design and those the
// scenario sets (by file, command line or program), grouped by section; then
// the notes on keys set but not used (Design::notes), the active error
// sources with their distribution and standard deviation. `all`: every key.
std::string check_text(const Scenario& scenario, const Design& design, bool all = false);
// The CSV: the caution as a `#` line (csv_caution_line), then key,value,unit,origin,resolved.
std::string check_csv(const Scenario& scenario, const Design& design);
std::string check_json(const Scenario& scenario, const Design& design);  // two-space indent, final newline

}  // namespace thermargin
