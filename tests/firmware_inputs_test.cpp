// The firmware's inputs as the key of its conversion (firmware_inputs.hpp,
// engines/conversion_cache.hpp, docs/engines.md "The conversion shared
// between runs"). The key is safe when no design setting can change the
// table of conversions without changing the key: walked here over every
// key of the scenario schema, each perturbed on designs that reach the
// firmware's paths (a beta NTC with the beta conversion and with a given
// Steinhart–Hart one; a Steinhart–Hart sensor with the exact conversion; a
// lookup table on an absolute supply; an R–T table sensor with a fitted
// Steinhart–Hart and with the exact conversion; a Pt1000 with leads and the
// exact conversion; a lookup table with a drive resistance and leads).
// Checked by hand when it was written: with any one field of FirmwareInputs
// or ConversionKey left out of its operator==, this test fails. The other
// direction is what makes the sharing pay: the settings the Pt1000 oven's
// grades catalogue changes leave the key alone. The cache itself: one table
// a key, made once across threads, and a Monte Carlo run with a shared
// table equal to one without, to the bit.
#include "thermargin/chain/firmware_inputs.hpp"

#include <atomic>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <optional>
#include <stdexcept>
#include <string>
#include <thread>
#include <vector>

#include <gtest/gtest.h>

#include "engine_fixture.hpp"
#include "engines/monte_carlo_kernel.hpp"
#include "thermargin/chain/firmware.hpp"
#include "thermargin/engines/conversion_cache.hpp"
#include "thermargin/engines/monte_carlo.hpp"
#include "thermargin/input/catalogue.hpp"

namespace thermargin {
namespace {

using testing::Overrides;
using testing::scenario_path;
using testing::scenario_with;
using testing::source_path;

ConversionKey key_of(const Design& d) { return {firmware_inputs(d), d.adc.averaging}; }

std::vector<double> table_of(const Design& d) {
  return mc_detail::conversion_table(Firmware(d), d.adc.averaging);
}

// The same bits, NaN included.
bool same_bits(const std::vector<double>& a, const std::vector<double>& b) {
  return a.size() == b.size() && std::memcmp(a.data(), b.data(), a.size() * sizeof(double)) == 0;
}

std::string number_text(double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.17g", v);
  return buf;
}

// Other values for a key: the words its help lists ("a | b | c"), the
// other of true and false, its number scaled by 1.1, 0.9 and 10 (an integer ±1; 1, 0.001 and 100 for a zero), and the R–T
// tables shipped for a file key. Values the design refuses are skipped.
std::vector<std::string> other_values(const KeySpec& spec, const std::string& value) {
  std::vector<std::string> out;
  if (spec.key.ends_with("_file"))
    return {scenario_path("incubator_ntc47k.csv"), scenario_path("freezer_probe_ntc10k_limits.csv")};
  if (spec.help.find(" | ") != std::string::npos) {
    std::size_t start = 0;
    while (start < spec.help.size()) {
      const std::size_t bar = spec.help.find('|', start);
      std::string part = spec.help.substr(start, bar == std::string::npos ? std::string::npos : bar - start);
      const std::size_t colon = part.rfind(": ");
      if (colon != std::string::npos) part = part.substr(colon + 2);
      const std::size_t b = part.find_first_not_of(' ');
      const std::size_t e = part.find_first_of(" (", b);
      if (b != std::string::npos) out.push_back(part.substr(b, e == std::string::npos ? std::string::npos : e - b));
      if (bar == std::string::npos) break;
      start = bar + 1;
    }
  }
  if (value == "true" || value == "false") out.push_back(value == "true" ? "false" : "true");
  try {
    const double x = parse_quantity(value, spec.quantity, Where{});
    if (spec.quantity == Quantity::integer) {
      out.push_back(number_text(x + 1.0));
      out.push_back(number_text(x - 1.0));
    } else {
      out.push_back(number_text(x == 0.0 ? 1.0 : 1.1 * x));
      out.push_back(number_text(x == 0.0 ? 1e-3 : 0.9 * x));
      out.push_back(number_text(x == 0.0 ? 100.0 : 10.0 * x));
    }
  } catch (const input_error&) {
  }
  return out;
}

struct Base {
  const char* file;
  Overrides overrides;
};

// Small ADCs and one sample a reading keep the tables short (1024 readings;
// a lookup table's 16384, fine enough to see the drive and the leads move it);
// the keys of the ADC and the averaging are perturbed like any other. The
// firmware's own curve is given as numbers where the scenario says
// "sensor" or "fit", so that those keys are perturbed too (the
// Steinhart–Hart coefficients are a 10 kΩ NTC's, common practice).
const std::vector<Base>& bases() {
  static const std::vector<Base> b = {
      {"default.ini", {{"adc.bits", "10"}, {"firmware.r25", "10k"}, {"firmware.beta", "3950"}}},
      {"default.ini",
       {{"adc.bits", "10"},
        {"firmware.conversion", "steinhart-hart"},
        {"firmware.a", "1.125e-3"},
        {"firmware.b", "2.347e-4"},
        {"firmware.c", "8.566e-8"},
        {"divider.r_parallel", "100k"}}},
      {"default.ini", {{"adc.bits", "10"}, {"sensor.model", "steinhart-hart"}, {"firmware.conversion", "exact"}}},
      {"battery_charge_guard.ini",
       {{"adc.bits", "10"}, {"adc.averaging", "1"}, {"firmware.r25", "10k"}, {"firmware.beta", "3380"}}},
      {"freezer_probe_limits.ini", {{"adc.bits", "10"}, {"adc.averaging", "1"}}},
      {"freezer_probe_limits.ini", {{"adc.bits", "10"}, {"adc.averaging", "1"}, {"firmware.conversion", "exact"}}},
      {"hot_plate_pt1000.ini", {{"adc.bits", "10"}, {"adc.averaging", "1"}}},
      {"switched_logger_100k.ini",
       {{"adc.bits", "14"}, {"adc.averaging", "1"}, {"firmware.conversion", "table"}, {"sensor.lead_resistance", "2"}}},
  };
  return b;
}

TEST(FirmwareInputs, NoSettingChangesTheConversionTableWithoutChangingTheKey) {
  int perturbed = 0, same_key = 0;
  for (const Base& base : bases()) {
    const Scenario s0 = scenario_with(base.overrides, scenario_path(base.file));
    const Design d0 = build_design(s0);
    const ConversionKey k0 = key_of(d0);
    const std::vector<double> t0 = table_of(d0);
    for (const KeySpec& spec : scenario_schema()) {
      for (const std::string& v : other_values(spec, s0.get(spec.key).value)) {
        Scenario s = s0;
        std::optional<Design> d;
        try {
          s.set(spec.key, v, Where{Origin::command_line, "", 0, spec.key});
          d = build_design(s);
        } catch (const input_error&) {
          continue;  // a value this design refuses
        }
        ++perturbed;
        if (!(key_of(*d) == k0)) continue;
        ++same_key;
        EXPECT_TRUE(same_bits(table_of(*d), t0)) << base.file << ": " << spec.key << " = " << v
                                                 << " changes the conversion but not its key";
      }
    }
  }
  // The walk reached the schema: most keys perturbed, most leave the key alone.
  EXPECT_GT(perturbed, 400);
  EXPECT_GT(same_key, 200);
}

TEST(FirmwareInputs, TheFirmwareKeysChangeTheKey) {
  // The other direction, for the settings the firmware reads by name.
  const Design d0 = build_design(scenario_with({}, scenario_path("hot_plate_pt1000.ini")));
  const ConversionKey k0 = key_of(d0);
  for (const auto& [key, value] : Overrides{{"firmware.resolution", "0.01"},
                                            {"firmware.lead_compensation", "0.25"},
                                            {"firmware.conversion", "table"},
                                            {"sensor.r0", "1001"},
                                            {"sensor.lead_resistance", "0.4"},
                                            {"divider.r_fixed", "3k3"},
                                            {"adc.bits", "14"},
                                            {"adc.averaging", "8"},
                                            {"conditions.t_min", "-20"}}) {
    const Design d = build_design(scenario_with({{key, value}}, scenario_path("hot_plate_pt1000.ini")));
    EXPECT_FALSE(key_of(d) == k0) << key;
  }
}

TEST(FirmwareInputs, ThePt1000OvenCataloguesGradesShareOneKey) {
  // bench/pt1000_oven_catalogue.csv grades the RTD class, the fixed
  // resistor's tolerance and tempco, the ADC's offset, gain and INL and the
  // calibration: none of it is read by the conversion.
  const Scenario s0 = scenario_with({}, scenario_path("hot_plate_pt1000.ini"));
  const ConversionKey k0 = key_of(build_design(s0));
  const Catalogue cat = read_catalogue(source_path("bench/pt1000_oven_catalogue.csv"));
  int options = 0;
  for (const auto& slot : cat.slots)
    for (const auto& o : slot.options) {
      Scenario s = s0;
      for (const auto& st : o.settings) s.set(st.key, st.value, st.where);
      EXPECT_TRUE(key_of(build_design(s)) == k0) << slot.name << " " << o.grade;
      ++options;
    }
  EXPECT_GT(options, 10);
}

ConversionKey small_key(int averaging) {
  return {firmware_inputs(build_design(scenario_with({{"adc.bits", "8"}}))), averaging};
}

TEST(ConversionCache, MakesEachKeysTableOnceAcrossThreads) {
  ConversionCache cache;
  std::atomic<int> made{0};
  auto make = [&] {
    ++made;
    std::this_thread::sleep_for(std::chrono::milliseconds(20));  // so that the others ask while it is made
    return std::vector<double>{1.0, 2.0};
  };
  std::vector<ConversionCache::Table> got(4);
  std::vector<std::thread> threads;
  for (std::size_t i = 0; i < got.size(); ++i) threads.emplace_back([&, i] { got[i] = cache.get(small_key(1), make); });
  for (auto& t : threads) t.join();
  EXPECT_EQ(made.load(), 1);
  for (const auto& t : got) EXPECT_EQ(t.get(), got[0].get());
  const ConversionCache::Table other = cache.get(small_key(2), make);
  EXPECT_EQ(made.load(), 2);
  EXPECT_NE(other.get(), got[0].get());
  EXPECT_EQ(cache.size(), 2u);
}

TEST(ConversionCache, AFailureToMakeATableReachesTheCaller) {
  ConversionCache cache;
  auto fail = []() -> std::vector<double> { throw std::runtime_error("no table"); };
  EXPECT_THROW(cache.get(small_key(1), fail), std::runtime_error);
  EXPECT_THROW(cache.get(small_key(1), fail), std::runtime_error);  // the same failure, not a second try
}

void expect_same_run(const McResult& a, const McResult& b) {
  EXPECT_EQ(a.summary.good_units, b.summary.good_units);
  EXPECT_EQ(a.summary.max_abs, b.summary.max_abs);
  ASSERT_EQ(a.points.size(), b.points.size());
  for (std::size_t i = 0; i < a.points.size(); ++i) {
    EXPECT_EQ(a.points[i].valid, b.points[i].valid);
    EXPECT_EQ(a.points[i].failed, b.points[i].failed);
    EXPECT_EQ(a.points[i].low, b.points[i].low);
    EXPECT_EQ(a.points[i].high, b.points[i].high);
    EXPECT_EQ(a.points[i].mean, b.points[i].mean);
    EXPECT_EQ(a.points[i].stddev, b.points[i].stddev);
  }
}

TEST(ConversionCache, MonteCarloRunsSharingATableAreTheRunsWithoutIt) {
  // Two grades of the Pt1000 (the class, a calibration) share one table.
  const Overrides small{{"adc.bits", "12"}, {"conditions.t_step", "25"}};
  const Design a = testing::design_with(small, scenario_path("hot_plate_pt1000.ini"));
  const Design b = testing::design_with(
      testing::with_extra(small, {{"sensor.rtd_class", "AA"}, {"firmware.calibration", "offset"}}),
      scenario_path("hot_plate_pt1000.ini"));
  ASSERT_TRUE(key_of(a) == key_of(b));
  const std::vector<double> temps = a.conditions.temperatures();
  ConversionCache cache;
  McOptions shared{.units = 600, .threads = 1, .progress = {}, .conversions = &cache};
  const McOptions alone{.units = 600, .threads = 1};
  for (const Design* d : {&a, &b}) {
    const Chain chain(*d);
    expect_same_run(monte_carlo(chain, temps, shared), monte_carlo(chain, temps, alone));
  }
  EXPECT_EQ(cache.size(), 1u);
}

}  // namespace
}  // namespace thermargin
