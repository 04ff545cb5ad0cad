#include "gutterwatt/dormand_prince.hpp"

#include <algorithm>
#include <cmath>

namespace gutterwatt {

std::array<double, 6> dopri5_dense_weights(double theta) {
  // Hairer, Norsett & Wanner, Solving ODEs I, II.6 (the dense output of DOPRI5):
  // b_i(theta) = A b_i -+ C X_i(theta) (+ D for i = 1), b_7(theta) = B + C X_7(theta), with
  // A = theta^2 (3 - 2 theta), B = theta^2 (theta - 1), C = theta^2 (theta - 1)^2,
  // D = theta (theta - 1)^2.
  using namespace dopri5;
  const double x1 = 5.0 * (2558722523.0 - 31403016.0 * theta) / 11282082432.0;
  const double x3 = 100.0 * (882725551.0 - 15701508.0 * theta) / 32700410799.0;
  const double x4 = 25.0 * (443332067.0 - 31403016.0 * theta) / 1880347072.0;
  const double x5 = 32805.0 * (23143187.0 - 3489224.0 * theta) / 199316789632.0;
  const double x6 = 55.0 * (29972135.0 - 7076736.0 * theta) / 822651844.0;
  const double x7 = 10.0 * (7414447.0 - 829305.0 * theta) / 29380423.0;
  const double theta_m_1 = theta - 1.0;
  const double theta_sq = theta * theta;
  const double a = theta_sq * (3.0 - 2.0 * theta);
  const double b = theta_sq * theta_m_1;
  const double c = theta_sq * theta_m_1 * theta_m_1;
  const double d = theta * theta_m_1 * theta_m_1;
  return {a * b1 - c * x1 + d, a * b3 + c * x3, a * b4 - c * x4,
          a * b5 + c * x5,     a * b6 - c * x6, b + c * x7};
}

double dopri5_shrink(double dt, double err, double max_step) {
  // The error estimate is of fourth order: err ~ dt^4, aimed at 0.9 of the tolerance with a
  // safety margin (Hairer, Norsett & Wanner I, II.4, with the exponent of Boost.Odeint's default
  // step adjuster for an error of order 4: -1 / (4 - 1)).
  dt *= std::max(9.0 / 10.0 * std::pow(err, -1.0 / (4 - 1)), 1.0 / 5.0);
  return std::min(dt, max_step);
}

double dopri5_grow(double dt, double err, double max_step) {
  if (err < 0.5) {
    err = std::max(std::pow(5.0, -5.0), err);
    dt *= 9.0 / 10.0 * std::pow(err, -1.0 / 5);
    dt = std::min(dt, max_step);
  }
  return dt;
}

}  // namespace gutterwatt
