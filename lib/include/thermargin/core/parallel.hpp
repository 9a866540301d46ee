// The threads of every engine: one rule for how many ("0 = every core") and
// one pool that runs work on them. Results never depend on the thread count:
// each engine gives a worker its own accumulator or its own output slot and
// merges in a fixed order.
#pragma once

#include <algorithm>
#include <atomic>
#include <cstddef>
#include <exception>
#include <mutex>
#include <thread>
#include <utility>
#include <vector>

namespace thermargin {

// The threads to use: `requested` when > 0, every core the machine reports
// (at least 1) when 0 (montecarlo.threads = 0, docs/engines.md).
inline int resolve_threads(int requested) {
  return requested > 0 ? requested : static_cast<int>(std::max(1u, std::thread::hardware_concurrency()));
}

// Runs work(w) for w = 0 .. workers-1, worker 0 on the calling thread after
// `meanwhile()` has returned (a progress loop that waits for the others, or
// nothing). Returns when all have finished; rethrows the first exception a
// worker threw (by worker index), after every worker has stopped.
template <class Work, class Meanwhile>
void run_workers(int workers, Work&& work, Meanwhile&& meanwhile) {
  const auto n = static_cast<std::size_t>(std::max(workers, 1));
  std::vector<std::exception_ptr> errors(n);
  auto guarded = [&](std::size_t w) {
    try {
      work(static_cast<int>(w));
    } catch (...) {
      errors[w] = std::current_exception();
    }
  };
  std::vector<std::thread> pool;
  pool.reserve(n - 1);
  for (std::size_t w = 1; w < n; ++w) pool.emplace_back(guarded, w);
  meanwhile();
  guarded(0);
  for (auto& t : pool) t.join();
  for (const auto& e : errors)
    if (e) std::rethrow_exception(e);
}

template <class Work>
void run_workers(int workers, Work&& work) {
  run_workers(workers, std::forward<Work>(work), [] {});
}

// Runs f(i) for every i in [0, n) on up to `threads` threads (never more
// than n), handing out indices one at a time; with one thread, in order on
// the calling thread. Every index is run even when one throws; then the
// first exception caught is rethrown.
template <class F>
void parallel_for(std::size_t n, int threads, F&& f) {
  const std::size_t workers = std::min<std::size_t>(n, static_cast<std::size_t>(std::max(threads, 1)));
  if (workers <= 1) {
    for (std::size_t i = 0; i < n; ++i) f(i);
    return;
  }
  std::atomic<std::size_t> next{0};
  std::exception_ptr error;
  std::mutex error_mutex;
  run_workers(static_cast<int>(workers), [&](int) {
    for (std::size_t i; (i = next.fetch_add(1)) < n;) {
      try {
        f(i);
      } catch (...) {
        const std::lock_guard<std::mutex> lock(error_mutex);
        if (!error) error = std::current_exception();
      }
    }
  });
  if (error) std::rethrow_exception(error);
}

}  // namespace thermargin
