#include "thermargin/report/life_report.hpp"

#include <cmath>
#include <cstdio>
#include <string>

#include "thermargin/core/number.hpp"
#include "thermargin/input/life.hpp"

namespace thermargin {
namespace {

std::string k(double v) {
  if (!std::isfinite(v)) return "n/a";
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.3f K", v);
  return buf;
}

std::string row(const std::string& name, const std::string& delivery, const std::string& end) {
  char buf[256];
  std::snprintf(buf, sizeof buf, "  %-24s %-16s %s\n", name.c_str(), delivery.c_str(), end.c_str());
  return buf;
}

bool is_drift(const Design& d, const std::string& name) {
  for (const auto& in : d.drift_inputs)
    if (info(in.source).name == name) return true;
  return false;
}

}  // namespace

std::string end_of_life_text(const Design& d, const Budget& b) {
  if (!b.end_of_life) return {};
  const Budget& e = b.end_of_life->budget;
  std::string out = "Over the product's life (drift inputs zero at delivery, active at end of life); the verdict uses " +
                    std::string(to_string(b.verdict.at)) + " (requirement.at):\n";
  out += row("max |error| in window", "at delivery", "at end of life");
  out += row("worst case", k(b.wc_max_abs), k(e.wc_max_abs));
  out += row("linear budget", k(b.rss_max_abs), k(e.rss_max_abs));
  if (b.mc && e.mc) {
    out += row("Monte Carlo", k(b.mc->max_abs), k(e.mc->max_abs));
    out += row("yield", percent(b.mc->yield, 3), percent(e.mc->yield, 3));
  }
  out += row("verdict", b.end_of_life->delivery_verdict.pass ? "PASS" : "FAIL", e.verdict.pass ? "PASS" : "FAIL");
  std::string drift;
  int shown = 0;
  for (const auto& c : e.window_contributors) {
    if (!is_drift(d, c.name) || !(c.share > 0.0) || shown == 3) continue;
    char buf[128];
    std::snprintf(buf, sizeof buf, "%s%s %.1f %% (own reach %.3f K)", shown ? ", " : "", c.label.c_str(),
                  100.0 * c.share, c.half_width);
    drift += buf;
    ++shown;
  }
  if (!drift.empty()) out += "Leading drift at end of life (share of the combined variance): " + drift + "\n";
  return out + "\n";
}

}  // namespace thermargin
