#include "gutterwatt/phi_functions.hpp"

#include <gtest/gtest.h>

#include <cmath>

namespace gutterwatt::phi_functions_test {
namespace {

// The closed forms phi_1 = (e^z - 1) / z, phi_2 = (e^z - 1 - z) / z^2, phi_3 = (e^z - 1 - z -
// z^2 / 2) / z^3 in long double with libm's expm1l, where they do not cancel beyond double's
// precision.
long double closed(int k, long double z) {
  long double sum = std::expm1(z), term = z, factorial = 1.0L;
  for (int j = 1; j < k; ++j) {
    sum -= term / factorial;
    term *= z;
    factorial *= j + 1;
  }
  return sum / std::pow(z, static_cast<long double>(k));
}

TEST(PhiFunctions, AtMinusOneAreTheClosedForms) {
  // phi_1(-1) = 1 - 1/e, phi_2(-1) = 1/e, phi_3(-1) = 1/2 - 1/e (1/e from libm).
  const auto phi = phi_functions<3>(-1.0);
  EXPECT_NEAR(phi[0], 1.0 - std::exp(-1.0), 1e-16);
  EXPECT_NEAR(phi[1], std::exp(-1.0), 1e-16);
  EXPECT_NEAR(phi[2], 0.5 - std::exp(-1.0), 1e-16);
}

TEST(PhiFunctions, AgreeWithTheClosedFormsOnBothSidesOfTheSeries) {
  for (double z : {-40.0, -3.0, -0.7, -0.2500001, -0.2499999, -0.1, -0.01, 0.02, 0.2499999, 0.3}) {
    const auto phi = phi_functions<3>(z);
    for (int k = 1; k <= 3; ++k) {
      const double expected = static_cast<double>(closed(k, z));
      // Within the series' truncation at the edge of its range, 0.25^10 / 11! = 2.4e-14 of phi_1
      // (the linear reference and the trickle water need nothing like it).
      EXPECT_NEAR(phi[k - 1], expected, 3e-14 * std::abs(expected)) << "z " << z << " k " << k;
    }
    const auto two = phi_functions<2>(z);
    EXPECT_EQ(two[0], phi[0]);
    EXPECT_EQ(two[1], phi[1]);
  }
}

TEST(PhiFunctions, AtZeroAreOneOverFactorials) {
  const auto phi = phi_functions<3>(0.0);
  EXPECT_EQ(phi[0], 1.0);
  EXPECT_EQ(phi[1], 0.5);
  EXPECT_DOUBLE_EQ(phi[2], 1.0 / 6.0);
}

}  // namespace
}  // namespace gutterwatt::phi_functions_test
