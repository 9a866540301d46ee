// libFuzzer target: the number reader (parse_quantity).
//
// The first byte picks the quantity, the rest is the text. A value read must
// be finite (an integer a whole number), and a finite value printed by
// format_quantity with 17 digits must read back to itself: the tool prints
// numbers a user may paste into a scenario again.
#include <cmath>
#include <cstdint>
#include <string>

#include "fuzz_common.hpp"
#include "thermargin/core/number.hpp"

namespace {

constexpr int quantity_count = static_cast<int>(thermargin::Quantity::lsb_per_kelvin) + 1;  // the last
constexpr double round_trip_tolerance = 1e-12;  // relative; 17 digits, then a scale by 100 or 1e6

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace thermargin;
  if (size == 0) return 0;
  const auto q = static_cast<Quantity>(data[0] % quantity_count);
  const std::string text = fuzz::text_of(data + 1, size - 1);
  const Where where{Origin::file, "fuzz.ini", 1, "fuzz.value"};
  return fuzz::run([&] {
    const double v = parse_quantity(text, q, where);
    fuzz::check_finite(v, "parse_quantity");
    if (q == Quantity::integer && v != std::floor(v)) fuzz::finding("an integer that is not whole", text);
    // Round trip through the printed form, away from the ends of the double range.
    const double a = std::fabs(v);
    if (a != 0.0 && (a < 1e-200 || a > 1e200)) return;
    if (q == Quantity::integer && a > 9e15) return;
    const std::string printed = format_quantity(v, q, 17);
    double back = 0.0;
    try {
      back = parse_quantity(printed, q, where);
    } catch (const input_error&) {
      fuzz::finding("a printed value that does not read back", printed + " <- " + text);
    }
    if (std::fabs(back - v) > round_trip_tolerance * a) fuzz::finding("printed value reads back different", printed + " <- " + text);
  });
}
