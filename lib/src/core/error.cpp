#include "thermargin/core/error.hpp"

#include <utility>

namespace thermargin {

std::string one_line(std::string_view message) {
  static constexpr char hex[] = "0123456789abcdef";
  std::string line;
  line.reserve(message.size());
  for (const char ch : message) {
    const auto u = static_cast<unsigned char>(ch);
    if (ch == '\n') line += "\\n";
    else if (ch == '\r') line += "\\r";
    else if (ch == '\t') line += ' ';
    else if (u < 0x20 || u == 0x7f) line += std::string("\\x") + hex[u >> 4] + hex[u & 15];
    else line += ch;
  }
  return line;
}

std::string Where::origin() const {
  switch (kind) {
    case Origin::built_in: return "default";
    case Origin::command_line: return "command line";
    case Origin::program: return "set by the program";
    case Origin::file:
    case Origin::catalogue: break;
  }
  if (line <= 0) return file;
  std::string at = file + ":" + std::to_string(line);
  if (column > 0) at += ":" + std::to_string(column);
  return at;
}

Where command_line(std::string key) { return Where{Origin::command_line, "", 0, std::move(key)}; }

void reject(const Where& where, std::string_view value, std::string_view accepted) {
  std::string message = where.key;
  message += " = ";
  message += value.empty() ? std::string("(empty)") : std::string(value);
  message += " (" + where.origin() + "): ";
  message += accepted;
  throw input_error(message);
}

void reject_at(const std::string& file, int line, std::string_view message) { reject_at(file, line, 0, message); }

void reject_at(const std::string& file, int line, int column, std::string_view message) {
  std::string text = Where{Origin::file, file, line, "", column}.origin();
  text += ": ";
  text += message;
  throw input_error(text);
}

}  // namespace thermargin
