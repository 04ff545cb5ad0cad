#pragma once
// The command line as parsed: every subcommand's arguments, filled from argv without loading,
// running or touching any file, so that tests and the fuzz target can call it alone.

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "fit_command.hpp"
#include "sweep_command.hpp"

namespace gutterwatt {

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
  std::string units;          ///< `--units us|si`; empty: the scenario's site.units
};

struct CheckArgs {
  std::string scenario;
  std::vector<std::string> set;
  std::string rain;
  bool no_rain = false;
  std::string units;  ///< `--units us|si`; empty: the scenario's site.units
};

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

struct SynthArgs {
  std::string params;
  std::string start;
  std::string end;
  std::string step = "1h";
  std::uint64_t seed = 1;
  std::string utc_offset = "+00:00";
  std::string out;
};

enum class Command { none, run, check, sweep, merge, report, storm, synth, fit };

/// What the command line asks for. With `command` none nothing is to run: the program prints
/// `out` on standard output and `error` (one line, no newline) on standard error and exits
/// with `status` (help and version: 0; a bad command line: 2).
struct CommandLine {
  Command command = Command::none;
  int status = 0;
  std::string out;
  std::string error;
  RunArgs run;
  CheckArgs check;
  SweepArgs sweep;
  MergeArgs merge;
  std::string report_dir;
  std::string report_units;  ///< `report --units us|si`; empty: the units the folder was written in
  StormArgs storm;
  SynthArgs synth;
  FitArgs fit;
};

/// Parses `argv` (argv[0] the program's name). Never throws for what a user can type; looks at
/// no file (values naming files are checked when the command runs).
CommandLine parse_command_line(int argc, const char* const* argv);

/// Text as one printable line: control characters and bytes that are not UTF-8 become \xNN (a
/// message may quote a line of a binary file or a multi-line YAML value).
std::string one_line(std::string_view text);

}  // namespace gutterwatt
