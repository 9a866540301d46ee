// Scenario files and overrides: the one schema behind the INI files, the
// `--section.key=value` options and grade catalogues (README.md, docs/scenarios.md).
//
// A Scenario is the resolved text of every key with where it came from
// (built-in default, file and line, command line, catalogue). Files are INI,
// read with Boost.Program_options' config-file parser; a line scan beside it
// remembers each key's line so that every message names file, line and key.
// build_design() turns the text into a validated Design, rejecting bad
// values and bad combinations before any work is done.
#pragma once

#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "thermargin/input/design.hpp"
#include "thermargin/core/error.hpp"
#include "thermargin/core/number.hpp"

namespace thermargin {

struct KeySpec {
  std::string key;            // "divider.r_fixed"
  Quantity quantity;          // how a number is read (plain for words)
  std::string default_value;  // the built-in default design, as text
  std::string help;           // one line: what it is, unit, accepted words
};

// Every key a scenario may set, in section order, including the per-input
// Monte Carlo overrides `<key>_dist` and `<key>_gap`.
const std::vector<KeySpec>& scenario_schema();
const KeySpec* find_key(std::string_view key);

struct Setting {
  std::string value;
  Where where;
};

class Scenario {
 public:
  // The built-in default design.
  Scenario();

  // Reads an INI file over the current values (unknown keys, sections and
  // malformed lines are refused with file and line).
  void load_file(const std::string& path);
  // Sets one key (command line or catalogue); unknown keys are refused.
  void set(const std::string& key, const std::string& value, const Where& where);
  // Sets one key from a program that builds its design in code, without
  // any INI text: build_design() then checks it as it checks a file, and a
  // refusal says "set by the program" where a file would give its line.
  //   Scenario s;  s.set("divider.r_fixed", "4k7");  Design d = build_design(s);
  void set(const std::string& key, const std::string& value) { set(key, value, Where{Origin::program, "", 0, key}); }

  const Setting& get(const std::string& key) const;
  const std::map<std::string, Setting>& values() const { return values_; }
  const std::string& file() const { return file_; }

 private:
  std::map<std::string, Setting> values_;
  std::string file_;
};

// Validates every value and combination and builds the design.
Design build_design(const Scenario& s);

// What every key resolved to (`thermargin check`), by key. `text` is for
// people: a number in its unit with engineering prefixes (`4k7` →
// "4.7 kohm", a ratio of `1` → "100 %"), a word as it stands, the board and
// calibration temperatures in degC, the table file's path, and for the words
// the design resolves itself the value it uses (firmware.r25 and
// firmware.beta = sensor, firmware.a, b, c = fit). `number` is the value the
// design uses in the unit unit_symbol() names for the key's quantity (% for
// ratios, ppm/K for tempcos, the base unit otherwise); none for words and
// lists. `d` is build_design(s).
struct ResolvedValue {
  std::string text;
  std::optional<double> number;
};
std::map<std::string, ResolvedValue> resolved_values(const Scenario& s, const Design& d);

// The scenario as INI text (every key, its resolved value), e.g. to save the
// built-in default design.
std::string to_ini(const Scenario& s, bool with_help);

}  // namespace thermargin
