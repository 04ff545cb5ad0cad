#include "sweep_command.hpp"

#include <spdlog/spdlog.h>
#include <unistd.h>

#include <chrono>
#include <cstdlib>
#include <filesystem>
#include <iostream>
#include <optional>

#include "../detail.hpp"
#include "../report_files.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/rain_files.hpp"
#include "gutterwatt/realizations.hpp"
#include "gutterwatt/sweep.hpp"
#include "gutterwatt/sweep_shard.hpp"
#include "output_file.hpp"

namespace gutterwatt {
namespace {

using detail::kExitBadInput;
using detail::kExitFailure;
using detail::kExitOk;

namespace fs = std::filesystem;

// Redraws of the progress bar at most this often.
constexpr double kRedrawInterval_s = 0.2;

/// The progress bar on a terminal's stderr; ends its line when the sweep ends in any way.
class ProgressBar {
 public:
  ProgressBar() : enabled_(::isatty(STDERR_FILENO) == 1) {}
  ~ProgressBar() {
    if (drawn_) std::cerr << '\n' << std::flush;
  }
  ProgressBar(const ProgressBar&) = delete;
  ProgressBar& operator=(const ProgressBar&) = delete;

  bool enabled() const { return enabled_; }

  void draw(const SweepProgress& p) {
    const auto now = std::chrono::steady_clock::now();
    if (drawn_ && p.done < p.total &&
        std::chrono::duration<double>(now - last_).count() < kRedrawInterval_s) {
      return;
    }
    last_ = now;
    drawn_ = true;
    std::cerr << "\rsweep " << progress_line(p) << "\033[K" << std::flush;
  }

 private:
  bool enabled_;
  bool drawn_ = false;
  std::chrono::steady_clock::time_point last_;
};

/// What a person should hear about a finished sweep (run whole or merged from shards): skipped
/// and failed combinations and the warnings on stderr, the best rows on stdout. The exit status.
int report_outcome(const SweepPlan& plan, const SweepResult& result, const OutputFolder& folder,
                   bool written, bool quiet) {
  const fs::path& dir = folder.dir();
  const std::size_t total = result.rows.size();
  const SweepRow* first_failure = nullptr;
  for (const SweepRow& row : result.rows) {
    if (row.status != SweepStatus::ok) {
      first_failure = &row;
      break;
    }
  }
  if (!written) {
    spdlog::error(
        "no combination ran ({} skipped as invalid, {} failed); nothing written, "
        "earlier results in {} kept; first reason: {}",
        result.skipped, result.failed, dir.string(),
        first_failure != nullptr ? first_failure->reason : "none");
    return result.skipped > 0 ? kExitBadInput : kExitFailure;
  }
  if (first_failure != nullptr) {
    spdlog::warn("{} of {} combinations skipped as invalid, {} failed; reasons in {}",
                 result.skipped, total, result.failed, (dir / "skipped.csv").string());
    spdlog::warn("first reason: {}", first_failure->reason);
  }
  for (const std::string& w : sweep_warnings(plan, result)) spdlog::warn("{}", w);
  if (!quiet) {
    print_sweep_table(std::cout, plan, result);
    std::cout << "wrote " << (dir / "sweep.csv").string() << ", " << (dir / "skipped.csv").string()
              << ", " << (dir / "sweep.json").string() << '\n';
    print_retired_report(std::cout, folder);
  }
  return kExitOk;
}

/// The realizations every site runs on: the same number for each (their spreads are compared).
std::size_t site_realizations(const SweepPlan& plan, unsigned asked) {
  const std::size_t n = realization_count(asked, plan.site_scenario(0).rain);
  for (std::size_t s = 1; s < plan.site_count(); ++s) {
    const std::size_t here = realization_count(asked, plan.site_scenario(s).rain);
    if (here != n) {
      throw InputError(plan.sites_file, plan.sites[s].line, "",
                       "site " + plan.sites[s].name + "'s record takes " + std::to_string(here) +
                           " realizations, site " + plan.sites[0].name + "'s " + std::to_string(n) +
                           "; give every site a record of the same kind, or --realizations");
    }
  }
  return n;
}

}  // namespace

int sweep_command(const SweepArgs& args, const std::atomic<bool>& stop) {
  if (args.out.empty()) {
    throw InputError("", 0, "--out", "give the folder for sweep.csv, skipped.csv and sweep.json");
  }
  std::optional<SweepSites> sites;
  if (!args.sites.empty()) sites = read_sweep_sites(detail::read_text(args.sites), args.sites);
  std::optional<SweepShard> shard;
  if (!args.shard.empty())
    shard = parse_shard(args.shard, [](const char* name) { return std::getenv(name); });
  SweepPlan plan = plan_sweep(read_scenario_text(args.scenario), args.scenario,
                              fs::path(args.scenario).parent_path(), args.vary, args.set, args.rank,
                              sites ? &*sites : nullptr);
  if (stop.load()) throw Interrupted();  // a signal while the scenario was parsed
  if (const auto units = parse_unit_system(args.units)) plan.base.site.units = *units;
  const std::size_t n = site_realizations(plan, args.realizations);
  const auto [first, end] = shard ? shard_cells(plan.cell_count(), *shard)
                                  : std::make_pair(std::size_t{0}, plan.cell_count());

  ShardRun run;
  run.realizations = n;
  if (shard) run.shard = *shard;
  // Each site's record is read once; realization k is its disaggregation with the seed seed + k.
  const SiteRecords records = [&](std::size_t site) {
    const RainConfig& rain = plan.site_scenario(site).rain;
    const RainSeries as_read = load_rain_as_read(rain, {}, &stop);
    const std::optional<Disaggregation> calibrated =
        calibrated_disaggregation(rain, as_read, &stop);
    std::vector<RainSeries> out;
    for (std::size_t k = 0; k < n; ++k) out.push_back(realization_record(as_read, calibrated, k));
    const std::string where = plan.sites.empty() ? "" : "site " + plan.sites[site].name + ": ";
    for (const std::string& w : out.front().warnings) spdlog::warn("{}{}", where, w);
    run.record_digests.emplace_back(site, record_digest(out));
    return out;
  };

  SweepOptions options;
  options.jobs = args.jobs;
  options.stop = &stop;
  OutputFolder folder(args.out);
  SweepResult result;
  {
    ProgressBar bar;
    if (bar.enabled()) options.progress = [&bar](const SweepProgress& p) { bar.draw(p); };
    result = run_sweep_sites(plan, records, options, first, end);
  }
  const fs::path dir(args.out);
  if (shard) {
    write_shard(folder, plan, run, result);
    if (!args.quiet) {
      std::cout << "shard " << shard->index << " of " << shard->count << ": combinations "
                << first + 1 << " to " << end << " of " << plan.cell_count() << ", "
                << result.ranked.size() << " ran, " << result.skipped << " skipped, "
                << result.failed << " failed\nwrote " << (dir / "shard.json").string() << ", "
                << (dir / "shard.csv").string() << '\n';
    }
    return kExitOk;
  }
  const bool written = write_sweep_files(folder, plan, result);
  return report_outcome(plan, result, folder, written, args.quiet);
}

int merge_command(const MergeArgs& args) {
  std::vector<fs::path> dirs(args.shards.begin(), args.shards.end());
  OutputFolder folder(args.out, "");
  const MergedSweep merged = merge_shards(dirs);
  const bool written = write_sweep_files(folder, merged.plan, merged.result);
  return report_outcome(merged.plan, merged.result, folder, written, args.quiet);
}

}  // namespace gutterwatt
