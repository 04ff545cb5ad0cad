#pragma once
/// The accounts and observers of a run: the water and energy accounts kept outside the solver's
/// state, the episodes (siphon cycles, overflows, dribbles), the samples handed to observers.
/// What a step made of each account follows from the step's start and end state and its mode.

#include <array>
#include <optional>
#include <span>
#include <string_view>
#include <vector>

#include "gutterwatt/calendar.hpp"
#include "gutterwatt/chain_system.hpp"
#include "gutterwatt/release.hpp"

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
  double evaporation_m3 = 0.0;  ///< from the reservoir's water surface
  double jet_J = 0.0;
  double shaft_J = 0.0;
  double electrical_J = 0.0;  ///< delivered by the generator (above cut-in)
  double accepted_J = 0.0;    ///< taken by the battery at its terminals
  double stored_J = 0.0;      ///< accepted times the charge efficiency
  double curtailed_J = 0.0;
  double served_J = 0.0;          ///< load served
  double unmet_J = 0.0;           ///< load not served (cut at the battery's minimum)
  double drawn_J = 0.0;           ///< delivered by the battery to the load
  double discharge_loss_J = 0.0;  ///< drawn times (1 / discharge efficiency - 1)
  double self_discharge_J = 0.0;
  double battery_below_half_s = 0.0;  ///< time with less than half the capacity stored
  double battery_empty_s = 0.0;       ///< time at the minimum with the load cut

  /// All overflow, at the reservoir rim and the head column: the one definition every output
  /// counts as overflow.
  double overflow_m3() const { return reservoir_overflow_m3 + column_overflow_m3; }
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

/// One kind of episode: the one table of them, which events.csv's writer, the report's reader and
/// page and the tests take. `name` is as events.csv writes it, `words` as the page says it;
/// `makes_energy`: whether what flows in it passes the nozzle (an overflow's water does not, so
/// it carries no energy figure).
struct EpisodeKindInfo {
  EpisodeKind kind;
  std::string_view name;
  std::string_view words;
  bool makes_energy;
};

/// Every episode kind, in the order the page lists them.
std::span<const EpisodeKindInfo> episode_kinds();

/// `cycle`, `overflow`, `dribble`, `column_overflow`.
std::string_view episode_kind_name(EpisodeKind kind);

/// The kind named `name` (as episode_kind_name writes it), or nothing.
std::optional<EpisodeKind> episode_kind_from_name(std::string_view name);

/// Whether what flows in an episode of `kind` makes energy: a cycle's or a dribble's water
/// passes the nozzle; an overflow's does not, so it carries no energy figure.
bool episode_makes_energy(EpisodeKind kind);

/// One siphon cycle (or valve opening), overflow episode or dribble episode. Times in seconds
/// since the epoch (UTC), not rounded; volume of what flowed in the episode (release, overflow
/// or dribble); peak flow at the solver's steps, its switches and the reservoir level's peaks
/// within a step (placed on the dense output; the fixed-step reference sees its steps alone);
/// electrical energy made during the episode, which means something only where
/// episode_makes_energy(kind).
struct Episode {
  EpisodeKind kind;
  double start_s;
  double end_s;
  double volume_m3;
  double peak_flow_m3_per_s;
  double energy_J;
};

/// The state at one instant of the fine trace: at a mode switch (once in the mode before it and
/// once in the mode after, at the same time), on the trace's grid while anything moves, and where
/// the chain comes to rest or starts to move again. Flows in m3/s; overflow is over the
/// reservoir's rim and the head column's brim together.
struct TracePoint {
  double time_s = 0.0;  ///< seconds since the epoch (UTC), not rounded
  double level_m = 0.0;
  ReleaseState release = ReleaseState::idle;
  double release_m3_per_s = 0.0;
  double overflow_m3_per_s = 0.0;
  double head_m = 0.0;   ///< at the nozzle, 0 while nothing passes it
  double power_W = 0.0;  ///< electrical, delivered
};

/// A trace point given by its state instead of its rates: the slots ChainSystem::rates reads
/// (kReadSlots, in that order), the mode and the segment's forcing. An observer that takes the
/// trace may work the rates out where it likes (TraceWriter: on its writing thread).
struct TraceState {
  double time_s = 0.0;
  ChainMode mode;
  std::array<double, kReadSlots.size()> read{};
  Forcing forcing;
};

/// The trace point at `t` in mode `m` with the state's rates `r`.
TracePoint trace_point(double t, const ChainMode& m, const ChainRates& r);
/// The trace point of `s`, its rates worked out by `system`.
TracePoint trace_point(const TraceState& s, const ChainSystem& system);

/// The trace's grid: while anything moves, a point at every whole multiple of this many seconds
/// since the epoch (so never more than this apart), besides the switches.
inline constexpr double kTraceStep_s = 60.0;

/// Receives a run's records as they are made, like an odeint observer.
class Observer {
 public:
  virtual ~Observer() = default;
  /// The state at the start of the run (not an output row).
  virtual void on_start(const Sample&) {}
  virtual void on_sample(const Sample&) {}
  virtual void on_episode(const Episode&) {}
  /// Whether this observer takes the fine trace (on_trace); the run makes none otherwise.
  virtual bool wants_trace() const { return false; }
  virtual void on_trace(const TracePoint&) {}
  /// A trace point given by its state, from the run's `system`: by default its rates are worked
  /// out here and the point handed to on_trace.
  virtual void on_trace_state(const TraceState& s, const ChainSystem& system) {
    on_trace(trace_point(s, system));
  }
};

/// Forwards every record to several observers in order.
class ObserverList : public Observer {
 public:
  void add(Observer& observer) { observers_.push_back(&observer); }
  void on_start(const Sample& s) override;
  void on_sample(const Sample& s) override;
  void on_episode(const Episode& e) override;
  bool wants_trace() const override;
  void on_trace(const TracePoint& p) override;
  void on_trace_state(const TraceState& s, const ChainSystem& system) override;

 private:
  std::vector<Observer*> observers_;
};

/// Finished episodes counted by kind.
struct EpisodeCounts {
  long cycles = 0;
  long overflow_events = 0;
  double overflow_s = 0.0;
  long dribble_episodes = 0;
  double dribble_s = 0.0;
  double standing_s = 0.0;  ///< total time with water standing (see Ledger::follow_standing)
  double standing_longest_s = 0.0;
  long standing_spells_over_week = 0;  ///< spells longer than kMosquitoSpell_s
};

/// Water stands when the gutter or tank holds it more than this deep, below the release's
/// set-points as well as above them (a film under a millimetre dries within hours): a project
/// choice, no source.
inline constexpr double kStandingDepth_m = 1e-3;
/// Standing water breeds mosquitoes from egg to adult in about 7-10 days in warm weather; public
/// health guidance is to empty it at least weekly (REFERENCES.md section 13; common practice).
inline constexpr double kMosquitoSpell_s = 7.0 * 86400.0;

/// The accounts kept outside the solver's state, the open episodes and the observer they go to.
/// Within one step the mode is fixed, and each account kept here grows by a constant rate times
/// the time or by a fixed multiple of the change in a state slot, so it is exact and costs the
/// solver nothing: the roof stage's flows in closed form (RoofSpan::flows), dribble as release
/// while the release is not running, column overflow as release less nozzle while brim-full,
/// electrical energy as the generator efficiency times shaft energy while it runs, the time at
/// the battery's minimum as the step's length in the empty mode. Stored energy is the charge
/// efficiency times the accepted energy. The time below half charge takes the stored energy as
/// linear within a step (a step is at most 30 min).
class Ledger {
 public:
  Ledger(const ChainSystem& system, Observer& observer);

  /// Opens the episodes a run starting at `t` in mode `m` is already in.
  void start(const ChainState& x, const ChainMode& m, double t);
  /// Adds what a step from `x0` to `x1` over `dt` in mode `m` made of the accounts kept here.
  void tally_step(const ChainState& x0, const ChainState& x1, double dt, const ChainMode& m);
  /// Adds what the roof stage made of a segment (always in closed form).
  void tally_roof(const RoofFlows& flows);
  /// Adds the battery's times of a span advanced in closed form.
  void tally_battery(const BatteryRest& rest);
  /// A switch at `t` from `before` to `after` (state `x` after it) that moved `spilled_m3` over
  /// a head column's brim: opens and closes episodes.
  void switched(const ChainMode& before, const ChainMode& after, const ChainState& x,
                double spilled_m3, double t);
  /// Follows standing water at `t` with the reservoir at `level_m` in mode `m`: water more than
  /// kStandingDepth_m deep, wherever the release leaves it (a bell siphon keeps what lies below
  /// its rim), while the release does not run; a running release moves the water on and ends a
  /// spell. Called at the
  /// end of every step and span at rest, so a spell is timed to a step (at most 30 min) or to a
  /// span at rest (at most an output interval), and exactly where a release starts.
  void follow_standing(double level_m, const ChainMode& m, double t);
  /// Raises the open episodes' peaks to the flows in `r`.
  void update_peaks(const ChainRates& r);
  /// Whether an episode is open, so that its peak is being followed.
  bool following_peaks() const;
  /// Whether the reservoir at `level_m` could raise an open episode's peak: whether the level
  /// lies above every level its peak has been looked for at. Each flow an episode follows rises
  /// with the level, so below those levels it stays below the peak.
  bool peak_may_rise(double level_m) const;
  /// Closes every open episode at the end of the run.
  void close_all(const ChainState& x, double t);

  /// Every account, from the state and the ones kept here.
  Accounts accounts(const ChainState& x) const;
  static Storage storage(const ChainState& x);
  Sample sample(Instant t, const ChainState& x, const ChainMode& m, bool output,
                bool month_end) const;
  /// Whether the observer takes the fine trace.
  bool tracing() const { return tracing_; }
  /// Hands the observer the trace point at `t` in mode `m` with the state's rates `r`.
  void trace(double t, const ChainMode& m, const ChainRates& r) const;
  /// Hands the observer the trace point at `t` in mode `m` of state `x` under forcing `f`, whose
  /// rates the observer works out (Observer::on_trace_state).
  void trace_state(double t, const ChainMode& m, const ChainState& x, const Forcing& f) const;
  const EpisodeCounts& counts() const { return counts_; }

 private:
  struct OpenEpisode {
    bool open = false;
    double start_s = 0.0;
    double start_volume_m3 = 0.0;
    double start_energy_J = 0.0;
    double peak = 0.0;
    double top_level_m = 0.0;  // the highest level update_peaks has seen in the episode
  };

  double episode_account(EpisodeKind kind, const ChainState& x) const;
  void open_episode(EpisodeKind kind, const ChainState& x, double t);
  void close_episode(EpisodeKind kind, const ChainState& x, double t);

  const ChainSystem& system_;
  Observer& observer_;
  bool tracing_;
  Accounts tally_;  // the accounts tallied outside the state; the others stay zero
  std::array<OpenEpisode, 4> episodes_{};
  EpisodeCounts counts_;
  bool standing_ = false;
  double standing_since_s_ = 0.0;
};

}  // namespace gutterwatt
