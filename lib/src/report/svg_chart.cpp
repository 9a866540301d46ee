#include "thermargin/report/svg_chart.hpp"

#include <algorithm>
#include <array>
#include <charconv>
#include <cmath>
#include <cstdint>
#include <initializer_list>
#include <limits>
#include <set>
#include <stdexcept>
#include <utility>

#include "thermargin/report/html_report.hpp"
#include "svg_internal.hpp"

namespace thermargin::svg {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Palette (see the header and palette()). Lightness L* (CIE 1976, sRGB D65):
// 10, 72, 45, 58, 31, 76. The first four slots, the ones most charts use,
// are at least 13 L* apart, so they stay apart in grey; every pair keeps a
// CIE76 distance above 20 under simulated protan, deutan and tritan vision
// (Machado, Oliveira & Fernandes 2009 matrices, severity 1, values from
// memory). Hue alone is never the only cue: each slot also has its own
// dash-and-marker pair.
constexpr std::array<PaletteEntry, 6> kPalette{{
    {"#10183f", "near-black navy", Dash::solid, Marker::circle},
    {"#e8a33a", "light amber", Dash::dashed, Marker::square},
    {"#b24a14", "burnt orange", Dash::dotted, Marker::triangle},
    {"#4f8fcf", "mid blue", Dash::dash_dot, Marker::diamond},
    {"#6b2f7f", "dark plum", Dash::solid, Marker::cross},
    {"#92c7b0", "pale sea green", Dash::dashed, Marker::plus},
}};

constexpr const char* kInk = "#222222";
constexpr const char* kFont = "system-ui, -apple-system, 'Segoe UI', Helvetica, Arial, sans-serif";
constexpr double kTitleSize = 15, kLabelSize = 13, kTickSize = 11, kLegendSize = 12;

// bug(), check_forced() and the primitives (svg_primitives.cpp).
using namespace detail;

// ---------------------------------------------------------------- styles

struct Resolved {
  std::string colour;
  Dash dash;
  Marker marker;  // for lines: none, or the shape
  bool thinned;   // line markers at a few spread points only
  int slot;
};

// ---------------------------------------------------------------- the chart

bool plottable(double v, Scale scale) { return std::isfinite(v) && (scale == Scale::linear || v > 0); }

std::optional<double> value_at(const Values& v, std::size_t i) {
  if (i >= v.size() || !v[i] || !std::isfinite(*v[i])) return std::nullopt;
  return v[i];
}

void check_series(const Series& s) {
  if (s.name.empty()) bug("a series has no name");
  auto need = [&](bool ok, const char* what) {
    if (!ok) bug("series \"" + s.name + "\": " + what);
  };
  switch (s.kind) {
    case Kind::line:
    case Kind::points: need(s.x.size() == s.y.size(), "x and y differ in length"); break;
    case Kind::band:
      need(s.x.size() == s.y.size() && s.x.size() == s.y_high.size(), "x, low and high differ in length");
      break;
    case Kind::reference: break;
    case Kind::span: need(s.x.size() == 2, "a span needs exactly two x values"); break;
    case Kind::annotation: need(s.x.size() == 1 && s.y.size() == 1, "an annotation needs one x and one y"); break;
  }
  if (s.style.slot >= static_cast<int>(kPalette.size())) bug("series \"" + s.name + "\": palette slot out of range");
}

class Renderer {
 public:
  explicit Renderer(const Chart& c) : c_(c) {}
  std::string run();

 private:
  const Chart& c_;
  AxisPlan xp_, yp_;
  Rect plot_{};
  double plot_w_ = 0, plot_h_ = 0;  // the plot area's size, as laid out
  std::vector<Resolved> style_;

  // Where a value sits between an axis's ends, 0 at min and 1 at max: in
  // log10 v on a log axis (NaN for v <= 0, which has no place there), in v
  // on a linear one (halved first, so that a span near the double limits
  // does not overflow).
  static double fraction(double v, Scale scale, const AxisPlan& p) {
    if (scale == Scale::log10) {
      if (!(v > 0)) return kNaN;
      return (std::log10(v) - std::log10(p.min)) / (std::log10(p.max) - std::log10(p.min));
    }
    return (v / 2 - p.min / 2) / (p.max / 2 - p.min / 2);
  }
  double X(double v) const { return plot_.x0 + fraction(v, c_.x.scale, xp_) * (plot_.x1 - plot_.x0); }
  double Y(double v) const { return plot_.y1 - fraction(v, c_.y.scale, yp_) * (plot_.y1 - plot_.y0); }
  Pt P(double x, double y) const { return {X(x), Y(y)}; }

  void resolve_styles();
  std::vector<std::size_t> legend_order() const;
  std::string legend_sample(std::size_t i, double x, double y) const;
  std::string series_group(std::size_t i) const;
  std::string draw_line(const Series& s, const Resolved& st, std::string& data) const;
  std::string draw_band(const Series& s, const Resolved& st, std::string& data) const;
  std::string draw_points(const Series& s, const Resolved& st, std::string& data) const;
  std::string draw_reference(const Series& s, std::string& data) const;
  std::string draw_span(const Series& s, const Resolved& st, std::string& data) const;
  std::string draw_annotation(const Series& s, std::string& data) const;
  std::optional<Rect> reference_label_box(const Series& s) const;

  struct Extents {
    double xlo = kNaN, xhi = kNaN, ylo = kNaN, yhi = kNaN;
  };
  struct Legend {
    std::vector<std::size_t> order;                // series indices
    std::vector<std::pair<double, double>> pos;  // relative x, row
  };
  static constexpr double edge = 10;  // margin at the left and right
  Extents data_extents() const;
  Legend layout(const Extents& e);
  std::string grid() const;
  std::string axes() const;
  std::string legend_block(const Legend& legend) const;
};

void Renderer::resolve_styles() {
  std::set<int> claimed;
  for (const Series& s : c_.series)
    if (s.style.slot >= 0) claimed.insert(s.style.slot);
  int next = 0;
  for (const Series& s : c_.series) {
    Resolved r{};
    bool data_kind = s.kind == Kind::line || s.kind == Kind::band || s.kind == Kind::points;
    int slot = s.style.slot;
    if (slot < 0 && data_kind) {
      for (int tries = 0; tries < static_cast<int>(kPalette.size()); ++tries) {
        int cand = (next + tries) % static_cast<int>(kPalette.size());
        if (!claimed.count(cand)) {
          slot = cand;
          next = cand + 1;
          break;
        }
      }
      if (slot < 0) slot = next++ % static_cast<int>(kPalette.size());  // every slot claimed: reuse
    }
    r.slot = std::max(slot, 0);
    const PaletteEntry& p = kPalette[static_cast<std::size_t>(r.slot)];
    r.colour = p.hex;
    r.dash = s.style.dash == Dash::automatic ? p.dash : s.style.dash;
    r.marker = s.style.marker == Marker::automatic ? p.marker : s.style.marker;
    r.thinned = s.kind == Kind::line && s.style.marker == Marker::automatic;
    if (s.kind == Kind::band) r.marker = Marker::none;
    if (s.kind == Kind::points && r.marker == Marker::none) r.marker = p.marker;  // points need a mark
    style_.push_back(r);
  }
}

std::vector<std::size_t> Renderer::legend_order() const {
  std::vector<std::size_t> order;
  for (std::size_t i = 0; i < c_.series.size(); ++i) {
    const Series& s = c_.series[i];
    if (!s.label.empty() && s.kind != Kind::reference && s.kind != Kind::annotation) order.push_back(i);
  }
  return order;
}

std::string span_fill(bool hatched) {
  return hatched ? attr("fill", "#000000") + attr("fill-opacity", "0.05") : attr("fill", "#5a5a5a") + attr("fill-opacity", "0.13");
}

std::string hatch_lines(const Rect& r) {
  // 45° hatching drawn as clipped lines: no <pattern>, so no ids to collide
  // when several charts share one HTML page.
  std::string d;
  constexpr double gap = 7;
  double h = r.y1 - r.y0;
  for (double start = r.x0 - h; start < r.x1; start += gap) {
    Pt a, b;
    double t0, t1;
    if (clip_segment({start, r.y1}, {start + h, r.y0}, r, a, b, t0, t1))
      d += segment(a.x, a.y, b.x, b.y);
  }
  if (d.empty()) return {};
  return "<path class=\"hatch\"" + attr("d", d) + attr("stroke", "#6e6e6e") + attr("stroke-width", 0.8) +
         attr("fill", "none") + "/>";
}

std::string Renderer::legend_sample(std::size_t i, double x, double y) const {
  const Series& s = c_.series[i];
  const Resolved& st = style_[i];
  std::string out;
  constexpr double w = 30;
  switch (s.kind) {
    case Kind::line:
      out += "<path" + attr("d", segment(x, y, x + w, y)) + attr("fill", "none") +
             stroke_attrs(st.colour, 2.0, st.dash) + "/>";
      if (st.marker != Marker::none) out += marker_element(st.marker, {x + w / 2, y}, st.colour, "marker");
      break;
    case Kind::band:
      out += "<rect" + attr("x", x) + attr("y", y - 6) + attr("width", w) + attr("height", 12.0) +
             attr("fill", st.colour) + attr("fill-opacity", "0.22") + stroke_attrs(st.colour, 1.25, st.dash) + "/>";
      break;
    case Kind::points: out += marker_element(st.marker, {x + w / 2, y}, st.colour, "marker"); break;
    case Kind::span: {
      Rect r{x, y - 6, x + w, y + 6};
      out += "<rect" + attr("x", x) + attr("y", y - 6) + attr("width", w) + attr("height", 12.0) +
             span_fill(s.style.hatched) + attr("stroke", "#6e6e6e") + attr("stroke-width", 0.8) + "/>";
      if (s.style.hatched) out += hatch_lines(r);
      break;
    }
    case Kind::reference:
    case Kind::annotation: break;
  }
  return out;
}

std::string Renderer::draw_line(const Series& s, const Resolved& st, std::string& data) const {
  std::vector<double> all_x, all_y;
  std::vector<std::vector<std::size_t>> runs(1);
  for (std::size_t i = 0; i < s.x.size(); ++i) {
    auto y = value_at(s.y, i);
    if (y && plottable(s.x[i], c_.x.scale) && plottable(*y, c_.y.scale)) {
      Pt p = P(s.x[i], *y);
      if (std::isfinite(p.x) && std::isfinite(p.y)) {
        runs.back().push_back(i);
        all_x.push_back(s.x[i]);
        all_y.push_back(*y);
        continue;
      }
    }
    if (!runs.back().empty()) runs.emplace_back();  // a gap ends the run
  }
  if (runs.back().empty()) runs.pop_back();
  data = attr("data-x", list_g9(all_x)) + attr("data-y", list_g9(all_y)) + attr("data-runs", std::to_string(runs.size()));

  std::string out;
  std::vector<Pt> shown;  // points for markers: isolated ones always, the rest when thinned/explicit
  for (const auto& run : runs) {
    std::vector<Pt> pts;
    std::vector<double> rx, ry;
    for (std::size_t i : run) {
      pts.push_back(P(s.x[i], *value_at(s.y, i)));
      rx.push_back(s.x[i]);
      ry.push_back(*value_at(s.y, i));
    }
    std::string d = polyline_path(pts, plot_);
    out += "<path class=\"segment\"" + attr("data-x", list_g9(rx)) + attr("data-y", list_g9(ry));
    if (!d.empty()) out += attr("d", d);
    out += attr("fill", "none") + stroke_attrs(st.colour, 2.0, st.dash) + attr("stroke-linejoin", "round") + "/>";
    if (pts.size() == 1) shown.push_back(pts[0]);
  }
  std::vector<Pt> flat;
  for (const auto& run : runs)
    for (std::size_t i : run) flat.push_back(P(s.x[i], *value_at(s.y, i)));
  if (st.marker != Marker::none && !flat.empty()) {
    if (!st.thinned) {
      shown = flat;
    } else {
      std::size_t count = std::min<std::size_t>(8, flat.size());
      double stride = static_cast<double>(flat.size()) / static_cast<double>(count);
      // staggered by slot so markers of neighbouring curves do not sit on each other
      double offset = stride * (0.25 + 0.5 * static_cast<double>(st.slot % 3) / 3.0);
      for (std::size_t k = 0; k < count; ++k) {
        auto idx = static_cast<std::size_t>(offset + stride * static_cast<double>(k));
        shown.push_back(flat[std::min(idx, flat.size() - 1)]);
      }
    }
  }
  Marker m = st.marker == Marker::none ? Marker::circle : st.marker;
  for (Pt p : shown)
    if (plot_.contains(p)) out += marker_element(m, p, st.colour, "marker");
  return out;
}

std::string Renderer::draw_band(const Series& s, const Resolved& st, std::string& data) const {
  std::vector<double> ax, alo, ahi;
  std::vector<std::vector<std::size_t>> runs(1);
  for (std::size_t i = 0; i < s.x.size(); ++i) {
    auto lo = value_at(s.y, i), hi = value_at(s.y_high, i);
    if (lo && hi && plottable(s.x[i], c_.x.scale) && plottable(*lo, c_.y.scale) && plottable(*hi, c_.y.scale)) {
      Pt a = P(s.x[i], *lo), b = P(s.x[i], *hi);
      if (std::isfinite(a.x) && std::isfinite(a.y) && std::isfinite(b.y)) {
        runs.back().push_back(i);
        ax.push_back(s.x[i]);
        alo.push_back(*lo);
        ahi.push_back(*hi);
        continue;
      }
    }
    if (!runs.back().empty()) runs.emplace_back();
  }
  if (runs.back().empty()) runs.pop_back();
  data = attr("data-x", list_g9(ax)) + attr("data-low", list_g9(alo)) + attr("data-high", list_g9(ahi)) +
         attr("data-runs", std::to_string(runs.size()));
  std::string out;
  for (const auto& run : runs) {
    std::vector<Pt> lower, upper;
    std::vector<double> rx, rl, rh;
    for (std::size_t i : run) {
      lower.push_back(P(s.x[i], *value_at(s.y, i)));
      upper.push_back(P(s.x[i], *value_at(s.y_high, i)));
      rx.push_back(s.x[i]);
      rl.push_back(*value_at(s.y, i));
      rh.push_back(*value_at(s.y_high, i));
    }
    std::vector<Pt> poly = upper;
    poly.insert(poly.end(), lower.rbegin(), lower.rend());
    std::string d;
    for (Pt p : clip_polygon(poly, plot_)) cmd(d, d.empty() ? 'M' : 'L', p.x, p.y);
    if (!d.empty()) d += "Z";
    out += "<path class=\"area\"" + attr("data-x", list_g9(rx)) + attr("data-low", list_g9(rl)) +
           attr("data-high", list_g9(rh));
    if (!d.empty()) out += attr("d", d);
    out += attr("fill", st.colour) + attr("fill-opacity", "0.2") + attr("stroke", "none") + "/>";
    if (run.size() == 1) {  // a lone x: show its extent as a short vertical bar
      upper.push_back(lower[0]);
      lower.clear();
    }
    for (const auto* boundary : {&lower, &upper}) {
      std::string e = polyline_path(*boundary, plot_);
      if (!e.empty())
        out += "<path class=\"edge\"" + attr("d", e) + attr("fill", "none") + stroke_attrs(st.colour, 1.25, st.dash) +
               attr("stroke-linejoin", "round") + "/>";
    }
  }
  return out;
}

std::string Renderer::draw_points(const Series& s, const Resolved& st, std::string& data) const {
  std::vector<double> ax, ay;
  std::string out;
  for (std::size_t i = 0; i < s.x.size(); ++i) {
    auto y = value_at(s.y, i);
    if (!y || !plottable(s.x[i], c_.x.scale) || !plottable(*y, c_.y.scale)) continue;
    Pt p = P(s.x[i], *y);
    if (!std::isfinite(p.x) || !std::isfinite(p.y)) continue;
    ax.push_back(s.x[i]);
    ay.push_back(*y);
    if (plot_.contains(p))
      out += marker_element(st.marker, p, st.colour, "point", attr("data-x", g9(s.x[i])) + attr("data-y", g9(*y)));
  }
  data = attr("data-x", list_g9(ax)) + attr("data-y", list_g9(ay));
  return out;
}

// Where a reference's label goes: right-aligned just above its topmost drawn line.
std::optional<Rect> Renderer::reference_label_box(const Series& s) const {
  if (s.kind != Kind::reference || s.label.empty()) return std::nullopt;
  std::optional<double> top;
  for (const auto& v : s.y) {
    if (!v || !plottable(*v, c_.y.scale)) continue;
    double y = Y(*v);
    if (!std::isfinite(y) || y < plot_.y0 - 0.5 || y > plot_.y1 + 0.5) continue;
    if (!top || y < *top) top = y;
  }
  if (!top) return std::nullopt;
  const double right = plot_.x1 - 4, baseline = *top - 4;
  return Rect{right - text_width(s.label, kTickSize), baseline - kTickSize, right, baseline + 3};
}

std::string Renderer::draw_reference(const Series& s, std::string& data) const {
  std::vector<double> levels;
  std::string out;
  for (const auto& v : s.y) {
    if (!v || !plottable(*v, c_.y.scale)) continue;
    levels.push_back(*v);
    double y = Y(*v);
    if (!std::isfinite(y) || y < plot_.y0 - 0.5 || y > plot_.y1 + 0.5) continue;
    out += "<path class=\"level\"" + attr("data-y", g9(*v)) +
           attr("d", segment(plot_.x0, y, plot_.x1, y)) +
           attr("stroke", "#3a3a3a") + attr("stroke-width", 1.25) + attr("stroke-dasharray", "10 3 2 3") + "/>";
  }
  if (auto box = reference_label_box(s))
    out += text_element(box->x1, box->y1 - 3, "end", kTickSize, s.label, std::string(kHalo) + attr("fill", "#3a3a3a"));
  data = attr("data-y", list_g9(levels));
  return out;
}

std::string Renderer::draw_span(const Series& s, const Resolved&, std::string& data) const {
  double a = s.x[0], b = s.x[1];
  if (std::isnan(a) || std::isnan(b)) return {};
  if (a > b) std::swap(a, b);
  if (std::isfinite(a)) data += attr("data-x0", g9(a));
  if (std::isfinite(b)) data += attr("data-x1", g9(b));
  // infinite (or, on a log axis, non-positive) ends reach the edge of the plot
  double xa = std::isfinite(a) && plottable(a, c_.x.scale) ? X(a) : plot_.x0;
  double xb = std::isfinite(b) ? X(b) : plot_.x1;
  if (!std::isfinite(xb)) return {};  // b <= 0 on a log axis: nothing to show
  xa = std::clamp(xa, plot_.x0, plot_.x1);
  xb = std::clamp(xb, plot_.x0, plot_.x1);
  if (xb - xa < 0.01) return {};
  Rect r{xa, plot_.y0, xb, plot_.y1};
  std::string out = "<rect" + attr("x", xa) + attr("y", plot_.y0) + attr("width", xb - xa) +
                    attr("height", plot_.y1 - plot_.y0) + span_fill(s.style.hatched) + "/>";
  if (s.style.hatched) out += hatch_lines(r);
  // edges, so the span still reads where its tint is lost in print
  for (double xe : {xa, xb})
    if (xe > plot_.x0 + 0.5 && xe < plot_.x1 - 0.5)
      out += "<path class=\"boundary\"" + attr("d", segment(xe, plot_.y0, xe, plot_.y1)) +
             attr("stroke", "#6e6e6e") + attr("stroke-width", 1.0) + "/>";
  return out;
}

std::string Renderer::draw_annotation(const Series& s, std::string& data) const {
  auto y = value_at(s.y, 0);
  if (!y || !plottable(s.x[0], c_.x.scale) || !plottable(*y, c_.y.scale)) return {};
  data = attr("data-x", g9(s.x[0])) + attr("data-y", g9(*y));
  Pt p = P(s.x[0], *y);
  if (!std::isfinite(p.x) || !std::isfinite(p.y) || !plot_.contains(p)) return {};
  std::string out = "<circle class=\"ring\"" + attr("cx", p.x) + attr("cy", p.y) + attr("r", 8.0) +
                    attr("fill", "none") + attr("stroke", "#000000") + attr("stroke-width", 1.75) + "/>";
  out += "<circle" + attr("cx", p.x) + attr("cy", p.y) + attr("r", 1.75) + attr("fill", "#000000") + "/>";
  if (s.label.empty()) return out;
  double w = text_width(s.label, kLegendSize);
  bool left = p.x + 14 + w > plot_.x1 - 2;
  bool below = p.y - 16 - kLegendSize < plot_.y0;
  // The text's box for a placement, to keep it off the references' labels
  // (a winner near the limit line would write over "requirement ±0.5 K").
  auto text_box = [&](bool l, bool b) {
    double ax = l ? p.x - 12 : p.x + 12, ay = b ? p.y + 12 : p.y - 12;
    double x = l ? ax - 2 - w : ax + 2, base = b ? ay + kLegendSize : ay - 2;
    return Rect{x, base - kLegendSize, x + w, base + 3};
  };
  auto clashes = [&](const Rect& r) {
    for (const Series& other : c_.series)
      if (auto box = reference_label_box(other))
        if (r.x0 < box->x1 && box->x0 < r.x1 && r.y0 < box->y1 && box->y0 < r.y1) return true;
    return false;
  };
  if (clashes(text_box(left, below))) {
    for (auto [l, b] : {std::pair{left, !below}, std::pair{!left, below}, std::pair{!left, !below}}) {
      const Rect r = text_box(l, b);
      if (r.x0 >= plot_.x0 && r.x1 <= plot_.x1 && r.y0 >= plot_.y0 && r.y1 <= plot_.y1 && !clashes(r)) {
        left = l, below = b;
        break;
      }
    }
  }
  Pt anchor{left ? p.x - 12 : p.x + 12, below ? p.y + 12 : p.y - 12};
  Pt tip{p.x + (left ? -5.7 : 5.7), p.y + (below ? 5.7 : -5.7)};
  out += "<path" + attr("d", segment(tip.x, tip.y, anchor.x, anchor.y)) +
         attr("stroke", "#000000") + attr("stroke-width", 1.0) + "/>";
  out += text_element(left ? anchor.x - 2 : anchor.x + 2, below ? anchor.y + kLegendSize : anchor.y - 2,
                      left ? "end" : "start", kLegendSize, s.label,
                      std::string(kHalo) + attr("font-weight", "600") + attr("fill", "#000000"));
  return out;
}

std::string Renderer::series_group(std::size_t i) const {
  const Series& s = c_.series[i];
  const Resolved& st = style_[i];
  std::string data, body;
  const char* kind = "line";
  switch (s.kind) {
    case Kind::line: body = draw_line(s, st, data); break;
    case Kind::band: body = draw_band(s, st, data), kind = "band"; break;
    case Kind::points: body = draw_points(s, st, data), kind = "points"; break;
    case Kind::reference: body = draw_reference(s, data), kind = "reference"; break;
    case Kind::span: body = draw_span(s, st, data), kind = "span"; break;
    case Kind::annotation: body = draw_annotation(s, data), kind = "annotation"; break;
  }
  std::string head = "<g class=\"series\"" + attr("data-name", s.name) + attr("data-kind", kind);
  if (!s.label.empty()) head += attr("data-label", s.label);
  return head + data + ">" + body + "</g>\n";
}

// The data's extents on both axes: what the axis plans must cover.
Renderer::Extents Renderer::data_extents() const {
  Extents e;
  double &xlo = e.xlo, &xhi = e.xhi, &ylo = e.ylo, &yhi = e.yhi;
  auto take = [](double& lo, double& hi, double v) {
    if (!std::isfinite(v)) return;
    lo = std::isnan(lo) ? v : std::min(lo, v);
    hi = std::isnan(hi) ? v : std::max(hi, v);
  };
  // A y value counts only where it is drawn: on a log axis a value <= 0 is
  // a gap, so it must not stretch the range (or, alone, empty it). An x
  // with no y still counts, so a curve's gaps stay inside the x range.
  const Scale xs = c_.x.scale, ys = c_.y.scale;
  auto take_y = [&](const std::optional<double>& v) {
    if (v && plottable(*v, ys)) take(ylo, yhi, *v);
  };
  for (const Series& s : c_.series) {
    switch (s.kind) {
      case Kind::line:
      case Kind::points:
        for (std::size_t i = 0; i < s.x.size(); ++i) {
          if (!plottable(s.x[i], xs)) continue;
          take(xlo, xhi, s.x[i]);
          take_y(value_at(s.y, i));
        }
        break;
      case Kind::band:
        for (std::size_t i = 0; i < s.x.size(); ++i) {
          if (!plottable(s.x[i], xs)) continue;
          take(xlo, xhi, s.x[i]);
          auto lo = value_at(s.y, i), hi = value_at(s.y_high, i);
          if (lo && hi && plottable(*lo, ys) && plottable(*hi, ys)) {  // a band point is drawn only whole
            take(ylo, yhi, *lo);
            take(ylo, yhi, *hi);
          }
        }
        break;
      case Kind::reference:
        for (std::size_t i = 0; i < s.y.size(); ++i) take_y(value_at(s.y, i));
        break;
      case Kind::span:
        for (double v : s.x)
          if (plottable(v, xs)) take(xlo, xhi, v);
        break;
      case Kind::annotation:
        if (plottable(s.x[0], xs) && value_at(s.y, 0) && plottable(*value_at(s.y, 0), ys)) {
          take(xlo, xhi, s.x[0]);
          take_y(value_at(s.y, 0));
        }
        break;
    }
  }
  return e;
}

// The plot area and the axis plans: the legend's rows below the axis
// label, the tick labels' widths at the left. Returns the legend's layout.
Renderer::Legend Renderer::layout(const Extents& e) {
  const double W = c_.width, H = c_.height;
  // legend rows, laid out over the full width below the axis label
  Legend legend;
  legend.order = legend_order();
  {
    double x = 0, row = 0;
    for (std::size_t i : legend.order) {
      double w = 36 + text_width(c_.series[i].label, kLegendSize);
      if (x > 0 && x + w > W - 2 * edge) x = 0, row += 1;
      legend.pos.emplace_back(x, row);
      x += w + 18;
    }
  }
  double legend_rows = legend.pos.empty() ? 0 : legend.pos.back().second + 1;
  double top = c_.title.empty() ? 14 : 38;
  double bottom = 6 + kTickSize + 8 + (c_.x.label.empty() ? 0 : kLabelSize + 8) + legend_rows * 20 +
                  (legend_rows > 0 ? 6 : 0) + 6;
  double plot_h = std::max(20.0, H - top - bottom);
  int ytarget = std::clamp(static_cast<int>(plot_h / 55), 2, 8);
  yp_ = plan_axis(c_.y, e.ylo, e.yhi, ytarget);
  double ytick_w = 0;
  for (const Tick& t : yp_.ticks) ytick_w = std::max(ytick_w, text_width(t.label, kTickSize));
  double left = edge + (c_.y.label.empty() ? 0 : kLabelSize + 8) + ytick_w + 10;
  double right = 24;
  double plot_w = std::max(20.0, W - left - right);
  int xtarget = std::clamp(static_cast<int>(plot_w / 95), 2, 10);
  xp_ = plan_axis(c_.x, e.xlo, e.xhi, xtarget);
  plot_ = {left, top, left + plot_w, top + plot_h};
  plot_w_ = plot_w;
  plot_h_ = plot_h;
  return legend;
}

// The grid lines at the ticks, and the zero line of a linear y axis.
std::string Renderer::grid() const {
  std::string o;
  o += "<g class=\"grid\" fill=\"none\">";
  auto vline = [&](double x, const char* colour, double w) {
    return "<path" + attr("d", segment(x, plot_.y0, x, plot_.y1)) +
           attr("stroke", colour) + attr("stroke-width", w) + "/>";
  };
  auto hline = [&](double y, const char* colour, double w) {
    return "<path" + attr("d", segment(plot_.x0, y, plot_.x1, y)) +
           attr("stroke", colour) + attr("stroke-width", w) + "/>";
  };
  for (const Tick& t : xp_.ticks) o += vline(X(t.value), t.major ? "#dcdcdc" : "#eeeeee", 1.0);
  for (const Tick& t : yp_.ticks) o += hline(Y(t.value), t.major ? "#dcdcdc" : "#eeeeee", 1.0);
  if (c_.y.scale == Scale::linear && yp_.min < 0 && yp_.max > 0) o += hline(Y(0), "#8a8a8a", 1.0);
  o += "</g>\n";
  return o;
}

// The frame, the ticks and their labels, the axis labels and the title.
std::string Renderer::axes() const {
  std::string o;
  o += "<g class=\"axes\"" + attr("fill", kInk) + ">";
  o += "<rect" + attr("x", plot_.x0) + attr("y", plot_.y0) + attr("width", plot_w_) + attr("height", plot_h_) +
       attr("fill", "none") + attr("stroke", kInk) + attr("stroke-width", 1.0) + "/>";
  for (const Tick& t : xp_.ticks) {
    double x = X(t.value), len = t.major ? 5 : 3;
    o += "<path class=\"tick\"" + attr("data-value", g9(t.value)) +
         attr("d", segment(x, plot_.y1, x, plot_.y1 + len)) + attr("stroke", kInk) +
         "/>";
    if (!t.label.empty()) o += text_element(x, plot_.y1 + 6 + kTickSize, "middle", kTickSize, t.label);
  }
  for (const Tick& t : yp_.ticks) {
    double y = Y(t.value), len = t.major ? 5 : 3;
    o += "<path class=\"tick\"" + attr("data-value", g9(t.value)) +
         attr("d", segment(plot_.x0 - len, y, plot_.x0, y)) + attr("stroke", kInk) +
         "/>";
    if (!t.label.empty()) o += text_element(plot_.x0 - 8, y, "end", kTickSize, t.label, attr("dy", "0.35em"));
  }
  double xlabel_y = plot_.y1 + 6 + kTickSize + 8 + kLabelSize;
  if (!c_.x.label.empty())
    o += text_element((plot_.x0 + plot_.x1) / 2, xlabel_y, "middle", kLabelSize, c_.x.label);
  if (!c_.y.label.empty()) {
    double lx = edge + kLabelSize, ly = (plot_.y0 + plot_.y1) / 2;
    o += text_element(lx, ly, "middle", kLabelSize, c_.y.label,
                      attr("transform", "rotate(-90 " + px(lx) + " " + px(ly) + ")"));
  }
  o += "</g>\n";
  if (!c_.title.empty())
    o += text_element(plot_.x0, 24, "start", kTitleSize, c_.title, attr("font-weight", "600") + attr("fill", kInk));
  return o;
}

// The legend: a sample of each series' style and its label, in rows.
std::string Renderer::legend_block(const Legend& legend) const {
  std::string o;
  if (legend.order.empty()) return o;
  const double xlabel_y = plot_.y1 + 6 + kTickSize + 8 + kLabelSize;
  double y0 = (c_.x.label.empty() ? plot_.y1 + 6 + kTickSize + 8 : xlabel_y + 8) + 12;
  o += "<g class=\"legend\">";
  for (std::size_t k = 0; k < legend.order.size(); ++k) {
    std::size_t i = legend.order[k];
    double x = edge + legend.pos[k].first, y = y0 + legend.pos[k].second * 20;
    o += "<g class=\"legend-entry\"" + attr("data-name", c_.series[i].name) + ">";
    o += legend_sample(i, x, y);
    o += text_element(x + 36, y, "start", kLegendSize, c_.series[i].label, attr("dy", "0.35em") + attr("fill", kInk));
    o += "</g>";
  }
  o += "</g>\n";
  return o;
}

std::string Renderer::run() {
  if (c_.width <= 0 || c_.height <= 0) bug("chart size must be positive");
  check_forced(c_.x);
  check_forced(c_.y);
  std::set<std::string> names;
  for (const Series& s : c_.series) {
    check_series(s);
    if (!names.insert(s.name).second) bug("two series are named \"" + s.name + "\"");
  }
  resolve_styles();

  const Extents extents = data_extents();
  const Legend legend = layout(extents);
  const double W = c_.width, H = c_.height;

  std::string o;
  o += "<svg xmlns=\"http://www.w3.org/2000/svg\"" + attr("width", W) + attr("height", H) +
       attr("viewBox", "0 0 " + px(W) + " " + px(H)) + attr("font-family", kFont) + attr("role", "img") + ">\n";
  o += "<title>" + html_escape(c_.title) + "</title>\n";
  if (!c_.description.empty()) o += "<desc>" + html_escape(c_.description) + "</desc>\n";
  o += "<rect class=\"background\"" + attr("width", W) + attr("height", H) + attr("fill", "#ffffff") + "/>\n";

  o += grid();

  // series, back to front: areas under lines, lines under markers and notes
  o += "<g class=\"plot\">\n";
  for (Kind layer : {Kind::span, Kind::band, Kind::reference, Kind::line, Kind::points, Kind::annotation})
    for (std::size_t i = 0; i < c_.series.size(); ++i)
      if (c_.series[i].kind == layer) o += series_group(i);
  o += "</g>\n";

  o += axes();

  o += legend_block(legend);
  o += "</svg>\n";
  return o;
}

}  // namespace

Values values(std::span<const double> numbers) {
  Values out;
  out.reserve(numbers.size());
  for (double v : numbers) out.push_back(std::isfinite(v) ? std::optional<double>(v) : std::nullopt);
  return out;
}

std::span<const PaletteEntry> palette() { return kPalette; }

Series line(std::string name, std::string label, std::vector<double> x, Values y, Style style) {
  return {Kind::line, std::move(name), std::move(label), std::move(x), std::move(y), {}, style};
}
Series band(std::string name, std::string label, std::vector<double> x, Values low, Values high, Style style) {
  return {Kind::band, std::move(name), std::move(label), std::move(x), std::move(low), std::move(high), style};
}
Series points(std::string name, std::string label, std::vector<double> x, Values y, Style style) {
  return {Kind::points, std::move(name), std::move(label), std::move(x), std::move(y), {}, style};
}
Series reference(std::string name, std::string label, std::vector<double> levels) {
  return {Kind::reference, std::move(name), std::move(label), {}, values(levels), {}, {}};
}
Series span(std::string name, std::string label, double from, double to, bool hatched) {
  Style st;
  st.hatched = hatched;
  return {Kind::span, std::move(name), std::move(label), {from, to}, {}, {}, st};
}
Series annotation(std::string name, std::string text, double x, double y) {
  return {Kind::annotation, std::move(name), std::move(text), {x}, {y}, {}, {}};
}

std::string render(const Chart& chart) { return Renderer(chart).run(); }

std::string render_document(const Chart& chart) {
  return "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n" + render(chart);
}

}  // namespace thermargin::svg
