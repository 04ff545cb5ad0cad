#include "command_line.hpp"

#include <CLI/CLI.hpp>
#include <sstream>

#include "../detail.hpp"

namespace gutterwatt {
namespace {

// A parse error in words: CLI11 reports an unknown command as a missing one.
std::string describe(const CLI::ParseError& e, CLI::App& app, int argc, const char* const* argv) {
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

// `--units`, the same on every command that shows quantities.
void add_units_option(CLI::App* command, std::string& units, const std::string& fallback) {
  command
      ->add_option("--units", units,
                   "units of the tables, the CSV columns and the page: us or si (default: " +
                       fallback + "; summary.json is SI whatever this says)")
      ->check(CLI::IsMember({"us", "si"}));
}

}  // namespace

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

CommandLine parse_command_line(int argc, const char* const* argv) {
  CommandLine cl;
  CLI::App app{
      "gutterwatt: energy from rain on a roof, through a reservoir, a release, a drop "
      "pipe and an impulse turbine into a battery"};
  app.require_subcommand(1);
  app.set_version_flag("--version", "gutterwatt 0.1.0");

  RunArgs& run = cl.run;
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
                   "(default 20 for method: cascade or fragments, else 1)")
      ->check(CLI::Range(1, 10000));
  add_units_option(run_cmd, run.units, "the scenario's site.units, else si");

  CheckArgs& check = cl.check;
  auto* check_cmd = app.add_subcommand("check", "validate a scenario and print its design figures");
  check_cmd->add_option("scenario", check.scenario, "scenario file (YAML)")->required();
  check_cmd->add_option("--set", check.set, "override a scenario key: key.path=value (repeatable)");
  check_cmd->add_option("--rain", check.rain, "rain file to use instead of the scenario's");
  check_cmd->add_flag("--no-rain", check.no_rain, "do not read the rain record");
  add_units_option(check_cmd, check.units, "the scenario's site.units, else si");

  SweepArgs& sweep = cl.sweep;
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
                   "median (default 20 for method: cascade or fragments, else 1)")
      ->check(CLI::Range(1, 10000));
  add_units_option(sweep_cmd, sweep.units, "the scenario's site.units, else si");
  sweep_cmd->add_option("--sites", sweep.sites,
                        "sites file (CSV: site, then scenario keys such as rain.file); every "
                        "combination runs at every site");
  sweep_cmd->add_option("--shard", sweep.shard,
                        "run shard K of N only (K/N, from 1), or auto/N with K from the array "
                        "job's index (SLURM_ARRAY_TASK_ID, PBS_ARRAY_INDEX, SGE_TASK_ID, "
                        "LSB_JOBINDEX); writes DIR/shard.json and DIR/shard.csv for merge");

  MergeArgs& merge = cl.merge;
  auto* merge_cmd = app.add_subcommand(
      "merge", "put the shards of a sweep together; write OUT/sweep.csv as one sweep would");
  // An empty argument names no folder: refused here, with the argument's name, rather than by
  // the file system later.
  const CLI::Validator folder_name(
      [](std::string& s) {
        return s.empty() ? std::string("an empty folder name") : std::string();
      },
      "FOLDER");
  merge_cmd->add_option("out", merge.out, "folder for the merged sweep")
      ->required()
      ->check(folder_name);
  merge_cmd->add_option("shards", merge.shards, "the shard folders (sweep --shard --out)")
      ->required()
      ->check(folder_name);
  merge_cmd->add_flag("--quiet", merge.quiet, "print nothing on success");

  auto* report_cmd =
      app.add_subcommand("report", "write DIR/report.html from a run or sweep folder");
  report_cmd->add_option("dir", cl.report_dir, "output folder of a run or sweep")->required();
  add_units_option(report_cmd, cl.report_units, "the units the folder was written in");

  StormArgs& storm = cl.storm;
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

  SynthArgs& synth = cl.synth;
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

  FitArgs& fit = cl.fit;
  auto* fit_cmd = app.add_subcommand(
      "fit",
      "fit the priming flow, running loss and nozzle coefficient to a bench log, or the priming "
      "flow and running loss to a field log of cycle starts");
  fit_cmd->add_option("scenario", fit.scenario, "scenario file (YAML)")->required();
  fit_cmd->add_option("--bench", fit.bench, "bench log (CSV; see README, \"The bench test\")");
  fit_cmd->add_option("--cycles", fit.cycles,
                      "field log of cycle start times (CSV; see README, \"Fitting to the field\")");
  fit_cmd->add_option("--out", fit.out, "write the fitted scenario to this file");

  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    // Help and version are parse "errors" too; app.exit writes their text and gives status 0.
    const bool wanted = dynamic_cast<const CLI::CallForHelp*>(&e) != nullptr ||
                        dynamic_cast<const CLI::CallForAllHelp*>(&e) != nullptr ||
                        dynamic_cast<const CLI::CallForVersion*>(&e) != nullptr;
    if (wanted) {
      std::ostringstream out;
      std::ostringstream err;
      cl.status = app.exit(e, out, err);
      cl.out = out.str();
      cl.error = one_line(err.str());
      return cl;
    }
    cl.status = detail::kExitBadInput;
    cl.error = describe(e, app, argc, argv);
    return cl;
  }
  const std::pair<CLI::App*, Command> commands[] = {
      {run_cmd, Command::run},     {check_cmd, Command::check},   {sweep_cmd, Command::sweep},
      {merge_cmd, Command::merge}, {report_cmd, Command::report}, {storm_cmd, Command::storm},
      {synth_cmd, Command::synth}, {fit_cmd, Command::fit}};
  for (const auto& [cmd, which] : commands) {
    if (*cmd) cl.command = which;
  }
  return cl;
}

}  // namespace gutterwatt
