#pragma once
/// The simulation loop: owns time, integrates the chain one rain interval at a time with an
/// error-controlled dense-output stepper, locates every mode switch on the dense output, skips
/// dry spells at rest in closed form, and closes the water balance.

#include <atomic>
#include <string>
#include <string_view>
#include <vector>

#include "gutterwatt/calendar.hpp"
#include "gutterwatt/rain_feed.hpp"
#include "gutterwatt/rain_input.hpp"
#include "gutterwatt/release.hpp"
#include "gutterwatt/scenario.hpp"

namespace gutterwatt {

/// Cumulative water (m3) and energy (J) accounts since the start of a run.
struct Accounts {
  double rain_m3 = 0.0;         ///< on the plan roof area
  double roof_loss_m3 = 0.0;    ///< initial loss plus the (1 - C) share
  double roof_runoff_m3 = 0.0;  ///< out of the roof's linear reservoir
  double first_flush_m3 = 0.0;  ///< diverted to waste
  double reservoir_overflow_m3 = 0.0;
  double column_overflow_m3 = 0.0;
  double release_m3 = 0.0;  ///< out of the reservoir into the drop pipe
  double dribble_m3 = 0.0;  ///< the part of release_m3 that left while not running
  double nozzle_m3 = 0.0;
  double jet_J = 0.0;
  double shaft_J = 0.0;
  double electrical_J = 0.0;  ///< delivered by the generator (above cut-in)
  double accepted_J = 0.0;    ///< taken by the battery at its terminals
  double stored_J = 0.0;      ///< accepted times the charge efficiency
  double curtailed_J = 0.0;
  double served_J = 0.0;  ///< load served
  double unmet_J = 0.0;   ///< load not served
};

/// Water and energy held at one instant.
struct Storage {
  double roof_m3 = 0.0;
  double reservoir_m3 = 0.0;
  double column_m3 = 0.0;
  double battery_J = 0.0;
  double water_m3() const { return roof_m3 + reservoir_m3 + column_m3; }
};

/// The state of the run at a sample time (an output boundary, a month boundary or the end).
struct Sample {
  Instant time = 0;
  Accounts totals;
  Storage storage;
  double level_m = 0.0;
  ReleaseState release = ReleaseState::idle;
  double head_m = 0.0;     ///< at the nozzle
  double power_W = 0.0;    ///< electrical, delivered, at this instant
  double soc = 0.0;        ///< battery state of charge, 0..1
  bool output = false;     ///< an output-interval boundary (or the end of the run)
  bool month_end = false;  ///< a local month boundary (or the end of the run)
};

enum class EpisodeKind { cycle, overflow, dribble, column_overflow };

/// `cycle`, `overflow`, `dribble`, `column_overflow`.
std::string_view episode_kind_name(EpisodeKind kind);

/// One siphon cycle (or valve opening), overflow episode or dribble episode. Times in seconds
/// since the epoch (UTC), not rounded; volume of what flowed in the episode (release, overflow
/// or dribble); peak flow as seen at the solver's steps and switches; electrical energy.
struct Episode {
  EpisodeKind kind;
  double start_s;
  double end_s;
  double volume_m3;
  double peak_flow_m3_per_s;
  double energy_J;
};

/// Receives a run's records as they are made, like an odeint observer.
class Observer {
 public:
  virtual ~Observer() = default;
  /// The state at the start of the run (not an output row).
  virtual void on_start(const Sample&) {}
  virtual void on_sample(const Sample&) {}
  virtual void on_episode(const Episode&) {}
};

/// Numbers about the integration itself.
struct SolverStats {
  long steps = 0;
  long switches = 0;
  long segments = 0;
  double coasted_s = 0.0;  ///< dry time at rest skipped in closed form
  double skipped_s = 0.0;  ///< record gaps cut out under `gaps: skip`
};

struct RunResult {
  Instant start = 0;
  Instant end = 0;
  Accounts totals;
  Storage initial;
  Storage final;
  double balance_error_m3 = 0.0;  ///< rain - losses - overflows - nozzle - storage change
  double balance_relative_error = 0.0;
  long cycles = 0;
  long overflow_events = 0;
  double overflow_s = 0.0;
  long dribble_episodes = 0;
  double dribble_s = 0.0;
  SolverStats stats;
};

struct RunOptions {
  /// Checked between rain intervals and between solver steps; when set, simulate throws
  /// Interrupted.
  const std::atomic<bool>* stop = nullptr;
  /// When > 0, a reference integration: classic fourth-order Runge-Kutta at this fixed step (s)
  /// instead of the error-controlled Dormand-Prince steps, switches located by bisection on
  /// re-taken steps to 1e-10 s, and no step budget. Slow; for checking the default solver.
  double fixed_step_s = 0.0;
};

/// Relative water-balance closing error above which a run fails.
inline constexpr double kMaxBalanceError = 1e-6;

/// Runs `scenario` on `rain`, calling `observer` as records are made. Throws InputError when the
/// simulated period is not covered by the record under `rain.gaps: error`, SimulationError when
/// the solver fails, the state becomes non-finite or the balance does not close.
RunResult simulate(const Scenario& scenario, const RainSeries& rain, Observer& observer,
                   const RunOptions& options = {});

/// The same, on a record that may still be arriving (see RainView); the results do not depend on
/// how the record arrives. Under `rain.gaps: error`, time a complete record does not cover is
/// reported before the run; on a record still arriving, when the simulation reaches it.
RunResult simulate(const Scenario& scenario, RainView& rain, Observer& observer,
                   const RunOptions& options = {});

/// Forwards every record to several observers in order.
class ObserverList : public Observer {
 public:
  void add(Observer& observer) { observers_.push_back(&observer); }
  void on_start(const Sample& s) override;
  void on_sample(const Sample& s) override;
  void on_episode(const Episode& e) override;

 private:
  std::vector<Observer*> observers_;
};

}  // namespace gutterwatt
