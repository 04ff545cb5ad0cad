#pragma once
/// The stepping of a run, as odeint keeps it apart from the system and the observers: each
/// segment of constant forcing is advanced in closed form while the chain is at rest, and
/// otherwise by an error-controlled dense-output stepper (or the fixed-step reference) that
/// locates every guard's zero on the dense output and restarts in the new mode there. The roof
/// stage is always in closed form (RoofSpan): the solver integrates the reservoir's water less
/// what the roof has handed it since the segment began, so the roof's inflow, however sharp,
/// enters exactly and sets no step.

#include <atomic>
#include <functional>
#include <optional>
#include <string>

#include "gutterwatt/accounts.hpp"
#include "gutterwatt/calendar.hpp"
#include "gutterwatt/chain_system.hpp"
#include "gutterwatt/column_trickle.hpp"

namespace gutterwatt {

/// Numbers about the integration itself.
struct SolverStats {
  long steps = 0;
  long switches = 0;
  long segments = 0;
  double coasted_s = 0.0;  ///< dry time at rest skipped in closed form
  double skipped_s = 0.0;  ///< record gaps cut out under `gaps: skip`
};

struct RunOptions {
  /// Checked between rain intervals and between solver steps; when set, simulate throws
  /// Interrupted.
  const std::atomic<bool>* stop = nullptr;
  /// When > 0, a reference integration: classic fourth-order Runge-Kutta at this fixed step (s)
  /// instead of the error-controlled Dormand-Prince steps, switches located by bisection on
  /// re-taken steps to 1e-10 s, and no step budget. Slow; for checking the default solver.
  double fixed_step_s = 0.0;
  /// When > 0, the head column's trickle limit (m of head) in place of trickle_head_m(plant),
  /// which it must not exceed: for checking that the results do not depend on it.
  double trickle_head_m = 0.0;
};

/// Advances a run's state and mode through segments of constant forcing, handing every step and
/// switch to the ledger.
class Stepper {
 public:
  Stepper(const ChainSystem& system, Ledger& ledger, const RunOptions& options);

  /// Advances from `t0` to `t1` under `f`.
  void advance(Instant t0, Instant t1, const Forcing& f);

  ChainState& state() { return x_; }
  ChainMode& mode() { return mode_; }
  const ChainState& state() const { return x_; }
  const ChainMode& mode() const { return mode_; }
  SolverStats& stats() { return stats_; }
  /// Throws SimulationError naming the time `t` (s since the epoch), `what`, the mode and the
  /// state.
  [[noreturn]] void fail(const std::string& what, double t) const;

 private:
  /// Applies every switch already due; returns the rates and guards of the settled state.
  ChainRates settle(const Forcing& f, Guards& g, ChainState& dxdt);
  void integrate(double t0, double t1, const Forcing& f);
  void integrate_fixed(double t0, double t1, const Forcing& f);
  bool coasted_to_end(double t, double span, const Forcing& f);
  /// The release over the step being accepted, on the solver's dense output: at a time within
  /// the segment, its flow (m3/s) and what has passed (its account, m3).
  struct ReleaseAlong {
    double step_start;
    std::function<double(double)> flow;
    std::function<double(double)> passed;
  };
  /// Makes `x_end` the engine's state, with the trickle's column water followed over the step
  /// (on `along` where given, else the release's quadratic through the step's ends with its
  /// mean); true when that water moved (a slot the solver carries changed beside it).
  bool accept_step(const ChainState& x_end, double dt, const ChainRates& r, int fired,
                   const Forcing& f, double t_abs, const ReleaseAlong* along = nullptr);
  /// follow_trickle_water over [a, a + dt] of the step on `along`, halved where the release is not
  /// quadratic to the trickle's tolerance; `start` and `end` the release's flow and account.
  bool follow_trickle_along(ChainState& x, const ReleaseAlong& along, int depth,
                            std::array<double, 2> start, std::array<double, 2> end, double dt,
                            double a = 0.0);
  /// Advances the column's water in `x` over `dt` while it trickles; true when it moved.
  bool follow_trickle_water(ChainState& x, const StepInflow& inflow, double dt);
  void switch_mode(int k, const Forcing& f, const ChainRates& r);
  void coast(double t, double span, const Forcing& f);
  void evaporate_at_rest(double dt, const Forcing& f);
  /// Hands the ledger the trace point of the engine's state now.
  void trace_now(const Forcing& f) const;
  /// The solver's state at `t` within the segment (the reservoir less the roof's inflow since
  /// the segment began) from the engine's `x`, and back, with the roof's stores at `t`.
  ChainState to_solver(const ChainState& x, double t) const;
  void from_solver(const ChainState& w, double t, ChainState& x) const;

  const ChainSystem& system_;
  Ledger& ledger_;
  const RunOptions& options_;
  ChainState x_;
  ChainMode mode_;
  std::optional<RoofSpan> roof_;  // the roof stage over the current segment
  double now_s_ = 0.0;            // absolute, seconds since the epoch
  double last_step_s_ = 10.0;     // solver step carried from one segment into the next
  ChainState slopes_{};           // the solver's linear reference's slopes, carried likewise
  bool moving_ = false;           // stepped (not at rest) since the last trace point at rest
  double trickle_inflow_m3_per_s_ = 0.0;  // the release where the step now starting starts
  double trickle_substep_s_ = 0.0;        // the trickle water's substep carried on
  double trickle_rtol_;                   // the trickle water's tolerance, from the run's rtol
  SolverStats stats_;
  ChainState error_scale_{};  // the error checker's absolute scale per slot
  /// The rates, derivative and guards at the end of the last step that ended without a switch,
  /// and what they were computed from: the next segment's settle() takes them from here when
  /// the state, the mode and the forcing the rates read (not the rain) are the same.
  struct StepEnd {
    bool valid = false;
    ChainState x{};
    ChainMode mode;
    double load_W = 0.0;
    double evaporation_m_per_s = 0.0;
    ChainRates r;
    ChainState dxdt{};
    Guards g{};
  };
  StepEnd step_end_;
  /// True when step_end_ holds the rates of the engine's state and mode now under `f`.
  bool step_end_current(const Forcing& f) const;
};

}  // namespace gutterwatt
