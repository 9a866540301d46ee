// Checks of the shared text rules (text.hpp). The white space trimmed is the
// C locale's isspace set (ISO C, 7.4.1.10: space, \t, \n, \v, \f, \r); the
// numbers are printf's conversions (ISO C, 7.21.6.1), written out here by
// hand for the formats the writers use. (The clause numbers are C11's, from
// memory.)
#include "thermargin/core/text.hpp"

#include <string>
#include <vector>

#include <gtest/gtest.h>

namespace thermargin {
namespace {

TEST(Text, TrimRemovesTheCLocalesWhiteSpaceAtBothEndsOnly) {
  EXPECT_EQ(trim(" \t r25 = 10k \r\n"), "r25 = 10k");
  EXPECT_EQ(trim("\v\fvalue\f\v"), "value");
  EXPECT_EQ(trim("a \t b"), "a \t b");
  EXPECT_EQ(trim(" \t\r\n"), "");
  EXPECT_EQ(trim(""), "");
  EXPECT_EQ(trim("\xC2\xB0" "C "), "\xC2\xB0" "C");  // a UTF-8 degree sign is not white space
}

TEST(Text, LowerAsciiLowersLettersAndKeepsEveryOtherByte) {
  EXPECT_EQ(lower_ascii("R_Min (Ohm)"), "r_min (ohm)");
  EXPECT_EQ(lower_ascii("T\xC2\xB0" "C"), "t\xC2\xB0" "c");
  EXPECT_EQ(lower_ascii("12.5%"), "12.5%");
}

TEST(Text, PrintfNumberIsPrintfsConversion) {
  EXPECT_EQ(printf_number("%g", 25.0), "25");
  EXPECT_EQ(printf_number("%g", -0.5), "-0.5");
  EXPECT_EQ(printf_number("%.3g", 1234.5), "1.23e+03");
  EXPECT_EQ(printf_number("%.10g", 3950.0), "3950");
  EXPECT_EQ(printf_number("%.2f", 40.0), "40.00");
}

TEST(Text, JoinPutsTheSeparatorBetweenPartsOnly) {
  EXPECT_EQ(join({}, ", "), "");
  EXPECT_EQ(join({"a"}, ", "), "a");
  EXPECT_EQ(join({"a", "", "c"}, ", "), "a, , c");
  EXPECT_EQ(join(std::vector<std::string>{"e96", "e192"}, " or "), "e96 or e192");
}

}  // namespace
}  // namespace thermargin
