#pragma once
/// Shards of a sweep for a batch scheduler's array job: shard K of N runs a fixed slice of the
/// plan's cells and writes a self-describing folder (shard.json: the plan, its digest, the slice,
/// the digests of the records it read; shard.csv: its rows, metrics exact to the last bit);
/// merging the N folders writes the sweep.csv, skipped.csv and sweep.json of the whole sweep, the
/// same bytes one machine would have written.

#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <functional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "gutterwatt/output_folder.hpp"
#include "gutterwatt/rain_input.hpp"
#include "gutterwatt/sweep.hpp"

namespace gutterwatt {

/// Shard `index` of `count`, counted from 1.
struct SweepShard {
  std::size_t index = 1;
  std::size_t count = 1;
};

/// An array job system's variable for the task's index, and what its indices count from when the
/// array is submitted as the README says.
struct ArrayIndexVariable {
  std::string_view name;
  std::string_view system;
};

/// The variables `--shard auto/N` reads, the first one set wins. Each holds the index as the
/// array was submitted, so every array must be submitted as 1 to N: Slurm `sbatch --array=1-N`
/// (SLURM_ARRAY_TASK_ID), PBS Pro `qsub -J 1-N` (PBS_ARRAY_INDEX), Grid Engine `qsub -t 1-N`
/// (SGE_TASK_ID), LSF `bsub -J "name[1-N]"` (LSB_JOBINDEX).
inline constexpr ArrayIndexVariable kArrayIndexVariables[] = {
    {"SLURM_ARRAY_TASK_ID", "Slurm"},
    {"PBS_ARRAY_INDEX", "PBS Pro"},
    {"SGE_TASK_ID", "Grid Engine"},
    {"LSB_JOBINDEX", "LSF"},
};

/// Reads `--shard`: `K/N` (1 <= K <= N) or `auto/N`, K then taken from the first variable of
/// kArrayIndexVariables that `env` (getenv's signature) finds. Throws InputError naming `--shard`
/// (and the variable) for anything else, for K = 0 (arrays are submitted from 1), and for `auto`
/// when no variable is set.
SweepShard parse_shard(const std::string& text, const std::function<const char*(const char*)>& env);

/// Cells [first, end) of `shard` among `cells`: consecutive slices in cell order, shard K taking
/// cells floor((K-1) * cells / N) up to floor(K * cells / N), so their sizes differ by at most
/// one and a shard reaches as few sites as a slice of its size can.
std::pair<std::size_t, std::size_t> shard_cells(std::size_t cells, const SweepShard& shard);

/// FNV-1a, 64 bits, as 16 hex digits (Fowler, Noll and Vo; the IETF draft
/// draft-eastlake-fnv): a check against mistakes, not against tampering.
std::string fnv1a_hex(std::string_view bytes);

/// The plan every shard of a sweep shares, as JSON text: the scenario's name and digest, the
/// site of the scenario, `--set`, the varied keys and their values, the sites file's name and
/// digest, the site names, each site's record files (name and size in bytes: not read),
/// `--rank`, its order, the units, the realizations and the cell count.
std::string shard_plan_json(const SweepPlan& plan, std::size_t realizations);

/// A digest of a site's records as read and disaggregated (pulses, covered spans, step).
std::string record_digest(const std::vector<RainSeries>& records);

/// What one shard writes besides its rows: which shard it is and the digest of each record it
/// read, by site index.
struct ShardRun {
  SweepShard shard;
  std::size_t realizations = 1;
  std::vector<std::pair<std::size_t, std::string>> record_digests;
};

/// Writes shard.json and shard.csv into `folder` and commits them (a whole set or nothing).
/// `result` holds the rows of the shard's cells, in cell order.
void write_shard(OutputFolder& folder, const SweepPlan& plan, const ShardRun& run,
                 const SweepResult& result);

/// A sweep put together from its shards: enough of the plan to write its files, and every row.
struct MergedSweep {
  SweepPlan plan;
  SweepResult result;
};

/// Reads shard folders and puts the sweep together (finish_sweep ranks it as run_sweep would).
/// Throws InputError naming the folder's file for a folder that is no shard, for shards whose
/// plan digests or counts differ, for a row whose site or values are not its cell's, for a
/// combination given by two folders (naming both) or by none (naming the shard it belongs to),
/// and for a site whose record digest differs between two shards.
MergedSweep merge_shards(const std::vector<std::filesystem::path>& dirs);

}  // namespace gutterwatt
