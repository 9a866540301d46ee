#include "thermargin/core/progress.hpp"

#include <algorithm>
#include <cmath>
#include <unistd.h>

namespace thermargin {

ProgressLine::ProgressLine(std::string task, bool enabled, std::FILE* out)
    : task_(std::move(task)), enabled_(enabled), out_(out), start_(std::chrono::steady_clock::now()), last_() {}

ProgressLine::~ProgressLine() {
  if (!enabled_ || drawn_ == 0) return;
  std::fprintf(out_, "\r%*s\r", static_cast<int>(drawn_), "");
  std::fflush(out_);
}

bool ProgressLine::wanted(bool quiet) { return !quiet && ::isatty(STDERR_FILENO) == 1; }

std::string ProgressLine::format(std::string_view task, double fraction_done, double elapsed_s, std::string_view note,
                                 std::size_t width) {
  const double f = std::clamp(fraction_done, 0.0, 1.0);
  char head[64];
  std::snprintf(head, sizeof head, ": %3.0f %% done", 100.0 * f);
  std::string line = std::string(task) + head;
  if (f >= 0.02 && f < 1.0 && elapsed_s >= 0.5) {
    const double left = elapsed_s * (1.0 - f) / f;
    char eta[48];
    if (left < 90.0)
      std::snprintf(eta, sizeof eta, ", about %.0f s left", std::max(1.0, std::round(left)));
    else
      std::snprintf(eta, sizeof eta, ", about %.0f min left", std::round(left / 60.0));
    line += eta;
  }
  if (!note.empty()) line += "; " + std::string(note);
  if (line.size() > width) line = line.substr(0, width - 3) + "...";
  return line;
}

void ProgressLine::update(double fraction_done, std::string_view note) {
  if (!enabled_) return;
  const std::lock_guard<std::mutex> lock(mutex_);
  const auto now = std::chrono::steady_clock::now();
  if (fraction_done < 1.0 && drawn_ > 0 && now - last_ < std::chrono::milliseconds(100)) return;
  last_ = now;
  const double elapsed = std::chrono::duration<double>(now - start_).count();
  const std::string line = format(task_, fraction_done, elapsed, note);
  // Pad over a longer previous line, then return to the line's start.
  std::fprintf(out_, "\r%s%*s", line.c_str(), static_cast<int>(drawn_ > line.size() ? drawn_ - line.size() : 0), "");
  std::fflush(out_);
  drawn_ = std::max(drawn_, line.size());
}

ProgressCallback ProgressLine::callback() {
  if (!enabled_) return {};
  return [this](double f, std::string_view note) { update(f, note); };
}

std::function<void(double)> ProgressLine::fraction_callback() {
  if (!enabled_) return {};
  return [this](double f) { update(f); };
}

}  // namespace thermargin
