// core/parallel.hpp, engines/window.hpp and report/table.hpp: the pieces
// every engine and writer shares. Facts of the job, not of a standard:
// each index is run once whatever the threads (common practice for a work
// queue), a failure is reported and not lost, the largest |error| over a
// window is the largest of |low| and |high| at the window's temperatures.
#include <gtest/gtest.h>

#include <atomic>
#include <cmath>
#include <stdexcept>
#include <vector>

#include "thermargin/core/number.hpp"
#include "thermargin/core/parallel.hpp"
#include "thermargin/engines/window.hpp"
#include "thermargin/report/table.hpp"

namespace thermargin {
namespace {

TEST(Parallel, ZeroThreadsMeansEveryCoreAndAGivenCountIsKept) {
  EXPECT_GE(resolve_threads(0), 1);
  EXPECT_EQ(resolve_threads(3), 3);
}

TEST(Parallel, EveryIndexRunsExactlyOnceWhateverTheThreads) {
  for (int threads : {1, 2, 4, 7}) {
    std::vector<std::atomic<int>> seen(101);
    parallel_for(seen.size(), threads, [&](std::size_t i) { seen[i].fetch_add(1); });
    for (std::size_t i = 0; i < seen.size(); ++i) EXPECT_EQ(seen[i].load(), 1) << "threads " << threads << " index " << i;
  }
}

TEST(Parallel, AFailureIsRethrownAfterTheOtherIndicesRan) {
  for (int threads : {1, 3}) {
    std::atomic<int> ran{0};
    EXPECT_THROW(parallel_for(20, threads,
                              [&](std::size_t i) {
                                ran.fetch_add(1);
                                if (i == 5) throw std::runtime_error("five");
                              }),
                 std::runtime_error);
    if (threads > 1) EXPECT_EQ(ran.load(), 20);
  }
  EXPECT_THROW(run_workers(3, [](int w) { if (w == 2) throw std::logic_error("worker 2"); }), std::logic_error);
}

TEST(WindowMax, LargestBandEndInsideTheWindowOnly) {
  Requirement q;
  q.window_min = 0.0;
  q.window_max = 10.0;
  std::vector<WorstCasePoint> wc(3);
  wc[0].t = -5.0, wc[0].low = -9.0, wc[0].high = 9.0, wc[0].any_ok = true;  // outside: ignored
  wc[1].t = 0.0, wc[1].low = -0.3, wc[1].high = 0.2, wc[1].any_ok = true;
  wc[2].t = 10.0, wc[2].low = -0.1, wc[2].high = 0.25, wc[2].any_ok = true;
  const WindowMax m = window_max(wc, q);
  EXPECT_TRUE(m.any);
  EXPECT_TRUE(m.readable);
  EXPECT_DOUBLE_EQ(m.max_abs, 0.3);
  EXPECT_DOUBLE_EQ(m.at, 0.0);

  wc[2].failed_corners = 2;
  wc[2].failure = Status::saturated;
  const WindowMax f = window_max(wc, q);
  EXPECT_FALSE(f.readable);
  EXPECT_EQ(f.failure, Status::saturated);
  EXPECT_DOUBLE_EQ(f.failure_at, 10.0);

  std::vector<LinearPoint> lin(1);
  lin[0].t = 5.0;
  lin[0].status = Status::runaway;
  const WindowMax l = window_max(lin, q);
  EXPECT_FALSE(l.any);
  EXPECT_TRUE(std::isnan(l.at));
  EXPECT_EQ(l.failure, Status::runaway);
}

TEST(TableModel, TextAlignsNumbersRightAndCsvDefusesFormulas) {
  Table t{.header = {"source", "share (%)"}};
  t.rows.push_back({"R fixed", "41.2"});
  t.rows.push_back({"=cmd", "7.5"});
  EXPECT_EQ(render_text(t),
            "source   share (%)\n"
            "------------------\n"
            "R fixed       41.2\n"
            "=cmd           7.5\n");
  // OWASP "CSV Injection": a cell that would start a formula gets an apostrophe.
  EXPECT_EQ(render_csv(t), "source,share (%)\nR fixed,41.2\n'=cmd,7.5\n");
}

TEST(NumberFormat, FixedNeverPrintsNegativeZeroOrNan) {
  EXPECT_EQ(fixed(-0.0001, 3), "0.000");
  EXPECT_EQ(fixed(-1.25, 1), "-1.2");  // printf rounds the binary value 1.25 to even: common practice
  EXPECT_EQ(fixed(std::nan(""), 2), "n/a");
  EXPECT_EQ(significant(4700.0), "4700");
  EXPECT_EQ(significant(1e-7, 3), "1e-07");
}

}  // namespace
}  // namespace thermargin
