// Files of the source tree that the tests read: the shipped scenarios, the
// test data and the reference scripts.
#pragma once

#include <string>

namespace thermargin::testing {

inline std::string source_path(const std::string& relative) { return std::string(THERMARGIN_SOURCE_DIR) + "/" + relative; }

// A scenario shipped in scenarios/, e.g. "fermentation_probe.ini".
inline std::string scenario_path(const std::string& name) { return source_path("scenarios/" + name); }

// A file under tests/data/, e.g. "fit/sh10k_rounded.csv".
inline std::string data_path(const std::string& relative) { return source_path("tests/data/" + relative); }

// A script under tests/reference/.
inline std::string reference_script(const std::string& name) { return source_path("tests/reference/" + name); }

}  // namespace thermargin::testing
