// A catalogue of part grades with their prices: what purchasing can buy for
// each place in the design, read from the CSV a spreadsheet exports.
//
// The file is CSV as RFC 4180 defines it (fields separated by commas,
// records by CRLF or LF, a field that holds a comma, a quote or a line break
// written in double quotes with its quotes doubled), with a header row. The
// columns are `slot`, `grade`, `unit_cost` and `settings` (required) and
// `notes` and `setup_cost` (optional), in any order. Each row is one option
// for one slot; `settings` is a `;`-separated list of scenario overrides
// (`sensor.r25_tol=3%;sensor.beta_tol=2%`), so any scenario key can be
// graded (the thermistor, the fixed resistor, the reference, the ADC, a
// production calibration with its per-unit test cost). Two conveniences
// beyond RFC 4180: blank lines are skipped and a line starting with `#` is a
// comment. docs/grades.md describes the format for users.
//
// Everything that can be checked without the scenario is checked here, each
// refusal naming the file, the line and the column: unknown, repeated or
// missing columns, a malformed field, an empty slot or grade, a negative or
// unreadable cost, a grade given twice in a slot, a setting that is not
// `key=value` or names no scenario key, a key set twice in one option or by
// two slots. Whether a setting's value is usable is decided by building the
// design with it (grades.hpp).
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "thermargin/core/error.hpp"

namespace thermargin {

// One scenario override of an option, with where it was written.
struct GradeSetting {
  std::string key;    // "sensor.r25_tol"
  std::string value;  // as written ("3%"); a relative *_file path is made relative to the catalogue
  Where where;        // Origin::catalogue, the catalogue file, the row's line and the settings column
};

// One purchasable option for one slot.
struct GradeOption {
  std::string grade;         // "1%", "tight", ... (unique within its slot)
  double unit_cost = 0.0;    // per unit built, in the catalogue's currency
  double setup_cost = 0.0;   // one-off, spread over the production volume
  std::vector<GradeSetting> settings;
  std::string notes;
  int line = 0;  // the row's first line in the file
};

struct CatalogueSlot {
  std::string name;  // "thermistor"
  std::vector<GradeOption> options;  // file order
  int line = 0;      // the slot's first row
};

// The column numbers of the header (1-based; 0 for an optional column that
// is absent), for messages that name a column.
struct CatalogueColumns {
  int slot = 0, grade = 0, unit_cost = 0, settings = 0, notes = 0, setup_cost = 0;
};

struct Catalogue {
  std::string file;  // as given
  CatalogueColumns columns;
  std::vector<CatalogueSlot> slots;  // in order of first appearance
  // One option per slot: the product of the slots' option counts (saturating at SIZE_MAX).
  std::size_t combinations() const;
  bool has_setup_costs() const;
  // The name of a 1-based column ("settings"), for messages, which give
  // its number in the location (parts.csv:3:4).
  std::string column_name(int column) const;
};

// The most combinations one catalogue may describe: beyond, the evaluation
// would run for hours; the message says so before any work.
inline constexpr std::size_t max_grade_combinations = 100000;

// Reads and checks a catalogue file (read_text_file's checks first).
Catalogue read_catalogue(const std::string& path);

// The same from text already in memory; `name` is the file named in messages
// and the directory relative `*_file` settings are resolved against.
Catalogue parse_catalogue(const std::string& text, const std::string& name);

// RFC 4180 records: each field with the line it starts on. Exposed for tests.
struct CsvField {
  std::string text;
  int line = 0;
  bool quoted = false;
};
std::vector<std::vector<CsvField>> parse_csv_records(const std::string& text, const std::string& name);

}  // namespace thermargin
