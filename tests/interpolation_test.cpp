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

TEST(SharedTable, BuildsEachDistinctTableOnce) {
  int calls = 0;
  const auto cube = [&](double x) {
    ++calls;
    return x * x * x;
  };
  const UniformTable first = shared_table("test cube", {2.0}, 0.0, 1.0, 8, cube);
  EXPECT_EQ(calls, 11);  // n + 3 nodes
  const UniformTable again = shared_table("test cube", {2.0}, 0.0, 1.0, 8, cube);
  EXPECT_EQ(calls, 11);
  EXPECT_EQ(again(0.3), first(0.3));
  EXPECT_NEAR(again(0.3), 0.027, 1e-15);                 // exact for cubics, 0.3^3 by hand
  shared_table("test cube", {3.0}, 0.0, 1.0, 8, cube);   // another figure
  shared_table("test cube", {2.0}, 0.0, 2.0, 8, cube);   // another range
  shared_table("test cube", {2.0}, 0.0, 1.0, 16, cube);  // other nodes
  EXPECT_EQ(calls, 11 + 11 + 11 + 19);
}

}  // namespace
}  // namespace gutterwatt::interpolation_test
