// A small SVG chart writer for the design-review report and standalone plots.
//
// Presentation only, no physics: a chart is a plain struct (title, two axes,
// a list of series) rendered to one self-contained <svg> element with no
// scripts, fonts or external references, so it can be inlined into an HTML
// report or saved as a .svg file. The chart keeps a fixed pixel size whatever
// the data; axes get a "nice" range and ticks on round numbers: steps of
// 1, 2 or 5 times a power of ten on a linear axis, decades with 2 and 5
// sub-ticks on a log10 axis (the usual graph-paper convention; common
// practice). Styles are told apart by lightness, dash pattern and marker
// shape together, so a chart survives grey printing and colour-vision
// deficiency (see palette()). A missing value (std::nullopt, or any
// non-finite number) breaks a line instead of being drawn through, and no
// non-finite number is ever written. Every series is a
// <g class="series" data-name=".." data-kind=".."> whose data-* attributes
// list the plotted numbers (%.9g, space separated), so a test can read a
// chart back with an XML parser and compare it with the JSON output:
//   line    data-x data-y data-runs (runs between gaps), one
//           <path class="segment" data-x data-y> per run
//   band    data-x data-low data-high data-runs, one <path class="area"> per run
//   points  data-x data-y, and each marker (class="point") its own data-x data-y
//   reference data-y (the levels); span data-x0 data-x1 (an infinite end is
//   left out); annotation data-x data-y.
// Only points with a value are listed, and on a log axis only those whose
// coordinate on it is > 0 (a value <= 0 there is a gap: it breaks the line
// and counts in no axis range); points beyond forced axis limits are listed
// but clipped from the drawing. A log axis maps log10 of the value linearly
// onto its length, so 1, 10 and 100 sit equally far apart.
#pragma once

#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

namespace thermargin::svg {

// One y value per x; std::nullopt (or a non-finite value) is "no value here".
using Values = std::vector<std::optional<double>>;

// Converts plain numbers, turning NaN and infinities into "no value".
Values values(std::span<const double> numbers);

enum class Scale { linear, log10 };

struct Axis {
  std::string label;                // with its unit: "Temperature (°C)", "R_fixed (Ω)"
  Scale scale = Scale::linear;      // log10 ignores values <= 0 (they become gaps)
  std::optional<double> min, max;   // forced limits; otherwise a nice range around the data
  bool si_prefix = false;           // tick labels as 4.7k, 1M instead of 4700, 1000000
};

struct Tick {
  double value = 0;
  bool major = true;   // minor ticks (log sub-ticks) get no label
  std::string label;   // UTF-8, with a true minus sign (U+2212)
};

struct AxisPlan {
  double min = 0, max = 1;   // the axis range actually drawn
  std::vector<Tick> ticks;   // ascending, all within [min, max]
};

// Chooses the drawn range and the ticks of an axis for data spanning
// [data_min, data_max] (pass NaN for both when there is no data). Forced
// limits in `axis` are kept exactly; free ends are widened to a tick.
// Throws std::invalid_argument for forced limits that cannot be drawn
// (min >= max, or <= 0 on a log axis): that is a caller bug, not user input.
//
//   plan_axis({.label = "x"}, 0.13, 0.87).ticks   // 0, 0.2, 0.4, 0.6, 0.8, 1
AxisPlan plan_axis(const Axis& axis, double data_min, double data_max, int target_intervals = 5);

enum class Dash { automatic, solid, dashed, dotted, dash_dot };
enum class Marker { automatic, none, circle, square, triangle, diamond, cross, plus };

// How a series looks. `automatic` takes the value of the palette slot, and
// slot -1 takes the next slot not claimed by another series. On a line, an
// automatic marker is the slot's shape drawn at about eight spread-out points
// (a mark every point would hide the curve); an explicit one is drawn at
// every point.
struct Style {
  int slot = -1;
  Dash dash = Dash::automatic;
  Marker marker = Marker::automatic;
  bool hatched = false;   // span only: diagonal hatching ("excluded") instead of a light tint
};

// The style of palette slot `n` (its colour, dash and marker), the marker
// optionally chosen.
inline Style in_slot(int n, Marker m = Marker::automatic) { return Style{n, Dash::automatic, m, false}; }

// The palette: each slot pairs a colour with a dash pattern and a marker.
//   0 #10183f near-black navy  solid     circle    L* 10
//   1 #e8a33a light amber      dashed    square    L* 72
//   2 #b24a14 burnt orange     dotted    triangle  L* 45
//   3 #4f8fcf mid blue         dash-dot  diamond   L* 58
//   4 #6b2f7f dark plum        solid     cross     L* 31
//   5 #92c7b0 pale sea green   dashed    plus      L* 76
// Why: grey print keeps only lightness, so the first four slots (the ones
// most charts use) sit at least 13 L* apart, alternating dark and light; the
// hues avoid a red-against-green pair, and every pair stays more than 20
// CIE76 units apart under simulated protan, deutan and tritan vision; and no
// two slots share a dash-and-marker pair, so even a monochrome copy tells
// them apart. Bands use the slot colour at 20 % opacity with the slot's dash
// on their edges.
struct PaletteEntry {
  const char* hex;     // "#10183f"
  const char* name;    // plain description for documentation
  Dash dash;
  Marker marker;
};
std::span<const PaletteEntry> palette();

enum class Kind { line, band, points, reference, span, annotation };

// A series; build one with line(), band(), points(), reference(), span() or
// annotation() rather than filling the fields by hand.
struct Series {
  Kind kind = Kind::line;
  std::string name;     // machine identity, written as data-name ("wc_high"); unique per chart
  std::string label;    // legend text; empty = not in the legend. A reference's label is written
                        // on the plot above its top line, an annotation's beside its point.
  std::vector<double> x;  // span: {from, to}; annotation: {x}
  Values y;             // line, points: y; band: lower curve; reference: the levels; annotation: {y}
  Values y_high;        // band: upper curve
  Style style;
};

// A curve through (x[i], y[i]); breaks at missing values.
//   chart.series.push_back(line("nominal", "Nominal", t, values(err)));
Series line(std::string name, std::string label, std::vector<double> x, Values y, Style style = {});
// A translucent area between two curves, outlined in the slot's dash.
Series band(std::string name, std::string label, std::vector<double> x, Values low, Values high,
            Style style = {});
// Unconnected markers (a scatter).
Series points(std::string name, std::string label, std::vector<double> x, Values y, Style style = {});
// Horizontal lines across the plot at each level (requirement limits ±max_error).
Series reference(std::string name, std::string label, std::vector<double> levels);
// A shaded vertical strip from x = from to x = to (the requirement window).
Series span(std::string name, std::string label, double from, double to, bool hatched = false);
// A ringed point with a text label beside it ("recommended").
Series annotation(std::string name, std::string text, double x, double y);

struct Chart {
  std::string title;
  Axis x, y;
  int width = 720, height = 400;   // pixels, whatever the data
  std::vector<Series> series;      // drawn spans, bands, references, lines, points, annotations
  std::string description;         // optional longer text for the <desc> element
};

// The chart as one <svg> element for inline use in HTML. Throws
// std::invalid_argument when series sizes disagree or names repeat (caller bugs).
//
//   svg::Chart c{.title = "Error", .x = {.label = "Temperature (°C)"}, .y = {.label = "Error (K)"}};
//   c.series.push_back(svg::line("nominal", "Nominal", {0, 25, 50}, {0.1, 0.0, -0.2}));
//   std::string markup = svg::render(c);
std::string render(const Chart& chart);

// The chart as a standalone .svg file (XML declaration, then render()).
std::string render_document(const Chart& chart);

}  // namespace thermargin::svg
