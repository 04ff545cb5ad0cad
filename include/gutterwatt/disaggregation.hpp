#pragma once
/// Brings a coarse rain record down to a fine step (rain.disaggregate): each interval's depth is
/// spread over steps by a 24-hour shape or a random cascade, and conserved exactly.

#include <cstdint>
#include <string_view>
#include <vector>

#include "gutterwatt/disaggregation_config.hpp"
#include "gutterwatt/rain_input.hpp"

namespace gutterwatt {

/// The depths of one interval of `length_s` (>= 1) seconds, in time order over its steps of
/// `how.step_s` (the last one shorter when the step does not divide the length); the interval
/// as one value when it is no longer than a step or the method is `block`. Every depth is a
/// whole multiple of the spacing of doubles at `depth_m`, so the depths add up to `depth_m`
/// exactly in any order. The interval's `start` (with `how.seed`) picks the random draw, and
/// places the interval in the season for `fragments`. An NRCS method needs `length_s` of 24 h;
/// another length is returned as one value. A calibrated cascade takes the intervals before and
/// after as wet or dry (`wet_before`, `wet_after`) for the position of the boxes at its ends;
/// `fragments` picks among the library intervals with the same neighbour states (choose_fragment)
/// in the library of `length_s` in `how.fragments`, given `edge_m`, the depth of the last step of
/// the interval just before as spread (0: none, or dry); without a library the interval is
/// returned as one value (calibrated_disaggregation builds one for every interval length of the
/// record).
std::vector<double> disaggregate_interval(double depth_m, Instant length_s, Instant start,
                                          const Disaggregation& how, bool wet_before = false,
                                          bool wet_after = false, double edge_m = 0.0);

/// The warning of a record spread by the cascade with its default parameters.
inline constexpr std::string_view kUncalibratedWarning =
    "the cascade's parameters are uncalibrated defaults (intermittency 0.3, W uniform), which "
    "may make the rain far burstier or smoother than it is where you are; calibrate them with "
    "rain.disaggregate.calibrate_with (a short fine record from a nearby gauge)";

/// The record with every pulse longer than `how.step_s` spread by disaggregate_interval, except
/// that with `fragments` a wet spell of intervals shorter than a day (consecutive pulses, all
/// spread by one library) takes a calibration spell of as many intervals whole (choose_spell),
/// each pulse the fragment of the calibration interval in the same place, when the library has
/// one of that length; coverage, gaps, warnings and the total depth are those of
/// `as_read`, and `step_s` becomes `how.step_s` when a pulse was spread. Each pulse's depth is
/// conserved exactly. A record that is not daily (step other than 1 d) gains a warning like
/// kDailyWarning when a pulse was spread, and an uncalibrated cascade kUncalibratedWarning.
RainSeries disaggregate(const RainSeries& as_read, const Disaggregation& how);

/// The library of `how` (`fragments`) that spreads an interval of `length_s` from `start`, if any
/// holds rain: the one whose length that interval has (library_length_s: a calendar day counts
/// as 24 h).
const FragmentLibrary* library_for(const Disaggregation& how, Instant start, Instant length_s);

/// Quantiles of W kept per calibrated level (at probabilities 0, 0.05, ..., 1).
inline constexpr std::size_t kWQuantiles = 21;

/// Fewest wet boxes of one duration a calibrated level may rest on: durations with fewer are
/// left to the nearest estimated one (a project choice, common practice, no source).
inline constexpr std::size_t kMinCalibrationBoxes = 20;

/// The cascade's parameters estimated from a fine record by the method of Olsson (1998): for
/// boxes of 2, 4, 8, ... record steps up to twice `longest_s`, P(1/0), P(0/1) and the quantiles
/// of W over all wet boxes and by class (position among the neighbours, volume at most or above
/// the median; see CascadeLevel). A class with fewer than kMinCalibrationBoxes boxes is left to
/// the pooled values when the cascade runs. The boxes start at the record's first covered
/// instant; a pulse counts in the step it starts in, and time without data counts as dry.
/// Stops at the first duration with fewer than kMinCalibrationBoxes wet boxes; empty when even
/// the shortest has fewer.
std::vector<CascadeLevel> estimate_cascade(const RainSeries& fine, Instant longest_s);

/// The parameters for boxes of `box_s` from `levels` (not empty, ascending by duration): linear
/// in log duration between the two around it, the nearest beyond the ends.
CascadeLevel cascade_level_at(const std::vector<CascadeLevel>& levels, double box_s);

/// The median over the calendar years (UTC) of the largest depth `rain` holds in any window of
/// `duration_s` (a whole number of the record's steps, windows starting at a step), as an
/// intensity, m/s; 0 for a dry record. With a record of two years or more, the 2-year event.
double median_annual_max_intensity_m_per_s(const RainSeries& rain, Instant duration_s);

/// Durations, seconds, at which fit_intermittency compares a disaggregation with the IDF curve.
inline constexpr Instant kIdfCheckDurations_s[] = {300, 900, 3600};

/// The uncalibrated cascade's intermittency (0, 0.025, ..., 0.95) whose disaggregation of
/// `as_read` by `how` puts the median annual maxima at 5, 15 and 60 min closest to `idf` (least
/// squares of the log intensities), taking `idf` as the 2-year curve. Durations shorter than
/// `how.step_s` are left out. A project method (common practice, no source).
double fit_intermittency(const RainSeries& as_read, const Disaggregation& how, const IdfCurve& idf);

/// True when the method draws at random (cascade, fragments): its realizations differ by seed.
bool is_random(DisaggregationMethod method);

/// True for a cascade with neither calibration (levels) nor an IDF curve: it runs on defaults.
bool is_uncalibrated(const Disaggregation& how);

/// The seed of realization `k` (0-based) of a record disaggregated with `seed`: `seed + k`
/// (modulo 2^64), so realization 0 is the single run and any realization can be repeated alone
/// by giving its seed.
std::uint64_t realization_seed(std::uint64_t seed, std::uint64_t k);

/// The scenario name of a method (`nrcs-II`, `cascade`, ...).
std::string_view method_name(DisaggregationMethod method);

}  // namespace gutterwatt
