#pragma once
/// The chain as a system of equations, as odeint keeps a system apart from its stepper: the
/// continuous state, the discrete modes, and at one instant the rates and the guard functions
/// that end a mode. Pure: no time, no accounts, no I/O; a state and a mode in, rates out.

#include <array>
#include <cstddef>
#include <memory>
#include <optional>
#include <string>

#include "gutterwatt/battery.hpp"
#include "gutterwatt/gutter_flow.hpp"
#include "gutterwatt/plant.hpp"
#include "gutterwatt/release.hpp"
#include "gutterwatt/reservoir.hpp"
#include "gutterwatt/scenario.hpp"

namespace gutterwatt {

/// Continuous state: storages first, then running integrals of the accounts whose rates are
/// nonlinear in the state. The other accounts follow from these exactly (see Ledger::tally_step).
/// The roof stage's three stores are advanced in closed form (RoofSpan), never by the solver:
/// their rates here are zero.
enum Slot : std::size_t {
  kRoof,        ///< water on the roof's linear reservoir, m3
  kDepression,  ///< initial-loss store filled, m of depth
  kFlush,       ///< first-flush diverter fill, m3
  kReservoir,   ///< m3
  kColumn,      ///< head column, m3
  kBattery,     ///< J
  kReservoirOverflow,
  kRelease,
  kNozzle,
  kJet,
  kShaft,
  kAccepted,
  kCurtailed,
  kServed,
  kUnmet,
  kEvaporation,    ///< m3 evaporated from the reservoir
  kDrawn,          ///< J delivered by the battery to the load
  kSelfDischarge,  ///< J lost by the battery's self-discharge
  kSlots
};

using ChainState = std::array<double, kSlots>;

/// The only slots ChainSystem::rates and ChainSystem::guards read: the storages the solver
/// steps. The others are running integrals that nothing reads back, and the roof's stores,
/// which the stepper sets in closed form.
inline constexpr std::array<std::size_t, 3> kReadSlots = {kReservoir, kColumn, kBattery};

/// A head column fills and drains (partial), spills over its top (full), or, nearly empty under
/// a trickle, passes what arrives straight to the nozzle while its water follows its own law
/// beside the solver (trickle; column_trickle.hpp).
enum class ColumnMode { trickle, partial, full };

/// Discrete state: which branch of each piecewise law is in force.
struct ChainMode {
  ReleaseState release = ReleaseState::idle;
  bool overflowing = false;
  ColumnMode column = ColumnMode::trickle;
  bool generator_on = false;
  BatteryMode battery = BatteryMode::normal;

  bool operator==(const ChainMode&) const = default;
};

/// What drives a segment: constant over it.
struct Forcing {
  double rain_m_per_s = 0.0;
  double load_W = 0.0;
  double evaporation_m_per_s = 0.0;  ///< open-water evaporation of the segment's month
};

/// Every rate and intermediate value at one instant.
struct ChainRates {
  double level_m = 0.0;
  /// The level the release's switches see: while it runs from a level gutter, the depth at the
  /// outlet (drawn down below the level); else the level.
  double outlet_level_m = 0.0;
  double release = 0.0;      ///< m3/s
  double overflow = 0.0;     ///< m3/s over the reservoir's rim
  double evaporation = 0.0;  ///< m3/s from the reservoir's water surface
  double nozzle = 0.0;       ///< m3/s
  double column_overflow = 0.0;
  PlantPower power;  ///< with the head at the nozzle
  double electrical_W = 0.0;
  BatteryFlows battery;
};

/// Guard k fires when its value falls below zero. The numbering is the switch table of
/// ChainSystem::apply_switch.
enum GuardId {
  kGuardRelease0,
  kGuardRelease1,
  kGuardOverflow,
  kGuardColumn,
  kGuardTrickle,
  kGuardGenerator,
  kGuardBattery,
  kGuardCount
};

using Guards = std::array<double, kGuardCount>;

/// Head-column water height below which, with a trickle of inflow, the column passes the inflow
/// straight to the nozzle, at the head that flow needs: its drain time constant 2 A H / Q is then
/// seconds, which would make the solver's steps stability-bound for hours of dribble. Its water
/// meanwhile follows its own law beside the solver (column_trickle.hpp). At most this high...
inline constexpr double kTrickleHeadMax_m = 0.1;
/// ...and lower where a jet at that head could run the generator (trickle_head_m), but not below
/// this: with no cut-in at all the column is stepped down to this head.
inline constexpr double kTrickleHeadMin_m = 0.005;
/// The head below which `plant`'s column passes a trickle on: kTrickleHeadMax_m, or the head at
/// which the nozzle's jet power reaches the generator's cut-in where that is lower (never below
/// kTrickleHeadMin_m). The jet's power exceeds the generator's output, so below this head the
/// generator stays off, as it would with the column stepped: the trickle's power is not worked
/// out from the head that flow needs in its place.
double trickle_head_m(const Plant& plant);
/// A siphon or float valve on a long level gutter starts only while the depth at the outlet,
/// with it running and the drop pipe's volume drawn, would stand this far above its break
/// level: a project choice that keeps the start and the end apart where the gutter barely feeds
/// it (between them it dribbles or stays closed).
inline constexpr double kStartMargin_m = 1e-3;
/// Volume below which a head column counts as drained.
inline constexpr double kColumnDry_m3 = 1e-9;

/// The rates and guards of one scenario's chain. Holds the scenario by reference.
class ChainSystem {
 public:
  /// `trickle_limit_m`, when > 0, takes the place of trickle_head_m(plant) (RunOptions); a
  /// higher one is refused (std::invalid_argument): the generator could then run in trickle.
  explicit ChainSystem(const Scenario& scenario, double trickle_limit_m = 0.0);

  /// Fills `r` and the derivative `d` (every field and slot) for state `x` in mode `m`: the
  /// solver's hot path, which must not copy ChainRates. The reservoir's rate leaves out the
  /// roof's inflow, which the stepper carries exactly (RoofSpan); the roof's slots' rates are 0.
  void rates(const ChainState& x, const ChainMode& m, const Forcing& f, ChainRates& r,
             ChainState& d) const;
  ChainRates rates(const ChainState& x, const ChainMode& m, const Forcing& f) const;
  /// Every guard's value (1 where a guard is not active in `m`); `r` from rates(x, m, f).
  void guards(const ChainState& x, const ChainMode& m, const Forcing& f, const ChainRates& r,
              Guards& g) const;
  /// The two terms of the guard back to trickle (kGuardTrickle) of a head column filling and
  /// draining (partial), the puddle's and the inflow's, each below zero once it is below half its
  /// threshold: the guard is the larger, so it is below zero only while both are. It can fall
  /// below zero and rise again between two instants at which it is above: the puddle falling while
  /// the inflow rises. `r` from rates(x, m, f).
  std::array<double, 2> trickle_guard_terms(const ChainState& x, const ChainRates& r) const;
  /// Takes the switch of guard `k` (which has just reached zero): changes the mode and, where
  /// the switch sets a store, the state. Returns the water that left the state at once (m3): the
  /// excess over a head column's brim as it becomes brim-full, else 0.
  double apply_switch(int k, ChainState& x, ChainMode& m, const Forcing& f,
                      const ChainRates& r) const;
  /// The most the reservoir may hold at the end of a span for the chain to stay at rest through
  /// it from `x` in mode `m` (the release passing nothing and unable to start to, nothing
  /// overflowing, the head column empty or passing a trickle: the chain is then linear), or a
  /// negative number when it is not at rest now whatever arrives.
  double rest_capacity_m3(const ChainState& x, const ChainMode& m) const;
  /// On a long level gutter, with the reservoir holding `volume_m3`: how far the depth at the
  /// outlet, with the release running and the drop pipe's volume drawn, would stand below
  /// kStartMargin_m over the break level (m). A siphon or float valve starts only where this is
  /// at or below zero. -infinity without a level gutter or for an orifice.
  double start_shortfall_m(double volume_m3) const;

  /// Evaporation from the reservoir holding `volume_m3` under `f`, m3/s.
  double evaporation_m3_per_s(double volume_m3, const Forcing& f) const;
  /// The reservoir's level in state `x`, and holding `volume_m3`.
  double level_m(const ChainState& x) const { return level_m(x[kReservoir]); }
  double level_m(double volume_m3) const { return geometry_.level_m(volume_m3); }

  /// The state and mode at the start of a run.
  ChainState initial_state() const;
  ChainMode initial_mode(const ChainState& x) const;
  /// The roof stage over a segment of rain `rain_m_per_s` from the stores in `x`.
  RoofSpan roof_span(const ChainState& x, double rain_m_per_s) const;
  /// Puts the roof stage's stores `s` into `x`.
  static void set_roof(const RoofStores& s, ChainState& x);
  /// "mode: ...; state: ..." for a failure message.
  std::string describe(const ChainState& x, const ChainMode& m) const;

  const Scenario& scenario() const { return sc_; }
  const Plant& plant() const { return plant_; }
  const Release& release() const { return *release_; }
  /// The head column's water at trickle_head_m (0 without a column).
  double trickle_volume_m3() const { return trickle_volume_m3_; }

 private:
  const Scenario& sc_;
  ReservoirGeometry geometry_;
  std::optional<GutterDelivery> delivery_;  // a level gutter: what it delivers to its outlet
  Plant plant_;
  std::unique_ptr<Release> release_;
  double trickle_volume_m3_;      // head column: volume at trickle_head_m
  double trickle_flow_m3_per_s_;  // the nozzle's flow from trickle_volume_m3_
  double self_discharge_per_s_;   // the battery's self-discharge rate constant
  double pipe_volume_m3_;         // the drop pipe's: a release runs full once it has filled
};

}  // namespace gutterwatt
