#include "gutterwatt/dormand_prince.hpp"

#include <algorithm>
#include <cmath>

#include "gutterwatt/phi_functions.hpp"

namespace gutterwatt {
namespace {

// The dense output's X_i(theta) for k1, k3, k4, k5, k6 and k7 (Hairer, Norsett & Wanner I, II.6),
// each linear in theta: scale (at0 - per_theta theta) / over, in the order of operations of
// Boost.Odeint's dopri5.
struct DenseXTerm {
  double scale, at0, per_theta, over;
};
constexpr std::array<DenseXTerm, 6> kDenseX = {{{5.0, 2558722523.0, 31403016.0, 11282082432.0},
                                                {100.0, 882725551.0, 15701508.0, 32700410799.0},
                                                {25.0, 443332067.0, 31403016.0, 1880347072.0},
                                                {32805.0, 23143187.0, 3489224.0, 199316789632.0},
                                                {55.0, 29972135.0, 7076736.0, 822651844.0},
                                                {10.0, 7414447.0, 829305.0, 29380423.0}}};

struct DenseX {
  double x1, x3, x4, x5, x6, x7;
};

DenseX dense_x(double theta) {
  const auto x = [theta](const DenseXTerm& k) {
    return k.scale * (k.at0 - k.per_theta * theta) / k.over;
  };
  return {x(kDenseX[0]), x(kDenseX[1]), x(kDenseX[2]), x(kDenseX[3]), x(kDenseX[4]), x(kDenseX[5])};
}

// A polynomial in theta of degree 4 at most, lowest power first, worked out at compile time.
using Poly = std::array<double, 5>;

constexpr Poly operator+(const Poly& a, const Poly& b) {
  Poly c{};
  for (std::size_t i = 0; i < c.size(); ++i) c[i] = a[i] + b[i];
  return c;
}

constexpr Poly operator*(const Poly& a, const Poly& b) {  // the product's degree must be <= 4
  Poly c{};
  for (std::size_t i = 0; i < a.size(); ++i) {
    for (std::size_t j = 0; i + j < c.size(); ++j) c[i + j] += a[i] * b[j];
  }
  return c;
}

constexpr Poly operator*(double k, const Poly& a) { return Poly{k} * a; }

// The theta-derivatives of dopri5_dense_weights, term by term, with
// A' = 6 theta (1 - theta), B' = theta (3 theta - 2), C = theta^2 (theta - 1)^2,
// C' = 2 theta (theta - 1) (2 theta - 1), D' = (theta - 1) (3 theta - 1) and X_i = X_i(0) + s_i
// theta (s_i the slopes of dense_x), as polynomials.
constexpr std::array<Poly, 6> rate_weights() {
  using namespace dopri5;
  const Poly da{0.0, 6.0, -6.0}, db{0.0, -2.0, 3.0}, c{0.0, 0.0, 1.0, -2.0, 1.0};
  const Poly dc{0.0, 2.0, -6.0, 4.0}, dd{1.0, -4.0, 3.0};
  const auto x = [](const DenseXTerm& k) {
    return Poly{k.scale * k.at0 / k.over, -k.scale * k.per_theta / k.over};
  };
  const Poly x1 = x(kDenseX[0]), x3 = x(kDenseX[1]), x4 = x(kDenseX[2]), x5 = x(kDenseX[3]),
             x6 = x(kDenseX[4]), x7 = x(kDenseX[5]);
  const auto slope = [&c](const Poly& xi) { return xi[1] * c; };
  return {b1 * da + -1.0 * (dc * x1) + -1.0 * slope(x1) + dd, b3 * da + dc * x3 + slope(x3),
          b4 * da + -1.0 * (dc * x4) + -1.0 * slope(x4),      b5 * da + dc * x5 + slope(x5),
          b6 * da + -1.0 * (dc * x6) + -1.0 * slope(x6),      db + dc * x7 + slope(x7)};
}

constexpr std::array<Poly, 6> kRateWeights = rate_weights();

}  // namespace

namespace {

// e^z where phi_functions reads it (|z| >= kPhiSeriesBelow), else 0.
double exp_where_read(double z) { return std::abs(z) < kPhiSeriesBelow ? 0.0 : std::exp(z); }

// linear_reference_at with a = mu tau, b = -beta tau and e^a, e^b (where read) given.
ReferenceAt reference_from(double tau, double a, double exp_a, double b, double exp_b,
                           double constant, double decaying, bool integral) {
  // y = E' tau phi_1(a) + D tau (e^a - e^b) / (a - b) and s = E' tau^2 phi_2(a) + D tau^2
  // (phi_1(a) - phi_1(b)) / (a - b), E' the constant forcing and D the decaying one's start (the
  // convolution of e^(mu t) with each, worked by hand), e^z = 1 + z phi_1(z).
  const std::array<double, 2> pa = phi_functions<2>(a, exp_a);
  ReferenceAt ref{constant * tau * pa[0], integral ? constant * tau * tau * pa[1] : 0.0};
  if (decaying == 0.0) return ref;
  const double gap = a - b;
  // Where a and b nearly meet, the divided differences by their Taylor series in the gap to the
  // second term: e^b phi_1(gap) = e^b (1 + gap / 2 + ...), and phi_1'(b) + phi_1''(b) gap / 2 with
  // phi_1' = phi_1 - phi_2 and phi_1'' = phi_1 - 2 phi_2 + 2 phi_3 (the moments of e^(b theta) on
  // [0, 1]). Their error, about gap^2, and the direct form's cancellation, about 1e-16 / gap, meet
  // at this gap.
  constexpr double kMeet = 1e-5;
  if (std::abs(gap) > kMeet) {
    const double pb = phi_functions<1>(b, exp_b)[0];
    ref.y += decaying * tau * (a * pa[0] - b * pb) / gap;
    if (integral) ref.s += decaying * tau * tau * (pa[0] - pb) / gap;
  } else {
    const std::array<double, 3> pb = phi_functions<3>(b);
    ref.y += decaying * tau * (1.0 + b * pb[0]) * (1.0 + gap * (0.5 + gap / 6.0));
    if (integral) {
      ref.s +=
          decaying * tau * tau * (pb[0] - pb[1] + 0.5 * gap * (pb[0] - 2.0 * pb[1] + 2.0 * pb[2]));
    }
  }
  return ref;
}

// e^(z c) at the pair's nodes c = 1/5, 3/10, 4/5, 8/9, 1 where phi_functions reads them: the
// first, second, third and fifth as powers of e^(z / 10), which spares three of five exp calls.
std::array<double, 5> exp_at_nodes(double z) {
  using namespace dopri5;
  std::array<double, 5> e{};
  if (std::abs(z) >= kPhiSeriesBelow) {  // else every node sums the series
    const double u = std::exp(0.1 * z), u2 = u * u, u4 = u2 * u2, u8 = u4 * u4;
    e = {u2, u2 * u, u8, exp_where_read(c5 * z), u8 * u2};
  }
  return e;
}

}  // namespace

ReferenceAt linear_reference_at(double tau, double mu, double constant, double decaying,
                                double beta, bool integral) {
  if (tau == 0.0) return {};
  const double a = mu * tau, b = -beta * tau;
  return reference_from(tau, a, exp_where_read(a), b, decaying == 0.0 ? 0.0 : exp_where_read(b),
                        constant, decaying, integral);
}

std::array<ReferenceAt, 5> linear_reference_at_nodes(double dt, double mu, double constant,
                                                     double decaying, double beta) {
  using namespace dopri5;
  const std::array<double, 5> exp_a = exp_at_nodes(mu * dt);
  const std::array<double, 5> exp_b =
      decaying == 0.0 ? std::array<double, 5>{} : exp_at_nodes(-beta * dt);
  std::array<ReferenceAt, 5> refs;
  for (std::size_t i = 0; i < nodes.size(); ++i) {
    const double tau = nodes[i] * dt;
    refs[i] =
        reference_from(tau, mu * tau, exp_a[i], -beta * tau, exp_b[i], constant, decaying, true);
  }
  return refs;
}

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
  std::array<double, 6> w;
  for (std::size_t i = 0; i < w.size(); ++i) {
    const Poly& p = kRateWeights[i];
    w[i] = p[0] + theta * (p[1] + theta * (p[2] + theta * (p[3] + theta * p[4])));
  }
  return w;
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
