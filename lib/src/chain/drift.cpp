#include "thermargin/chain/drift.hpp"

namespace thermargin {

Source drift_target(Source s) {
  switch (s) {
    case Source::r_fixed_drift: return Source::r_fixed;
    case Source::v_excitation_drift: return Source::v_excitation;
    case Source::v_reference_drift:
    case Source::v_reference_hysteresis: return Source::v_reference;
    case Source::adc_offset_drift: return Source::adc_offset;
    case Source::adc_gain_drift: return Source::adc_gain;
    default: return s;
  }
}

namespace {
// The drifts folded into another source's deviation.
constexpr Source folded_drifts[] = {Source::r_fixed_drift,          Source::v_excitation_drift, Source::v_reference_drift,
                                    Source::v_reference_hysteresis, Source::adc_offset_drift,   Source::adc_gain_drift};
}  // namespace

bool has_drift(const Deviations& dev) {
  for (Source s : folded_drifts)
    if (dev[static_cast<std::size_t>(s)] != 0.0) return true;
  return false;
}

const Deviations& with_drift(const Deviations& dev, Deviations& scratch) {
  if (!has_drift(dev)) return dev;
  scratch = with_drift(dev);
  return scratch;
}

Deviations with_drift(Deviations dev) {
  for (Source s : folded_drifts) {
    double& drift = dev[static_cast<std::size_t>(s)];
    if (drift == 0.0) continue;
    double& target = dev[static_cast<std::size_t>(drift_target(s))];
    target = s == Source::adc_offset_drift ? target + drift : (1.0 + target) * (1.0 + drift) - 1.0;
    drift = 0.0;
  }
  return dev;
}

}  // namespace thermargin
