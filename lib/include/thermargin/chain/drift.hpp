// How a drift over life adds to the part's initial deviation (docs/model.md,
// "Over the product's life"): a relative drift multiplies,
// x_unit = x_nom·(1 + δ_initial)·(1 + δ_drift); the ADC's offset drift adds,
// o_unit = o + δo_drift. The reference's thermal hysteresis is one more
// relative change of the reference. The chain reads each part's deviation
// once, so the drift is folded into it before the chain steps run.
#pragma once

#include "thermargin/input/sources.hpp"

namespace thermargin {

// The source whose deviation a drift source adds to; `s` itself for a
// source that is no drift and for the sensor's drift, which the sensor step
// applies to every model itself (sensor.hpp: ln R + ln(1 + δ_drift)).
Source drift_target(Source s);

// `dev` with every non-zero drift folded into its target and set to 0: a
// second call changes nothing, and deviations without drift come back
// bit for bit.
Deviations with_drift(Deviations dev);

// Whether `dev` has a drift that with_drift folds (it changes nothing else).
bool has_drift(const Deviations& dev);
// with_drift(dev) without the copy when there is nothing to fold: `dev`
// itself, else `scratch` holding with_drift(dev).
const Deviations& with_drift(const Deviations& dev, Deviations& scratch);

}  // namespace thermargin
