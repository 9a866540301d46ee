#include "thermargin/input/catalogue.hpp"

#include <algorithm>
#include <cctype>
#include <charconv>
#include <cmath>
#include <filesystem>
#include <limits>
#include <map>
#include <set>

#include "thermargin/input/scenario.hpp"
#include "thermargin/core/text_file.hpp"
#include "thermargin/core/text.hpp"

namespace thermargin {

namespace {

// "<what> = <value> (<file>:<line>:<column>): <why>", `what` the column's
// name (or "header").
[[noreturn]] void refuse(const std::string& file, int line, int column, const std::string& what,
                         const std::string& value, const std::string& why) {
  reject(Where{Origin::catalogue, file, line, what, column}, value, why);
}

// A cost: a plain decimal number in the catalogue's currency. SI prefixes are
// not read here (a price of "1m" is more likely a typo than a milli-unit),
// nor currency symbols or decimal commas, which spreadsheets add by locale.
double read_cost(const std::string& text, const std::string& file, int line, int column, const std::string& what) {
  const std::string t = trim(text);
  double v = 0.0;
  const char* end = t.data() + t.size();
  const auto [ptr, ec] = std::from_chars(t.data(), end, v);
  const std::string accepted =
      "expected a cost as a plain decimal number >= 0 in the catalogue's currency, without a currency sign "
      "or thousands separator, e.g. 0.35";
  if (t.empty() || ec != std::errc() || ptr != end || !std::isfinite(v)) refuse(file, line, column, what, t, accepted);
  if (v < 0.0) refuse(file, line, column, what, t, "a cost cannot be negative; " + accepted);
  return v;
}

}  // namespace

std::size_t Catalogue::combinations() const {
  std::size_t n = 1;
  for (const auto& s : slots) {
    const std::size_t k = s.options.size();
    if (k != 0 && n > std::numeric_limits<std::size_t>::max() / k) return std::numeric_limits<std::size_t>::max();
    n *= k;
  }
  return n;
}

bool Catalogue::has_setup_costs() const {
  for (const auto& s : slots)
    for (const auto& o : s.options)
      if (o.setup_cost > 0.0) return true;
  return false;
}

std::string Catalogue::column_name(int column) const {
  const std::pair<int, const char*> names[] = {{columns.slot, "slot"},         {columns.grade, "grade"},
                                               {columns.unit_cost, "unit_cost"}, {columns.settings, "settings"},
                                               {columns.notes, "notes"},       {columns.setup_cost, "setup_cost"}};
  for (const auto& [c, name] : names)
    if (c == column && c > 0) return name;
  return "column " + std::to_string(column);
}

std::vector<std::vector<CsvField>> parse_csv_records(const std::string& text, const std::string& name) {
  std::vector<std::vector<CsvField>> records;
  std::vector<CsvField> record;
  CsvField field;
  int line = 1;
  std::size_t i = 0;
  const std::size_t n = text.size();
  bool at_record_start = true;
  auto end_field = [&] {
    record.push_back(std::move(field));
    field = CsvField{};
  };
  auto end_record = [&] {
    end_field();
    // A blank line is one empty, unquoted field: skipped, as spreadsheets leave them.
    const bool blank = record.size() == 1 && !record[0].quoted && trim(record[0].text).empty();
    if (!blank) records.push_back(std::move(record));
    record.clear();
    at_record_start = true;
  };
  while (i < n) {
    if (at_record_start) {
      at_record_start = false;
      field.line = line;
      if (text[i] == '#') {  // a comment line (not RFC 4180; documented)
        while (i < n && text[i] != '\n') ++i;
        if (i < n) ++i;
        ++line;
        at_record_start = true;
        continue;
      }
    }
    const char c = text[i];
    if (c == '"') {
      if (!trim(field.text).empty() || field.quoted)
        reject_at(name, line, static_cast<int>(record.size() + 1),
                  "a double quote inside an unquoted field; quote the whole field and write each quote inside it "
                  "twice (\"\"), as RFC 4180 does");
      field.quoted = true;
      field.text.clear();  // spaces before the opening quote are not part of the field
      const int opened = line;
      ++i;
      bool closed = false;
      while (i < n) {
        if (text[i] == '"') {
          if (i + 1 < n && text[i + 1] == '"') {
            field.text += '"';
            i += 2;
            continue;
          }
          ++i;
          closed = true;
          break;
        }
        if (text[i] == '\n') ++line;
        if (text[i] == '\r' && i + 1 < n && text[i + 1] == '\n') {
          ++i;  // a quoted CRLF is one line break
          continue;
        }
        field.text += text[i++];
      }
      if (!closed)
        reject_at(name, opened, static_cast<int>(record.size() + 1),
                  "a quoted field is never closed; add the closing double quote");
      // Only spaces may follow the closing quote before the separator.
      while (i < n && (text[i] == ' ' || text[i] == '\t')) ++i;
      if (i < n && text[i] != ',' && text[i] != '\n' && text[i] != '\r')
        reject_at(name, line, static_cast<int>(record.size() + 1),
                  "text after a closing double quote; quote the whole field and write each quote inside it twice "
                  "(\"\")");
      continue;
    }
    if (c == ',') {
      end_field();
      field.line = line;
      ++i;
      continue;
    }
    if (c == '\r' && i + 1 < n && text[i + 1] == '\n') ++i;
    if (c == '\n' || c == '\r') {
      ++i;
      end_record();
      ++line;
      continue;
    }
    field.text += c;
    ++i;
  }
  if (!at_record_start || !record.empty() || !field.text.empty() || field.quoted) end_record();
  return records;
}

namespace {

// One option's settings field: key=value items separated by ';', each key
// a scenario key, set once per option and graded by one slot only
// (`key_owner`: key -> (slot, line) over the whole catalogue). A file a
// setting names is read relative to the catalogue.
std::vector<GradeSetting> read_settings(const std::string& all, const std::string& name, int settings_line, int settings_col,
                                        const std::string& slot, int line,
                                        std::map<std::string, std::pair<std::string, int>>& key_owner) {
  namespace fs = std::filesystem;
  const fs::path dir = fs::path(name).parent_path();
  std::vector<GradeSetting> settings;
  std::set<std::string> keys;
  std::size_t begin = 0;
  while (begin <= all.size()) {
    std::size_t end = all.find(';', begin);
    if (end == std::string::npos) end = all.size();
    const std::string item = trim(all.substr(begin, end - begin));
    begin = end + 1;
    if (item.empty()) continue;  // "a=1;" and an option that keeps the scenario's parts
    const auto eq = item.find('=');
    if (eq == std::string::npos)
      refuse(name, settings_line, settings_col, "settings", item,
             "a setting is key=value, e.g. sensor.r25_tol=1%; settings are separated by ';'");
    GradeSetting s;
    s.key = trim(item.substr(0, eq));
    s.value = trim(item.substr(eq + 1));
    if (!find_key(s.key))
      refuse(name, settings_line, settings_col, "settings", item,
             "'" + s.key + "' names no scenario key; `thermargin check --help` lists them (section.key, e.g. "
             "sensor.r25_tol)");
    if (!keys.insert(s.key).second)
      refuse(name, settings_line, settings_col, "settings", item, "'" + s.key + "' is set twice in this option");
    // A file named by a grade is read relative to the catalogue, as a
    // scenario's table file is read relative to the scenario.
    if (s.key.ends_with("_file") && !s.value.empty() && fs::path(s.value).is_relative())
      s.value = (dir / s.value).string();
    s.where = Where{Origin::catalogue, name, settings_line, s.key, settings_col};
    const auto [owner, fresh] = key_owner.emplace(s.key, std::make_pair(slot, line));
    if (!fresh && owner->second.first != slot)
      refuse(name, settings_line, settings_col, "settings", item,
             "'" + s.key + "' is already graded by slot '" + owner->second.first + "' (line " +
                 std::to_string(owner->second.second) +
                 "); a key belongs to one slot, or two slots would decide it together");
    settings.push_back(std::move(s));
  }
  return settings;
}

}  // namespace

Catalogue parse_catalogue(const std::string& text, const std::string& name) {
  Catalogue cat;
  cat.file = name;
  const auto records = parse_csv_records(text, name);
  if (records.empty()) reject_at(name, 0, "no header row; expected the columns slot,grade,unit_cost,settings");

  // The header: known columns, each once, the required ones present.
  const auto& head = records.front();
  const int header_line = head.front().line;
  std::map<std::string, int*> known{{"slot", &cat.columns.slot},           {"grade", &cat.columns.grade},
                                    {"unit_cost", &cat.columns.unit_cost}, {"settings", &cat.columns.settings},
                                    {"notes", &cat.columns.notes},         {"setup_cost", &cat.columns.setup_cost}};
  const std::string accepted_columns = "the columns are slot, grade, unit_cost, settings (required) and notes, "
                                       "setup_cost (optional)";
  for (std::size_t c = 0; c < head.size(); ++c) {
    const int col = static_cast<int>(c + 1);
    const std::string h = lower_ascii(trim(head[c].text));
    const auto it = known.find(h);
    if (it == known.end()) refuse(name, header_line, col, "header", trim(head[c].text), "unknown column; " + accepted_columns);
    if (*it->second != 0)
      refuse(name, header_line, col, "header", h,
             "the column is already column " + std::to_string(*it->second) + "; each column appears once");
    *it->second = static_cast<int>(c + 1);
  }
  std::string header_text;
  for (const auto& h : head) header_text += (header_text.empty() ? "" : ",") + trim(h.text);
  for (const char* required : {"slot", "grade", "unit_cost", "settings"})
    if (*known.at(required) == 0)
      refuse(name, header_line, 0, "header", header_text,
             std::string("the required column '") + required + "' is missing; " + accepted_columns);

  std::map<std::string, std::pair<std::string, int>> key_owner;  // key -> (slot, line)
  for (std::size_t r = 1; r < records.size(); ++r) {
    const auto& rec = records[r];
    const int line = rec.front().line;
    if (rec.size() != head.size())
      reject_at(name, line, static_cast<int>(std::min(rec.size(), head.size()) + 1),
                "the row has " + std::to_string(rec.size()) + " fields and the header " + std::to_string(head.size()) +
                    "; every row has one field per column (an empty field is written as nothing between two commas)");
    auto field = [&](int column) { return column > 0 ? trim(rec[column - 1].text) : std::string(); };
    auto field_line = [&](int column) { return rec[column - 1].line; };

    const std::string slot = field(cat.columns.slot);
    if (slot.empty()) refuse(name, line, cat.columns.slot, "slot", "", "every row names its slot");
    GradeOption opt;
    opt.line = line;
    opt.grade = field(cat.columns.grade);
    if (opt.grade.empty()) refuse(name, line, cat.columns.grade, "grade", "", "every row names its grade");
    opt.unit_cost = read_cost(field(cat.columns.unit_cost), name, field_line(cat.columns.unit_cost),
                              cat.columns.unit_cost, "unit_cost");
    if (cat.columns.setup_cost > 0 && !field(cat.columns.setup_cost).empty())
      opt.setup_cost = read_cost(field(cat.columns.setup_cost), name, field_line(cat.columns.setup_cost),
                                 cat.columns.setup_cost, "setup_cost");
    opt.notes = field(cat.columns.notes);

    opt.settings = read_settings(rec[cat.columns.settings - 1].text, name, field_line(cat.columns.settings),
                                 cat.columns.settings, slot, line, key_owner);

    auto slot_it = std::find_if(cat.slots.begin(), cat.slots.end(), [&](const CatalogueSlot& s) { return s.name == slot; });
    if (slot_it == cat.slots.end()) {
      cat.slots.push_back(CatalogueSlot{slot, {}, line});
      slot_it = std::prev(cat.slots.end());
    }
    for (const auto& other : slot_it->options)
      if (other.grade == opt.grade)
        refuse(name, field_line(cat.columns.grade), cat.columns.grade, "grade", opt.grade,
               "slot '" + slot + "' already has this grade (line " + std::to_string(other.line) +
                   "); each grade of a slot is named once");
    slot_it->options.push_back(std::move(opt));
  }
  if (cat.slots.empty()) reject_at(name, 0, "the catalogue has a header but no options; add one row per grade");
  const std::size_t n = cat.combinations();
  if (n > max_grade_combinations)
    reject_at(name, 0, "the slots give " + (n == std::numeric_limits<std::size_t>::max() ? std::string("too many")
                                                                                          : std::to_string(n)) +
                           " combinations; at most " + std::to_string(max_grade_combinations) +
                           " are evaluated: split the catalogue or drop grades that cannot win");
  return cat;
}

Catalogue read_catalogue(const std::string& path) { return parse_catalogue(read_text_file(path), path); }

}  // namespace thermargin
