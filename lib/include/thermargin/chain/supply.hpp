// Excitation and ADC reference (docs/model.md §4), and the board temperature they
// drift with.
//
// Ratiometric: the reference is the excitation, so their common error
// cancels in the ratio and neither carries a tolerance. Absolute: each has
// an initial tolerance and a tempco at the board temperature, independent of
// each other; the firmware assumes the nominal ratio V_ref/V_exc.
#pragma once

#include "thermargin/input/design.hpp"

namespace thermargin {

struct SupplyUnit {
  double v_excitation;  // V
  double v_reference;   // V
};

inline SupplyUnit supply_unit(const SupplySettings& s, const Deviations& d, double t_board) {
  if (s.ratiometric) return {s.v_excitation, s.v_excitation};
  const double dt = t_board - 25.0;
  const auto i = [&](Source src) { return d[static_cast<std::size_t>(src)]; };
  return {s.v_excitation * (1.0 + i(Source::v_excitation)) * (1.0 + i(Source::v_excitation_tempco) * dt),
          s.v_reference * (1.0 + i(Source::v_reference)) * (1.0 + i(Source::v_reference_tempco) * dt)};
}

// Whether the board temperature moves the fixed resistor's tempco at all: a
// board held at exactly 25 °C, the tempco's reference temperature, leaves
// it no effect, so the tempco is not an active input (input/design_reader.cpp).
inline bool board_moves_fixed_resistor_tempco(const BoardTemperature& b) {
  return b.kind != BoardKind::fixed || b.min != 25.0;
}

// The board temperature of one reading (°C).
inline double board_temperature(const BoardTemperature& b, double t_true, double deviation) {
  return b.kind == BoardKind::sensor ? t_true : b.middle() + deviation;
}

}  // namespace thermargin
