// The sampled node: the ADC's acquisition (docs/model.md §14).
//
// The divider is its Thevenin equivalent V_th, R_th (Thevenin's theorem,
// textbook) with an optional capacitor C_n from the node to ground; the ADC
// closes a switch R_sw onto its sampling capacitor C_s for t_acq once every
// sample period T_s and digitises what C_s holds then. While the switch is
// closed (C_n > 0):
//
//     C_n·dV_n/dt = (V_th − V_n)/R_th − (V_n − V_s)/R_sw
//     C_s·dV_s/dt = (V_n − V_s)/R_sw
//
// and while it is open C_n·dV_n/dt = (V_th − V_n)/R_th. Both are linear with
// the equilibrium V_n = V_s = V_th, so the deviations e = (V_n − V_th,
// V_s − V_th) evolve as e(t) = exp(A·t)·e(0): solved exactly with the 2×2
// matrix exponential in closed form (two real eigenvalues, always distinct
// for this network), never stepped in time. With C_n = 0 the node is
// algebraic and e_s(t) = e^(−t/((R_th + R_sw)·C_s))·e_s(0).
//
// Every sample is therefore an affine function of V_th and of what C_s held
// before (V_start): the mean of the M samples of a reading is
// g·V_th + a·V_start, with (g, a) depending on R_th alone once the design's
// capacitors and times are fixed. The coefficients are computed in two
// steps — the exponents (plain arithmetic), then their exponentials, then
// the combination (plain arithmetic) — so that the Monte Carlo kernel can
// take the exponentials of a whole block at once and run the same
// combination (acquisition_combine) on every unit.
#pragma once

#include <array>
#include <cmath>

#include "thermargin/input/design.hpp"

namespace thermargin {

// The mean sampled voltage of a reading: g·V_th + a·V_start.
struct SampleMap {
  double g = 1.0;
  double a = 0.0;
  double apply(double v_th, double v_start) const { return g * v_th + a * v_start; }
};

// The design's acquisition, resolved: times, capacitors, the start.
struct AcquisitionModel {
  bool on = false;         // C_s > 0
  double r_sw = 0.0, c_s = 0.0, c_n = 0.0;
  double t_acq = 0.0;      // s
  double t_open = 0.0;     // s, T_s − t_acq
  bool switched = false;   // the divider is powered settle_time before the first sample
  double settle = 0.0;     // s
  bool reset = false;      // C_s starts every acquisition at V_start (not precharge = same)
  int m = 1;               // samples per reading
};
AcquisitionModel acquisition_model(const Design& d);

// The exponents whose exponentials the map needs, for one R_th: λ1·t_acq,
// λ2·t_acq (the closed switch's eigenvalues; with C_n = 0 only the first,
// −t_acq/((R_th + R_sw)·C_s)), −t_open/(R_th·C_n), −settle/(R_th·C_n).
inline constexpr int acquisition_exponent_count = 4;
using AcquisitionExponents = std::array<double, acquisition_exponent_count>;

// The closed switch's matrix A (e' = A·e) and its eigenvalues, λ1 the slower.
struct ClosedSwitch {
  double a11, a12, a21, a22;
  double l1, l2;
};
inline ClosedSwitch closed_switch(const AcquisitionModel& m, double r_th) {
  if (!(m.c_n > 0.0)) return {0.0, 0.0, 0.0, 0.0, 0.0, 0.0};  // no node capacitor: no 2×2 system
  const double alpha = 1.0 / (r_th * m.c_n), beta = 1.0 / (m.r_sw * m.c_n), gamma = 1.0 / (m.r_sw * m.c_s);
  ClosedSwitch c{-(alpha + beta), beta, gamma, -gamma, 0.0, 0.0};
  // λ² − tr·λ + det = 0 with tr = −(α + β + γ), det = α·γ; the larger root in
  // magnitude from the formula, the smaller from det/λ (no cancellation).
  const double tr = c.a11 + c.a22, det = alpha * gamma;
  c.l2 = 0.5 * (tr - std::sqrt(tr * tr - 4.0 * det));
  c.l1 = det / c.l2;
  return c;
}

inline AcquisitionExponents acquisition_exponents(const AcquisitionModel& m, double r_th, const ClosedSwitch& c) {
  AcquisitionExponents x{};
  if (m.c_n > 0.0) {
    const double tau_n = r_th * m.c_n;
    x = {c.l1 * m.t_acq, c.l2 * m.t_acq, -m.t_open / tau_n, -m.settle / tau_n};
  } else {
    x[0] = -m.t_acq / ((r_th + m.r_sw) * m.c_s);
  }
  return x;
}

// The map from the exponentials of acquisition_exponents(m, r_th, c), with
// c = closed_switch(m, r_th). Inline and branch-free in the unit: the
// kernel runs it on a block.
inline SampleMap acquisition_combine(const AcquisitionModel& m, const ClosedSwitch& c, const AcquisitionExponents& e) {
  // Closed switch as a 2×2 matrix E = exp(A·t_acq) (Sylvester's formula for
  // distinct eigenvalues, textbook); with C_n = 0 only E11 matters.
  double e11 = e[0], e12 = 0.0, e21 = 0.0, e22 = 0.0;
  double d_open = 0.0, d_settle = 0.0;
  if (m.c_n > 0.0) {
    const double inv = 1.0 / (c.l1 - c.l2);
    const double p = (e[0] - e[1]) * inv;                 // coefficient of A
    const double q = (c.l1 * e[1] - c.l2 * e[0]) * inv;  // coefficient of I
    e11 = p * c.a11 + q;
    e12 = p * c.a12;
    e21 = p * c.a21;
    e22 = p * c.a22 + q;
    d_open = e[2];
    d_settle = e[3];
  }
  // Deviations tracked as coefficients of u1 = V_start − V_th and u2 = −V_th.
  double s1 = 0.0, s2 = 0.0;  // the mean of the samples' e_s
  if (!m.switched) {
    // The periodic steady state: the fixed point of the one-period map.
    // With precharge = same nothing disturbs the node and every sample is
    // V_th. Otherwise C_s starts at u1 and the node at the fixed point n of
    // n = d·(E11·n + E12·u1) (solved, not iterated), giving one sample
    // e_s = E21·n + E22·u1 (C_n = 0: e^(−t/τ)·u1).
    if (m.reset) {
      if (m.c_n > 0.0) {
        const double n = d_open * e12 / (1.0 - d_open * e11);
        s1 = e21 * n + e22;
      } else {
        s1 = e11;
      }
    }
  } else {
    // From power-on: the node at 0 V (e_n = u2), left to charge for the
    // settle time; C_s at 0 V too with precharge = same, else at V_start.
    double n1 = 0.0, n2 = d_settle;
    double c1 = m.reset ? 1.0 : 0.0, c2 = m.reset ? 0.0 : 1.0;
    for (int k = 0; k < m.m; ++k) {
      if (m.c_n > 0.0) {
        const double nn1 = e11 * n1 + e12 * c1, nn2 = e11 * n2 + e12 * c2;
        c1 = e21 * n1 + e22 * c1;
        c2 = e21 * n2 + e22 * c2;
        n1 = nn1 * d_open;
        n2 = nn2 * d_open;
      } else {
        c1 *= e11;
        c2 *= e11;
      }
      s1 += c1;
      s2 += c2;
      if (m.reset) {
        c1 = 1.0;
        c2 = 0.0;
      }
    }
    s1 /= m.m;
    s2 /= m.m;
  }
  // V_s = V_th + s1·(V_start − V_th) − s2·V_th.
  return {1.0 - s1 - s2, s1};
}

// The mean sampled voltage's map at this Thevenin resistance (scalar exp).
SampleMap acquisition_map(const AcquisitionModel& m, double r_th);

// The voltage C_s holds before an acquisition (V_start), for a unit whose
// reference is v_ref and whose precharge deviation (precharge = any) is dev.
double precharge_voltage(const AdcSettings& a, double v_ref_nominal, double v_ref, double dev);

// The shortest acquisition time and (for a switched divider with a node
// capacitor) settle time after which the nominal reading at this Thevenin
// resistance settles to within ½ LSB; 0 when nothing is needed, +inf when no
// time is enough (the node's charge loss alone exceeds ½ LSB).
struct SettlingNeed {
  double t_acq = 0.0;   // s
  double settle = 0.0;  // s
};
SettlingNeed settling_need(const Design& d, double r_th, double v_th, double v_start, double v_ref);

}  // namespace thermargin
