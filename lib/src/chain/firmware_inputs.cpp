#include "thermargin/chain/firmware_inputs.hpp"

namespace thermargin {

FirmwareInputs firmware_inputs(const Design& d) {
  const FirmwareSettings& f = d.firmware;
  FirmwareInputs in;
  in.conversion = f.conversion;
  in.full_scale = f.full_scale;
  in.fw_r25 = f.r25;
  in.fw_beta = f.beta;
  in.fw_sh = f.sh;
  in.table_points = f.table_points;
  in.table_unit = f.table_unit;
  in.table_spacing = f.table_spacing;
  in.lead_compensation = f.lead_compensation;
  in.drive_compensation = f.drive_compensation;
  in.resolution = f.resolution;
  in.sensor = nominal_curve(d.sensor);
  in.lead_resistance = d.sensor.lead_resistance;
  in.placement = d.divider.placement;
  in.r_fixed = d.divider.r_fixed;
  in.r_parallel = d.divider.r_parallel;
  in.ratiometric = d.supply.ratiometric;
  in.v_excitation = d.supply.v_excitation;
  in.v_reference = d.supply.v_reference;
  in.r_drive = d.supply.r_drive;
  in.t_min = d.conditions.t_min;
  in.t_max = d.conditions.t_max;
  in.adc_span = d.adc_span();
  return in;
}

}  // namespace thermargin
