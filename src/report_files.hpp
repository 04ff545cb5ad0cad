#pragma once
// The report's readers: the files a run (timeseries.csv, events.csv, summary.json) or a sweep
// (sweep.csv, sweep.json) wrote, back into plain tables. Every malformed input is an InputError
// naming the file, the line and the column or key. Internal to the report; tests in
// tests/report_test.cpp (the whole messages).

#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "gutterwatt/accounts.hpp"
#include "gutterwatt/realizations.hpp"
#include "gutterwatt/release.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt::detail {

/// The whole of a file as text. Throws InputError for a missing file, a folder or a failed read.
std::string read_text(const std::filesystem::path& path);

using Json = nlohmann::json;

/// Looks up `a.b.c` in a JSON object, or nullptr when any part is absent.
const Json* find_key(const Json& root, std::string_view dotted);

/// The number at `key`; InputError naming `file` and `label` (else `key`) when it is missing or
/// not a number.
double json_number(const Json& root, const std::string& key, const std::string& file,
                   const std::string& label = "");

/// The number at `key`, nullopt when it is missing or null; InputError when it is something else.
std::optional<double> json_optional_number(const Json& root, const std::string& key,
                                           const std::string& file);

/// The text at `key`; InputError naming `file` and `label` (else `key`) when it is missing or not
/// a string.
std::string json_string(const Json& root, const std::string& key, const std::string& file,
                        const std::string& label = "");

/// A JSON file; InputError naming the file and the line of a syntax error.
Json parse_json(const std::filesystem::path& path);

/// A CSV file as text cells, with the line each row came from (for messages).
struct Csv {
  std::string file;
  std::vector<std::string> header;
  std::vector<std::vector<std::string>> rows;
  std::vector<int> lines;

  /// The index of column `name`, or -1.
  int find(std::string_view name) const;
  /// The index of column `name`; InputError (line 1) when there is none.
  std::size_t require(std::string_view name) const;
  /// The index of the column named `si_name` (`rain_mm`) in SI or its US twin (`rain_in`), and
  /// the system it was found in; InputError (line 1) naming both when neither is there.
  std::pair<std::size_t, UnitSystem> require_either(std::string_view si_name) const;
};

/// RFC 4180 style CSV: comma separated, fields may be quoted with "" for a quote inside; a UTF-8
/// byte-order mark, CRLF line ends and blank lines are accepted. `file` names the text in
/// messages. Throws InputError for an unterminated quote, a row of the wrong width or no header.
Csv parse_csv(std::string_view text, const std::string& file);

/// A cell as a number (nan and inf allowed); InputError naming the cell otherwise.
double parse_number(const std::string& cell, const std::string& file, int line,
                    const std::string& field);

/// Wall-clock seconds since 1970-01-01T00:00 of an ISO 8601 stamp, as written: a trailing `Z` or
/// UTC offset is accepted and left out, so every label on the page reads as the file does.
std::optional<std::int64_t> parse_stamp(std::string_view s);

/// timeseries.csv, one entry a row, in SI whichever units the file was written in; `t` is the end
/// of each row's interval on the wall clock of its stamp (so it repeats where a local clock turns
/// back), `dt_s` its length in real time (never longer than the usual step, so a skipped dry spell
/// does not draw as one long interval).
struct Timeseries {
  UnitSystem units = UnitSystem::si;  ///< the units the file was written in
  std::vector<std::int64_t> t;
  std::vector<double> dt_s;
  std::vector<double> rain_mm, level_mm, release_L, reservoir_overflow_L, column_overflow_L,
      nozzle_L, power_W, energy_Wh, battery_soc, cum_energy_Wh, cum_overflow_L;
  std::vector<ReleaseState> state;
  std::size_t size() const { return t.size(); }
};

/// Reads timeseries.csv written in either system of units: every column of timeseries_columns()
/// (output.hpp) by its SI name or its US twin; at least one row, times strictly increasing in
/// UTC (by each stamp's offset).
Timeseries read_timeseries(const std::filesystem::path& path);

/// trace.csv, one entry a row, in SI whichever units the file was written in; `t` on the wall
/// clock of its stamp. Two rows may share a time (a switch: the mode before and after it).
struct Trace {
  std::vector<std::int64_t> t;
  std::vector<double> level_mm, release_L_per_s, overflow_L_per_s, head_m, power_W;
  std::vector<ReleaseState> state;
  std::size_t size() const { return t.size(); }
};

/// Reads trace.csv written in either system of units: every column of trace_columns()
/// (output.hpp) by its SI name or its US twin; times never going back in UTC. A file without
/// rows (a run that never moved) is an empty trace.
Trace read_trace(const std::filesystem::path& path);

/// One row of events.csv, in SI; energy_Wh is NaN for a kind that makes none (an overflow).
struct Event {
  EpisodeKind kind = EpisodeKind::cycle;
  std::int64_t start = 0;
  std::int64_t end = 0;
  double duration_s = 0.0, volume_L = 0.0, peak_flow_L_per_s = 0.0, energy_Wh = 0.0;
};

/// Reads events.csv (possibly without rows) written in either system of units.
std::vector<Event> read_events(const std::filesystem::path& path);

/// One entry of summary.json's `months`.
struct MonthRow {
  std::string month;
  double rain_mm = 0.0, energy_Wh = 0.0, overflow_L = 0.0, cycles = 0.0;
};

/// A set of realizations in summary.json: how many, and the spread of each metric
/// (kRealizationColumns, in that order).
struct RealizationSet {
  double n = 0;
  std::vector<Spread> spreads;
};

/// summary.json's `realizations` block, and the run's own figure of each metric
/// (kRealizationColumns' summary_key, in that order).
struct RealizationRanges {
  std::vector<double> own;
  RealizationSet draws;
  std::optional<RealizationSet> resampled;  ///< with the calibration record resampled
};

/// The keys of summary.json the page shows.
struct Summary {
  std::string scenario, site, start, end;
  double rain_L = 0, roof_loss_L = 0, roof_runoff_L = 0, first_flush_L = 0,
         reservoir_overflow_L = 0, column_overflow_L = 0, dribble_L = 0, through_nozzle_L = 0,
         storage_change_L = 0, balance_error_L = 0;
  double jet_Wh = 0, electrical_Wh = 0, stored_Wh = 0, curtailed_Wh = 0, unmet_load_Wh = 0;
  double cycles = 0, overflow_events = 0, overflow_hours = 0;
  std::optional<double> trigger_mm, break_mm, rim_mm;
  /// Battery losses and times (absent from summaries written before they were kept).
  std::optional<double> discharge_loss_Wh, self_discharge_Wh, battery_hours_below_half,
      battery_hours_empty, load_served_share;
  /// Evaporation and standing water (absent from summaries written before they were kept).
  std::optional<double> evaporation_L, standing_longest_days, standing_spells_over_7_days,
      standing_days_total;
  std::vector<MonthRow> months;
  /// After several realizations (`run --realizations N`).
  std::optional<RealizationRanges> realizations;
  /// The run's warnings and the design's (as `check` gives them); a summary written before they
  /// were kept has only the rain record's.
  std::vector<std::string> run_warnings, design_warnings;
};

/// Reads summary.json; InputError naming a missing key or one of the wrong type.
Summary read_summary(const std::filesystem::path& path);

/// sweep.csv (and sweep.json when present): the first `keys` columns are the varied keys. The
/// metric columns (and the rank's spread) are named and valued in `units`.
struct Sweep {
  UnitSystem units = UnitSystem::si;
  std::string scenario;
  std::string rank = "energy_Wh";
  std::string site;   ///< from sweep.json, when given
  std::string order;  ///< `ascending` or `descending`, from sweep.json, when given
  std::optional<double> skipped, failed;  ///< combinations that did not run, when given
  Csv csv;
  std::vector<std::size_t> keys;         ///< column indices of the varied keys
  std::vector<bool> numeric_key;         ///< per entry of `keys`
  std::vector<std::vector<double>> num;  ///< numeric value of every cell, NaN for text
};

/// Reads `dir`/sweep.csv and, when there is one, `dir`/sweep.json, written in either system of
/// units, and gives its metrics in `units` (default: the units it was written in).
Sweep read_sweep(const std::filesystem::path& dir, std::optional<UnitSystem> units = {});

}  // namespace gutterwatt::detail
