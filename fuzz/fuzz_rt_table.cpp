// libFuzzer target: the R-T table reader (parse_rt_data) and the table
// sensor built from it (RtTable). Inside the table every lookup is a finite
// number within the table's span; outside, no value.
#include <cmath>
#include <cstdint>
#include <string>

#include "fuzz_common.hpp"
#include "thermargin/input/rt_data.hpp"
#include "thermargin/chain/rt_table.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace thermargin;
  const std::string text = fuzz::text_of(data, size);
  return fuzz::run([&] {
    const RtData rt = parse_rt_data(text, "fuzz_table.csv");
    const RtTable table(rt);
    const auto& t = table.t_kelvin_points();
    const double lo = table.t_min_kelvin(), hi = table.t_max_kelvin();
    for (std::size_t i = 0; i < t.size(); ++i) {
      const double probes[] = {t[i], i + 1 < t.size() ? 0.5 * (t[i] + t[i + 1]) : t[i]};
      for (const double probe : probes) {
        const auto l = table.ln_resistance(probe);
        if (!l) fuzz::finding("no resistance inside the table");
        fuzz::check_finite(*l, "ln_resistance");
        const auto slope = table.ln_resistance_slope(probe);
        if (!slope) fuzz::finding("no slope inside the table");
        fuzz::check_finite(*slope, "ln_resistance_slope");
        const auto back = table.temperature_kelvin(*l);
        if (back) {
          fuzz::check_finite(*back, "temperature_kelvin");
          if (*back < lo * (1 - 1e-12) || *back > hi * (1 + 1e-12)) fuzz::finding("an inverse outside the table");
        }
      }
    }
    // Just outside each end (the next double: a table may end so far out,
    // 5e21 degC say, that hi + 1 K rounds back to hi).
    const double below = std::nextafter(lo, -HUGE_VAL), above = std::nextafter(hi, HUGE_VAL);
    if (table.ln_resistance(below) || table.ln_resistance(above)) fuzz::finding("a value outside the table");
  });
}
