#include "thermargin/input/response_section.hpp"

#include <cmath>
#include <string_view>

#include "input/setting_reader.hpp"

namespace thermargin {
namespace {

// The section's reads: the shared typed reads (setting_reader.hpp), with
// the unit said in a refusal of a non-positive value.
class SectionReader : public SettingReader {
 public:
  using SettingReader::SettingReader;
  using SettingReader::positive;
  bool stated(const std::string& key) const { return !is_default(key); }
  double positive(const std::string& key, std::string_view unit) const {
    const double v = number(key);
    if (!(v > 0.0)) fail(key, "must be > 0 " + std::string(unit));
    return v;
  }
};

// The section takes part when a key of it holds something other than the
// built-in default: a file that lists every key with its default value
// (scenarios/default.ini) states no response.
bool section_stated(const SectionReader& r) {
  for (const KeySpec& k : scenario_schema())
    if (k.key.starts_with("response.") && r.stated(k.key) && r.text(k.key) != k.default_value) return true;
  return false;
}

Filter read_filter(const SectionReader& r) {
  Filter f;
  const std::string kind = r.at("response.filter").value;
  if (kind == "none") f.kind = FilterKind::none;
  else if (kind == "moving-average") f.kind = FilterKind::moving_average;
  else if (kind == "exponential") f.kind = FilterKind::exponential;
  else r.fail("response.filter", "must be one of: none | moving-average | exponential");
  // Both parameters are read whatever the filter, so that a typo is refused
  // before the day the filter is switched.
  const double n = r.number("response.filter_length");
  if (!(n >= 1.0 && n <= 65536.0))
    r.fail("response.filter_length", "must be a whole number of readings from 1 to 65536");
  const double a = r.number("response.filter_alpha");
  if (!(a > 0.0 && a <= 1.0))
    r.fail("response.filter_alpha", "must be in (0, 1]: the weight of the newest reading (1 = no filter)");
  f.length = f.kind == FilterKind::moving_average ? static_cast<int>(n) : 1;
  f.alpha = f.kind == FilterKind::exponential ? a : 1.0;
  return f;
}

}  // namespace

ResponseSettings read_response_section(const Scenario& s) {
  const SectionReader r(s);
  ResponseSettings rs;
  rs.present = section_stated(r);
  rs.time_constant = r.positive("response.time_constant", "s (the sensor's thermal time constant)");
  rs.time_constant_tol = r.number("response.time_constant_tol");
  if (rs.time_constant_tol < 0.0 || rs.time_constant_tol >= 1.0)
    r.fail("response.time_constant_tol", "must be a tolerance from 0 up to (not including) 100 %");
  rs.reading_period = r.positive("response.reading_period", "s (the time between readings)");
  rs.filter = read_filter(r);
  const double per_minute = r.number("response.ramp");
  if (per_minute < 0.0)
    r.fail("response.ramp", "must be >= 0 K/min: the rate of change in either direction (0 = no ramp)");
  rs.ramp = per_minute / 60.0;
  rs.step = r.positive("response.step", "K (the size of the step; a fall is the mirror image of a rise)");
  rs.settle_to = r.positive("response.settle_to", "K (the error a settled reading stays within)");
  if (rs.ramp > 0.0 && r.stated("response.ramp") && !r.stated("requirement.max_error"))
    r.fail("response.ramp", "a ramp to follow needs a limit to meet: set requirement.max_error (K), which the "
                            "static error plus the ramp's lag must stay within");

  const std::string dyn = s.get("requirement.include_dynamic").value;
  if (dyn == "true" || dyn == "yes" || dyn == "1") rs.include_dynamic = true;
  else if (dyn == "false" || dyn == "no" || dyn == "0") rs.include_dynamic = false;
  else r.fail("requirement.include_dynamic", "must be one of: true | yes | 1 | false | no | 0");
  if (rs.include_dynamic && !rs.present)
    r.fail("requirement.include_dynamic", "there is no dynamic error to include: add a [response] section "
                                          "(time_constant, reading_period, filter, ramp)");
  if (rs.include_dynamic && s.get("requirement.basis").value == "monte-carlo")
    r.fail("requirement.include_dynamic", "cannot be added to a verdict on the yield (requirement.basis = "
                                          "monte-carlo); use basis worst-case or linear, or set it to false");
  return rs;
}

}  // namespace thermargin
