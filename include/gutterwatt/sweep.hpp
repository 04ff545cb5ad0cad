#pragma once
/// Set-point sweeps: every combination of some scenario keys, at one site or at each site of a
/// sites file, run in parallel on each site's rain record read once, ranked best first and
/// written as DIR/sweep.csv, DIR/skipped.csv and DIR/sweep.json. Shards of a sweep and their
/// merge are in sweep_shard.hpp.

#include <atomic>
#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <functional>
#include <optional>
#include <ostream>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "gutterwatt/output.hpp"
#include "gutterwatt/output_folder.hpp"
#include "gutterwatt/rain_input.hpp"
#include "gutterwatt/realizations.hpp"
#include "gutterwatt/scenario.hpp"
#include "gutterwatt/simulation.hpp"

namespace gutterwatt {

/// One varied key and its values, each the exact text of a `--set key=value` override.
struct SweepAxis {
  std::string key;
  std::vector<std::string> values;
};

/// Most combinations one sweep may have, so a mistyped step does not start a run of years.
inline constexpr std::size_t kMaxSweepCombinations = 100000;

/// Reads one `--vary` spec: `KEY=FROM:TO:STEP` (numbers; FROM <= TO, STEP > 0; TO included when
/// it is reached within 1e-9 of the largest of |FROM|, |TO| and STEP) or `KEY=v1,v2,...` (any
/// text, e.g. `release.kind=bell,float_valve`; one value needs no comma). Range values are
/// printed with the decimals of the spec's numbers, so `0.1:0.3:0.1` gives 0.1, 0.2, 0.3. Throws
/// InputError (`--vary: KEY: message`) for a malformed spec, a zero or negative step, a range
/// that runs backwards, an empty or repeated value, or more than kMaxSweepCombinations values.
///
///   parse_vary("release.trigger_level_mm=30:50:10").values  // {"30", "40", "50"}
SweepAxis parse_vary(const std::string& spec);

/// Every combination of the axes' values, in nested order (the first axis varies slowest).
/// Throws InputError naming `--vary` for more than kMaxSweepCombinations combinations.
std::vector<std::vector<std::string>> expand_combinations(const std::vector<SweepAxis>& axes);

/// One site of a sites file: its name, the `key=value` overrides of its non-empty cells (applied
/// after the `--set` ones and before the varied keys) and its line in the file.
struct SweepSite {
  std::string name;
  std::vector<std::string> overrides;
  int line = 0;
};

/// A sites file as read: a CSV (RFC 4180 quoting) whose header is `site` and then scenario keys
/// (rain.file, roof.area_m2, site.utc_offset...), one row per site. An empty cell leaves the key
/// as the scenario has it. Paths (rain.file, rain.files, rain.disaggregate.calibrate_with.file)
/// are relative to the sites file; they are made absolute in the overrides.
struct SweepSites {
  std::string file;               ///< the file as given, in messages
  std::string text;               ///< the whole text, for the plan's digest
  std::vector<std::string> keys;  ///< the header after `site`
  std::vector<SweepSite> sites;
};

/// Reads a sites file's text. Throws InputError naming `file`, the line and the column (as
/// `column N (KEY)`) for a first column that is not `site`, a key that is no scenario key or is
/// given twice, a row of the wrong width, an empty or repeated site name, or no site.
SweepSites read_sweep_sites(std::string_view text, const std::string& file);

/// What a sweep reports for one combination. Water in litres, energy in watt-hours (the units of
/// the column names), taken from the run's totals without rounding.
struct SweepMetrics {
  double energy_Wh = 0.0;   ///< electrical, out of the generator
  double overflow_L = 0.0;  ///< reservoir plus head-column overflow
  double dribble_L = 0.0;   ///< released while the release was not running
  double cycles = 0.0;      ///< siphon cycles or valve openings
  double overflow_events = 0.0;
  double overflow_hours = 0.0;
  double curtailed_Wh = 0.0;  ///< could not be stored (battery full or charge limit)
  double jet_Wh = 0.0;
  double stored_Wh = 0.0;
  double unmet_load_Wh = 0.0;
  double dribble_share = 0.0;  ///< dribble over roof runoff (0 without runoff)
  double overflow_days = 0.0;  ///< local days with a reservoir overflow episode
  double largest_overflow_L = 0.0;
  double standing_longest_days = 0.0;        ///< longest spell of standing water
  double standing_spells_over_7_days = 0.0;  ///< spells long enough to breed mosquitoes
};

/// The metrics of a finished run; `summary` must have observed that run.
SweepMetrics sweep_metrics(const RunResult& result, const SummaryBuilder& summary);

/// The metric column names, in the order sweep.csv writes them after the varied keys.
std::vector<std::string> sweep_metric_names();

/// A metric's value by column name; throws std::out_of_range for an unknown name.
double sweep_metric(const SweepMetrics& metrics, std::string_view name);
double& sweep_metric(SweepMetrics& metrics, std::string_view name);

/// How rows are ranked: by one metric, best first.
struct SweepRank {
  std::string metric = "energy_Wh";
  bool descending = true;
};

/// Reads `--rank`: a metric column name, best first in its natural order (descending, except
/// ascending for overflow_*, dribble_*, unmet_*, curtailed_* and largest_overflow_L), or the name
/// after `-` (descending) or `+` (ascending) to force the order. Throws InputError naming
/// `--rank` and listing the metrics for an unknown name.
SweepRank parse_rank(const std::string& text);

/// A metric's value as sweep.csv prints it: the shortest text that reads back as the same double.
std::string format_metric(double value);

enum class SweepStatus { ok, skipped, failed };

/// `ok`, `skipped` or `failed`, as skipped.csv writes it.
std::string_view sweep_status_name(SweepStatus status);

/// The outcome of one combination. `reason` is the error text for a skipped (invalid input) or
/// failed (simulation error) combination.
struct SweepRow {
  std::size_t cell = 0;             ///< the combination's index among the plan's cells
  std::size_t site = 0;             ///< index into the plan's sites (0 without sites)
  std::vector<std::string> values;  ///< one per axis
  SweepStatus status = SweepStatus::ok;
  SweepMetrics metrics;  ///< over several realizations, each metric's median
  std::string reason;
  /// Several realizations: P10, median and P90 of the rank metric over them.
  std::optional<Spread> rank_spread;
  /// Several realizations: the rank metric's median lies inside the best row's P10 to P90, so
  /// the row cannot be told from the best by this record.
  bool within_best = false;
};

/// A checked sweep, ready to run: the scenario text is parsed once per combination with the
/// base overrides first, then the site's and then `key=value` for each axis, exactly as
/// `gutterwatt run SCENARIO --set BASE... --set SITE... --set key=value...` would parse it.
/// Its cells are every site (slowest) by every combination of the axes.
struct SweepPlan {
  std::string scenario_text;
  std::string scenario_label;  ///< the scenario path as given, used in messages
  std::filesystem::path base_dir;
  std::vector<std::string> base_overrides;
  std::vector<SweepAxis> axes;
  std::vector<std::vector<std::string>> combinations;
  SweepRank rank;
  Scenario base;  ///< the scenario with only the base overrides (its rain is the sweep's rain)
  std::string sites_file;        ///< the sites file as given; empty without sites
  std::string sites_text;        ///< its text, for the digest
  std::vector<SweepSite> sites;  ///< empty: the scenario's own site only
  /// Each site's scenario (base and site overrides): its rain is the site's record.
  std::vector<Scenario> site_scenarios;

  /// Sites the cells run over: the sites file's, or 1 (the scenario's own).
  std::size_t site_count() const { return sites.empty() ? 1 : sites.size(); }
  /// Every site by every combination.
  std::size_t cell_count() const { return site_count() * combinations.size(); }
  /// The site of cell `cell`.
  std::size_t site_of(std::size_t cell) const { return cell / combinations.size(); }
  /// The scenario whose rain site `site` runs on.
  const Scenario& site_scenario(std::size_t site) const {
    return sites.empty() ? base : site_scenarios[site];
  }
  /// The override strings of cell `cell`.
  std::vector<std::string> overrides(std::size_t cell) const;
};

/// Checks the specs and builds the plan. Throws InputError for a bad `--vary` or `--rank`, a key
/// that is no scenario key (check_scenario_key, naming `--vary`), a key varied twice or also given
/// with `--set` or in the sites file, a key under `rain.` (the record is read once for the whole
/// sweep), no key to vary, a base scenario (text plus `base_overrides`) that does not load, a
/// sites file key also given with `--set`, and a site whose scenario does not load (naming the
/// sites file, the site's line and the column when the loader names its key).
SweepPlan plan_sweep(std::string scenario_text, const std::string& scenario_label,
                     const std::filesystem::path& base_dir,
                     const std::vector<std::string>& vary_specs,
                     const std::vector<std::string>& base_overrides,
                     const std::string& rank_text = "energy_Wh", const SweepSites* sites = nullptr);

/// Where a sweep stands, as reported to SweepOptions::progress.
struct SweepProgress {
  std::size_t done = 0;
  std::size_t total = 0;
  double elapsed_s = 0.0;
};

/// Runs one scenario, with the signature of gutterwatt::simulate.
using SimulateFunction =
    std::function<RunResult(const Scenario&, const RainSeries&, Observer&, const RunOptions&)>;

struct SweepOptions {
  unsigned jobs = 0;  ///< worker threads; 0: one per core
  /// Checked between combinations and (through RunOptions) between rain intervals.
  const std::atomic<bool>* stop = nullptr;
  /// Called on the calling thread, never concurrently, when combinations finish.
  std::function<void(const SweepProgress&)> progress;
  /// What runs each combination, from several threads at once (a seam for tests); empty:
  /// gutterwatt::simulate.
  SimulateFunction simulate;
};

/// The outcome of a sweep: `rows` in cell order (every cell, or a shard's), `ranked` the indices
/// of the rows that ran, best first (ties in cell order).
struct SweepResult {
  std::size_t realizations = 1;  ///< records each combination ran on
  std::vector<SweepRow> rows;
  std::vector<std::size_t> ranked;
  std::size_t skipped = 0;
  std::size_t failed = 0;
};

/// Runs every combination of `plan` on each record of `realizations` (at least one; shared
/// read-only by the workers, which share out the combinations). With several records (the
/// realizations of a disaggregated record) a row's metrics are the medians over them, it carries
/// the P10 to P90 of the rank metric, rows are ranked by the median and those whose median lies
/// inside the best row's P10 to P90 are marked `within_best` (the best row too). An InputError
/// of one combination (at load or from the simulation) marks it skipped and a SimulationError
/// failed; neither stops the sweep. Throws Interrupted soon after `options.stop` is set, and
/// rethrows any other error of a worker once all workers have stopped.
SweepResult run_sweep(const SweepPlan& plan, std::span<const RainSeries> realizations,
                      const SweepOptions& options = {});

/// run_sweep on one record.
inline SweepResult run_sweep(const SweepPlan& plan, const RainSeries& rain,
                             const SweepOptions& options = {}) {
  return run_sweep(plan, std::span<const RainSeries>(&rain, 1), options);
}

/// The records one site's combinations run on: the realizations of its record.
using SiteRecords = std::function<std::vector<RainSeries>(std::size_t site)>;

/// As run_sweep, on cells [first, end) of the plan only (all of them by default), site by site:
/// `records` is called once for each site those cells reach, and its records are let go before
/// the next site's are loaded, so a sweep holds one site's record at a time.
SweepResult run_sweep_sites(const SweepPlan& plan, const SiteRecords& records,
                            const SweepOptions& options = {}, std::size_t first = 0,
                            std::size_t end = SIZE_MAX);

/// Counts the skipped and failed rows, ranks those that ran and marks those within the best
/// row's spread: the end of run_sweep, shared with merging shards.
void finish_sweep(const SweepPlan& plan, SweepResult& result);

/// Indices of the rows that ran, best first by `rank`, ties in combination order.
std::vector<std::size_t> rank_rows(const std::vector<SweepRow>& rows, const SweepRank& rank);

/// What a person should hear about a finished sweep: once, when it varies
/// release.priming_flow_L_per_min without release.build or drop_pipe.minor_loss_k (a priming
/// flow is a property of a build, whose running loss changes with it); and, for every axis of at
/// least three numbers, when the best row takes the axis's smallest or largest value ("the best
/// KEY is the highest tried (V): extend the range").
std::vector<std::string> sweep_warnings(const SweepPlan& plan, const SweepResult& result);

/// sweep.csv: with sites `site` and `site_rank` (the row's rank among its site's), then the varied
/// keys, then the metrics, one row per combination that ran, best first over all sites; after
/// several realizations also `<rank>_p10`, `<rank>_p90` and `within_best_range` (1 or 0).
void write_sweep_csv(std::ostream& out, const SweepPlan& plan, const SweepResult& result);

/// skipped.csv: with sites `site`, then the varied keys, `status` (skipped or failed) and
/// `reason`, in cell order.
void write_skipped_csv(std::ostream& out, const SweepPlan& plan, const SweepResult& result);

/// sweep.json: scenario, site, with sites `sites` (the file's name) and `site_names`, vary,
/// values, set, rank, units, order, combinations, ran, skipped, failed, and after several
/// realizations `realizations` and `percentiles`.
void write_sweep_json(std::ostream& out, const SweepPlan& plan, const SweepResult& result);

/// The best `top` rows as a short table for the terminal.
void print_sweep_table(std::ostream& out, const SweepPlan& plan, const SweepResult& result,
                       std::size_t top = 10);

/// Writes sweep.csv, skipped.csv and sweep.json into `folder` and commits them, with an earlier
/// report.html retired, unless no combination ran (earlier results are worth more than an empty
/// table); returns whether it wrote.
bool write_sweep_files(OutputFolder& folder, const SweepPlan& plan, const SweepResult& result);

/// Runs the sweep and writes sweep.csv, skipped.csv and sweep.json into `dir` through an
/// OutputFolder as one set: the folder is checked before the first run, and an interrupted or
/// failed sweep, or one in which no combination ran, writes nothing and leaves earlier results
/// untouched.
SweepResult run_sweep_into(const std::filesystem::path& dir, const SweepPlan& plan,
                           std::span<const RainSeries> realizations,
                           const SweepOptions& options = {});

/// run_sweep_into on one record.
inline SweepResult run_sweep_into(const std::filesystem::path& dir, const SweepPlan& plan,
                                  const RainSeries& rain, const SweepOptions& options = {}) {
  return run_sweep_into(dir, plan, std::span<const RainSeries>(&rain, 1), options);
}

/// One line of progress for a terminal, e.g. `[#######.............]  12/40  30%  0:42 left`;
/// no estimate before the first combination has finished.
std::string progress_line(const SweepProgress& progress, std::size_t width = 30);

}  // namespace gutterwatt
