#include "thermargin/report/csv_preamble.hpp"

#include "thermargin/chain/rtd_class_range.hpp"
#include "thermargin/report/table.hpp"

namespace thermargin {

std::string csv_preamble(const Design& d) {
  std::string out = csv_caution_line();
  if (const std::string note = rtd_class_range_note(d); !note.empty()) out += "# RTD class: " + note + ".\n";
  return out;
}

}  // namespace thermargin
