// Shared helpers for the engine tests: designs built through the scenario
// schema (so validation and the active inputs are exactly the CLI's), and a
// design stripped of every error source so a test can switch on just one.
#pragma once

#include <algorithm>
#include <filesystem>
#include <string>
#include <utility>
#include <vector>

#include "thermargin/scenario.hpp"

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

// The default design with every error source off, an ADC so fine that
// quantisation is negligible, no self-heating and the board at 25 °C.
inline Overrides ideal(const Overrides& extra = {}) {
  Overrides o{{"sensor.r25_tol", "0"},      {"sensor.beta_tol", "0"},      {"sensor.dissipation", "0"},
          {"divider.r_fixed_tol", "0"}, {"divider.r_fixed_tempco", "0"}, {"adc.offset", "0"},
          {"adc.gain_error", "0"},      {"adc.inl", "0"},              {"adc.noise", "0"},
          {"adc.bits", "24"},           {"firmware.resolution", "0"},  {"conditions.board", "25"}};
  o.insert(o.end(), extra.begin(), extra.end());  // later settings win
  return o;
}

// Every scenario shipped in scenarios/, so that a new one is tested too.
inline std::vector<std::string> scenario_files() {
  std::vector<std::string> out;
  for (const auto& e : std::filesystem::directory_iterator(std::string(THERMARGIN_SOURCE_DIR) + "/scenarios"))
    if (e.path().extension() == ".ini") out.push_back(e.path().string());
  std::sort(out.begin(), out.end());
  return out;
}

}  // namespace thermargin::testing
