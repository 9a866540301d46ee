// Self-heating of the sensing element (docs/model.md §2).
//
// T_element = T_true + d·P/δ with P = V_element²/R(T_element): the mean
// rise of an element with dissipation constant δ (W/K, IEC 60539-1) powered
// a fraction d of the time. The implicit equation is solved by fixed-point
// iteration to 1e-9 K; its contraction factor is the loop gain
// d·(dP/dT)/δ, so an iteration that does not contract is the thermal runaway
// of an NTC whose power rises faster with temperature than it can shed it.
#pragma once

#include <cmath>
#include <optional>

namespace thermargin {

inline constexpr double self_heating_tolerance = 1e-9;  // K
inline constexpr int self_heating_max_iterations = 200;
// The step (K) of the loop-gain probe at the true temperature: a rise that
// grows by at least the probe over the probe is a runaway from the start
// (chain.cpp; the Monte Carlo kernel probes a hot RTD unit the same way).
inline constexpr double runaway_probe = 1e-3;

struct SelfHeating {
  enum class Outcome { converged, runaway, out_of_range };
  Outcome outcome = Outcome::converged;
  double t_element = 0.0;  // K
  double rise = 0.0;       // K
  int iterations = 0;
};

// `rise_at(T_element)` returns d·P(T_element)/δ in K, or nullopt when the
// element is outside its curve (a table's ends).
template <class RiseAt>
SelfHeating solve_self_heating(double t_true, RiseAt&& rise_at) {
  SelfHeating r;
  double t = t_true;
  double previous_step = 0.0;
  for (int i = 1; i <= self_heating_max_iterations; ++i) {
    const std::optional<double> rise = rise_at(t);
    if (!rise || !std::isfinite(*rise)) {
      r.outcome = SelfHeating::Outcome::out_of_range;
      r.t_element = t;
      r.iterations = i;
      return r;
    }
    const double next = t_true + *rise;
    const double step = next - t;
    r.iterations = i;
    // A step that grows against the previous one means the loop gain is ≥ 1.
    if (i > 2 && std::fabs(step) >= std::fabs(previous_step) && std::fabs(step) > self_heating_tolerance) {
      r.outcome = SelfHeating::Outcome::runaway;
      r.t_element = next;
      r.rise = next - t_true;
      return r;
    }
    t = next;
    // Done when the step, or the error a contracting iteration still leaves
    // (step·q/(1 − q), q the ratio of successive steps), is within tolerance.
    const double q = i > 1 ? std::fabs(step) / std::fabs(previous_step) : 1.0;
    if (std::fabs(step) <= self_heating_tolerance || (q < 0.5 && std::fabs(step) * q <= self_heating_tolerance * (1.0 - q)))
      break;
    previous_step = step;
    if (i == self_heating_max_iterations) r.outcome = SelfHeating::Outcome::runaway;
  }
  r.t_element = t;
  r.rise = t - t_true;
  return r;
}

}  // namespace thermargin
