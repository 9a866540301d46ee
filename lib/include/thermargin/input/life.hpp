// Over the product's life (docs/model.md, "Over the product's life"): parts
// drift. Each drift is a ± bound over the life (the datasheet's endurance
// figure scaled by the designer to the life), zero at delivery and a
// toleranced input like the others at end of life. The end-of-life design
// is the delivery design with the drift inputs active, so every engine runs
// it unchanged; the budget runs both and reports both.
#pragma once

#include "thermargin/input/design.hpp"

namespace thermargin {

// Any drift input is set (a non-zero bound).
bool has_drift(const Design& d);

// The design at end of life: `d` with its drift inputs among the active
// inputs (after them, in the order of the Source list). Without drift, `d`.
Design at_end_of_life(const Design& d);

// Whether the verdict is judged at end of life: drift is set and
// requirement.at = end-of-life.
bool judged_at_end_of_life(const Design& d);

// The design the verdict is judged on (requirement.at): at end of life when
// judged_at_end_of_life(d), else `d` as delivered.
Design design_for_verdict(const Design& d);

std::string_view to_string(Requirement::At at);

}  // namespace thermargin
