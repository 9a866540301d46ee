#include "thermargin/engines/headroom.hpp"

#include <cmath>

#include "thermargin/chain/divider.hpp"
#include "thermargin/chain/sensor.hpp"
#include "thermargin/engines/nominal.hpp"

namespace thermargin {

HandCheck hand_check(const Chain& chain, double t) {
  const Design& d = chain.design();
  const NominalPoint p = nominal_point(chain, t);
  HandCheck h;
  h.t = t;
  h.status = p.status;
  h.v_node = p.v_node;
  h.code = p.code;
  h.to_bottom = p.code;
  h.to_top = chain.max_code() - p.code;
  const SensorUnit sensor(d.sensor, 0.0, 0.0, 0.0);
  const auto ln_r = sensor.ln_resistance(t + p.self_heating + kelvin_offset);
  if (!ln_r) return h;
  h.r_sensor = std::exp(*ln_r);
  const double r_series = d.divider.r_fixed + d.supply.r_drive;
  const double r_branch = branch_resistance(h.r_sensor, d.sensor.lead_resistance, d.divider.r_parallel);
  h.current = d.supply.v_excitation / (r_series + r_branch);
  const double v_element = element_voltage(d.divider.placement, d.supply.v_excitation, r_series, h.r_sensor,
                                           d.sensor.lead_resistance, d.divider.r_parallel);
  h.power = v_element * v_element / h.r_sensor;
  return h;
}

Headroom headroom(const Chain& chain, const Budget& b) {
  const Design& d = chain.design();
  Headroom h;
  h.v_input = d.supply.v_reference_nominal();
  h.max_code = chain.max_code();
  h.duty = d.divider.duty;
  for (const auto& p : b.points) {
    if (p.nominal.status != Status::ok) continue;
    if (!h.any || p.nominal.v_node < h.v_low) h.v_low = p.nominal.v_node, h.t_v_low = p.t;
    if (!h.any || p.nominal.v_node > h.v_high) h.v_high = p.nominal.v_node, h.t_v_high = p.t;
    h.any = true;
  }
  if (!b.points.empty()) {
    h.at_min = hand_check(chain, b.points.front().t);
    h.at_max = hand_check(chain, b.points.back().t);
  }
  return h;
}

}  // namespace thermargin
