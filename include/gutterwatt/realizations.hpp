#pragma once
/// Realizations: one coarse record, read once, disaggregated with several seeds and each
/// disaggregation run as an independent simulation on every core; the spread of their results.

#include <atomic>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <optional>
#include <string_view>
#include <vector>

#include "gutterwatt/rain_input.hpp"
#include "gutterwatt/scenario.hpp"
#include "gutterwatt/simulation.hpp"

namespace gutterwatt {

/// Realizations a run makes when not told, for a record disaggregated at random: enough for a
/// P10 to P90 range that moves little from one set of seeds to the next (a project choice,
/// common practice, no source).
inline constexpr std::size_t kDefaultRealizations = 20;

/// kDefaultRealizations for a record disaggregated at random (rain.disaggregate with
/// method: cascade), else 1: a record used as read, or spread by a fixed shape, comes out the
/// same every time.
std::size_t default_realizations(const RainConfig& rain);

/// The realizations to run when `asked` were asked for (0: not asked, the default). Throws
/// InputError naming `--realizations` when more than one is asked of a record that comes out the
/// same every time.
std::size_t realization_count(std::size_t asked, const RainConfig& rain);

/// What a realization with the calibration record resampled spreads its record by, in words
/// for outputs.
inline constexpr const char* kCalibrationResample =
    "a resample of the calibration record's wet spells, drawn with replacement";

/// The seed of the resample of the calibration record that a realization drawing with `seed`
/// spreads its record by (resample_spells).
std::uint64_t resample_seed(std::uint64_t seed);

/// The record realization `k` runs on: `as_read` disaggregated by `how` with the seed
/// realization_seed(how->seed, k), or `as_read` itself when there is no `how` (a record used as
/// read). When `resampled` (method: fragments), each fragment library is first resampled by
/// whole wet spells (resample_spells, with resample_seed of that seed), so that the spread of
/// such realizations includes the sampling of the calibration record as well as the draws. The
/// one rule for run and sweep.
RainSeries realization_record(const RainSeries& as_read, const std::optional<Disaggregation>& how,
                              std::size_t k, bool resampled = false);

/// Whether the realizations of records disaggregated by `how` have a calibration record to
/// resample (method: fragments).
bool resamples_calibration(const std::optional<Disaggregation>& how);

/// What each realization reports.
struct RealizationMetrics {
  double energy_Wh = 0.0;  ///< electrical, out of the generator
  double cycles = 0.0;     ///< siphon cycles or valve openings
  double reservoir_overflow_L = 0.0;
  double dribble_L = 0.0;  ///< released while the release was not running
};

/// The metrics of a finished run.
RealizationMetrics realization_metrics(const RunResult& result);

/// The p-quantile (0 <= p <= 1) of `values` (at least one), by Hyndman & Fan (1996), Sample
/// quantiles in statistical packages, The American Statistician 50(4), 361-365, definition 7:
/// with the values sorted x_1 <= ... <= x_n, h = (n - 1) p + 1 and
/// Q(p) = x_floor(h) + (h - floor(h)) (x_floor(h)+1 - x_floor(h)). (The default of R and of
/// numpy; from memory of the paper.)
double percentile(std::vector<double> values, double p);

/// How `percentile` is defined, in words for outputs.
inline constexpr const char* kPercentileDefinition = "Hyndman & Fan (1996) definition 7";

/// P10, median and P90 of a sample, by `percentile`.
struct Spread {
  double p10 = 0.0;
  double p50 = 0.0;
  double p90 = 0.0;
};

Spread spread_of(const std::vector<double>& values);

/// The spread of a set of realizations.
struct RealizationSpread {
  std::size_t n = 0;
  std::uint64_t first_seed = 0;  ///< realization k used seed first_seed + k
  Spread energy_Wh;
  Spread cycles;
  Spread reservoir_overflow_L;
  Spread dribble_L;
};

/// One metric a set of realizations reports: its key in summary.json, its row label and unit in
/// the terminal table, its value in each realization and its spread. The one definition of the
/// realizations' outputs.
struct RealizationColumn {
  std::string_view key;
  std::string_view label;
  std::string_view unit;
  double RealizationMetrics::*value;
  Spread RealizationSpread::*spread;
  /// The same figure of the run itself in summary.json (a key of summary_numbers()).
  std::string_view summary_key;
};

inline constexpr RealizationColumn kRealizationColumns[] = {
    {"energy_Wh", "electrical (generator out)", "Wh", &RealizationMetrics::energy_Wh,
     &RealizationSpread::energy_Wh, "energy_Wh.electrical"},
    {"cycles", "siphon cycles", "", &RealizationMetrics::cycles, &RealizationSpread::cycles,
     "siphon.cycles"},
    {"reservoir_overflow_L", "reservoir overflow", "L", &RealizationMetrics::reservoir_overflow_L,
     &RealizationSpread::reservoir_overflow_L, "water_L.reservoir_overflow"},
    {"dribble_L", "dribble", "L", &RealizationMetrics::dribble_L, &RealizationSpread::dribble_L,
     "water_L.dribble"},
};

/// The spread of `runs` (at least one), realization k having used seed `first_seed + k`.
RealizationSpread spread_of(const std::vector<RealizationMetrics>& runs, std::uint64_t first_seed);

/// Runs task `k` on its record (run_realizations: realization k of the draws for k < n, and
/// realization k - n on a resample of the calibration record for k >= n); called from several
/// threads at once, with `options`' stop flag in `run_options`.
using RealizationRun =
    std::function<RunResult(std::size_t k, const RainSeries& rain, const RunOptions& run_options)>;

/// Worker threads for `tasks` tasks (at least one) when `asked` were asked for (0: one per
/// core): never more than the tasks, never none. The one rule for realizations and sweep.
std::size_t worker_threads(unsigned asked, std::size_t tasks);

struct RealizationOptions {
  unsigned jobs = 0;  ///< worker threads; 0: one per core
  /// Checked between realizations and (through RunOptions) between rain intervals.
  const std::atomic<bool>* stop = nullptr;
  /// What runs each realization (a seam for the command line's writers and for tests); empty:
  /// gutterwatt::simulate with no observer.
  RealizationRun run;
  /// Runs the n realizations again, each spreading the record by a resample of the
  /// calibration record (realization_record); only where resamples_calibration.
  bool resample_calibration = false;
};

/// Runs realizations 0 to n - 1 (n >= 1) of `scenario`: realization k runs on
/// disaggregate(as_read, how) with how = *scenario.rain.disaggregate and its seed
/// realization_seed(how.seed, k) (a record used as read when there is no rain.disaggregate).
/// With `options.resample_calibration`, realizations n to 2n - 1 run realizations 0 to n - 1 again
/// on resamples of the calibration record, from the same pool of workers, so that no core waits
/// between the two sets. Returns the metrics in that order (the draws, then the resampled ones);
/// each realization is the same whatever the number of threads. After an error no further
/// realization starts; once the ones under way have finished, the error of the lowest-numbered
/// failed realization is thrown. Throws Interrupted soon after `options.stop` is set.
std::vector<RealizationMetrics> run_realizations(const Scenario& scenario,
                                                 const RainSeries& as_read, std::size_t n,
                                                 const RealizationOptions& options = {});

}  // namespace gutterwatt
