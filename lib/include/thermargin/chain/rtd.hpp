// Platinum resistance thermometers: the Callendar–Van Dusen equation and the
// tolerance classes of IEC 60751 (2008 edition).
//
// R(t) = R0·[1 + A·t + B·t² + C·(t − 100)·t³], the C term only below 0 °C,
// with A = 3.9083e-3 /°C, B = −5.775e-7 /°C², C = −4.183e-12 /°C⁴ as the
// standard's defaults. Tolerance classes bound the temperature deviation:
// AA ±(0.10 + 0.0017|t|), A ±(0.15 + 0.002|t|), B ±(0.30 + 0.005|t|),
// C ±(0.6 + 0.01|t|) °C (class C from memory).
#pragma once

#include <cmath>
#include <string_view>

namespace thermargin {

struct CallendarVanDusen {
  double r0 = 100.0;      // Ω at 0 °C
  double a = 3.9083e-3;   // 1/°C
  double b = -5.775e-7;   // 1/°C²
  double c = -4.183e-12;  // 1/°C⁴, below 0 °C only
  bool operator==(const CallendarVanDusen&) const = default;
};

enum class RtdClass { AA, A, B, C };

// Inline and branch-free (the C term selected, not branched to), so that
// the Monte Carlo kernel's loop over a block of units vectorises it.
inline double resistance(const CallendarVanDusen& k, double t) {
  const double f = 1.0 + k.a * t + k.b * t * t;
  const double below_zero = f + k.c * (t - 100.0) * t * t * t;
  return k.r0 * (t < 0.0 ? below_zero : f);
}
double resistance_slope(const CallendarVanDusen& cvd, double t_celsius);  // Ω/°C
// Inverse: closed form above 0 °C, Newton from it below. Returns the
// temperature in °C; resistances below the curve's range give -273.15.
double temperature_celsius(const CallendarVanDusen& cvd, double r_ohm);

// The class's ± temperature bound at t (°C): base + slope·|t|, as a line
// for code that reads one class at many temperatures (class_bound(cls, t) is
// class_line(cls).at(t), to the bit).
struct ClassLine {
  double base = 0.0, slope = 0.0;  // °C, °C per °C of |t|
  double at(double t_celsius) const { return base + slope * std::fabs(t_celsius); }
};
ClassLine class_line(RtdClass cls);
inline double class_bound(const ClassLine& line, double t_celsius) { return line.at(t_celsius); }
double class_bound(RtdClass cls, double t_celsius);

// IEC 60751:2008 rates each class over a range that depends on the
// element's construction (from memory, not read):
//
// | class | wire-wound      | film           |
// |-------|-----------------|----------------|
// | AA    | −50 … +250 °C   | 0 … +150 °C    |
// | A     | −100 … +450 °C  | −30 … +300 °C  |
// | B     | −196 … +600 °C  | −50 … +500 °C  |
// | C     | −196 … +600 °C  | −50 … +600 °C  |
//
// Outside it the class's formula is extrapolated (docs/model.md §1).
enum class RtdConstruction { film, wire_wound };
struct ClassRange {
  double min = 0.0, max = 0.0;  // °C
  bool contains(double t) const { return t >= min && t <= max; }
};
ClassRange class_validity(RtdClass cls, RtdConstruction construction);
std::string_view to_string(RtdClass cls);
std::string_view to_string(RtdConstruction construction);

}  // namespace thermargin
