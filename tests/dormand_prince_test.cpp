#include "gutterwatt/dormand_prince.hpp"

#include <gtest/gtest.h>

#include <array>
#include <boost/numeric/odeint.hpp>
#include <cmath>
#include <vector>

namespace gutterwatt::dormand_prince_test {
namespace {

using State2 = std::array<double, 2>;
constexpr std::array<std::size_t, 1> kFirst = {0};
constexpr std::array<std::size_t, 2> kBoth = {0, 1};

// The error relative to rtol (|x| + dt |dxdt|) + atol, slot by slot, as the run's checker does.
struct Relative {
  double rtol = 1e-10;
  double atol = 1e-14;
  double operator()(const State2& x, const State2& dxdt, const State2& err, double dt) const {
    double worst = 0.0;
    for (std::size_t i = 0; i < 2; ++i) {
      const double tol = rtol * (std::abs(x[i]) + dt * std::abs(dxdt[i])) + atol;
      worst = std::max(worst, std::abs(err[i]) / tol);
    }
    return worst;
  }
};

// y' = -y read by the system; q' = y, an integral nothing reads: y = e^-t, q = 1 - e^-t.
const auto kDecay = [](const State2& x, State2& dxdt, double) {
  dxdt[0] = -x[0];
  dxdt[1] = x[0];
};

State2 integrate(std::span<const std::size_t> read, double t_end, double rtol, long* steps) {
  DormandPrince<2, Relative> s(read, Relative{rtol}, 10.0);
  s.initialize({1.0, 0.0}, 0.0, 0.01);
  long n = 0;
  while (s.current_time() < t_end) {
    if (s.current_time() + s.current_time_step() > t_end) {
      const State2 x = s.current_state();
      s.initialize(x, s.current_time(), t_end - s.current_time());
    }
    s.do_step(kDecay);
    ++n;
  }
  if (steps) *steps = n;
  return s.current_state();
}

TEST(DormandPrince, ExponentialDecayToTheTolerance) {
  // Against libm's exp (the exact solution), over 5 time constants.
  long steps = 0;
  const State2 x = integrate(kFirst, 5.0, 1e-10, &steps);
  EXPECT_NEAR(x[0], std::exp(-5.0), 1e-11);
  EXPECT_NEAR(x[1], 1.0 - std::exp(-5.0), 1e-10);
  // Runge-Kutta methods keep linear invariants (Shampine 1986): y + q = 1 to rounding.
  EXPECT_NEAR(x[0] + x[1], 1.0, 4e-16);
  EXPECT_GT(steps, 10);
  EXPECT_LT(steps, 200);
}

TEST(DormandPrince, IntegralsLeftOutOfTheStagesGiveTheSameNumbersToTheBit) {
  // A slot that no rate reads need not be formed in the stages: the step's result, its error
  // and so its step sizes are the same whether or not it is.
  long steps_read = 0, steps_all = 0;
  const State2 read = integrate(kFirst, 3.0, 1e-8, &steps_read);
  const State2 all = integrate(kBoth, 3.0, 1e-8, &steps_all);
  EXPECT_EQ(read, all);
  EXPECT_EQ(steps_read, steps_all);
}

TEST(DormandPrince, FifthOrderAtAFixedStep) {
  // With the error test always passed and the step held at h, the global error of a method of
  // order 5 falls by 2^5 = 32 when h is halved (Hairer, Norsett & Wanner I, II.3).
  const auto error_at = [](double h) {
    const auto pass = [](const State2&, const State2&, const State2&, double) { return 0.0; };
    DormandPrince<2, decltype(pass)> s(kFirst, pass, h);
    s.initialize({1.0, 0.0}, 0.0, h);
    while (s.current_time() < 4.0 - 1e-12) s.do_step(kDecay);
    return std::abs(s.current_state()[0] - std::exp(-s.current_time()));
  };
  const double ratio = error_at(0.1) / error_at(0.05);
  EXPECT_GT(ratio, 28.0);
  EXPECT_LT(ratio, 36.0);
}

TEST(DormandPrince, DenseOutputBetweenTheSteps) {
  // The continuous extension is of order 4 (Hairer, Norsett & Wanner I, II.6): inside a step of
  // 0.5 at y' = -y its local error is a small multiple of h^5 = 0.03 (2e-5 allowed), against
  // e^-t from libm; at its end, the step's own value.
  const auto pass = [](const State2&, const State2&, const State2&, double) { return 0.0; };
  DormandPrince<2, decltype(pass)> s(kFirst, pass, 0.5);
  s.initialize({1.0, 0.0}, 0.0, 0.5);
  s.do_step(kDecay);
  const std::pair<double, double> step = s.do_step(kDecay);
  EXPECT_DOUBLE_EQ(step.first, 0.5);
  EXPECT_DOUBLE_EQ(step.second, 1.0);
  State2 x;
  for (double t : {0.6, 0.75, 0.9}) {
    s.calc_state(t, x);
    EXPECT_NEAR(x[0], std::exp(-t), 2e-5) << t;
    EXPECT_NEAR(x[0] + x[1], 1.0, 1e-15) << t;
  }
  s.calc_state(1.0, x);
  EXPECT_NEAR(x[0], s.current_state()[0], 1e-15);
}

TEST(DormandPrince, DenseOutputInTheReadSlotsAlone) {
  // Inside a step at y' = -y, against e^-t from libm (as above); the slot nobody reads (q) is
  // left as it was.
  const auto pass = [](const State2&, const State2&, const State2&, double) { return 0.0; };
  DormandPrince<2, decltype(pass)> s(kFirst, pass, 0.5);
  s.initialize({1.0, 0.0}, 0.0, 0.5);
  s.do_step(kDecay);
  s.do_step(kDecay);
  for (double t : {0.6, 0.75, 0.9, 1.0}) {
    State2 x = {-7.0, -7.0};
    s.calc_read_state(t, x);
    EXPECT_NEAR(x[0], std::exp(-t), 2e-5) << t;
    EXPECT_EQ(x[1], -7.0) << t;
  }
}

TEST(DormandPrince, DenseRateInsideAStep) {
  // The continuous extension's derivative: the step's first stage at its start and its last at
  // its end, the extension being continuously differentiable (Hairer, Norsett & Wanner I, II.6);
  // inside a step of 0.5 at y' = -y, within a small multiple of h^4 = 0.06 (2e-4 allowed) of
  // -e^-t from libm.
  const auto pass = [](const State2&, const State2&, const State2&, double) { return 0.0; };
  DormandPrince<2, decltype(pass)> s(kBoth, pass, 0.5);
  s.initialize({1.0, 0.0}, 0.0, 0.5);
  s.do_step(kDecay);
  const State2 start = s.current_deriv();
  s.do_step(kDecay);
  // At the very ends calc_rate hands back those stages as they are; a nanosecond inside, the
  // extension's own weights must give them (they move by a few times 1e-9 over that time).
  EXPECT_NEAR(s.calc_rate(0.5 + 1e-9, 0), start[0], 1e-7);
  EXPECT_NEAR(s.calc_rate(1.0 - 1e-9, 0), s.current_deriv()[0], 1e-7);
  EXPECT_NEAR(s.calc_rate(1.0 - 1e-9, 1), s.current_deriv()[1], 1e-7);
  for (double t : {0.6, 0.75, 0.9}) {
    EXPECT_NEAR(s.calc_rate(t, 0), -std::exp(-t), 2e-4) << t;
    EXPECT_NEAR(s.calc_rate(t, 0) + s.calc_rate(t, 1), 0.0, 1e-15) << t;
  }
}

TEST(DormandPrince, DenseRateWeightsSumToOne) {
  // The derivative of sum_i b_i(theta) = theta; at theta = 0 only k1 counts, at theta = 1 only
  // the last stage (the Hermite conditions of the extension, Hairer, Norsett & Wanner I, II.6).
  for (double theta : {0.0, 0.25, 0.5, 0.8, 1.0}) {
    const std::array<double, 6> w = dopri5_dense_rate_weights(theta);
    EXPECT_NEAR(w[0] + w[1] + w[2] + w[3] + w[4] + w[5], 1.0, 1e-14) << theta;
  }
  const std::array<double, 6> zero = dopri5_dense_rate_weights(0.0);
  const std::array<double, 6> one = dopri5_dense_rate_weights(1.0);
  for (std::size_t i = 0; i < 6; ++i) {
    EXPECT_NEAR(zero[i], i == 0 ? 1.0 : 0.0, 1e-14) << i;
    EXPECT_NEAR(one[i], i == 5 ? 1.0 : 0.0, 1e-14) << i;
  }
}

TEST(DormandPrince, DenseWeightsSumToTheStepShare) {
  // Consistency of a continuous extension: sum_i b_i(theta) = theta; at theta = 1 the weights
  // are the fifth-order ones (Dormand & Prince 1980: 35/384, 500/1113, 125/192, -2187/6784,
  // 11/84, 0).
  for (double theta : {0.0, 0.25, 0.5, 0.8, 1.0}) {
    const std::array<double, 6> w = dopri5_dense_weights(theta);
    EXPECT_NEAR(w[0] + w[1] + w[2] + w[3] + w[4] + w[5], theta, 1e-15) << theta;
  }
  const std::array<double, 6> one = dopri5_dense_weights(1.0);
  EXPECT_NEAR(one[0], 35.0 / 384.0, 1e-15);
  EXPECT_NEAR(one[1], 500.0 / 1113.0, 1e-15);
  EXPECT_NEAR(one[2], 125.0 / 192.0, 1e-15);
  EXPECT_NEAR(one[3], -2187.0 / 6784.0, 1e-15);
  EXPECT_NEAR(one[4], 11.0 / 84.0, 1e-15);
  EXPECT_NEAR(one[5], 0.0, 1e-15);
}

TEST(DormandPrince, StepSizeControl) {
  // Worked by hand from the controller's law (Hairer, Norsett & Wanner I, II.4): grow by
  // 0.9 err^(-1/5) below half the tolerance, at most 0.9 x 5; shrink by 0.9 err^(-1/3), at most
  // to a fifth; never above the largest step.
  EXPECT_NEAR(dopri5_grow(1.0, 1.0 / 32.0, 100.0), 1.8, 1e-15);
  EXPECT_NEAR(dopri5_grow(1.0, 1e-30, 100.0), 4.5, 1e-14);
  EXPECT_EQ(dopri5_grow(1.0, 0.7, 100.0), 1.0);
  EXPECT_EQ(dopri5_grow(10.0, 1e-3, 12.0), 12.0);
  EXPECT_NEAR(dopri5_shrink(1.0, 8.0, 100.0), 0.45, 1e-15);
  EXPECT_NEAR(dopri5_shrink(1.0, 1e9, 100.0), 0.2, 1e-15);
}

TEST(DormandPrince, GivesUpWhenNoStepPasses) {
  const auto never = [](const State2&, const State2&, const State2&, double) { return 2.0; };
  DormandPrince<2, decltype(never)> s(kFirst, never, 1.0);
  s.initialize({1.0, 0.0}, 0.0, 0.5);
  EXPECT_THROW(s.do_step(kDecay), StepSizeError);
}

TEST(DormandPrince, KnownDerivativeIsNotEvaluatedAgain) {
  int calls = 0;
  const auto counted = [&](const State2& x, State2& dxdt, double t) {
    ++calls;
    kDecay(x, dxdt, t);
  };
  DormandPrince<2, Relative> s(kFirst, Relative{1e-6}, 1.0);
  const State2 x0{1.0, 0.0};
  const State2 d0{-1.0, 1.0};
  s.initialize(x0, 0.0, 0.1, &d0);
  s.do_step(counted);
  EXPECT_EQ(calls, 6);  // six new stages per accepted step, the first handed over (FSAL)
  s.initialize(x0, 0.0, 0.1);
  calls = 0;
  s.do_step(counted);
  EXPECT_EQ(calls, 7);
}

// The linear reference's departure y and its integral s against Boost.Odeint's Dormand-Prince at
// a tolerance of 1e-13 on y' = E' + D e^(-beta t) + mu y, s' = y: the storage draining fast or
// slowly, the roof's lag slower and faster than the storage, the two rates nearly and exactly
// equal (the divided differences' near branch), no drain, a constant inflow.
TEST(LinearReference, AgreesWithAnIndependentIntegration) {
  namespace odeint = boost::numeric::odeint;
  struct Case {
    double mu, constant, decaying, beta, tau;
  };
  const std::vector<Case> cases = {
      {-0.16, 2e-5, -1e-5, 1.0 / 60.0, 40.0}, {-0.011, 2e-5, 3e-6, 1.0 / 60.0, 60.0},
      {-2.0, -1e-4, 5e-5, 0.1, 7.0},          {-0.05, 1e-5, 1e-5, 0.05 + 1e-9, 30.0},
      {-0.05, 1e-5, 1e-5, 0.05, 30.0},        {0.0, 1e-5, -4e-6, 1.0 / 30.0, 90.0},
      {-0.3, 1e-5, 0.0, 0.0, 15.0},           {-1e-9, 1e-5, 2e-6, 1.0, 0.01}};
  for (const Case& c : cases) {
    std::vector<double> ys = {0.0, 0.0};
    const auto rhs = [&](const std::vector<double>& x, std::vector<double>& d, double t) {
      d[0] = c.constant + c.decaying * std::exp(-c.beta * t) + c.mu * x[0];
      d[1] = x[0];
    };
    odeint::integrate_adaptive(
        odeint::make_controlled(1e-13, 1e-13, odeint::runge_kutta_dopri5<std::vector<double>>()),
        rhs, ys, 0.0, c.tau, c.tau / 100.0);
    const ReferenceAt ref = linear_reference_at(c.tau, c.mu, c.constant, c.decaying, c.beta);
    const double y_scale = (std::abs(c.constant) + std::abs(c.decaying)) * c.tau;
    EXPECT_NEAR(ref.y, ys[0], 1e-10 * y_scale) << "mu " << c.mu << " beta " << c.beta;
    EXPECT_NEAR(ref.s, ys[1], 1e-10 * y_scale * c.tau) << "mu " << c.mu << " beta " << c.beta;
  }
}

// At the pair's nodes the reference from powers of one exponential agrees with the reference
// worked at each node alone, on both sides of the series' range.
TEST(LinearReference, AtTheNodesAgreesWithEachNodeAlone) {
  for (const double dt : {0.5, 7.0, 60.0, 120.0}) {
    const std::array<ReferenceAt, 5> at_nodes =
        linear_reference_at_nodes(dt, -0.16, 2e-5, -1e-5, 1.0 / 60.0);
    for (std::size_t i = 0; i < at_nodes.size(); ++i) {
      const ReferenceAt one =
          linear_reference_at(dopri5::nodes[i] * dt, -0.16, 2e-5, -1e-5, 1.0 / 60.0);
      EXPECT_NEAR(at_nodes[i].y, one.y, 1e-13 * std::abs(one.y)) << "dt " << dt << " node " << i;
      EXPECT_NEAR(at_nodes[i].s, one.s, 1e-13 * std::abs(one.s)) << "dt " << dt << " node " << i;
    }
  }
}

// A storage of water w (the solver's slot, less what has flowed in) drains linearly, out = k V with
// V = w + I(t), under an inflow that tends to E at rate beta, I(t) = E t + D (1 - e^(-beta t)) /
// beta; slot 1 counts the outflow. On the linear reference the second step on takes the secant's
// slope, which is -k exactly: the pair has nothing left to integrate, its steps grow to the
// largest, and the end agrees with the exact solution of the linear equation worked by hand,
// V = V0 e^(-k t) + E (1 - e^(-k t)) / k + D (e^(-beta t) - e^(-k t)) / (k - beta).
TEST(LinearReference, TakesALinearStorageExactlyAndClosesItsBalance) {
  constexpr double k = 0.5, e = 2e-5, d = -1.5e-5, beta = 1.0 / 60.0, v0 = 1e-3, t_end = 600.0;
  const auto inflowed = [&](double t) { return e * t + d * (1.0 - std::exp(-beta * t)) / beta; };
  const auto system = [&](const State2& w, State2& dxdt, double t) {
    const double out = k * (w[0] + inflowed(t));
    dxdt[0] = -out;
    dxdt[1] = out;
  };
  State2 slopes{};
  constexpr std::array<std::size_t, 1> kOut = {1};
  using Solver = DormandPrince<2, Relative>;
  Solver s(kFirst, Relative{1e-8, 1e-14}, 100.0, Solver::Reference{0, kOut, {}, &slopes});
  s.initialize({v0, 0.0}, 0.0, 0.5);
  long steps = 0;
  while (s.current_time() < t_end) {
    const double t = s.current_time();
    if (t + s.current_time_step() > t_end) {
      const State2 x = s.current_state();
      const State2 dxdt = s.current_deriv();
      s.initialize(x, t, t_end - t, &dxdt);
    }
    s.set_inflow(e + d * std::exp(-beta * t), e, beta);
    s.do_step(system);
    ++steps;
  }
  const double v = s.current_state()[0] + inflowed(t_end);
  const double exact = v0 * std::exp(-k * t_end) + e * (1.0 - std::exp(-k * t_end)) / k +
                       d * (std::exp(-beta * t_end) - std::exp(-k * t_end)) / (k - beta);
  EXPECT_NEAR(v, exact, 1e-12);
  // The secant's two states differ by about the local error: its slope to about 1e-8.
  EXPECT_NEAR(slopes[0], -k, 1e-7);
  EXPECT_NEAR(slopes[1], k, 1e-7);
  // What flowed in is what is held plus what flowed out, to rounding.
  EXPECT_NEAR(v + s.current_state()[1], v0 + inflowed(t_end), 1e-15);
  // The plain pair holds k h under its stability limit (about 3.3): at least 90 steps.
  EXPECT_LT(steps, 20);
}

}  // namespace
}  // namespace gutterwatt::dormand_prince_test
