// Tests of thermargin/report/html_report.hpp: escaping, CSV cells checked against
// RFC 4180 and the OWASP "CSV Injection" advice (with Python's csv module as
// an outside reader), atomic writes that leave nothing behind on failure, and
// a whole report parsed by Python's xml.etree.
#include "thermargin/report/html_report.hpp"

#include <gtest/gtest.h>
#include <sys/resource.h>
#include <grp.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <csignal>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "cli_run.hpp"
#include "thermargin/core/error.hpp"
#include "thermargin/report/svg_chart.hpp"

namespace thermargin {
namespace {

namespace fs = std::filesystem;

using testing::output_of;
using testing::slurp;
using TempDir = testing::ScratchDir;

// The message of the input_error that `f` throws, or "(no error)".
template <class F>
std::string error_of(F f) {
  try {
    f();
  } catch (const input_error& e) {
    return e.what();
  }
  return "(no error)";
}

// error_of(f) run in a child process as the unprivileged user nobody (uid and
// gid 65534) when the tests run as root, who writes through permission bits;
// as the user itself otherwise. `dir` is opened up so that nobody reaches it.
template <class F>
std::string error_of_unprivileged(F f, const fs::path& dir) {
  if (::geteuid() == 0) fs::permissions(dir, fs::perms::all);
  int fds[2];
  if (::pipe(fds) != 0) return "(no pipe)";
  const pid_t pid = ::fork();
  if (pid == 0) {
    ::close(fds[0]);
    if (::geteuid() == 0 && (::setgroups(0, nullptr) != 0 || ::setgid(65534) != 0 || ::setuid(65534) != 0)) ::_exit(2);
    const std::string m = error_of(f);
    const bool whole = ::write(fds[1], m.data(), m.size()) == static_cast<ssize_t>(m.size());
    ::_exit(whole ? 0 : 3);
  }
  ::close(fds[1]);
  std::string m;
  char buf[512];
  for (ssize_t n; (n = ::read(fds[0], buf, sizeof buf)) > 0;) m.append(buf, static_cast<std::size_t>(n));
  ::close(fds[0]);
  int status = 0;
  ::waitpid(pid, &status, 0);
  if (!WIFEXITED(status) || WEXITSTATUS(status) != 0) return "(the unprivileged child failed: " + std::to_string(status) + ")";
  return m;
}

// ------------------------------------------------------------------ escaping

TEST(HtmlEscape, EscapesTheFiveMarkupCharacters) {
  EXPECT_EQ(html_escape("a<b & \"c\" 'd'>"), "a&lt;b &amp; &quot;c&quot; &#39;d&#39;&gt;");
  EXPECT_EQ(html_escape("<script>alert(1)</script>"), "&lt;script&gt;alert(1)&lt;/script&gt;");
  EXPECT_EQ(html_escape("&amp;"), "&amp;amp;");  // already-escaped text is text, escaped again
}

TEST(HtmlEscape, KeepsUnicodeButReplacesWhatAnXmlParserWouldReject) {
  EXPECT_EQ(html_escape("25 \u00b0C, 10 k\u03a9, \u00b10.5 K"), "25 \u00b0C, 10 k\u03a9, \u00b10.5 K");
  EXPECT_EQ(html_escape("tab\tnew\nline"), "tab\tnew\nline");
  EXPECT_EQ(html_escape(std::string("a\x01" "b")), "a\uFFFDb");         // control character
  EXPECT_EQ(html_escape("bad \xff byte"), "bad \uFFFD byte");          // not UTF-8
  EXPECT_EQ(html_escape("\xc0\xaf"), "\uFFFD\uFFFD");                  // overlong '/'
  EXPECT_EQ(html_escape("\xed\xa0\x80"), "\uFFFD\uFFFD\uFFFD");        // UTF-16 surrogate
  EXPECT_EQ(html_escape("cut \xe2\x82"), "cut \uFFFD\uFFFD");          // truncated sequence
}

// ------------------------------------------------------------------ CSV cells

TEST(CsvCell, NeutralisesCellsThatASpreadsheetWouldRunAsFormulas) {
  // OWASP "CSV Injection": prefix = + - @ tab CR with an apostrophe.
  EXPECT_EQ(csv_cell("=1+1"), "'=1+1");
  EXPECT_EQ(csv_cell("+cmd"), "'+cmd");
  EXPECT_EQ(csv_cell("@SUM(A1)"), "'@SUM(A1)");
  EXPECT_EQ(csv_cell("-2+3"), "'-2+3");
  EXPECT_EQ(csv_cell("\t=1"), "'\t=1");
  EXPECT_EQ(csv_cell("  =1"), "'  =1");  // spreadsheets skip leading blanks before a formula
  EXPECT_EQ(csv_cell("=HYPERLINK(\"http://x\",\"y\")"), "\"'=HYPERLINK(\"\"http://x\"\",\"\"y\"\")\"");
}

TEST(CsvCell, KeepsPlainNumbersAsNumbers) {
  EXPECT_EQ(csv_cell("-1.5"), "-1.5");
  EXPECT_EQ(csv_cell("3.3"), "3.3");
  EXPECT_EQ(csv_cell("+0.25"), "+0.25");
  EXPECT_EQ(csv_cell("-1e-3"), "-1e-3");
  EXPECT_EQ(csv_cell("-.5"), "-.5");
  EXPECT_EQ(csv_cell("-1e"), "'-1e");  // not a number
  EXPECT_EQ(csv_cell("-"), "'-");
}

TEST(CsvCell, QuotesAsRfc4180Describes) {
  EXPECT_EQ(csv_cell("plain"), "plain");
  EXPECT_EQ(csv_cell(""), "");
  EXPECT_EQ(csv_cell("a,b"), "\"a,b\"");
  EXPECT_EQ(csv_cell("say \"hi\""), "\"say \"\"hi\"\"\"");
  EXPECT_EQ(csv_cell("two\nlines"), "\"two\nlines\"");
  EXPECT_EQ(csv_cell(" padded "), "\" padded \"");
}

TEST(CsvCell, PythonsCsvReaderGetsTheIntendedFieldsBack) {
  const std::vector<std::pair<std::string, std::string>> cells{
      {"=1+1", "'=1+1"}, {"-1.5", "-1.5"},       {"a,b", "a,b"},       {"say \"hi\"", "say \"hi\""},
      {"two\nlines", "two\nlines"},      {"@x", "'@x"},         {"10 k\u03a9", "10 k\u03a9"}, {"", ""}};
  std::string row, expected;
  for (const auto& [in, out] : cells) {
    row += (row.empty() ? "" : ",") + csv_cell(in);
    expected += out + "\x1f";
  }
  TempDir dir;
  std::ofstream(dir.path / "row.csv", std::ios::binary) << row << "\r\n";
  std::ofstream(dir.path / "read.py")
      << "import csv, sys\n"
         "rows = list(csv.reader(open(sys.argv[1], newline='', encoding='utf-8')))\n"
         "assert len(rows) == 1, rows\n"
         "sys.stdout.write(''.join(f + '\\x1f' for f in rows[0]))\n";
  EXPECT_EQ(output_of(std::string(THERMARGIN_PYTHON) + " " + (dir.path / "read.py").string() + " " +
                (dir.path / "row.csv").string()),
            expected);
}

// ------------------------------------------------------------------ atomic writes

TEST(AtomicWrite, WritesAndReplacesLeavingOnlyTheTarget) {
  TempDir dir;
  fs::path target = dir.path / "report.html";
  write_file_atomically(target.string(), "first");
  EXPECT_EQ(slurp(target), "first");
  fs::permissions(target, fs::perms(0640));
  write_file_atomically(target.string(), std::string(100000, 'x'));
  EXPECT_EQ(slurp(target), std::string(100000, 'x'));
  EXPECT_EQ(fs::status(target).permissions() & fs::perms::all, fs::perms(0640));  // mode kept
  EXPECT_EQ(dir.names(), std::vector<std::string>{"report.html"});
}

TEST(AtomicWrite, MissingDirectoryIsAOneLineInputErrorAndCreatesNothing) {
  TempDir dir;
  fs::path target = dir.path / "missing" / "report.html";
  std::string message = error_of([&] { write_file_atomically(target.string(), "x"); });
  EXPECT_NE(message.find(target.string()), std::string::npos) << message;
  EXPECT_NE(message.find("does not exist"), std::string::npos) << message;
  EXPECT_EQ(message.find('\n'), std::string::npos);
  EXPECT_FALSE(fs::exists(dir.path / "missing"));
  EXPECT_TRUE(dir.names().empty());
}

TEST(AtomicWrite, TargetThatIsADirectoryIsRefusedAndLeftAlone) {
  // Works as root too, where permission bits do not stop a write.
  TempDir dir;
  fs::path target = dir.path / "out";
  fs::create_directory(target);
  std::string message = error_of([&] { write_file_atomically(target.string(), "x"); });
  EXPECT_NE(message.find(target.string()), std::string::npos) << message;
  EXPECT_NE(message.find("directory"), std::string::npos) << message;
  EXPECT_TRUE(fs::is_directory(target));
  EXPECT_TRUE(fs::is_empty(target));
  EXPECT_EQ(dir.names(), std::vector<std::string>{"out"});
}

TEST(AtomicWrite, ReadOnlyTargetIsRefusedAndKeepsItsContents) {
  // As any user: under root the write is tried as nobody (mode 0444 does not stop root).
  TempDir dir;
  fs::path target = dir.path / "locked.csv";
  std::ofstream(target) << "old";
  fs::permissions(target, fs::perms(0444));
  std::string message = error_of_unprivileged([&] { write_file_atomically(target.string(), "new"); }, dir.path);
  EXPECT_NE(message.find(target.string()), std::string::npos) << message;
  EXPECT_NE(message.find("read-only"), std::string::npos) << message;
  EXPECT_EQ(slurp(target), "old");
  EXPECT_EQ(dir.names(), std::vector<std::string>{"locked.csv"});
}

TEST(AtomicWrite, UnwritableDirectoryIsRefusedWithoutLeftovers) {
  // As any user: under root the write is tried as nobody (a 0555 directory does not stop root).
  TempDir dir;
  fs::path sub = dir.path / "ro";
  fs::create_directory(sub);
  fs::permissions(sub, fs::perms(0555));
  std::string message = error_of_unprivileged([&] { write_file_atomically((sub / "a.html").string(), "x"); }, dir.path);
  fs::permissions(sub, fs::perms(0755));
  EXPECT_NE(message.find((sub / "a.html").string()), std::string::npos) << message;
  EXPECT_NE(message.find("ermission denied"), std::string::npos) << message;
  EXPECT_TRUE(fs::is_empty(sub));
}

TEST(AtomicWrite, AWriteThatFailsHalfwayLeavesTheOldFileAndNoTemporary) {
  // A file-size limit makes write() fail part way (EFBIG) even for root, as a
  // full disk would; SIGXFSZ is ignored so the failure comes back as an error.
  TempDir dir;
  fs::path target = dir.path / "report.html";
  std::ofstream(target) << "old";
  struct rlimit saved {};
  ASSERT_EQ(::getrlimit(RLIMIT_FSIZE, &saved), 0);
  struct rlimit small = saved;
  small.rlim_cur = 4096;
  auto old_handler = std::signal(SIGXFSZ, SIG_IGN);
  ASSERT_EQ(::setrlimit(RLIMIT_FSIZE, &small), 0);
  std::string message = error_of([&] { write_file_atomically(target.string(), std::string(100000, 'x')); });
  ::setrlimit(RLIMIT_FSIZE, &saved);
  std::signal(SIGXFSZ, old_handler);
  EXPECT_NE(message.find(target.string()), std::string::npos) << message;
  EXPECT_NE(message.find("too large"), std::string::npos) << message;  // strerror(EFBIG)
  EXPECT_EQ(slurp(target), "old");
  EXPECT_EQ(dir.names(), std::vector<std::string>{"report.html"});
}

TEST(AtomicWrite, ASymbolicLinkKeepsPointingAtTheNewContents) {
  TempDir dir;
  fs::path real = dir.path / "real.html", link = dir.path / "latest.html";
  std::ofstream(real) << "old";
  fs::create_symlink(real, link);
  write_file_atomically(link.string(), "new");
  EXPECT_TRUE(fs::is_symlink(link));
  EXPECT_EQ(slurp(real), "new");
  EXPECT_EQ(dir.names(), (std::vector<std::string>{"latest.html", "real.html"}));
}

TEST(AtomicWrite, EmptyPathIsAnInputError) {
  EXPECT_THROW(write_file_atomically("", "x"), input_error);
}

// ------------------------------------------------------------------ the document

svg::Chart small_chart(const std::string& name) {
  svg::Chart c;
  c.title = "Error <" + name + ">";
  c.x.label = "Temperature (\u00b0C)";
  c.y.label = "Error (K)";
  c.series.push_back(svg::line(name, "Nominal", {0, 25, 50}, {0.1, std::nullopt, -0.2}));
  return c;
}

HtmlDocument sample_document() {
  HtmlDocument doc("Design review <default> & \"friends\"");
  doc.verdict(Badge::fail, "worst case 0.61 K exceeds \u00b10.5 K")
      .heading("Error across the range")
      .paragraph("Errors are reported minus true, in kelvin.")
      .chart(small_chart("nominal"), "Figure 1. Error bands <all>")
      .chart(small_chart("other"))
      .table({.caption = "Contributors",
              .header = {"Source", "Error (K)", "Share (%)"},
              .rows = {{"r25_tol", "0.31", "45"}, {"beta_tol", "\u22120.20", "30"}, {"adc", "\u00b10.05", ""}},
              .numeric = {}})
      .caution("Self-heating assumes still air <1 m/s>.")
      .preformatted("[sensor]\nmodel = beta\n")
      .heading("Details", 3);
  return doc;
}

TEST(HtmlDocument, IsSelfContainedWithAPrintStyleSheet) {
  std::string html = sample_document().str();
  EXPECT_EQ(html.rfind("<!DOCTYPE html>", 0), 0u);
  for (const char* banned : {"<script", "src=", "href=", "@import", "url(", "@font-face", "<link"})
    EXPECT_EQ(html.find(banned), std::string::npos) << banned;
  EXPECT_NE(html.find("@media print"), std::string::npos);
  EXPECT_NE(html.find("@page"), std::string::npos);
  EXPECT_NE(html.find("figure.chart, .verdict, .caution, pre { break-inside: avoid;"), std::string::npos);
  EXPECT_NE(html.find("<title>Design review &lt;default&gt; &amp; &quot;friends&quot;</title>"), std::string::npos);
}

TEST(HtmlDocument, VerdictsCarryTheirResultInWordsAndNumericColumnsAlignRight) {
  HtmlDocument pass("p");
  pass.verdict(Badge::pass, "within limits");
  std::string p = pass.str();
  EXPECT_NE(p.find("class=\"verdict pass\""), std::string::npos);
  EXPECT_NE(p.find("PASS"), std::string::npos);
  std::string html = sample_document().str();
  EXPECT_NE(html.find("class=\"verdict fail\""), std::string::npos);
  EXPECT_NE(html.find("FAIL"), std::string::npos);
  EXPECT_NE(html.find("<th scope=\"col\">Source</th><th scope=\"col\" class=\"num\">Error (K)</th>"),
            std::string::npos);
  EXPECT_NE(html.find("<td>beta_tol</td><td class=\"num\">\u22120.20</td><td class=\"num\">30</td>"),
            std::string::npos);
}

TEST(HtmlDocument, PythonXmlParserReadsTheWholeReport) {
  TempDir dir;
  fs::path file = dir.path / "report.html";
  write_file_atomically(file.string(), sample_document().str());
  std::ofstream(dir.path / "read.py")
      << "import sys, xml.etree.ElementTree as E\n"
         "root = E.parse(sys.argv[1]).getroot()\n"
         "svg = '{http://www.w3.org/2000/svg}'\n"
         "print(len(root.findall('.//' + svg + 'svg')))\n"
         "print(len(root.findall('.//figure')))\n"
         "print(root.find('head/title').text)\n"
         "print(''.join(root.find('.//figcaption').itertext()))\n"
         "print(len(root.findall('.//tbody/tr')))\n"
         "print(len(root.findall('.//script')))\n";
  std::istringstream out(output_of(std::string(THERMARGIN_PYTHON) + " " + (dir.path / "read.py").string() + " " +
                             file.string()));
  std::vector<std::string> lines;
  for (std::string l; std::getline(out, l);) lines.push_back(l);
  EXPECT_EQ(lines, (std::vector<std::string>{"2", "2", "Design review <default> & \"friends\"",
                                             "Figure 1. Error bands <all>", "3", "0"}));
}

}  // namespace
}  // namespace thermargin
