// The firmware's lookup table as a deliverable (`thermargin table`): built
// from the scenario's nominal chain by build_lookup_table() in firmware.hpp —
// the very table the chain's `table` conversion reads — checked against the
// integer type it is stored in, measured against the exact conversion at
// every code of the range, sized to an error limit, and written as a C
// header or CSV. Between its points the firmware interpolates linearly; the
// error of that secant on a smooth curve is at most h²·max|f''|/8 over an
// interval of width h (the linear-interpolation error bound of numerical
// analysis texts such as Burden & Faires, Numerical Analysis, ch. 3; cited
// from memory), plus the
// rounding of the stored integers (half a storage unit). The error reported
// here is not that bound but the measured difference at each code.
// docs/table.md describes the construction, the search and the report.
#pragma once

#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "thermargin/input/design.hpp"
#include "thermargin/core/error.hpp"
#include "thermargin/chain/firmware.hpp"

namespace thermargin {

// The C type the stored temperatures are emitted as.
enum class StorageType { int16, int32 };
std::string_view to_string(StorageType t);  // "int16", "int32"
std::int64_t storage_min(StorageType t);
std::int64_t storage_max(StorageType t);
std::size_t storage_bytes(StorageType t);

// What to build. A setting that cannot be used is refused with an
// input_error naming it as `where` says (the command line's table.points,
// table.unit, table.type, table.max_error by default; the scenario's
// firmware.table_points or firmware.table_unit when the value came from there).
struct TableSettings {
  int points = 33;      // P ≥ 2 and at most one point per code of the table's span
  double unit = 0.01;   // K per stored count, 0.0001..1
  TableSpacing spacing = TableSpacing::code;
  StorageType type = StorageType::int16;
  // K > 0: choose the smallest P whose error over the range is within it
  // (`points` is then ignored).
  std::optional<double> max_error;

  Where points_where = command_line("table.points");
  Where unit_where = command_line("table.unit");
  Where type_where{Origin::built_in, "", 0, "table.type"};
  Where max_error_where = command_line("table.max_error");
};

// The table against the exact conversion over the codes of the range: every
// integer code from ceil(low) to floor(high) of range_codes() — the readings
// of temperatures t_min..t_max — that the exact conversion can invert. On an
// ADC with more than 2^20 such codes every `stride`-th code is compared
// (and the last): the error is a smooth function of the code between points.
struct InterpolationError {
  std::int64_t first_code = 0, last_code = 0;  // the range's codes, ascending
  std::int64_t stride = 1;
  std::size_t assessed = 0;    // codes compared
  std::size_t uncovered = 0;   // codes of the range that the table cannot convert
  double max_abs = 0.0;        // K: the largest |table − exact|
  double max_signed = 0.0;     // K: that error with its sign (positive: the table reads warm)
  std::int64_t max_at_code = 0;
  double max_at_celsius = 0.0; // °C: the exact temperature at that code
  double rms = 0.0;            // K: over the codes compared
  // Includes the rounding of the stored integers; uncovered codes fail any limit.
  bool within(double limit) const { return uncovered == 0 && max_abs <= limit; }
};

struct TableResult {
  LookupTable table;
  StorageType type = StorageType::int16;
  int adc_bits = 12;
  InterpolationError error;
  // Per interval k (between points k and k+1): the largest |error| among its
  // compared codes; absent where none of the range's codes falls inside.
  std::vector<std::optional<double>> interval_max;
  // Set when P was chosen by an error limit: the limit, and the error of the
  // table with one point fewer (absent when P = 2).
  std::optional<double> limit;
  std::optional<InterpolationError> one_fewer;
  // The table is the one the scenario's firmware converts with (conversion =
  // table, and the chain's table has the same codes, unit and stored integers).
  bool used_by_chain = false;

  std::string_view stored_type() const { return type == StorageType::int16 ? "int16_t" : "int32_t"; }
  std::string_view code_type() const { return adc_bits <= 16 ? "uint16_t" : "uint32_t"; }
  // The bytes the firmware stores: the temperatures, and their codes when
  // spaced in temperature.
  std::size_t bytes() const;
};

// Builds, checks and measures the table for a design. Throws input_error
// when a setting cannot be used (P < 2 or more points than codes, a unit
// outside 0.0001..1 K, a stored value outside the type — the message names
// the value, its code and temperature — or a limit no table can meet).
TableResult make_table(const Design& d, const TableSettings& s);

// The error of any table against the exact conversion of the design.
InterpolationError interpolation_error(const Design& d, const LookupTable& table);

// A C99 header: a comment block (title, unit, spacing, error, caution), the
// sizes, first and last code, step and unit as #defines, the stored array
// (and the codes array when spaced in temperature), and a static inline
// integer interpolation. Names start with `prefix` (a C identifier; macros in
// upper case); a prefix that is not one is refused as table.prefix.
std::string c_header(const Design& d, const TableResult& r, const std::string& prefix = "thermargin_lut");
void require_c_prefix(const std::string& prefix);

// The table as CSV: `#` comment lines (title, unit, spacing, error, caution),
// then code,temperature_degC,stored.
std::string table_csv(const Design& d, const TableResult& r);

// One paragraph for people: points, spacing, codes, storage, size, error.
std::string table_summary(const Design& d, const TableResult& r);

// The stored value as °C (what the firmware computes from it).
inline double stored_celsius(const LookupTable& t, std::size_t k) { return static_cast<double>(t.stored[k]) * t.unit; }

}  // namespace thermargin
