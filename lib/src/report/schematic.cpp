#include "thermargin/report/schematic.hpp"

#include <cstdio>
#include <vector>

#include "thermargin/core/number.hpp"
#include "thermargin/report/html_report.hpp"  // html_escape

namespace thermargin {

namespace {

constexpr int kPageWidth = 850, kPageHeight = 330;
constexpr int kSupplyX = 50, kDividerX = 310, kCapX = 500, kAdcX = 630;
constexpr int kTop = 40, kNode = 165, kGround = 290;

// A tolerance or a share as a percentage, three significant digits.
std::string three_digit_percent(double v) { return significant(100.0 * v, 3) + " %"; }

// The drawing, built from a few primitives in SVG user units.
class Sheet {
 public:
  void line(int x1, int y1, int x2, int y2) {
    char b[128];
    std::snprintf(b, sizeof b, "<line x1=\"%d\" y1=\"%d\" x2=\"%d\" y2=\"%d\"/>\n", x1, y1, x2, y2);
    body_ += b;
  }
  // A resistor from (x, y1) down to (x, y2): leads and a box in the middle.
  void resistor_v(int x, int y1, int y2) {
    const int mid = (y1 + y2) / 2;
    line(x, y1, x, mid - 22);
    line(x, mid + 22, x, y2);
    rect(x - 9, mid - 22, 18, 44);
  }
  void resistor_h(int x1, int x2, int y) {
    const int mid = (x1 + x2) / 2;
    line(x1, y, mid - 22, y);
    line(mid + 22, y, x2, y);
    rect(mid - 22, y - 9, 44, 18);
  }
  void capacitor_v(int x, int y1, int y2) {
    const int mid = (y1 + y2) / 2;
    line(x, y1, x, mid - 4);
    line(x, mid + 4, x, y2);
    line(x - 14, mid - 4, x + 14, mid - 4);
    line(x - 14, mid + 4, x + 14, mid + 4);
  }
  void ground(int x, int y) {
    line(x - 12, y, x + 12, y);
    line(x - 8, y + 5, x + 8, y + 5);
    line(x - 4, y + 10, x + 4, y + 10);
  }
  void dot(int x, int y) {
    char b[96];
    std::snprintf(b, sizeof b, "<circle cx=\"%d\" cy=\"%d\" r=\"3.5\" class=\"dot\"/>\n", x, y);
    body_ += b;
  }
  void circle(int x, int y, int r) {
    char b[96];
    std::snprintf(b, sizeof b, "<circle cx=\"%d\" cy=\"%d\" r=\"%d\"/>\n", x, y, r);
    body_ += b;
  }
  void rect(int x, int y, int w, int h) {
    char b[128];
    std::snprintf(b, sizeof b, "<rect x=\"%d\" y=\"%d\" width=\"%d\" height=\"%d\"/>\n", x, y, w, h);
    body_ += b;
  }
  // Lines of text from (x, y) down, left-aligned ("start") or right ("end").
  void label(int x, int y, const std::vector<std::string>& lines, const char* anchor = "start") {
    for (std::size_t i = 0; i < lines.size(); ++i) {
      char b[96];
      std::snprintf(b, sizeof b, "<text x=\"%d\" y=\"%d\" text-anchor=\"%s\">", x, y + static_cast<int>(i) * 16, anchor);
      texts_ += b + html_escape(lines[i]) + "</text>\n";
    }
  }
  std::string str(const std::string& title) const {
    char head[256];
    std::snprintf(head, sizeof head,
                  "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"schematic\" viewBox=\"0 0 %d %d\" width=\"%d\" "
                  "height=\"%d\" role=\"img\">\n",
                  kPageWidth, kPageHeight, kPageWidth, kPageHeight);
    return std::string(head) + "<title>" + html_escape(title) + "</title>\n" +
           "<g fill=\"none\" stroke=\"#1a1a1a\" stroke-width=\"1.6\">\n" + body_ + "</g>\n" +
           "<g font-family=\"system-ui, sans-serif\" font-size=\"13\" fill=\"#1a1a1a\">\n" + texts_ + "</g>\n</svg>\n";
  }

 private:
  std::string body_;   // the strokes
  std::string texts_;  // the labels, filled
};

std::vector<std::string> sensor_label(const Design& d) {
  const SensorSettings& s = d.sensor;
  std::vector<std::string> out;
  switch (s.kind) {
    case SensorKind::beta:
      out = {"NTC " + ohms(s.r25) + " at 25 degC", "B " + significant(s.beta, 5) + " K",
             "+/-" + three_digit_percent(s.r25_tol) + " R25, +/-" + three_digit_percent(s.beta_tol) + " B"};
      break;
    case SensorKind::steinhart_hart: out = {"NTC (Steinhart-Hart)", "+/-" + three_digit_percent(s.r25_tol) + " R25"}; break;
    case SensorKind::table: out = {"NTC (R-T table)"}; break;
    case SensorKind::rtd: out = {"RTD R0 " + ohms(s.cvd.r0)}; break;
  }
  if (s.dissipation > 0.0) out.push_back("dissipation " + format_quantity(s.dissipation, Quantity::dissipation, 3));
  if (s.lead_resistance > 0.0) out.push_back("leads " + ohms(s.lead_resistance));
  return out;
}

std::vector<std::string> adc_label(const Design& d) {
  std::vector<std::string> out{"ADC " + std::to_string(d.adc.bits) + " bit",
                               "reference " + format_quantity(d.supply.v_reference_nominal(), Quantity::voltage, 4) +
                                   (d.supply.ratiometric ? " (the excitation)" : "")};
  if (d.adc.averaging > 1) out.push_back(std::to_string(d.adc.averaging) + " samples averaged");
  if (d.adc.samples_settle())
    out.push_back("C_s " + format_quantity(d.adc.c_sample, Quantity::capacitance, 3) + ", R_sw " + ohms(d.adc.r_switch) +
                  ", t_acq " + format_quantity(d.adc.t_acq, Quantity::time, 3));
  return out;
}

}  // namespace

std::string chain_schematic_svg(const Design& d) {
  Sheet s;
  Sheet& labels = s;
  // Supply: a source from ground to the top rail, through its drive resistance.
  s.circle(kSupplyX, kNode, 22);
  s.line(kSupplyX, kNode - 22, kSupplyX, kTop);
  s.line(kSupplyX, kNode + 22, kSupplyX, kGround);
  s.ground(kSupplyX, kGround);
  labels.label(kSupplyX, kNode - 6, {"+"}, "middle");
  labels.label(kSupplyX, kNode + 14, {"\u2212"}, "middle");
  labels.label(kSupplyX - 40, kNode + 42, {"V_exc " + format_quantity(d.supply.v_excitation, Quantity::voltage, 4),
                                           d.supply.ratiometric ? "ratiometric" : "absolute"});
  if (d.supply.r_drive > 0.0) {
    s.resistor_h(kSupplyX, kDividerX, kTop);
    labels.label((kSupplyX + kDividerX) / 2, kTop - 14, {"R_drive " + ohms(d.supply.r_drive)}, "middle");
  } else {
    s.line(kSupplyX, kTop, kDividerX, kTop);
  }
  // The divider: top arm, node, bottom arm.
  const bool low = d.divider.placement == Placement::low;
  s.resistor_v(kDividerX, kTop, kNode);
  s.resistor_v(kDividerX, kNode, kGround);
  s.ground(kDividerX, kGround);
  s.dot(kDividerX, kNode);
  const std::vector<std::string> fixed_label{"R_fixed " + ohms(d.divider.r_fixed),
                                             "+/-" + three_digit_percent(d.divider.r_fixed_tol) + ", " +
                                                 significant(1e6 * d.divider.r_fixed_tempco, 3) + " ppm/K"};
  const std::vector<std::string> sensor = sensor_label(d);
  labels.label(kDividerX - 18, (kTop + kNode) / 2 - 8, low ? fixed_label : sensor, "end");
  labels.label(kDividerX - 18, (kNode + kGround) / 2 - 8, low ? sensor : fixed_label, "end");
  if (d.divider.r_parallel) {  // across the sensor's arm
    const int y1 = low ? kNode : kTop, y2 = low ? kGround : kNode, x = kDividerX + 50;
    s.line(kDividerX, y1 + 8, x, y1 + 8);
    s.line(kDividerX, y2 - 8, x, y2 - 8);
    s.resistor_v(x, y1 + 8, y2 - 8);
    labels.label(x + 16, (y1 + y2) / 2, {"R_par " + ohms(*d.divider.r_parallel)});
  }
  // The node to the ADC, with the node capacitor.
  s.line(kDividerX, kNode, kAdcX, kNode);
  labels.label((kDividerX + kCapX) / 2 + 10, kNode - 10, {"node"}, "middle");
  if (d.divider.c_node > 0.0) {
    s.dot(kCapX, kNode);
    s.capacitor_v(kCapX, kNode, kGround);
    s.ground(kCapX, kGround);
    labels.label(kCapX + 20, (kNode + kGround) / 2 + 4, {"C_node " + format_quantity(d.divider.c_node, Quantity::capacitance, 3)});
  }
  s.rect(kAdcX, kNode - 45, 110, 90);
  labels.label(kAdcX + 55, kNode - 5, {"ADC"}, "middle");
  labels.label(kAdcX - 10, kNode + 62, adc_label(d));
  if (d.divider.duty < 1.0) labels.label(kSupplyX + 40, kTop + 30, {"powered " + three_digit_percent(d.divider.duty) + " of the time"});
  return s.str("The measurement chain of " + d.title + " with its values");
}

}  // namespace thermargin
