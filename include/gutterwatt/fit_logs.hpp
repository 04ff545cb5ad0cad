#pragma once
/// The logs `gutterwatt fit` takes, read and checked: a bench log of hose tests, and a field log
/// of the times siphon cycles started. Every value in SI; every error names the file, the line
/// and the column.

#include <istream>
#include <optional>
#include <string>
#include <vector>

#include "gutterwatt/calendar.hpp"
#include "gutterwatt/rain_input.hpp"

namespace gutterwatt {

/// One hose test: a steady inflow into the reservoir and what was seen. Every value in SI.
struct BenchRow {
  int line = 0;  ///< in the log, for messages
  double inflow_m3_per_s = 0.0;
  bool primed = false;
  std::optional<double> time_to_prime_s;       ///< from a break (level at the bell rim) to priming
  std::optional<double> drain_time_s;          ///< from priming to the break
  std::optional<double> cycle_period_s;        ///< from one priming to the next
  std::optional<double> nozzle_flow_m3_per_s;  ///< a container held under the nozzle, running
};

/// Reads a bench log: a CSV with a header naming its columns (units in the names), one row per
/// test, `#` comments and blank lines skipped. The inflow is `inflow_L_per_min`, `inflow_gpm` or
/// a timed container (`fill_volume_L` or `fill_volume_gal` with `fill_time_s`); `outcome` is
/// `primed` or `dribbled`; optional `time_to_prime_s`, `drain_time_s`, `cycle_period_s`,
/// `nozzle_volume_L` or `nozzle_volume_gal` with `nozzle_time_s`, and a free `note`. Throws
/// InputError naming `file_label`, the line and the column for an unknown or missing column, an
/// unknown outcome, a missing, non-numeric or non-positive value, a quantity given twice on one
/// row (in two units, or as a rate and a timed container), and times on a row that dribbled.
std::vector<BenchRow> read_bench_log(std::istream& in, const std::string& file_label);

/// A field log of siphon cycles: the instant each cycle started (a float switch, a camera), in
/// time order, with the line each came from.
struct CycleLog {
  std::vector<Instant> starts;
  std::vector<int> lines;
};

/// Reads a cycle log: a CSV with a `time` column (other columns, a note say, are ignored), one
/// cycle start per row, stamps as the rain record takes them: `rain_format`'s time format
/// (ISO 8601 when it has none) and clock (zone) for naive stamps (one time-zone style per file);
/// `#` comments and blank lines skipped. Throws InputError naming `file_label`, the line and the
/// column for a missing column, a stamp that is not a time, one earlier than or equal to the one
/// before, and a log without rows.
CycleLog read_cycle_log(std::istream& in, const std::string& file_label,
                        const SeriesFormat& rain_format);

}  // namespace gutterwatt
