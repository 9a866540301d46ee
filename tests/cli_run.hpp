// Running the thermargin program from a test: its exit status, standard
// output and standard error (stdin is closed, so no prompt can wait).
#pragma once

#include <sys/wait.h>
#include <unistd.h>

#include <cstdio>
#include <fstream>
#include <sstream>
#include <string>

#include <gtest/gtest.h>

namespace thermargin::testing {

struct CliOutcome {
  int status = -1;  // exit status; -1 when the program did not exit normally
  std::string out, err;
};

// Runs `thermargin ARGS` (ARGS as a shell would split them).
inline CliOutcome run_cli(const std::string& args) {
  static int calls = 0;
  const std::string err_file = ::testing::TempDir() + "thermargin_cli_stderr_" + std::to_string(::getpid()) + "_" +
                               std::to_string(++calls);
  const std::string cmd = std::string("'") + THERMARGIN_CLI + "' " + args + " 2>'" + err_file + "' </dev/null";
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

}  // namespace thermargin::testing
