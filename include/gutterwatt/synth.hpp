#pragma once
/// Long synthetic rain records from a stochastic model with monthly parameters, for sites that
/// have only monthly statistics. The model is the Poisson rectangular pulses model of
/// Rodriguez-Iturbe, Cox & Isham (1987), Some models for rainfall based on stochastic point
/// processes, Proc. R. Soc. Lond. A 410, 269-288: rain cells (pulses) start at the times of a
/// Poisson process of rate lambda; each lasts an exponential time of mean 1/eta and rains at an
/// exponential intensity of mean mu_X, independent of everything else; overlapping cells add.
/// Here the three parameters change with the local calendar month in which a cell starts.

#include <array>
#include <cstdint>
#include <functional>
#include <istream>
#include <ostream>
#include <string>

#include "gutterwatt/calendar.hpp"

namespace gutterwatt {

/// The model's parameters for one calendar month.
struct PrpMonth {
  double cell_rate_per_s = 0.0;         ///< lambda, cells starting per second, >= 0
  double mean_duration_s = 3600.0;      ///< 1 / eta, mean cell duration, > 0
  double mean_intensity_m_per_s = 0.0;  ///< mu_X, mean cell intensity, >= 0
};

/// Parameters for January (index 0) to December (11), months in local time.
struct PrpParameters {
  std::array<PrpMonth, 12> months;
};

/// What record to generate: steps of `step_s` from `start` to `end` (a whole number of steps).
/// The same spec and parameters give the same record on every platform: the generator is
/// std::mt19937_64 (its sequence is fixed by the standard) with this module's own
/// distributions (the standard ones are not fixed).
struct SynthSpec {
  Instant start = 0;
  Instant end = 0;
  Instant step_s = 3600;
  std::uint64_t seed = 1;
  int utc_offset_s = 0;  ///< local time for the months and for the stamps written
};

/// Expected depth in an interval of `interval_s` of a month in steady state:
/// lambda mu_X h / eta (Rodriguez-Iturbe, Cox & Isham 1987).
double prp_mean_depth_m(const PrpMonth& month, double interval_s);

/// Probability that an interval of `interval_s` gets any rain: no cell is alive at its start
/// (a Poisson number of mean lambda / eta) and none starts inside it (mean lambda h), so
/// 1 - exp(-lambda (h + 1 / eta)).
double prp_wet_probability(const PrpMonth& month, double interval_s);

/// Variance of the depth in an interval of `interval_s`, m^2: with exponential intensities
/// (E X^2 = 2 mu_X^2), 4 lambda mu_X^2 (eta h - 1 + exp(-eta h)) / eta^3, the integral of the
/// pulse process's covariance lambda E[X^2] exp(-eta tau) / eta over the interval.
double prp_depth_variance_m2(const PrpMonth& month, double interval_s);

/// Parameters that reproduce a mean depth and a wet probability for intervals of `interval_s`
/// (for example a month's mean daily rain and its share of wet days), given the mean cell
/// duration: the two formulas above solved for lambda and mu_X. Needs mean_depth_m > 0 and
/// 0 < wet_probability < 1; a mean of 0 gives a dry month (lambda = 0).
PrpMonth prp_from_statistics(double mean_depth_m, double wet_probability, double interval_s,
                             double mean_duration_s);

/// Generates the record step by step, calling `sink(step_end, depth_m)` once per step in time
/// order. Only the cells alive at the current step are held, so any length of record streams in
/// constant memory. The record starts in steady state (the cells alive at `start` are drawn
/// from the start month's stationary distribution). Throws InputError (field `--step`, `--end`)
/// for a spec whose step is below 1 s or that is not a whole number of steps long.
void generate_prp(const PrpParameters& parameters, const SynthSpec& spec,
                  const std::function<void(Instant step_end, double depth_m)>& sink);

/// Writes the record as a rain series a scenario can read: header `time,rain_mm`, one row per
/// step stamped with the end of its step (format_iso8601 at `spec.utc_offset_s`), depth in mm
/// to 1e-6 mm, rounded on the running total so the rows add up to the rounded total.
void write_synth_csv(std::ostream& out, const PrpParameters& parameters, const SynthSpec& spec);

/// Reads monthly parameters from a CSV: blank lines and lines starting with `#` are skipped,
/// the first other line is the header, then one row per month 1..12, each exactly once, in any
/// order. Either the model's parameters:
///   month,cells_per_day,mean_duration_h,mean_intensity_mm_per_h
/// or a month's statistics, converted by prp_from_statistics with one-day intervals:
///   month,mean_mm_per_day,wet_day_fraction,mean_duration_h
/// Throws InputError (`file:line: column: message`) for anything else.
PrpParameters read_prp_parameters(std::istream& in, const std::string& file_label);

}  // namespace gutterwatt
