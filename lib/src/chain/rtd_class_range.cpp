#include "thermargin/chain/rtd_class_range.hpp"

#include <algorithm>
#include <cstdio>

namespace thermargin {

bool rtd_class_rated_at(const Design& d, double t) {
  if (d.sensor.kind != SensorKind::rtd || !d.sensor.rtd_class) return true;
  return class_validity(*d.sensor.rtd_class, d.sensor.rtd_construction).contains(t);
}

std::string rtd_class_range_note(const Design& d) {
  if (d.sensor.kind != SensorKind::rtd || !d.sensor.rtd_class) return "";
  const ClassRange r = class_validity(*d.sensor.rtd_class, d.sensor.rtd_construction);
  const double lo = d.conditions.t_min, hi = d.conditions.t_max;
  if (lo >= r.min && hi <= r.max) return "";
  char buf[320];
  std::string beyond;
  char part[96];
  if (lo < r.min) {
    std::snprintf(part, sizeof part, "%g to %g degC", lo, std::min(r.min, hi));
    beyond = part;
  }
  if (hi > r.max) {
    std::snprintf(part, sizeof part, "%g to %g degC", std::max(r.max, lo), hi);
    beyond += (beyond.empty() ? "" : " and ") + std::string(part);
  }
  std::snprintf(buf, sizeof buf,
                "class %s (%s) is rated over %g..%g degC (IEC 60751:2008); beyond it, at %s, the bound is extrapolated",
                std::string(to_string(*d.sensor.rtd_class)).c_str(),
                std::string(to_string(d.sensor.rtd_construction)).c_str(), r.min, r.max, beyond.c_str());
  return buf;
}

}  // namespace thermargin
