// Checks of the sensing element of one unit (sensor.hpp): the nominal curve
// of every model, its inverse and slope, and the unit spread of docs/model.md §1 —
// for an NTC ln R_unit = ln R(T0) + ln(1 + δR) + (1 + δβ)(ln R − ln R(T0)),
// which for the beta model is exactly R25·(1 + δR) and B·(1 + δβ); for an RTD
// R_unit(t) = R_nom(t + k·bound(t)) with the IEC 60751 class bound.
#include "thermargin/chain/sensor.hpp"

#include <cmath>
#include <string>
#include <utility>
#include <vector>

#include <gtest/gtest.h>

#include "engine_fixture.hpp"
#include "thermargin/input/scenario.hpp"

namespace thermargin {
namespace {

constexpr double ln_r_tolerance = 1e-12;        // ln R: a few roundings of numbers near 10
constexpr double sensor_round_trip_tolerance = 1e-9;   // K
constexpr double slope_relative_tolerance = 1e-7;  // central difference, h = 1e-3 K
constexpr double pt1000_digits = 1e-9;           // Ω: 1385.055 is exact (R0·(1 + 100 A + 10⁴ B))

using testing::design_with;

const std::string sensor_table_file = testing::data_path("chain/ntc10k_sh_5K.csv");

std::vector<Design> every_model() {
  return {design_with({{"sensor.model", "beta"}, {"sensor.r25", "4k7"}, {"sensor.beta", "3977"}}),
          design_with({{"sensor.model", "steinhart-hart"}}),
          design_with({{"sensor.model", "table"}, {"sensor.table_file", sensor_table_file}}),
          design_with({{"sensor.model", "rtd"}, {"sensor.r0", "1k"}, {"sensor.rtd_class", "B"}})};
}

double tk(double celsius) { return celsius + kelvin_offset; }

TEST(SensorCurve, InverseRoundTripsForEveryModel) {
  for (const Design& d : every_model()) {
    for (double t = -40.0; t <= 120.0; t += 0.7) {
      const auto l = nominal_ln_resistance(d.sensor, tk(t));
      ASSERT_TRUE(l) << static_cast<int>(d.sensor.kind) << " " << t;
      const auto back = nominal_temperature(d.sensor, *l);
      ASSERT_TRUE(back);
      EXPECT_NEAR(*back, tk(t), sensor_round_trip_tolerance) << static_cast<int>(d.sensor.kind) << " " << t;
    }
  }
}

TEST(SensorCurve, SlopeAgreesWithCentralDifferenceForEveryModel) {
  const double h = 1e-3;
  for (const Design& d : every_model()) {
    for (double t : {-33.0, -0.4, 0.4, 25.0, 77.7, 118.0}) {
      const double numeric =
          (*nominal_ln_resistance(d.sensor, tk(t) + h) - *nominal_ln_resistance(d.sensor, tk(t) - h)) / (2 * h);
      const double slope = *nominal_ln_resistance_slope(d.sensor, tk(t));
      EXPECT_NEAR(slope / numeric, 1.0, slope_relative_tolerance) << static_cast<int>(d.sensor.kind) << " " << t;
    }
  }
}

TEST(SensorCurve, RtdModelIsTheCallendarVanDusenCurveOfItsR0) {
  // IEC 60751: a Pt1000 is ten times a Pt100; 1385.055 Ω at 100 °C (A + 100 B exact).
  const Design d = every_model()[3];
  EXPECT_NEAR(std::exp(*nominal_ln_resistance(d.sensor, tk(100.0))), 1385.055, pt1000_digits);
}

TEST(NtcSpread, BetaModelIsExactlyR25TimesOnePlusDeltaRAndBetaTimesOnePlusDeltaBeta) {
  // docs/model.md §1: for the beta model the stretch is exactly a new R25 and B.
  const Design d = design_with({{"sensor.model", "beta"}, {"sensor.r25", "10k"}, {"sensor.beta", "3435"}});
  for (const auto& [dr, db] : {std::pair{0.01, 0.0}, {0.0, -0.015}, {-0.05, 0.02}, {0.003, 0.007}}) {
    const SensorUnit unit(d.sensor, dr, db, 0.0);
    const BetaCurve expected{10e3 * (1 + dr), 3435 * (1 + db)};
    for (double t = -40.0; t <= 150.0; t += 5.0)
      EXPECT_NEAR(*unit.ln_resistance(tk(t)), ln_resistance(expected, tk(t)), ln_r_tolerance) << dr << " " << db << " " << t;
  }
}

TEST(NtcSpread, ToleranceBandIsNarrowestAt25C) {
  // A beta deviation leaves R(25 °C) alone and grows with |1/T − 1/T0|.
  int ntc_models = 0;
  for (const Design& d : every_model()) {
    if (!d.is_ntc()) continue;
    ++ntc_models;
    const SensorUnit unit(d.sensor, 0.0, 0.02, 0.0);
    const double at_t0 = *unit.ln_resistance(t0_kelvin) - *nominal_ln_resistance(d.sensor, t0_kelvin);
    EXPECT_NEAR(at_t0, 0.0, ln_r_tolerance);
    double previous = 0.0;
    for (double t = 30.0; t <= 120.0; t += 10.0) {
      const double spread = std::fabs(*unit.ln_resistance(tk(t)) - *nominal_ln_resistance(d.sensor, tk(t)));
      EXPECT_GT(spread, previous) << t;
      previous = spread;
    }
  }
  EXPECT_EQ(ntc_models, 3);  // beta, Steinhart–Hart and table
}

TEST(NtcSpread, StretchesEveryNtcModelAbout25C) {
  // docs/model.md §1, the same stretch for Steinhart–Hart and tables: at 25 °C the
  // shift is ln(1 + δR); elsewhere the distance from ln R(T0) grows by (1 + δβ).
  const double dr = 0.02, db = -0.01;
  int ntc_models = 0;
  for (const Design& d : every_model()) {
    if (!d.is_ntc()) continue;
    ++ntc_models;
    const SensorUnit unit(d.sensor, dr, db, 0.0);
    const double l0 = *nominal_ln_resistance(d.sensor, t0_kelvin);
    EXPECT_NEAR(*unit.ln_resistance(t0_kelvin) - l0, std::log(1 + dr), ln_r_tolerance);
    for (double t : {-30.0, 0.0, 60.0, 100.0}) {
      const double nominal_distance = *nominal_ln_resistance(d.sensor, tk(t)) - l0;
      const double unit_distance = *unit.ln_resistance(tk(t)) - (l0 + std::log(1 + dr));
      EXPECT_NEAR(unit_distance, (1 + db) * nominal_distance, ln_r_tolerance) << t;
    }
  }
  EXPECT_EQ(ntc_models, 3);  // beta, Steinhart–Hart and table
}

TEST(RtdSpread, ClassFactorShiftsTheCurveByTheClassBound) {
  // docs/model.md §1 and IEC 60751 class B ±(0.30 + 0.005|t|): a unit with k = ±1
  // has the resistance the nominal element has at t ± bound(t).
  const Design d = every_model()[3];
  for (double k : {-1.0, -0.25, 1.0}) {
    const SensorUnit unit(d.sensor, 0.0, 0.0, k);
    for (double t = -50.0; t <= 250.0; t += 12.5) {
      const double bound = 0.30 + 0.005 * std::fabs(t);
      const double expected = std::log(resistance(d.sensor.cvd, t + k * bound));
      EXPECT_NEAR(*unit.ln_resistance(tk(t)), expected, ln_r_tolerance) << k << " " << t;
    }
  }
}

TEST(RtdSpread, NtcDeviationsDoNotTouchAnRtd) {
  const Design d = every_model()[3];
  const SensorUnit unit(d.sensor, 0.05, 0.05, 0.0);
  for (double t : {-20.0, 25.0, 200.0})
    EXPECT_EQ(*unit.ln_resistance(tk(t)), *nominal_ln_resistance(d.sensor, tk(t))) << t;
}

TEST(SensorUnit, TableSensorIsUndefinedOutsideItsTable) {
  const Design d = design_with(testing::table_sensor_0_to_50());
  const SensorUnit unit(d.sensor, 0.01, 0.01, 0.0);
  EXPECT_TRUE(unit.ln_resistance(tk(25.0)));
  EXPECT_FALSE(unit.ln_resistance(tk(50.5)));
  EXPECT_FALSE(unit.ln_resistance(tk(-0.5)));
}

}  // namespace
}  // namespace thermargin
