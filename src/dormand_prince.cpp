#include "gutterwatt/dormand_prince.hpp"

#include <algorithm>
#include <cmath>

namespace gutterwatt {
namespace {

// The dense output's X_i(theta) for k1, k3, k4, k5, k6 and k7 (Hairer, Norsett & Wanner I, II.6),
// each linear in theta, in the order of operations of Boost.Odeint's dopri5.
struct DenseX {
  double x1, x3, x4, x5, x6, x7;
};

DenseX dense_x(double theta) {
  return {5.0 * (2558722523.0 - 31403016.0 * theta) / 11282082432.0,
          100.0 * (882725551.0 - 15701508.0 * theta) / 32700410799.0,
          25.0 * (443332067.0 - 31403016.0 * theta) / 1880347072.0,
          32805.0 * (23143187.0 - 3489224.0 * theta) / 199316789632.0,
          55.0 * (29972135.0 - 7076736.0 * theta) / 822651844.0,
          10.0 * (7414447.0 - 829305.0 * theta) / 29380423.0};
}

}  // namespace

std::array<double, 6> dopri5_dense_weights(double theta) {
  // Hairer, Norsett & Wanner, Solving ODEs I, II.6 (the dense output of DOPRI5):
  // b_i(theta) = A b_i -+ C X_i(theta) (+ D for i = 1), b_7(theta) = B + C X_7(theta), with
  // A = theta^2 (3 - 2 theta), B = theta^2 (theta - 1), C = theta^2 (theta - 1)^2,
  // D = theta (theta - 1)^2.
  using namespace dopri5;
  const auto [x1, x3, x4, x5, x6, x7] = dense_x(theta);
  const double theta_m_1 = theta - 1.0;
  const double theta_sq = theta * theta;
  const double a = theta_sq * (3.0 - 2.0 * theta);
  const double b = theta_sq * theta_m_1;
  const double c = theta_sq * theta_m_1 * theta_m_1;
  const double d = theta * theta_m_1 * theta_m_1;
  return {a * b1 - c * x1 + d, a * b3 + c * x3, a * b4 - c * x4,
          a * b5 + c * x5,     a * b6 - c * x6, b + c * x7};
}

std::array<double, 6> dopri5_dense_rate_weights(double theta) {
  // The theta-derivatives of dopri5_dense_weights: with the same A, B, C, D and X_i,
  // A' = 6 theta (1 - theta), B' = theta (3 theta - 2), C' = 2 theta (theta - 1) (2 theta - 1),
  // D' = (theta - 1) (3 theta - 1), and each X_i linear in theta.
  using namespace dopri5;
  const auto [x1, x3, x4, x5, x6, x7] = dense_x(theta);
  // The X_i's slopes.
  const double dx1 = 5.0 * -31403016.0 / 11282082432.0;
  const double dx3 = 100.0 * -15701508.0 / 32700410799.0;
  const double dx4 = 25.0 * -31403016.0 / 1880347072.0;
  const double dx5 = 32805.0 * -3489224.0 / 199316789632.0;
  const double dx6 = 55.0 * -7076736.0 / 822651844.0;
  const double dx7 = 10.0 * -829305.0 / 29380423.0;
  const double theta_m_1 = theta - 1.0;
  const double c = theta * theta * theta_m_1 * theta_m_1;
  const double da = 6.0 * theta * (1.0 - theta);
  const double db = theta * (3.0 * theta - 2.0);
  const double dc = 2.0 * theta * theta_m_1 * (2.0 * theta - 1.0);
  const double dd = theta_m_1 * (3.0 * theta - 1.0);
  return {da * b1 - dc * x1 - c * dx1 + dd, da * b3 + dc * x3 + c * dx3,
          da * b4 - dc * x4 - c * dx4,      da * b5 + dc * x5 + c * dx5,
          da * b6 - dc * x6 - c * dx6,      db + dc * x7 + c * dx7};
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
