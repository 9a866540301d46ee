// What the SVG chart writer's files share (svg_chart.cpp draws, svg_axis.cpp
// plans the axes, svg_primitives.cpp writes the pieces); not public API.
#pragma once

#include <initializer_list>
#include <string>
#include <string_view>
#include <vector>

#include "thermargin/report/svg_chart.hpp"

namespace thermargin::svg::detail {

// A chart the caller built wrongly (a bug, not bad input): std::invalid_argument.
[[noreturn]] void bug(const std::string& what);

// Refuses a forced axis limit that is not finite, <= 0 on a log axis, or
// min >= max (bug()).
void check_forced(const Axis& axis);

// ---- numbers and attributes
std::string g9(double v);  // data values: %.9g, whatever the locale
std::string px(double v);  // pixel coordinates: at most two decimals, no "-0"
void cmd(std::string& d, char c, double x, double y);  // appends a path command
std::string segment(double x0, double y0, double x1, double y1);  // "M x0,y0 L x1,y1"
std::string attr(std::string_view name, std::string_view value);  // ` name="value"`, escaped
std::string attr(std::string_view name, double pixels);
std::string list_g9(const std::vector<double>& v);  // space-separated g9

// ---- geometry
struct Pt {
  double x, y;
};
struct Rect {
  double x0, y0, x1, y1;
  bool contains(Pt p, double slack = 0.5) const {
    return p.x >= x0 - slack && p.x <= x1 + slack && p.y >= y0 - slack && p.y <= y1 + slack;
  }
};
// Liang–Barsky: clips segment a-b to r; t0/t1 report where the kept part lies.
bool clip_segment(Pt a, Pt b, const Rect& r, Pt& ca, Pt& cb, double& t0, double& t1);
// Polyline path data for one run of points, clipped to r ("" when nothing shows).
std::string polyline_path(const std::vector<Pt>& run, const Rect& r);
// Sutherland–Hodgman against each edge of an axis-aligned rectangle.
std::vector<Pt> clip_polygon(std::vector<Pt> poly, const Rect& r);

// ---- text
std::size_t codepoints(std::string_view s);
double text_width(std::string_view s, double size);  // estimated, without font metrics
std::string text_element(double x, double y, std::string_view anchor, double size, std::string_view content,
                         std::string_view extra = {});
// A white halo keeps labels readable where they cross lines.
constexpr std::string_view kHalo = R"( stroke="#ffffff" stroke-width="3" stroke-linejoin="round" paint-order="stroke")";

// ---- strokes and markers
std::string dash_array(Dash d);
std::string stroke_attrs(const std::string& colour, double width, Dash dash);
std::string polygon_d(std::initializer_list<Pt> pts, bool closed);  // path data; closed adds Z
std::string marker_element(Marker m, Pt c, const std::string& colour, std::string_view cls,
                           std::string_view data = {});

}  // namespace thermargin::svg::detail
