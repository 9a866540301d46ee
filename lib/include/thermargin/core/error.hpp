// The one error type for bad input, and the one place that formats it.
//
// Three failures are kept apart in thermargin (see DEVELOPERS.md): bad input
// is rejected before any work with an `input_error`; a numerical outcome
// (saturation, thermal runaway, a sensor outside its table) is a status field
// in a result; a bug is an assertion. The command-line program catches
// `input_error` in main, prints its one line and exits with status 2.
#pragma once

#include <stdexcept>
#include <string>
#include <string_view>

namespace thermargin {

// program: set by a program that uses the library (Scenario::set without a place).
enum class Origin { built_in, file, command_line, catalogue, program };

// Where a value came from: a file, line and column, the command line, or a
// default.
struct Where {
  Origin kind = Origin::built_in;
  std::string file;  // the file for Origin::file and Origin::catalogue
  int line = 0;      // 1-based line in that file; 0 when unknown
  std::string key;   // "divider.r_fixed", or a data file's column name ("resistance")
  int column = 0;    // 1-based column (field) of a data file's row; 0 when none
  std::string origin() const;  // "scenario.ini:12", "parts.csv:3:4", "command line", "default"
};

// A command-line option as the place a value came from: messages read
// "--grade = x (command line): ...". `key` is the option as the user wrote
// it ("--grade") or the setting it stands for ("table.points").
Where command_line(std::string key);

// The message as one printable line: a line break or another control
// character that came in with the user's text (a quoted catalogue field, a
// command-line argument) is written as an escape (`\n`, `\x1b`), so the
// CLI's message stays one line and cannot drive the terminal.
std::string one_line(std::string_view message);

class input_error : public std::runtime_error {
 public:
  explicit input_error(const std::string& message) : std::runtime_error(one_line(message)) {}
};

// Rejects a value: "divider.r_fixed = -10k (scenario.ini:12): must be > 0".
[[noreturn]] void reject(const Where& where, std::string_view value, std::string_view accepted);

// Rejects something that is not one value (a missing file, a malformed line):
// "table.csv:7: expected two numbers, temperature in °C and resistance in Ω",
// or at one column (field) of a data file's line: "parts.csv:3:2: ...".
[[noreturn]] void reject_at(const std::string& file, int line, std::string_view message);
[[noreturn]] void reject_at(const std::string& file, int line, int column, std::string_view message);

}  // namespace thermargin
