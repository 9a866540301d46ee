// Checks of the engineering-number reader (number.hpp) against the notations
// hardware people write: SI prefixes (BIPM, The International System of Units,
// 9th edition, 2019, table 7: p n µ m k M G; from memory), the RKM marking
// code that writes the prefix in place of the decimal point (IEC 60062,
// common practice) and the unit words each quantity accepts.
#include "thermargin/core/number.hpp"

#include <cmath>
#include <string>

#include <gtest/gtest.h>

#include "thermargin/core/error.hpp"

namespace thermargin {
namespace {

// A decimal literal and its parsed value may differ by the rounding of one
// multiplication (mantissa × prefix): a few units in the last place.
constexpr double relative_tolerance = 1e-15;

const Where where_in_file{Origin::file, "demo.ini", 7, "divider.r_fixed"};

double parse(const std::string& text, Quantity q) { return parse_quantity(text, q, where_in_file); }

void expect_value(const std::string& text, Quantity q, double expected) {
  EXPECT_NEAR(parse(text, q), expected, relative_tolerance * std::fabs(expected)) << "'" << text << "'";
}

// The message of the input_error a bad value raises ("" if none is raised).
std::string rejection(const std::string& text, Quantity q) {
  try {
    parse(text, q);
  } catch (const input_error& e) {
    return e.what();
  }
  return "";
}

TEST(ParseQuantity, ReadsSiPrefixes) {
  // SI brochure table 7 (from memory): k = 1e3, M = 1e6, n = 1e-9, m = 1e-3.
  expect_value("10k", Quantity::resistance, 10e3);
  expect_value("2.2M", Quantity::resistance, 2.2e6);
  expect_value("100n", Quantity::current, 100e-9);
  expect_value("1.5m", Quantity::plain, 1.5e-3);
  expect_value("3.3", Quantity::voltage, 3.3);
  expect_value("1G", Quantity::resistance, 1e9);
  expect_value("10p", Quantity::current, 10e-12);
}

TEST(ParseQuantity, LowercaseMIsMilliAndUppercaseMIsMega) {
  // SI brochure table 7 (from memory): m milli, M mega; never confused.
  expect_value("1m", Quantity::plain, 1e-3);
  expect_value("1M", Quantity::plain, 1e6);
}

TEST(ParseQuantity, ReadsMicroAsUOrMicroSignOrGreekMu) {
  // SI brochure table 7: µ = 1e-6; `u` is the usual ASCII stand-in (common practice).
  expect_value("4.7u", Quantity::current, 4.7e-6);
  expect_value("4.7\xC2\xB5", Quantity::current, 4.7e-6);  // U+00B5 MICRO SIGN
  expect_value("4.7\xCE\xBC", Quantity::current, 4.7e-6);  // U+03BC GREEK SMALL LETTER MU
  expect_value("1\xC2\xB5" "A", Quantity::current, 1e-6);
  expect_value("4\xC2\xB5" "7", Quantity::current, 4.7e-6);  // RKM with the micro sign
}

TEST(ParseQuantity, ReadsRkmCodeWithThePrefixAsDecimalPoint) {
  // IEC 60062 marking code (common practice): 4k7 = 4.7 kΩ, 4R7 = 4.7 Ω, 2M2 = 2.2 MΩ.
  expect_value("4k7", Quantity::resistance, 4.7e3);
  expect_value("4R7", Quantity::resistance, 4.7);
  expect_value("0R1", Quantity::resistance, 0.1);
  expect_value("2M2", Quantity::resistance, 2.2e6);
  expect_value("470R", Quantity::resistance, 470.0);
  expect_value("1k00", Quantity::resistance, 1e3);
}

TEST(ParseQuantity, ReadsPercentAndPpmAsFractions) {
  // % = 1e-2 and ppm = 1e-6 (common practice).
  expect_value("1%", Quantity::ratio, 0.01);
  expect_value("0.1 %", Quantity::ratio, 0.001);
  expect_value("25ppm", Quantity::ratio, 25e-6);
  expect_value("0.01", Quantity::ratio, 0.01);
  expect_value("99.73%", Quantity::ratio, 0.9973);
}

TEST(ParseQuantity, ReadsUnitsAfterTheNumber) {
  expect_value("10kohm", Quantity::resistance, 10e3);
  expect_value("10 kohm", Quantity::resistance, 10e3);
  expect_value("4.7k\xCE\xA9", Quantity::resistance, 4.7e3);  // Ω, U+03A9
  expect_value("3.3V", Quantity::voltage, 3.3);
  expect_value("2500mV", Quantity::voltage, 2.5);
  expect_value("1.5mW/K", Quantity::dissipation, 1.5e-3);
  expect_value("10nA", Quantity::current, 10e-9);
  expect_value("2LSB", Quantity::lsb, 2.0);
}

TEST(ParseQuantity, ReadsTemperaturesAndDifferences) {
  expect_value("-40", Quantity::temperature, -40.0);
  expect_value("85C", Quantity::temperature, 85.0);
  expect_value("25\xC2\xB0" "C", Quantity::temperature, 25.0);  // 25 °C
  expect_value("25degC", Quantity::temperature, 25.0);
  expect_value("100mK", Quantity::temperature_difference, 0.1);
  // `K` after a temperature difference is kelvin, not kilo.
  expect_value("1K", Quantity::temperature_difference, 1.0);
}

TEST(ParseQuantity, ReadsTempcosPerKelvin) {
  expect_value("25ppm", Quantity::tempco, 25e-6);
  expect_value("25ppm/K", Quantity::tempco, 25e-6);
  expect_value("0.01%/K", Quantity::tempco, 1e-4);
  // Per degree Celsius is per kelvin (a temperature difference; SI brochure, from memory).
  expect_value("25ppm/C", Quantity::tempco, 25e-6);
  expect_value("25ppm/\xC2\xB0" "C", Quantity::tempco, 25e-6);  // ppm/°C
  expect_value("0.01%/\xC2\xB0" "C", Quantity::tempco, 1e-4);
  expect_value("2mW/\xC2\xB0" "C", Quantity::dissipation, 2e-3);  // mW/°C, as datasheets print it
}

TEST(ParseQuantity, ReadsABValueInKelvinNeverKilo) {
  // A datasheet writes B25/50 = 3950 K (IEC 60539-1's B value is in kelvin):
  // the `K` after it is the unit, so `3950K` is 3950, not 3.95 MK.
  expect_value("3950", Quantity::beta_value, 3950.0);
  expect_value("3950K", Quantity::beta_value, 3950.0);
  expect_value("3950 K", Quantity::beta_value, 3950.0);
  expect_value("3k95", Quantity::beta_value, 3950.0);
  EXPECT_NE(rejection("3950C", Quantity::beta_value).find("expected a B value in kelvin"), std::string::npos);
}

TEST(ParseQuantity, ReadsExponentsAndSigns) {
  expect_value("2e-3", Quantity::plain, 2e-3);
  expect_value("-5.775e-7", Quantity::plain, -5.775e-7);
  expect_value("+1.5", Quantity::plain, 1.5);
  expect_value(".5", Quantity::plain, 0.5);
  expect_value("12", Quantity::integer, 12.0);
}

TEST(ParseQuantity, RejectsMalformedValuesNamingKeyFileAndLine) {
  for (const char* bad : {"10x", "abc", "", "1.2.3", "4k7k", "10 k k", "1e", "0x10", "ten", "--1", "10kV", "1,5"}) {
    const std::string message = rejection(bad, Quantity::resistance);
    ASSERT_FALSE(message.empty()) << "'" << bad << "' was accepted";
    EXPECT_EQ(message.rfind("divider.r_fixed = ", 0), 0u) << message;
    EXPECT_NE(message.find("(demo.ini:7)"), std::string::npos) << message;
    EXPECT_NE(message.find("expected a resistance"), std::string::npos) << message;
    EXPECT_EQ(message.find('\n'), std::string::npos) << message;
  }
}

TEST(ParseQuantity, RejectsUnitsThatDoNotFitTheQuantity) {
  EXPECT_FALSE(rejection("3.3V", Quantity::resistance).empty());
  EXPECT_FALSE(rejection("10kohm", Quantity::voltage).empty());
  EXPECT_FALSE(rejection("1m%", Quantity::ratio).empty());  // no prefix on a percentage
  EXPECT_FALSE(rejection("4R7", Quantity::voltage).empty());  // R is the point only for ohms
  EXPECT_FALSE(rejection("12.5", Quantity::integer).empty());
  EXPECT_FALSE(rejection("1k", Quantity::integer).empty());
  EXPECT_FALSE(rejection("25m", Quantity::temperature).empty());
}

TEST(ParseQuantity, NamesTheCommandLineAsOrigin) {
  try {
    parse_quantity("fast", Quantity::integer, Where{Origin::command_line, "", 0, "adc.bits"});
    FAIL() << "accepted";
  } catch (const input_error& e) {
    EXPECT_STREQ(e.what(), "adc.bits = fast (command line): expected a whole number such as 12");
  }
}

TEST(ParseQuantity, ReadsTimesInSecondsAndRampsInKelvinPerMinute) {
  // SI: 1 min = 60 s, 1 h = 3600 s (SI brochure, table 8: non-SI units accepted for use with the SI).
  expect_value("8", Quantity::time, 8.0);
  expect_value("8s", Quantity::time, 8.0);
  expect_value("500ms", Quantity::time, 0.5);
  expect_value("2min", Quantity::time, 120.0);
  expect_value("1.5 h", Quantity::time, 5400.0);
  expect_value("2", Quantity::ramp_rate, 2.0);
  expect_value("2K/min", Quantity::ramp_rate, 2.0);
  expect_value("0.05K/s", Quantity::ramp_rate, 3.0);
  expect_value("30 K/h", Quantity::ramp_rate, 0.5);
  expect_value("500mK/min", Quantity::ramp_rate, 0.5);
  EXPECT_NE(rejection("5V", Quantity::time).find("expected a time such as 8, 8s, 500ms, 2us or 2min"), std::string::npos);
  EXPECT_NE(rejection("2V/min", Quantity::ramp_rate).find("expected a rate of change"), std::string::npos);
}

TEST(ParseQuantity, ReadsAnOffsetDriftInCountsPerKelvin) {
  // An ADC offset drift is given per kelvin of board temperature (common practice in datasheets: LSB/°C).
  expect_value("0.01", Quantity::lsb_per_kelvin, 0.01);
  expect_value("0.01LSB/K", Quantity::lsb_per_kelvin, 0.01);
  expect_value("0.01 LSB/C", Quantity::lsb_per_kelvin, 0.01);
  expect_value("0.01LSB/\xC2\xB0" "C", Quantity::lsb_per_kelvin, 0.01);  // LSB/°C
  expect_value("10mLSB/K", Quantity::lsb_per_kelvin, 0.01);
  EXPECT_NE(rejection("0.01LSB", Quantity::lsb_per_kelvin).find("expected ADC counts per kelvin such as 0.01, 0.01LSB/K"),
            std::string::npos);
  EXPECT_EQ(unit_symbol(Quantity::lsb_per_kelvin), "LSB/K");
  EXPECT_EQ(format_quantity(0.01, Quantity::lsb_per_kelvin), "0.01 LSB/K");
}

TEST(FormatQuantity, PrintsValuesTheParserReadsBack) {
  // Round trip: what the tool prints, a person may paste back into a scenario.
  const std::pair<double, Quantity> values[] = {{4.7e3, Quantity::resistance}, {2.2e6, Quantity::resistance},
                                                {0.47, Quantity::resistance},  {3.3, Quantity::voltage},
                                                {1.5e-3, Quantity::dissipation}, {10e-9, Quantity::current},
                                                {0.01, Quantity::ratio},      {25e-6, Quantity::tempco},
                                                {0.5, Quantity::time},        {1.5, Quantity::ramp_rate},
                                                {0.02, Quantity::lsb_per_kelvin}};
  for (const auto& [v, q] : values) {
    const std::string text = format_quantity(v, q, 6);
    EXPECT_NEAR(parse(text, q), v, relative_tolerance * 10 * std::fabs(v)) << text;
  }
}

}  // namespace
}  // namespace thermargin
