// libFuzzer target: the grade catalogue reader (parse_catalogue, RFC 4180
// records) and each option's settings applied to the default scenario and
// validated (build_design), as the grades command does before its engines.
#include <cstdint>
#include <string>

#include "fuzz_common.hpp"
#include "thermargin/input/catalogue.hpp"
#include "thermargin/input/scenario.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace thermargin;
  const std::string text = fuzz::text_of(data, size);
  return fuzz::run([&] {
    const Catalogue cat = parse_catalogue(text, "/tmp/thermargin_fuzz/catalogue.csv");
    if (cat.slots.empty()) fuzz::finding("a catalogue with no slots");
    for (const auto& slot : cat.slots) {
      if (slot.options.empty()) fuzz::finding("a slot with no options");
      for (const auto& option : slot.options) {
        if (!(option.unit_cost >= 0.0)) fuzz::finding("a negative or NaN unit cost");
        fuzz::check_finite(option.unit_cost, "unit_cost");
        Scenario s;
        for (const auto& setting : option.settings) s.set(setting.key, setting.value, setting.where);
        try {
          (void)build_design(s);
        } catch (const input_error& e) {
          fuzz::check_message(e);  // a grade the scenario cannot take: refused, and on we go
        }
      }
    }
  });
}
