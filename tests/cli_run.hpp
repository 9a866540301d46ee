// Running the thermargin program (or any command) from a test: its exit
// status, standard output and standard error (stdin is closed, so no prompt
// can wait).
#pragma once

#include <sys/wait.h>
#include <unistd.h>

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <functional>
#include <sstream>
#include <string>

#include <gtest/gtest.h>

namespace thermargin::testing {

struct CliOutcome {
  int status = -1;  // exit status; -1 when the program did not exit normally
  std::string out, err;
};

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
  std::ifstream err(err_file, std::ios::binary);
  std::ostringstream text;
  text << err.rdbuf();
  r.err = text.str();
  std::remove(err_file.c_str());
  return r;
}

// Runs `thermargin ARGS` (ARGS as a shell would split them).
inline CliOutcome run_cli(const std::string& args) { return run_shell(std::string("'") + THERMARGIN_CLI + "' " + args); }

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
    std::string tmpl = (std::filesystem::temp_directory_path() / "thermargin-cli-XXXXXX").string();
    path = ::mkdtemp(tmpl.data());
  }
  ~ScratchDir() {
    std::error_code ec;
    std::filesystem::remove_all(path, ec);
  }
  ScratchDir(const ScratchDir&) = delete;
  ScratchDir& operator=(const ScratchDir&) = delete;
  std::size_t entries() const {
    std::size_t n = 0;
    for ([[maybe_unused]] const auto& e : std::filesystem::directory_iterator(path)) ++n;
    return n;
  }
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

// The refusals of a report's destination, for any command with --report and
// --plots (ARGS: the command and its other arguments). Each is refused when
// the options are read: exit status 2, nothing on stdout, exactly the one
// line `message` (given the path tried) on stderr, and nothing written.
inline void expect_report_refused(const std::string& args, const std::string& option,
                                  const std::function<std::filesystem::path(const ScratchDir&)>& prepare,
                                  const std::function<std::string(const std::filesystem::path&)>& message,
                                  bool as_unprivileged = false) {
  ScratchDir dir;
  const std::filesystem::path target = prepare(dir);
  const std::size_t before = dir.entries();
  const std::string old = std::filesystem::is_regular_file(target) ? slurp(target) : std::string();
  std::string command = std::string("'") + THERMARGIN_CLI + "' " + args + " " + option + " " + shell_quote(target.string());
  if (as_unprivileged) command = unprivileged(command, dir.path);
  const CliOutcome r = run_shell(command);
  EXPECT_EQ(r.status, 2) << r.err;
  EXPECT_EQ(r.out, "");
  EXPECT_EQ(r.err, "thermargin: " + message(target) + "\n");
  EXPECT_EQ(dir.entries(), before);
  if (std::filesystem::is_regular_file(target)) EXPECT_EQ(slurp(target), old);
}

// --report into a directory that does not exist.
inline void expect_report_into_missing_directory_refused(const std::string& args) {
  expect_report_refused(
      args, "--report", [](const ScratchDir& d) { return d.path / "missing" / "review.html"; },
      [](const std::filesystem::path& t) {
        return "--report = " + t.string() + " (command line): directory " + t.parent_path().string() +
               " does not exist; give a file in an existing directory";
      });
}

// --report onto a file that is read-only (run unprivileged: root writes through the mode).
inline void expect_read_only_report_refused(const std::string& args) {
  expect_report_refused(
      args, "--report",
      [](const ScratchDir& d) {
        const auto t = d.path / "review.html";
        std::ofstream(t) << "old";
        std::filesystem::permissions(t, std::filesystem::perms(0444));
        return t;
      },
      [](const std::filesystem::path& t) { return "--report = " + t.string() + " (command line): the file is read-only"; },
      true);
}

// --plots under a directory that does not exist (only one level is created).
inline void expect_plots_under_missing_directory_refused(const std::string& args) {
  expect_report_refused(
      args, "--plots", [](const ScratchDir& d) { return d.path / "a" / "b"; },
      [](const std::filesystem::path& t) {
        return "--plots = " + t.string() + " (command line): directory " + t.parent_path().string() +
               " does not exist; the plots directory is created only inside an existing one";
      });
}

// --plots onto an existing file.
inline void expect_plots_onto_a_file_refused(const std::string& args) {
  expect_report_refused(
      args, "--plots",
      [](const ScratchDir& d) {
        const auto t = d.path / "slides";
        std::ofstream(t) << "old";
        return t;
      },
      [](const std::filesystem::path& t) { return "--plots = " + t.string() + " (command line): is a file, not a directory"; });
}

// All four of the above.
inline void expect_unwritable_report_destinations_refused(const std::string& args) {
  {
    SCOPED_TRACE("--report into a missing directory");
    expect_report_into_missing_directory_refused(args);
  }
  {
    SCOPED_TRACE("--report onto a read-only file");
    expect_read_only_report_refused(args);
  }
  {
    SCOPED_TRACE("--plots under a missing directory");
    expect_plots_under_missing_directory_refused(args);
  }
  {
    SCOPED_TRACE("--plots onto a file");
    expect_plots_onto_a_file_refused(args);
  }
}

}  // namespace thermargin::testing
