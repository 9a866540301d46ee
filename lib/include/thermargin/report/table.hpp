// The table model every writer renders: a header (each column's name with
// its unit, "error (K)") and rows of preformatted cells. The same table is
// printed as aligned text (render_text), as CSV (render_csv) and as an HTML
// <table> (HtmlDocument::table in html_report.hpp); the JSON writers keep
// their nested objects and read the same results.
//
//   Table t{.header = {"source", "share", "half-width (K)"}};
//   t.rows.push_back({"R fixed (r_fixed)", "41.2 %", "0.1200"});
//   std::cout << render_text(t);
#pragma once

#include <string>
#include <vector>

namespace thermargin {

// A table of preformatted cells. Columns whose cells all start like a number
// ("-1.25", "10k", "±0.3 K") are right-aligned in HTML unless `numeric` says
// otherwise.
struct Table {
  std::string caption{};                      // optional
  std::vector<std::string> header{};          // with units: "Error (K)"
  std::vector<std::vector<std::string>> rows{};
  std::vector<bool> numeric{};                // per column; empty = decide from the cells
};

// Aligned text for a terminal: columns two spaces apart, a rule under the
// header, a cell right-aligned when it starts like a number (a digit, a sign
// or a point) and header names right-aligned except the first. Widths count
// UTF-8 characters, not bytes. The caption is not printed.
std::string render_text(const Table& table);

// How a table fits a terminal of `width` columns (0: no limit). A text cell
// wider than half of it wraps at spaces onto continuation lines; a table
// still wider is split into several, one after the other, each repeating
// the first `repeat` columns (the temperature of a table per temperature).
// Every column gets a rule of its own under its header ("-----  ---"), so
// that a reader, or a program, finds the columns again.
struct TextLayout {
  std::size_t width = 0;
  std::size_t repeat = 1;
};
std::string render_text(const Table& table, const TextLayout& layout);

// CSV: the header line, then one line per row, every cell through csv_cell()
// (html_report.hpp: quoted when needed, a formula defused). The caption is
// not printed.
std::string render_csv(const Table& table);

// The first line of every CSV a command writes (budget, check, pick, grades,
// fit, table, response): the caution (core/caution.hpp) as a `#` comment line,
// "# CAUTION: ...\n". A reader skips it as it skips the comment lines of the
// project's own data files.
std::string csv_caution_line();

}  // namespace thermargin
