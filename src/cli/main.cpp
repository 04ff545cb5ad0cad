// The gutterwatt command line: parses arguments, loads inputs, runs the library, writes outputs
// and sets the exit status (0 success, 1 simulation failure, 2 bad input, 130 interrupted).

#include <spdlog/sinks/stdout_sinks.h>
#include <spdlog/spdlog.h>

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
#include "../report_format.hpp"
#include "command_line.hpp"
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

// `--units` when given (the command line checked it), else `fallback`.
UnitSystem units_option(const std::string& text, UnitSystem fallback) {
  return parse_unit_system(text).value_or(fallback);
}

// An input error's text from its parts: what() ends at the first NUL byte a message quotes.
std::string describe(const InputError& e) { return one_line(e.text()); }

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
            detail::on_terminal(realization_metrics(r).energy_Wh) + " Wh,";
  }
  return text + " cascade " + detail::on_terminal(cascade_Wh) + " Wh (median of " +
         std::to_string(n) +
         " realizations): with uncalibrated defaults the answer is a guess "
         "within this span";
}

int run_command(const RunArgs& args) {
  Scenario sc = load_scenario_unless_stopped(args.scenario, overrides_of(args));
  sc.site.units = units_option(args.units, sc.site.units);
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
  std::optional<TraceWriter> trace;
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
    if (sc.simulation.trace) {
      trace.emplace(folder->open("trace.csv"), sc, !args.force);
      observers.add(*trace);
    } else {
      // An earlier run's trace would stand beside this run's files, and the report draw on it.
      folder->retire("trace.csv");
    }
    // An earlier report was drawn from the results this run replaces.
    folder->retire(kReportFile);
    observers.add(summary);
    result = simulate(sc, rain, observers, options);
    if (trace) trace->finish();
    return result;
  };
  RunOptions options;
  options.stop = &g_stop;
  RainSeries rain;
  RainSeries rain_as_read;  // several realizations only
  std::optional<RealizationSpread> spread;
  std::optional<RealizationSpread> resampled;  // the calibration record resampled (fragments)
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
    // Where the calibration record can be resampled, as many runs again on its resamples, in
    // the same pool of workers.
    realization_options.resample_calibration = resamples_calibration(sc.rain.disaggregate);
    const std::vector<RealizationMetrics> runs =
        run_realizations(sc, as_read, n, realization_options);
    const auto draws_end = runs.begin() + static_cast<std::ptrdiff_t>(n);
    spread = spread_of({runs.begin(), draws_end}, sc.rain.disaggregate->seed);
    if (realization_options.resample_calibration) {
      resampled = spread_of({draws_end, runs.end()}, sc.rain.disaggregate->seed);
    }
  }
  RunWarnings warnings;
  warnings.run = rain.warnings;
  if (spread && is_uncalibrated(*sc.rain.disaggregate)) {
    warnings.run.push_back(method_spread(sc, rain_as_read, spread->energy_Wh.p50, spread->n));
  }
  for (const std::string& w :
       coverage_warnings(month_coverage(rain, result.start, result.end, sc.site.zone))) {
    warnings.run.push_back(w);
  }
  for (const std::string& w : warnings.run) spdlog::warn("{}", w);
  // The design's warnings, as `check` gives them, go on the page (the terminal has them from
  // `check`).
  warnings.design = evaluate_design(sc, &rain, spread ? &rain_as_read : nullptr).warnings;
  const RealizationSpread* realizations = spread ? &*spread : nullptr;
  const RealizationSpread* with_calibration = resampled ? &*resampled : nullptr;
  write_summary_json(folder->open("summary.json"), sc, rain, result, summary, warnings,
                     realizations, with_calibration);
  folder->commit();
  if (!args.quiet) {
    print_summary_table(std::cout, sc, rain, result, summary, realizations, with_calibration);
    std::cout << "wrote " << (dir / "timeseries.csv").string() << ", "
              << (dir / "events.csv").string() << ", ";
    if (sc.simulation.trace) std::cout << (dir / "trace.csv").string() << ", ";
    std::cout << (dir / "summary.json").string() << '\n';
    print_retired_report(std::cout, *folder);
  }
  return kExitOk;
}

int check_command(const CheckArgs& args) {
  Scenario sc = load_scenario_unless_stopped(args.scenario, args.set);
  sc.site.units = units_option(args.units, sc.site.units);
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

  const CommandLine cl = parse_command_line(argc, argv);
  if (cl.command == Command::none) {
    std::cout << cl.out;
    if (!cl.error.empty()) spdlog::error("{}", cl.error);
    return cl.status;
  }

  try {
    switch (cl.command) {
      case Command::run:
        return run_command(cl.run);
      case Command::check:
        return check_command(cl.check);
      case Command::sweep:
        return sweep_command(cl.sweep, g_stop);
      case Command::merge:
        return merge_command(cl.merge);
      case Command::report: {
        const fs::path page = write_report(cl.report_dir, parse_unit_system(cl.report_units));
        std::cout << "wrote " << page.string() << '\n';
        return kExitOk;
      }
      case Command::storm:
        return storm_command(cl.storm);
      case Command::synth:
        return synth_command(cl.synth);
      case Command::fit:
        return fit_command(cl.fit);
      case Command::none:
        break;
    }
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
