// A sensor known only by its R–T table (a datasheet's column of resistances).
//
// ln R is interpolated against 1/T with a monotone piecewise cubic Hermite
// interpolant (PCHIP; Fritsch & Carlson, SIAM J. Numer. Anal. 17, 1980) from
// Boost.Math, which keeps the curve monotone between points as the physics
// requires. Nothing is extrapolated: outside the table is an out-of-range
// result. The inverse solves the same interpolant with TOMS 748, so a round
// trip R → T → R is exact to the solver's tolerance.
#pragma once

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "thermargin/chain/hermite_segments.hpp"
#include "thermargin/input/rt_data.hpp"

namespace thermargin {

class RtTable {
 public:
  // At least 4 points, strictly monotonic (checked; input_error otherwise).
  explicit RtTable(const RtData& data);

  double t_min_kelvin() const { return t_lo_; }
  double t_max_kelvin() const { return t_hi_; }
  bool covers(double t_kelvin) const { return t_kelvin >= t_lo_ && t_kelvin <= t_hi_; }

  // ln R at t (inside the table; outside, nullopt).
  std::optional<double> ln_resistance(double t_kelvin) const;
  std::optional<double> ln_resistance_slope(double t_kelvin) const;  // d ln R / dT
  // The temperature (K) with resistance exp(ln_r), or nullopt outside the table.
  std::optional<double> temperature_kelvin(double ln_r) const;

  const std::vector<double>& t_kelvin_points() const { return t_; }
  const std::vector<double>& ln_r_points() const { return lnr_; }
  const std::string& source() const { return source_; }

  // A table with limit columns (rt_data.hpp) carries the unit spread: the
  // half-width h(T) in ln R on one side, ln(R_max/R_nom) (upper) or
  // ln(R_nom/R_min), interpolated like the curve (PCHIP against 1/T).
  bool has_limits() const { return static_cast<bool>(upper_); }
  // h(T) on the upper or lower side; nullopt outside the table or without limits.
  std::optional<double> spread(double t_kelvin, bool upper) const;
  // The interpolants of ln R and of h against 1/T as pieces (for the Monte
  // Carlo kernel's loop, which checks the range itself): ln_resistance(t) is
  // curve_segments().at(1/t) and spread(t, upper) spread_segments(upper)->at(1/t),
  // to the bit; spread_segments is null without limits.
  const HermiteSegments& curve_segments() const;
  const HermiteSegments* spread_segments(bool upper) const;

  // Equal: the same table object or a copy of it (the interpolants are
  // compared as pointers, so two tables read from one file twice differ).
  // Immutable after construction, so equal tables give the same values.
  bool operator==(const RtTable&) const = default;

 private:
  struct Interpolant;
  static std::shared_ptr<const Interpolant> make_pchip(std::vector<double> x, std::vector<double> y);
  std::shared_ptr<const Interpolant> curve_;
  std::shared_ptr<const Interpolant> upper_, lower_;  // the spread, with limits only
  std::vector<double> t_, lnr_;  // ascending temperature
  double t_lo_ = 0, t_hi_ = 0, lnr_at_lo_ = 0, lnr_at_hi_ = 0;
  std::string source_;
};

}  // namespace thermargin
