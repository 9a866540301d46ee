// Progress of a long run, in one form for every command: what is being
// done, the share done, the time left and, where the run has one, the best
// result so far — one line on stderr, rewritten in place, and only when
// stderr is a terminal (a pipe or a file gets nothing) and --quiet is not
// given. Engines report through a plain callback (fraction done, an
// optional note); this class turns the calls into the line.
#pragma once

#include <chrono>
#include <cstdio>
#include <functional>
#include <mutex>
#include <string>
#include <string_view>

namespace thermargin {

// What an engine calls: the fraction done (0..1) and an optional note
// (grades: the best combination so far). May be called from worker
// threads; ProgressLine serialises.
using ProgressCallback = std::function<void(double fraction_done, std::string_view note)>;

class ProgressLine {
 public:
  // Writes nothing unless `enabled` (see wanted()).
  ProgressLine(std::string task, bool enabled, std::FILE* out = stderr);
  ~ProgressLine();  // clears the line
  ProgressLine(const ProgressLine&) = delete;
  ProgressLine& operator=(const ProgressLine&) = delete;

  // A new state; drawn at most every 100 ms, and always at 100 %.
  void update(double fraction_done, std::string_view note = {});
  // The callback an engine takes (empty when disabled, so that engines skip
  // the bookkeeping).
  ProgressCallback callback();
  // A fraction-only callback for the engines that report no note.
  std::function<void(double)> fraction_callback();

  // True when progress should be shown: stderr is a terminal and the user
  // did not ask for quiet.
  static bool wanted(bool quiet);
  // The line itself (at most `width` characters): "grades: 42 % done,
  // about 12 s left; best so far: ...". No time estimate before 2 % or 0.5 s
  // (it would be noise).
  static std::string format(std::string_view task, double fraction_done, double elapsed_s, std::string_view note,
                            std::size_t width = 100);

 private:
  std::string task_;
  bool enabled_;
  std::FILE* out_;
  std::chrono::steady_clock::time_point start_, last_;
  std::size_t drawn_ = 0;
  std::mutex mutex_;
};

}  // namespace thermargin
