#include "report_page.hpp"

#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <filesystem>

#include "thermargin/error.hpp"
#include "thermargin/html_report.hpp"

namespace thermargin::report {

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
