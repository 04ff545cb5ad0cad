#pragma once
/// The simulation loop: owns time, integrates the chain one rain interval at a time with an
/// error-controlled dense-output stepper, locates every mode switch on the dense output, skips
/// dry spells at rest in closed form, and closes the water balance.

#include "gutterwatt/accounts.hpp"
#include "gutterwatt/calendar.hpp"
#include "gutterwatt/rain_feed.hpp"
#include "gutterwatt/rain_input.hpp"
#include "gutterwatt/scenario.hpp"
#include "gutterwatt/stepper.hpp"

namespace gutterwatt {

/// A run's outcome: its episode counts (cycles, overflow, dribble, standing water; the ledger's
/// EpisodeCounts as they stood at the end), its accounts and storage, and the balance.
struct RunResult : EpisodeCounts {
  Instant start = 0;
  Instant end = 0;
  Accounts totals;
  Storage initial;
  Storage final;
  double balance_error_m3 =
      0.0;  ///< rain - losses - overflows - nozzle - evaporation - storage change
  double balance_relative_error = 0.0;
  SolverStats stats;
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

}  // namespace gutterwatt
