// Internal to the library: a report page as plain blocks, laid out with
// HtmlDocument, and SVG files written all or none.
//
// Why it exists: html_report.hpp's `enum class Verdict` (the banner) and
// budget.hpp's `struct Verdict` (the budget's verdict) share one name in
// namespace thermargin, so no translation unit can include both headers.
// The reports that read a Budget (budget_report.cpp) describe their page
// here in neutral terms, and report_page.cpp, which sees only
// html_report.hpp, turns it into HTML. Renaming one of the two Verdicts
// would let the reports call HtmlDocument directly and retire this file.
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "thermargin/svg_chart.hpp"

namespace thermargin::report {

struct Block {
  enum class Kind { heading, paragraph, pass, fail, table, chart, caution, preformatted };
  Kind kind = Kind::paragraph;
  std::string text;  // heading, paragraph, verdict detail, caution, chart caption, preformatted text
  // table (the fields of thermargin::Table)
  std::string caption;
  std::vector<std::string> header;
  std::vector<std::vector<std::string>> rows;
  std::vector<bool> numeric;
  // chart
  svg::Chart chart;
};

// The blocks as one self-contained HTML page (HtmlDocument), titled `title`.
std::string render_page(const std::string& title, const std::vector<Block>& blocks);

// write_file_atomically (html_report.hpp), for callers that cannot include it.
void write_file(const std::string& path, std::string_view contents);

// Writes dir/<name> for every file, all or none: each is first written whole
// under a hidden staging name beside its target, and only when all are
// staged are they renamed into place. On a failure the staged files, and
// `dir` if `created_dir` says this call made it, are removed, and
// input_error says "<option> = <dir> (command line): cannot write <name>: <reason>".
struct NamedText {
  std::string name, text;
};
void write_files(const std::string& option, const std::string& dir, const std::vector<NamedText>& files,
                 bool created_dir);

}  // namespace thermargin::report
