// NTC thermistor curves: the beta equation and the Steinhart–Hart equation.
//
// Beta (B-value) as defined in IEC 60539-1: B = ln(R1/R2) / (1/T1 − 1/T2),
// so R(T) = R25 · exp(B · (1/T − 1/T0)) with T0 = 298.15 K.
// Steinhart–Hart (Steinhart & Hart, Deep-Sea Research 15, 1968):
// 1/T = A + B·ln R + C·(ln R)³, inverted in closed form (Cardano):
// ln R = ∛(y − x/2) − ∛(y + x/2), x = (A − 1/T)/C, y = √((B/3C)³ + x²/4).
// All temperatures here are kelvin; curves work in ln R because every
// engine (tolerance stretch, interpolation, fitting) is linear there.
#pragma once

namespace thermargin {

inline constexpr double kelvin_offset = 273.15;  // T/K = t/°C + 273.15 (SI brochure)
inline constexpr double t0_kelvin = 298.15;      // 25 °C, the NTC reference point

struct BetaCurve {
  double r25;   // Ω at 25 °C, > 0
  double beta;  // K, > 0
};

double ln_resistance(const BetaCurve& c, double t_kelvin);
// d ln R / dT at t_kelvin (1/K), used by the sensitivity view and solvers.
double ln_resistance_slope(const BetaCurve& c, double t_kelvin);
// The kelvin temperature at which the curve has resistance exp(ln_r); a
// non-positive result (no physical solution) is returned as 0.
double temperature_kelvin(const BetaCurve& c, double ln_r);

// A beta curve with ln R25 taken once, for code that evaluates one curve
// many times (a unit's element in every self-heating step, the firmware's
// conversion): the BetaCurve functions above are these with ln R25 taken on
// each call, so both give the same bits.
struct BetaLn {
  double ln_r25 = 0.0;
  double beta = 0.0;
  BetaLn() = default;
  explicit BetaLn(const BetaCurve& c);
};
inline double ln_resistance(const BetaLn& c, double t) { return c.ln_r25 + c.beta * (1.0 / t - 1.0 / t0_kelvin); }
double temperature_kelvin(const BetaLn& c, double ln_r);

struct SteinhartHart {
  double a;  // 1/K
  double b;  // 1/K
  double c;  // 1/K, > 0 for the closed-form inverse; 0 degenerates to the beta form
  bool operator==(const SteinhartHart&) const = default;
};

double ln_resistance(const SteinhartHart& s, double t_kelvin);
double ln_resistance_slope(const SteinhartHart& s, double t_kelvin);
double temperature_kelvin(const SteinhartHart& s, double ln_r);

// The Steinhart–Hart coefficients through three (T, ln R) points, exact:
// solves the 3×3 linear system in (A, B, C). Used by the firmware's default
// conversion and by `fit`.
SteinhartHart steinhart_hart_through(const double t_kelvin[3], const double ln_r[3]);

}  // namespace thermargin
