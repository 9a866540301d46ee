// The comment lines a CSV of one design's results starts with (pick, table,
// response, check): the caution, and where the design uses its RTD class
// beyond the class's rated range (docs/model.md §1), a second line saying so,
// since these CSVs have no per-temperature rows to mark (the budget CSV marks
// each temperature in a column of its own). Presentation only.
#pragma once

#include <string>

#include "thermargin/input/design.hpp"

namespace thermargin {

// csv_caution_line() (report/table.hpp), then "# RTD class: <note>.\n" when
// rtd_class_range_note(d) (chain/rtd_class_range.hpp) is not empty.
std::string csv_preamble(const Design& d);

}  // namespace thermargin
