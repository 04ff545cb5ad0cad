#include "fit_command.hpp"

#include <spdlog/spdlog.h>

#include <filesystem>
#include <fstream>
#include <iostream>

#include "../detail.hpp"
#include "gutterwatt/bench_fit.hpp"
#include "gutterwatt/cycle_fit.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/fit_logs.hpp"
#include "gutterwatt/rain_files.hpp"
#include "gutterwatt/scenario.hpp"
#include "gutterwatt/scenario_edit.hpp"
#include "output_file.hpp"

namespace gutterwatt {
namespace {

namespace fs = std::filesystem;

/// The folder a file named on the command line is in ("." for a bare name).
fs::path folder_of(const std::string& file) {
  const fs::path parent = fs::path(file).parent_path();
  return parent.empty() ? fs::path(".") : parent;
}

std::ifstream open_log(const std::string& file, const std::string& option) {
  std::error_code ec;
  if (!fs::exists(file, ec)) throw InputError(file, 0, option, "no such file");
  if (fs::is_directory(file, ec)) throw InputError(file, 0, option, "is a folder, not a log");
  std::ifstream in(file, std::ios::binary);
  if (!in) throw InputError(file, 0, option, "cannot be read");
  return in;
}

}  // namespace

int fit_command(const FitArgs& args) {
  if (args.bench.empty() == args.cycles.empty()) {
    throw InputError("", 0, args.bench.empty() ? "--bench" : "--cycles",
                     args.bench.empty()
                         ? "give the bench log (--bench) or the field log of cycles (--cycles)"
                         : "give one log: --bench or --cycles, not both");
  }
  const std::string text = read_scenario_text(args.scenario);
  const Scenario scenario = parse_scenario(text, args.scenario, folder_of(args.scenario));
  std::string fitted;
  if (!args.bench.empty()) {
    std::ifstream in = open_log(args.bench, "--bench");
    const BenchFit fit = fit_bench(scenario, read_bench_log(in, args.bench), args.bench);
    write_bench_fit(std::cout, fit);
    fitted = fitted_scenario_text(text, fit, args.bench, args.scenario);
  } else {
    std::ifstream in = open_log(args.cycles, "--cycles");
    const CycleLog log = read_cycle_log(in, args.cycles, scenario.rain.series);
    const RainSeries rain = load_rain(scenario.rain);
    for (const std::string& w : rain.warnings) spdlog::warn("{}", w);
    const CycleFit fit = fit_cycles(scenario, rain, log, args.cycles);
    write_cycle_fit(std::cout, fit, scenario.site.zone);
    fitted = fitted_scenario_text(text, {fit.priming_flow, fit.minor_loss_k}, "cycle log",
                                  args.cycles, args.scenario);
  }
  if (args.out.empty()) return detail::kExitOk;
  fitted =
      relocate_scenario_text(fitted, folder_of(args.scenario), folder_of(args.out), args.scenario);
  // The written scenario must load as it stands (a fitted priming flow at or above the running
  // flow, say, is reported against the new file instead of being written).
  parse_scenario(fitted, args.out, folder_of(args.out));
  write_csv_to(args.out, [&](std::ostream& out) { out << fitted; });
  std::cout << "wrote " << args.out << '\n';
  return detail::kExitOk;
}

}  // namespace gutterwatt
