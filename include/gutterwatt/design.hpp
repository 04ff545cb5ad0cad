#pragma once
/// Design figures of a scenario, worked out from the same physics the simulation uses: what
/// `gutterwatt check` prints: closed forms and quadratures of the steady laws, and the energy of
/// one release cycle from a short simulation.

#include <cstddef>
#include <optional>
#include <ostream>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "gutterwatt/disaggregation_config.hpp"
#include "gutterwatt/rain_input.hpp"
#include "gutterwatt/scenario.hpp"

namespace gutterwatt {

/// What a rain record says about priming on this roof, in SI. Intensities are those of the
/// record's intervals (constant over each).
struct RecordFigures {
  double median_intensity_m_per_s = 0.0;       ///< of wet record time
  double peak_intensity_m_per_s = 0.0;         ///< median of the annual maxima (the 2-year event)
  std::optional<double> priming_exceedance;    ///< share of wet time at or above priming
  std::optional<double> volume_below_priming;  ///< share of the rain depth that falls below it
  Instant step_s = 0;                          ///< the record's step
};

/// The figures of `rain` (with at least one pulse); the priming shares only when
/// `priming_intensity_m_per_s` is given. Years are local on the clock of `zone`.
RecordFigures record_figures(const RainSeries& rain,
                             std::optional<double> priming_intensity_m_per_s, const TimeZone& zone);

/// For a record spread by the method of fragments: its intervals deep enough to prime the siphon
/// on their own (at least the priming depth, the priming intensity times the record's step), and
/// the calibration library's intervals of that length as deep, whose patterns those draw on.
struct PrimingIntervals {
  Instant length_s = 0;         ///< the record's step
  double depth_m = 0.0;         ///< the priming depth
  std::size_t record = 0;       ///< the record's intervals (as read) at or above it
  std::size_t calibration = 0;  ///< the library's intervals of `length_s` at or above it
};

/// Fewest calibration intervals deep enough to prime on their own below which `check` warns
/// that the estimate moves with the calibration record (when the record has such intervals):
/// the same count the season window wants to choose among (kMinFragmentCandidates, a project
/// choice, common practice, no source), for the same reason, kept apart so that either can move.
inline constexpr std::size_t kFewDeepCalibrationIntervals = 10;

/// The figures of `as_read` spread by `how`; nullopt unless `how` is `fragments` with a library
/// of intervals of the record's step (library_for).
std::optional<PrimingIntervals> priming_intervals(const RainSeries& as_read,
                                                  const Disaggregation& how,
                                                  double priming_intensity_m_per_s);

/// Figures in SI. Optional ones are absent where the release kind or the record has none.
struct DesignFigures {
  std::optional<double> storage_m3;       ///< between the set-points (bell: priming level)
  std::optional<double> priming_level_m;  ///< bell: lip + standpipe head of the priming flow
  std::optional<double> priming_intensity_m_per_s;  ///< steady rain that just primes the bell
  double running_flow_trigger_m3_per_s = 0.0;       ///< release running full, level at trigger
  double running_flow_break_m3_per_s = 0.0;  ///< ... where it ends (the break level, or above it)
  /// A level gutter: the most it delivers to its outlet holding the set-point's volume, and
  /// brim-full (the water at its closed end at the rim).
  std::optional<double> gutter_delivery_trigger_m3_per_s;
  std::optional<double> gutter_delivery_brim_m3_per_s;
  /// A level gutter: the level at which the release running full breaks (or closes), the depth
  /// at its outlet drawn down to the break level; the break level itself when the gutter feeds
  /// it down to there.
  std::optional<double> release_ends_level_m;
  /// A level gutter: the lowest level at which the release can start, where the gutter feeds it
  /// running full with its drop pipe filling (ChainSystem::start_shortfall_m): the level it
  /// starts at, or above it up to the rim; none when it cannot start below the rim.
  std::optional<double> release_starts_level_m;
  /// ... when that is over the rim: the steady rain that holds the level there by overflowing.
  std::optional<double> release_start_intensity_m_per_s;
  std::optional<double> cycle_drain_s;  ///< running time from the set-point to break, no inflow
  double design_head_m = 0.0;           ///< at the nozzle, release running at trigger
  double nozzle_flow_m3_per_s = 0.0;    ///< at the design head
  double jet_velocity_m_per_s = 0.0;
  double jet_power_W = 0.0;
  double electrical_power_W = 0.0;
  double runner_speed_rpm = 0.0;            ///< at the design head
  double speed_ratio = 0.0;                 ///< bucket over jet speed at the design head
  double overflow_intensity_m_per_s = 0.0;  ///< steady rain that overflows the rim while running
  std::optional<double>
      energy_per_cycle_J;               ///< one release from the set-point, no inflow (simulated)
  std::optional<double> column_fill_s;  ///< head column: time to brim-full while running
  std::optional<RecordFigures> record;  ///< the record the simulation runs on
  /// The record as read, when the simulation runs on a disaggregation of it.
  std::optional<RecordFigures> record_as_read;
  std::string disaggregation;  ///< how `record` was made from `record_as_read`, e.g. `cascade`
  std::optional<PrimingIntervals> priming_intervals;  ///< `fragments` and a priming intensity
  std::vector<std::string> warnings;
};

/// Works out the figures; `rain` may be null (no record given or readable). `as_read`, when
/// given, is the record before rain.disaggregate made `rain` of it.
DesignFigures evaluate_design(const Scenario& scenario, const RainSeries* rain,
                              const RainSeries* as_read = nullptr);

/// Writes the figures with their units, the warnings in plain words, then the cautions.
void write_design(std::ostream& out, const Scenario& scenario, const DesignFigures& figures);

/// One safety caution: a short title and what to do.
struct Caution {
  std::string_view title;
  std::string_view text;
};

/// What the figures are and are not, said before the cautions.
inline constexpr std::string_view kCautionsPreface =
    "These figures come from a simulation of the inputs it was given. They help compare designs; "
    "they do not show that any installation is safe or lawful.";

/// What `check` says while a bell siphon's priming flow is a guess (no
/// release.priming_flow_measured_by and no release.build): the bench test in brief.
inline constexpr std::string_view kBenchTestNote =
    "  The priming flow is a guess until measured, and the estimate depends strongly on it: it "
    "decides how much light rain primes the siphon rather than dribbling away. Measure it on the "
    "built siphon at ground level: feed the reservoir a steady hose "
    "flow in steps (start low, raise by about a fifth), wait at each step until the siphon "
    "primes or the level settles (10-20 min), time a bucket to know the flow, and write down "
    "primed or dribbled and the cycle times. Then `gutterwatt fit SCENARIO --bench LOG`. Keep "
    "the hose and spills away from batteries and mains; see README, \"The bench test\".";

/// The safety cautions printed by `check` and at the foot of the report.
std::span<const Caution> safety_cautions();

}  // namespace gutterwatt
