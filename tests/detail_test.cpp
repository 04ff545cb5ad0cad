// Tests of the shared helpers in src/detail.hpp.

#include "detail.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <string>

namespace gutterwatt::detail {
namespace {

TEST(Trim, DropsBlanksAtEitherEndOnly) {
  EXPECT_EQ(trim("  a b\t"), "a b");
  EXPECT_EQ(trim(" \t "), "");
  EXPECT_EQ(trim("x\r"), "x\r");
  EXPECT_EQ(trim(" x\r ", " \t\r"), "x");
}

TEST(FloorDiv, RoundsTowardNegativeInfinity) {
  EXPECT_EQ(floor_div(7, 2), 3);
  EXPECT_EQ(floor_div(-7, 2), -4);
  EXPECT_EQ(floor_div(-86400, kDay_s), -1);
  EXPECT_EQ(floor_div(-1, kDay_s), -1);
  EXPECT_EQ(floor_div(0, kDay_s), 0);
}

TEST(ParseDouble, TakesTheWholeTextOrNothing) {
  EXPECT_EQ(parse_double("+2.5"), 2.5);
  EXPECT_EQ(parse_double("-1e-3"), -0.001);
  EXPECT_FALSE(parse_double("+-2"));
  EXPECT_FALSE(parse_double("2.5 mm"));
  EXPECT_FALSE(parse_double(""));
  EXPECT_TRUE(std::isnan(*parse_double("nan")));
}

TEST(ToNumber, RefusesNonFiniteValues) {
  EXPECT_EQ(to_number("12"), 12.0);
  EXPECT_FALSE(to_number("inf"));
  EXPECT_FALSE(to_number("nan"));
}

TEST(Fixed, NeverPrintsANegativeZero) {
  EXPECT_EQ(fixed(-0.0001, 2), "0.00");
  EXPECT_EQ(fixed(-0.006, 2), "-0.01");
  EXPECT_EQ(fixed(2.5, 3), "2.500");
}

TEST(FixedTrimmed, DropsTrailingZerosAndABarePoint) {
  EXPECT_EQ(fixed_trimmed(2.5, 3), "2.5");
  EXPECT_EQ(fixed_trimmed(40.0, 2), "40");
  EXPECT_EQ(fixed_trimmed(-0.0001, 3), "0");
  EXPECT_EQ(fixed_trimmed(100.0, 0), "100");
}

}  // namespace
}  // namespace gutterwatt::detail
