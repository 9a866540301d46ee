// Writing reports: a self-contained HTML document builder, CSV cells that are
// safe to open in a spreadsheet, atomic file output, and figures formatted
// for a person.
//
// Presentation only, no physics. The HTML document carries its own style
// sheet (screen and print: margins that fit both A4 and US Letter, charts and
// verdicts never split across pages) and nothing external: no scripts, no web
// fonts, no images to fetch; a Content-Security-Policy meta tag forbids them
// in case anything slipped through. All text given to the builder is escaped.
// CSV cells are quoted as RFC 4180 describes, and a text cell that a
// spreadsheet would run as a formula (leading = + - @, tab or carriage
// return) gets a leading apostrophe, the mitigation the OWASP "CSV Injection"
// page describes; plain numbers such as -1.5 are left as numbers. Files are
// written to a temporary file beside the target and renamed over it, so a
// reader never sees half a report and a failure leaves nothing behind.
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "thermargin/report/table.hpp"

namespace thermargin {

namespace svg {
struct Chart;
}

// Escapes & < > " ' for HTML/XML text and attributes. Also replaces what an
// XML parser would reject (invalid UTF-8, control characters other than tab,
// newline and carriage return) with U+FFFD, so the output is always well formed.
//   html_escape("a<b & \"c\"")   // "a&lt;b &amp; &quot;c&quot;"
std::string html_escape(std::string_view text);

// One CSV field: quoted when it holds a comma, quote, CR, LF or leading or
// trailing space; a leading apostrophe when it would start a formula.
//   csv_cell("=1+1") == "'=1+1";  csv_cell("-1.5") == "-1.5";  csv_cell("a,b") == "\"a,b\""
std::string csv_cell(std::string_view text);

// Writes `contents` to `path` through a temporary file in the same directory
// and a rename, keeping the mode of a file it replaces. Throws
// thermargin::input_error with one line naming the path and the reason
// (missing directory, read-only target, unwritable directory, target is a
// directory, disk full) and leaves no partial or temporary file. A target that
// exists and is not a regular file (/dev/stdout, a FIFO) is written in place.
//   write_file_atomically("out/report.html", doc.str());
void write_file_atomically(const std::string& path, std::string_view contents);

// The result a verdict banner shows. (budget.hpp's `Verdict` is the budget's
// whole verdict: basis, margin, reason; this is only its pass or fail.)
enum class Badge { pass, fail };

// Builds one HTML page; every method appends a block and returns *this.
// Every table sits in a box as wide as the page that scrolls sideways when
// the table cannot wrap to fit (its first column stays in view), so no
// table runs past a 1280 px window.
//
//   HtmlDocument doc("Budget: default design");
//   doc.verdict(Badge::pass, "worst case 0.41 K within ±0.5 K")
//      .heading("Error across the range").chart(chart, "Figure 1. Error bands");
//   write_file_atomically("report.html", doc.str());
class HtmlDocument {
 public:
  explicit HtmlDocument(std::string title);

  HtmlDocument& heading(std::string_view text, int level = 2);   // level 2..6; 1 is the title
  HtmlDocument& paragraph(std::string_view text);
  HtmlDocument& verdict(Badge badge, std::string_view detail);
  HtmlDocument& table(const Table& table);
  HtmlDocument& chart(const svg::Chart& chart, std::string_view caption = {});
  HtmlDocument& caution(std::string_view text);
  HtmlDocument& preformatted(std::string_view text);  // resolved settings, a scenario file
  // A drawing made by the library (an SVG element whose text is already
  // escaped, such as report/schematic.hpp's), in a figure with its caption.
  HtmlDocument& drawing(std::string_view svg_markup, std::string_view caption = {});
  // A folded block: what comes until unfold() shows under `summary` when
  // opened (<details>); open on paper. Folds do not nest.
  HtmlDocument& fold(std::string_view summary);
  HtmlDocument& unfold();

  std::string str() const;   // the whole document, "<!DOCTYPE html>" to "</html>"

 private:
  std::string title_;
  std::string body_;
};

// Figures for a person, as the report pages print them: fixed decimals, a
// true minus sign (U+2212), never "nan" or "-0.000".
namespace report {
std::string num(double v, int decimals);          // num(-0.4781, 3) == "−0.478"; NaN gives "n/a"
std::string pct(double fraction, int decimals);   // pct(0.125, 2) == "12.50 %"
std::string kelvin(double v, int decimals = 3);   // "0.478 K"
std::string celsius(double v);                    // "40.00 °C"
// A share in [0, 1] as a bar of block characters (in eighths), so a ranking
// reads at a glance in a table cell, on screen and on paper.
std::string bar(double fraction, int width = 24);
}  // namespace report

}  // namespace thermargin
