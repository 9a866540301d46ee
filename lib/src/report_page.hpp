// Internal to the library: what the reports (budget_report.cpp,
// pick_report.cpp) share. A report page as plain blocks, laid out with
// HtmlDocument; the table of resolved inputs every report ends with; figures
// as text for a person; and SVG files written all or none.
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

#include "thermargin/design.hpp"
#include "thermargin/scenario.hpp"
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

// A table: the fields of thermargin::Table (html_report.hpp).
struct Table {
  std::string caption;
  std::vector<std::string> header;
  std::vector<std::vector<std::string>> rows;
  std::vector<bool> numeric;
};

// The page in reading order, built like HtmlDocument.
class Page {
 public:
  Page& heading(std::string text) { return add(Block::Kind::heading, std::move(text)); }
  Page& paragraph(std::string text) { return add(Block::Kind::paragraph, std::move(text)); }
  Page& verdict(bool pass, std::string detail) {
    return add(pass ? Block::Kind::pass : Block::Kind::fail, std::move(detail));
  }
  Page& caution(std::string_view text) { return add(Block::Kind::caution, std::string(text)); }
  Page& chart(const svg::Chart& chart, std::string caption) {
    add(Block::Kind::chart, std::move(caption));
    blocks_.back().chart = chart;
    return *this;
  }
  Page& table(Table t) {
    add(Block::Kind::table, {});
    Block& b = blocks_.back();
    b.caption = std::move(t.caption);
    b.header = std::move(t.header);
    b.rows = std::move(t.rows);
    b.numeric = std::move(t.numeric);
    return *this;
  }
  const std::vector<Block>& blocks() const { return blocks_; }

 private:
  Page& add(Block::Kind kind, std::string text) {
    Block b;
    b.kind = kind;
    b.text = std::move(text);
    blocks_.push_back(std::move(b));
    return *this;
  }
  std::vector<Block> blocks_;
};

// "Every resolved input": one table per section with value, unit and origin,
// as `thermargin check` prints them (Monte Carlo overrides only when set).
void inputs(Page& page, const Design& d, const Scenario& s);

// Figures for a person: fixed decimals, a true minus sign, never "nan" or "-0.000".
std::string num(double v, int decimals);
std::string pct(double fraction, int decimals);   // "12.50 %"
std::string kelvin(double v, int decimals = 3);   // "0.478 K"
std::string celsius(double v);                    // "40.00 °C"
// A share as a bar of block characters (eighths), so a ranking reads at a
// glance in the table itself, on screen and on paper.
std::string bar(double fraction, int width = 24);

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
