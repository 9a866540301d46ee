// Checks of the NTC curves against published values.
#include "thermargin/chain/ntc.hpp"

#include <cmath>

#include <gtest/gtest.h>

namespace thermargin {
namespace {

// The widely published 10 kΩ Steinhart–Hart coefficients (common practice)
// (Steinhart & Hart, Deep-Sea Research 15, 1968, for the equation) and the
// values they give, computed with that equation (docs/checks.md).
constexpr SteinhartHart published{1.129148e-3, 2.34125e-4, 8.76741e-8};
constexpr double resistance_digits = 5e-4;  // Ω: the check values carry 3–4 decimals

double to_k(double c) { return c + kelvin_offset; }

TEST(SteinhartHart, ResistanceMatchesPublishedValues) {
  EXPECT_NEAR(std::exp(ln_resistance(published, to_k(0))), 32650.375, resistance_digits);
  EXPECT_NEAR(std::exp(ln_resistance(published, to_k(25))), 9999.854, resistance_digits);
  EXPECT_NEAR(std::exp(ln_resistance(published, to_k(50))), 3601.035, resistance_digits);
  EXPECT_NEAR(std::exp(ln_resistance(published, to_k(100))), 678.4235, resistance_digits / 10);
}

TEST(SteinhartHart, TemperatureOf10kMatchesPublishedValue) {
  EXPECT_NEAR(temperature_kelvin(published, std::log(10000.0)) - kelvin_offset, 24.99967, 5e-6);
}

TEST(SteinhartHart, CardanoInverseRoundTrips) {
  for (double t = -60; t <= 200; t += 7.5) {
    const double l = ln_resistance(published, to_k(t));
    EXPECT_NEAR(temperature_kelvin(published, l), to_k(t), 1e-9) << t;
  }
}

TEST(SteinhartHart, SlopeAgreesWithCentralDifference) {
  const double t = to_k(37), h = 1e-3;
  const double numeric = (ln_resistance(published, t + h) - ln_resistance(published, t - h)) / (2 * h);
  EXPECT_NEAR(ln_resistance_slope(published, t), numeric, 1e-9);
}

TEST(SteinhartHart, ThreePointFitReproducesCoefficients) {
  const double t[3] = {to_k(0), to_k(25), to_k(100)};
  double l[3];
  for (int i = 0; i < 3; ++i) l[i] = ln_resistance(published, t[i]);
  const SteinhartHart s = steinhart_hart_through(t, l);
  EXPECT_NEAR(s.a / published.a, 1.0, 1e-9);
  EXPECT_NEAR(s.b / published.b, 1.0, 1e-9);
  EXPECT_NEAR(s.c / published.c, 1.0, 1e-9);
}

TEST(Beta, TenKilohmB3950At50DegreesIs3588Ohm) {
  // A 10 kΩ NTC with B = 3950 K reads 3588.2 Ω at 50 °C: computed with the beta
  // equation of IEC 60539-1, R25·exp(B(1/T − 1/T0)) (the pairing itself is common practice).
  EXPECT_NEAR(std::exp(ln_resistance(BetaCurve{10e3, 3950}, to_k(50))), 3588.2, 0.05);
}

TEST(Beta, DefinitionRoundTrips) {
  // IEC 60539-1: B = ln(R1/R2)/(1/T1 − 1/T2) between any two points of the curve.
  const BetaCurve c{4.7e3, 3435};
  const double t1 = to_k(-10), t2 = to_k(85);
  const double b = (ln_resistance(c, t1) - ln_resistance(c, t2)) / (1 / t1 - 1 / t2);
  EXPECT_NEAR(b, 3435, 1e-9);
  EXPECT_NEAR(temperature_kelvin(c, ln_resistance(c, t1)), t1, 1e-9);
}

}  // namespace
}  // namespace thermargin
