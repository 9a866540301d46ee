// The command-line plumbing shared by every command: options, the scenario
// they resolve, output formats and where output goes. No physics here.
#pragma once

#include <boost/program_options.hpp>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "thermargin/core/number.hpp"       // fixed, significant
#include "thermargin/core/progress.hpp"     // ProgressLine
#include "thermargin/input/scenario.hpp"
#include "thermargin/report/html_report.hpp"  // csv_cell, write_file_atomically
#include "thermargin/report/table.hpp"        // Table, render_text

namespace thermargin::cli {

namespace po = boost::program_options;

enum class Format { text, csv, json };

struct Invocation {
  std::string command;
  std::string file;  // the positional input file (scenario, data), may be empty
  Format format = Format::text;
  std::string output;  // empty: stdout
  std::string report;  // --report FILE.html (empty: not asked for)
  std::string plots;   // --plots DIR (empty: not asked for)
  bool strict = false;
  bool quiet = false;  // --quiet: no progress line on stderr
  Scenario scenario;
  po::variables_map vm;  // the command's own options
};

// Parses argv for `command`: the scenario file (if the command takes one),
// every scenario key as --section.key=value, --format, --output, --report
// and --plots (commands with a report), --strict (commands with a verdict)
// and the command's own options. Throws input_error on bad input, and on a
// destination that cannot be written (--output, --report, --plots), so that
// no analysis ends in "cannot write".
Invocation parse(const std::string& command, int argc, char** argv, const po::options_description& own,
                 bool takes_scenario, bool has_report, bool has_verdict = false);

// Prints --help for a command: usage, own options, the common options and
// the caution. Returns true when help was asked for (and printed).
bool help_requested(const std::string& command, int argc, char** argv, const std::string& usage,
                    const po::options_description& own, bool takes_scenario, bool has_report = false,
                    bool has_verdict = false);

// Whether a long run shows its progress (core/progress.hpp): stderr is a
// terminal and --quiet was not given.
inline bool show_progress(const Invocation& inv) { return ProgressLine::wanted(inv.quiet); }

// Writes the command's output to --output (write_file_atomically) or stdout.
void emit(const Invocation& inv, const std::string& text);

}  // namespace thermargin::cli
