#pragma once
/// Writers of a run's records: timeseries.csv, events.csv, summary.json and the terminal table,
/// and the output folder that only ever shows complete files.

#include <filesystem>
#include <fstream>
#include <memory>
#include <ostream>
#include <string>
#include <vector>

#include "gutterwatt/scenario.hpp"
#include "gutterwatt/simulation.hpp"

namespace gutterwatt {

/// Writes one timeseries.csv row per output interval: interval sums (rain, runoff, flows,
/// energy), end-of-interval state (level, release state, head, state of charge), the interval's
/// mean electrical power and running totals.
class TimeseriesWriter : public Observer {
 public:
  TimeseriesWriter(std::ostream& out, const Scenario& scenario);
  void on_start(const Sample& s) override;
  void on_sample(const Sample& s) override;

 private:
  std::ostream& out_;
  double area_m2_;
  int offset_s_;
  Sample last_;
};

/// Writes one events.csv row per siphon cycle, overflow, dribble and column-overflow episode.
class EventsWriter : public Observer {
 public:
  EventsWriter(std::ostream& out, const Scenario& scenario);
  void on_episode(const Episode& e) override;

 private:
  std::ostream& out_;
  int offset_s_;
};

/// One calendar month (local time) of a run.
struct MonthSummary {
  std::string month;  ///< YYYY-MM
  double rain_m3 = 0.0;
  double rain_depth_m = 0.0;
  double electrical_J = 0.0;
  double overflow_m3 = 0.0;
  double dribble_m3 = 0.0;
  double nozzle_m3 = 0.0;
  long cycles = 0;
  long overflow_events = 0;
};

/// Collects what summary.json and the table report beyond the run totals.
class SummaryBuilder : public Observer {
 public:
  explicit SummaryBuilder(const Scenario& scenario);
  void on_start(const Sample& s) override;
  void on_sample(const Sample& s) override;
  void on_episode(const Episode& e) override;

  const std::vector<MonthSummary>& months() const { return months_; }
  double min_soc() const { return min_soc_; }
  double largest_overflow_m3() const { return largest_overflow_m3_; }
  long overflow_days() const { return static_cast<long>(overflow_days_.size()); }
  double energy_per_cycle_J() const;

 private:
  MonthSummary& month_of(double time_s);

  const Scenario& scenario_;
  Sample month_start_;
  std::vector<MonthSummary> months_;
  std::vector<std::string> overflow_days_;
  double min_soc_ = 1.0;
  double largest_overflow_m3_ = 0.0;
  double cycle_energy_J_ = 0.0;
  long cycle_count_ = 0;
};

/// summary.json: water_L, energy_Wh, siphon, overflow, battery, months and more.
void write_summary_json(std::ostream& out, const Scenario& scenario, const RainSeries& rain,
                        const RunResult& result, const SummaryBuilder& summary);

/// The summary table printed after a run.
void print_summary_table(std::ostream& out, const Scenario& scenario, const RunResult& result,
                         const SummaryBuilder& summary);

/// Files in an output folder that appear only complete: each is written under a temporary name
/// in the same folder and renamed into place by commit(). Without commit() (a failed or
/// interrupted run) the temporary files are removed and earlier results stay as they were.
class OutputFolder {
 public:
  /// Creates `dir` if needed; throws InputError naming `--out` when it cannot be written.
  explicit OutputFolder(std::filesystem::path dir);
  ~OutputFolder();
  OutputFolder(const OutputFolder&) = delete;
  OutputFolder& operator=(const OutputFolder&) = delete;

  /// A stream for `name` (e.g. `timeseries.csv`) in the folder.
  std::ostream& open(const std::string& name);
  /// Flushes, checks and renames every file into place; throws Error on a write failure.
  void commit();
  const std::filesystem::path& dir() const { return dir_; }

 private:
  struct File {
    std::string name;
    std::filesystem::path temp;
    std::unique_ptr<std::ofstream> stream;
  };
  void discard();

  std::filesystem::path dir_;
  std::vector<File> files_;
  bool committed_ = false;
};

}  // namespace gutterwatt
