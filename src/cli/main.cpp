// The gutterwatt command line: parses arguments, loads inputs, runs the library, writes outputs
// and sets the exit status (0 success, 1 simulation failure, 2 bad input, 130 interrupted).

#include <spdlog/sinks/stdout_sinks.h>
#include <spdlog/spdlog.h>

#include <CLI/CLI.hpp>
#include <atomic>
#include <csignal>
#include <filesystem>
#include <iostream>
#include <optional>
#include <string>
#include <vector>

#include "gutterwatt/calendar.hpp"
#include "gutterwatt/design.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/output.hpp"
#include "gutterwatt/rain_files.hpp"
#include "gutterwatt/report.hpp"
#include "gutterwatt/scenario.hpp"
#include "gutterwatt/simulation.hpp"
#include "gutterwatt/storm.hpp"
#include "gutterwatt/units.hpp"
#include "sweep_command.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt;

namespace {

std::atomic<bool> g_stop{false};

extern "C" void on_signal(int) { g_stop.store(true); }

constexpr int kExitOk = 0;
constexpr int kExitFailure = 1;
constexpr int kExitBadInput = 2;
constexpr int kExitInterrupted = 130;

struct RunArgs {
  std::string scenario;
  std::string out;
  std::vector<std::string> set;
  std::string rain;
  std::string from;
  std::string to;
  bool quiet = false;
};

// Applies --from/--to as overrides so they are checked like any scenario key.
std::vector<std::string> overrides_of(const RunArgs& a) {
  std::vector<std::string> o = a.set;
  if (!a.from.empty()) o.push_back("simulation.start=" + a.from);
  if (!a.to.empty()) o.push_back("simulation.end=" + a.to);
  return o;
}

int run_command(const RunArgs& args) {
  const Scenario sc = load_scenario(args.scenario, overrides_of(args));
  const RainSeries rain = load_rain(sc.rain, args.rain);
  for (const std::string& w : rain.warnings) spdlog::warn("{}", w);
  const fs::path dir =
      args.out.empty() ? fs::path("out") / fs::path(args.scenario).stem() : fs::path(args.out);
  OutputFolder folder(dir);
  TimeseriesWriter timeseries(folder.open("timeseries.csv"), sc);
  EventsWriter events(folder.open("events.csv"), sc);
  SummaryBuilder summary(sc);
  ObserverList observers;
  observers.add(timeseries);
  observers.add(events);
  observers.add(summary);
  RunOptions options;
  options.stop = &g_stop;
  const RunResult result = simulate(sc, rain, observers, options);
  write_summary_json(folder.open("summary.json"), sc, rain, result, summary);
  folder.commit();
  if (!args.quiet) {
    print_summary_table(std::cout, sc, rain, result, summary);
    std::cout << "wrote " << (dir / "timeseries.csv").string() << ", "
              << (dir / "events.csv").string() << ", " << (dir / "summary.json").string() << '\n';
  }
  return kExitOk;
}

struct CheckArgs {
  std::string scenario;
  std::vector<std::string> set;
  std::string rain;
  bool no_rain = false;
};

int check_command(const CheckArgs& args) {
  const Scenario sc = load_scenario(args.scenario, args.set);
  std::optional<RainSeries> rain;
  if (!args.no_rain) {
    rain = load_rain(sc.rain, args.rain);
    for (const std::string& w : rain->warnings) spdlog::warn("{}", w);
  }
  write_design(std::cout, sc, evaluate_design(sc, rain ? &*rain : nullptr));
  return kExitOk;
}

struct StormArgs {
  std::string kind;
  double depth_mm = 0.0;
  std::string duration;
  std::string step;
  std::string start = "2000-01-01T00:00";
  std::vector<double> idf;
  double peak = 0.5;
  std::string out;
};

double duration_option(const std::string& text, const std::string& option) {
  const auto d = parse_duration_s(text);
  if (!d) {
    throw InputError(
        "", 0, option,
        "expected a duration with its unit such as 30min or 24h (got \"" + text + "\")");
  }
  return *d;
}

int storm_command(const StormArgs& a) {
  StormSpec spec;
  spec.kind = parse_storm_kind(a.kind);
  spec.depth_m = a.depth_mm * kMetresPerMm;
  spec.duration_s = duration_option(a.duration, "--duration");
  spec.step_s = duration_option(a.step, "--step");
  const auto start = parse_iso8601(a.start);
  if (!start)
    throw InputError("", 0, "--start", "expected an ISO 8601 time (got \"" + a.start + "\")");
  spec.start = start->instant;
  if (!a.idf.empty()) {
    if (a.idf.size() != 3) throw InputError("", 0, "--idf", "expected three numbers a,b,c");
    spec.idf = IdfCurve{a.idf[0], a.idf[1], a.idf[2]};
  }
  spec.peak_position = a.peak;
  if (a.out.empty() || a.out == "-") {
    write_storm_csv(std::cout, spec, start->offset_s);
    return kExitOk;
  }
  const fs::path file(a.out);
  OutputFolder folder(file.parent_path().empty() ? fs::path(".") : file.parent_path());
  write_storm_csv(folder.open(file.filename().string()), spec, start->offset_s);
  folder.commit();
  return kExitOk;
}

}  // namespace

int main(int argc, char** argv) {
  auto logger = spdlog::stderr_logger_st("gutterwatt");
  logger->set_pattern("gutterwatt: %l: %v");
  spdlog::set_default_logger(logger);
  std::signal(SIGINT, on_signal);
  std::signal(SIGTERM, on_signal);

  CLI::App app{
      "gutterwatt: energy from rain on a roof, through a reservoir, a release, a drop "
      "pipe and an impulse turbine into a battery"};
  app.require_subcommand(1);
  app.set_version_flag("--version", "gutterwatt 0.1.0");

  RunArgs run;
  auto* run_cmd = app.add_subcommand(
      "run", "simulate a scenario; write timeseries.csv, events.csv, summary.json");
  run_cmd->add_option("scenario", run.scenario, "scenario file (YAML)")->required();
  run_cmd->add_option("--out", run.out, "output folder (default out/<scenario name>)");
  run_cmd->add_option("--set", run.set, "override a scenario key: key.path=value (repeatable)");
  run_cmd->add_option("--rain", run.rain, "rain file to use instead of the scenario's");
  run_cmd->add_option("--from", run.from, "start of the simulated period (ISO 8601)");
  run_cmd->add_option("--to", run.to, "end of the simulated period (ISO 8601)");
  run_cmd->add_flag("--quiet", run.quiet, "print nothing on success");

  CheckArgs check;
  auto* check_cmd = app.add_subcommand("check", "validate a scenario and print its design figures");
  check_cmd->add_option("scenario", check.scenario, "scenario file (YAML)")->required();
  check_cmd->add_option("--set", check.set, "override a scenario key: key.path=value (repeatable)");
  check_cmd->add_option("--rain", check.rain, "rain file to use instead of the scenario's");
  check_cmd->add_flag("--no-rain", check.no_rain, "do not read the rain record");

  SweepArgs sweep;
  auto* sweep_cmd =
      app.add_subcommand("sweep", "run every combination of varied keys; write DIR/sweep.csv");
  sweep_cmd->add_option("scenario", sweep.scenario, "scenario file (YAML)")->required();
  sweep_cmd->add_option("--vary", sweep.vary, "KEY=FROM:TO:STEP or KEY=v1,v2,... (repeatable)")
      ->required();
  sweep_cmd->add_option("--set", sweep.set, "override a scenario key in every run (repeatable)");
  sweep_cmd->add_option("--jobs", sweep.jobs, "worker threads (default: one per core)");
  sweep_cmd->add_option("--rank", sweep.rank,
                        "metric to rank by (default energy_Wh); force the order with "
                        "--rank=-KEY (lowest first) or --rank=+KEY");
  sweep_cmd->add_option("--out", sweep.out, "output folder")->required();
  sweep_cmd->add_flag("--quiet", sweep.quiet, "print nothing on success");

  std::string report_dir;
  auto* report_cmd =
      app.add_subcommand("report", "write DIR/report.html from a run or sweep folder");
  report_cmd->add_option("dir", report_dir, "output folder of a run or sweep")->required();

  StormArgs storm;
  auto* storm_cmd = app.add_subcommand("storm", "write a design-storm hyetograph as a rain CSV");
  storm_cmd
      ->add_option("--kind", storm.kind,
                   "nrcs-I, nrcs-IA, nrcs-II, nrcs-III, chicago, idf-block, block")
      ->required();
  storm_cmd->add_option("--depth", storm.depth_mm, "total depth, mm (optional with an IDF curve)");
  storm_cmd->add_option("--duration", storm.duration, "storm duration, e.g. 24h, 90min")
      ->required();
  storm_cmd->add_option("--step", storm.step, "time step, e.g. 5min")->required();
  storm_cmd->add_option("--start", storm.start, "start time (ISO 8601), default 2000-01-01T00:00");
  storm_cmd->add_option("--idf", storm.idf, "IDF curve i = a/(t+b)^c as a,b,c (mm/h, minutes)")
      ->delimiter(',');
  storm_cmd->add_option("--peak", storm.peak,
                        "peak position 0..1 (chicago, idf-block), default 0.5");
  storm_cmd->add_option("--out", storm.out, "file to write (default: standard output)");

  try {
    app.parse(argc, argv);
  } catch (const CLI::CallForHelp& e) {
    return app.exit(e);
  } catch (const CLI::CallForAllHelp& e) {
    return app.exit(e);
  } catch (const CLI::CallForVersion& e) {
    return app.exit(e);
  } catch (const CLI::ParseError& e) {
    spdlog::error("{} (see gutterwatt --help)", e.what());
    return kExitBadInput;
  }

  try {
    if (*run_cmd) return run_command(run);
    if (*check_cmd) return check_command(check);
    if (*sweep_cmd) return sweep_command(sweep, g_stop);
    if (*report_cmd) {
      std::cout << "wrote " << write_report(report_dir).string() << '\n';
      return kExitOk;
    }
    if (*storm_cmd) return storm_command(storm);
  } catch (const InputError& e) {
    spdlog::error("{}", e.what());
    return kExitBadInput;
  } catch (const Interrupted&) {
    spdlog::error("interrupted; earlier results in the output folder are untouched");
    return kExitInterrupted;
  } catch (const SimulationError& e) {
    spdlog::error("{}", e.what());
    return kExitFailure;
  } catch (const std::exception& e) {
    spdlog::error("{}", e.what());
    return kExitFailure;
  }
  return kExitOk;
}
