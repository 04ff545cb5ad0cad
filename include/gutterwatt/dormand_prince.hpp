#pragma once
/// The Dormand-Prince 5(4) pair with error control and dense output: the run's solver.
///
/// The method is Dormand & Prince (1980), "A family of embedded Runge-Kutta formulae", J. Comput.
/// Appl. Math. 6(1): a fifth-order solution, a fourth-order estimate for its error, and the last
/// stage evaluated at the new point, so that it is the next step's first (FSAL). The dense output
/// is the continuous extension in Hairer, Norsett & Wanner, Solving Ordinary Differential
/// Equations I (2nd ed., section II.6). The step-size control is the elementary controller of the
/// same book (II.4) with the exponents and limits of Boost.Odeint's default step adjuster: shrink
/// by 0.9 err^(-1/3), to no less than a fifth, after a rejected step; grow by 0.9 err^(-1/5), to
/// at most 4.5 times, after an accepted step whose error is under half the tolerance. These are
/// the formulas and constants of Boost.Odeint's dopri5 dense-output stepper, written in the same
/// order of operations, so that a run gives the same numbers to the bit.
///
/// What it adds: the slots that no right-hand side reads (running integrals of flows) are left
/// out of the intermediate stages. Their stage values would be computed and never used; they
/// enter the step's result, its error and the dense output as before.
///
/// And, optionally (DormandPrince::Reference), a linear reference that each step takes exactly,
/// so that the pair integrates only what the reference leaves: a change of variables, as the
/// exponential integrators of Hochbruck & Ostermann (2010, Acta Numerica 19, "Exponential
/// integrators"; from memory) take a linear part exactly. One storage's outflow is taken as
/// linear in its water, with the slope mu of the step before (its last two evaluations are at one
/// time and two states: a secant), and its inflow as the law set_inflow gives, q(tau) = E +
/// (q0 - E) e^(-beta tau). The storage's water then departs from where it starts by y(tau), with
/// y' = q(tau) + r + mu y, y(0) = 0 (r the storage's rate at the step's start), solved exactly
/// through phi_1 and phi_2; its integral is s(tau). Every slot i carries its rate at the start r_i
/// plus its slope lambda_i times y: the reference r_i tau + lambda_i s(tau), the pair integrating
/// dx_i/dt - r_i - lambda_i y. The error estimate is the pair's on that departure. A storage that
/// drains fast and follows a changing inflow, whose steps the pair would otherwise hold to the
/// decay of each change (however smooth the water), is then stepped by the curvature of its law
/// alone. Linear balances among the slots hold as the slopes respect them: the outflows' slopes
/// (by the same secant) sum to the storage's, and `alike` gives a slot another's slope.

#include <array>
#include <cstddef>
#include <limits>
#include <ranges>
#include <span>
#include <stdexcept>
#include <string>
#include <utility>

namespace gutterwatt {

/// The step size could not be made small enough for the error test (kMaxRejectedTries tries).
class StepSizeError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

/// The coefficients of the pair (Dormand & Prince 1980, table 2).
namespace dopri5 {
inline constexpr double c2 = 1.0 / 5.0, c3 = 3.0 / 10.0, c4 = 4.0 / 5.0, c5 = 8.0 / 9.0;
/// The times of the stages after the first, as shares of the step (the sixth and seventh at its
/// end).
inline constexpr std::array<double, 5> nodes = {c2, c3, c4, c5, 1.0};
inline constexpr double a21 = 1.0 / 5.0;
inline constexpr double a31 = 3.0 / 40.0, a32 = 9.0 / 40.0;
inline constexpr double a41 = 44.0 / 45.0, a42 = -56.0 / 15.0, a43 = 32.0 / 9.0;
inline constexpr double a51 = 19372.0 / 6561.0, a52 = -25360.0 / 2187.0, a53 = 64448.0 / 6561.0,
                        a54 = -212.0 / 729.0;
inline constexpr double a61 = 9017.0 / 3168.0, a62 = -355.0 / 33.0, a63 = 46732.0 / 5247.0,
                        a64 = 49.0 / 176.0, a65 = -5103.0 / 18656.0;
/// The fifth-order weights (b2 = b7 = 0).
inline constexpr double b1 = 35.0 / 384.0, b3 = 500.0 / 1113.0, b4 = 125.0 / 192.0,
                        b5 = -2187.0 / 6784.0, b6 = 11.0 / 84.0;
/// The fifth-order less the fourth-order weights: the error estimate.
inline constexpr double e1 = b1 - 5179.0 / 57600.0, e3 = b3 - 7571.0 / 16695.0,
                        e4 = b4 - 393.0 / 640.0, e5 = b5 - (-92097.0 / 339200.0),
                        e6 = b6 - 187.0 / 2100.0, e7 = -1.0 / 40.0;
}  // namespace dopri5

/// The dense output's weights at `theta` in [0, 1] of a step, for k1, k3, k4, k5, k6 and k7
/// (k2's is zero).
std::array<double, 6> dopri5_dense_weights(double theta);
/// Their derivatives in theta: the weights of the dense output's rate of change.
std::array<double, 6> dopri5_dense_rate_weights(double theta);

/// The step after a rejected try with error `err` (> 1) and after an accepted one (err <= 1),
/// at most `max_step`.
double dopri5_shrink(double dt, double err, double max_step);
double dopri5_grow(double dt, double err, double max_step);

/// The departure y(tau) of the reference's storage from where a step starts, and its integral
/// s(tau), for y' = q(tau) + r + mu y with y(0) = 0 and q(tau) = E + (q0 - E) e^(-beta tau):
/// `constant` is E + r, `decaying` q0 - E (0 where beta is 0).
struct ReferenceAt {
  double y = 0.0, s = 0.0;
};
/// Without `integral`, y alone (s left 0).
ReferenceAt linear_reference_at(double tau, double mu, double constant, double decaying,
                                double beta, bool integral = true);
/// linear_reference_at at the pair's nodes c2, c3, c4, c5 and 1 of a step `dt` (the same
/// numbers to rounding, with fewer exponentials).
std::array<ReferenceAt, 5> linear_reference_at_nodes(double dt, double mu, double constant,
                                                     double decaying, double beta);

/// Rejected tries in a row after which a step counts as impossible.
inline constexpr int kMaxRejectedTries = 500;

/// Integrates dx/dt = f(x, t) over an array state, one accepted step at a time, from a state
/// and optionally its known derivative. `Error` is called as err(x_old, dxdt_old, x_err, dt)
/// and returns the error relative to the tolerance (accept at <= 1). The system is called as
/// f(x, dxdt, t) and must read only the slots named in `read`.
template <std::size_t N, class Error>
class DormandPrince {
 public:
  using State = std::array<double, N>;

  /// A linear reference (see the head of this file): off while `slopes` is null.
  struct Reference {
    std::size_t storage = 0;  ///< the slot whose outflow is taken as linear in its water
    /// Slots whose rates are flows out of the storage: sloped by the same secant.
    std::span<const std::size_t> outflows;
    /// {slot, from}: the slot takes from's slope (the same flow counted twice).
    std::span<const std::array<std::size_t, 2>> alike;
    /// The slopes, kept by the caller from one step (and solver) to the next; the other slots' 0.
    State* slopes = nullptr;
  };

  DormandPrince(std::span<const std::size_t> read, Error error, double max_step,
                Reference reference = {})
      : read_(read), error_(std::move(error)), max_step_(max_step), ref_(reference) {}

  /// The reference's inflow over the steps that follow: q0 at the next step's start, tending to
  /// `equilibrium` at `rate` (1/s; 0: constant).
  void set_inflow(double q0, double equilibrium, double rate) {
    q0_ = q0;
    equilibrium_ = equilibrium;
    beta_ = rate;
  }

  /// Starts from `x0` at `t0` with a first try of `dt0`; `dxdt0`, when given, is the derivative
  /// there (else the first step evaluates it).
  void initialize(const State& x0, double t0, double dt0, const State* dxdt0 = nullptr) {
    x_[now_] = x0;
    t_ = t0;
    dt_ = dt0;
    have_dxdt_ = dxdt0 != nullptr;
    if (have_dxdt_) dxdt_[now_] = *dxdt0;
  }

  /// Takes one accepted step; returns its start and end times. Throws StepSizeError when no
  /// step size passes the error test.
  template <class System>
  std::pair<double, double> do_step(System&& f) {
    if (!have_dxdt_) {
      f(x_[now_], dxdt_[now_], t_);
      have_dxdt_ = true;
    }
    t_old_ = t_;
    for (int tries = 0;; ++tries) {
      const bool accepted = try_step(f);
      if (tries >= kMaxRejectedTries) {
        throw StepSizeError("no step size passed the error test in " +
                            std::to_string(kMaxRejectedTries + 1) + " tries");
      }
      if (accepted) break;
    }
    now_ = 1 - now_;  // the try's end becomes the current point; the start is kept for calc_state
    return {t_old_, t_};
  }

  /// The dense output of the last step at `t` within it.
  void calc_state(double t, State& x) const { dense(t, x, std::views::iota(std::size_t{0}, N)); }
  /// The dense output of the last step at `t` in the slots the system reads, into those slots
  /// of `x` (its other slots are left as they are): what the system needs to be evaluated there.
  void calc_read_state(double t, State& x) const { dense(t, x, read_); }

  /// The dense output of the last step at `t` in slot `i` alone.
  double calc_slot(double t, std::size_t i) const {
    State x;
    const std::array<std::size_t, 1> slot = {i};
    dense(t, x, slot);
    return x[i];
  }

  /// The dense output's rate of change in slot `i` at `t` within the last step: k1 at its start
  /// and the last stage at its end (the extension is continuously differentiable).
  double calc_rate(double t, std::size_t i) const {
    if (t == t_) return dxdt_[now_][i];
    if (t == t_old_) return dxdt_[1 - now_][i];
    const std::array<double, 6> w = dopri5_dense_rate_weights((t - t_old_) / (t_ - t_old_));
    if (ref_.slopes) {
      return dxdt_[1 - now_][i] + lambda_[i] * reference_at(t - t_old_, false).y + w[1] * k3_[i] +
             w[2] * k4_[i] + w[3] * k5_[i] + w[4] * k6_[i] + w[5] * k7_left_[i];
    }
    return w[0] * dxdt_[1 - now_][i] + w[1] * k3_[i] + w[2] * k4_[i] + w[3] * k5_[i] +
           w[4] * k6_[i] + w[5] * dxdt_[now_][i];
  }

  const State& current_state() const { return x_[now_]; }
  /// The derivative at the current point (after a step, its last stage).
  const State& current_deriv() const { return dxdt_[now_]; }
  double current_time() const { return t_; }
  double current_time_step() const { return dt_; }

 private:
  template <class Slots>
  void dense(double t, State& x, const Slots& slots) const {
    const State& x0 = x_[1 - now_];
    const State& k1 = dxdt_[1 - now_];
    const State& k7 = dxdt_[now_];
    const double dt = t_ - t_old_;
    const std::array<double, 6> w = dopri5_dense_weights((t - t_old_) / dt);
    const double w1 = dt * w[0], w3 = dt * w[1], w4 = dt * w[2], w5 = dt * w[3], w6 = dt * w[4],
                 w7 = dt * w[5];
    if (ref_.slopes) {
      const double tau = t - t_old_;
      const double s = reference_at(tau).s;
      for (std::size_t i : slots) {
        x[i] = x0[i] + k1[i] * tau + lambda_[i] * s + w3 * k3_[i] + w4 * k4_[i] + w5 * k5_[i] +
               w6 * k6_[i] + w7 * k7_left_[i];
      }
      return;
    }
    for (std::size_t i : slots) {
      x[i] = 1.0 * x0[i] + w1 * k1[i] + w3 * k3_[i] + w4 * k4_[i] + w5 * k5_[i] + w6 * k6_[i] +
             w7 * k7[i];
    }
  }

  ReferenceAt reference_at(double tau, bool integral = true) const {
    return linear_reference_at(tau, lambda_[ref_.storage], constant_, decaying_, beta_, integral);
  }

  // One try from the current point at t_ with dt_, into the other buffers: on success t_ has
  // moved (do_step then makes them current); dt_ is the next try's step.
  template <class System>
  bool try_step(System& f) {
    const double dt = dt_;
    if (dt - max_step_ > std::numeric_limits<double>::epsilon()) {
      dt_ = max_step_;
      return false;
    }
    const double err = ref_.slopes ? try_on_reference(f, dt) : try_plain(f, dt);
    if (err > 1.0) {
      dt_ = dopri5_shrink(dt, err, max_step_);
      return false;
    }
    if (ref_.slopes) update_slopes(x_[1 - now_]);
    t_ += dt;
    dt_ = dopri5_grow(dt, err, max_step_);
    return true;
  }

  // The pair's stages, end and error over `dt`; returns the error relative to the tolerance.
  template <class System>
  double try_plain(System& f, double dt) {
    using namespace dopri5;
    const State& x = x_[now_];
    const State& k1 = dxdt_[now_];
    State& out = x_[1 - now_];
    State& k7 = dxdt_[1 - now_];
    const auto stage = [&](const auto& combine) {
      for (std::size_t i : read_) stage_[i] = combine(i);
    };
    stage([&](std::size_t i) { return 1.0 * x[i] + dt * a21 * k1[i]; });
    f(stage_, k2_, t_ + dt * c2);
    stage([&](std::size_t i) { return 1.0 * x[i] + dt * a31 * k1[i] + dt * a32 * k2_[i]; });
    f(stage_, k3_, t_ + dt * c3);
    stage([&](std::size_t i) {
      return 1.0 * x[i] + dt * a41 * k1[i] + dt * a42 * k2_[i] + dt * a43 * k3_[i];
    });
    f(stage_, k4_, t_ + dt * c4);
    stage([&](std::size_t i) {
      return 1.0 * x[i] + dt * a51 * k1[i] + dt * a52 * k2_[i] + dt * a53 * k3_[i] +
             dt * a54 * k4_[i];
    });
    f(stage_, k5_, t_ + dt * c5);
    stage([&](std::size_t i) {
      return 1.0 * x[i] + dt * a61 * k1[i] + dt * a62 * k2_[i] + dt * a63 * k3_[i] +
             dt * a64 * k4_[i] + dt * a65 * k5_[i];
    });
    f(stage_, k6_, t_ + dt);
    for (std::size_t i = 0; i < N; ++i) {
      out[i] = 1.0 * x[i] + dt * b1 * k1[i] + dt * b3 * k3_[i] + dt * b4 * k4_[i] +
               dt * b5 * k5_[i] + dt * b6 * k6_[i];
    }
    f(out, k7, t_ + dt);
    for (std::size_t i = 0; i < N; ++i) {
      err_[i] = dt * e1 * k1[i] + dt * e3 * k3_[i] + dt * e4 * k4_[i] + dt * e5 * k5_[i] +
                dt * e6 * k6_[i] + dt * e7 * k7[i];
    }
    return error_(x, k1, err_, dt);
  }

  // try_plain on the departure from the linear reference: k2 .. k6 and k7_left_ are the rates
  // less the reference's (k1's is 0), the state's end k7 as it is (the next step's start).
  template <class System>
  double try_on_reference(System& f, double dt) {
    using namespace dopri5;
    const State& x = x_[now_];
    const State& r = dxdt_[now_];
    State& out = x_[1 - now_];
    State& k7 = dxdt_[1 - now_];
    lambda_ = *ref_.slopes;
    constant_ = equilibrium_ + r[ref_.storage];
    decaying_ = beta_ > 0.0 ? q0_ - equilibrium_ : 0.0;
    if (beta_ <= 0.0) constant_ += q0_ - equilibrium_;
    const std::array<ReferenceAt, 5> refs =
        linear_reference_at_nodes(dt, lambda_[ref_.storage], constant_, decaying_, beta_);
    // The read slots at node `n` (dopri5::nodes) of the step, given the pair's part; returns the
    // reference there.
    const auto stage = [&](std::size_t n, const auto& pair) {
      const ReferenceAt& ref = refs[n];
      for (std::size_t i : read_) {
        stage_[i] = x[i] + r[i] * nodes[n] * dt + lambda_[i] * ref.s + pair(i);
      }
      return ref;
    };
    const auto leave = [&](State& k, double y) {
      for (std::size_t i = 0; i < N; ++i) k[i] -= r[i] + lambda_[i] * y;
    };
    double y = stage(0, [](std::size_t) { return 0.0; }).y;
    f(stage_, k2_, t_ + dt * c2);
    leave(k2_, y);
    y = stage(1, [&](std::size_t i) { return dt * a32 * k2_[i]; }).y;
    f(stage_, k3_, t_ + dt * c3);
    leave(k3_, y);
    y = stage(2, [&](std::size_t i) { return dt * a42 * k2_[i] + dt * a43 * k3_[i]; }).y;
    f(stage_, k4_, t_ + dt * c4);
    leave(k4_, y);
    y = stage(3, [&](std::size_t i) {
          return dt * a52 * k2_[i] + dt * a53 * k3_[i] + dt * a54 * k4_[i];
        }).y;
    f(stage_, k5_, t_ + dt * c5);
    leave(k5_, y);
    const ReferenceAt end = stage(4, [&](std::size_t i) {
      return dt * a62 * k2_[i] + dt * a63 * k3_[i] + dt * a64 * k4_[i] + dt * a65 * k5_[i];
    });
    f(stage_, k6_, t_ + dt);
    leave(k6_, end.y);
    for (std::size_t i = 0; i < N; ++i) {
      out[i] = x[i] + r[i] * dt + lambda_[i] * end.s + dt * b3 * k3_[i] + dt * b4 * k4_[i] +
               dt * b5 * k5_[i] + dt * b6 * k6_[i];
    }
    f(out, k7, t_ + dt);
    for (std::size_t i = 0; i < N; ++i) {
      k7_left_[i] = k7[i] - r[i] - lambda_[i] * end.y;
      err_[i] = dt * e3 * k3_[i] + dt * e4 * k4_[i] + dt * e5 * k5_[i] + dt * e6 * k6_[i] +
                dt * e7 * k7_left_[i];
    }
    return error_(x, r, err_, dt);
  }

  // The slopes for the next step, by the secant between the last two evaluations (stage 6 and the
  // step's end, at one time): the storage's, and its outflows' where the storage drains (mu < 0);
  // all 0 where it does not. Kept where the storage barely moved between them (the secant would
  // be rounding).
  void update_slopes(const State& out) {
    const std::size_t v = ref_.storage;
    const double moved = out[v] - stage_[v];
    if (!(std::abs(moved) > kSecantFloor * (std::abs(out[v]) + kSecantScale))) return;
    State& slopes = *ref_.slopes;
    const double mu = (k7_left_[v] - k6_[v]) / moved;
    slopes.fill(0.0);
    if (!(mu < 0.0)) return;
    slopes[v] = mu;
    for (std::size_t i : ref_.outflows) slopes[i] = (k7_left_[i] - k6_[i]) / moved;
    for (const auto& [to, from] : ref_.alike) slopes[to] = slopes[from];
  }
  // The secant is taken where the storage moved by more than this share of its water plus the
  // scale (in the storage's unit; for the run's reservoir, 1 mL): about 1e4 roundings.
  static constexpr double kSecantFloor = 1e-12;
  static constexpr double kSecantScale = 1e-6;

  std::span<const std::size_t> read_;
  Error error_;
  double max_step_;
  Reference ref_;
  // The step's slopes (kept for its dense output), its rates' end less the reference's, and the
  // reference's inflow law and terms.
  State lambda_{}, k7_left_{};
  double q0_ = 0.0, equilibrium_ = 0.0, beta_ = 0.0, constant_ = 0.0, decaying_ = 0.0;
  // Two points and their derivatives: [now_] the current one, [1 - now_] the last step's start
  // (after a step) or the try's end (during one).
  std::array<State, 2> x_{}, dxdt_{};
  int now_ = 0;
  // Scratch of a try, left uninitialized (a run constructs one solver per segment): every slot
  // is written before it is read, and of stage_ only the slots in read_ are set or read.
  State stage_;
  State k2_, k3_, k4_, k5_, k6_, err_;
  double t_ = 0.0, t_old_ = 0.0, dt_ = 0.0;
  bool have_dxdt_ = false;
};

}  // namespace gutterwatt
