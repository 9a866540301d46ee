#include "thermargin/input/life.hpp"

namespace thermargin {

bool has_drift(const Design& d) { return !d.drift_inputs.empty(); }

Design at_end_of_life(const Design& d) {
  Design out = d;
  out.inputs.insert(out.inputs.end(), d.drift_inputs.begin(), d.drift_inputs.end());
  out.drift_inputs.clear();
  return out;
}

bool judged_at_end_of_life(const Design& d) { return has_drift(d) && d.requirement.at == Requirement::At::end_of_life; }

Design design_for_verdict(const Design& d) { return judged_at_end_of_life(d) ? at_end_of_life(d) : d; }

std::string_view to_string(Requirement::At at) {
  return at == Requirement::At::delivery ? "delivery" : "end-of-life";
}

}  // namespace thermargin
