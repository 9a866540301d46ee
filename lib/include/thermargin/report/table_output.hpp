// What `thermargin table` prints without --emit: the lookup table
// (lookup_table.hpp) with its interpolation error, as text for a person, CSV
// for a spreadsheet and JSON for a program. The table itself (--emit c or
// csv) is c_header() and table_csv() in lookup_table.hpp. Presentation only.
// Every output keeps the caution.
#pragma once

#include <string>

#include "thermargin/input/design.hpp"
#include "thermargin/tools/lookup_table.hpp"

namespace thermargin {

std::string table_report_text(const Design& design, const TableResult& result);
std::string table_report_csv(const Design& design, const TableResult& result);  // one line per point
std::string table_report_json(const Design& design, const TableResult& result);  // two-space indent, final newline

}  // namespace thermargin
