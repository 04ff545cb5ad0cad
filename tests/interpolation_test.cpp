#include "gutterwatt/interpolation.hpp"

#include <gtest/gtest.h>

#include <cmath>

namespace gutterwatt::interpolation_test {
namespace {

TEST(UniformTable, IsExactForCubics) {
  // Four-point Lagrange interpolation reproduces polynomials of degree 3 (A&S 25.2.13).
  const auto cubic = [](double x) { return 2.0 - x + 0.5 * x * x - 0.25 * x * x * x; };
  const UniformTable table(0.0, 2.0, 8, cubic);
  for (double x = 0.0; x <= 2.0; x += 0.0137) EXPECT_NEAR(table(x), cubic(x), 1e-13) << x;
  EXPECT_NEAR(table(2.0), cubic(2.0), 1e-13);
}

TEST(UniformTable, ErrorFallsAsTheFourthPowerOfTheStep) {
  const auto f = [](double x) { return std::sqrt(1.0 + x); };
  double previous = 0.0;
  for (int n : {16, 32, 64}) {
    const UniformTable table(0.0, 1.0, n, f);
    double worst = 0.0;
    for (double x = 0.0; x <= 1.0; x += 1e-3) worst = std::max(worst, std::abs(table(x) - f(x)));
    if (previous > 0.0) {
      EXPECT_NEAR(previous / worst, 16.0, 3.0) << n;
    }
    previous = worst;
  }
}

TEST(UniformTable, CoversItsRangeOnly) {
  const UniformTable table(1.0, 3.0, 4, [](double x) { return x; });
  EXPECT_TRUE(table.covers(1.0));
  EXPECT_TRUE(table.covers(3.0));
  EXPECT_FALSE(table.covers(0.999));
  EXPECT_FALSE(table.covers(3.001));
  EXPECT_FALSE(UniformTable().covers(0.0));
}

}  // namespace
}  // namespace gutterwatt::interpolation_test
