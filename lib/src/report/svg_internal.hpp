// What the SVG chart writer's files share (svg_chart.cpp draws, svg_axis.cpp
// plans the axes); not public API.
#pragma once

#include <string>

#include "thermargin/report/svg_chart.hpp"

namespace thermargin::svg::detail {

// A chart the caller built wrongly (a bug, not bad input): std::invalid_argument.
[[noreturn]] void bug(const std::string& what);

// Refuses a forced axis limit that is not finite, <= 0 on a log axis, or
// min >= max (bug()).
void check_forced(const Axis& axis);

}  // namespace thermargin::svg::detail
