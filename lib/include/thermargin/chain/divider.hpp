// The resistive divider between excitation, sensor branch and ADC input
// (docs/model.md §3).
//
// Sensor branch: (R_element + R_lead) ∥ R_par. Placement low puts the branch
// from node to ground, high from excitation to node. The ADC pin draws a
// leakage current I out of the node through the Thevenin resistance of the
// divider, R_fixed ∥ R_branch (Ohm's and Thevenin's theorems; textbook).
// The firmware inverts the same relation with nominal parts and no leakage.
#pragma once

#include <optional>

#include "thermargin/input/design.hpp"

namespace thermargin {

inline double parallel(double a, double b) { return a * b / (a + b); }

inline double branch_resistance(double r_element, double r_lead, std::optional<double> r_par) {
  const double series = r_element + r_lead;
  return r_par ? parallel(series, *r_par) : series;
}

// Divider ratio V_node/V_exc without leakage.
inline double divider_ratio(Placement p, double r_fixed, double r_branch) {
  return (p == Placement::low ? r_branch : r_fixed) / (r_fixed + r_branch);
}

// Node voltage with leakage (positive current leaves the node).
inline double node_voltage(Placement p, double v_exc, double r_fixed, double r_branch, double i_leak) {
  return v_exc * divider_ratio(p, r_fixed, r_branch) - i_leak * parallel(r_fixed, r_branch);
}

// The divider's two arms with the drive resistance R_drv (docs/model.md §15)
// in series with its top: the fixed resistor's arm for placement low, the
// sensor branch's for high. With R_drv = 0 the sums are exact and every
// result is the undriven one to the bit.
struct DividerArms {
  double top, bottom;
  double ratio() const { return bottom / (top + bottom); }
  double thevenin() const { return parallel(top, bottom); }
};
inline DividerArms divider_arms(Placement p, double r_fixed, double r_branch, double r_drive) {
  return p == Placement::low ? DividerArms{r_fixed + r_drive, r_branch} : DividerArms{r_branch + r_drive, r_fixed};
}

// Node voltage of a driven divider with leakage (positive current leaves the node).
inline double node_voltage(Placement p, double v_exc, double r_fixed, double r_branch, double r_drive, double i_leak) {
  const DividerArms a = divider_arms(p, r_fixed, r_branch, r_drive);
  return v_exc * a.ratio() - i_leak * a.thevenin();
}

// Voltage across the element itself (for self-heating): the branch voltage
// shared between the element and its leads. Leakage is neglected here.
inline double element_voltage(Placement p, double v_exc, double r_fixed, double r_element, double r_lead,
                              std::optional<double> r_par) {
  const double rb = branch_resistance(r_element, r_lead, r_par);
  const double v_branch = v_exc * rb / (r_fixed + rb);
  (void)p;  // the branch voltage is the same fraction whichever side it sits on
  return v_branch * r_element / (r_element + r_lead);
}

// Firmware inversion: the branch resistance that gives ratio ρ with the
// nominal fixed resistor; nullopt when ρ is outside (0, 1).
inline std::optional<double> invert_divider(Placement p, double r_fixed, double ratio) {
  if (!(ratio > 0.0 && ratio < 1.0)) return std::nullopt;
  return p == Placement::low ? r_fixed * ratio / (1.0 - ratio) : r_fixed * (1.0 - ratio) / ratio;
}

// Removes the nominal parallel resistor and the assumed lead resistance from
// a branch resistance; nullopt when no positive element resistance remains.
inline std::optional<double> element_from_branch(double r_branch, std::optional<double> r_par, double lead_comp) {
  double series = r_branch;
  if (r_par) {
    if (!(r_branch < *r_par)) return std::nullopt;
    series = 1.0 / (1.0 / r_branch - 1.0 / *r_par);
  }
  const double r = series - lead_comp;
  if (!(r > 0.0)) return std::nullopt;
  return r;
}

// Firmware inversion with an assumed drive resistance: the branch resistance
// that gives ratio ρ; nullopt when ρ is outside (0, 1) or nothing is left.
inline std::optional<double> invert_driven_divider(Placement p, double r_fixed, double r_drive, double ratio) {
  if (p == Placement::low) return invert_divider(p, r_fixed + r_drive, ratio);
  const auto top = invert_divider(p, r_fixed, ratio);
  if (!top || !(*top - r_drive > 0.0)) return std::nullopt;
  return *top - r_drive;
}

}  // namespace thermargin
