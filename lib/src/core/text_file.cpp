#include "thermargin/core/text_file.hpp"

#include <filesystem>
#include <fstream>
#include <sstream>

#include "thermargin/core/error.hpp"

namespace thermargin {

std::string read_text_file(const std::string& path) {
  namespace fs = std::filesystem;
  std::error_code ec;
  const auto status = fs::status(path, ec);
  if (ec || !fs::exists(status)) reject_at(path, 0, "cannot open: no such file");
  if (fs::is_directory(status)) reject_at(path, 0, "cannot read: it is a directory, expected a text file");
  if (!fs::is_regular_file(status)) reject_at(path, 0, "cannot read: not a regular file");
  const auto size = fs::file_size(path, ec);
  if (!ec && size > max_input_file_bytes)
    reject_at(path, 0, "file is too large (" + std::to_string(size) + " bytes); at most 16 MiB is read");
  std::ifstream in(path, std::ios::binary);
  if (!in) reject_at(path, 0, "cannot open: permission denied or unreadable");
  std::ostringstream buffer;
  buffer << in.rdbuf();
  if (in.bad()) reject_at(path, 0, "cannot read: input/output error");
  std::string text = buffer.str();
  // A UTF-8 byte-order mark (spreadsheets and some editors write one) is not
  // text: left in, it hid a scenario's first line and a table's first point.
  if (text.starts_with("\xEF\xBB\xBF")) text.erase(0, 3);
  if (text.find('\0') != std::string::npos) reject_at(path, 0, "is not a text file (it contains NUL bytes)");
  if (text.find_first_not_of(" \t\r\n") == std::string::npos) reject_at(path, 0, "is empty");
  return text;
}

std::vector<std::string> split_lines(const std::string& text, const std::string& name) {
  std::vector<std::string> lines;
  std::size_t begin = 0;
  while (begin <= text.size()) {
    std::size_t end = text.find('\n', begin);
    if (end == std::string::npos) end = text.size();
    std::string line = text.substr(begin, end - begin);
    if (!line.empty() && line.back() == '\r') line.pop_back();
    if (line.size() > max_input_line_chars)
      reject_at(name, static_cast<int>(lines.size() + 1),
                "line is longer than " + std::to_string(max_input_line_chars) + " characters");
    lines.push_back(std::move(line));
    if (end == text.size()) break;
    begin = end + 1;
  }
  return lines;
}

}  // namespace thermargin
