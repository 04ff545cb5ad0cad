// Tests of the shared helpers in src/detail.hpp.

#include "detail.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <sstream>
#include <string>
#include <vector>

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

TEST(Detail, SplitsPlainFieldsTrimmed) {
  const std::vector<std::string_view> f = split_fields(" a ,b,\t,c\r");
  ASSERT_EQ(f.size(), 4u);
  EXPECT_EQ(f[0], "a");
  EXPECT_EQ(f[1], "b");
  EXPECT_EQ(f[2], "");
  EXPECT_EQ(f[3], "c");
}

TEST(Detail, SkipsCommentsBlankLinesAndAByteOrderMark) {
  std::istringstream in("\xEF\xBB\xBF# note\n\n  x,y \r\n# more\nz\n");
  LineReader reader(in);
  int line = 0;
  std::string_view text;
  ASSERT_TRUE(next_data_line(reader, line, text));
  EXPECT_EQ(text, "x,y");
  EXPECT_EQ(line, 3);
  ASSERT_TRUE(next_data_line(reader, line, text));
  EXPECT_EQ(text, "z");
  EXPECT_EQ(line, 5);
  EXPECT_FALSE(next_data_line(reader, line, text));
}

}  // namespace
}  // namespace gutterwatt::detail
