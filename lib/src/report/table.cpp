#include "thermargin/report/table.hpp"

#include <algorithm>
#include <cctype>
#include <sstream>

#include "thermargin/report/html_report.hpp"  // csv_cell

namespace thermargin {

namespace {

std::size_t display_width(const std::string& s) {  // count UTF-8 lead bytes
  std::size_t n = 0;
  for (unsigned char ch : s) n += (ch & 0xC0) != 0x80;
  return n;
}

bool starts_like_number(const std::string& s) {
  return !s.empty() && (std::isdigit(static_cast<unsigned char>(s[0])) || s[0] == '-' || s[0] == '+' || s[0] == '.');
}

}  // namespace

std::string render_text(const Table& table) {
  const auto& headers = table.header;
  std::vector<std::size_t> width(headers.size());
  for (std::size_t i = 0; i < headers.size(); ++i) width[i] = display_width(headers[i]);
  for (const auto& r : table.rows)
    for (std::size_t i = 0; i < r.size() && i < width.size(); ++i) width[i] = std::max(width[i], display_width(r[i]));
  std::ostringstream out;
  auto line = [&](const std::vector<std::string>& r, bool header) {
    for (std::size_t i = 0; i < width.size(); ++i) {
      const std::string cell = i < r.size() ? r[i] : "";
      const std::size_t pad = width[i] - display_width(cell);
      const bool right = !header ? starts_like_number(cell) : i > 0;
      if (i) out << "  ";
      if (right) out << std::string(pad, ' ') << cell;
      else out << cell << (i + 1 < width.size() ? std::string(pad, ' ') : "");
    }
    out << "\n";
  };
  line(headers, true);
  std::size_t total = 0;
  for (auto w : width) total += w + 2;
  out << std::string(total > 2 ? total - 2 : 0, '-') << "\n";
  for (const auto& r : table.rows) line(r, false);
  return out.str();
}

std::string render_csv(const Table& table) {
  std::string out;
  auto line = [&](const std::vector<std::string>& cells) {
    for (std::size_t i = 0; i < cells.size(); ++i) {
      if (i) out += ',';
      out += csv_cell(cells[i]);
    }
    out += '\n';
  };
  line(table.header);
  for (const auto& r : table.rows) line(r);
  return out;
}

}  // namespace thermargin
