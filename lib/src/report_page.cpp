#include "report_page.hpp"

#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <filesystem>

#include "thermargin/error.hpp"
#include "thermargin/html_report.hpp"

namespace thermargin::report {

// A figure for a person: fixed decimals, a true minus sign, never "nan" or "-0.000".
std::string num(double v, int decimals) {
  if (!std::isfinite(v)) return "n/a";
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  std::string s = buf;
  if (s.front() == '-') {
    if (s.find_first_not_of("-0.") == std::string::npos) return s.substr(1);
    return "\u2212" + s.substr(1);
  }
  return s;
}

std::string pct(double fraction, int decimals) { return num(100.0 * fraction, decimals) + " %"; }

std::string kelvin(double v, int decimals) { return num(v, decimals) + " K"; }
std::string celsius(double v) { return num(v, 2) + " \u00b0C"; }

std::string bar(double fraction, int width) {
  const double eighths = std::clamp(fraction, 0.0, 1.0) * width * 8.0;
  const auto n = static_cast<long>(std::lround(eighths));
  static const char* const partial[] = {"", "\u258f", "\u258e", "\u258d", "\u258c", "\u258b", "\u258a", "\u2589"};
  std::string s;
  for (long i = 0; i < n / 8; ++i) s += "\u2588";
  s += partial[n % 8];
  return s;
}

void inputs(Page& doc, const Design& d, const Scenario& s) {
  doc.heading("Every resolved input");
  doc.paragraph(std::to_string(d.inputs.size()) +
                " toleranced inputs are active. Values as given (the built-in default where no file or option set "
                "one), with their unit and where they came from, as `thermargin check` prints them.");
  std::string section;
  Table t;
  auto flush = [&] {
    if (!t.rows.empty()) doc.table(t);
    t = Table{};
  };
  for (const auto& k : scenario_schema()) {
    const auto& v = s.get(k.key);
    if ((k.key.ends_with("_dist") || k.key.ends_with("_gap")) && v.where.kind == Origin::built_in) continue;
    const auto dot = k.key.find('.');
    const std::string sec = dot == std::string::npos ? "(top)" : k.key.substr(0, dot);
    if (sec != section || t.header.empty()) {
      flush();
      section = sec;
      t.caption = sec == "(top)" ? std::string("Top level") : "[" + sec + "]";
      t.header = {"Key", "Value", "Unit", "Origin"};
      t.numeric = {false, false, false, false};
    }
    t.rows.push_back({k.key, v.value.empty() ? "(none)" : v.value, std::string(unit_symbol(k.quantity)),
                      v.where.origin()});
  }
  flush();
}

std::string render_page(const std::string& title, const std::vector<Block>& blocks) {
  HtmlDocument doc(title);
  for (const auto& b : blocks) {
    switch (b.kind) {
      case Block::Kind::heading: doc.heading(b.text); break;
      case Block::Kind::paragraph: doc.paragraph(b.text); break;
      case Block::Kind::pass: doc.verdict(Verdict::pass, b.text); break;
      case Block::Kind::fail: doc.verdict(Verdict::fail, b.text); break;
      case Block::Kind::table:
        doc.table({.caption = b.caption, .header = b.header, .rows = b.rows, .numeric = b.numeric});
        break;
      case Block::Kind::chart: doc.chart(b.chart, b.text); break;
      case Block::Kind::caution: doc.caution(b.text); break;
      case Block::Kind::preformatted: doc.preformatted(b.text); break;
    }
  }
  return doc.str();
}

void write_file(const std::string& path, std::string_view contents) { write_file_atomically(path, contents); }

void write_files(const std::string& option, const std::string& dir, const std::vector<NamedText>& files,
                 bool created_dir) {
  namespace fs = std::filesystem;
  auto refuse = [&](const std::string& reason) {
    reject(Where{Origin::command_line, "", 0, option}, dir, reason);
  };
  std::vector<fs::path> staged;
  auto clean_up = [&] {
    std::error_code ec;
    for (const auto& s : staged) fs::remove(s, ec);
    if (created_dir) fs::remove(dir, ec);
  };
  // A target that is a directory (or otherwise cannot be replaced) is found
  // before anything is written, so the renames below do not fail half way.
  for (const auto& f : files) {
    const fs::path target = fs::path(dir) / f.name;
    struct stat st {};
    if (::lstat(target.c_str(), &st) == 0) {
      if (S_ISDIR(st.st_mode)) {
        clean_up();
        refuse("cannot write " + f.name + ": it is a directory");
      }
      if (S_ISREG(st.st_mode) && ::access(target.c_str(), W_OK) != 0) {
        clean_up();
        refuse("cannot write " + f.name + ": the file is read-only");
      }
    }
  }
  for (const auto& f : files) {
    const fs::path stage = fs::path(dir) / ("." + f.name + ".staged-" + std::to_string(::getpid()));
    try {
      write_file_atomically(stage.string(), f.text);
    } catch (const input_error& e) {
      clean_up();
      const std::string why = e.what();
      const std::string marker = "cannot write: ";
      const auto at = why.find(marker);
      refuse("cannot write " + f.name + (at == std::string::npos ? std::string() : ": " + why.substr(at + marker.size())));
    }
    staged.push_back(stage);
  }
  for (std::size_t i = 0; i < files.size(); ++i) {
    const fs::path target = fs::path(dir) / files[i].name;
    if (::rename(staged[i].c_str(), target.c_str()) != 0) {
      const int err = errno;
      // Earlier renames already put complete files in place; the rest of the
      // staged files are removed so that no stray file is left.
      std::error_code ec;
      for (std::size_t k = i; k < staged.size(); ++k) fs::remove(staged[k], ec);
      refuse("cannot write " + files[i].name + ": " + std::strerror(err));
    }
  }
}

}  // namespace thermargin::report
