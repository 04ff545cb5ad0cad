#pragma once
/// How a coarse rain record (daily totals, or a series with a long step) is brought down to a
/// fine step: the settings of `rain.disaggregate`, in SI.

#include <cstddef>
#include <cstdint>
#include <optional>
#include <vector>

#include "gutterwatt/calendar.hpp"
#include "gutterwatt/storm.hpp"

namespace gutterwatt {

/// `block` keeps each interval's rain at constant intensity; the NRCS methods spread a day by
/// the TR-55 24-hour shape of their region; `cascade` by a random cascade; `fragments` by the
/// pattern of a similar interval of a fine calibration record.
enum class DisaggregationMethod { block, nrcs_i, nrcs_ia, nrcs_ii, nrcs_iii, cascade, fragments };

/// Every method, in the order the scenario's messages list them; their scenario names are
/// method_name's (disaggregation.hpp), the one list of them.
inline constexpr DisaggregationMethod kDisaggregationMethods[] = {
    DisaggregationMethod::block,    DisaggregationMethod::nrcs_i,   DisaggregationMethod::nrcs_ia,
    DisaggregationMethod::nrcs_ii,  DisaggregationMethod::nrcs_iii, DisaggregationMethod::cascade,
    DisaggregationMethod::fragments};

/// Where a daily record's total falls in its local day: [midnight + start_s,
/// midnight + start_s + duration_s), inside the day (start_s + duration_s <= 86400). Whole
/// seconds. Daily records only; a series interval is spread over itself.
struct DayWindow {
  Instant start_s = 0;  ///< after local midnight
  Instant duration_s = 86400;
};

/// Default probability that a cascade box sends all its rain into one of its halves. A project
/// default (common practice, no source); fit it to a local record at fine resolution if one
/// exists.
inline constexpr double kDefaultCascadeIntermittency = 0.3;

/// How a wet box of one duration splits into its halves: the chances that it sends all its rain
/// into its first half, P(1/0), or into its second, P(0/1), and otherwise
/// (P(x/(1-x)) = 1 - P(1/0) - P(0/1)) the distribution of W, the first half's share.
struct CascadeSplit {
  double p10 = 0.0;
  double p01 = 0.0;
  /// W at the probabilities 0, 1/(m - 1), ..., 1 (m values, ascending); empty: uniform on (0, 1).
  std::vector<double> w_quantiles;
  std::size_t boxes = 0;  ///< wet boxes the estimate rests on
};

/// Where a wet box sits among its neighbours of the same duration (Olsson 1998): alone (both
/// neighbours dry), starting a run of wet boxes, enclosed in one, or ending one.
enum class BoxPosition { isolated = 0, starting = 1, enclosed = 2, ending = 3 };

/// Classes of wet boxes: 4 positions times 2 volume classes (at most / above the median volume of
/// the wet boxes of that duration): index 2 * position + (above median ? 1 : 0).
inline constexpr std::size_t kCascadeClasses = 8;

/// The cascade's parameters for boxes of one duration, as estimated from a fine record by the
/// method of Olsson (1998): all wet boxes together, and by position and volume class.
struct CascadeLevel {
  double box_s = 0.0;  ///< duration of the box that is halved
  double p10 = 0.0;    ///< of all wet boxes of this duration
  double p01 = 0.0;
  std::vector<double> w_quantiles;  ///< as CascadeSplit::w_quantiles
  std::size_t boxes = 0;
  double median_volume_m = 0.0;       ///< of the wet boxes
  std::vector<CascadeSplit> classes;  ///< kCascadeClasses, or empty (pooled values only)
};

/// One wet interval of a calibration record as the method of fragments keeps it: its depth, the
/// wet or dry state of the intervals just before and after it, when in the year it starts, and
/// how its depth is shared among its steps.
struct Fragment {
  double depth_m = 0.0;
  bool wet_before = false;
  bool wet_after = false;
  double season_day = 0.0;  ///< days since the start of the year, 0 to 365.2425 (see fragments.hpp)
  /// Share of the depth that falls before each step boundary: steps + 1 values, 0 first, 1 last.
  std::vector<double> cumulative;
  Instant length_s = 0;  ///< of this interval (a calendar day may be 23 or 25 h)
};

/// The wet intervals of a calibration record cut into intervals of `length_s` starting at
/// `phase_s` modulo `length_s` (as the target record's are), each split into steps of the
/// target step. With `calendar`, `length_s` is a whole number of days and both are read on the
/// local clock of that zone: the intervals are calendar days, 23 or 25 h across a change of
/// daylight saving; without, elapsed time.
struct FragmentLibrary {
  Instant length_s = 0;
  Instant phase_s = 0;
  std::optional<TimeZone> calendar;
  std::vector<Fragment> intervals;  ///< wet ones, in time order
};

/// rain.disaggregate. Every record interval with rain that is longer than `step_s` is spread
/// over steps of `step_s` (the last one shorter when `step_s` does not divide it); shorter
/// intervals stay as read.
/// - `block`: constant intensity over the interval (a day's window), one pulse.
/// - `nrcs_*`: the NRCS (TR-55) 24-hour shape of the type, over a 24-hour interval from its
///   start; only for daily records with the whole day as window (the TR-55 shapes are 24-hour
///   shapes and are not stretched).
/// - `cascade`: a microcanonical binary random cascade: the interval is halved again and again
///   until the boxes are no longer than `step_s`; at each halving a box sends all its depth into
///   one half (either, with equal chance) with probability `intermittency`, otherwise it splits
///   it W : 1 - W with W uniform on (0, 1). Structure after Olsson (1998), Evaluation of a
///   scaling cascade model for temporal rain-sub-division, Hydrol. Earth Syst. Sci. 2, 19-30;
///   the single intermittency probability and the uniform W are simplifications of this
///   project's defaults (Olsson lets the probabilities depend on the box's position and volume).
///   The seed and the interval's start fix its draw, so an interval disaggregates the same way
///   whatever else the record holds.
/// - `fragments`: the method of fragments with k-nearest-neighbour resampling (fragments.hpp):
///   each wet interval takes the within-interval pattern of a similar wet interval of a fine
///   calibration record, scaled to its depth; intervals shorter than a day go by whole wet
///   spells first (a run of wet intervals takes a similar calibration spell of as many), an
///   interval deeper than its calibration interval there on its own.
struct Disaggregation {
  DisaggregationMethod method = DisaggregationMethod::block;
  DayWindow window;  ///< daily records only
  Instant step_s = 300;
  std::uint64_t seed = 1;
  double intermittency = kDefaultCascadeIntermittency;  ///< cascade only, 0..1
  /// Calibrated cascade parameters by box duration (ascending); empty: `intermittency` at every
  /// level, an even chance for either half, and W uniform. Between two durations the
  /// parameters are interpolated in log duration; beyond the ends the nearest is used.
  std::vector<CascadeLevel> levels;
  /// rain.disaggregate.idf: the 2-year IDF curve the cascade's intermittency is fitted to
  /// (fit_intermittency), when there is no fine record to calibrate with.
  std::optional<IdfCurve> idf;
  /// fragments only: one library for each interval length of the record, a calendar day counting
  /// as 24 h whatever its length (from rain.disaggregate.calibrate_with).
  std::vector<FragmentLibrary> fragments;
};

}  // namespace gutterwatt
