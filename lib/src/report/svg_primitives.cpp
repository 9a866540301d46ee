// The SVG writer's primitives (svg_internal.hpp): numbers and pixel
// coordinates as text, path commands and attributes, clipping to the plot
// area, text and its estimated width, strokes and markers.
#include <algorithm>
#include <array>
#include <charconv>
#include <cmath>
#include <utility>

#include "svg_internal.hpp"
#include "thermargin/report/html_report.hpp"

namespace thermargin::svg::detail {

// ---------------------------------------------------------------- numbers

// Data values: %.9g, without the C locale's decimal-separator dependence.
std::string g9(double v) {
  if (!std::isfinite(v)) bug("a non-finite number reached the writer");
  char buf[48];
  auto r = std::to_chars(buf, buf + sizeof buf, v, std::chars_format::general, 9);
  return std::string(buf, r.ptr);
}

// Pixel coordinates: two decimals are far below what a screen or printer shows.
std::string px(double v) {
  if (!std::isfinite(v)) bug("a non-finite coordinate reached the writer");
  if (std::fabs(v) < 0.005) v = 0;  // no "-0.00"
  char buf[48];
  auto r = std::to_chars(buf, buf + sizeof buf, v, std::chars_format::fixed, 2);
  std::string s(buf, r.ptr);
  while (!s.empty() && s.back() == '0') s.pop_back();
  if (!s.empty() && s.back() == '.') s.pop_back();
  return s;
}

// Path commands are appended with +=, which also sidesteps GCC 12's false
// -Wrestrict warning on "M" + std::string.
void cmd(std::string& d, char c, double x, double y) {
  d += c;
  d += px(x);
  d += ',';
  d += px(y);
}
std::string segment(double x0, double y0, double x1, double y1) {
  std::string d;
  cmd(d, 'M', x0, y0);
  cmd(d, 'L', x1, y1);
  return d;
}

std::string attr(std::string_view name, std::string_view value) {
  std::string s = " ";
  s += name;
  s += "=\"";
  s += html_escape(value);
  s += '"';
  return s;
}
std::string attr(std::string_view name, double pixels) { return attr(name, px(pixels)); }

std::string list_g9(const std::vector<double>& v) {
  std::string s;
  for (double d : v) {
    if (!s.empty()) s += ' ';
    s += g9(d);
  }
  return s;
}

// ---------------------------------------------------------------- geometry


// Liang–Barsky: clips segment a-b to r; t0/t1 report where the kept part lies.
bool clip_segment(Pt a, Pt b, const Rect& r, Pt& ca, Pt& cb, double& t0, double& t1) {
  t0 = 0, t1 = 1;
  double dx = b.x - a.x, dy = b.y - a.y;
  const std::array<double, 4> p{-dx, dx, -dy, dy};
  const std::array<double, 4> q{a.x - r.x0, r.x1 - a.x, a.y - r.y0, r.y1 - a.y};
  for (std::size_t i = 0; i < 4; ++i) {
    if (p[i] == 0) {
      if (q[i] < 0) return false;
    } else {
      double t = q[i] / p[i];
      if (p[i] < 0) {
        if (t > t1) return false;
        t0 = std::max(t0, t);
      } else {
        if (t < t0) return false;
        t1 = std::min(t1, t);
      }
    }
  }
  ca = {a.x + t0 * dx, a.y + t0 * dy};
  cb = {a.x + t1 * dx, a.y + t1 * dy};
  return true;
}

// Polyline path data for one run of points, clipped to r ("" when nothing shows).
std::string polyline_path(const std::vector<Pt>& run, const Rect& r) {
  std::string d;
  bool pen_down = false;
  for (std::size_t i = 1; i < run.size(); ++i) {
    Pt a, b;
    double t0, t1;
    if (!clip_segment(run[i - 1], run[i], r, a, b, t0, t1)) {
      pen_down = false;
      continue;
    }
    if (!pen_down || t0 > 0) cmd(d, 'M', a.x, a.y);
    cmd(d, 'L', b.x, b.y);
    pen_down = t1 >= 1;
  }
  return d;
}

// Sutherland–Hodgman against each edge of an axis-aligned rectangle.
std::vector<Pt> clip_polygon(std::vector<Pt> poly, const Rect& r) {
  auto clip_edge = [&](auto inside, auto cross) {
    std::vector<Pt> out;
    for (std::size_t i = 0; i < poly.size(); ++i) {
      Pt cur = poly[i], prev = poly[(i + poly.size() - 1) % poly.size()];
      bool ci = inside(cur), pi = inside(prev);
      if (ci) {
        if (!pi) out.push_back(cross(prev, cur));
        out.push_back(cur);
      } else if (pi) {
        out.push_back(cross(prev, cur));
      }
    }
    poly = std::move(out);
  };
  auto at_x = [](double x) {
    return [x](Pt a, Pt b) { return Pt{x, a.y + (b.y - a.y) * (x - a.x) / (b.x - a.x)}; };
  };
  auto at_y = [](double y) {
    return [y](Pt a, Pt b) { return Pt{a.x + (b.x - a.x) * (y - a.y) / (b.y - a.y), y}; };
  };
  if (poly.size() >= 3) clip_edge([&](Pt p) { return p.x >= r.x0; }, at_x(r.x0));
  if (poly.size() >= 3) clip_edge([&](Pt p) { return p.x <= r.x1; }, at_x(r.x1));
  if (poly.size() >= 3) clip_edge([&](Pt p) { return p.y >= r.y0; }, at_y(r.y0));
  if (poly.size() >= 3) clip_edge([&](Pt p) { return p.y <= r.y1; }, at_y(r.y1));
  return poly.size() >= 3 ? poly : std::vector<Pt>{};
}

// ---------------------------------------------------------------- text

std::size_t codepoints(std::string_view s) {
  return static_cast<std::size_t>(std::count_if(s.begin(), s.end(), [](char c) {
    return (static_cast<unsigned char>(c) & 0xC0) != 0x80;
  }));
}
// No font metrics without a font engine; an average sans-serif advance is enough for layout.
double text_width(std::string_view s, double size) { return static_cast<double>(codepoints(s)) * size * 0.56; }

std::string text_element(double x, double y, std::string_view anchor, double size, std::string_view content,
                         std::string_view extra) {
  std::string s = "<text" + attr("x", x) + attr("y", y);
  if (anchor != "start") s += attr("text-anchor", anchor);
  s += attr("font-size", size);
  s += extra;
  s += '>';
  s += html_escape(content);
  s += "</text>";
  return s;
}

// ---------------------------------------------------------------- styles


std::string dash_array(Dash d) {
  switch (d) {
    case Dash::dashed: return "7 4";
    case Dash::dotted: return "1.5 3.5";
    case Dash::dash_dot: return "9 3.5 1.5 3.5";
    case Dash::solid:
    case Dash::automatic: break;
  }
  return {};
}

std::string stroke_attrs(const std::string& colour, double width, Dash dash) {
  std::string s = attr("stroke", colour) + attr("stroke-width", width);
  std::string da = dash_array(dash);
  if (!da.empty()) s += attr("stroke-dasharray", da);
  if (dash == Dash::dotted) s += attr("stroke-linecap", "round");
  return s;
}

// Path data through points; closed adds Z.
std::string polygon_d(std::initializer_list<Pt> pts, bool closed) {
  std::string d;
  for (Pt p : pts) cmd(d, d.empty() ? 'M' : 'L', p.x, p.y);
  if (closed) d += 'Z';
  return d;
}

std::string marker_element(Marker m, Pt c, const std::string& colour, std::string_view cls, std::string_view data) {
  constexpr double s = 4.5;
  std::string out = m == Marker::circle ? "<circle" : m == Marker::square ? "<rect" : "<path";
  out += attr("class", cls);
  out += data;
  const std::string filled = attr("fill", colour) + attr("stroke", "#ffffff") + attr("stroke-width", 1.0);
  const std::string stroked = attr("fill", "none") + attr("stroke", colour) + attr("stroke-width", 2.0);
  switch (m) {
    case Marker::circle: out += attr("cx", c.x) + attr("cy", c.y) + attr("r", s) + filled; break;
    case Marker::square:
      out += attr("x", c.x - s * 0.9) + attr("y", c.y - s * 0.9) + attr("width", s * 1.8) + attr("height", s * 1.8) +
             filled;
      break;
    case Marker::triangle:
      out += attr("d", polygon_d({{c.x, c.y - s * 1.15}, {c.x + s * 1.05, c.y + s * 0.8}, {c.x - s * 1.05, c.y + s * 0.8}},
                                 true)) +
             filled;
      break;
    case Marker::diamond:
      out += attr("d", polygon_d({{c.x, c.y - s * 1.3}, {c.x + s, c.y}, {c.x, c.y + s * 1.3}, {c.x - s, c.y}}, true)) +
             filled;
      break;
    case Marker::cross:
      out += attr("d", segment(c.x - s, c.y - s, c.x + s, c.y + s) + segment(c.x - s, c.y + s, c.x + s, c.y - s)) +
             stroked;
      break;
    case Marker::plus:
      out += attr("d", segment(c.x - s * 1.2, c.y, c.x + s * 1.2, c.y) + segment(c.x, c.y - s * 1.2, c.x, c.y + s * 1.2)) +
             stroked;
      break;
    case Marker::none:
    case Marker::automatic: return {};
  }
  return out + "/>";
}

}  // namespace thermargin::svg::detail
