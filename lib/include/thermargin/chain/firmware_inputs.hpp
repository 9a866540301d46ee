// Everything the firmware's conversion reads (firmware.hpp, docs/model.md
// §6), as one value: the firmware's conversion settings, the sensor's
// nominal curve and leads, the divider's nominal parts, the supply's
// nominal voltages and drive, the range and the ADC's span. Firmware keeps
// a copy and reads nothing else (it holds no design), so two designs with
// equal inputs convert every reading to the same bits, and the inputs are a
// safe key for sharing a conversion between runs (engines/conversion_cache.hpp):
// a field the firmware comes to read must first be added here, where the
// defaulted operator== compares it. Not here, because the conversion does not
// read them: tolerances, tempcos, drifts, the ADC's errors and noise, the
// averaging, the calibration (applied after the conversion, chain.hpp).
//
// operator== compares doubles by value, so +0 and −0 are equal; both give
// the same conversion (docs/engines.md, "The conversion shared between runs").
#pragma once

#include <optional>

#include "thermargin/chain/sensor.hpp"
#include "thermargin/input/design.hpp"

namespace thermargin {

struct FirmwareInputs {
  // firmware.*: the conversion (not the calibration).
  Conversion conversion = Conversion::beta;
  FullScale full_scale = FullScale::pow2;
  double fw_r25 = 0.0, fw_beta = 0.0;
  std::optional<SteinhartHart> fw_sh;
  int table_points = 0;
  double table_unit = 0.0;
  TableSpacing table_spacing = TableSpacing::code;
  double lead_compensation = 0.0, drive_compensation = 0.0;
  double resolution = 0.0;
  // sensor.*: the nominal curve and the leads.
  NominalCurve sensor;
  double lead_resistance = 0.0;
  // divider.*, supply.*: nominal parts.
  Placement placement = Placement::low;
  double r_fixed = 0.0;
  std::optional<double> r_parallel;
  bool ratiometric = true;
  double v_excitation = 0.0, v_reference = 0.0, r_drive = 0.0;
  // conditions.t_min, t_max (°C) and the ADC's span 2^bits (LSB).
  double t_min = 0.0, t_max = 0.0;
  double adc_span = 0.0;

  bool operator==(const FirmwareInputs&) const = default;
};

FirmwareInputs firmware_inputs(const Design& d);

}  // namespace thermargin
