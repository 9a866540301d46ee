// Small text rules every reader and writer shares: written once here so that
// a blank, a letter's case or a printf number means the same in every file.
#pragma once

#include <string>
#include <string_view>
#include <vector>

namespace thermargin {

// `s` without blanks at either end: the C locale's white space (space, tab,
// CR, LF, vertical tab, form feed), so a CRLF file's line reads as its LF twin.
std::string trim(std::string_view s);

// `s` with its ASCII letters in lower case (other bytes, UTF-8 included, kept).
std::string lower_ascii(std::string s);

// One double through a printf format ("%g", "%.3g", "%.10g", "%.2f").
std::string printf_number(const char* format, double v);

// The parts with `separator` between them: join({"a", "b"}, ", ") == "a, b".
std::string join(const std::vector<std::string>& parts, std::string_view separator);

}  // namespace thermargin
