#include "sweep_command.hpp"

#include <spdlog/spdlog.h>
#include <unistd.h>

#include <chrono>
#include <filesystem>
#include <iostream>

#include "../detail.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/rain_files.hpp"
#include "gutterwatt/sweep.hpp"

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

}  // namespace

int sweep_command(const SweepArgs& args, const std::atomic<bool>& stop) {
  if (args.out.empty()) {
    throw InputError("", 0, "--out", "give the folder for sweep.csv, skipped.csv and sweep.json");
  }
  SweepPlan plan =
      plan_sweep(read_scenario_text(args.scenario), args.scenario,
                 fs::path(args.scenario).parent_path(), args.vary, args.set, args.rank);
  if (stop.load()) throw Interrupted();  // a signal while the scenario was parsed
  if (const auto units = parse_unit_system(args.units)) plan.base.site.units = *units;
  const std::size_t n = realization_count(args.realizations, plan.base.rain);
  // The record is read once; realization k is its disaggregation with the seed seed + k.
  const RainSeries as_read = load_rain_as_read(plan.base.rain, {}, &stop);
  const std::optional<Disaggregation> calibrated =
      calibrated_disaggregation(plan.base.rain, as_read, &stop);
  std::vector<RainSeries> records;
  for (std::size_t k = 0; k < n; ++k) records.push_back(realization_record(as_read, calibrated, k));
  for (const std::string& w : records.front().warnings) spdlog::warn("{}", w);

  SweepOptions options;
  options.jobs = args.jobs;
  options.stop = &stop;
  SweepResult result;
  {
    ProgressBar bar;
    if (bar.enabled()) options.progress = [&bar](const SweepProgress& p) { bar.draw(p); };
    result = run_sweep_into(args.out, plan, records, options);
  }

  const fs::path dir(args.out);
  const std::size_t total = result.rows.size();
  const SweepRow* first_failure = nullptr;
  for (const SweepRow& row : result.rows) {
    if (row.status != SweepStatus::ok) {
      first_failure = &row;
      break;
    }
  }
  if (result.ranked.empty()) {
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
  if (!args.quiet) {
    print_sweep_table(std::cout, plan, result);
    std::cout << "wrote " << (dir / "sweep.csv").string() << ", " << (dir / "skipped.csv").string()
              << ", " << (dir / "sweep.json").string() << '\n';
  }
  return kExitOk;
}

}  // namespace gutterwatt
