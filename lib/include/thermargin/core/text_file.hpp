// Reading a whole input file as text, with the checks every reader needs: the
// file exists, is a regular file, is readable, is text (no NUL bytes), and
// no line is absurdly long. Each failure is one input_error line.
#pragma once

#include <string>
#include <vector>

namespace thermargin {

inline constexpr std::size_t max_input_file_bytes = 16u << 20;  // 16 MiB
inline constexpr std::size_t max_input_line_chars = 4096;

std::string read_text_file(const std::string& path);

// Splits into lines (LF or CRLF); refuses a line longer than max_input_line_chars.
std::vector<std::string> split_lines(const std::string& text, const std::string& name);

}  // namespace thermargin
