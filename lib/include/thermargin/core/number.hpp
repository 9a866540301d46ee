// Numbers as hardware people write them: `10k`, `4k7`, `2.2M`, `100n`, `1%`,
// `25ppm`, `10kohm`, `3.3V`, `1.5mW/K`.
//
// SI prefixes follow the SI brochure (BIPM, 9th edition, table 7): p n u/µ m
// k M G, with `m` milli and `M` mega. The "RKM" form that writes the prefix in
// place of the decimal point (`4k7` = 4.7 k, `4R7` = 4.7) is the marking code
// of IEC 60062 (common practice). A unit written after the number must fit
// the quantity the key expects; a bare number is always in the base unit.
#pragma once

#include <string>
#include <string_view>

namespace thermargin {

enum class Quantity {
  plain,            // a bare number (a count, a probability, a coefficient)
  ratio,            // a fraction; accepts `%` and `ppm`
  resistance,       // Ω; accepts `ohm`, `Ω`, `R` as the RKM point
  voltage,          // V
  current,          // A
  dissipation,      // W/K
  temperature,      // °C; accepts `C`, `°C`, `degC`
  temperature_difference,  // K; accepts `K`
  beta_value,       // K, an NTC's B value; accepts `K` (kelvin, not kilo: `3950K`)
  tempco,           // 1/K; accepts `ppm`, `ppm/K`, `%/K`, `/K`
  lsb,              // ADC counts; accepts `LSB`
  integer,          // a whole number, no prefix
  time,             // s; accepts `s`, `min`, `h` (and prefixes: `500ms`, `2us`)
  ramp_rate,        // K/min, a rate of temperature change; accepts `K/min`, `K/s`, `K/h`
  capacitance,      // F
  frequency,        // Hz
  lsb_per_kelvin,   // ADC counts per kelvin (an offset's drift); accepts `LSB/K`, `LSB/C`, `LSB/°C`
};

// The unit a quantity is printed in ("Ω", "V", "ppm/K", ...).
std::string_view unit_symbol(Quantity q);

// Reads `text` as a value of quantity `q` in its base unit (Ω, V, A, W/K,
// °C, K, 1/K, fraction, LSB, s, K/min, LSB/K). Throws input_error naming `where` on failure;
// the message says what would be accepted.
struct Where;
double parse_quantity(std::string_view text, Quantity q, const Where& where);

// Formats a value of a quantity for people: engineering prefixes for Ω, V,
// A and W/K, `%` for ratios, `ppm/K` for tempcos; `digits` significant digits.
std::string format_quantity(double value, Quantity q, int digits = 4);

// A number with `decimals` fixed decimals ("%.*f"): "-0.123"; never "nan"
// (a value that is not finite is "n/a") and never "-0.000".
std::string fixed(double v, int decimals);

// A number with `digits` significant digits ("%.*g"): significant(4700, 10)
// == "4700", significant(1e-7, 3) == "1e-07"; what the CSV and JSON-adjacent
// columns print so that a reader gets every digit that counts.
std::string significant(double v, int digits = 10);

// k·10^e, exactly rounded: one multiplication or division by 10^|e|, which
// is an exact double for |e| <= 22 (std::pow beyond).
double times_power_of_ten(double k, int e);

// A resistance in engineering notation, format_quantity's form: ohms(4700).
std::string ohms(double r, int digits = 4);

// A fraction as a percentage with `decimals` fixed decimals, as `fixed`
// prints them: percent(0.125) == "12.50 %".
std::string percent(double fraction, int decimals = 2);

}  // namespace thermargin
