#include "thermargin/error.hpp"

namespace thermargin {

std::string Where::origin() const {
  switch (kind) {
    case Origin::built_in: return "default";
    case Origin::command_line: return "command line";
    case Origin::file:
    case Origin::catalogue: break;
  }
  return line > 0 ? file + ":" + std::to_string(line) : file;
}

void reject(const Where& where, std::string_view value, std::string_view accepted) {
  std::string message = where.key;
  message += " = ";
  message += value.empty() ? std::string("(empty)") : std::string(value);
  message += " (" + where.origin() + "): ";
  message += accepted;
  throw input_error(message);
}

void reject_at(const std::string& file, int line, std::string_view message) {
  std::string text = file;
  if (line > 0) text += ":" + std::to_string(line);
  text += ": ";
  text += message;
  throw input_error(text);
}

}  // namespace thermargin
