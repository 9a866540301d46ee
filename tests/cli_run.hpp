// Running the thermargin program (or any command) from a test: its exit
// status, standard output and standard error (stdin is closed, so no prompt
// can wait); scratch directories and the files in them.
#pragma once

#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <functional>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "source_tree.hpp"

namespace thermargin::testing {

struct CliOutcome {
  int status = -1;  // exit status; -1 when the program did not exit normally
  std::string out, err;
};

inline std::string shell_quote(const std::string& s) {
  std::string q = "'";
  for (char c : s) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return q + "'";
}

inline std::string slurp(const std::filesystem::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

// Runs a shell command line (as /bin/sh reads it).
inline CliOutcome run_shell(const std::string& command) {
  static int calls = 0;
  const std::string err_file = ::testing::TempDir() + "thermargin_cli_stderr_" + std::to_string(::getpid()) + "_" +
                               std::to_string(++calls);
  const std::string cmd = command + " 2>'" + err_file + "' </dev/null";
  CliOutcome r;
  FILE* pipe = popen(cmd.c_str(), "r");
  if (!pipe) return r;
  char buf[65536];
  std::size_t n;
  while ((n = std::fread(buf, 1, sizeof buf, pipe)) > 0) r.out.append(buf, n);
  const int rc = pclose(pipe);
  r.status = WIFEXITED(rc) ? WEXITSTATUS(rc) : -1;
  r.err = slurp(err_file);
  std::remove(err_file.c_str());
  return r;
}

// The standard output of a shell command, followed by "(exit N)" (N the
// wait status) when it does not exit with 0.
inline std::string output_of(const std::string& command) {
  std::string out;
  FILE* p = ::popen(command.c_str(), "r");
  if (!p) return "(popen failed)";
  char buf[4096];
  while (std::size_t n = std::fread(buf, 1, sizeof buf, p)) out.append(buf, n);
  const int status = ::pclose(p);
  if (status != 0) out += "(exit " + std::to_string(status) + ")";
  return out;
}

// The shell command line of `thermargin ARGS`.
inline std::string cli_command(const std::string& args) { return std::string("'") + THERMARGIN_CLI + "' " + args; }

// Runs `thermargin ARGS` (ARGS as a shell would split them).
inline CliOutcome run_cli(const std::string& args) { return run_shell(cli_command(args)); }

// What `thermargin ARGS` prints on stdout and stderr together, as output_of:
// empty for a run that exits 0 and says nothing.
inline std::string cli_output(const std::string& args) { return output_of(cli_command(args) + " 2>&1"); }

// `thermargin ARGS --format json`, its output parsed; throws with its stderr when it fails.
inline nlohmann::json cli_json(const std::string& args) {
  const CliOutcome r = run_cli(args + " --format json");
  if (r.status != 0) throw std::runtime_error("thermargin " + args + " failed: " + r.err);
  return nlohmann::json::parse(r.out);
}

// A CSV the program wrote, as a reader that skips `#` comment lines sees it:
// every line that starts with '#' (the caution, report/table.hpp
// csv_caution_line) left out, so that the header comes first.
inline std::string csv_without_comments(const std::string& text) {
  std::istringstream in(text);
  std::string kept;
  for (std::string line; std::getline(in, line);)
    if (!line.starts_with('#')) kept += line + "\n";
  return kept;
}

// The shell command line that runs tests/reference/SCRIPT ARGS with Debian's python3.
inline std::string reference_command(const std::string& script, const std::string& args) {
  return std::string(THERMARGIN_PYTHON) + " " + shell_quote(reference_script(script)) + " " + args;
}

// What tests/reference/SCRIPT ARGS prints on stdout and stderr together
// (a reader's "ok: ..." or its complaint), as output_of.
inline std::string reference_output(const std::string& script, const std::string& args) {
  return output_of(reference_command(script, args) + " 2>&1");
}

// `command` run as an unprivileged user when the tests run as root, since
// root writes through a file's read-only mode; `dir` is opened up for them.
inline std::string unprivileged(const std::string& command, const std::filesystem::path& dir) {
  if (::geteuid() != 0) return command;
  std::filesystem::permissions(dir, std::filesystem::perms::all);
  return "setpriv --reuid=65534 --regid=65534 --clear-groups " + command;
}

// A fresh directory under the system's temporary directory, removed with
// everything in it.
struct ScratchDir {
  std::filesystem::path path;
  ScratchDir() {
    std::string tmpl = (std::filesystem::temp_directory_path() / "thermargin-test-XXXXXX").string();
    path = ::mkdtemp(tmpl.data());
  }
  ~ScratchDir() {
    std::error_code ec;
    std::filesystem::permissions(path, std::filesystem::perms::owner_all, std::filesystem::perm_options::add, ec);
    std::filesystem::remove_all(path, ec);
  }
  ScratchDir(const ScratchDir&) = delete;
  ScratchDir& operator=(const ScratchDir&) = delete;
  // The names in the directory (or in `sub` below it), sorted.
  std::vector<std::string> names(const std::filesystem::path& sub = {}) const {
    std::vector<std::string> v;
    for (const auto& e : std::filesystem::directory_iterator(path / sub)) v.push_back(e.path().filename().string());
    std::sort(v.begin(), v.end());
    return v;
  }
  std::size_t entries() const { return names().size(); }
  // Writes `text` to the file `name` in the directory; returns its path.
  std::string write(const std::string& name, const std::string& text) const {
    std::ofstream(path / name, std::ios::binary) << text;
    return (path / name).string();
  }
};

// A destination of --report or --plots that cannot be written: `prepare`
// makes it in a scratch directory and returns the path to give; `message`
// is the one line expected for that path.
struct UnwritableDestination {
  const char* what;
  const char* option;
  std::function<std::filesystem::path(const ScratchDir&)> prepare;
  std::function<std::string(const std::filesystem::path&)> message;
  bool as_unprivileged = false;  // root writes through a file's read-only mode
};

inline std::vector<UnwritableDestination> unwritable_destinations() {
  namespace fs = std::filesystem;
  return {
      {"--report into a missing directory", "--report",
       [](const ScratchDir& d) { return d.path / "missing" / "review.html"; },
       [](const fs::path& t) {
         return "--report = " + t.string() + " (command line): directory " + t.parent_path().string() +
                " does not exist; give a file in an existing directory";
       }},
      {"--report onto a read-only file", "--report",
       [](const ScratchDir& d) {
         const auto t = d.path / "review.html";
         std::ofstream(t) << "old";
         fs::permissions(t, fs::perms(0444));
         return t;
       },
       [](const fs::path& t) { return "--report = " + t.string() + " (command line): the file is read-only"; }, true},
      // Only one level of the plots directory is created.
      {"--plots under a missing directory", "--plots", [](const ScratchDir& d) { return d.path / "a" / "b"; },
       [](const fs::path& t) {
         return "--plots = " + t.string() + " (command line): directory " + t.parent_path().string() +
                " does not exist; the plots directory is created only inside an existing one";
       }},
      {"--plots onto a file", "--plots",
       [](const ScratchDir& d) {
         const auto t = d.path / "slides";
         std::ofstream(t) << "old";
         return t;
       },
       [](const fs::path& t) { return "--plots = " + t.string() + " (command line): is a file, not a directory"; }},
  };
}

// The refusals of a report's destination, for any command with --report and
// --plots (ARGS: the command and its other arguments). Each is refused when
// the options are read: exit status 2, nothing on stdout, exactly the one
// line `message` (given the path tried) on stderr, and nothing written.
inline void expect_unwritable_report_destinations_refused(const std::string& args) {
  for (const UnwritableDestination& c : unwritable_destinations()) {
    SCOPED_TRACE(c.what);
    ScratchDir dir;
    const std::filesystem::path target = c.prepare(dir);
    const std::size_t before = dir.entries();
    const std::string old = std::filesystem::is_regular_file(target) ? slurp(target) : std::string();
    std::string command = cli_command(args + " " + c.option + " " + shell_quote(target.string()));
    if (c.as_unprivileged) command = unprivileged(command, dir.path);
    const CliOutcome r = run_shell(command);
    EXPECT_EQ(r.status, 2) << r.err;
    EXPECT_EQ(r.out, "");
    EXPECT_EQ(r.err, "thermargin: " + c.message(target) + "\n");
    EXPECT_EQ(dir.entries(), before);
    if (std::filesystem::is_regular_file(target)) EXPECT_EQ(slurp(target), old);
  }
}

// A case of bad input for a command: its name, the arguments, and what the
// one line of the refusal must hold.
struct RefusalCase {
  std::string name;
  std::string args;
  std::string message;
};
inline void PrintTo(const RefusalCase& c, std::ostream* os) { *os << c.name; }

// A refusal of bad input: exit status 2, exactly one line on stderr that
// holds `message`, and nothing in `dir` (the output's directory): no output
// and no temporary file.
inline void expect_refused_in_one_line(const CliOutcome& r, const std::string& message, const std::filesystem::path& dir) {
  EXPECT_EQ(r.status, 2) << r.err;
  EXPECT_NE(r.err.find(message), std::string::npos) << r.err;
  EXPECT_EQ(std::count(r.err.begin(), r.err.end(), '\n'), 1) << r.err;
  EXPECT_TRUE(std::filesystem::is_empty(dir)) << "no output and no temporary file";
}

// The numbers (whitespace-separated) that a shell command prints; the
// command must exit with 0.
template <class T = double>
std::vector<T> numbers_printed_by(const std::string& command) {
  const CliOutcome r = run_shell(command);
  EXPECT_EQ(r.status, 0) << command << "\n" << r.err;
  std::vector<T> values;
  std::istringstream in(r.out);
  for (T v; in >> v;) values.push_back(v);
  return values;
}

}  // namespace thermargin::testing
