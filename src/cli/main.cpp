// The gutterwatt command line: parses arguments, loads inputs, runs the library, writes outputs
// and sets the exit status (0 success, 1 simulation failure, 2 bad input, 130 interrupted).

#include <spdlog/sinks/stdout_sinks.h>
#include <spdlog/spdlog.h>

#include <CLI/CLI.hpp>
#include <atomic>
#include <cmath>
#include <csignal>
#include <filesystem>
#include <fstream>
#include <functional>
#include <iostream>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "../detail.hpp"
#include "fit_command.hpp"
#include "gutterwatt/calendar.hpp"
#include "gutterwatt/design.hpp"
#include "gutterwatt/disaggregation.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/output.hpp"
#include "gutterwatt/output_folder.hpp"
#include "gutterwatt/rain_files.hpp"
#include "gutterwatt/realizations.hpp"
#include "gutterwatt/report.hpp"
#include "gutterwatt/scenario.hpp"
#include "gutterwatt/simulation.hpp"
#include "gutterwatt/storm.hpp"
#include "gutterwatt/synth.hpp"
#include "gutterwatt/units.hpp"
#include "output_file.hpp"
#include "sweep_command.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt;

namespace {

using detail::kExitBadInput;
using detail::kExitFailure;
using detail::kExitInterrupted;
using detail::kExitOk;

std::atomic<bool> g_stop{false};

// The first SIGINT or SIGTERM asks the run to stop at its next step; a second one ends the
// program at once, for a command that does not look at the flag.
extern "C" void on_signal(int sig) {
  if (g_stop.exchange(true)) {
    std::signal(sig, SIG_DFL);
    std::raise(sig);
  }
}

// A scenario is parsed in one piece (at most about a second at kMaxScenarioBytes): a signal
// that came meanwhile stops the command as soon as it is loaded.
Scenario load_scenario_unless_stopped(const std::string& file,
                                      const std::vector<std::string>& overrides) {
  Scenario sc = load_scenario(file, overrides);
  if (g_stop.load()) throw Interrupted();
  return sc;
}

// Error text as one printable line: a message may quote a line of a binary file or a
// multi-line YAML value, so control characters and bytes that are not UTF-8 become \xNN.
std::string one_line(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (std::size_t i = 0; i < text.size();) {
    const auto c = static_cast<unsigned char>(text[i]);
    const std::size_t n = c < 0x80 ? (c >= 0x20 && c != 0x7F) : detail::utf8_length(text, i);
    if (n > 0) {
      out.append(text.substr(i, n));
      i += n;
      continue;
    }
    static constexpr char kHex[] = "0123456789ABCDEF";
    out += "\\x";
    out += kHex[c >> 4];
    out += kHex[c & 0xF];
    ++i;
  }
  return out;
}

// An input error's text from its parts: what() ends at the first NUL byte a message quotes.
std::string describe(const InputError& e) { return one_line(e.text()); }

// A parse error in words: CLI11 reports an unknown command as a missing one.
std::string describe(const CLI::ParseError& e, CLI::App& app, int argc, char** argv) {
  const std::vector<CLI::App*> parsed = app.get_subcommands();
  if (!parsed.empty()) {
    return one_line(std::string(e.what()) + " (see gutterwatt " + parsed.front()->get_name() +
                    " --help)");
  }
  std::string names;
  const std::vector<CLI::App*> commands = app.get_subcommands([](CLI::App*) { return true; });
  for (std::size_t i = 0; i < commands.size(); ++i) {
    if (i > 0) names += i + 1 == commands.size() ? " or " : ", ";
    names += commands[i]->get_name();
  }
  if (argc < 2) return "no command given; expected " + names + " (see gutterwatt --help)";
  const std::string first = argv[1];
  if (first.starts_with("-")) {
    return one_line("unknown option " + first + "; expected a command first: " + names +
                    " (see gutterwatt --help)");
  }
  return one_line("unknown command \"" + first + "\"; expected " + names +
                  " (see gutterwatt --help)");
}

struct RunArgs {
  std::string scenario;
  std::string out;
  std::vector<std::string> set;
  std::string rain;
  std::string from;
  std::string to;
  bool quiet = false;
  bool force = false;
  unsigned realizations = 0;  ///< 0: the default for the record
};

// Applies --from/--to as overrides so they are checked like any scenario key.
std::vector<std::string> overrides_of(const RunArgs& a) {
  std::vector<std::string> o = a.set;
  if (!a.from.empty()) o.push_back("simulation.start=" + a.from);
  if (!a.to.empty()) o.push_back("simulation.end=" + a.to);
  return o;
}

// How far apart the methods put this design's energy, for an uncalibrated cascade: block (and
// nrcs-II for a day spread over the whole day) run once on the record as read, beside the
// cascade's median.
std::string method_spread(const Scenario& sc, const RainSeries& as_read, double cascade_Wh,
                          std::size_t n) {
  std::string text = "for this design the methods give";
  std::vector<DisaggregationMethod> methods{DisaggregationMethod::block};
  const Disaggregation& given = *sc.rain.disaggregate;
  if (sc.rain.format == RainFormat::daily && given.window.start_s == 0 &&
      given.window.duration_s == detail::kDay_s) {
    methods.push_back(DisaggregationMethod::nrcs_ii);
  }
  for (const DisaggregationMethod m : methods) {
    Disaggregation how = given;
    how.method = m;
    Observer none;
    RunOptions options;
    options.stop = &g_stop;
    const RunResult r = simulate(sc, disaggregate(as_read, how), none, options);
    text += " " + std::string(method_name(m)) + " " +
            detail::fixed(realization_metrics(r).energy_Wh, 2) + " Wh,";
  }
  return text + " cascade " + detail::fixed(cascade_Wh, 2) + " Wh (median of " + std::to_string(n) +
         " realizations): with uncalibrated defaults the answer is a guess "
         "within this span";
}

int run_command(const RunArgs& args) {
  Scenario sc = load_scenario_unless_stopped(args.scenario, overrides_of(args));
  const std::size_t n = realization_count(args.realizations, sc.rain);
  // A period given in full is estimated before anything runs; an open one is watched as it runs.
  const bool period_known = sc.simulation.start && sc.simulation.end;
  if (!args.force && period_known) check_output_size(sc, *sc.simulation.start, *sc.simulation.end);
  const fs::path dir =
      args.out.empty() ? fs::path("out") / fs::path(args.scenario).stem() : fs::path(args.out);
  // The output folder is made once the record has opened.
  std::optional<OutputFolder> folder;
  std::optional<TimeseriesWriter> timeseries;
  std::optional<EventsWriter> events;
  SummaryBuilder summary(sc);
  RunResult result;
  // The run whose records are written: the only one, or the first realization.
  const auto run_written = [&](auto& rain, const RunOptions& options) {
    folder.emplace(dir);
    timeseries.emplace(folder->open("timeseries.csv"), sc, !args.force && !period_known);
    events.emplace(folder->open("events.csv"), sc);
    ObserverList observers;
    observers.add(*timeseries);
    observers.add(*events);
    observers.add(summary);
    result = simulate(sc, rain, observers, options);
    return result;
  };
  RunOptions options;
  options.stop = &g_stop;
  RainSeries rain;
  RainSeries rain_as_read;  // several realizations only
  std::optional<RealizationSpread> spread;
  if (n == 1) {
    // A long record is simulated while it is read.
    rain = load_rain_while(
        sc.rain, args.rain, [&](RainView& view) { run_written(view, options); }, &g_stop);
  } else {
    rain_as_read = load_rain_as_read(sc.rain, args.rain, &g_stop);
    const RainSeries& as_read = rain_as_read;
    sc.rain.disaggregate = calibrated_disaggregation(sc.rain, as_read, &g_stop);
    RealizationOptions realization_options;
    realization_options.stop = &g_stop;
    realization_options.run = [&](std::size_t k, const RainSeries& record, const RunOptions& o) {
      if (k > 0) {
        Observer none;
        return simulate(sc, record, none, o);
      }
      rain = record;
      return run_written(record, o);
    };
    spread = spread_of(run_realizations(sc, as_read, n, realization_options),
                       sc.rain.disaggregate->seed);
  }
  for (const std::string& w : rain.warnings) spdlog::warn("{}", w);
  if (spread && sc.rain.disaggregate->levels.empty() && !sc.rain.disaggregate->idf) {
    spdlog::warn("{}", method_spread(sc, rain_as_read, spread->energy_Wh.p50, spread->n));
  }
  for (const std::string& w :
       coverage_warnings(month_coverage(rain, result.start, result.end, sc.site.zone))) {
    spdlog::warn("{}", w);
  }
  const RealizationSpread* realizations = spread ? &*spread : nullptr;
  write_summary_json(folder->open("summary.json"), sc, rain, result, summary, realizations);
  folder->commit();
  if (!args.quiet) {
    print_summary_table(std::cout, sc, rain, result, summary, realizations);
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
  Scenario sc = load_scenario_unless_stopped(args.scenario, args.set);
  std::optional<RainSeries> as_read;
  std::optional<RainSeries> rain;
  if (!args.no_rain) {
    as_read = load_rain_as_read(sc.rain, args.rain, &g_stop);
    sc.rain.disaggregate = calibrated_disaggregation(sc.rain, *as_read, &g_stop);
    rain = sc.rain.disaggregate ? disaggregate(*as_read, *sc.rain.disaggregate) : *as_read;
    for (const std::string& w : rain->warnings) spdlog::warn("{}", w);
  }
  // The record as read is shown beside its disaggregation when the steps differ.
  const bool spread = rain && rain->step_s < as_read->step_s;
  write_design(std::cout, sc,
               evaluate_design(sc, rain ? &*rain : nullptr, spread ? &*as_read : nullptr));
  return kExitOk;
}

struct StormArgs {
  std::string kind;
  std::string depth;
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
  if (*d != std::floor(*d)) {
    throw InputError("", 0, option, std::string(kWholeSecondsRule) + " (got " + text + ")");
  }
  return *d;
}

/// `--depth`: a depth with its unit, 50mm or 2in (a bare number is millimetres); 0 when absent.
double depth_option_m(const std::string& text) {
  if (text.empty()) return 0.0;
  std::string_view number = text;
  double metres_per_unit = kMetresPerMm;
  if (number.ends_with("mm")) {
    number.remove_suffix(2);
  } else if (number.ends_with("in")) {
    number.remove_suffix(2);
    metres_per_unit = kMetresPerInch;
  }
  const auto depth = detail::to_number(number);
  if (!depth || *depth < 0.0) {
    throw InputError("", 0, "--depth",
                     "expected a depth with its unit such as 50mm or 2in (got \"" + text + "\")");
  }
  return *depth * metres_per_unit;
}

int storm_command(const StormArgs& a) {
  StormSpec spec;
  spec.kind = parse_storm_kind(a.kind);
  spec.depth_m = depth_option_m(a.depth);
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
  write_csv_to(a.out, [&](std::ostream& out) { write_storm_csv(out, spec, start->offset_s); });
  return kExitOk;
}

struct SynthArgs {
  std::string params;
  std::string start;
  std::string end;
  std::string step = "1h";
  std::uint64_t seed = 1;
  std::string utc_offset = "+00:00";
  std::string out;
};

int synth_command(const SynthArgs& a) {
  std::ifstream in(a.params, std::ios::binary);
  if (!in) throw InputError(a.params, 0, "--params", "cannot be read");
  const PrpParameters params = read_prp_parameters(in, a.params);
  SynthSpec spec;
  const auto offset = parse_utc_offset(a.utc_offset);
  if (!offset) {
    throw InputError("", 0, "--utc-offset",
                     "expected an offset such as +02:00 (got \"" + a.utc_offset + "\")");
  }
  spec.utc_offset_s = *offset;
  const auto start = parse_iso8601(a.start, spec.utc_offset_s);
  if (!start)
    throw InputError("", 0, "--start", "expected an ISO 8601 time (got \"" + a.start + "\")");
  const auto end = parse_iso8601(a.end, spec.utc_offset_s);
  if (!end) throw InputError("", 0, "--end", "expected an ISO 8601 time (got \"" + a.end + "\")");
  spec.start = start->instant;
  spec.end = end->instant;
  spec.step_s = static_cast<Instant>(std::llround(duration_option(a.step, "--step")));
  spec.seed = a.seed;
  write_csv_to(a.out, [&](std::ostream& out) { write_synth_csv(out, params, spec); });
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
  run_cmd->add_flag("--force", run.force, "write the output even past the size limit (1 GB)");
  run_cmd
      ->add_option("--realizations", run.realizations,
                   "disaggregations of a coarse record to run, seeds seed to seed + N - 1 "
                   "(default 20 for method: cascade, else 1)")
      ->check(CLI::Range(1, 10000));

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
                        "--rank=-KEY (highest first) or --rank=+KEY (lowest first)");
  sweep_cmd->add_option("--out", sweep.out, "output folder")->required();
  sweep_cmd->add_flag("--quiet", sweep.quiet, "print nothing on success");
  sweep_cmd
      ->add_option("--realizations", sweep.realizations,
                   "disaggregations of a coarse record each combination runs on; rank by the "
                   "median (default 20 for method: cascade, else 1)")
      ->check(CLI::Range(1, 10000));

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
  storm_cmd->add_option("--depth", storm.depth,
                        "total depth with its unit, 50mm or 2in (optional with an IDF curve)");
  storm_cmd->add_option("--duration", storm.duration, "storm duration, e.g. 24h, 90min")
      ->required();
  storm_cmd->add_option("--step", storm.step, "time step, e.g. 5min")->required();
  storm_cmd->add_option("--start", storm.start, "start time (ISO 8601), default 2000-01-01T00:00");
  storm_cmd->add_option("--idf", storm.idf, "IDF curve i = a/(t+b)^c as a,b,c (mm/h, minutes)")
      ->delimiter(',');
  storm_cmd->add_option("--peak", storm.peak,
                        "peak position 0..1 (chicago, idf-block), default 0.5");
  storm_cmd->add_option("--out", storm.out, "file to write (default: standard output)");

  SynthArgs synth;
  auto* synth_cmd = app.add_subcommand(
      "synth",
      "write a long synthetic rain record (Poisson rectangular pulses, monthly parameters)");
  synth_cmd->add_option("--params", synth.params, "monthly parameter CSV (see README)")->required();
  synth_cmd->add_option("--start", synth.start, "first instant (ISO 8601)")->required();
  synth_cmd->add_option("--end", synth.end, "end instant (ISO 8601)")->required();
  synth_cmd->add_option("--step", synth.step, "record step, e.g. 5min (default 1h)");
  synth_cmd->add_option("--seed", synth.seed, "random seed (default 1)");
  synth_cmd->add_option("--utc-offset", synth.utc_offset, "local time of months and stamps");
  synth_cmd->add_option("--out", synth.out, "file to write (default: standard output)");

  FitArgs fit;
  auto* fit_cmd = app.add_subcommand(
      "fit", "fit the priming flow, running loss and nozzle coefficient to a bench log");
  fit_cmd->add_option("scenario", fit.scenario, "scenario file (YAML)")->required();
  fit_cmd->add_option("--bench", fit.bench, "bench log (CSV; see README, \"The bench test\")");
  fit_cmd->add_option("--out", fit.out, "write the fitted scenario to this file");

  try {
    app.parse(argc, argv);
  } catch (const CLI::CallForHelp& e) {
    return app.exit(e);
  } catch (const CLI::CallForAllHelp& e) {
    return app.exit(e);
  } catch (const CLI::CallForVersion& e) {
    return app.exit(e);
  } catch (const CLI::ParseError& e) {
    spdlog::error("{}", describe(e, app, argc, argv));
    return kExitBadInput;
  }

  try {
    if (*run_cmd) return run_command(run);
    if (*check_cmd) return check_command(check);
    if (*sweep_cmd) return sweep_command(sweep, g_stop);
    if (*report_cmd) {
      const fs::path page = write_report(report_dir);
      std::cout << "wrote " << page.string() << '\n';
      return kExitOk;
    }
    if (*storm_cmd) return storm_command(storm);
    if (*synth_cmd) return synth_command(synth);
    if (*fit_cmd) return fit_command(fit);
  } catch (const InputError& e) {
    spdlog::error("{}", describe(e));
    return kExitBadInput;
  } catch (const Interrupted&) {
    spdlog::error("interrupted; earlier results in the output folder are untouched");
    return kExitInterrupted;
  } catch (const SimulationError& e) {
    spdlog::error("{}", one_line(e.what()));
    return kExitFailure;
  } catch (const std::exception& e) {
    spdlog::error("{}", one_line(e.what()));
    return kExitFailure;
  }
  return kExitOk;
}
