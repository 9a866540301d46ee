// Monte Carlo propagation of distributions (JCGM 101:2008) through the
// measurement chain: production yield and coverage bands.
//
// Units are drawn once each (their inputs fixed across the temperature
// sweep); the board temperature is drawn per reading; readings are simulated
// sample by sample (noise, quantiser, clamping, averaging), calibration
// readings like any other. Per temperature: the probabilistically symmetric
// coverage interval (JCGM 101 §7.7), median, mean, standard deviation and
// the share of readings that could not be converted. Yield: the fraction of
// units whose largest |error| over the requirement window is within the
// limit (a saturated reading in the window fails the unit), with a
// Clopper–Pearson interval (Clopper & Pearson, Biometrika 26, 1934).
//
// The kernel works on blocks of units in structure-of-arrays form, the steps
// vectorised over the block, threads taking blocks. Random numbers are
// counter-based (random.hpp) keyed by unit, temperature and sample, and all
// accumulators are integers (histograms, fixed-point sums), so results
// depend only on (seed, units), never on the thread count. Memory grows with
// threads × temperatures, never with units × temperatures: the band
// endpoints come from per-temperature histograms whose range is set by a
// pilot of the first units, values outside it kept exactly.
#pragma once

#include <cstdint>
#include <functional>
#include <memory>
#include <optional>
#include <vector>

#include "thermargin/chain/chain.hpp"

namespace thermargin {

// A run may share its conversion table (conversion_cache.hpp); declared
// here only, so that this header does not pull in the cache's <future>.
class ConversionCache;

struct McPoint {
  double t = 0.0;
  std::uint64_t valid = 0;      // readings with an error value
  std::uint64_t saturated = 0;  // saturated readings
  std::uint64_t failed = 0;     // other statuses (runaway, out of table, no conversion, calibration)
  double low = 0.0, high = 0.0;  // K, coverage interval of the valid readings
  double median = 0.0, mean = 0.0, stddev = 0.0;  // K
  double saturated_share() const;
};

struct McSummary {
  std::uint64_t units = 0;
  bool adaptive = false;
  bool converged = true;  // adaptive: stabilised before the cap
  double coverage = 0.9973;
  std::uint64_t good_units = 0;
  double yield = 0.0, yield_low = 0.0, yield_high = 0.0;  // 95 % Clopper–Pearson
  double failures_per_million = 0.0;
  double max_abs = 0.0;  // K, largest |endpoint| of the bands in the window
  double max_abs_at = 0.0;
};

struct McResult {
  McSummary summary;
  std::vector<McPoint> points;
};

using McProgress = std::function<void(double fraction_done)>;

struct McOptions {
  std::uint64_t units = 0;  // 0: the design's montecarlo.units (or auto)
  int threads = -1;         // -1: the design's; 0: all cores
  McProgress progress;
  // The firmware's conversion table shared with other runs (a `grades`
  // run's combinations); none: made for this run alone. Not owned.
  ConversionCache* conversions = nullptr;
};

McResult monte_carlo(const Chain& chain, const std::vector<double>& temperatures, const McOptions& options = {});

// The JCGM 101 §7.9 numerical tolerance of a value u: written as c·10^l with
// `significant` digits in c, δ = ½·10^l.
double numerical_tolerance(double u, int significant = 2);

// JCGM 101 §8: the linear band [lin_low, lin_high] is validated by the Monte
// Carlo band when both endpoint differences are within δ.
bool linear_validated(double lin_low, double lin_high, double mc_low, double mc_high, double delta);

// Clopper–Pearson interval for k successes in n trials at confidence 1 − alpha.
struct Interval {
  double low, high;
};
Interval clopper_pearson(std::uint64_t k, std::uint64_t n, double alpha = 0.05);

// Below: the kernel's building blocks, public so that tests can hold the
// vectorised kernel against the scalar chain.

// One unit's deviations, drawn from its counter-based stream. The design's
// form folds any drift into its target (chain/drift.hpp), as the chain does.
Deviations draw_unit(const Design& d, std::uint64_t unit);
Deviations draw_unit(const std::vector<ToleranceInput>& inputs, double sigma_per_tol, std::uint64_t seed,
                     std::uint64_t unit);

// The engine's sampling and interval code applied to a model given as a
// function of the deviations (for the JCGM 101 §9 test cases): the coverage
// interval, median, mean and standard deviation of `units` draws.
McPoint monte_carlo_model(const std::function<double(const Deviations&)>& model,
                          const std::vector<ToleranceInput>& inputs, double sigma_per_tol, std::uint64_t seed,
                          std::uint64_t units, double coverage);

// The M noise values (LSB) and the board-temperature uniform of one reading;
// `reading` is the temperature index, or calibration_reading(i).
struct ReadingDraw {
  double board_u = 0.5;        // uniform in (0, 1) for the board temperature
  double precharge_u = 0.5;    // uniform in (0, 1) for what C_s holds (precharge = any)
  std::vector<double> noise;   // M values, LSB
};
ReadingDraw draw_reading(const Design& d, std::uint64_t unit, std::uint32_t reading);
inline constexpr std::uint32_t calibration_reading(int i) { return 0xFFFF0000u + static_cast<std::uint32_t>(i); }

// The scalar reference: one unit's error at one temperature, simulated with
// the same draws as the kernel, through Chain (slow; for tests).
Evaluation simulate_reading(const Chain& chain, std::uint64_t unit, std::uint32_t t_index, double t_celsius);

// The kernel itself on one block of units (for tests and benchmarks):
// errors[u + t_index*count] for units first..first+count−1 (count ≤ 256),
// NaN marking readings without a value.
void simulate_block(const Chain& chain, const std::vector<double>& temperatures, std::uint64_t first_unit,
                    int count, std::vector<double>& errors);

// The same, with the per-run set-up (the firmware's conversion of every
// possible reading, the design's constants) done once in the constructor, as
// the engine does: what remains is the kernel's own cost per block.
class BlockKernel {
 public:
  explicit BlockKernel(const Chain& chain);
  ~BlockKernel();
  BlockKernel(const BlockKernel&) = delete;
  BlockKernel& operator=(const BlockKernel&) = delete;
  void simulate(const std::vector<double>& temperatures, std::uint64_t first_unit, int count,
                std::vector<double>& errors) const;

 private:
  struct Constants;
  std::unique_ptr<Constants> constants_;
};

}  // namespace thermargin
