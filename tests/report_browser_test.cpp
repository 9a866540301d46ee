// A real browser opens the design-review report: Debian's headless
// Chromium loads a `thermargin budget --report` page with console logging on
// and takes a screenshot. The page must load without a console error (an
// uncaught script error or a Content-Security-Policy refusal would mean the
// page is not self-contained), and the screenshot, decoded by
// tests/reference/report_png.py with nothing but zlib, must have the asked
// size and real content: many colours, text and lines, not a blank page.
//
// Chromium is a test dependency (scripts/deps.sh installs it with
// THERMARGIN_TEST_EXTRAS=1, as CI does); when it is missing these tests fail
// with a message saying so rather than pass without looking.
#include <gtest/gtest.h>
#include <unistd.h>

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

namespace {

namespace fs = std::filesystem;

constexpr const char* kChromium = "/usr/bin/chromium";
constexpr int kWidth = 1000, kHeight = 2400;  // px: the verdict, margins, yield and the first two charts
// A rendered report has text, rules, tinted boxes, several chart colours and
// their anti-aliased edges: thousands of distinct colours. A blank or
// failed render has one or two.
constexpr int kMinColours = 200;
constexpr double kMinInk = 0.03, kMaxInk = 0.9;  // share of pixels that are not near white
constexpr double kMinDark = 0.005;                // share of dark pixels: text and lines

struct TempDir {
  fs::path path;
  TempDir() {
    std::string tmpl = (fs::temp_directory_path() / "thermargin-browser-XXXXXX").string();
    path = ::mkdtemp(tmpl.data());
  }
  ~TempDir() {
    std::error_code ec;
    fs::remove_all(path, ec);
  }
};

std::string slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

std::string quote(const std::string& s) {
  std::string q = "'";
  for (char c : s) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return q + "'";
}

int shell(const std::string& command) {
  const int raw = std::system(command.c_str());
  return WIFEXITED(raw) ? WEXITSTATUS(raw) : -1;
}

// Screenshots `page` into `png`; returns Chromium's log (stderr). A fresh
// profile directory each time, and every background service off, so the run
// neither depends on nor touches anything outside `dir`.
std::string screenshot(const fs::path& page, const fs::path& png, const fs::path& dir) {
  const fs::path profile = dir / "profile", log = dir / "chromium.log";
  fs::create_directory(profile);
  const std::string cmd =
      "timeout 180 " + std::string(kChromium) +
      " --headless --no-sandbox --disable-gpu --disable-quic --no-first-run --disable-background-networking"
      " --disable-component-update --disable-sync --disable-extensions --hide-scrollbars"
      " --enable-logging=stderr --v=0 --user-data-dir=" +
      quote(profile.string()) + " --window-size=" + std::to_string(kWidth) + "," + std::to_string(kHeight) +
      " --screenshot=" + quote(png.string()) + " " + quote("file://" + page.string()) + " >/dev/null 2>" +
      quote(log.string());
  const int status = shell(cmd);
  std::string text = slurp(log);
  if (status != 0) text += "\n(chromium exit status " + std::to_string(status) + ")";
  return text;
}

// The console's complaints in Chromium's log: uncaught errors, console
// errors, and refused loads (the page's security policy at work).
std::string console_errors(const std::string& log) {
  std::istringstream in(log);
  std::string found;
  for (std::string line; std::getline(in, line);)
    if (line.find("Uncaught") != std::string::npos || line.find("ERROR:CONSOLE") != std::string::npos ||
        line.find("Refused to") != std::string::npos)
      found += line + "\n";
  return found;
}

bool have_chromium() { return ::access(kChromium, X_OK) == 0; }
constexpr const char* kNoChromium =
    "Debian's chromium is not installed (/usr/bin/chromium); install it with "
    "THERMARGIN_TEST_EXTRAS=1 bash scripts/deps.sh, as CI does";

TEST(ReportInBrowser, OpensWithoutConsoleErrorsAndRendersTheReport) {
  ASSERT_TRUE(have_chromium()) << kNoChromium;
  TempDir dir;
  const fs::path page = dir.path / "review.html", png = dir.path / "shot.png";
  const std::string scenario = std::string(THERMARGIN_SOURCE_DIR) + "/scenarios/fermentation_probe.ini";
  ASSERT_EQ(shell(quote(THERMARGIN_CLI) + " budget " + quote(scenario) +
                  " --montecarlo.units=2000 --output /dev/null --report " + quote(page.string())),
            0);
  const std::string log = screenshot(page, png, dir.path);
  EXPECT_EQ(console_errors(log), "") << log;
  ASSERT_TRUE(fs::exists(png)) << log;

  FILE* p = ::popen((std::string(THERMARGIN_PYTHON) + " " + quote(std::string(THERMARGIN_SOURCE_DIR) +
                                                                 "/tests/reference/report_png.py") +
                     " " + quote(png.string()) + " 2>&1")
                        .c_str(),
                    "r");
  ASSERT_NE(p, nullptr);
  int width = 0, height = 0, colours = 0;
  double ink = 0, dark = 0;
  const int fields = std::fscanf(p, "%d %d %d %lf %lf", &width, &height, &colours, &ink, &dark);
  ::pclose(p);
  ASSERT_EQ(fields, 5) << "report_png.py did not read the screenshot";
  EXPECT_EQ(width, kWidth);
  EXPECT_EQ(height, kHeight);
  EXPECT_GE(colours, kMinColours);
  EXPECT_GE(ink, kMinInk);
  EXPECT_LE(ink, kMaxInk);
  EXPECT_GE(dark, kMinDark);
}

TEST(ReportInBrowser, TheConsoleCheckSeesAScriptErrorOnAPageThatHasOne) {
  // The check above is only worth something if a console error reaches the
  // log we read: a page with a failing script must be caught.
  ASSERT_TRUE(have_chromium()) << kNoChromium;
  TempDir dir;
  const fs::path page = dir.path / "broken.html";
  std::ofstream(page) << "<!DOCTYPE html><html><body><p>x</p><script>no_such_function();</script></body></html>\n";
  const std::string log = screenshot(page, dir.path / "shot.png", dir.path);
  EXPECT_NE(console_errors(log).find("no_such_function"), std::string::npos) << log;
}

}  // namespace
