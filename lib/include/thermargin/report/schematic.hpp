// The measurement chain drawn as a schematic for the review page, in SVG:
// the supply (and its drive resistance), the divider's two arms (the fixed
// resistor and the sensor, with a parallel resistor and the leads where the
// design has them), the node capacitor, and the ADC with its reference,
// resolution and sampling capacitor; each part labelled with the design's
// values, as a board checks them by hand. Presentation only: the values are
// the design's (docs/model.md §2–§5, §14–§15). Every label is escaped.
#pragma once

#include <string>

#include "thermargin/input/design.hpp"

namespace thermargin {

// An <svg> element with class "schematic", a <title> and one <text> per
// label; its viewBox scales it to the page.
std::string chain_schematic_svg(const Design& design);

}  // namespace thermargin
