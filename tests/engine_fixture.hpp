// Shared helpers for the engine tests: designs built through the scenario
// schema (so validation and the active inputs are exactly the CLI's), a
// design stripped of every error source so a test can switch on just one,
// and an ideal converter and firmware that leave only the chain's algebra.
#pragma once

#include <algorithm>
#include <filesystem>
#include <string>
#include <utility>
#include <vector>

#include "source_tree.hpp"
#include "thermargin/input/scenario.hpp"

namespace thermargin::testing {

using Overrides = std::vector<std::pair<std::string, std::string>>;

inline Scenario scenario_with(const Overrides& overrides, const std::string& file = "") {
  Scenario s;
  if (!file.empty()) s.load_file(file);
  for (const auto& [k, v] : overrides) s.set(k, v, Where{Origin::command_line, "", 0, k});
  return s;
}

inline Design design_with(const Overrides& overrides, const std::string& file = "") {
  return build_design(scenario_with(overrides, file));
}

// Every shipped scenario (the covering subset in a sanitizer build), then the
// default design with each of `variants` applied: the designs an equality
// test walks to reach every path of the chain.
inline std::vector<Design> every_scenario_and(const std::vector<Overrides>& variants) {
  std::vector<Design> designs;
  for (const auto& file : scenario_files()) designs.push_back(design_with({}, file));
  for (const auto& v : variants) designs.push_back(design_with(v));
  return designs;
}

inline Overrides with_extra(Overrides o, const Overrides& extra) {
  o.insert(o.end(), extra.begin(), extra.end());  // later settings win
  return o;
}

// The default design with every error source off, an ADC so fine that
// quantisation is negligible, no self-heating and the board at 25 °C.
inline Overrides ideal(const Overrides& extra = {}) {
  return with_extra({{"sensor.r25_tol", "0"},      {"sensor.beta_tol", "0"},      {"sensor.dissipation", "0"},
                     {"divider.r_fixed_tol", "0"}, {"divider.r_fixed_tempco", "0"}, {"adc.offset", "0"},
                     {"adc.gain_error", "0"},      {"adc.inl", "0"},              {"adc.noise", "0"},
                     {"adc.bits", "24"},           {"firmware.resolution", "0"},  {"conditions.board", "25"}},
                    extra);
}

// An ideal converter and firmware (24 bits, no offset, gain, INL or noise,
// no self-heating, the exact conversion with FS = 2^N, no output rounding);
// the parts' tolerances stay: what is left is the chain's algebra.
inline Overrides ideal_converter(const Overrides& extra = {}) {
  return with_extra({{"adc.bits", "24"},          {"adc.offset", "0"},          {"adc.gain_error", "0"},
                     {"adc.inl", "0"},            {"adc.noise", "0"},           {"sensor.dissipation", "0"},
                     {"firmware.conversion", "exact"}, {"firmware.resolution", "0"}, {"firmware.full_scale", "pow2"}},
                    extra);
}

// A table sensor whose R–T table (tests/data/chain/ntc10k_sh_0_50.csv) ends
// at 0 and 50 °C, analysed and required over exactly that range.
inline Overrides table_sensor_0_to_50(const Overrides& extra = {}) {
  return with_extra({{"sensor.model", "table"},
                     {"sensor.table_file", data_path("chain/ntc10k_sh_0_50.csv")},
                     {"conditions.t_min", "0"},
                     {"conditions.t_max", "50"},
                     {"requirement.window_min", "0"},
                     {"requirement.window_max", "50"}},
                    extra);
}

}  // namespace thermargin::testing
