#include "thermargin/report/html_report.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <atomic>
#include <cerrno>
#include <climits>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <filesystem>

#include "thermargin/core/error.hpp"
#include "thermargin/core/number.hpp"
#include "thermargin/report/svg_chart.hpp"

namespace thermargin {

namespace {

constexpr std::string_view kReplacement = "\xEF\xBF\xBD";  // U+FFFD

// Length of the valid UTF-8 sequence at s[i] holding an XML 1.0 character, or 0.
std::size_t valid_sequence(std::string_view s, std::size_t i) {
  auto byte = [&](std::size_t k) { return static_cast<unsigned char>(s[k]); };
  unsigned char b = byte(i);
  std::size_t n;
  char32_t cp;
  if (b < 0x80) return (b >= 0x20 || b == '\t' || b == '\n' || b == '\r') ? 1 : 0;
  if (b >= 0xC2 && b <= 0xDF) n = 2, cp = b & 0x1Fu;
  else if (b >= 0xE0 && b <= 0xEF) n = 3, cp = b & 0x0Fu;
  else if (b >= 0xF0 && b <= 0xF4) n = 4, cp = b & 0x07u;
  else return 0;
  if (i + n > s.size()) return 0;
  for (std::size_t k = 1; k < n; ++k) {
    if ((byte(i + k) & 0xC0) != 0x80) return 0;
    cp = (cp << 6) | (byte(i + k) & 0x3Fu);
  }
  bool overlong = (n == 3 && cp < 0x800) || (n == 4 && cp < 0x10000);
  bool surrogate = cp >= 0xD800 && cp <= 0xDFFF;
  bool non_char = cp == 0xFFFE || cp == 0xFFFF || cp > 0x10FFFF;  // not XML characters
  return overlong || surrogate || non_char ? 0 : n;
}

bool plain_number(std::string_view s) {
  std::size_t i = 0, digits = 0;
  if (i < s.size() && (s[i] == '+' || s[i] == '-')) ++i;
  while (i < s.size() && s[i] >= '0' && s[i] <= '9') ++i, ++digits;
  if (i < s.size() && s[i] == '.') {
    ++i;
    while (i < s.size() && s[i] >= '0' && s[i] <= '9') ++i, ++digits;
  }
  if (digits == 0) return false;
  if (i < s.size() && (s[i] == 'e' || s[i] == 'E')) {
    ++i;
    if (i < s.size() && (s[i] == '+' || s[i] == '-')) ++i;
    std::size_t exp_digits = 0;
    while (i < s.size() && s[i] >= '0' && s[i] <= '9') ++i, ++exp_digits;
    if (exp_digits == 0) return false;
  }
  return i == s.size();
}

// A cell that starts like a figure: "-1.25", "10k", "±0.3 K", "−4" (U+2212).
bool numeric_cell(std::string_view s) {
  for (std::string_view sign : {"+", "-", "\u00b1", "\u2212"})
    if (s.substr(0, sign.size()) == sign) {
      s.remove_prefix(sign.size());
      break;
    }
  if (!s.empty() && s[0] == '.') s.remove_prefix(1);
  return !s.empty() && s[0] >= '0' && s[0] <= '9';
}

std::string system_reason(int err) { return std::strerror(err); }

constexpr std::string_view kStyle = R"css(
:root { color-scheme: light; }
body { font: 15px/1.45 system-ui, -apple-system, "Segoe UI", Roboto, Helvetica, Arial, sans-serif;
       color: #1a1a1a; background: #ffffff; max-width: 62rem; margin: 1.5rem auto; padding: 0 1rem; }
h1 { font-size: 1.6rem; margin: 0 0 1rem; }
h2 { font-size: 1.25rem; margin: 1.8rem 0 .6rem; padding-bottom: .2rem; border-bottom: 1px solid #bbbbbb; }
h3, h4, h5, h6 { font-size: 1.05rem; margin: 1.2rem 0 .4rem; }
p { margin: .5rem 0; max-width: 48rem; }
.table-wrap { max-width: 100%; overflow-x: auto; margin: .8rem 0; }
table { border-collapse: collapse; margin: 0; font-variant-numeric: tabular-nums; }
caption { caption-side: top; text-align: left; font-weight: 600; padding-bottom: .3rem; }
th, td { padding: .25rem .65rem; border-bottom: 1px solid #d4d4d4; text-align: left; vertical-align: top;
         overflow-wrap: anywhere; }
.table-wrap th:first-child, .table-wrap td:first-child { position: sticky; left: 0; background: #ffffff; }
thead th { border-bottom: 2px solid #333333; font-weight: 600; }
th.num, td.num { text-align: right; white-space: nowrap; }
figure.chart { margin: 1rem 0; }
figure.chart svg { display: block; max-width: 100%; height: auto; }
figcaption { font-size: .9rem; color: #444444; margin-top: .3rem; }
figure.drawing { margin: 1rem 0; }
figure.drawing svg { display: block; max-width: 100%; height: auto; }
details { margin: .8rem 0; }
summary { cursor: pointer; font-weight: 600; }
.verdict { margin: 1rem 0; padding: .6rem 1rem; font-size: 1.1rem; border: 3px solid; }
.verdict .mark { font-weight: 700; letter-spacing: .04em; margin-right: .6rem; }
.verdict.pass { background: #e4f2e7; border-color: #1d6a33; color: #0e3a1a; }
.verdict.fail { background: #fbe5e2; border-color: #a02418; color: #561008; border-style: double; border-width: 6px; }
.caution { margin: 1rem 0; padding: .5rem .9rem; background: #fff4dc; border-left: 6px solid #9a5c00; }
.caution .mark { font-weight: 700; margin-right: .4rem; }
pre { font-size: .85rem; background: #f4f4f4; padding: .6rem .8rem; white-space: pre-wrap; overflow-wrap: anywhere; }
figure.chart, .verdict, .caution, pre { break-inside: avoid; page-break-inside: avoid; }
/* No page size: the printer's A4 or US Letter both fit these margins
   (182 mm x 247 mm of text on A4, 188 mm x 247 mm on Letter). */
@page { margin: 16mm 14mm; }
@media print {
  body { font-size: 10.5pt; line-height: 1.35; max-width: none; margin: 0; padding: 0; color: #000000; }
  h1 { font-size: 16pt; }
  h2 { font-size: 13pt; }
  h3, h4, h5, h6 { font-size: 11pt; }
  h1, h2, h3, h4, h5, h6 { break-after: avoid; page-break-after: avoid; }
  p { max-width: none; }
  thead { display: table-header-group; }
  tr { break-inside: avoid; page-break-inside: avoid; }
  figure.chart svg { width: 100%; }
  .verdict, .caution { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
  /* Folded sections are open on paper. */
  details > * { display: block !important; }
  details::details-content { content-visibility: visible; display: block; }
  .table-wrap { overflow: visible; }
}
)css";

}  // namespace

std::string html_escape(std::string_view text) {
  std::string out;
  out.reserve(text.size() + text.size() / 8);
  for (std::size_t i = 0; i < text.size();) {
    std::size_t n = valid_sequence(text, i);
    if (n == 0) {
      out += kReplacement;
      ++i;
      continue;
    }
    if (n == 1) {
      switch (text[i]) {
        case '&': out += "&amp;"; break;
        case '<': out += "&lt;"; break;
        case '>': out += "&gt;"; break;
        case '"': out += "&quot;"; break;
        case '\'': out += "&#39;"; break;  // &apos; is not HTML 4
        default: out += text[i];
      }
    } else {
      out.append(text.substr(i, n));
    }
    i += n;
  }
  return out;
}

std::string csv_cell(std::string_view text) {
  std::string cell(text);
  // Spreadsheets skip leading spaces before deciding a cell is a formula.
  std::size_t first = cell.find_first_not_of(' ');
  if (first != std::string::npos && std::strchr("=+-@\t\r", cell[first]) != nullptr && cell[first] != '\0' &&
      !plain_number(cell))
    cell.insert(cell.begin(), '\'');
  bool quote = cell.find_first_of(",\"\r\n") != std::string::npos ||
               (!cell.empty() && (cell.front() == ' ' || cell.back() == ' '));
  if (!quote) return cell;
  std::string out = "\"";
  for (char c : cell) {
    if (c == '"') out += '"';
    out += c;
  }
  out += '"';
  return out;
}

void write_file_atomically(const std::string& path, std::string_view contents) {
  namespace fs = std::filesystem;
  auto fail = [&](const std::string& reason) { reject_at(path, 0, "cannot write: " + reason); };
  if (path.empty()) reject_at("(output)", 0, "cannot write: the file name is empty");

  auto write_all = [&](int fd) -> int {
    const char* p = contents.data();
    std::size_t left = contents.size();
    while (left > 0) {
      ssize_t w = ::write(fd, p, left);
      if (w < 0) {
        if (errno == EINTR) continue;
        return errno;
      }
      p += w;
      left -= static_cast<std::size_t>(w);
    }
    return 0;
  };

  std::string target = path;
  struct stat st {};
  if (::lstat(path.c_str(), &st) == 0 && S_ISLNK(st.st_mode)) {
    // Replace what the link points at, not the link itself.
    char resolved[PATH_MAX];
    if (::realpath(path.c_str(), resolved) == nullptr)
      fail("it is a symbolic link to " + std::string(errno == ENOENT ? "a missing file" : system_reason(errno)));
    target = resolved;
  }

  bool exists = ::stat(target.c_str(), &st) == 0;
  if (!exists && errno != ENOENT) fail(system_reason(errno));
  bool special = target.rfind("/dev/", 0) == 0 || target.rfind("/proc/", 0) == 0;
  if (exists && S_ISDIR(st.st_mode)) fail("it is a directory");
  if (exists && (special || !S_ISREG(st.st_mode))) {
    // A terminal, pipe or device cannot be replaced; write to it as it is.
    int fd = ::open(target.c_str(), O_WRONLY | O_CLOEXEC);
    if (fd < 0) fail(system_reason(errno));
    int err = write_all(fd);
    if (::close(fd) != 0 && err == 0) err = errno;
    if (err != 0) fail(system_reason(err));
    return;
  }
  if (exists && ::access(target.c_str(), W_OK) != 0)
    fail(errno == EACCES ? std::string("the file is read-only") : system_reason(errno));

  fs::path dir = fs::path(target).parent_path();
  if (dir.empty()) dir = ".";
  struct stat dst {};
  if (::stat(dir.c_str(), &dst) != 0) {
    if (errno == ENOENT || errno == ENOTDIR) fail("directory " + dir.string() + " does not exist");
    fail("directory " + dir.string() + ": " + system_reason(errno));
  }
  if (!S_ISDIR(dst.st_mode)) fail(dir.string() + " is not a directory");

  static std::atomic<unsigned> counter{0};
  std::string base = fs::path(target).filename().string();
  std::string tmp;
  int fd = -1;
  for (int attempt = 0; attempt < 100 && fd < 0; ++attempt) {
    tmp = (dir / ("." + base + ".tmp-" + std::to_string(::getpid()) + "-" + std::to_string(counter++))).string();
    fd = ::open(tmp.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666);
    if (fd < 0 && errno != EEXIST)
      fail("cannot create a file in directory " + dir.string() + ": " + system_reason(errno));
  }
  if (fd < 0) fail("cannot create a temporary file in directory " + dir.string());

  auto abandon = [&](int err) {
    ::close(fd);
    ::unlink(tmp.c_str());
    fail(system_reason(err));
  };
  if (int err = write_all(fd); err != 0) abandon(err);
  if (exists) (void)::fchmod(fd, st.st_mode & 07777);  // keep the old file's permissions
  if (::fsync(fd) != 0) abandon(errno);
  if (::close(fd) != 0) {
    int err = errno;
    ::unlink(tmp.c_str());
    fail(system_reason(err));
  }
  if (::rename(tmp.c_str(), target.c_str()) != 0) {
    int err = errno;
    ::unlink(tmp.c_str());
    fail(system_reason(err));
  }
  // Make the rename itself durable; a failure here loses nothing already written.
  int dfd = ::open(dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
  if (dfd >= 0) {
    (void)::fsync(dfd);
    ::close(dfd);
  }
}

// ---------------------------------------------------------------- HtmlDocument

HtmlDocument::HtmlDocument(std::string title) : title_(std::move(title)) {}

HtmlDocument& HtmlDocument::heading(std::string_view text, int level) {
  std::string n = std::to_string(std::clamp(level, 2, 6));
  body_ += "<h";
  body_ += n;
  body_ += '>';
  body_ += html_escape(text);
  body_ += "</h";
  body_ += n;
  body_ += ">\n";
  return *this;
}

HtmlDocument& HtmlDocument::paragraph(std::string_view text) {
  body_ += "<p>" + html_escape(text) + "</p>\n";
  return *this;
}

HtmlDocument& HtmlDocument::verdict(Badge badge, std::string_view detail) {
  // The word and the symbol carry the result; colour and border only repeat it.
  bool pass = badge == Badge::pass;
  body_ += std::string("<div class=\"verdict ") + (pass ? "pass" : "fail") + "\" role=\"status\"><span class=\"mark\">" +
           (pass ? "\u2714 PASS" : "\u2718 FAIL") + "</span> " + html_escape(detail) + "</div>\n";
  return *this;
}

HtmlDocument& HtmlDocument::table(const Table& t) {
  std::size_t columns = t.header.size();
  for (const auto& row : t.rows) columns = std::max(columns, row.size());
  std::vector<bool> numeric(columns, false);
  for (std::size_t c = 0; c < columns; ++c) {
    if (c < t.numeric.size()) {
      numeric[c] = t.numeric[c];
      continue;
    }
    bool any = false, all = true;
    for (const auto& row : t.rows) {
      if (c >= row.size() || row[c].empty()) continue;
      any = true;
      all = all && numeric_cell(row[c]);
    }
    numeric[c] = any && all;
  }
  auto cls = [&](std::size_t c) { return numeric[c] ? std::string(" class=\"num\"") : std::string(); };
  body_ += "<div class=\"table-wrap\"><table>\n";
  if (!t.caption.empty()) body_ += "<caption>" + html_escape(t.caption) + "</caption>\n";
  if (!t.header.empty()) {
    body_ += "<thead><tr>";
    for (std::size_t c = 0; c < columns; ++c)
      body_ += "<th scope=\"col\"" + cls(c) + ">" + (c < t.header.size() ? html_escape(t.header[c]) : "") + "</th>";
    body_ += "</tr></thead>\n";
  }
  body_ += "<tbody>\n";
  for (const auto& row : t.rows) {
    body_ += "<tr>";
    for (std::size_t c = 0; c < columns; ++c)
      body_ += "<td" + cls(c) + ">" + (c < row.size() ? html_escape(row[c]) : "") + "</td>";
    body_ += "</tr>\n";
  }
  body_ += "</tbody>\n</table></div>\n";
  return *this;
}

HtmlDocument& HtmlDocument::chart(const svg::Chart& chart, std::string_view caption) {
  body_ += "<figure class=\"chart\">\n" + svg::render(chart);
  if (!caption.empty()) body_ += "<figcaption>" + html_escape(caption) + "</figcaption>\n";
  body_ += "</figure>\n";
  return *this;
}

HtmlDocument& HtmlDocument::caution(std::string_view text) {
  body_ += "<div class=\"caution\" role=\"note\"><span class=\"mark\" aria-hidden=\"true\">\u26a0</span> " + html_escape(text) +
           "</div>\n";
  return *this;
}

HtmlDocument& HtmlDocument::drawing(std::string_view svg_markup, std::string_view caption) {
  body_ += "<figure class=\"drawing\">\n";
  body_ += svg_markup;
  if (!caption.empty()) body_ += "<figcaption>" + html_escape(caption) + "</figcaption>\n";
  body_ += "</figure>\n";
  return *this;
}

HtmlDocument& HtmlDocument::fold(std::string_view summary) {
  body_ += "<details><summary>" + html_escape(summary) + "</summary>\n";
  return *this;
}

HtmlDocument& HtmlDocument::unfold() {
  body_ += "</details>\n";
  return *this;
}

HtmlDocument& HtmlDocument::preformatted(std::string_view text) {
  body_ += "<pre>" + html_escape(text) + "</pre>\n";
  return *this;
}

std::string HtmlDocument::str() const {
  std::string out = "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n";
  // Belt and braces: even if something unescaped slipped in, nothing runs or loads.
  out += "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; style-src 'unsafe-inline'\"/>\n";
  out += "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n";
  out += "<title>" + html_escape(title_) + "</title>\n<style>" + std::string(kStyle) + "</style>\n</head>\n<body>\n";
  out += "<h1>" + html_escape(title_) + "</h1>\n";
  out += body_;
  out += "</body>\n</html>\n";
  return out;
}

// ---------------------------------------------------------------- figures for a person

namespace report {

std::string num(double v, int decimals) {
  const std::string s = fixed(v, decimals);  // never "nan" or "-0.000"
  return s.front() == '-' ? "\u2212" + s.substr(1) : s;
}

std::string pct(double fraction, int decimals) { return num(100.0 * fraction, decimals) + " %"; }

std::string kelvin(double v, int decimals) { return num(v, decimals) + " K"; }
std::string celsius(double v) { return num(v, 2) + " \u00b0C"; }

std::string bar(double fraction, int width) {
  const double eighths = std::clamp(fraction, 0.0, 1.0) * width * 8.0;
  const auto n = static_cast<long>(std::lround(eighths));
  static const char* const partial[] = {"", "\u258f", "\u258e", "\u258d", "\u258c", "\u258b", "\u258a", "\u2589"};
  std::string s;
  for (long i = 0; i < n / 8; ++i) s += "\u2588";
  s += partial[n % 8];
  return s;
}

}  // namespace report

}  // namespace thermargin
