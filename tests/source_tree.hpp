// Files of the source tree that the tests read: the shipped scenarios, the
// test data and the reference scripts.
#pragma once

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

namespace thermargin::testing {

inline std::string source_path(const std::string& relative) { return std::string(THERMARGIN_SOURCE_DIR) + "/" + relative; }

// A scenario shipped in scenarios/, e.g. "fermentation_probe.ini".
inline std::string scenario_path(const std::string& name) { return source_path("scenarios/" + name); }

// A file under tests/data/, e.g. "fit/sh10k_rounded.csv".
inline std::string data_path(const std::string& relative) { return source_path("tests/data/" + relative); }

// A script under tests/reference/.
inline std::string reference_script(const std::string& name) { return source_path("tests/reference/" + name); }

// Every scenario shipped in scenarios/, so that a new one is tested too.
inline std::vector<std::string> every_scenario_file() {
  std::vector<std::string> out;
  for (const auto& e : std::filesystem::directory_iterator(source_path("scenarios")))
    if (e.path().extension() == ".ini") out.push_back(e.path().string());
  std::sort(out.begin(), out.end());
  return out;
}

// The scenarios named in tests/sanitizer_scenarios.txt, in order.
inline std::vector<std::string> sanitizer_scenario_files() {
  std::vector<std::string> out;
  std::ifstream in(source_path("tests/sanitizer_scenarios.txt"));
  for (std::string line; std::getline(in, line);)
    if (!line.empty() && line[0] != '#') out.push_back(source_path("scenarios/" + line));
  return out;
}

// The scenarios a test that loops over the shipped ones visits: every one,
// or in a sanitizer build (THERMARGIN_SANITIZER_SUBSET) the subset of
// tests/sanitizer_scenarios.txt, which takes every code path they take.
inline std::vector<std::string> scenario_files() {
#ifdef THERMARGIN_SANITIZER_SUBSET
  return sanitizer_scenario_files();
#else
  return every_scenario_file();
#endif
}

}  // namespace thermargin::testing
