// Tests of thermargin/report/svg_chart.hpp: axis ranges and ticks on round numbers
// (the 1-2-5 convention of graph paper, common practice), gaps that never put
// a non-finite number into the SVG, data attributes that give back the input
// numbers (checked against the C library's own %.9g), escaping of user text,
// and, as an outside opinion, Python's xml.etree parsing the chart.
#include "thermargin/report/svg_chart.hpp"

#include <gtest/gtest.h>

#include <array>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <limits>
#include <random>
#include <regex>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "cli_run.hpp"

namespace thermargin::svg {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
// Tick values are built as integer / power of ten; this much slack only
// absorbs the division's last-bit rounding when a test recomputes a ratio.
constexpr double kTickSlack = 1e-9;

// True when step is 1, 2 or 5 times a power of ten.
bool one_two_five(double step) {
  double e = std::floor(std::log10(step));
  double m = step / std::pow(10.0, e);
  for (double allowed : {1.0, 2.0, 5.0, 10.0})
    if (std::fabs(m - allowed) < 1e-9 * allowed) return true;
  return false;
}

std::vector<double> tick_values(const AxisPlan& plan, bool majors_only = false) {
  std::vector<double> v;
  for (const Tick& t : plan.ticks)
    if (!majors_only || t.major) v.push_back(t.value);
  return v;
}

// Reads a tick label back as a number: "−0.4" (U+2212), "2×10⁹", "10⁻⁸".
double parse_label(std::string s) {
  auto replace_all = [&](const std::string& from, const std::string& to) {
    for (std::size_t at = s.find(from); at != std::string::npos; at = s.find(from, at + to.size()))
      s.replace(at, from.size(), to);
  };
  replace_all("\u2212", "-");
  replace_all("\u207b", "-");
  const char* sup[] = {"\u2070", "\u00b9", "\u00b2", "\u00b3", "\u2074", "\u2075", "\u2076", "\u2077", "\u2078", "\u2079"};
  std::size_t power = s.find("10", s.find("\u00d7") == std::string::npos ? 0 : s.find("\u00d7"));
  bool has_power = false;
  for (const char* d : sup)
    if (s.find(d) != std::string::npos) has_power = true;
  if (!has_power) return std::stod(s);
  std::size_t times = s.find("\u00d7");
  double mant = times == std::string::npos ? (s[0] == '-' ? -1.0 : 1.0) : std::stod(s.substr(0, times));
  std::string exponent = s.substr(power + 2);
  for (int digit = 0; digit < 10; ++digit) {
    std::string from = sup[digit];
    for (std::size_t at = exponent.find(from); at != std::string::npos; at = exponent.find(from))
      exponent.replace(at, from.size(), std::to_string(digit));
  }
  return mant * std::pow(10.0, std::stoi(exponent));
}

// Checks the linear-axis contract for data [lo, hi]; returns the step.
double check_linear_plan(double lo, double hi, int target) {
  SCOPED_TRACE("data " + std::to_string(lo) + " .. " + std::to_string(hi));
  AxisPlan p = plan_axis(Axis{}, lo, hi, target);
  std::vector<double> t = tick_values(p);
  EXPECT_GE(t.size(), 3u);
  EXPECT_LE(p.min, lo);
  EXPECT_GE(p.max, hi);
  if (t.size() < 2) return 0;
  double step = t[1] - t[0];
  EXPECT_TRUE(one_two_five(step)) << "step " << step;
  for (std::size_t i = 0; i < t.size(); ++i) {
    double k = t[i] / step;
    EXPECT_NEAR(k, std::round(k), kTickSlack) << "tick " << t[i] << " is not a multiple of " << step;
    if (i > 0) EXPECT_NEAR(t[i] - t[i - 1], step, step * kTickSlack);
    EXPECT_NEAR(parse_label(p.ticks[i].label), t[i], std::fabs(t[i]) * 1e-12) << "label " << p.ticks[i].label;
  }
  // free ends are widened exactly to a tick
  EXPECT_EQ(p.min, t.front());
  EXPECT_EQ(p.max, t.back());
  return step;
}

TEST(SvgAxis, LinearRangeFromPointThirteenToPointEightySevenGetsTicksOnFifths) {
  AxisPlan p = plan_axis(Axis{}, 0.13, 0.87, 5);
  EXPECT_EQ(p.min, 0.0);
  EXPECT_EQ(p.max, 1.0);
  // exact: each tick is the double nearest the decimal, not an accumulated sum
  EXPECT_EQ(tick_values(p), (std::vector<double>{0.0, 0.2, 0.4, 0.6, 0.8, 1.0}));
  std::vector<std::string> labels;
  for (const Tick& t : p.ticks) labels.push_back(t.label);
  EXPECT_EQ(labels, (std::vector<std::string>{"0.0", "0.2", "0.4", "0.6", "0.8", "1.0"}));
}

TEST(SvgAxis, ForcedLimitsAreKeptAndTicksFallInside) {
  Axis a;
  a.min = 0.13;
  a.max = 0.87;
  AxisPlan p = plan_axis(a, 0.2, 0.3, 5);
  EXPECT_EQ(p.min, 0.13);
  EXPECT_EQ(p.max, 0.87);
  EXPECT_EQ(tick_values(p), (std::vector<double>{0.2, 0.4, 0.6, 0.8}));
}

TEST(SvgAxis, LinearTicksFollowTheOneTwoFiveRuleOverManyRanges) {
  const std::vector<std::array<double, 2>> ranges{
      {0.13, 0.87}, {-0.57, 0.46}, {-20, 85}, {0, 1e6}, {1.1e-6, 3.7e-6}, {-3e-3, -1e-3}, {998, 1003}, {-1e9, 2.5e9}};
  std::set<double> steps;
  for (auto [lo, hi] : ranges)
    for (int target : {3, 5, 8}) steps.insert(check_linear_plan(lo, hi, target));
  EXPECT_GT(steps.size(), 5u);  // the rule was exercised with different steps
}

TEST(SvgAxis, RandomRangesAlwaysGiveOneTwoFiveTicks) {
  std::mt19937_64 rng(20240611);
  std::uniform_real_distribution<double> exponent(-8, 8), unit(-1, 1);
  for (int i = 0; i < 300; ++i) {
    double scale = std::pow(10.0, exponent(rng));
    double a = unit(rng) * scale, b = unit(rng) * scale;
    if (a == b) continue;
    check_linear_plan(std::min(a, b), std::max(a, b), 5);
  }
}

TEST(SvgAxis, ASingleValueStillGetsARangeAroundIt) {
  AxisPlan p = plan_axis(Axis{}, 3.3, 3.3, 5);
  EXPECT_LT(p.min, 3.3);
  EXPECT_GT(p.max, 3.3);
  EXPECT_GE(p.ticks.size(), 2u);
  AxisPlan none = plan_axis(Axis{}, kNaN, kNaN, 5);
  EXPECT_EQ(none.min, 0.0);
  EXPECT_EQ(none.max, 1.0);
}

TEST(SvgAxis, LogAxisFromOneKiloToOneMegaGivesDecadesWithTwoAndFiveSubTicks) {
  Axis a;
  a.scale = Scale::log10;
  a.si_prefix = true;
  AxisPlan p = plan_axis(a, 1e3, 1e6, 5);
  EXPECT_EQ(p.min, 1e3);
  EXPECT_EQ(p.max, 1e6);
  EXPECT_EQ(tick_values(p, true), (std::vector<double>{1e3, 1e4, 1e5, 1e6}));
  EXPECT_EQ(tick_values(p), (std::vector<double>{1e3, 2e3, 5e3, 1e4, 2e4, 5e4, 1e5, 2e5, 5e5, 1e6}));
  std::vector<std::string> labels;
  for (const Tick& t : p.ticks)
    if (t.major) labels.push_back(t.label);
  EXPECT_EQ(labels, (std::vector<std::string>{"1k", "10k", "100k", "1M"}));
  for (const Tick& t : p.ticks)
    if (!t.major) EXPECT_TRUE(t.label.empty());
}

TEST(SvgAxis, LogAxisSnapsFreeEndsToOneTwoFiveValues) {
  Axis a;
  a.scale = Scale::log10;
  AxisPlan p = plan_axis(a, 1.2e3, 8e5, 5);
  EXPECT_EQ(p.min, 1e3);
  EXPECT_EQ(p.max, 1e6);
  AxisPlan narrow = plan_axis(a, 2.2e3, 4.7e3, 5);
  EXPECT_EQ(narrow.min, 2e3);
  EXPECT_EQ(narrow.max, 5e3);
  // less than a decade: the 2s and 5s carry the labels
  ASSERT_EQ(narrow.ticks.size(), 2u);
  EXPECT_TRUE(narrow.ticks[0].major && !narrow.ticks[0].label.empty());
  EXPECT_EQ(narrow.ticks[1].label, "5000");
}

TEST(SvgAxis, NarrowForcedLogRangeFallsBackToRoundLinearTicks) {
  Axis a;
  a.scale = Scale::log10;
  a.min = 4.5e3;
  a.max = 5.5e3;
  AxisPlan p = plan_axis(a, kNaN, kNaN, 5);
  ASSERT_GE(p.ticks.size(), 2u);
  double step = p.ticks[1].value - p.ticks[0].value;
  EXPECT_TRUE(one_two_five(step));
  for (const Tick& t : p.ticks) {
    EXPECT_GE(t.value, 4.5e3);
    EXPECT_LE(t.value, 5.5e3);
  }
}

TEST(SvgAxis, UndrawableForcedLimitsAreRejectedAsCallerBugs) {
  Axis a;
  a.min = 2;
  a.max = 1;
  EXPECT_THROW(plan_axis(a, 0, 1), std::invalid_argument);
  Axis l;
  l.scale = Scale::log10;
  l.min = 0;
  EXPECT_THROW(plan_axis(l, 1, 10), std::invalid_argument);
}

// ------------------------------------------------------------------ charts

Chart base_chart() {
  Chart c;
  c.title = "Error across the range";
  c.x.label = "Temperature (\u00b0C)";
  c.y.label = "Error (K)";
  return c;
}

// The attribute `name` of the <g class="series"> named `series`.
std::string series_attr(const std::string& svg, const std::string& series, const std::string& name) {
  std::regex group("<g class=\"series\" data-name=\"" + series + "\"[^>]*>");
  std::smatch m;
  if (!std::regex_search(svg, m, group)) return "(no such series)";
  std::regex a(" " + name + "=\"([^\"]*)\"");
  std::smatch am;
  std::string tag = m.str();
  return std::regex_search(tag, am, a) ? am[1].str() : "(no such attribute)";
}

std::vector<double> svg_numbers(const std::string& list) {
  std::vector<double> v;
  std::istringstream in(list);
  std::string word;
  while (in >> word) v.push_back(std::strtod(word.c_str(), nullptr));
  return v;
}

std::size_t count(const std::string& s, const std::string& what) {
  std::size_t n = 0;
  for (std::size_t at = s.find(what); at != std::string::npos; at = s.find(what, at + 1)) ++n;
  return n;
}

TEST(SvgChart, GapsBreakTheLineAndNoNonFiniteNumberIsWritten) {
  Chart c = base_chart();
  c.y.max = 0.5;  // the spike must be clipped, not written as a far-off coordinate
  std::vector<double> t{-20, -10, 0, 10, 20, 30, 40, 50};
  Values err{0.1, std::nullopt, 0.2, kNaN, 0.25, 1e300, kInf, 0.3};
  c.series.push_back(line("nominal", "Nominal", t, err));
  c.series.push_back(band("wc", "Worst case", t, {-0.3, -0.3, kNaN, -0.3, -0.2, -0.2, -0.1, -0.1},
                          {0.4, 0.4, 0.4, 0.4, kInf, 0.45, 0.45, 0.45}));
  c.series.push_back(points("mc", "Monte Carlo", {-kInf, 0, kNaN, 25}, {0.1, kNaN, 0.1, 0.2}));
  c.series.push_back(reference("limits", "requirement", {-0.5, 0.5, kNaN}));
  c.series.push_back(span("window", "Window", 0, kInf));
  c.series.push_back(annotation("worst", "worst", kNaN, 0.3));
  std::string svg = render(c);
  std::string lower = svg;
  for (char& ch : lower) ch = static_cast<char>(std::tolower(static_cast<unsigned char>(ch)));
  EXPECT_FALSE(std::regex_search(lower, std::regex("\\b(nan|inf|infinity)\\b"))) << svg;
  // -20 | gap | 0 | gap | 20, 1e300 | gap (inf) | 50
  EXPECT_EQ(series_attr(svg, "nominal", "data-runs"), "4");
  EXPECT_EQ(svg_numbers(series_attr(svg, "nominal", "data-x")), (std::vector<double>{-20, 0, 20, 30, 50}));
  EXPECT_EQ(series_attr(svg, "wc", "data-runs"), "3");
  EXPECT_EQ(svg_numbers(series_attr(svg, "mc", "data-x")), (std::vector<double>{25}));
  EXPECT_EQ(svg_numbers(series_attr(svg, "limits", "data-y")), (std::vector<double>{-0.5, 0.5}));
  EXPECT_EQ(series_attr(svg, "window", "data-x0"), "0");
  EXPECT_EQ(series_attr(svg, "window", "data-x1"), "(no such attribute)");
  EXPECT_EQ(count(svg, "class=\"segment\""), 4u);
  // every pixel number is an ordinary decimal
  std::regex coord("(?:x|y|cx|cy|r|width|height)=\"([^\"]*)\"");
  for (auto it = std::sregex_iterator(svg.begin(), svg.end(), coord); it != std::sregex_iterator(); ++it)
    EXPECT_TRUE(std::isfinite(std::strtod((*it)[1].str().c_str(), nullptr))) << (*it).str();
}

TEST(SvgChart, LogAxisTreatsNonPositiveValuesAsGaps) {
  Chart c = base_chart();
  c.x.scale = Scale::log10;
  c.series.push_back(line("wc", "Worst case", {-1, 0, 1e3, 1e4, 1e5}, {1, 2, 3, 4, 5}));
  std::string svg = render(c);
  EXPECT_EQ(svg_numbers(series_attr(svg, "wc", "data-x")), (std::vector<double>{1e3, 1e4, 1e5}));
  EXPECT_EQ(series_attr(svg, "wc", "data-runs"), "1");
}

// Pixel position (cx or cy) of each drawn point marker of the chart, by its data value.
std::vector<std::pair<double, double>> marker_pixels(const std::string& svg, const char* coordinate) {
  std::regex marker(std::string("class=\"point\" data-x=\"([^\"]*)\" data-y=\"([^\"]*)\" cx=\"([^\"]*)\" cy=\"([^\"]*)\""));
  const bool want_y = std::string(coordinate) == "cy";
  std::vector<std::pair<double, double>> out;
  for (auto it = std::sregex_iterator(svg.begin(), svg.end(), marker); it != std::sregex_iterator(); ++it)
    out.emplace_back(std::stod((*it)[want_y ? 2 : 1].str()), std::stod((*it)[want_y ? 4 : 3].str()));
  return out;
}

// The y pixel of each tick on the y axis (a horizontal mark left of the plot), by its value.
std::vector<std::pair<double, double>> y_tick_pixels(const std::string& svg) {
  std::regex tick("class=\"tick\" data-value=\"([^\"]*)\" d=\"M([^,]*),([^L]*)L([^,]*),([^\"]*)\"");
  std::vector<std::pair<double, double>> out;
  for (auto it = std::sregex_iterator(svg.begin(), svg.end(), tick); it != std::sregex_iterator(); ++it)
    if ((*it)[3].str() == (*it)[5].str()) out.emplace_back(std::stod((*it)[1].str()), std::stod((*it)[3].str()));
  return out;
}

// Pixels are written with two decimals; a recomputed distance may differ by two roundings.
constexpr double kPixelSlack = 0.011;

TEST(SvgChart, LogYAxisPutsEachDecadeTheSameHeightAndTwoAtItsLogTen) {
  // Graph-paper log scale (common practice): equal ratios are equal
  // distances, so 1, 10 and 100 are equally spaced and 2 sits log10(2) =
  // 0.30103 of a decade above 1 (the value from a table of logarithms).
  Chart c = base_chart();
  c.y.scale = Scale::log10;
  c.y.label = "Error (K)";
  c.series.push_back(points("p", "p", {0, 1, 2, 3}, {1.0, 2.0, 10.0, 100.0}));
  const std::string svg = render(c);
  const auto px = marker_pixels(svg, "cy");
  ASSERT_EQ(px.size(), 4u) << svg;
  const double y1 = px[0].second, y2 = px[1].second, y10 = px[2].second, y100 = px[3].second;
  EXPECT_GT(y1, y10);  // SVG y grows downwards: larger values are higher up
  EXPECT_NEAR(y1 - y10, y10 - y100, kPixelSlack);
  EXPECT_NEAR((y1 - y2) / (y1 - y10), 0.30103, kPixelSlack / (y1 - y10) + 5e-6);
  // The axis: decades labelled, 2 and 5 between them, each tick at the height of its value.
  const auto ticks = y_tick_pixels(svg);
  std::vector<double> at;
  for (const auto& [v, y] : ticks) at.push_back(v);
  EXPECT_EQ(at, (std::vector<double>{1, 2, 5, 10, 20, 50, 100}));
  for (const auto& [v, y] : ticks) {
    if (v == 1) EXPECT_NEAR(y, y1, kPixelSlack);
    if (v == 2) EXPECT_NEAR(y, y2, kPixelSlack);
    if (v == 10) EXPECT_NEAR(y, y10, kPixelSlack);
    if (v == 100) EXPECT_NEAR(y, y100, kPixelSlack);
  }
  // The x axis of the pick chart is log too: the same spacing across.
  Chart r = base_chart();
  r.x.scale = Scale::log10;
  r.series.push_back(points("p", "p", {1e3, 1e4, 1e5}, {0.1, 0.2, 0.3}));
  const auto rx = marker_pixels(render(r), "cx");
  ASSERT_EQ(rx.size(), 3u);
  EXPECT_NEAR(rx[1].second - rx[0].second, rx[2].second - rx[1].second, kPixelSlack);
}

TEST(SvgChart, NonPositiveValuesOnALogYAxisAreGapsAndStayOutOfItsRange) {
  Chart c = base_chart();
  c.y.scale = Scale::log10;
  c.series.push_back(line("err", "Error", {0, 1, 2, 3, 4, 5}, {1.0, -3.0, 0.0, 10.0, 100.0, kNaN}));
  c.series.push_back(band("wc", "Worst case", {0, 1, 2}, {0.5, -1.0, 2.0}, {3.0, 4.0, 6.0}));
  c.series.push_back(points("pts", "Points", {0, 1}, {-2.0, 20.0}));
  c.series.push_back(reference("limit", "limit", {0.0, 50.0}));
  c.series.push_back(annotation("note", "zero", 1, 0.0));
  const std::string svg = render(c);
  // 1 | gap (-3, 0) | 10, 100: two runs, and nothing of the gap is listed or drawn
  EXPECT_EQ(svg_numbers(series_attr(svg, "err", "data-y")), (std::vector<double>{1, 10, 100}));
  EXPECT_EQ(series_attr(svg, "err", "data-runs"), "2");
  EXPECT_EQ(count(svg, "class=\"segment\""), 2u);
  EXPECT_EQ(svg_numbers(series_attr(svg, "wc", "data-x")), (std::vector<double>{0, 2}));
  EXPECT_EQ(series_attr(svg, "wc", "data-runs"), "2");
  EXPECT_EQ(svg_numbers(series_attr(svg, "pts", "data-y")), (std::vector<double>{20}));
  EXPECT_EQ(svg_numbers(series_attr(svg, "limit", "data-y")), (std::vector<double>{50}));
  EXPECT_EQ(series_attr(svg, "note", "data-y"), "(no such attribute)");
  // The range is that of the drawn values, 0.5 .. 100, not widened down to
  // (or thrown off by) the values <= 0.
  const auto ticks = y_tick_pixels(svg);
  ASSERT_FALSE(ticks.empty());
  EXPECT_EQ(ticks.front().first, 0.5);
  EXPECT_EQ(ticks.back().first, 100.0);
  // Every drawn coordinate lies inside the chart.
  std::regex coord("(?:cx|cy)=\"([^\"]*)\"");
  for (auto it = std::sregex_iterator(svg.begin(), svg.end(), coord); it != std::sregex_iterator(); ++it) {
    const double v = std::stod((*it)[1].str());
    EXPECT_TRUE(v >= 0 && v <= 720) << (*it).str();
  }
}

TEST(SvgChart, AnAnnotationNextToAReferenceLabelMovesItsTextBelowThePoint) {
  // The pick chart's winner just under the limit line, at the right of the
  // plot: written above the point, its label would run into the limit's.
  auto chart = [](const std::string& limit_label) {
    Chart c = base_chart();
    c.x.scale = Scale::log10;
    c.y.min = 0.0;
    c.y.max = 1.25;
    c.series.push_back(reference("limit", limit_label, {0.5}));
    c.series.push_back(annotation("winner", "best: 20 kohm", 2e4, 0.45));
    c.series.push_back(points("p", "p", {1e3, 1e5}, {0.9, 0.6}));
    return render(c);
  };
  auto text_below_ring = [](const std::string& svg) {
    std::smatch ring, text;
    EXPECT_TRUE(std::regex_search(svg, ring, std::regex("class=\"ring\" cx=\"[^\"]*\" cy=\"([^\"]*)\"")));
    EXPECT_TRUE(std::regex_search(svg, text, std::regex("<text x=\"[^\"]*\" y=\"([^\"]*)\"[^>]*>best: 20 kohm<")));
    return std::stod(text[1].str()) > std::stod(ring[1].str());
  };
  EXPECT_FALSE(text_below_ring(chart("")));  // nothing in the way: above, as usual
  EXPECT_TRUE(text_below_ring(chart("requirement \u00b10.500 K")));
}

TEST(SvgChart, DataAttributesGiveBackTheInputToNineSignificantDigits) {
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> exponent(-12, 12), mantissa(-10, 10);
  std::vector<double> x, y;
  for (int i = 0; i < 200; ++i) {
    x.push_back(i * 0.37 - 20);
    y.push_back(mantissa(rng) * std::pow(10.0, exponent(rng)));
  }
  Chart c = base_chart();
  c.series.push_back(line("rt", "Round trip", x, values(y)));
  c.series.push_back(points("pts", "Points", x, values(y)));
  std::string svg = render(c);
  for (const char* name : {"rt", "pts"}) {
    std::vector<double> gx = svg_numbers(series_attr(svg, name, "data-x"));
    std::vector<double> gy = svg_numbers(series_attr(svg, name, "data-y"));
    ASSERT_EQ(gx.size(), x.size());
    ASSERT_EQ(gy.size(), y.size());
    for (std::size_t i = 0; i < x.size(); ++i) {
      // the C library's %.9g is the independent reference
      char bx[64], by[64];
      std::snprintf(bx, sizeof bx, "%.9g", x[i]);
      std::snprintf(by, sizeof by, "%.9g", y[i]);
      EXPECT_EQ(gx[i], std::strtod(bx, nullptr));
      EXPECT_EQ(gy[i], std::strtod(by, nullptr));
      EXPECT_NEAR(gy[i], y[i], std::fabs(y[i]) * 5e-9);
    }
  }
  // one data-x/data-y pair per drawn point of the scatter, too
  EXPECT_EQ(count(svg, "class=\"point\" data-x="), x.size());
}

TEST(SvgChart, UserTextIsEscapedEverywhere) {
  const std::string evil = "<script>alert('x')</script> & \"quoted\"";
  Chart c = base_chart();
  c.title = evil;
  c.description = evil;
  c.x.label = evil;
  c.y.label = evil;
  c.series.push_back(line("a\"b<c>&'d", evil, {1, 2}, {1, 2}));
  c.series.push_back(annotation("note", evil, 1.5, 1.5));
  std::string svg = render(c);
  EXPECT_EQ(svg.find("<script"), std::string::npos);
  EXPECT_EQ(svg.find("'x'"), std::string::npos);
  EXPECT_NE(svg.find("&lt;script&gt;alert(&#39;x&#39;)&lt;/script&gt; &amp; &quot;quoted&quot;"), std::string::npos);
  EXPECT_NE(svg.find("data-name=\"a&quot;b&lt;c&gt;&amp;&#39;d\""), std::string::npos);
}

TEST(SvgChart, PixelSizeDoesNotDependOnTheData) {
  Chart small = base_chart(), big = base_chart();
  small.series.push_back(line("s", "s", {0, 1}, {0, 1}));
  std::vector<double> x(5000), y(5000);
  for (int i = 0; i < 5000; ++i) x[i] = i, y[i] = std::sin(i * 0.01) * 1e6;
  big.series.push_back(line("b", "b", x, values(y)));
  for (const Chart* c : {&small, &big}) {
    std::string svg = render(*c);
    EXPECT_NE(svg.find("width=\"720\" height=\"400\" viewBox=\"0 0 720 400\""), std::string::npos);
  }
}

TEST(SvgChart, CallerBugsAreRefused) {
  Chart c = base_chart();
  c.series.push_back(line("a", "A", {1, 2, 3}, {1, 2}));
  EXPECT_THROW(render(c), std::invalid_argument);
  Chart d = base_chart();
  d.series.push_back(line("same", "A", {1}, {1}));
  d.series.push_back(points("same", "B", {1}, {1}));
  EXPECT_THROW(render(d), std::invalid_argument);
  Chart e = base_chart();
  e.series.push_back(line("a", "A", {1}, {1}, Style{.slot = 99}));
  EXPECT_THROW(render(e), std::invalid_argument);
}

// CIE 1976 L* of an sRGB colour (IEC 61966-2-1 transfer curve, D65 white;
// formulas from memory).
double lightness(const char* hex) {
  auto channel = [&](int i) {
    double c = std::stoi(std::string(hex + 1 + 2 * i, 2), nullptr, 16) / 255.0;
    return c <= 0.04045 ? c / 12.92 : std::pow((c + 0.055) / 1.055, 2.4);
  };
  double y = 0.2126 * channel(0) + 0.7152 * channel(1) + 0.0722 * channel(2);
  return y > 216.0 / 24389.0 ? 116 * std::cbrt(y) - 16 : y * 24389.0 / 27.0;
}

TEST(SvgPalette, TheFirstFourSlotsDifferInLightnessAndEverySlotInDashAndMarker) {
  auto p = palette();
  ASSERT_GE(p.size(), 4u);
  for (std::size_t i = 0; i < 4; ++i)
    for (std::size_t j = i + 1; j < 4; ++j)
      EXPECT_GE(std::fabs(lightness(p[i].hex) - lightness(p[j].hex)), 12.0) << p[i].hex << " vs " << p[j].hex;
  std::set<std::pair<Dash, Marker>> styles;
  std::set<Marker> markers;
  for (const PaletteEntry& e : p) {
    styles.insert({e.dash, e.marker});
    markers.insert(e.marker);
    // a line must stay visible on white paper
    EXPECT_LE(lightness(e.hex), 80.0) << e.hex;
  }
  EXPECT_EQ(styles.size(), p.size());
  EXPECT_EQ(markers.size(), p.size());
}

// ------------------------------------------------------------ outside view

using testing::output_of;
using TempDir = testing::ScratchDir;

// Parses the file with xml.etree and prints: series count, the names in
// order, the data-x of "wc_high", how many curve and area points fall
// outside the plot frame (the first rect of the axes group), and the title.
constexpr const char* kInspect = R"py(
import re, sys, xml.etree.ElementTree as E
ns = {'s': 'http://www.w3.org/2000/svg'}
root = E.parse(sys.argv[1]).getroot()
assert root.tag == '{http://www.w3.org/2000/svg}svg', root.tag
series = root.findall('.//s:g[@class="series"]', ns)
print(len(series))
print(' '.join(g.get('data-name') for g in series))
print(' '.join(g.get('data-x') for g in series if g.get('data-name') == 'wc_high'))
frame = root.find('.//s:g[@class="axes"]/s:rect', ns)
x0, y0 = float(frame.get('x')), float(frame.get('y'))
x1, y1 = x0 + float(frame.get('width')), y0 + float(frame.get('height'))
outside = 0
for g in series:
    for p in g.iter('{http://www.w3.org/2000/svg}path'):
        if p.get('class') not in ('segment', 'area', 'edge', 'level', 'boundary'):
            continue  # markers are centred inside but may overhang the frame
        nums = [float(v) for v in re.findall(r'-?[0-9.]+', p.get('d', ''))]
        for x, y in zip(nums[0::2], nums[1::2]):
            if not (x0 - 0.01 <= x <= x1 + 0.01 and y0 - 0.01 <= y <= y1 + 0.01):
                outside += 1
print(outside)
print(root.find('s:title', ns).text)
)py";

TEST(SvgChart, PythonXmlParserReadsTheChartAndItsSeries) {
  TempDir dir;
  Chart c = base_chart();
  c.title = "Budget <default> & \"friends\"";
  c.y.min = -0.4;  // forced limits that cut the curves: everything drawn must stay inside
  c.y.max = 0.4;
  std::vector<double> t;
  Values hi, lo, nom;
  for (int i = -20; i <= 85; i += 5) {
    t.push_back(i);
    bool saturated = i > 70;
    hi.push_back(saturated ? std::nullopt : std::optional<double>(0.3 + 0.01 * std::abs(i - 25)));
    lo.push_back(saturated ? std::nullopt : std::optional<double>(-0.3 - 0.01 * std::abs(i - 25)));
    nom.push_back(saturated ? std::nullopt : std::optional<double>(0.05 * std::sin(i / 10.0)));
  }
  c.series.push_back(span("window", "Requirement window", 0, 50));
  c.series.push_back(band("wc", "Worst case", t, lo, hi));
  c.series.push_back(line("wc_high", "Worst case, high", t, hi));
  c.series.push_back(line("nominal", "Nominal", t, nom));
  c.series.push_back(points("mc", "Monte Carlo", {0, 25, 50}, {0.1, 0.0, -0.1}));
  c.series.push_back(reference("limits", "\u00b10.5 K", {-0.5, 0.5}));
  c.series.push_back(annotation("worst", "worst", 70, 0.75));
  std::filesystem::path file = dir.path / "chart.svg";
  std::ofstream(file) << render_document(c);
  std::filesystem::path script = dir.path / "inspect.py";
  std::ofstream(script) << kInspect;

  std::istringstream out(output_of(std::string(THERMARGIN_PYTHON) + " " + script.string() + " " + file.string()));
  std::string count, names, wc_x, outside, title;
  std::getline(out, count);
  std::getline(out, names);
  std::getline(out, wc_x);
  std::getline(out, outside);
  std::getline(out, title);
  EXPECT_EQ(count, "7");
  EXPECT_EQ(names, "window wc limits wc_high nominal mc worst");  // drawn back to front
  std::vector<double> expect_x;
  for (std::size_t i = 0; i < t.size(); ++i)
    if (hi[i]) expect_x.push_back(t[i]);
  EXPECT_EQ(svg_numbers(wc_x), expect_x);
  EXPECT_EQ(outside, "0");
  EXPECT_EQ(title, c.title);
}

}  // namespace
}  // namespace thermargin::svg
