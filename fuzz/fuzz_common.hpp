// Shared by the libFuzzer targets: what counts as a correct outcome.
//
// Bad input must end in thermargin::input_error whose message is one
// non-empty line (README.md "Exit status": the CLI prints it as one line and exits 2).
// Anything else escaping a reader (another exception, a crash, a sanitizer
// report) is a finding: libFuzzer stops on it and keeps the input.
#pragma once

#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <string_view>

#include "thermargin/core/error.hpp"

namespace thermargin::fuzz {

// Stops the run with the reason; libFuzzer records the input as a crash.
[[noreturn]] inline void finding(const char* what, std::string_view detail = {}) {
  std::fprintf(stderr, "FINDING: %s: %.*s\n", what, static_cast<int>(detail.size()), detail.data());
  std::abort();
}

inline void check_message(const input_error& e) {
  const std::string_view m = e.what();
  if (m.empty()) finding("input_error with an empty message");
  for (const char ch : m)
    if (ch == '\n' || ch == '\r') finding("input_error message is more than one line", m);
}

inline void check_finite(double v, const char* what) {
  if (!std::isfinite(v)) finding("a result that is not a finite number", what);
}

// Runs one input through `body`; input_error is the expected refusal.
template <class Body>
int run(Body&& body) {
  try {
    body();
  } catch (const input_error& e) {
    check_message(e);
  }
  return 0;
}

inline std::string text_of(const std::uint8_t* data, std::size_t size) {
  return std::string(reinterpret_cast<const char*>(data), size);
}

}  // namespace thermargin::fuzz
