// A real browser opens the design-review reports: Debian's headless
// Chromium loads each `thermargin budget|pick|grades --report` page with console logging on
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
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include <algorithm>
#include <iterator>

#include <nlohmann/json.hpp>

#include "cli_run.hpp"

namespace thermargin {
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

using testing::shell_quote;
using TempDir = testing::ScratchDir;

// Screenshots `page` into `png`; returns Chromium's log (stderr). A fresh
// profile directory each time, and every background service off, so the run
// neither depends on nor touches anything outside `dir`.
std::string screenshot(const fs::path& page, const fs::path& png, const fs::path& dir) {
  const fs::path profile = dir / "profile";
  fs::create_directory(profile);
  const std::string cmd =
      "timeout 180 " + std::string(kChromium) +
      " --headless --no-sandbox --disable-gpu --disable-quic --no-first-run --disable-background-networking"
      " --disable-component-update --disable-sync --disable-extensions --hide-scrollbars"
      " --enable-logging=stderr --v=0 --user-data-dir=" +
      shell_quote(profile.string()) + " --window-size=" + std::to_string(kWidth) + "," + std::to_string(kHeight) +
      " --screenshot=" + shell_quote(png.string()) + " " + shell_quote("file://" + page.string()) + " >/dev/null";
  const testing::CliOutcome r = testing::run_shell(cmd);
  std::string text = r.err;
  if (r.status != 0) text += "\n(chromium exit status " + std::to_string(r.status) + ")";
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

// Writes the page of `command ... --report PAGE`, opens it in Chromium and
// checks the console and the screenshot.
void expect_rendered(const std::string& command) {
  ASSERT_TRUE(have_chromium()) << kNoChromium;
  TempDir dir;
  const fs::path page = dir.path / "review.html", png = dir.path / "shot.png";
  ASSERT_EQ(testing::run_cli(command + " --output /dev/null --report " + shell_quote(page.string())).status, 0) << command;
  const std::string log = screenshot(page, png, dir.path);
  EXPECT_EQ(console_errors(log), "") << log;
  ASSERT_TRUE(fs::exists(png)) << log;

  const std::string read = testing::reference_output("report_png.py", shell_quote(png.string()));
  int width = 0, height = 0, colours = 0;
  double ink = 0, dark = 0;
  const int fields = std::sscanf(read.c_str(), "%d %d %d %lf %lf", &width, &height, &colours, &ink, &dark);
  ASSERT_EQ(fields, 5) << "report_png.py did not read the screenshot";
  EXPECT_EQ(width, kWidth);
  EXPECT_EQ(height, kHeight);
  EXPECT_GE(colours, kMinColours) << command;
  EXPECT_GE(ink, kMinInk) << command;
  EXPECT_LE(ink, kMaxInk) << command;
  EXPECT_GE(dark, kMinDark) << command;
}

std::string fermentation() { return shell_quote(testing::scenario_path("fermentation_probe.ini")); }

TEST(ReportInBrowser, BudgetPageOpensWithoutConsoleErrorsAndRenders) {
  expect_rendered("budget " + fermentation() + " --montecarlo.units=2000");
}

TEST(ReportInBrowser, PickPageOpensWithoutConsoleErrorsAndRenders) {
  expect_rendered("pick " + fermentation() + " --series e24 --range 1k..100k");
}

TEST(ReportInBrowser, GradesPageOpensWithoutConsoleErrorsAndRenders) {
  expect_rendered("grades " + fermentation() + " --catalogue " +
                  shell_quote(testing::scenario_path("fermentation_probe_catalogue.csv")) + " --units 2000 --volume 5000");
}

// The page laid out by Chromium in a 1280 px window: a copy of the page
// without its security policy and with a measuring script (the page itself
// runs none) opens every folded section, then writes what it measured into
// the page, which --dump-dom prints: the viewport's width, the page's
// scroll width, the right edge of the widest element, each section's
// heading and the schematic's text.
nlohmann::json layout_at_1280(const fs::path& page, const fs::path& dir) {
  std::ifstream in(page);
  std::string html((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  const auto csp = html.find("<meta http-equiv=\"Content-Security-Policy\"");
  if (csp != std::string::npos) html.erase(csp, html.find('>', csp) + 1 - csp);
  const std::string script = R"(<script>
for (const d of document.querySelectorAll('details')) d.open = true;
let widest = 0, what = '';
for (const e of document.querySelectorAll('body *')) {
  const r = e.getBoundingClientRect();
  if (r.width > 0 && r.right > widest) { widest = r.right; what = e.tagName + ' ' + (e.getAttribute('class') || ''); }
}
const s = document.querySelector('svg.schematic');
const out = document.createElement('pre');
out.id = 'measured';
out.textContent = JSON.stringify({viewport: document.documentElement.clientWidth, scroll: document.documentElement.scrollWidth,
  widest: widest, what: what, sections: [...document.querySelectorAll('h2')].map(h => h.textContent),
  schematic: s ? [...s.querySelectorAll('text')].map(t => t.textContent) : null});
document.body.appendChild(out);
</script>)";
  html.insert(html.rfind("</body>"), script);
  const fs::path copy = dir / "measured.html";
  std::ofstream(copy) << html;
  const fs::path profile = dir / "profile-measure";
  fs::create_directory(profile);
  const std::string dom = testing::output_of(
      "timeout 180 " + std::string(kChromium) +
      " --headless --no-sandbox --disable-gpu --no-first-run --disable-background-networking --disable-component-update"
      " --disable-sync --disable-extensions --hide-scrollbars --user-data-dir=" + shell_quote(profile.string()) +
      " --window-size=1280,900 --dump-dom " + shell_quote("file://" + copy.string()) + " 2>/dev/null");
  const std::string marker = "<pre id=\"measured\">";
  const auto from = dom.find(marker);
  if (from == std::string::npos) return nullptr;
  const auto begin = from + marker.size();
  std::string text = dom.substr(begin, dom.find("</pre>", begin) - begin);
  for (const auto& [entity, c] : {std::pair{"&lt;", "<"}, std::pair{"&gt;", ">"}, std::pair{"&amp;", "&"}})
    for (std::size_t at; (at = text.find(entity)) != std::string::npos;) text.replace(at, std::string(entity).size(), c);
  return nlohmann::json::parse(text);
}

TEST(ReportInBrowser, BudgetPageFitsA1280PxWindowWithTheSchematicAndEverySection) {
  ASSERT_TRUE(have_chromium()) << kNoChromium;
  TempDir dir;
  const fs::path page = dir.path / "review.html";
  // A design with every part of the schematic: a drive resistance, a
  // parallel resistor, a node capacitor and a sampling ADC; the what-if
  // table and the unreadable ranges (a 2.5 V reference below a 3.3 V
  // excitation saturates the cold end) are the wide and long parts.
  const std::string command = "budget " + fermentation() +
                              " --montecarlo.units=2000 --supply.r_drive=40 --divider.r_parallel=100k"
                              " --divider.c_node=100n --divider.settle_time=1s --adc.c_sample=10p --adc.r_switch=2k"
                              " --conditions.t_min=-20 --supply.ratiometric=false --supply.v_reference=2.5";
  ASSERT_EQ(testing::run_cli(command + " --output /dev/null --report " + shell_quote(page.string())).status, 0);
  const nlohmann::json m = layout_at_1280(page, dir.path);
  ASSERT_FALSE(m.is_null()) << "the measuring script wrote nothing";
  EXPECT_EQ(m["viewport"].get<double>(), 1280.0);
  EXPECT_LE(m["scroll"].get<double>(), 1280.0) << "the page scrolls sideways";
  EXPECT_LE(m["widest"].get<double>(), 1280.0) << "wider than the window: " << m["what"];
  for (const char* section : {"Production yield", "The circuit, checked by hand", "Error across the range",
                              "What the error is made of", "What would help", "Sensitivity", "Self-heating",
                              "Settling of the sampled node", "Temperatures that cannot be read", "Every resolved input"})
    EXPECT_NE(std::find(m["sections"].begin(), m["sections"].end(), section), m["sections"].end()) << section;
  ASSERT_TRUE(m["schematic"].is_array()) << "no schematic";
  std::string labels;
  for (const auto& t : m["schematic"]) labels += t.get<std::string>() + "\n";
  // The scenario's own values (fermentation_probe.ini: 12k, 3.3V, 12 bits) and the overrides above.
  for (const char* value : {"R_fixed 12 kohm", "V_exc 3.3 V", "R_drive 40 ohm", "R_par 100 kohm", "C_node 100 nF",
                            "ADC 12 bit", "reference 2.5 V"})
    EXPECT_NE(labels.find(value), std::string::npos) << value << " in\n" << labels;
}

TEST(ReportInBrowser, TheWidthCheckSeesATableWiderThanTheWindow) {
  // The measure above is only worth something if it sees an overflow: a
  // table of 2000 px in a folded section must be reported.
  ASSERT_TRUE(have_chromium()) << kNoChromium;
  TempDir dir;
  const fs::path page = dir.path / "wide.html";
  std::ofstream(page) << "<!DOCTYPE html><html><body><h2>Wide</h2><details><summary>s</summary>"
                         "<table style=\"width:2000px\"><tr><td>x</td></tr></table></details></body></html>\n";
  const nlohmann::json m = layout_at_1280(page, dir.path);
  ASSERT_FALSE(m.is_null());
  EXPECT_GT(m["widest"].get<double>(), 1280.0);
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
}  // namespace thermargin
