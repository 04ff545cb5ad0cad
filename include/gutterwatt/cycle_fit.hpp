#pragma once
/// The siphon as it works on the roof: the priming flow and the running loss
/// (drop_pipe.minor_loss_k) fitted to a field log of the times cycles started, by simulating the
/// scenario on its rain record. The cycle count of each rain event is not smooth in the priming
/// flow (it changes in steps), so the priming flow comes from a grid search and is given as the
/// range that reproduces the counts best; the loss, and the priming flow inside that range, come
/// from golden-section searches on the timing of the cycle starts, the counts compared first.

#include <cmath>
#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "gutterwatt/bench_fit.hpp"
#include "gutterwatt/calendar.hpp"
#include "gutterwatt/fit_logs.hpp"
#include "gutterwatt/rain_input.hpp"
#include "gutterwatt/scenario.hpp"

namespace gutterwatt {

/// Dry time that ends a rain event: 6 h (a common minimum inter-event time; common practice, no
/// source). Each event's window runs from its first rain to the next event's first rain.
inline constexpr Instant kRainEventGap_s = 6 * 3600;

/// The instants at which `scenario`'s siphon starts a cycle on `rain` (whole seconds, rounded
/// down, as events.csv shows them), and the simulated period. Throws as simulate does.
struct SimulatedCycles {
  std::vector<Instant> starts;
  Instant start = 0;
  Instant end = 0;
};
SimulatedCycles simulate_cycle_starts(const Scenario& scenario, const RainSeries& rain);

/// How well a list of simulated cycle starts reproduces the observed ones. Both are cut into
/// the rain events' windows; in each window the observed and the simulated starts are paired in
/// time order, the surplus of the longer list left out where that brings the pairs closest.
struct CycleMatch {
  int unmatched = 0;            ///< sum over the windows of |simulated - observed| cycle counts
  int pairs = 0;                ///< cycle starts paired
  double sum_squares_s2 = 0.0;  ///< sum of the squared time differences of the pairs
  double rms_s() const { return pairs > 0 ? std::sqrt(sum_squares_s2 / pairs) : 0.0; }
  /// Counts first, then timing: true when this reproduces the log better than `other`.
  bool better_than(const CycleMatch& other) const;
};

/// The windows of the rain events in [start, end): [first rain of the event, first rain of the
/// next) (the first from `start`, the last to `end`). Empty when no rain falls in the period.
std::vector<TimeSpan> rain_event_windows(const RainSeries& rain, Instant start, Instant end);

/// Pairs `observed` and `simulated` (each sorted) inside each window (see CycleMatch).
CycleMatch match_cycles(const std::vector<Instant>& observed, const std::vector<Instant>& simulated,
                        const std::vector<TimeSpan>& windows);

/// One rain event's cycles.
struct CycleEvent {
  TimeSpan window;
  double rain_m = 0.0;  ///< depth on the plan roof area
  int observed = 0;
  int simulated_before = 0;  ///< at the scenario's values
  int simulated = 0;         ///< at the fitted values
};

struct CycleFit {
  FittedValue priming_flow;  ///< release.priming_flow_L_per_min, in m3/s
  /// The range of priming flows that reproduces the cycle counts as well as the best one (at the
  /// fitted loss); an end is nullopt where it reaches the end of the range searched.
  std::optional<double> priming_low_m3_per_s;
  std::optional<double> priming_high_m3_per_s;
  FittedValue minor_loss_k;  ///< drop_pipe.minor_loss_k
  Instant start = 0;         ///< the simulated period
  Instant end = 0;
  int observed = 0;
  int simulated_before = 0;
  int simulated = 0;
  CycleMatch before;               ///< at the scenario's values
  CycleMatch after;                ///< at the fitted values
  std::vector<CycleEvent> events;  ///< the events with a cycle, observed or simulated
  int runs = 0;                    ///< simulations made
  std::vector<std::string> warnings;
};

/// Fits `scenario` (a bell siphon) to `log` on `rain`. Throws InputError naming `log_label`
/// when the release is not a bell siphon, and its line and `time` column for a cycle outside
/// the simulated period. A value the log cannot determine (no cycle seen, every event cycled
/// down to the smallest priming flow tried, timing that does not move with the loss) is left as
/// it was, with a warning.
CycleFit fit_cycles(const Scenario& scenario, const RainSeries& rain, const CycleLog& log,
                    const std::string& log_label);

/// Prints the fit for a person: the values with their uncertainty or range, cycles observed
/// against simulated (in total and by rain event, stamps on `zone`'s clock), the timing of the
/// paired starts, the warnings, and a build entry to paste into `release.builds`.
void write_cycle_fit(std::ostream& out, const CycleFit& fit, const TimeZone& zone);

}  // namespace gutterwatt
