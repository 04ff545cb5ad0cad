#pragma once
// `gutterwatt sweep`: the command's arguments and the function main() calls.

#include <atomic>
#include <string>
#include <vector>

namespace gutterwatt {

struct SweepArgs {
  std::string scenario;            ///< scenario file (YAML)
  std::vector<std::string> vary;   ///< `--vary KEY=FROM:TO:STEP` or `KEY=v1,v2,...`, repeatable
  std::vector<std::string> set;    ///< `--set key.path=value`, repeatable, applied to every run
  unsigned jobs = 0;               ///< `--jobs N`; 0: one worker per core
  std::string rank = "energy_Wh";  ///< `--rank [-|+]METRIC`
  std::string out;                 ///< `--out DIR`, required
  bool quiet = false;              ///< `--quiet`: print nothing on stdout on success
  unsigned realizations = 0;       ///< `--realizations N`; 0: the default for the record
  std::string units;               ///< `--units us|si`; empty: the scenario's site.units
  std::string sites;               ///< `--sites FILE`: a sites file; empty: the scenario's site
  std::string shard;               ///< `--shard K/N` or `auto/N`; empty: the whole sweep
};

struct MergeArgs {
  std::string out;                  ///< the merged sweep's folder
  std::vector<std::string> shards;  ///< the shard folders
  bool quiet = false;
};

/// Runs the sweep (with --shard: one shard of it, written as DIR/shard.json and DIR/shard.csv),
/// writes DIR/sweep.csv, DIR/skipped.csv and DIR/sweep.json, reports skipped and
/// failed combinations on stderr (with a progress bar when stderr is a terminal) and the best
/// rows on stdout. Returns the exit status: 0 when at least one combination ran, 2 when none did
/// and some were invalid, 1 when every one failed. Throws InputError for bad arguments or input,
/// Interrupted soon after `stop` is set (leaving no file written).
int sweep_command(const SweepArgs& args, const std::atomic<bool>& stop);

/// Merges shard folders into OUT's sweep.csv, skipped.csv and sweep.json, and reports as
/// sweep_command does. Throws InputError for shards that do not make one whole sweep.
int merge_command(const MergeArgs& args);

}  // namespace gutterwatt
