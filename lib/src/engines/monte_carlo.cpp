// The Monte Carlo engine (docs/engines.md): the pilot, the blocks of units
// on threads, the adaptive run length (JCGM 101 §7.9) and the summary. The
// kernel that reads a block is monte_carlo_kernel.cpp and
// monte_carlo_reading.cpp; the statistics monte_carlo_statistics.cpp.
#include "thermargin/engines/monte_carlo.hpp"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <limits>
#include <memory>
#include <thread>

#include "monte_carlo_kernel.hpp"
#include "monte_carlo_statistics.hpp"
#include "thermargin/core/parallel.hpp"

namespace thermargin {

namespace {

using namespace mc_detail;

// The pilot's blocks, read once and kept for the run: each block's errors
// and statuses at every temperature. The run's first blocks are the pilot's
// (the same first unit and count), and a block's readings depend only on its
// units, the temperatures and the run's constants (draw_block starts every
// block afresh), so the run accumulates these instead of reading the block
// again: the same values, in the same order. Kept only up to
// max_kept_readings (units × temperatures), else the run reads them again.
struct PilotBlocks {
  static constexpr std::uint64_t max_kept_readings = std::uint64_t{1} << 22;  // 36 MB
  std::size_t nt = 0;
  std::vector<std::uint64_t> first;
  std::vector<int> count;
  std::vector<double> err;            // [block][temperature][unit of the block]
  std::vector<std::uint8_t> status;   // the same layout
  std::size_t at(std::size_t k, std::size_t ti) const { return (k * nt + ti) * block_size; }
  // The kept block that is units [f, f + n), or none.
  const PilotBlocks* find(std::uint64_t f, int n, std::size_t& k) const {
    if (f % block_size != 0) return nullptr;
    k = static_cast<std::size_t>(f / block_size);
    return k < first.size() && first[k] == f && count[k] == n ? this : nullptr;
  }
};

struct Job {
  const RunConstants* c;
  const std::vector<double>* temps;
  const std::vector<Range>* ranges;
  std::vector<std::uint8_t> in_window;
  double limit;
  const PilotBlocks* pilot = nullptr;
};

// One temperature of a block, prepared for the histogram in a loop that
// vectorises: each unit's clamped error and its square for the sums (0 for
// a reading without a value, which adds nothing), its bin and where it
// falls; the counts.
struct BlockBins {
  alignas(64) double clamped[block_size];
  alignas(64) double squared[block_size];
  alignas(64) std::int32_t bin[block_size];
  alignas(64) std::int32_t place[block_size];  // 0 in the histogram, 1 below it, 2 above it, 3 no value
  int valid = 0, saturated = 0, failed = 0;
};

void bin_block(const double* __restrict err, const std::uint8_t* __restrict status, int count, const Range& r,
               BlockBins& out) {
  const double inv_width = histogram_bins / r.width, lo = r.lo;
  constexpr auto saturated_status = static_cast<std::uint8_t>(Status::saturated);
  int valid = 0, saturated = 0;
  for (int u = 0; u < count; ++u) {
    const std::uint8_t st = status[u];
    const bool ok = st == 0;
    const double e = ok ? err[u] : 0.0;
    const double clamped = std::min(std::max(e, -sum_clamp), sum_clamp);  // std::clamp's value, branch-free
    out.clamped[u] = clamped;
    out.squared[u] = clamped * clamped;
    const double pos = (e - lo) * inv_width;
    const bool below = pos < 0.0, above = pos >= histogram_bins;
    out.bin[u] = static_cast<std::int32_t>((below | above) ? 0.0 : pos);
    out.place[u] = ok ? static_cast<std::int32_t>(below) + 2 * static_cast<std::int32_t>(above) : 3;
    valid += ok;
    saturated += st == saturated_status;
  }
  out.valid = valid;
  out.saturated = saturated;
  out.failed = count - valid - saturated;
}

// At a temperature in the window: each unit's worst |error| so far, and
// whether a reading without a value failed it. A loop of its own, so that
// both loops vectorise.
void track_window(const double* __restrict err, const std::uint8_t* __restrict status, int count,
                  double* __restrict worst, std::uint8_t* __restrict bad) {
  for (int u = 0; u < count; ++u) {
    const bool ok = status[u] == 0;
    const double w = worst[u];
    bad[u] = static_cast<std::uint8_t>(bad[u] | !ok);
    worst[u] = ok ? std::max(w, std::fabs(err[u])) : w;
  }
}

void run_block(const Job& job, std::uint64_t first, int count, Accumulator& acc, BlockUnits& b) {
  const RunConstants& c = *job.c;
  std::size_t k = 0;
  const PilotBlocks* kept = job.pilot ? job.pilot->find(first, count, k) : nullptr;
  if (!kept) {
    draw_block(c, b, first, count);
    if (c.cal_points > 0) calibrate_block(c, b);
  }
  alignas(64) double read_err[block_size];
  alignas(64) double worst[block_size];
  alignas(64) std::uint8_t read_status[block_size];
  alignas(64) std::uint8_t bad[block_size];
  BlockBins bins;
  std::fill(std::begin(worst), std::end(worst), 0.0);
  std::fill(std::begin(bad), std::end(bad), std::uint8_t{0});
  const auto& temps = *job.temps;
  for (std::size_t ti = 0; ti < temps.size(); ++ti) {
    const double* err = read_err;
    const std::uint8_t* status = read_status;
    if (kept) {
      err = &kept->err[kept->at(k, ti)];
      status = &kept->status[kept->at(k, ti)];
    } else {
      errors_block(c, b, temps[ti], static_cast<std::uint32_t>(ti), read_err, read_status);
    }
    bin_block(err, status, count, (*job.ranges)[ti], bins);
    if (job.in_window[ti] != 0) track_window(err, status, count, worst, bad);
    std::uint32_t* h = &acc.hist[ti * histogram_bins];
    // Sums in double within the block (its order is fixed), then added to
    // the fixed-point totals: the totals do not depend on which thread ran
    // which block.
    double s1 = 0.0, s2 = 0.0;
    for (int u = 0; u < count; ++u) {
      s1 += bins.clamped[u];
      s2 += bins.squared[u];
      h[bins.bin[u]] += bins.place[u] == 0;
      if (bins.place[u] == 1) acc.below[ti].push_back(err[u]);
      else if (bins.place[u] == 2) acc.above[ti].push_back(err[u]);
    }
    acc.valid[ti] += static_cast<std::uint64_t>(bins.valid);
    acc.saturated[ti] += static_cast<std::uint64_t>(bins.saturated);
    acc.failed[ti] += static_cast<std::uint64_t>(bins.failed);
    acc.sum[ti] += static_cast<long long>(std::floor(s1 * fixed_point_scale + 0.5));
    acc.sumsq[ti] += static_cast<long long>(std::floor(s2 * fixed_point_scale + 0.5));
  }
  for (int u = 0; u < count; ++u) acc.good_units += !bad[u] && worst[u] <= job.limit;
  acc.units += static_cast<std::uint64_t>(count);
}

// Runs units [first, first + n) on `threads` threads into one accumulator.
Accumulator run_units(const Job& job, std::uint64_t first, std::uint64_t n, int threads, const McProgress& progress,
                      std::uint64_t progress_base, std::uint64_t progress_total) {
  const std::uint64_t blocks = (n + block_size - 1) / block_size;
  std::atomic<std::uint64_t> next{0}, done{0};
  const std::size_t nt = job.temps->size();
  std::vector<Accumulator> accs;
  const int workers = static_cast<int>(std::min<std::uint64_t>(static_cast<std::uint64_t>(std::max(threads, 1)), std::max<std::uint64_t>(blocks, 1)));
  accs.reserve(static_cast<std::size_t>(workers));
  for (int w = 0; w < workers; ++w) accs.emplace_back(nt);
  auto work = [&](int w) {
    auto block = std::make_unique<BlockUnits>();
    for (;;) {
      const std::uint64_t k = next.fetch_add(1);
      if (k >= blocks) break;
      const std::uint64_t start = first + k * block_size;
      const int count = static_cast<int>(std::min<std::uint64_t>(block_size, first + n - start));
      run_block(job, start, count, accs[static_cast<std::size_t>(w)], *block);
      const std::uint64_t finished = done.fetch_add(1) + 1;
      // One worker has no printer thread beside it: it reports between blocks.
      if (progress && workers <= 1)
        progress(static_cast<double>(progress_base + finished * block_size) / static_cast<double>(progress_total));
    }
  };
  run_workers(workers, work, [&] {
    if (!progress || workers <= 1) return;
    while (done.load() < blocks) {
      std::this_thread::sleep_for(std::chrono::milliseconds(100));
      progress(static_cast<double>(progress_base + done.load() * block_size) / static_cast<double>(progress_total));
    }
  });
  // Integer counts and appended tails: one worker's accumulator is the total.
  if (accs.size() == 1) return std::move(accs.front());
  Accumulator total(nt);
  for (const auto& a : accs) total.merge(a);
  return total;
}

// The pilot: the first n units fix each temperature's histogram range. Its
// blocks are read on `threads` threads (the smallest and largest value are
// exact whatever the split) and kept in `kept` when they fit.
std::vector<Range> pilot_ranges(const RunConstants& c, const std::vector<double>& temperatures, std::uint64_t n,
                                int threads, PilotBlocks& kept) {
  const std::size_t nt = temperatures.size();
  const std::size_t blocks = static_cast<std::size_t>((n + block_size - 1) / block_size);
  const bool keep = n * nt <= PilotBlocks::max_kept_readings;
  if (keep) {
    kept.nt = nt;
    kept.err.resize(blocks * nt * block_size);
    kept.status.resize(blocks * nt * block_size);
    for (std::size_t k = 0; k < blocks; ++k) {
      kept.first.push_back(k * block_size);
      kept.count.push_back(static_cast<int>(std::min<std::uint64_t>(block_size, n - k * block_size)));
    }
  }
  const int workers = static_cast<int>(std::min<std::size_t>(static_cast<std::size_t>(std::max(threads, 1)), std::max<std::size_t>(blocks, 1)));
  constexpr double inf = std::numeric_limits<double>::infinity();
  std::vector<std::vector<double>> lo(static_cast<std::size_t>(workers), std::vector<double>(nt, inf));
  std::vector<std::vector<double>> hi(static_cast<std::size_t>(workers), std::vector<double>(nt, -inf));
  std::atomic<std::size_t> next{0};
  run_workers(workers, [&](int w) {
    auto b = std::make_unique<BlockUnits>();
    alignas(64) double err[block_size];
    alignas(64) std::uint8_t status[block_size];
    for (std::size_t k; (k = next.fetch_add(1)) < blocks;) {
      const std::uint64_t f = k * block_size;
      const int count = static_cast<int>(std::min<std::uint64_t>(block_size, n - f));
      draw_block(c, *b, f, count);
      if (c.cal_points > 0) calibrate_block(c, *b);
      for (std::size_t ti = 0; ti < nt; ++ti) {
        errors_block(c, *b, temperatures[ti], static_cast<std::uint32_t>(ti), err, status);
        if (keep) {
          std::copy(std::begin(err), std::end(err), kept.err.begin() + static_cast<std::ptrdiff_t>(kept.at(k, ti)));
          std::copy(std::begin(status), std::end(status), kept.status.begin() + static_cast<std::ptrdiff_t>(kept.at(k, ti)));
        }
        double& l = lo[static_cast<std::size_t>(w)][ti];
        double& h = hi[static_cast<std::size_t>(w)][ti];
        for (int u = 0; u < count; ++u) {
          if (std::isnan(err[u])) continue;
          l = std::min(l, err[u]);
          h = std::max(h, err[u]);
        }
      }
    }
  });
  std::vector<Range> ranges(nt);
  for (std::size_t ti = 0; ti < nt; ++ti) {
    double l = inf, h = -inf;
    for (int w = 0; w < workers; ++w) {
      l = std::min(l, lo[static_cast<std::size_t>(w)][ti]);
      h = std::max(h, hi[static_cast<std::size_t>(w)][ti]);
    }
    ranges[ti] = pilot_range(l, h);
  }
  return ranges;
}

// JCGM 101 §7.9: stable when, at every temperature of the window, twice the
// standard deviation of the batch results of y, u(y) and both endpoints is
// within δ.
bool batches_stable(const std::vector<std::vector<McPoint>>& batches, const std::vector<std::uint8_t>& in_window) {
  const double hb = static_cast<double>(batches.size());
  for (std::size_t ti = 0; ti < in_window.size(); ++ti) {
    if (!in_window[ti]) continue;
    double m[4] = {0, 0, 0, 0}, q[4] = {0, 0, 0, 0};
    for (const auto& b : batches) {
      const double v[4] = {b[ti].mean, b[ti].stddev, b[ti].low, b[ti].high};
      for (int k = 0; k < 4; ++k) m[k] += v[k] / hb;
    }
    for (const auto& b : batches) {
      const double v[4] = {b[ti].mean, b[ti].stddev, b[ti].low, b[ti].high};
      for (int k = 0; k < 4; ++k) q[k] += (v[k] - m[k]) * (v[k] - m[k]);
    }
    const double delta = numerical_tolerance(m[1]);
    for (int k = 0; k < 4; ++k) {
      const double s_avg = std::sqrt(q[k] / (hb * (hb - 1.0)));
      if (2.0 * s_avg > delta) return false;
    }
  }
  return true;
}

// JCGM 101 §7.9: batches of h = max(100/(1 − p), 10⁴) trials until they are
// stable or the cap is reached; whether they became stable.
bool run_adaptive(const Job& job, const MonteCarloSettings& m, int threads, const McProgress& progress,
                  Accumulator& total) {
  const auto h = static_cast<std::uint64_t>(std::max(100.0 / (1.0 - m.coverage), 1e4));
  std::vector<std::vector<McPoint>> batches;
  for (std::uint64_t first = 0; first + h <= m.max_units; first += h) {
    Accumulator a = run_units(job, first, h, threads, progress, first, m.max_units);
    batches.push_back(summarise(a, *job.temps, *job.ranges, m.coverage));
    total.merge(a);
    if (batches.size() >= 2 && batches_stable(batches, job.in_window)) return true;
  }
  return false;
}

// The yield with its Clopper–Pearson interval, and the largest |endpoint| in
// the window.
void summarise_run(const Accumulator& total, const Job& job, const std::vector<McPoint>& points, McSummary& s) {
  s.units = total.units;
  s.good_units = total.good_units;
  s.yield = s.units ? static_cast<double>(s.good_units) / static_cast<double>(s.units) : 0.0;
  const Interval ci = clopper_pearson(s.good_units, s.units);
  s.yield_low = ci.low;
  s.yield_high = ci.high;
  s.failures_per_million = 1e6 * (1.0 - s.yield);
  for (std::size_t ti = 0; ti < points.size(); ++ti) {
    if (!job.in_window[ti] || points[ti].valid == 0) continue;
    const double m = std::max(std::fabs(points[ti].low), std::fabs(points[ti].high));
    if (m > s.max_abs) {
      s.max_abs = m;
      s.max_abs_at = (*job.temps)[ti];
    }
  }
}

}  // namespace

McResult monte_carlo(const Chain& chain, const std::vector<double>& temperatures, const McOptions& options) {
  const Design& d = chain.design();
  const RunConstants c = make_constants(chain, options.conversions);
  const std::size_t nt = temperatures.size();
  const int threads = resolve_threads(d.threads_or_scenario(options.threads));
  const std::uint64_t requested = options.units ? options.units : d.montecarlo.units;
  const bool adaptive = requested == 0;

  Job job{&c, &temperatures, nullptr, std::vector<std::uint8_t>(nt, 0), d.requirement.max_error};
  for (std::size_t i = 0; i < nt; ++i)
    job.in_window[i] = in_requirement_window(d.requirement, temperatures[i]);
  PilotBlocks pilot;
  const std::vector<Range> ranges =
      pilot_ranges(c, temperatures, adaptive ? pilot_units : std::min(requested, pilot_units), threads, pilot);
  job.ranges = &ranges;
  job.pilot = &pilot;

  McResult result;
  McSummary& s = result.summary;
  s.coverage = d.montecarlo.coverage;
  s.adaptive = adaptive;
  Accumulator total = adaptive ? Accumulator(nt) : run_units(job, 0, requested, threads, options.progress, 0, requested);
  if (adaptive) s.converged = run_adaptive(job, d.montecarlo, threads, options.progress, total);
  result.points = summarise(total, temperatures, ranges, d.montecarlo.coverage);
  summarise_run(total, job, result.points, s);
  return result;
}

}  // namespace thermargin
