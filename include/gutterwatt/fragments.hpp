#pragma once
/// The method of fragments with k-nearest-neighbour resampling: a coarse interval's depth is
/// spread over its steps by the pattern ("fragments": the shares of the interval's depth in each
/// step) of a similar wet interval of a fine calibration record. Sharma & Srikanthan (2006),
/// Continuous rainfall simulation: a nonparametric alternative, 30th Hydrology and Water
/// Resources Symposium, Launceston; the choice among similar days conditioned on the wet or dry
/// state of the days before and after and on a window of the season after Westra, Mehrotra,
/// Sharma & Srikanthan (2012), Continuous rainfall simulation: 1. A regionalized subdaily
/// disaggregation approach, Water Resources Research 48, W01535; the draw among the k nearest
/// with weights 1/j after Lall & Sharma (1996), A nearest neighbor bootstrap for resampling
/// hydrologic time series, Water Resources Research 32(3), 679-693. The details below (the
/// ±15-day window, how it widens, distance on the depth alone) are from memory of these papers.

#include <cstddef>
#include <cstdint>
#include <optional>
#include <vector>

#include "gutterwatt/disaggregation_config.hpp"
#include "gutterwatt/rain_input.hpp"

namespace gutterwatt {

/// Days of the mean Gregorian year: a start's place in the season is its day count since the
/// epoch modulo this (whole-day precision is all the season window needs).
inline constexpr double kSeasonYear_days = 365.2425;

/// Where an instant falls in the year, days from 0 to kSeasonYear_days.
double season_day(Instant t);

/// The length of [start, end) as a library on `calendar` counts it: on that zone's local clock
/// when it is a whole number of days there (a calendar day, 23 or 25 h long across a change of
/// daylight saving, counts as 24 h), else (and without `calendar`) its elapsed length.
Instant library_length_s(const std::optional<TimeZone>& calendar, Instant start, Instant end);

/// The library of `fine` (a series at a step that divides `step_s`) for intervals of `length_s`
/// (> `step_s`) starting at `phase_s` modulo `length_s`: every such interval the record covers
/// in full and that holds rain, with its depth added up over steps of `step_s` from its start (the
/// last shorter when `step_s` does not divide the interval; a pulse counts in the step it starts
/// in). An interval just before or after one that is not covered in full counts as dry. With
/// `calendar` and `length_s` a whole number of days, the intervals are cut on that zone's local
/// clock (calendar days, the library's `calendar`), else in elapsed time.
FragmentLibrary build_fragment_library(const RainSeries& fine, Instant length_s, Instant phase_s,
                                       Instant step_s,
                                       const std::optional<TimeZone>& calendar = std::nullopt);

/// A bootstrap resample of `library` by whole wet spells (runs of consecutive wet intervals,
/// dry before and after): as many spells as it holds, drawn with replacement by `seed`, kept in
/// time order (a spell drawn twice appears twice, one after the other). A block bootstrap
/// (Kunsch 1989, The jackknife and the bootstrap for general stationary observations, Annals of
/// Statistics 17(3), 1217-1241, as remembered) with the wet spell as the block, so that each
/// interval keeps its neighbours: the spread of the realizations then includes what sampling one
/// short calibration record does to the patterns on offer.
FragmentLibrary resample_spells(const FragmentLibrary& library, std::uint64_t seed);

/// The cumulative shares of `f` at the step boundaries of an interval of `length_s` in steps of
/// `step_s` (the last shorter when it does not divide `length_s`): `f.cumulative` itself when the
/// lengths agree; else `f`'s time stretched by `f.length_s / length_s` (a fragment of a 24 h
/// calendar day on a 23 h or 25 h one), linear within each of its steps. 0 first, 1 last,
/// non-decreasing, so the interval's depth stays inside it and is split exactly.
std::vector<double> stretched_cumulative(const Fragment& f, Instant length_s, Instant step_s);

/// Fewest library intervals the choice is made among: the season window widens (±15, 30, 61
/// days, then the whole year) and then the wet or dry state of the neighbours is let go until
/// there are this many (a project choice, common practice, no source).
inline constexpr std::size_t kMinFragmentCandidates = 10;

/// Fewest library intervals matching the depth of the interval to spread that the season window
/// must hold (besides kMinFragmentCandidates) before it stops widening: for whole days those at
/// least as deep, for shorter intervals (hours) those within kDepthFactor of it either way
/// (depth_matches). This project's rule, not the papers': with a short calibration record an
/// interval's k nearest in a narrow window may lie far from it in depth, and a pattern scaled far
/// up or down is not the pattern of an interval that deep (docs/disaggregation-accuracy.md). It
/// serves the aim of Westra et al. (2012), who pool the fragments of nearby gauges so that
/// similar days exist (as remembered); here the season window widens instead:
/// - for whole days no further than ±61 days, so that a deep day keeps its season (widened to
///   the whole year, the small accuracy test's seasonal year took other seasons' patterns);
/// - for shorter intervals to the whole year if need be, then kDepthFactor widens (multiplied by
///   itself) until this many match, and the draw is among the matching ones only: an hour's
///   pattern is neither a much shallower hour's scaled up (flatter than a deep hour's: the
///   frontal hourly energy was 18 % low, nearly all of it in the few deepest hours) nor a much
///   deeper hour's scaled down (more concentrated than a shallow hour's: with the rule one-sided,
///   never scaled up, convective hourly cycles came out +43 % with another calibration year).
/// 2, the cap for days and the rule for hours are this project's choices, measured with
/// tools/accuracy; no published value.
inline constexpr std::size_t kMinDepthMatches = 2;

/// How far (as a factor either way) the depth of a library interval may lie from that of an
/// interval shorter than a day for its pattern to spread it, before widening
/// (kMinDepthMatches). This project's choice, no published value: measured with tools/accuracy
/// (hourly rows, three calibration years, docs/disaggregation-accuracy.md) for factors 1.05 to
/// 4, whose errors differed by a point or two; from 1.3 up the frontal hourly energy with the
/// issue's calibration year misses (−16 % to −19 %), and 1.25 had the smallest summed error
/// over the twelve rows.
inline constexpr double kDepthFactor = 1.25;

/// For whole days, the most a library day's pattern is scaled up: the draw is among the
/// candidates at least 1 / kMaxDayScaleUp as deep as the day (all of them when none is). This
/// project's rule, no published value: a much shallower day's pattern scaled up keeps the
/// intensity between the priming flow and the siphon's capacity for hours, where each filling
/// makes a cycle (10-year frontal record, one realization: the 141 days of 5 mm or more whose
/// pattern was scaled up by more than 1.5 made 734 siphon cycles where the 1-minute record made
/// 377 on them; docs/disaggregation-accuracy.md). Measured with tools/accuracy for 1.25, 1.5, 2 and
/// 3 (daily rows, three calibration years); 2 is the one whose daily cycle errors with `other` and
/// `other-2` all fell or stayed (the only one).
inline constexpr double kMaxDayScaleUp = 2.0;

/// Whether a library interval of `library_m` may spread an interval of `depth_m` shorter than a
/// day: each within `factor` of the other.
bool depth_matches(double library_m, double depth_m, double factor = kDepthFactor);

/// Weights of the j-th nearest of k neighbours, j = 1..k: (1/j) / sum over i of 1/i (Lall &
/// Sharma 1996, eq. 5 as remembered).
std::vector<double> knn_weights(std::size_t k);

/// How far (as a factor either way) the first step of a fragment, scaled to the interval's depth,
/// may lie from the last step of the wet interval before it, as spread, for choose_fragment to
/// prefer it. This project's rule, not from the papers: each interval drawing its own pattern
/// cut the storms' harder spells at the interval edges (docs/disaggregation-accuracy.md); the
/// factor 2 was measured against 1.5 and the best match (tools/accuracy, common practice, no
/// source).
inline constexpr double kEdgeRatio = 2.0;

/// Whole-spell matching (this project's extension of the method of fragments): for a wet spell
/// of the target record (a run of consecutive wet intervals, dry before and after) with interval
/// depths `depths_m`, starting `when` in the season, the index in `library.intervals` of the
/// first interval of a calibration spell of the same number of intervals. The spells of that
/// length within the season window (widened as in choose_fragment until it holds
/// kMinFragmentCandidates, or the whole year) are ranked by the Euclidean distance between the two
/// vectors of interval depths, sqrt(sum_i (d_i - c_i)^2), the feature-vector distance of Lall &
/// Sharma (1996), here over the whole spell where "A nonparametric stochastic approach for
/// disaggregation of daily to hourly rainfall using 3-day rainfall patterns" (Water 12(8), 2306,
/// 2020) takes the day before, the day and the day after (only its abstract read); the k =
/// round(sqrt(n)) nearest (ties: the earlier) are drawn with knn_weights by `u` in [0, 1).
/// Each target interval then takes the fragments of the calibration interval in the same
/// place of the spell, so the gauge's own pattern carries across the interval edges, unless their
/// depths do not match (depth_matches): it then goes on its own (choose_fragment), so that its
/// pattern is not one scaled far up or down (kMinDepthMatches). nullopt when the library has
/// no spell of that length.
std::optional<std::size_t> choose_spell(const FragmentLibrary& library,
                                        const std::vector<double>& depths_m, double when, double u);

/// The library interval whose fragments spread an interval of `depth_m` starting `when` in the
/// season (season_day), with wet or dry neighbours: among the candidates (the same neighbour
/// states, within the season window; see kMinFragmentCandidates and kMinDepthMatches; for
/// intervals shorter than a day, only those whose depth matches `depth_m`; for days, only those
/// at least 1 / kMaxDayScaleUp as deep, when any are), the k =
/// round(sqrt(n)) nearest in depth (ties: the earlier one), drawn with knn_weights by `u` in
/// [0, 1). `edge_m`, when positive, is the depth of the last step of the interval just before, as
/// spread: the k are then narrowed to those whose first step times `depth_m` lies within
/// kEdgeRatio of it, in the same order, and drawn with the weights of their number (all k when
/// none does). `library` holds at least one interval, and `depth_m` > 0.
const Fragment& choose_fragment(const FragmentLibrary& library, double depth_m, double when,
                                bool wet_before, bool wet_after, double u, double edge_m = 0.0);

}  // namespace gutterwatt
