// Whether a design uses its RTD's tolerance class outside the range IEC
// 60751 rates the class for (rtd.hpp: class_validity). The class bound is
// then extrapolated: every output says so (docs/model.md §1).
#pragma once

#include <string>

#include "thermargin/input/design.hpp"

namespace thermargin {

// Whether the class is rated at t (°C); true without a class or for an NTC.
bool rtd_class_rated_at(const Design& d, double t_celsius);

// One sentence when some temperature of conditions.t_min..t_max (or a
// calibration point) lies outside the class's range, else empty: "class B
// (film) is rated over -50..500 degC (IEC 60751:2008); beyond it, at -60 to
// -50 degC, the bound is extrapolated".
std::string rtd_class_range_note(const Design& d);

}  // namespace thermargin
