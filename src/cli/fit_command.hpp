#pragma once
// `gutterwatt fit`: the command's arguments and the function main() calls.

#include <string>

namespace gutterwatt {

struct FitArgs {
  std::string scenario;  ///< scenario file (YAML)
  std::string bench;     ///< `--bench FILE`: a bench log
  std::string cycles;    ///< `--cycles FILE`: a field log of cycle start times
  std::string out;       ///< `--out FILE`: the fitted scenario; empty: print only
};

/// Fits the scenario to the log (exactly one of `bench` and `cycles`; a cycle log with the
/// scenario's rain record), prints the fit and, with `--out`, writes the scenario with the
/// fitted values (rain paths rewritten for the new folder), whole or not at all, after checking
/// that it loads. Returns the exit status; throws InputError for bad arguments or input.
int fit_command(const FitArgs& args);

}  // namespace gutterwatt
