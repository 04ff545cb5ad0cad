#include "gutterwatt/phi_functions.hpp"

#include <cmath>

namespace gutterwatt {
namespace {

// Below this |z| the series: its terms to z^9, the next below 0.25^10 / 11! = 2.4e-14 of the first.
constexpr double kSeriesBelow = 0.25;
constexpr int kTerms = 10;

// 1 / (j + k)! for j = 0 .. kTerms - 1.
constexpr std::array<double, kTerms> series_coefficients(int k) {
  std::array<double, kTerms> c{};
  double factorial = 1.0;
  for (int i = 2; i <= k; ++i) factorial *= i;
  for (int j = 0; j < kTerms; ++j) {
    c[j] = 1.0 / factorial;
    factorial *= j + k + 1;
  }
  return c;
}

constexpr std::array<std::array<double, kTerms>, 3> kCoefficients = {
    series_coefficients(1), series_coefficients(2), series_coefficients(3)};

}  // namespace

template <int K>
std::array<double, K> phi_functions(double z) {
  static_assert(K >= 1 && K <= 3);
  std::array<double, K> phi{};
  if (std::abs(z) < kSeriesBelow) {
    for (int k = 0; k < K; ++k) {
      double sum = kCoefficients[k][kTerms - 1];
      for (int j = kTerms - 2; j >= 0; --j) sum = sum * z + kCoefficients[k][j];
      phi[k] = sum;
    }
    return phi;
  }
  const double inverse = 1.0 / z;
  phi[0] = std::expm1(z) * inverse;
  double factorial = 1.0;
  for (int k = 1; k < K; ++k) {
    phi[k] = (phi[k - 1] - 1.0 / factorial) * inverse;
    factorial *= k + 1;
  }
  return phi;
}

template std::array<double, 1> phi_functions<1>(double z);
template std::array<double, 2> phi_functions<2>(double z);
template std::array<double, 3> phi_functions<3>(double z);

}  // namespace gutterwatt
