// The kernel's reading of a block of units at one temperature
// (docs/engines.md, "The kernel"): the chain's steps one function each,
// in the order a reading passes them, on a scratch of arrays with one value
// per unit, each step a loop over the block that the compiler vectorises.
// The same arithmetic as the scalar chain (chain.cpp), to the bit: the
// tests hold the two equal.
#include <algorithm>
#include <cmath>
#include <cstdint>
#include <iterator>
#include <optional>

#include <Eigen/Core>

#include "monte_carlo_kernel.hpp"
#include "monte_carlo_table.hpp"
#include "thermargin/chain/divider.hpp"
#include "thermargin/chain/self_heating.hpp"
#include "thermargin/chain/sensor.hpp"
#include "thermargin/chain/supply.hpp"
#include "thermargin/engines/monte_carlo.hpp"

namespace thermargin::mc_detail {

namespace {

using Block = Eigen::Array<double, block_size, 1>;

// The branch's resistance, series/(1 + series/R_par). Without a parallel
// resistor 1/R_par is 0 and the division is by 1 + series·0: series itself
// where series is finite, NaN where it is not; series + series·0 is the
// same in every case (series·0 is a zero of series' sign, NaN for an
// infinity or NaN), without the division.
template <bool HasPar>
inline double branch_of(double series, double inv_par) {
  if constexpr (HasPar) return series / (1.0 + series * inv_par);
  else return series + series * 0.0;
}

// One fixed-point step of the self-heating solve for the whole block (see
// self_heating.hpp); separate, with unaliased arrays, so that it vectorises.
// Returns how many units are still moving.
template <bool Simple, bool HasPar>
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
      const double rb = branch_of<HasPar>(series, inv_par[u]);
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

// The Newton step on F(T_e) = T + rise(T_e) − T_e at te, for an element of
// resistance r with d ln R/dT_e = l1 fed through rf: the rise there, x =
// R/(R_f + R), d rise/dT_e, the fixed-point step's T_e (next) and step, and
// the Newton increment. Shared by every sensor's first step below.
struct HeatingNewton {
  double rise, x, slope, next, step, delta;
};
[[gnu::always_inline]] inline HeatingNewton heating_newton(double r, double rf, double vexc, double gain, double t_k,
                                                           double te, double l1) {
  const double sum = rf + r;
  const double rise = gain * vexc * vexc * r / (sum * sum);
  const double x = r / sum;
  const double slope = rise * (1.0 - 2.0 * x) * l1;  // d rise/dT_e
  const double next = t_k + rise;
  const double step = next - te;
  return {rise, x, slope, next, step, step / (1.0 - slope)};
}

// Unit u's state after the first step: T_e at the Newton iterate where it
// was accepted (and `kept`, what the step found for its R, in out[u]), at
// the fixed-point step's elsewhere; still moving only where it was not.
// Returns whether the unit still moves.
[[gnu::always_inline]] inline bool first_step_taken(int u, bool accept, double te_newton, const HeatingNewton& n,
                                                    double kept, double* __restrict te, double* __restrict rise_prev,
                                                    double* __restrict moving, double* __restrict out) {
  const bool active = moving[u] != 0.0;
  te[u] = !active ? te[u] : accept ? te_newton : n.next;
  rise_prev[u] = active ? n.step : rise_prev[u];
  out[u] = (active & accept) ? kept : 0.0;
  moving[u] = (active & !accept) ? 1.0 : 0.0;
  return moving[u] != 0.0;
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
                              const double* __restrict b_unit, const double* __restrict inv_te, double* __restrict te,
                              double* __restrict rise_prev, double* __restrict moving, double* __restrict dln_r) {
  int open = 0;
  for (int u = 0; u < block_size; ++u) {
    const double inv_t = inv_te[u];  // 1/T_e, as element_resistance() took it
    const double l1 = -b_unit[u] * inv_t * inv_t, l2 = -2.0 * l1 * inv_t;
    const HeatingNewton n = heating_newton(r_el[u], rf[u], vexc[u], gain[u], t_k, te[u], l1);
    const double rise = n.rise, x = n.x, delta = n.delta;
    const double q = std::fabs(n.slope);
    const double te_newton = te[u] + delta;
    const double dl = b_unit[u] * (1.0 / te_newton - inv_t);
    // |F''| at T_e, plus what it can change over the step (its terms move
    // by a relative 4·|ΔL| at most while |ΔL| ≤ 1e-3), halved over |F'|.
    const double bound = rise * (l1 * l1 + std::fabs(l2));
    const double f2 = rise * (((1.0 - 2.0 * x) * (1.0 - 2.0 * x) - 2.0 * x * (1.0 - x)) * l1 * l1 + (1.0 - 2.0 * x) * l2);
    const double c = (std::fabs(f2) + 4.0 * std::fabs(dl) * bound) / (1.0 - std::min(q, 0.5));
    const bool accept = (q <= 0.5) & (c * delta * delta <= self_heating_tolerance) & (std::fabs(dl) <= 1e-3);
    open += first_step_taken(u, accept, te_newton, n, dl, te, rise_prev, moving, dln_r);
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

// A row of the block's deviations: one value per unit.
inline const double* row(const BlockUnits& b, Source s) { return b.dev[static_cast<int>(s)]; }

// What one reading of the block is: its temperature, its stream and the
// element's dissipation. A calibration reading self-heats in the
// calibration medium where one is set (firmware.calibration_dissipation,
// no unit deviation).
struct ReadingAt {
  double t = 0.0;              // °C, the true temperature
  double t_k = 0.0;            // K
  std::uint32_t reading = 0;   // the reading stream: the temperature's index or calibration_reading(i)
  bool calibration = false;
  bool medium = false;         // self-heating in the calibration medium
  double dissipation = 0.0;    // W/K, the dissipation constant this reading sees
  bool heated = false;         // self-heating on (a dissipation constant and a duty)
};

ReadingAt reading_at(const Design& d, double t, std::uint32_t reading, bool calibration) {
  ReadingAt at;
  at.t = t;
  at.t_k = t + kelvin_offset;
  at.reading = reading;
  at.calibration = calibration;
  at.medium = calibration && d.firmware.calibration_dissipation.has_value();
  at.dissipation = at.medium ? *d.firmware.calibration_dissipation : d.sensor.dissipation;
  at.heated = at.dissipation > 0.0 && d.divider.duty > 0.0;
  return at;
}

// The block's reading at one temperature, stage by stage: each array holds
// one value per unit (structure of arrays), written by one stage and read
// by the later ones.
struct ReadingScratch {
  alignas(64) double tb[block_size];         // the board temperature, °C
  alignas(64) double rf[block_size];         // the fixed resistor at the board temperature
  alignas(64) double rs[block_size];         // the fixed resistor and the drive in series
  alignas(64) double inv_par[block_size];    // 1/R_par, 0 without one
  alignas(64) double vexc[block_size];       // the excitation
  alignas(64) double vref[block_size];       // the ADC's reference
  alignas(64) double te[block_size];         // the element's temperature, K
  alignas(64) double inv_te[block_size];     // 1/te, a beta or table sensor's (element_resistance)
  alignas(64) double rise_prev[block_size];  // the self-heating solve's last step
  alignas(64) double dln_r[block_size];      // ln R's change over the Newton step
  alignas(64) double r_el[block_size];       // the element's resistance at te
  alignas(64) std::int32_t piece[block_size];  // a table's piece at te (table_ln_resistance)
  alignas(64) double ln_new[block_size];     // a table's or Steinhart–Hart's ln R after the Newton step
  alignas(64) double ln_curve[block_size];   // a Steinhart–Hart curve's ln R at te, before the unit's
  alignas(64) double xs[block_size];         // the ADC's static transfer, LSB
  alignas(64) double sum[block_size];        // the reading: the sum of the M samples
  alignas(64) double sat[block_size];        // 1 where a sample was clamped at a rail
  alignas(64) std::uint8_t status[block_size];
  BlockWords words;                          // the reading stream's current call
};

// Stage 1, the reading's own draws: the stream's first call, what another
// channel left on C_s (precharge = any) and the board temperature.
void draw_reading_block(const RunConstants& c, BlockUnits& b, const ReadingAt& at, ReadingScratch& s) {
  const Design& d = *c.d;
  const BoardTemperature board = d.conditions.board;
  if (board.kind == BoardKind::range || c.noise > 0.0 || c.precharge_any)
    reading_words_block(c.key, b.first, at.reading, 0, s.words);
  if (c.precharge_any) {
    // Per reading, like the board: uniform over [0, V_ref] (docs/model.md §14).
    const double v_ref_nom = d.supply.v_reference_nominal();
    double* pre = b.dev[static_cast<int>(Source::adc_precharge)];
    for (int u = 0; u < block_size; ++u) pre[u] = (uniform32(s.words.w[3][u]) - 0.5) * v_ref_nom;
  }
  if (board.kind == BoardKind::range) {
    const double lo = board.min, width = board.max - board.min;
    for (int u = 0; u < block_size; ++u) s.tb[u] = lo + width * uniform32(s.words.w[2][u]);
  } else {
    std::fill(std::begin(s.tb), std::end(s.tb), board.kind == BoardKind::fixed ? board.min : at.t);
  }
}

// Stage 2, the parts at the board temperature: the fixed resistor, the
// drive, the parallel resistor, the excitation and the reference.
void parts_block(const RunConstants& c, const BlockUnits& b, ReadingScratch& s) {
  // Design constants in locals: the loops below then see no possible aliasing.
  const Design& d = *c.d;
  const double r_fixed = d.divider.r_fixed, v_exc = d.supply.v_excitation, v_ref = d.supply.v_reference;
  const bool ratiometric = d.supply.ratiometric, has_par = d.divider.r_parallel.has_value();
  const double r_par = has_par ? *d.divider.r_parallel : 0.0;
  const double* d_rf = row(b, Source::r_fixed);
  const double* d_tc = row(b, Source::r_fixed_tempco);
  const double* d_par = row(b, Source::r_parallel);
  for (int u = 0; u < block_size; ++u) {
    s.rf[u] = r_fixed * (1.0 + d_rf[u]) * (1.0 + d_tc[u] * (s.tb[u] - 25.0));
    s.status[u] = 0;
  }
  // 1/R_par, 0 without one: (R ∥ R_par) = R / (1 + R/R_par).
  if (has_par)
    for (int u = 0; u < block_size; ++u) s.inv_par[u] = 1.0 / (r_par * (1.0 + d_par[u]));
  else
    std::fill(std::begin(s.inv_par), std::end(s.inv_par), 0.0);
  // The fixed resistor and the drive in series: what the element's
  // voltage sees wherever the sensor sits (docs/model.md §15).
  const double r_drive = d.supply.r_drive;
  const double* d_drv = row(b, Source::r_drive);
  for (int u = 0; u < block_size; ++u) s.rs[u] = s.rf[u] + r_drive * (1.0 + d_drv[u]);
  if (ratiometric) {
    std::fill(std::begin(s.vexc), std::end(s.vexc), v_exc);
    std::fill(std::begin(s.vref), std::end(s.vref), v_exc);
  } else {
    const double *e0 = row(b, Source::v_excitation), *e1 = row(b, Source::v_excitation_tempco);
    const double *r0 = row(b, Source::v_reference), *r1 = row(b, Source::v_reference_tempco);
    for (int u = 0; u < block_size; ++u) {
      s.vexc[u] = v_exc * (1.0 + e0[u]) * (1.0 + e1[u] * (s.tb[u] - 25.0));
      s.vref[u] = v_ref * (1.0 + r0[u]) * (1.0 + r1[u] * (s.tb[u] - 25.0));
    }
  }
}

// An RTD unit's curve at the element's temperature t (K): its class spread
// (a fraction of the class's bound) and the Callendar–Van Dusen curve, before
// its drift; not positive below the curve's range.
inline double rtd_curve(const CallendarVanDusen& k, const ClassLine& line, double spread, double t) {
  const double bound = class_bound(line, t - kelvin_offset);
  return resistance(k, (t + spread * bound) - kelvin_offset);
}

// An RTD's R at te[] into r_el[] (SensorUnit::ln_resistance, sensor.cpp):
// the class spread and the Callendar–Van Dusen curve, times 1 + drift, in a
// loop that vectorises. R itself, not exp(ln R) as the chain takes it: the
// same value to an ulp or two (the chain's round trip through the logarithm
// is the less exact of the two), and no logarithm, which does not vectorise
// (docs/engines.md, Speed). A unit whose R is not positive is out of table
// (R = 1 then, as exp(0) gave): marked in loops of their own, only when
// there is one (the statuses are bytes, and a loop of doubles that also
// writes bytes vectorises poorly). Returns whether it marked any.
[[gnu::always_inline]] inline bool rtd_resistance(const RunConstants& c, const BlockUnits& b, ReadingScratch& s) {
  const CallendarVanDusen k = c.d->sensor.cvd;
  const ClassLine line = c.rtd_line;
  const double* spread = row(b, Source::rtd_class);
  const double* drift = row(b, Source::sensor_drift);
  constexpr auto out_of_table = static_cast<std::uint8_t>(Status::out_of_table);
  alignas(64) double r_curve[block_size];
  for (int u = 0; u < block_size; ++u) {
    const double r = rtd_curve(k, line, spread[u], s.te[u]);
    r_curve[u] = r;
    s.r_el[u] = r > 0.0 ? r * (1.0 + drift[u]) : 1.0;
  }
  int out = 0;
  for (int u = 0; u < block_size; ++u) out += !(r_curve[u] > 0.0);
  if (out == 0) return false;
  for (int u = 0; u < block_size; ++u) s.status[u] = r_curve[u] > 0.0 ? s.status[u] : out_of_table;
  return true;
}

// The table's unit ln R at v[] (1/T) in piece[] into l[] where inside[] is
// set, 0 elsewhere (table_ln_resistance). The table's arrays as __restrict
// parameters (TableView), so that the loop may gather from them while it
// stores to the scratch (it vectorises).
template <bool Limits>
void table_pieces_ln(const TablePieces& k, const double* __restrict xs, const double* __restrict ys,
                     const double* __restrict ss, const double* __restrict sys, const double* __restrict sss,
                     double ln_r0, const double* __restrict z, const double* __restrict d_beta,
                     const double* __restrict shift, const double* __restrict drift,
                     const std::int32_t* __restrict piece, const double* __restrict v,
                     const double* __restrict inside, double* __restrict l) {
  const TableView t(TableView(k), xs, ys, ss, sys, sss);
  for (int u = 0; u < block_size; ++u) {
    const double unit =
        ntc_unit_ln(table_ln_at<Limits>(t, piece[u], v[u], z[u]), ln_r0, shift[u], 1.0 + d_beta[u], drift[u]);
    l[u] = inside[u] != 0.0 ? unit : 0.0;
  }
}

// A table sensor's ln R at te[] into r_el[] (SensorUnit::ln_resistance,
// sensor.cpp): the table's PCHIP and, with limit columns, the unit's share
// of its spread, then the stretch about T0 and the drift, the same
// operations in the same order, in loops without branches
// (monte_carlo_table.hpp): 1/T, each unit's piece (kept in piece[] for the
// Newton step), the pieces. A unit outside the table is marked out of table
// (ln R = 0, as the general loop leaves it), in a loop of its own and only
// when there is one. Returns whether it marked any.
[[gnu::always_inline]] inline bool table_ln_resistance(const RunConstants& c, const BlockUnits& b, ReadingScratch& s) {
  const double t_lo = c.table->t_lo, t_hi = c.table->t_hi, ln_r0 = c.chain->sensor_curve().ln_r0;
  const bool limits = c.table->limits;
  const double* z = row(b, Source::table_spread);
  const double* d_beta = row(b, Source::beta);
  alignas(64) double inside[block_size];
  for (int u = 0; u < block_size; ++u) {
    const double t = s.te[u];
    // RtTable::covers; a unit outside is evaluated at the range's end, then dropped.
    const bool in = (t >= t_lo) & (t <= t_hi);
    s.inv_te[u] = 1.0 / (in ? t : t_lo);  // v = 1/T, kept for the Newton step
    // A spread without limit columns has no value (RtTable::spread): out of table.
    inside[u] = (in & ((z[u] == 0.0) | limits)) ? 1.0 : 0.0;
  }
  pieces_block(*c.table, s.inv_te, s.piece);
  const TablePieces& k = *c.table;
  const auto pieces = limits ? table_pieces_ln<true> : table_pieces_ln<false>;
  pieces(k, k.x.data(), k.y.data(), k.s.data(), k.sy.data(), k.ss.data(), ln_r0, z, d_beta, b.ln_r25, b.ln_drift,
         s.piece, s.inv_te, inside, s.r_el);
  int out = 0;
  for (int u = 0; u < block_size; ++u) out += inside[u] == 0.0;
  if (out == 0) return false;
  constexpr auto out_of_table = static_cast<std::uint8_t>(Status::out_of_table);
  for (int u = 0; u < block_size; ++u) s.status[u] = inside[u] != 0.0 ? s.status[u] : out_of_table;
  return true;
}

// Newton's error term over I = T_e ± reach for the table's and the
// Steinhart–Hart sensor's first step (table_newton_first), from bounds L1,
// L2 of |d ln R/dT| and |d² ln R/dT²| on I and w·reach ≤ ½: ln R moves by
// at most a = L1·reach there, the rise by at most a relative 2a, the loop
// gain is q ≤ rise_max·L1 and the iterate within 4.5·|F''|/(1 − q)·δ² ≤
// 9·rise_max·(L1² + L2)·δ² of the root. Whether that is within the solve's
// tolerance, with q ≤ ½ and a ≤ 1e-3.
[[gnu::always_inline]] inline bool error_term_accepts(double rise, double big_l1, double big_l2, double reach, double v,
                                                      double delta) {
  const double a = big_l1 * reach;  // |Δ ln R| over I
  const double rise_max = rise * (1.0 + 2.0 * a);
  const double q = rise_max * big_l1;
  const double f2 = rise_max * (big_l1 * big_l1 + big_l2);
  const double error = 9.0 * f2 * delta * delta;  // 4.5·f2/(1 − q)·δ², q ≤ ½
  return (q <= 0.5) & (a <= 1e-3) & (reach * v <= 0.5) & (error <= self_heating_tolerance);
}

// The first step of the self-heating solve for a table sensor without
// leads or a parallel resistor: the beta sensor's Newton step
// (self_heating_newton_first) with ln R and its slope from the unit's piece
// of the table (table_ln_resistance kept it). Newton's error term again,
// with bounds that hold over all of I = T_e ± 4|δ|: |d ln R/dT| ≤ L1 =
// |stretch|·m1·w², |d² ln R/dT²| ≤ L2 = |stretch|·(m2·w⁴ + 2·m1·w³), w a
// bound of 1/T on I (m1, m2 the table's bounds of |p'|, |p''|, spread
// included: PCHIP's p' is continuous and p'' bounded on every piece, which
// is all the error term asks), rise at most rise·(1 + 2·L1·4|δ|) on I (the
// power of a resistor fed by a linear network moves by at most |d ln R|),
// so |F''| ≤ rise_max·(L1² + L2) and the loop gain q ≤ rise_max·L1 on I.
// With q ≤ ½ the root is within 3|δ| of T_e, inside I, and the iterate
// within 4.5·|F''|/(1 − q)·δ² ≤ 9·|F''|·δ² of it (the bounds' widening by
// 1e-6 covers the rounding of this arithmetic). A unit is accepted when
// that is within the solve's tolerance, I lies in the table, the iterate is
// more than 1e-6 K inside it and stays in the same piece: its ln R there is
// then the piece's own value (table_ln_at, to the bit what the table gives
// at that T_e), kept in ln_new for the element's R after the solve. The
// others take the plain fixed-point step and go on as before. The table's
// arrays come as __restrict parameters (TableView), so that the loop may
// gather from them while it stores to the scratch (it vectorises).
template <bool Limits>
int table_newton_first(const TablePieces& k, const double* __restrict xs, const double* __restrict ys,
                       const double* __restrict ss, const double* __restrict sys, const double* __restrict sss,
                       double ln_r0, double t_k, const double* __restrict z, const double* __restrict d_beta,
                       const double* __restrict shift, const double* __restrict drift,
                       const std::int32_t* __restrict piece, const double* __restrict inv_te,
                       const double* __restrict r_el,
                       const double* __restrict rf, const double* __restrict vexc, const double* __restrict gain,
                       double* __restrict te_io, double* __restrict rise_prev, double* __restrict moving,
                       double* __restrict ln_new) {
  const TableView t(TableView(k), xs, ys, ss, sys, sss);
  const double t_lo = k.t_lo, t_hi = k.t_hi;
  const double cm1 = k.curve_m1, cm2 = k.curve_m2, um1 = k.upper_m1, um2 = k.upper_m2, lm1 = k.lower_m1,
               lm2 = k.lower_m2;
  int open = 0;
  for (int u = 0; u < block_size; ++u) {
    const double te = te_io[u], v = inv_te[u];  // 1/T_e, as table_ln_resistance took it
    const int i = piece[u];
    const double zu = z[u], stretch = 1.0 + d_beta[u];
    const double l1 = -stretch * table_ln_slope_at<Limits>(t, i, v, zu) * v * v;  // d ln R/dT_e
    const HeatingNewton n = heating_newton(r_el[u], rf[u], vexc[u], gain[u], t_k, te, l1);
    const double delta = n.delta;
    const double te_newton = te + delta;
    // The error term over I, where 1/T ≤ w = v·(1 + 2·reach·v) (1/(1 − ε) ≤
    // 1 + 2ε for ε ≤ ½).
    const double reach = 4.0 * std::fabs(delta), t_min = te - reach, w = v * (1.0 + 2.0 * reach * v);
    const double share = Limits ? std::fabs(zu) : 0.0;
    const double m1 = std::fabs(stretch) * (cm1 + share * (zu > 0.0 ? um1 : lm1));
    const double m2 = std::fabs(stretch) * (cm2 + share * (zu > 0.0 ? um2 : lm2));
    const double big_l1 = m1 * w * w, big_l2 = (m2 * w + 2.0 * m1) * w * w * w;
    const double v_new = 1.0 / te_newton;
    const bool inside = (t_min >= t_lo) & (te + reach <= t_hi) & (te_newton >= t_lo + 1e-6) & (te_newton <= t_hi - 1e-6);
    const bool same_piece = (v_new >= t.x[i]) & (v_new < t.x[i + 1]);
    const bool accept = error_term_accepts(n.rise, big_l1, big_l2, reach, v, delta) & inside & same_piece;
    const double l_new =
        ntc_unit_ln(table_ln_at<Limits>(t, i, v_new, zu), ln_r0, shift[u], stretch, drift[u]);
    open += first_step_taken(u, accept, te_newton, n, l_new, te_io, rise_prev, moving, ln_new);
  }
  return open;
}

int table_newton_block(const RunConstants& c, const BlockUnits& b, double t_k, const double* gain, ReadingScratch& s,
                       double* moving) {
  const TablePieces& k = *c.table;
  const double ln_r0 = c.chain->sensor_curve().ln_r0;
  const auto step = k.limits ? table_newton_first<true> : table_newton_first<false>;
  return step(k, k.x.data(), k.y.data(), k.s.data(), k.sy.data(), k.ss.data(), ln_r0, t_k,
              row(b, Source::table_spread), row(b, Source::beta), b.ln_r25, b.ln_drift, s.piece, s.inv_te, s.r_el,
              s.rs, s.vexc,
              gain, s.te, s.rise_prev, moving, s.ln_new);
}

// The first step of the self-heating solve for a Steinhart–Hart sensor
// without leads or a parallel resistor: the table's Newton step
// (table_newton_first) with the curve's slope in closed form. With l the
// curve's ln R (1/T = A + B·l + C·l³, B > 0 and C ≥ 0 as the reader
// requires) and g = B + 3C·l² ≥ B: dl/dT = −1/(T²·g), so |dl/dT| ≤ w²/B,
// and d²l/dT² = 2/(T³·g) + 6C·l·(dl/dT)/(T²·g²), so |d²l/dT²| ≤ 2w³/B +
// 6C·|l|·w⁴/B³, w a bound of 1/T and |l| of the curve's ln R on I; the
// unit's ln R is the stretch times these. The same acceptance as the
// table's, without its range and pieces: the curve has a value at every
// temperature, and ln R at the iterate is the chain's own function there.
int steinhart_hart_newton_first(const SteinhartHart sh, double ln_r0, double t_k, const double* __restrict d_beta,
                                const double* __restrict shift, const double* __restrict drift,
                                const double* __restrict ln_curve, const double* __restrict r_el,
                                const double* __restrict rf, const double* __restrict vexc,
                                const double* __restrict gain, double* __restrict te_io, double* __restrict rise_prev,
                                double* __restrict moving, double* __restrict ln_new) {
  int open = 0;
  for (int u = 0; u < block_size; ++u) {
    const double te = te_io[u], v = 1.0 / te;
    const double l = ln_curve[u], stretch = 1.0 + d_beta[u];
    const double l1 = -stretch * v * v / (sh.b + 3.0 * sh.c * l * l);  // d ln R/dT_e
    const HeatingNewton n = heating_newton(r_el[u], rf[u], vexc[u], gain[u], t_k, te, l1);
    const double delta = n.delta;
    const double te_newton = te + delta;
    // The error term over I = T_e ± 4|δ|, where 1/T ≤ w (as the table's).
    const double reach = 4.0 * std::fabs(delta), w = v * (1.0 + 2.0 * reach * v);
    const double curve_l1 = w * w / sh.b;
    const double l_max = std::fabs(l) + curve_l1 * reach;
    const double big_l1 = std::fabs(stretch) * curve_l1 * (1.0 + 1e-6);
    const double big_l2 =
        std::fabs(stretch) * (2.0 * w * w * w / sh.b + 6.0 * sh.c * l_max * curve_l1 * curve_l1 / sh.b) * (1.0 + 1e-6);
    const bool accept = error_term_accepts(n.rise, big_l1, big_l2, reach, v, delta);
    const double l_new = ntc_unit_ln(ln_resistance(sh, te_newton), ln_r0, shift[u], stretch, drift[u]);
    open += first_step_taken(u, accept, te_newton, n, l_new, te_io, rise_prev, moving, ln_new);
  }
  return open;
}

int steinhart_hart_newton_block(const RunConstants& c, const BlockUnits& b, double t_k, const double* gain,
                                ReadingScratch& s, double* moving) {
  return steinhart_hart_newton_first(c.d->sensor.sh, c.chain->sensor_curve().ln_r0, t_k, row(b, Source::beta),
                                     b.ln_r25, b.ln_drift, s.ln_curve, s.r_el, s.rs, s.vexc, gain, s.te, s.rise_prev,
                                     moving, s.ln_new);
}

// The element's R at te[] into r_el[]: ln R, then a vector exp (an RTD's
// R directly, above). A unit
// whose sensor cannot be read there is marked out of table. Inlined at both
// calls, as every stage is, so that the compiler sees the scratch arrays as
// read_block's own and vectorises without run-time alias checks. Returns
// whether it may have marked a unit (a beta or Steinhart–Hart sensor never
// does).
[[gnu::always_inline]] inline bool element_resistance(const RunConstants& c, const BlockUnits& b, ReadingScratch& s) {
  bool marked = false;
  if (c.beta_fast) {
    const double ln_r25 = c.ln_r25, beta = c.beta, ln_r0 = c.ln_r0;
    const double* d_beta = row(b, Source::beta);
    const double* shift = b.ln_shift;
    for (int u = 0; u < block_size; ++u) {
      const double inv_t = 1.0 / s.te[u];
      s.inv_te[u] = inv_t;  // the Newton step's 1/T_e: one division, not two
      const double l = ln_r25 + beta * (inv_t - 1.0 / t0_kelvin);
      s.r_el[u] = ln_r0 + shift[u] + (1.0 + d_beta[u]) * (l - ln_r0);
    }
  } else if (c.rtd) {
    return rtd_resistance(c, b, s);
  } else if (c.table) {
    marked = table_ln_resistance(c, b, s);
  } else {
    // Steinhart–Hart, the one kind left: the curve's closed form (the
    // chain's own function, ntc.cpp; its cube roots keep this loop scalar)
    // and the unit's stretch, shift and drift as SensorUnit takes them, with
    // ln(1 + δR) and ln(1 + drift) taken once a block (draw_block). The curve
    // has a value at every temperature: nothing to mark.
    const SteinhartHart sh = c.d->sensor.sh;
    const double ln_r0 = c.chain->sensor_curve().ln_r0;
    const double* d_beta = row(b, Source::beta);
    for (int u = 0; u < block_size; ++u) {
      const double l = ln_resistance(sh, s.te[u]);
      s.ln_curve[u] = l;  // for the Newton step's slope
      s.r_el[u] = ntc_unit_ln(l, ln_r0, b.ln_r25[u], 1.0 + d_beta[u], b.ln_drift[u]);
    }
  }
  Eigen::Map<Block> m(s.r_el);
  m = m.exp();
  return marked;
}

// Stage 3, the element's temperature: the self-heating solve for the block
// (or te = T without self-heating), starting from each unit's last rise.
// Sets runaway where the solve diverged. Returns whether every unit was
// solved by the first (Newton) step, its dln_r (beta) or ln_new (table) then set.
bool solve_element_temperature(const RunConstants& c, BlockUnits& b, const ReadingAt& at, ReadingScratch& s) {
  const double t_k = at.t_k;
  for (int u = 0; u < block_size; ++u) {
    s.te[u] = t_k + b.rise_guess[u];
    s.rise_prev[u] = 0.0;
  }
  if (!at.heated) return false;
  const Design& d = *c.d;
  const double r_lead = d.sensor.lead_resistance;
  const bool has_par = d.divider.r_parallel.has_value();
  alignas(64) double medium_gain[block_size], moving[block_size], runaway_flag[block_size];
  for (int u = 0; u < block_size; ++u) {
    moving[u] = 1.0;
    runaway_flag[u] = 0.0;
  }
  // The gain duty/δ: in service the block's (draw_block), in the
  // calibration medium its own dissipation constant without a deviation.
  const double* gain = b.heat_gain;
  if (at.medium) {
    std::fill(std::begin(medium_gain), std::end(medium_gain), d.divider.duty / at.dissipation);
    gain = medium_gain;
  }
  const bool simple = r_lead == 0.0 && !has_par;
  const bool steinhart_hart = c.d->sensor.kind == SensorKind::steinhart_hart;
  const bool newton = simple && (c.beta_fast || c.table || steinhart_hart);
  const double* b_unit = b.beta_unit;
  bool resolved_at_first = false, marked_any = false;
  for (int it = 1; it <= self_heating_max_iterations; ++it) {
    // Units the element marked stop moving (the statuses are all 0 until
    // the element marks one).
    const bool marked = element_resistance(c, b, s);
    marked_any |= marked;
    if (marked)
      for (int u = 0; u < block_size; ++u) moving[u] = s.status[u] == 0 ? moving[u] : 0.0;
    const int open =
        (newton && it == 1 && steinhart_hart) ? steinhart_hart_newton_block(c, b, t_k, gain, s, moving)
        : (newton && it == 1 && c.table)
            ? table_newton_block(c, b, t_k, gain, s, moving)
        : (newton && it == 1)
            ? self_heating_newton_first(t_k, s.r_el, s.rs, s.vexc, gain, b_unit, s.inv_te, s.te, s.rise_prev, moving,
                                        s.dln_r)
        : simple  ? self_heating_step<true, false>(it, t_k, r_lead, s.r_el, s.rs, s.vexc, s.inv_par, gain, s.te,
                                                   s.rise_prev, runaway_flag, moving)
        : has_par ? self_heating_step<false, true>(it, t_k, r_lead, s.r_el, s.rs, s.vexc, s.inv_par, gain, s.te,
                                                   s.rise_prev, runaway_flag, moving)
                  : self_heating_step<false, false>(it, t_k, r_lead, s.r_el, s.rs, s.vexc, s.inv_par, gain, s.te,
                                                    s.rise_prev, runaway_flag, moving);
    if (open == 0) {
      resolved_at_first = newton && it == 1;
      break;
    }
  }
  if (!marked_any)
    for (int u = 0; u < block_size; ++u) b.rise_guess[u] = s.te[u] - t_k;
  else
    for (int u = 0; u < block_size; ++u) b.rise_guess[u] = s.status[u] == 0 ? s.te[u] - t_k : 0.0;
  // Still moving after the last iteration, or a step that grew: runaway.
  // Branch-free, so that it vectorises. Nothing to mark when the Newton
  // step settled every unit (moving and the flags all 0).
  if (resolved_at_first) return true;
  constexpr auto runaway = static_cast<std::uint8_t>(Status::runaway);
  for (int u = 0; u < block_size; ++u) {
    const bool diverged = (moving[u] != 0.0) | (runaway_flag[u] != 0.0);
    s.status[u] = (diverged & (s.status[u] == 0)) ? runaway : s.status[u];
  }
  return resolved_at_first;
}

// Stage 4, the element's R at its solved temperature.
void element_at_solution(const RunConstants& c, const BlockUnits& b, bool resolved_at_first, ReadingScratch& s) {
  if (!resolved_at_first) {
    element_resistance(c, b, s);
    return;
  }
  if (c.table || c.d->sensor.kind == SensorKind::steinhart_hart) {
    // A table's or Steinhart–Hart units: the curve's ln R at the new T_e,
    // from the step (table_newton_first, steinhart_hart_newton_first); 0
    // for a unit marked out of table, whose R is 1 as element_resistance
    // leaves it.
    Eigen::Map<Block> m(s.r_el);
    m = Eigen::Map<const Block>(s.ln_new).exp();
    return;
  }
  // Every unit took the Newton step: R at the new T_e from R at the old
  // one, R·e^{ΔL} with |ΔL| ≤ 1e-3 by a series to ΔL³ (relative error
  // below ΔL⁴/24 ≈ 4e-14).
  const double* dl = s.dln_r;
  for (int u = 0; u < block_size; ++u) {
    const double y = dl[u];
    s.r_el[u] *= 1.0 + y * (1.0 + y * (0.5 + y * (1.0 / 6.0)));
  }
}

// The ADC's static transfer of the node's voltage (adc_static, adc.hpp).
// The span is 2^N, so x/span is x·2^−N to the bit (both the correctly
// rounded value of the same real number): a multiplication. The bow is
// taken only where adc.inl_shape = bow reads it.
template <bool InlBound>
void static_transfer_block(const RunConstants& c, const BlockUnits& b, const double* __restrict v_node,
                           ReadingScratch& s) {
  const double span = c.span, inv_span = 1.0 / c.span;
  const double *g = row(b, Source::adc_gain), *o = row(b, Source::adc_offset), *i = row(b, Source::adc_inl);
  const double *g_tc = row(b, Source::adc_gain_tempco), *o_tc = row(b, Source::adc_offset_tempco);
  for (int u = 0; u < block_size; ++u) {
    const double x = v_node[u] / s.vref[u] * span;
    const double drift = s.tb[u] - 25.0;  // the ADC's offset and gain drift (docs/model.md §5)
    double inl = i[u];                    // adc.inl_shape = bound: i[u] at every code
    if constexpr (!InlBound) {
      const double q = x * inv_span;
      inl = i[u] * 4.0 * q * (1.0 - q);
    }
    s.xs[u] = x * (1.0 + (g[u] + g_tc[u] * drift)) + (o[u] + o_tc[u] * drift) + inl;
#ifdef THERMARGIN_BREAK_TERM_adc_inl  // a throwaway test build's deliberate bug (DEVELOPERS.md)
    s.xs[u] = x * (1.0 + (g[u] + g_tc[u] * drift)) + (o[u] + o_tc[u] * drift);
#endif
  }
}

// Stage 5, the divider (its arms with the drive, divider.hpp), leakage, the
// sampled node and the ADC's static transfer into xs[].
template <bool HasPar>
void divider_block(const RunConstants& c, const BlockUnits& b, ReadingScratch& s, double* __restrict v_node,
                   double* __restrict r_th) {
  const double r_lead = c.d->sensor.lead_resistance;
  const bool low = c.d->divider.placement == Placement::low;
  const double* leak = row(b, Source::adc_leakage);
  for (int u = 0; u < block_size; ++u) {
    const double r = s.r_el[u];
    const double series = r + r_lead;
    const double rb = branch_of<HasPar>(series, s.inv_par[u]);
    const double drive = s.rs[u] - s.rf[u];
    const double top = low ? s.rs[u] : rb + drive, bottom = low ? rb : s.rf[u];
    const double ratio = bottom / (top + bottom);
    r_th[u] = top * bottom / (top + bottom);
    v_node[u] = s.vexc[u] * ratio - leak[u] * r_th[u];
  }
}

void divider_and_adc(const RunConstants& c, const BlockUnits& b, ReadingScratch& s) {
  alignas(64) double v_node[block_size], r_th[block_size];
  if (c.d->divider.r_parallel.has_value()) divider_block<true>(c, b, s, v_node, r_th);
  else divider_block<false>(c, b, s, v_node, r_th);
  if (c.acquisition.on) settle_block(c, row(b, Source::adc_precharge), s.vref, r_th, v_node);
  if (c.d->adc.inl_bound) static_transfer_block<true>(c, b, v_node, s);
  else static_transfer_block<false>(c, b, v_node, s);
}

// Whether unit u goes to the scalar chain: heated by more than 1 K, or a
// runaway for it to confirm.
inline bool hot_unit(const ReadingScratch& s, const ReadingAt& at, int u) {
  return (s.te[u] - at.t_k > 1.0) | (s.status[u] == static_cast<std::uint8_t>(Status::runaway));
}

// An RTD unit's loop gain d rise/dT at the true temperature, by the chain's
// own probe (chain.cpp) on the kernel's values of the unit's parts.
double rtd_loop_gain(const RunConstants& c, const BlockUnits& b, const ReadingAt& at, const ReadingScratch& s, int u) {
  const Design& d = *c.d;
  const double gain = at.medium ? d.divider.duty / at.dissipation : b.heat_gain[u];
  const std::optional<double> r_par =
      d.divider.r_parallel ? std::optional<double>(1.0 / s.inv_par[u]) : std::nullopt;
  const auto rise_at = [&](double t_k) {
    const double r = rtd_curve(d.sensor.cvd, c.rtd_line, row(b, Source::rtd_class)[u], t_k) *
                     (1.0 + row(b, Source::sensor_drift)[u]);
    const double v = element_voltage(d.divider.placement, s.vexc[u], s.rs[u], r, d.sensor.lead_resistance, r_par);
    return gain * v * v / r;
  };
  return (rise_at(at.t_k + runaway_probe) - rise_at(at.t_k)) / runaway_probe;
}

// Whether the kernel's own solution of a hot RTD unit stands: solved
// without a status, a rise of at most 10 K and a loop gain below ½ at the
// true temperature. An RTD's |d ln R/dT| is 0.0039/K at 0 °C and 0.023/K
// at −200 °C (computed from IEC 60751's coefficients), so its loop gain, at
// most rise·|d ln R/dT| (the power of a resistor fed by any linear network
// moves by at most |d ln R|), stays near ¼ or below over such a rise, its
// class spread's slope changing that by a percent: the fixed point is unique, both
// solves converge to it within their tolerance, and the chain's probe
// cannot see a runaway. The probe guards curves of the user's own
// coefficients near the bottom of their range.
bool rtd_solution_stands(const RunConstants& c, const BlockUnits& b, const ReadingAt& at, const ReadingScratch& s,
                         int u) {
  return c.rtd && s.status[u] == 0 && s.te[u] - at.t_k <= 10.0 && rtd_loop_gain(c, b, at, s, u) < 0.5;
}

// Stage 6: a unit heated by more than 1 K is handed to the scalar chain,
// which checks the loop gain at the true temperature for runaway
// (chain.cpp): a loop gain of 1 needs a rise of at least 1/|d ln R/dT|,
// tens of kelvin for any NTC, so this is rare and costs nothing in
// ordinary NTC designs. An RTD's unit is handed over only where its loop
// gain could come near 1 (rtd_solution_stands): a well-heated RTD design
// is otherwise read by the chain unit by unit, some twenty times slower.
void hot_units_by_chain(const RunConstants& c, const BlockUnits& b, const ReadingAt& at, ReadingScratch& s) {
  // Counted first in a loop that vectorises: most blocks have none.
  int hot = 0;
  for (int u = 0; u < block_size; ++u) hot += hot_unit(s, at, u);
  if (hot == 0) return;
  const BoardTemperature board = c.d->conditions.board;
  for (int u = 0; u < block_size; ++u) {
    if (!hot_unit(s, at, u) || rtd_solution_stands(c, b, at, s, u)) continue;
    Deviations unit{};
    for (int k = 0; k < source_count; ++k) unit[static_cast<std::size_t>(k)] = b.dev[k][u];
    if (board.kind == BoardKind::range) unit[static_cast<std::size_t>(Source::board_temperature)] = s.tb[u] - board.middle();
    const FrontEnd fe = at.calibration ? c.chain->adc_stage(c.chain->analog_calibration_front_end(unit, at.t), unit)
                                       : c.chain->front_end(unit, at.t);
    s.status[u] = static_cast<std::uint8_t>(fe.status);
    s.xs[u] = fe.status == Status::ok ? fe.x_static : 0.0;
  }
}

// Stage 7, the samples: noise, quantiser, clamping; the reading is the sum
// of M samples.
void sample_block(const RunConstants& c, const BlockUnits& b, const ReadingAt& at, ReadingScratch& s) {
  const double max_code = c.max_code;
  alignas(64) double noise[block_size];
  std::fill(std::begin(s.sum), std::end(s.sum), 0.0);
  std::fill(std::begin(s.sat), std::end(s.sat), 0.0);
  if (!(c.noise > 0.0)) std::fill(std::begin(noise), std::end(noise), 0.0);  // else normals_block() writes it
  const double q_offset = c.d->adc.quantizer == Quantizer::round ? 0.5 : 0.0;
  for (int k = 0; k < c.m; ++k) {
    if (c.noise > 0.0) {
      if (k > 0 && !noise_high_words(k)) reading_words_block(c.key, b.first, at.reading, noise_call(k), s.words);
      const int pair = noise_high_words(k) ? 2 : 0;
      normals_block(s.words.w[pair], s.words.w[pair + 1], c.noise, noise);
    }
    for (int u = 0; u < block_size; ++u) {
      const double v = std::floor(s.xs[u] + noise[u] + q_offset);
      const bool lo = v < 0.0, hi = v > max_code;
      s.sat[u] = (lo | hi) ? 1.0 : s.sat[u];
      s.sum[u] += std::clamp(v, 0.0, max_code);
    }
  }
}

// Stage 8, the firmware's conversion of the reading into reported[]; the
// status of a saturated reading or one without a solution.
void convert_block(const RunConstants& c, ReadingScratch& s, double* reported) {
  constexpr auto saturated = static_cast<std::uint8_t>(Status::saturated);
  constexpr auto no_solution = static_cast<std::uint8_t>(Status::no_solution);
  if (c.table_conversion) {
    // Branch-free so that it vectorises (the table lookup is a gather). The
    // index through a 32-bit integer (the table has at most 2^22 entries):
    // AVX2 has no vector conversion of a double to a 64-bit integer.
    const double* table = c.conversion->data();
    alignas(64) double tr[block_size];
    for (int u = 0; u < block_size; ++u) tr[u] = table[static_cast<std::int32_t>(s.sum[u])];
    for (int u = 0; u < block_size; ++u) {
      std::uint8_t st = s.status[u];
      st = ((st == 0) & (s.sat[u] != 0.0)) ? saturated : st;
      st = ((st == 0) & (tr[u] != tr[u])) ? no_solution : st;  // NaN: no conversion
      reported[u] = st == 0 ? tr[u] : 0.0;
      s.status[u] = st;
    }
  } else {
    for (int u = 0; u < block_size; ++u) {
      if (s.status[u] == 0 && s.sat[u] != 0.0) s.status[u] = saturated;
      const auto v = s.status[u] == 0 ? c.chain->convert(s.sum[u] / c.m, true) : std::nullopt;
      if (s.status[u] == 0 && !v) s.status[u] = no_solution;
      reported[u] = v ? *v : 0.0;
    }
  }
}

}  // namespace

void read_block(const RunConstants& c, BlockUnits& b, double t, std::uint32_t reading, double* reported,
                std::uint8_t* status, bool calibration) {
  const ReadingAt at = reading_at(*c.d, t, reading, calibration);
  ReadingScratch s;
  draw_reading_block(c, b, at, s);
  parts_block(c, b, s);
  const bool resolved_at_first = solve_element_temperature(c, b, at, s);
  element_at_solution(c, b, resolved_at_first, s);
  divider_and_adc(c, b, s);
  if (at.heated) hot_units_by_chain(c, b, at, s);
  sample_block(c, b, at, s);
  convert_block(c, s, reported);
  std::copy(std::begin(s.status), std::end(s.status), status);
}

}  // namespace thermargin::mc_detail
