// Preferred-number series of resistor values (IEC 60063:2015): the values a
// designer can actually buy, which the fixed-resistor picker (picker.hpp)
// draws its candidates from.
//
// E12 and E24 are the published two-digit lists; E24 keeps its historical
// values 2.7 3.0 3.3 3.6 3.9 4.3 4.7 and 8.2, which differ from the rounded
// geometric progression round(10^(i/24)). E48, E96 and E192 are the
// geometric progression rounded to three significant digits,
// round(100·10^(i/n)), except that E192 holds 920 where the formula gives
// 919 (both as IEC 60063 publishes them; tests/series_test.cpp checks the
// published values). Every series is the coarser one's superset: E12 is
// every second E24 value, E48 every second E96 value, E96 every second E192
// value.
#pragma once

#include <optional>
#include <string_view>
#include <vector>

namespace thermargin {

enum class Series { e12, e24, e48, e96, e192 };

inline constexpr Series all_series[] = {Series::e12, Series::e24, Series::e48, Series::e96, Series::e192};

std::string_view to_string(Series s);  // "E96"
// Reads "e96" or "E96"; nullopt for anything else.
std::optional<Series> series_from_name(std::string_view name);
// "e12 | e24 | e48 | e96 | e192", for messages.
std::string_view series_names();

int values_per_decade(Series s);

// The tolerance each series is paired with, as a ± fraction: E12 10 %,
// E24 5 %, E48 2 %, E96 1 %, E192 0.5 % (the loosest of E192's 0.5, 0.25,
// 0.1 %; IEC 60063's pairing, common practice). `pick --grade series` uses it.
double series_tolerance(Series s);

// The significant figures of one decade, ascending: two digits (10..82,
// 10..91) for E12 and E24, three (100..976, 100..988) for the others.
const std::vector<int>& series_figures(Series s);

// Every value of the series in [low, high] (inclusive, to a relative 1e-9),
// ascending. The values are exact decimal numbers: 4.7k is 4700 exactly.
std::vector<double> series_values(Series s, double low, double high);

// The series values nearest to x on either side: below ≤ x ≤ above, both
// equal to x when x is a member.
struct SeriesBracket {
  double below = 0.0, above = 0.0;
};
SeriesBracket series_bracket(Series s, double x);

// The coarsest series (E12 first) that holds x, to a relative 1e-9; nullopt
// when none does.
std::optional<Series> coarsest_series(double x);

}  // namespace thermargin
