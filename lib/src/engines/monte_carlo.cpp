#include "thermargin/engines/monte_carlo.hpp"

#include "thermargin/core/parallel.hpp"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <limits>
#include <memory>
#include <mutex>
#include <numbers>
#include <thread>
#include <type_traits>

#include <Eigen/Core>
#include <boost/math/distributions/binomial.hpp>

#include "thermargin/chain/divider.hpp"
#include "thermargin/chain/drift.hpp"
#include "thermargin/engines/random.hpp"
#include "thermargin/chain/self_heating.hpp"
#include "thermargin/chain/sensor.hpp"
#include "thermargin/chain/supply.hpp"

namespace thermargin {

namespace {

constexpr int block_size = 256;           // units per block: a multiple of every SIMD width
constexpr int histogram_bins = 8192;      // per temperature
constexpr std::uint64_t pilot_units = 4096;
constexpr double fixed_point_scale = 16777216.0;  // 2^24 per K (and per K²) in the integer sums
constexpr double sum_clamp = 1e4;                 // K; beyond this the sums saturate (absurd errors)
constexpr std::uint32_t unit_stream = 0xFFFFFFFFu;

using Block = Eigen::Array<double, block_size, 1>;

// --- Random numbers shared by the kernel and the scalar reference --------
// Plain arithmetic (no library calls) so that the vectorised loop and the
// scalar path give identical bits.

// ln u for u in (0, 1]: exponent from the bits, mantissa by the atanh series
// 2(s + s³/3 + … + s¹¹/11), s = (m − 1)/(m + 1), m ∈ [√½, √2): |error| < 1e-12.
inline double plain_log(double u) {
  std::uint64_t bits = std::bit_cast<std::uint64_t>(u);
  const auto e0 = static_cast<std::int64_t>((bits >> 52) & 0x7FF) - 1023;
  bits = (bits & 0x000FFFFFFFFFFFFFull) | 0x3FF0000000000000ull;
  double m = std::bit_cast<double>(bits);
  const bool big = m > std::numbers::sqrt2;
  m = big ? m * 0.5 : m;
  const double e = static_cast<double>(e0) + (big ? 1.0 : 0.0);
  const double s = (m - 1.0) / (m + 1.0), s2 = s * s;
  const double series =
      s * (2.0 + s2 * (2.0 / 3 + s2 * (2.0 / 5 + s2 * (2.0 / 7 + s2 * (2.0 / 9 + s2 * (2.0 / 11 + s2 * (2.0 / 13)))))));
  return e * std::numbers::ln2 + series;
}

// cos(2πv) for any v, by reduction to |θ| ≤ π/4 and Taylor series to θ¹⁴.
inline double plain_cos_2pi(double v) {
  const double q = std::floor(4.0 * v + 0.5);
  const double theta = 2.0 * std::numbers::pi * (v - 0.25 * q);
  const double t2 = theta * theta;
  const double c = 1.0 + t2 * (-1.0 / 2 + t2 * (1.0 / 24 + t2 * (-1.0 / 720 + t2 * (1.0 / 40320 + t2 * (-1.0 / 3628800 + t2 * (1.0 / 479001600 + t2 * (-1.0 / 87178291200.0)))))));
  const double s = theta * (1.0 + t2 * (-1.0 / 6 + t2 * (1.0 / 120 + t2 * (-1.0 / 5040 + t2 * (1.0 / 362880 + t2 * (-1.0 / 39916800 + t2 * (1.0 / 6227020800.0)))))));
  // Quadrant k = q mod 4 selects c, −s, −c, s; chosen arithmetically so the
  // loop stays branch-free.
  const double k = q - 4.0 * std::floor(q * 0.25);
  const double odd = k - 2.0 * std::floor(k * 0.5);
  const double sign = 1.0 - 2.0 * (std::floor((k + 1.0) * 0.5) - 2.0 * std::floor((k + 1.0) * 0.25));
  return sign * (odd * s + (1.0 - odd) * c);
}

inline double uniform32(std::uint32_t x) { return (static_cast<double>(x) + 0.5) * 0x1.0p-32; }

// A standard normal from two 32-bit words (Box–Muller, cosine branch).
inline double normal_from(std::uint32_t a, std::uint32_t b) {
  return std::sqrt(-2.0 * plain_log(uniform32(a))) * plain_cos_2pi(uniform32(b));
}

// Reading streams: counter (unit lo, unit hi, reading, j), four words a call.
// Call 0: words 0–1 the noise of sample 0, word 2 the board temperature,
// word 3 what another channel left on the sampling capacitor (precharge = any).
// Call k ≥ 1: words 0–1 sample 2k − 1, words 2–3 sample 2k. One call per
// reading serves the common case of no averaging.
inline Philox4x32Counter reading_words(const Philox4x32Key& key, std::uint64_t unit, std::uint32_t reading,
                                       std::uint32_t j) {
  return philox4x32_10({static_cast<std::uint32_t>(unit), static_cast<std::uint32_t>(unit >> 32), reading, j}, key);
}

inline std::uint32_t noise_call(int s) { return static_cast<std::uint32_t>((s + 1) / 2); }
inline bool noise_high_words(int s) { return s > 0 && s % 2 == 0; }

inline double noise_sample(const Philox4x32Key& key, std::uint64_t unit, std::uint32_t reading, int s) {
  const auto w = reading_words(key, unit, reading, noise_call(s));
  return noise_high_words(s) ? normal_from(w[2], w[3]) : normal_from(w[0], w[1]);
}

// The four words of reading-stream call j for a whole block: Philox on 32-bit
// lanes in a loop the compiler vectorises, the same numbers as reading_words().
struct BlockWords {
  alignas(64) std::uint32_t w[4][block_size];
};

void reading_words_block(const Philox4x32Key& key, std::uint64_t first, std::uint32_t reading, std::uint32_t j,
                         BlockWords& out) {
  for (int u = 0; u < block_size; ++u) {
    const std::uint64_t unit = first + static_cast<std::uint64_t>(u);
    std::uint32_t c0 = static_cast<std::uint32_t>(unit), c1 = static_cast<std::uint32_t>(unit >> 32), c2 = reading, c3 = j;
    std::uint32_t k0 = key[0], k1 = key[1];
#pragma GCC unroll 10
    for (int round = 0; round < 10; ++round) {
      const std::uint64_t p0 = static_cast<std::uint64_t>(0xD2511F53u) * c0;
      const std::uint64_t p1 = static_cast<std::uint64_t>(0xCD9E8D57u) * c2;
      const std::uint32_t n0 = static_cast<std::uint32_t>(p1 >> 32) ^ c1 ^ k0;
      const std::uint32_t n2 = static_cast<std::uint32_t>(p0 >> 32) ^ c3 ^ k1;
      c1 = static_cast<std::uint32_t>(p1);
      c3 = static_cast<std::uint32_t>(p0);
      c0 = n0;
      c2 = n2;
      k0 += 0x9E3779B9u;
      k1 += 0xBB67AE85u;
    }
    out.w[0][u] = c0;
    out.w[1][u] = c1;
    out.w[2][u] = c2;
    out.w[3][u] = c3;
  }
}

void normals_block(const std::uint32_t* a, const std::uint32_t* b, double sigma, double* out) {
  for (int u = 0; u < block_size; ++u) out[u] = sigma * normal_from(a[u], b[u]);
}

// --- Per-run constants ----------------------------------------------------

struct RunConstants {
  const Chain* chain;
  const Design* d;
  Philox4x32Key key;
  double span, max_code;
  int m;                             // averaging
  double noise;                      // LSB rms
  std::vector<double> conversion;    // reported temperature by sample sum; NaN: no solution
  bool table_conversion = false;
  bool beta_fast = false;            // beta sensor: ln R in closed form
  double ln_r25 = 0.0, beta = 0.0;
  double ln_r0 = 0.0;                // ln R_nom(T0) for the NTC stretch
  std::vector<int> active;           // unit-level sources drawn per unit (not the board)
  int cal_points = 0;
  AcquisitionModel acquisition{};    // the sampled node (docs/model.md §14)
  bool precharge_any = false;        // the start of C_s drawn per reading
};

RunConstants make_constants(const Chain& chain) {
  const Design& d = chain.design();
  RunConstants c{&chain, &d, philox_key(d.montecarlo.seed), d.adc_span(), d.adc_span() - 1.0, d.adc.averaging,
                 d.adc.noise, {}, false, false, 0.0, 0.0, 0.0, {}, calibration_points(d.firmware.calibration)};
  // The firmware's conversion of every possible reading, once: a reading is
  // a sum of M integer samples in [0, M·(2^N − 1)].
  const double entries = static_cast<double>(c.m) * c.max_code + 1.0;
  if (entries <= static_cast<double>(1u << 22)) {
    c.table_conversion = true;
    c.conversion.resize(static_cast<std::size_t>(entries));
    for (std::size_t k = 0; k < c.conversion.size(); ++k) {
      const auto t = chain.convert(static_cast<double>(k) / c.m, true);
      c.conversion[k] = t ? *t : std::numeric_limits<double>::quiet_NaN();
    }
  }
  c.beta_fast = d.sensor.kind == SensorKind::beta;
  c.ln_r25 = std::log(d.sensor.r25);
  c.beta = d.sensor.beta;
  if (d.sensor.kind != SensorKind::rtd)
    if (auto l = nominal_ln_resistance(d.sensor, t0_kelvin)) c.ln_r0 = *l;
  for (const auto& in : d.inputs)
    if (in.source != Source::board_temperature && in.source != Source::adc_precharge)
      c.active.push_back(static_cast<int>(in.source));
  // A drift is folded into its target's row (chain/drift.hpp): copy that row too.
  for (const auto& in : d.inputs)
    if (const int target = static_cast<int>(drift_target(in.source));
        drift_target(in.source) != in.source && std::find(c.active.begin(), c.active.end(), target) == c.active.end())
      c.active.push_back(target);
  c.acquisition = chain.acquisition();
  c.precharge_any = c.acquisition.on && d.adc.precharge == Precharge::any;
  return c;
}

// --- The kernel: one block of units at one temperature --------------------

struct BlockUnits {
  std::uint64_t first = 0;
  int count = 0;
  alignas(64) double dev[source_count][block_size];
  alignas(64) double ln_shift[block_size];  // ln(1 + δR) of each unit (NTC)
  alignas(64) double cal_reported[2][block_size];
  alignas(64) double cal_reference[2][block_size];
  alignas(64) std::uint8_t cal_ok[block_size];
  // The last self-heating rise of each unit: the next temperature's solve
  // starts there (the sweep moves in small steps), saving iterations.
  alignas(64) double rise_guess[block_size];
};

void draw_block(const RunConstants& c, BlockUnits& b, std::uint64_t first, int count) {
  b.first = first;
  b.count = count;
  std::fill(std::begin(b.rise_guess), std::end(b.rise_guess), 0.0);
  for (auto& row : b.dev) std::fill(std::begin(row), std::end(row), 0.0);
  for (int u = 0; u < block_size; ++u) {
    const Deviations dv = draw_unit(*c.d, first + static_cast<std::uint64_t>(u));
    for (int s : c.active) b.dev[s][u] = dv[static_cast<std::size_t>(s)];
    b.ln_shift[u] = std::log1p(b.dev[static_cast<int>(Source::r25)][u]);
    // The sensor's drift over life shifts ln R like R25's tolerance (sensor.hpp).
    if (const double drift = b.dev[static_cast<int>(Source::sensor_drift)][u]; drift != 0.0)
      b.ln_shift[u] += std::log1p(drift);
  }
}

// One fixed-point step of the self-heating solve for the whole block (see
// self_heating.hpp); separate, with unaliased arrays, so that it vectorises.
// Returns how many units are still moving.
template <bool Simple>
int self_heating_step(int it, double t_k, double r_lead, const double* __restrict r_el, const double* __restrict rf,
                      const double* __restrict vexc, const double* __restrict inv_par, const double* __restrict gain,
                      double* __restrict te, double* __restrict rise_prev, double* __restrict runaway_flag,
                      double* __restrict moving) {
  int open = 0;
  const bool check_runaway = it > 2, later = it > 1;
  for (int u = 0; u < block_size; ++u) {
    const double r = r_el[u];
    double rise;
    if constexpr (Simple) {
      // Without leads or a parallel resistor the element sees the whole
      // branch voltage: rise = g·V²·R/(R_f + R)², one division.
      const double sum = rf[u] + r;
      rise = gain[u] * vexc[u] * vexc[u] * r / (sum * sum);
    } else {
      const double series = r + r_lead;
      const double rb = series / (1.0 + series * inv_par[u]);
      const double v_e = vexc[u] * rb / (rf[u] + rb) * r / series;
      rise = gain[u] * v_e * v_e / r;
    }
    const double next = t_k + rise;
    const double step = next - te[u];
    const double size = std::fabs(step);
    // Converged when the step, or the error a contracting iteration still
    // leaves (step·q/(1 − q), q the ratio of successive steps), is in tolerance.
    const double q = size / std::fabs(rise_prev[u]);
    const bool small_step = size <= self_heating_tolerance;
    const bool small_rest = (q < 0.5) & (size * q <= self_heating_tolerance * (1.0 - q));
    const bool converged = small_step | (later & small_rest);
    const bool runaway = check_runaway & (size >= std::fabs(rise_prev[u])) & !converged;
    const bool active = moving[u] != 0.0;
    te[u] = active ? next : te[u];
    rise_prev[u] = active ? step : rise_prev[u];
    runaway_flag[u] = (active & runaway) ? 1.0 : runaway_flag[u];
    moving[u] = (active & !converged & !runaway) ? 1.0 : 0.0;
    open += moving[u] != 0.0;
  }
  return open;
}

// The first step of the self-heating solve for a beta sensor without leads
// or a parallel resistor, as a Newton step on F(T_e) = T + rise(T_e) − T_e,
// with the derivative in closed form. With x = R/(R_f + R) and L = ln R,
// rise = g·V²·x(1 − x)/R_f, so d rise/dL = rise·(1 − 2x) and
// |d² rise/dL²| ≤ rise; L = a + b/T_e gives L' = −b/T_e², L'' = 2b/T_e³.
// The Newton iterate is then within C·δ² of the fixed point, δ the Newton
// increment and C = |F''|/(2|F'|) (Newton's error term) taken twice over,
// with F'' = rise·[((1 − 2x)² − 2x(1 − x))·L'² + (1 − 2x)·L''] widened by
// what it can change between T_e and the iterate, |F'| ≥ 1 − q and
// q = |d rise/dT_e| ≤ ½. A unit is
// accepted when C·δ² is within the solve's tolerance and its ln R moves by
// at most 1e-3 (so R follows from one series step, below); the others take
// the plain fixed-point step and go on as before. In a sweep of small steps
// almost every unit is accepted here, saving two of the three exponentials.
int self_heating_newton_first(double t_k, const double* __restrict r_el, const double* __restrict rf,
                              const double* __restrict vexc, const double* __restrict gain,
                              const double* __restrict b_unit, double* __restrict te, double* __restrict rise_prev,
                              double* __restrict moving, double* __restrict dln_r) {
  int open = 0;
  for (int u = 0; u < block_size; ++u) {
    const double r = r_el[u];
    const double sum = rf[u] + r;
    const double rise = gain[u] * vexc[u] * vexc[u] * r / (sum * sum);
    const double x = r / sum;
    const double inv_t = 1.0 / te[u];
    const double l1 = -b_unit[u] * inv_t * inv_t, l2 = -2.0 * l1 * inv_t;
    const double slope = rise * (1.0 - 2.0 * x) * l1;  // d rise/dT_e
    const double q = std::fabs(slope);
    const double next = t_k + rise;
    const double step = next - te[u];
    const double delta = step / (1.0 - slope);
    const double te_newton = te[u] + delta;
    const double dl = b_unit[u] * (1.0 / te_newton - inv_t);
    // |F''| at T_e, plus what it can change over the step (its terms move
    // by a relative 4·|ΔL| at most while |ΔL| ≤ 1e-3), halved over |F'|.
    const double bound = rise * (l1 * l1 + std::fabs(l2));
    const double f2 = rise * (((1.0 - 2.0 * x) * (1.0 - 2.0 * x) - 2.0 * x * (1.0 - x)) * l1 * l1 + (1.0 - 2.0 * x) * l2);
    const double c = (std::fabs(f2) + 4.0 * std::fabs(dl) * bound) / (1.0 - std::min(q, 0.5));
    const bool accept = (q <= 0.5) & (c * delta * delta <= self_heating_tolerance) & (std::fabs(dl) <= 1e-3);
    const bool active = moving[u] != 0.0;
    te[u] = !active ? te[u] : accept ? te_newton : next;
    rise_prev[u] = active ? step : rise_prev[u];
    dln_r[u] = (active & accept) ? dl : 0.0;
    moving[u] = (active & !accept) ? 1.0 : 0.0;
    open += moving[u] != 0.0;
  }
  return open;
}

// The sampled node for a block (docs/model.md §14): v[] from the node's
// voltage to the mean sampled voltage. The same two steps as the scalar
// acquisition_map() — exponents, exponentials, combination — with the
// exponentials taken for the whole block at once (vectorised).
void settle_block(const RunConstants& c, const double* __restrict d_pre, const double* __restrict vref,
                  const double* __restrict r_th, double* __restrict v) {
  const AcquisitionModel& m = c.acquisition;
  // A continuous divider sampled back to back (precharge = same) reads V_th
  // exactly (its periodic steady state draws no charge): nothing to do.
  if (!m.switched && !m.reset) return;
  const AdcSettings& a = c.d->adc;
  const double v_ref_nom = c.d->supply.v_reference_nominal();
  alignas(64) double ex[acquisition_exponent_count][block_size];
  ClosedSwitch cs[block_size];
  for (int u = 0; u < block_size; ++u) {
    cs[u] = closed_switch(m, r_th[u]);
    const AcquisitionExponents x = acquisition_exponents(m, r_th[u], cs[u]);
    for (int k = 0; k < acquisition_exponent_count; ++k) ex[k][u] = x[k];
  }
  // Only the exponentials the map reads: the settle time's for a switched
  // divider, the node's for a node capacitor.
  const int used = m.c_n > 0.0 ? (m.switched ? acquisition_exponent_count : 3) : 1;
  for (int k = 0; k < used; ++k) {
    Eigen::Map<Block> e(ex[k]);
    e = e.exp();
  }
  for (int u = 0; u < block_size; ++u) {
    const AcquisitionExponents e{ex[0][u], ex[1][u], ex[2][u], ex[3][u]};
    const double v_start = precharge_voltage(a, v_ref_nom, vref[u], d_pre[u]);
    v[u] = acquisition_combine(m, cs[u], e).apply(v[u], v_start);
  }
}

// Reported temperatures (before calibration) of the block's readings at true
// temperature t; status per unit.
void read_block(const RunConstants& c, BlockUnits& b, double t, std::uint32_t reading, double* reported,
                std::uint8_t* status_out, bool calibration = false) {
  const Design& d = *c.d;
  // A calibration reading self-heats in the calibration medium where one is
  // set (firmware.calibration_dissipation, no unit deviation).
  const bool medium = calibration && d.firmware.calibration_dissipation.has_value();
  const double dissipation = medium ? *d.firmware.calibration_dissipation : d.sensor.dissipation;
  alignas(64) static const double no_deviation[block_size] = {};
  alignas(64) double tb[block_size], rf[block_size], vexc[block_size], vref[block_size], inv_par[block_size];
  alignas(64) double te[block_size], rise_prev[block_size], r_el[block_size], xs[block_size], rs[block_size];
  alignas(64) std::uint8_t status[block_size];
  const double* dv[source_count];
  for (int i = 0; i < source_count; ++i) dv[i] = b.dev[i];
  const auto dev = [&](Source s) { return dv[static_cast<int>(s)]; };

  // Design constants in locals: the loops below then see no possible aliasing.
  const BoardTemperature board = d.conditions.board;
  const double r_fixed = d.divider.r_fixed, v_exc = d.supply.v_excitation, v_ref = d.supply.v_reference;
  const bool ratiometric = d.supply.ratiometric, has_par = d.divider.r_parallel.has_value();
  const double r_par = has_par ? *d.divider.r_parallel : 0.0;
  const double r_lead = d.sensor.lead_resistance;
  const bool low = d.divider.placement == Placement::low;
  const double span = c.span, max_code = c.max_code;

  // Board temperature, supply and the fixed resistor of each reading.
  BlockWords words;
  if (board.kind == BoardKind::range || c.noise > 0.0 || c.precharge_any) reading_words_block(c.key, b.first, reading, 0, words);
  if (c.precharge_any) {
    // Per reading, like the board: uniform over [0, V_ref] (docs/model.md §14).
    const double v_ref_nom = d.supply.v_reference_nominal();
    double* row = b.dev[static_cast<int>(Source::adc_precharge)];
    for (int u = 0; u < block_size; ++u) row[u] = (uniform32(words.w[3][u]) - 0.5) * v_ref_nom;
  }
  if (board.kind == BoardKind::range) {
    const double lo = board.min, width = board.max - board.min;
    for (int u = 0; u < block_size; ++u) tb[u] = lo + width * uniform32(words.w[2][u]);
  } else {
    std::fill(std::begin(tb), std::end(tb), board.kind == BoardKind::fixed ? board.min : t);
  }
  {
    const double* d_rf = dev(Source::r_fixed);
    const double* d_tc = dev(Source::r_fixed_tempco);
    const double* d_par = dev(Source::r_parallel);
    for (int u = 0; u < block_size; ++u) {
      rf[u] = r_fixed * (1.0 + d_rf[u]) * (1.0 + d_tc[u] * (tb[u] - 25.0));
      // 1/R_par, 0 without one: (R ∥ R_par) = R / (1 + R/R_par), no branch.
      inv_par[u] = has_par ? 1.0 / (r_par * (1.0 + d_par[u])) : 0.0;
      status[u] = 0;
    }
    // The fixed resistor and the drive in series: what the element's
    // voltage sees wherever the sensor sits (docs/model.md §15).
    const double r_drive = d.supply.r_drive;
    const double* d_drv = dev(Source::r_drive);
    for (int u = 0; u < block_size; ++u) rs[u] = rf[u] + r_drive * (1.0 + d_drv[u]);
    if (ratiometric) {
      std::fill(std::begin(vexc), std::end(vexc), v_exc);
      std::fill(std::begin(vref), std::end(vref), v_exc);
    } else {
      const double *e0 = dev(Source::v_excitation), *e1 = dev(Source::v_excitation_tempco);
      const double *r0 = dev(Source::v_reference), *r1 = dev(Source::v_reference_tempco);
      for (int u = 0; u < block_size; ++u) {
        vexc[u] = v_exc * (1.0 + e0[u]) * (1.0 + e1[u] * (tb[u] - 25.0));
        vref[u] = v_ref * (1.0 + r0[u]) * (1.0 + r1[u] * (tb[u] - 25.0));
      }
    }
  }

  // R of each unit's element at te[] into r_el[]: ln R, then a vector exp.
  auto element_resistance = [&]() {
    if (c.beta_fast) {
      const double ln_r25 = c.ln_r25, beta = c.beta, ln_r0 = c.ln_r0;
      const double* d_beta = dev(Source::beta);
      const double* shift = b.ln_shift;
      for (int u = 0; u < block_size; ++u) {
        const double l = ln_r25 + beta * (1.0 / te[u] - 1.0 / t0_kelvin);
        r_el[u] = ln_r0 + shift[u] + (1.0 + d_beta[u]) * (l - ln_r0);
      }
    } else {
      for (int u = 0; u < block_size; ++u) {
        const SensorUnit s(d.sensor, dev(Source::r25)[u], dev(Source::beta)[u], dev(Source::rtd_class)[u],
                           dev(Source::table_spread)[u], dev(Source::sensor_drift)[u]);
        const auto l = s.ln_resistance(te[u]);
        if (!l) status[u] = static_cast<std::uint8_t>(Status::out_of_table);
        r_el[u] = l ? *l : 0.0;
      }
    }
    Eigen::Map<Block> m(r_el);
    m = m.exp();
  };

  const double t_k = t + kelvin_offset;
  for (int u = 0; u < block_size; ++u) {
    te[u] = t_k + b.rise_guess[u];
    rise_prev[u] = 0.0;
  }
  bool resolved_at_first = false;  // every unit solved by the first (Newton) step
  alignas(64) double dln_r[block_size];
  if (dissipation > 0.0 && d.divider.duty > 0.0) {
    const double duty_over_delta = d.divider.duty / dissipation;
    alignas(64) double gain[block_size], moving[block_size], runaway_flag[block_size];
    const double* d_diss = medium ? no_deviation : dev(Source::dissipation);
    for (int u = 0; u < block_size; ++u) {
      gain[u] = duty_over_delta / (1.0 + d_diss[u]);
      moving[u] = 1.0;
      runaway_flag[u] = 0.0;
    }
    const bool simple = r_lead == 0.0 && !has_par;
    const bool newton = simple && c.beta_fast;
    alignas(64) double b_unit[block_size];
    if (newton) {
      const double* d_beta = dev(Source::beta);
      for (int u = 0; u < block_size; ++u) b_unit[u] = (1.0 + d_beta[u]) * c.beta;
    }
    for (int it = 1; it <= self_heating_max_iterations; ++it) {
      element_resistance();
      for (int u = 0; u < block_size; ++u) moving[u] = status[u] == 0 ? moving[u] : 0.0;
      const int open =
          (newton && it == 1) ? self_heating_newton_first(t_k, r_el, rs, vexc, gain, b_unit, te, rise_prev, moving, dln_r)
          : simple ? self_heating_step<true>(it, t_k, r_lead, r_el, rs, vexc, inv_par, gain, te, rise_prev,
                                             runaway_flag, moving)
                   : self_heating_step<false>(it, t_k, r_lead, r_el, rs, vexc, inv_par, gain, te, rise_prev,
                                              runaway_flag, moving);
      if (open == 0) {
        resolved_at_first = newton && it == 1;
        break;
      }
    }
    for (int u = 0; u < block_size; ++u) b.rise_guess[u] = status[u] == 0 ? te[u] - t_k : 0.0;
    // Still moving after the last iteration, or a step that grew: runaway.
    for (int u = 0; u < block_size; ++u)
      if ((moving[u] != 0.0 || runaway_flag[u] != 0.0) && status[u] == 0) status[u] = static_cast<std::uint8_t>(Status::runaway);
  }
  if (resolved_at_first) {
    // Every unit took the Newton step: R at the new T_e from R at the old
    // one, R·e^{ΔL} with |ΔL| ≤ 1e-3 by a series to ΔL³ (relative error
    // below ΔL⁴/24 ≈ 4e-14).
    const double* dl = dln_r;
    for (int u = 0; u < block_size; ++u) {
      const double y = dl[u];
      r_el[u] *= 1.0 + y * (1.0 + y * (0.5 + y * (1.0 / 6.0)));
    }
  } else {
    element_resistance();
  }

  // Divider (its arms with the drive, divider.hpp), leakage, the sampled
  // node and the ADC's static transfer.
  {
    const double *g = dev(Source::adc_gain), *o = dev(Source::adc_offset), *i = dev(Source::adc_inl);
    const double* leak = dev(Source::adc_leakage);
    alignas(64) double v_node[block_size], r_th[block_size];
    const double *g_tc = dev(Source::adc_gain_tempco), *o_tc = dev(Source::adc_offset_tempco);
    const bool inl_bound = d.adc.inl_bound;
    for (int u = 0; u < block_size; ++u) {
      const double r = r_el[u];
      const double series = r + r_lead;
      const double rb = series / (1.0 + series * inv_par[u]);
      const double drive = rs[u] - rf[u];
      const double top = low ? rs[u] : rb + drive, bottom = low ? rb : rf[u];
      const double ratio = bottom / (top + bottom);
      r_th[u] = top * bottom / (top + bottom);
      v_node[u] = vexc[u] * ratio - leak[u] * r_th[u];
    }
    if (c.acquisition.on) settle_block(c, dev(Source::adc_precharge), vref, r_th, v_node);
    for (int u = 0; u < block_size; ++u) {
      const double x = v_node[u] / vref[u] * span;
      const double q = x / span;
      const double drift = tb[u] - 25.0;  // the ADC's offset and gain drift (docs/model.md §5)
      const double bow = i[u] * 4.0 * q * (1.0 - q);  // adc.inl_shape = bound: i[u] at every code
      xs[u] = x * (1.0 + (g[u] + g_tc[u] * drift)) + (o[u] + o_tc[u] * drift) + (inl_bound ? i[u] : bow);
#ifdef THERMARGIN_BREAK_TERM_adc_inl  // a throwaway test build's deliberate bug (DEVELOPERS.md)
      xs[u] = x * (1.0 + (g[u] + g_tc[u] * drift)) + (o[u] + o_tc[u] * drift);
#endif
    }
  }

  // A unit heated by more than 1 K is handed to the scalar chain, which
  // checks the loop gain at the true temperature for runaway (chain.cpp):
  // a loop gain of 1 needs a rise of at least 1/|d ln R/dT|, tens of kelvin
  // for any NTC, so this is rare and costs nothing in ordinary designs.
  if (dissipation > 0.0 && d.divider.duty > 0.0) {
    for (int u = 0; u < block_size; ++u) {
      if (!(te[u] - t_k > 1.0) && status[u] != static_cast<std::uint8_t>(Status::runaway)) continue;
      Deviations unit{};
      for (int k = 0; k < source_count; ++k) unit[static_cast<std::size_t>(k)] = dv[k][u];
      if (board.kind == BoardKind::range) unit[static_cast<std::size_t>(Source::board_temperature)] = tb[u] - board.middle();
      const FrontEnd fe = calibration ? c.chain->adc_stage(c.chain->analog_calibration_front_end(unit, t), unit)
                                      : c.chain->front_end(unit, t);
      status[u] = static_cast<std::uint8_t>(fe.status);
      xs[u] = fe.status == Status::ok ? fe.x_static : 0.0;
    }
  }

  // Samples: noise, quantiser, clamping; the reading is the sum of M samples.
  alignas(64) double sum[block_size], noise[block_size], sat[block_size];
  std::fill(std::begin(sum), std::end(sum), 0.0);
  std::fill(std::begin(sat), std::end(sat), 0.0);
  std::fill(std::begin(noise), std::end(noise), 0.0);
  const double q_offset = d.adc.quantizer == Quantizer::round ? 0.5 : 0.0;
  for (int s = 0; s < c.m; ++s) {
    if (c.noise > 0.0) {
      if (s > 0 && !noise_high_words(s)) reading_words_block(c.key, b.first, reading, noise_call(s), words);
      const int pair = noise_high_words(s) ? 2 : 0;
      normals_block(words.w[pair], words.w[pair + 1], c.noise, noise);
    }
    for (int u = 0; u < block_size; ++u) {
      const double v = std::floor(xs[u] + noise[u] + q_offset);
      const bool lo = v < 0.0, hi = v > max_code;
      sat[u] = (lo | hi) ? 1.0 : sat[u];
      sum[u] += std::clamp(v, 0.0, max_code);
    }
  }
  constexpr auto saturated = static_cast<std::uint8_t>(Status::saturated);
  constexpr auto no_solution = static_cast<std::uint8_t>(Status::no_solution);
  if (c.table_conversion) {
    // Branch-free so that it vectorises (the table lookup is a gather).
    const double* table = c.conversion.data();
    for (int u = 0; u < block_size; ++u) {
      std::uint8_t st = status[u];
      st = (st == 0 && sat[u] != 0.0) ? saturated : st;
      const double tr = table[static_cast<std::size_t>(sum[u])];
      st = (st == 0 && tr != tr) ? no_solution : st;  // NaN: no conversion
      reported[u] = st == 0 ? tr : 0.0;
      status[u] = st;
    }
  } else {
    for (int u = 0; u < block_size; ++u) {
      if (status[u] == 0 && sat[u] != 0.0) status[u] = saturated;
      const auto v = status[u] == 0 ? c.chain->convert(sum[u] / c.m, true) : std::nullopt;
      if (status[u] == 0 && !v) status[u] = no_solution;
      reported[u] = v ? *v : 0.0;
    }
  }
  std::copy(std::begin(status), std::end(status), status_out);
}

void calibrate_block(const RunConstants& c, BlockUnits& b) {
  std::fill(std::begin(b.cal_ok), std::end(b.cal_ok), std::uint8_t{1});
  alignas(64) double rep[block_size];
  alignas(64) std::uint8_t st[block_size];
  for (int i = 0; i < c.cal_points; ++i) {
    const double t_cal = c.d->firmware.calibration_at[static_cast<std::size_t>(i)];
    read_block(c, b, t_cal, calibration_reading(i), rep, st, true);
    const Source ref = i == 0 ? Source::calibration_1 : Source::calibration_2;
    for (int u = 0; u < block_size; ++u) {
      b.cal_reported[i][u] = rep[u];
      b.cal_reference[i][u] = t_cal + b.dev[static_cast<int>(ref)][u];
      b.cal_ok[u] &= static_cast<std::uint8_t>(st[u] == 0);
    }
  }
  if (c.cal_points == 2)
    for (int u = 0; u < block_size; ++u)
      if (b.cal_reported[0][u] == b.cal_reported[1][u]) b.cal_ok[u] = 0;
}

// Errors of the block at t; NaN where a reading has no value (status set).
void errors_block(const RunConstants& c, BlockUnits& b, double t, std::uint32_t t_index, double* err,
                  std::uint8_t* status) {
  alignas(64) double rep[block_size];
  read_block(c, b, t, t_index, rep, status);
  const Calibration cal = c.d->firmware.calibration;
  for (int u = 0; u < block_size; ++u) {
    if (status[u] == 0 && cal != Calibration::none && !b.cal_ok[u])
      status[u] = static_cast<std::uint8_t>(Status::calibration_failed);
    if (status[u] != 0) {
      err[u] = std::numeric_limits<double>::quiet_NaN();
      continue;
    }
    double tr = rep[u];
    if (cal != Calibration::none) {
      CalibrationData k;
      for (int i = 0; i < c.cal_points; ++i) {
        k.reported[i] = b.cal_reported[i][u];
        k.reference[i] = b.cal_reference[i][u];
      }
      tr = apply_calibration(cal, k, tr);
    }
    err[u] = tr - t;
  }
}

// --- Accumulation -------------------------------------------------------------

struct Range {
  double lo = -1.0, width = 2.0;  // histogram range per temperature
};

struct Accumulator {
  std::vector<std::uint32_t> hist;  // nt × bins
  std::vector<__int128> sum, sumsq;
  std::vector<std::uint64_t> valid, saturated, failed;
  std::vector<std::vector<double>> below, above;  // exact values outside the histogram
  std::uint64_t units = 0, good_units = 0;

  explicit Accumulator(std::size_t nt)
      : hist(nt * histogram_bins, 0), sum(nt, 0), sumsq(nt, 0), valid(nt, 0), saturated(nt, 0), failed(nt, 0),
        below(nt), above(nt) {}

  void merge(const Accumulator& o) {
    for (std::size_t i = 0; i < hist.size(); ++i) hist[i] += o.hist[i];
    for (std::size_t i = 0; i < sum.size(); ++i) {
      sum[i] += o.sum[i];
      sumsq[i] += o.sumsq[i];
      valid[i] += o.valid[i];
      saturated[i] += o.saturated[i];
      failed[i] += o.failed[i];
      below[i].insert(below[i].end(), o.below[i].begin(), o.below[i].end());
      above[i].insert(above[i].end(), o.above[i].begin(), o.above[i].end());
    }
    units += o.units;
    good_units += o.good_units;
  }
};

struct Job {
  const RunConstants* c;
  const std::vector<double>* temps;
  const std::vector<Range>* ranges;
  std::vector<std::uint8_t> in_window;
  double limit;
};

void run_block(const Job& job, std::uint64_t first, int count, Accumulator& acc, BlockUnits& b) {
  const RunConstants& c = *job.c;
  draw_block(c, b, first, count);
  if (c.cal_points > 0) calibrate_block(c, b);
  alignas(64) double err[block_size];
  alignas(64) double worst[block_size];
  alignas(64) std::uint8_t status[block_size];
  alignas(64) std::uint8_t bad[block_size];
  std::fill(std::begin(worst), std::end(worst), 0.0);
  std::fill(std::begin(bad), std::end(bad), std::uint8_t{0});
  const auto& temps = *job.temps;
  for (std::size_t ti = 0; ti < temps.size(); ++ti) {
    errors_block(c, b, temps[ti], static_cast<std::uint32_t>(ti), err, status);
    const Range& r = (*job.ranges)[ti];
    const double inv_width = histogram_bins / r.width;
    std::uint32_t* h = &acc.hist[ti * histogram_bins];
    // Sums in double within the block (its order is fixed), then added to
    // the fixed-point totals: the totals do not depend on which thread ran
    // which block.
    double s1 = 0.0, s2 = 0.0;
    std::uint64_t n_valid = 0, n_saturated = 0, n_failed = 0;
    const bool window = job.in_window[ti] != 0;
    for (int u = 0; u < count; ++u) {
      if (status[u] != 0) {
        const bool saturated = status[u] == static_cast<std::uint8_t>(Status::saturated);
        n_saturated += saturated;
        n_failed += !saturated;
        bad[u] = static_cast<std::uint8_t>(bad[u] | window);
        continue;
      }
      const double e = err[u];
      ++n_valid;
      const double clamped = std::clamp(e, -sum_clamp, sum_clamp);
      s1 += clamped;
      s2 += clamped * clamped;
      const double pos = (e - r.lo) * inv_width;
      if (pos < 0.0) acc.below[ti].push_back(e);
      else if (pos >= histogram_bins) acc.above[ti].push_back(e);
      else h[static_cast<int>(pos)]++;
      worst[u] = window ? std::max(worst[u], std::fabs(e)) : worst[u];
    }
    acc.valid[ti] += n_valid;
    acc.saturated[ti] += n_saturated;
    acc.failed[ti] += n_failed;
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
  Accumulator total(nt);
  for (const auto& a : accs) total.merge(a);
  return total;
}

// Quantile of rank q in [0, n) from the histogram and the exact tails.
double rank_value(const Accumulator& a, std::size_t ti, const Range& r, double rank) {
  std::vector<double> lo = a.below[ti], hi = a.above[ti];
  std::sort(lo.begin(), lo.end());
  std::sort(hi.begin(), hi.end());
  if (rank < static_cast<double>(lo.size())) return lo[static_cast<std::size_t>(rank)];
  double k = rank - static_cast<double>(lo.size());
  const std::uint32_t* h = &a.hist[ti * histogram_bins];
  const double width = r.width / histogram_bins;
  for (int bin = 0; bin < histogram_bins; ++bin) {
    if (k < h[bin]) return r.lo + width * (bin + (k + 0.5) / h[bin]);
    k -= h[bin];
  }
  const auto idx = std::min<std::size_t>(static_cast<std::size_t>(k), hi.size() - 1);
  return hi.empty() ? r.lo + r.width : hi[idx];
}

std::vector<McPoint> summarise(const Accumulator& a, const std::vector<double>& temps, const std::vector<Range>& ranges,
                               double coverage) {
  std::vector<McPoint> out(temps.size());
  for (std::size_t ti = 0; ti < temps.size(); ++ti) {
    McPoint& p = out[ti];
    p.t = temps[ti];
    p.valid = a.valid[ti];
    p.saturated = a.saturated[ti];
    p.failed = a.failed[ti];
    if (p.valid == 0) continue;
    const auto n = static_cast<long double>(p.valid);
    const long double mean = static_cast<long double>(a.sum[ti]) / n;
    const long double mean_k = mean / fixed_point_scale;
    const long double var =
        p.valid > 1 ? (static_cast<long double>(a.sumsq[ti]) / fixed_point_scale - mean_k * mean_k * n) / (n - 1) : 0.0L;
    p.mean = static_cast<double>(mean_k);
    p.stddev = static_cast<double>(std::sqrt(std::max(var, 0.0L)));
    // Probabilistically symmetric interval (JCGM 101 §7.7): the values of
    // ranks ⌊(1 − p)/2·M⌋ and ⌈(1 + p)/2·M⌉ − 1.
    const double m = static_cast<double>(p.valid);
    const double r_lo = std::floor(0.5 * (1.0 - coverage) * m);
    const double r_hi = std::max(std::ceil(0.5 * (1.0 + coverage) * m) - 1.0, r_lo);
    p.low = rank_value(a, ti, ranges[ti], r_lo);
    p.high = rank_value(a, ti, ranges[ti], r_hi);
    p.median = rank_value(a, ti, ranges[ti], std::floor(0.5 * (m - 1.0)));
  }
  return out;
}

}  // namespace

double McPoint::saturated_share() const {
  const auto n = valid + saturated + failed;
  return n ? static_cast<double>(saturated) / static_cast<double>(n) : 0.0;
}

Deviations draw_unit(const std::vector<ToleranceInput>& inputs, double sigma_per_tol, std::uint64_t seed,
                     std::uint64_t unit) {
  Deviations dev{};
  const Philox4x32Key key = philox_key(seed);
  for (const auto& in : inputs) {
    if (in.source == Source::board_temperature) continue;  // drawn per reading
    const auto w = philox4x32_10({static_cast<std::uint32_t>(unit), static_cast<std::uint32_t>(unit >> 32), unit_stream,
                                  static_cast<std::uint32_t>(in.source)},
                                 key);
    dev[static_cast<std::size_t>(in.source)] =
        draw_deviation(in, sigma_per_tol, unit_double(w[0], w[1]), unit_double(w[2], w[3]));
  }
  return dev;
}

Deviations draw_unit(const Design& d, std::uint64_t unit) {
  return with_drift(draw_unit(d.inputs, d.montecarlo.sigma_per_tol, d.montecarlo.seed, unit));
}

McPoint monte_carlo_model(const std::function<double(const Deviations&)>& model,
                          const std::vector<ToleranceInput>& inputs, double sigma_per_tol, std::uint64_t seed,
                          std::uint64_t units, double coverage) {
  // The same draws, histogram, pilot range and interval code as the chain's
  // engine, for a model given as a function (JCGM 101 §9 test cases).
  const std::vector<double> one{0.0};
  std::vector<Range> ranges(1);
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  for (std::uint64_t u = 0; u < std::min(units, pilot_units); ++u) {
    const double y = model(draw_unit(inputs, sigma_per_tol, seed, u));
    lo = std::min(lo, y);
    hi = std::max(hi, y);
  }
  if (lo <= hi) ranges[0] = {lo - std::max(0.5 * (hi - lo), 1e-6), (hi - lo) + 2 * std::max(0.5 * (hi - lo), 1e-6)};
  Accumulator acc(1);
  const double inv_width = histogram_bins / ranges[0].width;
  for (std::uint64_t u = 0; u < units; u += block_size) {
    double s1 = 0.0, s2 = 0.0;
    const std::uint64_t end = std::min(units, u + block_size);
    for (std::uint64_t k = u; k < end; ++k) {
      const double y = model(draw_unit(inputs, sigma_per_tol, seed, k));
      acc.valid[0]++;
      s1 += y;
      s2 += y * y;
      const double pos = (y - ranges[0].lo) * inv_width;
      if (pos < 0.0) acc.below[0].push_back(y);
      else if (pos >= histogram_bins) acc.above[0].push_back(y);
      else acc.hist[static_cast<std::size_t>(pos)]++;
    }
    acc.sum[0] += static_cast<long long>(std::floor(s1 * fixed_point_scale + 0.5));
    acc.sumsq[0] += static_cast<long long>(std::floor(s2 * fixed_point_scale + 0.5));
  }
  acc.units = units;
  return summarise(acc, one, ranges, coverage).front();
}

ReadingDraw draw_reading(const Design& d, std::uint64_t unit, std::uint32_t reading) {
  ReadingDraw r;
  const Philox4x32Key key = philox_key(d.montecarlo.seed);
  const auto w0 = reading_words(key, unit, reading, 0);
  r.board_u = uniform32(w0[2]);
  r.precharge_u = uniform32(w0[3]);
  for (int s = 0; s < d.adc.averaging; ++s)
    r.noise.push_back(d.adc.noise > 0.0 ? d.adc.noise * noise_sample(key, unit, reading, s) : 0.0);
  return r;
}

namespace {
// A unit's deviations with this reading's own draws: the board temperature
// and what another channel left on the sampling capacitor.
Deviations with_reading_draw(const Design& d, const Deviations& dev, const ReadingDraw& rd) {
  Deviations dv = dev;
  if (d.conditions.board.kind == BoardKind::range)
    dv[static_cast<std::size_t>(Source::board_temperature)] =
        d.conditions.board.min + (d.conditions.board.max - d.conditions.board.min) * rd.board_u - d.conditions.board.middle();
  if (d.adc.samples_settle() && d.adc.precharge == Precharge::any)
    dv[static_cast<std::size_t>(Source::adc_precharge)] = (rd.precharge_u - 0.5) * d.supply.v_reference_nominal();
  return dv;
}
}  // namespace

Evaluation simulate_reading(const Chain& chain, std::uint64_t unit, std::uint32_t t_index, double t) {
  const Design& d = chain.design();
  Deviations dev = draw_unit(d, unit);
  auto one = [&](double temp, std::uint32_t reading, CalibrationData* cal) -> Evaluation {
    const ReadingDraw rd = draw_reading(d, unit, reading);
    const Deviations dv = with_reading_draw(d, dev, rd);
    const FrontEnd fe = chain.front_end(dv, temp);
    if (fe.status != Status::ok) {
      Evaluation e;
      e.status = fe.status;
      return e;
    }
    const Reading r = sample_reading(fe.x_static, rd.noise.data(), d.adc.averaging, d.adc.quantizer, chain.max_code());
    return chain.finish(fe, temp, r, cal, true);
  };
  CalibrationData k;
  const int n = calibration_points(d.firmware.calibration);
  bool cal_ok = true;
  for (int i = 0; i < n; ++i) {
    const double t_cal = d.firmware.calibration_at[static_cast<std::size_t>(i)];
    // The calibration reading is reported uncalibrated: convert it directly.
    const ReadingDraw rd = draw_reading(d, unit, calibration_reading(i));
    const Deviations dv = with_reading_draw(d, dev, rd);
    const FrontEnd fe = chain.adc_stage(chain.analog_calibration_front_end(dv, t_cal), dv);
    if (fe.status != Status::ok) {
      cal_ok = false;
      break;
    }
    const Reading r = sample_reading(fe.x_static, rd.noise.data(), d.adc.averaging, d.adc.quantizer, chain.max_code());
    const auto tr = r.saturated ? std::nullopt : chain.convert(r.code, true);
    if (!tr) {
      cal_ok = false;
      break;
    }
    k.reported[i] = *tr;
    k.reference[i] = t_cal + dev[static_cast<std::size_t>(i == 0 ? Source::calibration_1 : Source::calibration_2)];
  }
  if (n == 2 && cal_ok && k.reported[0] == k.reported[1]) cal_ok = false;
  return one(t, t_index, (n > 0 && cal_ok) ? &k : nullptr);
}

namespace {
void simulate_block_with(const RunConstants& c, const std::vector<double>& temperatures, std::uint64_t first_unit,
                         int count, std::vector<double>& errors) {
  BlockUnits b;
  draw_block(c, b, first_unit, count);
  if (c.cal_points > 0) calibrate_block(c, b);
  errors.assign(static_cast<std::size_t>(count) * temperatures.size(), 0.0);
  alignas(64) double err[block_size];
  alignas(64) std::uint8_t status[block_size];
  for (std::size_t ti = 0; ti < temperatures.size(); ++ti) {
    errors_block(c, b, temperatures[ti], static_cast<std::uint32_t>(ti), err, status);
    for (int u = 0; u < count; ++u) errors[static_cast<std::size_t>(u) + ti * static_cast<std::size_t>(count)] = err[u];
  }
}
}  // namespace

void simulate_block(const Chain& chain, const std::vector<double>& temperatures, std::uint64_t first_unit, int count,
                    std::vector<double>& errors) {
  simulate_block_with(make_constants(chain), temperatures, first_unit, count, errors);
}

struct BlockKernel::Constants {
  RunConstants c;
};

BlockKernel::BlockKernel(const Chain& chain) : constants_(std::make_unique<Constants>(Constants{make_constants(chain)})) {}
BlockKernel::~BlockKernel() = default;

void BlockKernel::simulate(const std::vector<double>& temperatures, std::uint64_t first_unit, int count,
                           std::vector<double>& errors) const {
  simulate_block_with(constants_->c, temperatures, first_unit, count, errors);
}

double numerical_tolerance(double u, int significant) {
  if (!(u > 0.0)) return 0.0;
  const double l = std::floor(std::log10(u)) - (significant - 1);
  return 0.5 * std::pow(10.0, l);
}

bool linear_validated(double lin_low, double lin_high, double mc_low, double mc_high, double delta) {
  return std::fabs(lin_low - mc_low) <= delta && std::fabs(lin_high - mc_high) <= delta;
}

Interval clopper_pearson(std::uint64_t k, std::uint64_t n, double alpha) {
  using boost::math::binomial_distribution;
  const auto trials = static_cast<double>(n), successes = static_cast<double>(k);
  if (n == 0) return {0.0, 1.0};
  return {binomial_distribution<>::find_lower_bound_on_p(trials, successes, alpha / 2,
                                                         binomial_distribution<>::clopper_pearson_exact_interval),
          binomial_distribution<>::find_upper_bound_on_p(trials, successes, alpha / 2,
                                                         binomial_distribution<>::clopper_pearson_exact_interval)};
}

McResult monte_carlo(const Chain& chain, const std::vector<double>& temperatures, const McOptions& options) {
  const Design& d = chain.design();
  const RunConstants c = make_constants(chain);
  const std::size_t nt = temperatures.size();
  int threads = options.threads >= 0 ? options.threads : d.montecarlo.threads;
  threads = resolve_threads(threads);
  const std::uint64_t requested = options.units ? options.units : d.montecarlo.units;
  const bool adaptive = requested == 0;

  Job job{&c, &temperatures, nullptr, std::vector<std::uint8_t>(nt, 0), d.requirement.max_error};
  for (std::size_t i = 0; i < nt; ++i)
    job.in_window[i] = in_requirement_window(d.requirement, temperatures[i]);

  // The pilot: the first units fix each temperature's histogram range.
  std::vector<Range> ranges(nt);
  {
    const std::uint64_t n = adaptive ? pilot_units : std::min(requested, pilot_units);
    std::vector<double> lo(nt, std::numeric_limits<double>::infinity()), hi(nt, -std::numeric_limits<double>::infinity());
    std::vector<double> errs;
    for (std::uint64_t f = 0; f < n; f += block_size) {
      const int count = static_cast<int>(std::min<std::uint64_t>(block_size, n - f));
      simulate_block_with(c, temperatures, f, count, errs);
      for (std::size_t ti = 0; ti < nt; ++ti)
        for (int u = 0; u < count; ++u) {
          const double e = errs[static_cast<std::size_t>(u) + ti * static_cast<std::size_t>(count)];
          if (std::isnan(e)) continue;
          lo[ti] = std::min(lo[ti], e);
          hi[ti] = std::max(hi[ti], e);
        }
    }
    for (std::size_t ti = 0; ti < nt; ++ti) {
      if (!(lo[ti] <= hi[ti])) continue;  // keep the default range
      const double span = hi[ti] - lo[ti];
      const double pad = std::max(0.5 * span, 1e-6);
      ranges[ti] = {lo[ti] - pad, span + 2 * pad};
    }
  }
  job.ranges = &ranges;

  McResult result;
  McSummary& s = result.summary;
  s.coverage = d.montecarlo.coverage;
  s.adaptive = adaptive;
  Accumulator total(nt);
  if (!adaptive) {
    total = run_units(job, 0, requested, threads, options.progress, 0, requested);
  } else {
    // JCGM 101 §7.9: batches of h = max(100/(1 − p), 10⁴) trials until twice
    // the standard deviation of the batch results of y, u(y) and both
    // endpoints is within δ at every temperature of the window.
    const auto h = static_cast<std::uint64_t>(std::max(100.0 / (1.0 - d.montecarlo.coverage), 1e4));
    std::vector<std::vector<McPoint>> batches;
    std::uint64_t first = 0;
    s.converged = false;
    while (first + h <= d.montecarlo.max_units) {
      Accumulator a = run_units(job, first, h, threads, options.progress, first, d.montecarlo.max_units);
      batches.push_back(summarise(a, temperatures, ranges, d.montecarlo.coverage));
      total.merge(a);
      first += h;
      if (batches.size() < 2) continue;
      bool stable = true;
      const double hb = static_cast<double>(batches.size());
      for (std::size_t ti = 0; ti < nt && stable; ++ti) {
        if (!job.in_window[ti]) continue;
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
          if (2.0 * s_avg > delta) stable = false;
        }
      }
      if (stable) {
        s.converged = true;
        break;
      }
    }
  }
  result.points = summarise(total, temperatures, ranges, d.montecarlo.coverage);
  s.units = total.units;
  s.good_units = total.good_units;
  s.yield = s.units ? static_cast<double>(s.good_units) / static_cast<double>(s.units) : 0.0;
  const Interval ci = clopper_pearson(s.good_units, s.units);
  s.yield_low = ci.low;
  s.yield_high = ci.high;
  s.failures_per_million = 1e6 * (1.0 - s.yield);
  for (std::size_t ti = 0; ti < nt; ++ti) {
    if (!job.in_window[ti] || result.points[ti].valid == 0) continue;
    const double m = std::max(std::fabs(result.points[ti].low), std::fabs(result.points[ti].high));
    if (m > s.max_abs) {
      s.max_abs = m;
      s.max_abs_at = temperatures[ti];
    }
  }
  return result;
}

}  // namespace thermargin
