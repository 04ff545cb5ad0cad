// The one rule for numbers a person reads (src/report_format.hpp). Expected strings written by
// hand from the rule: three significant figures, no trailing zeros, never -0, a power of ten only
// below 0.001 and never for zero.

#include "report_format.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <limits>

using gutterwatt::detail::Medium;
using gutterwatt::detail::pretty;

namespace {
constexpr const char* kThin = "\xE2\x80\xAF";  // U+202F, between groups of three digits
}

TEST(ReportFormat, ZeroIsPlainZeroWhateverItsSign) {
  EXPECT_EQ(pretty(0.0), "0");
  EXPECT_EQ(pretty(-0.0), "0");
  EXPECT_EQ(pretty(0.0, Medium::svg), "0");
  EXPECT_EQ(pretty(-0.0, Medium::terminal), "0");
}

TEST(ReportFormat, ThreeSignificantFiguresWithoutTrailingZeros) {
  EXPECT_EQ(pretty(0.9), "0.9");
  EXPECT_EQ(pretty(0.900001, Medium::terminal), "0.9");
  EXPECT_EQ(pretty(17.862), "17.9");
  EXPECT_EQ(pretty(9.4512), "9.45");
  EXPECT_EQ(pretty(12.4, Medium::terminal), "12.4");
  EXPECT_EQ(pretty(0.0123), "0.0123");
  EXPECT_EQ(pretty(-0.0499), "-0.0499");
  EXPECT_EQ(pretty(0.99996), "1");
  EXPECT_EQ(pretty(9.996), "10");
  EXPECT_EQ(pretty(2.5, Medium::terminal), "2.5");
}

TEST(ReportFormat, WholeFromAHundredGroupedOnThePageOnly) {
  EXPECT_EQ(pretty(126.0), "126");
  EXPECT_EQ(pretty(100.4), "100");
  EXPECT_EQ(pretty(4776.0), std::string("4") + kThin + "776");
  EXPECT_EQ(pretty(1283.4, Medium::svg), std::string("1") + kThin + "283");
  EXPECT_EQ(pretty(1283.4, Medium::terminal), "1283");
  EXPECT_EQ(pretty(-1234567.0, Medium::terminal), "-1234567");
}

TEST(ReportFormat, PowerOfTenOnlyBelowAThousandth) {
  EXPECT_EQ(pretty(0.001), "0.001");
  EXPECT_EQ(pretty(3.2e-12, Medium::terminal), "3.2e-12");
  EXPECT_EQ(pretty(-4e-4, Medium::svg), "-4e-4");
  EXPECT_EQ(pretty(1.234e-9), "1.23&times;10<sup>-9</sup>");
  EXPECT_EQ(pretty(9.9996e-5, Medium::terminal), "1e-4");
}

TEST(ReportFormat, MissingIsADash) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  EXPECT_EQ(pretty(nan), "&ndash;");
  EXPECT_EQ(pretty(nan, Medium::terminal), "-");
}
