#include "gutterwatt/phi_functions.hpp"

#include <cmath>

namespace gutterwatt {
namespace {

// Below kPhiSeriesBelow the series: its terms to z^9, the next below 0.25^10 / 11! = 2.4e-14 of
// the first.
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
std::array<double, K> phi_functions(double z, double exp_z) {
  static_assert(K >= 1 && K <= 3);
  std::array<double, K> phi{};
  if (std::abs(z) < kPhiSeriesBelow) {
    for (int k = 0; k < K; ++k) {
      double sum = kCoefficients[k][kTerms - 1];
      for (int j = kTerms - 2; j >= 0; --j) sum = sum * z + kCoefficients[k][j];
      phi[k] = sum;
    }
    return phi;
  }
  // e^z - 1 loses at most about 3.5 units in the last place here (|z| >= 0.25).
  const double inverse = 1.0 / z;
  phi[0] = (exp_z - 1.0) * inverse;
  double factorial = 1.0;
  for (int k = 1; k < K; ++k) {
    phi[k] = (phi[k - 1] - 1.0 / factorial) * inverse;
    factorial *= k + 1;
  }
  return phi;
}

template <int K>
std::array<double, K> phi_functions(double z) {
  return phi_functions<K>(z, std::abs(z) < kPhiSeriesBelow ? 0.0 : std::exp(z));
}

template std::array<double, 1> phi_functions<1>(double z);
template std::array<double, 2> phi_functions<2>(double z);
template std::array<double, 3> phi_functions<3>(double z);
template std::array<double, 1> phi_functions<1>(double z, double exp_z);
template std::array<double, 2> phi_functions<2>(double z, double exp_z);

}  // namespace gutterwatt
