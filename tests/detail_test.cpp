// Tests of the shared helpers in src/detail.hpp.

#include "detail.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <random>
#include <sstream>
#include <string>
#include <utility>
#include <vector>

namespace gutterwatt::detail {
namespace {

TEST(WeightedMedian, WorkedByHand) {
  std::vector<std::pair<double, double>> three{{3.0, 1.0}, {1.0, 1.0}, {2.0, 1.0}};
  EXPECT_EQ(detail::weighted_median(three), 2.0);
  std::vector<std::pair<double, double>> heavy{{5.0, 1.0}, {1.0, 10.0}, {9.0, 1.0}};
  EXPECT_EQ(detail::weighted_median(heavy), 1.0);
  // Half the weight at or below 1 exactly: the running weight reaches half there.
  std::vector<std::pair<double, double>> even{{2.0, 60.0}, {1.0, 60.0}};
  EXPECT_EQ(detail::weighted_median(even), 1.0);
  std::vector<std::pair<double, double>> one{{4.0, 60.0}};
  EXPECT_EQ(detail::weighted_median(one), 4.0);
}

TEST(WeightedMedian, AgreesWithTheRunningWeightInSortedOrder) {
  // Against the definition: sort, accumulate, take the first value whose running weight
  // reaches half. Whole-second weights and many repeated values, as a rain record has.
  std::mt19937_64 gen(20261204);
  for (int round = 0; round < 200; ++round) {
    const int n = 1 + static_cast<int>(gen() % 300);
    std::vector<std::pair<double, double>> pairs;
    for (int i = 0; i < n; ++i) {
      pairs.emplace_back(static_cast<double>(gen() % 17) * 0.25,
                         static_cast<double>(60 * (1 + gen() % 5)));
    }
    std::vector<std::pair<double, double>> sorted = pairs;
    std::sort(sorted.begin(), sorted.end());
    double total = 0.0;
    for (const auto& p : sorted) total += p.second;
    double acc = 0.0;
    double expected = 0.0;
    for (const auto& [value, weight] : sorted) {
      acc += weight;
      if (acc >= 0.5 * total) {
        expected = value;
        break;
      }
    }
    EXPECT_EQ(detail::weighted_median(pairs), expected) << round;
  }
}

TEST(NarrowToOnset, BracketsWhereAConditionStartsToHold) {
  // x^2 >= 2 starts at sqrt(2) = 1.41421356237 (to eleven digits, a published constant).
  const auto [lo, hi] = narrow_to_onset([](double x) { return x * x >= 2.0; }, 1.0, 2.0, 1e-9);
  EXPECT_LE(hi - lo, 1e-9);
  EXPECT_LT(lo * lo, 2.0);
  EXPECT_GE(hi * hi, 2.0);
  EXPECT_NEAR(hi, 1.41421356237, 2e-9);
  // False even at the top: the bracket collapses there; true everywhere: it closes on the bottom.
  const auto never = narrow_to_onset([](double) { return false; }, 1.0, 2.0, 1e-9);
  EXPECT_EQ(never.first, 2.0);
  EXPECT_EQ(never.second, 2.0);
  EXPECT_NEAR(narrow_to_onset([](double) { return true; }, 1.0, 2.0, 1e-9).second, 1.0, 1e-9);
}

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

// printf's %.*f is the reference (C11 7.21.6.1: the exact value rounded, in glibc by the current
// rounding mode, to nearest with ties to even); the negative zero dropped as fixed drops it.
std::string printf_fixed(double v, int decimals) {
  char buf[kFixedRoom];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  std::string text = buf;
  if (text.find_first_not_of("-0.") == std::string::npos && text[0] == '-') text.erase(0, 1);
  return text;
}

TEST(Fixed, PrintsWhatPrintfPrints) {
  // Binary ties and near-ties, where the short path must give way: 0.125 is exact, so printf
  // rounds it to even; 2.675 is stored as 2.67499999999999982236431605997495353221893310546875.
  EXPECT_EQ(fixed(0.125, 2), "0.12");
  EXPECT_EQ(fixed(0.375, 2), "0.38");
  EXPECT_EQ(fixed(2.675, 2), "2.67");
  EXPECT_EQ(fixed(-1.0005, 3), "-1.000");  // stored just below 1.0005
  EXPECT_EQ(fixed(0.5, 0), "0");
  EXPECT_EQ(fixed(1.5, 0), "2");
  EXPECT_EQ(fixed(1e15, 3), "1000000000000000.000");
  EXPECT_EQ(fixed(0.0004, 9), "0.000400000");
  EXPECT_EQ(fixed(std::nan(""), 2), printf_fixed(std::nan(""), 2));
  // Many numbers of the kinds a run writes (levels, flows, powers; ties on the grid of the
  // places and a step either side), and arbitrary bit patterns, against printf.
  std::mt19937_64 random(16);
  std::uniform_real_distribution<double> unit(-1.0, 1.0);
  for (int i = 0; i < 200000; ++i) {
    const int decimals = static_cast<int>(random() % 11);
    double v = 0.0;
    switch (i % 3) {
      case 0:
        v = unit(random) * std::pow(10.0, static_cast<int>(random() % 24) - 12);
        break;
      case 1:
        v = std::nextafter(std::round(unit(random) * 1e6) / 1e3 + 0.0005, i % 2 == 0 ? 1.0 : -1.0);
        break;
      default: {
        const std::uint64_t bits = random();
        std::memcpy(&v, &bits, sizeof v);
      }
    }
    ASSERT_EQ(fixed(v, decimals), printf_fixed(v, decimals)) << v << " with " << decimals;
  }
}

TEST(FixedTrimmed, DropsTrailingZerosAndABarePoint) {
  EXPECT_EQ(fixed_trimmed(2.5, 3), "2.5");
  EXPECT_EQ(fixed_trimmed(40.0, 2), "40");
  EXPECT_EQ(fixed_trimmed(-0.0001, 3), "0");
  EXPECT_EQ(fixed_trimmed(100.0, 0), "100");
}

TEST(FixedTrimmed, PrintsWhatPrintfPrintsTrimmed) {
  // printf's text (printf_fixed) with its trailing zeros and a bare point dropped by hand.
  const auto trimmed_printf = [](double v, int decimals) {
    std::string text = printf_fixed(v, decimals);
    if (text.find('.') != std::string::npos) {
      text.erase(text.find_last_not_of('0') + 1);
      if (text.back() == '.') text.pop_back();
    }
    return text == "-0" ? std::string("0") : text;
  };
  EXPECT_EQ(fixed_trimmed(-0.00049, 3), "0");
  EXPECT_EQ(fixed_trimmed(-0.0012, 4), "-0.0012");
  EXPECT_EQ(fixed_trimmed(0.1, 9), "0.1");
  EXPECT_EQ(fixed_trimmed(1234567.0, 4), "1234567");
  std::mt19937_64 random(61);
  std::uniform_real_distribution<double> unit(-1.0, 1.0);
  for (int i = 0; i < 100000; ++i) {
    const int decimals = static_cast<int>(random() % 11);
    double v = unit(random) * std::pow(10.0, static_cast<int>(random() % 16) - 8);
    if (i % 2 == 0) v = std::round(v * 1e3) / 1e3;  // trailing zeros to drop
    ASSERT_EQ(fixed_trimmed(v, decimals), trimmed_printf(v, decimals)) << v << " with " << decimals;
  }
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
