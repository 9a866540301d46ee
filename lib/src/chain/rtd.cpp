#include "thermargin/chain/rtd.hpp"

#include <cmath>

namespace thermargin {

double resistance_slope(const CallendarVanDusen& k, double t) {
  double d = k.a + 2.0 * k.b * t;
  if (t < 0.0) d += k.c * (4.0 * t * t * t - 300.0 * t * t);
  return k.r0 * d;
}

double temperature_celsius(const CallendarVanDusen& k, double r) {
  // Above 0 °C the quadratic: B t² + A t + (1 − R/R0) = 0, the root near A t.
  const double q = 1.0 - r / k.r0;
  double t = k.b != 0.0 ? (-k.a + std::sqrt(k.a * k.a - 4.0 * k.b * q)) / (2.0 * k.b) : -q / k.a;
  if (!std::isfinite(t)) return -273.15;
  if (r >= k.r0) return t;
  // Below 0 °C: Newton on the quartic, from the quadratic root (a few steps).
  for (int i = 0; i < 50; ++i) {
    const double step = (resistance(k, t) - r) / resistance_slope(k, t);
    t -= step;
    if (std::fabs(step) < 1e-12) break;
  }
  return t < -273.15 ? -273.15 : t;
}

ClassLine class_line(RtdClass cls) {
  switch (cls) {
    case RtdClass::AA: return {0.10, 0.0017};
    case RtdClass::A: return {0.15, 0.002};
    case RtdClass::B: return {0.30, 0.005};
    case RtdClass::C: return {0.6, 0.01};
  }
  return {};
}

double class_bound(RtdClass cls, double t) { return class_line(cls).at(t); }

ClassRange class_validity(RtdClass cls, RtdConstruction construction) {
  const bool film = construction == RtdConstruction::film;
  switch (cls) {
    case RtdClass::AA: return film ? ClassRange{0.0, 150.0} : ClassRange{-50.0, 250.0};
    case RtdClass::A: return film ? ClassRange{-30.0, 300.0} : ClassRange{-100.0, 450.0};
    case RtdClass::B: return film ? ClassRange{-50.0, 500.0} : ClassRange{-196.0, 600.0};
    case RtdClass::C: return film ? ClassRange{-50.0, 600.0} : ClassRange{-196.0, 600.0};
  }
  return {};
}

std::string_view to_string(RtdClass cls) {
  switch (cls) {
    case RtdClass::AA: return "AA";
    case RtdClass::A: return "A";
    case RtdClass::B: return "B";
    case RtdClass::C: return "C";
  }
  return "";
}

std::string_view to_string(RtdConstruction c) { return c == RtdConstruction::film ? "film" : "wire-wound"; }

}  // namespace thermargin
