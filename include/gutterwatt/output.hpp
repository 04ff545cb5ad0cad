#pragma once
/// Writers of a run's records: timeseries.csv, events.csv, summary.json and the terminal table.

#include <condition_variable>
#include <functional>
#include <mutex>
#include <optional>
#include <ostream>
#include <span>
#include <string>
#include <string_view>
#include <thread>
#include <variant>
#include <vector>

#include "gutterwatt/realizations.hpp"
#include "gutterwatt/scenario.hpp"
#include "gutterwatt/simulation.hpp"

namespace gutterwatt {

/// Most bytes of timeseries.csv a run writes unless forced (`run --force`): a century of hourly
/// rows is about 90 MB, a 1 s interval over ten years about 30 GB (a project choice, no source).
inline constexpr double kMaxTimeseriesBytes = 1e9;

/// Bytes of a timeseries.csv row with values in every column, for the estimate.
inline constexpr double kTimeseriesRowBytes = 100.0;

/// One column of an output CSV: the one definition of its name, unit and value, which the
/// writers, the report's readers and the tests take. The name carries the SI unit (`rain_mm`);
/// written in US units it is its twin (`rain_in`, column_name) and the value converted by the
/// exact factor (column_value), with column_decimals. A text column has `text` instead of
/// `value`; a value that does not apply to a row is NaN and writes an empty cell.
template <class Row>
struct OutputColumn {
  std::string_view name;
  int decimals = 0;  ///< in SI
  double (*value)(const Row&) = nullptr;
  /// Writes the cell's text at `out`, which has room for kCellRoom bytes; returns its end.
  char* (*text)(const Row&, char* out) = nullptr;
};

/// The room each cell of an output row has: the longest number or text a cell writes.
inline constexpr std::size_t kCellRoom = 400;

/// One row of timeseries.csv: the interval from `from` to `to`.
struct TimeseriesRow {
  const Sample& from;
  const Sample& to;
  double roof_area_m2;
  const TimeZone& zone;
};

/// One row of events.csv.
struct EventRow {
  const Episode& episode;
  const TimeZone& zone;
};

/// One row of trace.csv.
struct TraceRow {
  const TracePoint& point;
  const TimeZone& zone;
};

/// Most bytes of trace.csv a run writes unless forced (`run --force`): a point a minute through
/// ten years of continuous motion is about 370 MB (a project choice, no source).
inline constexpr double kMaxTraceBytes = 1e9;

/// Bytes of a trace.csv row, for the watch on its size.
inline constexpr double kTraceRowBytes = 80.0;

/// The columns of timeseries.csv, in order: time, rain_mm, roof_runoff_L, reservoir_level_mm,
/// release_state, release_L, reservoir_overflow_L, column_overflow_L, nozzle_L, head_m, power_W,
/// energy_Wh, battery_soc, cum_energy_Wh, cum_overflow_L.
std::span<const OutputColumn<TimeseriesRow>> timeseries_columns();

/// The columns of events.csv, in order: kind, start, end, duration_s, volume_L,
/// peak_flow_L_per_s, energy_Wh.
std::span<const OutputColumn<EventRow>> events_columns();

/// The columns of trace.csv, in order: time, reservoir_level_mm, release_state,
/// release_L_per_s, overflow_L_per_s, head_m, power_W.
std::span<const OutputColumn<TraceRow>> trace_columns();

/// Throws InputError naming the scenario and `simulation.output_interval`, with the estimate,
/// when a run over [start, end) would write more than kMaxTimeseriesBytes of timeseries.csv.
void check_output_size(const Scenario& scenario, Instant start, Instant end);

/// Writes one timeseries.csv row per output interval, in the scenario's units (site.units):
/// interval sums (rain, runoff, flows,
/// energy), end-of-interval state (level, release state, head, state of charge), the interval's
/// mean electrical power and running totals. With `limited`, throws the InputError of
/// check_output_size once the rows pass kMaxTimeseriesBytes (for a period not known in advance).
class TimeseriesWriter : public Observer {
 public:
  TimeseriesWriter(std::ostream& out, const Scenario& scenario, bool limited = false);
  void on_start(const Sample& s) override;
  void on_sample(const Sample& s) override;

 private:
  std::ostream& out_;
  const Scenario& scenario_;
  double area_m2_;
  TimeZone zone_;
  UnitSystem units_;
  bool limited_;
  double rows_ = 0.0;
  Sample last_;
  std::string line_;  // a row's text, its allocation kept from row to row
};

/// Writes one trace.csv row per trace point (see TracePoint), in the scenario's units; the time
/// to the second. With `limited`, throws InputError naming `simulation.trace` once the rows pass
/// kMaxTraceBytes (the run does not know in advance how long its chain moves). The rows' text is
/// made and written on a thread of its own, in batches of points handed over as they fill, so
/// that the simulation does not wait on it; so are the rates of the points given by their state
/// (on_trace_state), by a ChainSystem of the writer's own on `scenario`, which must be the
/// scenario the run simulates. `out` holds the whole trace after finish() (or the writer's end),
/// and nothing of it may be read before.
class TraceWriter : public Observer {
 public:
  TraceWriter(std::ostream& out, const Scenario& scenario, bool limited);
  ~TraceWriter() override;
  TraceWriter(const TraceWriter&) = delete;
  TraceWriter& operator=(const TraceWriter&) = delete;
  bool wants_trace() const override { return true; }
  void on_trace(const TracePoint& p) override;
  void on_trace_state(const TraceState& s, const ChainSystem& system) override;
  /// Writes every point handed in so far and ends the writing thread.
  void finish();

 private:
  /// A point as handed in: with its rates, or by its state.
  using Entry = std::variant<TracePoint, TraceState>;
  /// Counts a row against the size limit (see the class) and adds it to the batch being filled.
  void add(const Entry& e);
  /// Hands the batch being filled to the writing thread, once it has taken the one before.
  void hand_over(bool last);
  /// The writing thread: writes each batch handed over until the last.
  void write_batches();

  std::ostream& out_;
  const Scenario& scenario_;
  TimeZone zone_;
  UnitSystem units_;
  bool limited_;
  ChainSystem system_;  // the writing thread's, for the points given by their state
  double rows_ = 0.0;
  std::vector<Entry> filling_;  // the simulation's side
  std::vector<Entry> handed_;   // under mutex_: the batch waiting to be written
  bool waiting_ = false;        // under mutex_: handed_ holds a batch
  bool last_ = false;           // under mutex_: no batch comes after handed_
  std::mutex mutex_;
  std::condition_variable changed_;
  std::thread writer_;
};

/// Writes one events.csv row per siphon cycle, overflow, dribble and column-overflow episode.
class EventsWriter : public Observer {
 public:
  EventsWriter(std::ostream& out, const Scenario& scenario);
  void on_episode(const Episode& e) override;

 private:
  std::ostream& out_;
  TimeZone zone_;
  UnitSystem units_;
  std::string line_;  // a row's text, its allocation kept from row to row
};

/// One calendar month (local time), one meteorological season, or one calendar year.
struct PeriodSummary {
  std::string label;  ///< `YYYY-MM` for a month; `YYYY DJF|MAM|JJA|SON` for a season; `YYYY`
  double rain_depth_m = 0.0;
  double electrical_J = 0.0;
  double overflow_m3 = 0.0;  ///< reservoir and head column
  double dribble_m3 = 0.0;
  double nozzle_m3 = 0.0;
  long cycles = 0;
  long overflow_events = 0;
  double overflow_s = 0.0;
};

/// Meteorological seasons by local month: DJF, MAM, JJA, SON; December counts with the next
/// year's January and February (`2025 DJF` is December 2024 to February 2025).
std::string season_label(const std::string& month_label);

/// Collects what summary.json and the table report beyond the run totals.
class SummaryBuilder : public Observer {
 public:
  explicit SummaryBuilder(const Scenario& scenario);
  void on_start(const Sample& s) override;
  void on_sample(const Sample& s) override;
  void on_episode(const Episode& e) override;

  const std::vector<PeriodSummary>& months() const { return months_; }
  /// The months folded into meteorological seasons, in time order.
  std::vector<PeriodSummary> seasons() const;
  /// The months folded into calendar years (local), in time order.
  std::vector<PeriodSummary> years() const;
  double min_soc() const { return min_soc_; }
  /// Reservoir overflow episodes, in time order.
  const std::vector<Episode>& overflows() const { return overflows_; }
  /// The largest reservoir overflow episode by volume (the first of equals); null without any.
  const Episode* largest_overflow() const;
  /// Volume of the largest reservoir overflow episode (0 without any).
  double largest_overflow_m3() const;
  /// Distinct local days with reservoir overflow.
  long overflow_days() const;
  double energy_per_cycle_J() const;

 private:
  PeriodSummary& month_of(double time_s);
  std::vector<PeriodSummary> fold_months(
      const std::function<std::string(const std::string&)>& label_of) const;

  const Scenario& scenario_;
  Sample month_start_;
  std::vector<PeriodSummary> months_;
  std::vector<Episode> overflows_;
  double min_soc_ = 1.0;
  double cycle_energy_J_ = 0.0;
  long cycle_count_ = 0;
};

/// The share of the load's energy served, served / (served + unmet); none without a load.
std::optional<double> load_served_share(const Accounts& totals);

/// Intensity of the wettest record interval in [start, end) during which the reservoir did not
/// overflow (0 when every wet interval overflowed or there is none), m/s.
double wettest_dry_intensity_m_per_s(const RainSeries& rain, Instant start, Instant end,
                                     const std::vector<Episode>& overflows);

/// What summary.json's numbers are made from.
struct SummaryInputs {
  const Scenario& scenario;
  const RunResult& result;
  const SummaryBuilder& summary;
};

/// One number of summary.json that the report reads: the one definition of its dotted key
/// (`water_L.rain`), which write_summary_json writes and the report's reader reads, and of its
/// value. A value that does not apply (NaN) is written as null; a count is written whole.
struct SummaryNumber {
  std::string_view key;
  double (*value)(const SummaryInputs&);
  bool count = false;
};

/// The numbers of summary.json the report reads, in the order the page's reader takes them.
std::span<const SummaryNumber> summary_numbers();

/// The entry of summary_numbers() for `key`; std::out_of_range when there is none (a reader that
/// asks for a key no writer writes is a programming error).
const SummaryNumber& summary_number(std::string_view key);

/// What a run warns of, kept in summary.json for the report page: the run's own (the record,
/// its coverage, the disaggregation's spread), as the terminal shows them, and the design's, as
/// `check` gives them.
struct RunWarnings {
  std::vector<std::string> run;
  std::vector<std::string> design;
};

/// summary.json: water_L, energy_Wh, siphon, overflow, battery, months, warnings and more; with
/// `realizations` (the run being their first), `realizations: {n, seeds, percentiles,
/// energy_Wh: {p10, p50, p90}, cycles, reservoir_overflow_L, dribble_L}`; with `resampled` (as
/// many realizations with the same seeds, each on a resample of the calibration record:
/// realization_record), that block gains `calibration_resampled: {n, resampled, energy_Wh:
/// {p10, p50, p90}, cycles, reservoir_overflow_L, dribble_L}`.
void write_summary_json(std::ostream& out, const Scenario& scenario, const RainSeries& rain,
                        const RunResult& result, const SummaryBuilder& summary,
                        const RunWarnings& warnings,
                        const RealizationSpread* realizations = nullptr,
                        const RealizationSpread* resampled = nullptr);

/// The summary table printed after a run, in the scenario's units (site.units); with
/// `realizations`, their median and P10 to P90 beside the run's own figures, and with
/// `resampled`, those of the realizations on resamples of the calibration record.
void print_summary_table(std::ostream& out, const Scenario& scenario, const RainSeries& rain,
                         const RunResult& result, const SummaryBuilder& summary,
                         const RealizationSpread* realizations = nullptr,
                         const RealizationSpread* resampled = nullptr);

}  // namespace gutterwatt
