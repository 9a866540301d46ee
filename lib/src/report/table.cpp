#include "thermargin/report/table.hpp"

#include <algorithm>
#include <cctype>
#include <sstream>

#include "thermargin/core/caution.hpp"
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

// A cell cut at spaces into lines of at most `cap` characters (a word
// longer than that stands alone).
std::vector<std::string> wrap_cell(const std::string& cell, std::size_t cap) {
  if (display_width(cell) <= cap) return {cell};
  std::vector<std::string> lines{""};
  std::istringstream words(cell);
  for (std::string w; words >> w;) {
    std::string& last = lines.back();
    if (!last.empty() && display_width(last) + 1 + display_width(w) > cap) lines.push_back(w);
    else last += (last.empty() ? "" : " ") + w;
  }
  return lines;
}

// The lines of a cell in a column wrapped at `cap` (numbers never wrap).
std::vector<std::string> cell_lines(const std::string& cell, std::size_t cap) {
  return starts_like_number(cell) ? std::vector<std::string>{cell} : wrap_cell(cell, cap);
}

// A column's width with its text cells wrapped at `cap`.
std::size_t column_width(const Table& t, std::size_t c, std::size_t cap) {
  std::size_t w = display_width(t.header[c]);
  for (const auto& r : t.rows)
    if (c < r.size())
      for (const auto& line : cell_lines(r[c], cap)) w = std::max(w, display_width(line));
  return w;
}

// One table of the split: the chosen columns, each cell wrapped at its column's cap.
std::string render_columns(const Table& t, const std::vector<std::size_t>& cols, const std::vector<std::size_t>& cap) {
  std::vector<std::size_t> width(cols.size());
  std::vector<std::vector<std::vector<std::string>>> rows;  // row, column, line
  for (std::size_t k = 0; k < cols.size(); ++k) width[k] = column_width(t, cols[k], cap[cols[k]]);
  for (const auto& r : t.rows) {
    auto& cells = rows.emplace_back();
    for (std::size_t k = 0; k < cols.size(); ++k) cells.push_back(cell_lines(cols[k] < r.size() ? r[cols[k]] : "", cap[cols[k]]));
  }
  // A header stands over its column: right where the column holds numbers.
  std::vector<bool> numeric(cols.size(), false);
  for (std::size_t k = 0; k < cols.size(); ++k)
    for (const auto& r : t.rows) numeric[k] = numeric[k] || (cols[k] < r.size() && starts_like_number(r[cols[k]]));
  std::ostringstream out;
  auto line = [&](const std::vector<std::string>& cells, bool header) {
    std::string text;
    for (std::size_t k = 0; k < cols.size(); ++k) {
      const std::string& cell = cells[k];
      const std::size_t pad = width[k] - display_width(cell);
      const bool right = header ? k > 0 && numeric[k] : starts_like_number(cell);
      text += (k ? "  " : "") + (right ? std::string(pad, ' ') + cell : cell + std::string(pad, ' '));
    }
    out << text.substr(0, text.find_last_not_of(' ') + 1) << "\n";
  };
  std::vector<std::string> head, rule;
  for (std::size_t k = 0; k < cols.size(); ++k) {
    head.push_back(t.header[cols[k]]);
    rule.push_back(std::string(width[k], '-'));
  }
  line(head, true);
  line(rule, true);
  for (const auto& cells : rows) {
    std::size_t height = 0;
    for (const auto& c : cells) height = std::max(height, c.size());
    for (std::size_t i = 0; i < height; ++i) {
      std::vector<std::string> at;
      for (const auto& c : cells) at.push_back(i < c.size() ? c[i] : "");
      line(at, false);
    }
  }
  return out.str();
}

}  // namespace

std::string render_text(const Table& table, const TextLayout& layout) {
  const std::size_t n = table.header.size();
  if (layout.width == 0 || n == 0) return render_text(table);
  // Text columns wrap first, the widest first, down to a floor; only a
  // table still too wide is split.
  constexpr std::size_t kFloor = 16;
  std::vector<std::size_t> cap(n, layout.width), width(n);
  std::size_t total = 0;
  for (std::size_t c = 0; c < n; ++c) total += (width[c] = column_width(table, c, cap[c])) + (c ? 2 : 0);
  while (total > layout.width) {
    std::size_t widest = n;
    for (std::size_t c = 0; c < n; ++c) {
      bool text = false;
      for (const auto& r : table.rows) text = text || (c < r.size() && r[c].find(' ') != std::string::npos && !starts_like_number(r[c]));
      if (text && width[c] > std::max(kFloor, display_width(table.header[c])) && (widest == n || width[c] > width[widest])) widest = c;
    }
    if (widest == n) break;
    cap[widest] = width[widest] - 1;
    const std::size_t now = column_width(table, widest, cap[widest]);
    if (now >= width[widest]) break;  // a word longer than the cap: no narrower
    total -= width[widest] - now;
    width[widest] = now;
  }
  const std::size_t repeat = std::min(layout.repeat, n);
  std::size_t fixed_width = 0;
  for (std::size_t c = 0; c < repeat; ++c) fixed_width += width[c] + 2;
  std::string out;
  for (std::size_t next = repeat; next < n || out.empty();) {
    std::vector<std::size_t> cols;
    for (std::size_t c = 0; c < repeat; ++c) cols.push_back(c);
    std::size_t used = fixed_width;
    while (next < n && (cols.size() == repeat || used + width[next] <= layout.width)) {
      used += width[next] + 2;
      cols.push_back(next++);
    }
    out += (out.empty() ? "" : "\n") + render_columns(table, cols, cap);
  }
  return out;
}

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

std::string csv_caution_line() { return "# " + std::string(caution) + "\n"; }

}  // namespace thermargin
