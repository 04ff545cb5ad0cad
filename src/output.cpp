#include "gutterwatt/output.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <functional>
#include <iomanip>
#include <nlohmann/json.hpp>
#include <sstream>
#include <stdexcept>

#include "detail.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/units.hpp"
#include "report_format.hpp"

namespace gutterwatt {
namespace {

constexpr double kMmPerM = 1e3;

static_assert(detail::kFixedRoom <= kCellRoom && kIso8601Room <= kCellRoom);

// A text cell: `text` (shorter than kCellRoom) at `out`; returns the end.
char* put_text(char* out, std::string_view text) {
  return std::copy(text.begin(), text.end(), out);
}

double round_to(double v, int decimals) {
  const double f = std::pow(10.0, decimals);
  return std::round(v * f) / f;
}

Instant floor_instant(double t) { return static_cast<Instant>(std::floor(t + 1e-9)); }

// summary.json numbers: litres and watt-hours to 1e-6.
double json_litres(double m3) { return round_to(m3 * kLitresPerCubicMetre, 6); }
double json_watt_hours(double J) { return round_to(J / kJoulesPerWh, 6); }

}  // namespace

namespace {

[[noreturn]] void refuse_output_size(const Scenario& sc, double rows, bool estimate) {
  const double gb = rows * kTimeseriesRowBytes / 1e9;
  throw InputError(sc.file.string(), 0, "simulation.output_interval",
                   std::string(estimate ? "the run would write about " : "the run passed ") +
                       detail::fixed_trimmed(gb, gb < 10.0 ? 1 : 0) + " GB of timeseries.csv (" +
                       detail::fixed_trimmed(rows, 0) + " rows of " +
                       format_duration(static_cast<Instant>(sc.simulation.output_interval_s)) +
                       "); the limit is " + detail::fixed_trimmed(kMaxTimeseriesBytes / 1e9, 1) +
                       " GB: give a longer output_interval or a shorter period, or run with "
                       "--force");
}

}  // namespace

void check_output_size(const Scenario& sc, Instant start, Instant end) {
  const double rows = std::ceil(static_cast<double>(end - start) / sc.simulation.output_interval_s);
  if (rows * kTimeseriesRowBytes > kMaxTimeseriesBytes) refuse_output_size(sc, rows, true);
}

namespace {

using TsColumn = OutputColumn<TimeseriesRow>;
using TsRow = TimeseriesRow;

// The interval's change in one account.
template <double Accounts::*member>
double change(const TsRow& r) {
  return r.to.totals.*member - r.from.totals.*member;
}

template <double Accounts::*member>
double change_L(const TsRow& r) {
  return change<member>(r) * kLitresPerCubicMetre;
}

constexpr TsColumn kTimeseriesColumns[] = {
    {"time", 0, nullptr,
     [](const TsRow& r, char* out) { return put_iso8601(out, r.to.time, r.zone); }},
    {"rain_mm", 3,
     [](const TsRow& r) { return change<&Accounts::rain_m3>(r) / r.roof_area_m2 * kMmPerM; }},
    {"roof_runoff_L", 3, change_L<&Accounts::roof_runoff_m3>},
    {"reservoir_level_mm", 3, [](const TsRow& r) { return r.to.level_m * kMmPerM; }},
    {"release_state", 0, nullptr,
     [](const TsRow& r, char* out) { return put_text(out, release_state_name(r.to.release)); }},
    {"release_L", 3, change_L<&Accounts::release_m3>},
    {"reservoir_overflow_L", 3, change_L<&Accounts::reservoir_overflow_m3>},
    {"column_overflow_L", 3, change_L<&Accounts::column_overflow_m3>},
    {"nozzle_L", 3, change_L<&Accounts::nozzle_m3>},
    {"head_m", 4, [](const TsRow& r) { return r.to.head_m; }},
    {"power_W", 4,
     [](const TsRow& r) {
       const double dt = static_cast<double>(r.to.time - r.from.time);
       return dt > 0.0 ? change<&Accounts::electrical_J>(r) / dt : 0.0;
     }},
    {"energy_Wh", 5,
     [](const TsRow& r) { return change<&Accounts::electrical_J>(r) / kJoulesPerWh; }},
    {"battery_soc", 5, [](const TsRow& r) { return r.to.soc; }},
    {"cum_energy_Wh", 4, [](const TsRow& r) { return r.to.totals.electrical_J / kJoulesPerWh; }},
    {"cum_overflow_L", 3,
     [](const TsRow& r) { return r.to.totals.overflow_m3() * kLitresPerCubicMetre; }},
};

constexpr OutputColumn<TraceRow> kTraceColumns[] = {
    {"time", 0, nullptr,
     [](const TraceRow& r, char* out) {
       return put_iso8601(out, floor_instant(r.point.time_s), r.zone);
     }},
    {"reservoir_level_mm", 3, [](const TraceRow& r) { return r.point.level_m * kMmPerM; }},
    {"release_state", 0, nullptr,
     [](const TraceRow& r, char* out) {
       return put_text(out, release_state_name(r.point.release));
     }},
    {"release_L_per_s", 4,
     [](const TraceRow& r) { return r.point.release_m3_per_s * kLitresPerCubicMetre; }},
    {"overflow_L_per_s", 4,
     [](const TraceRow& r) { return r.point.overflow_m3_per_s * kLitresPerCubicMetre; }},
    {"head_m", 4, [](const TraceRow& r) { return r.point.head_m; }},
    {"power_W", 4, [](const TraceRow& r) { return r.point.power_W; }},
};

using EvColumn = OutputColumn<EventRow>;

constexpr EvColumn kEventsColumns[] = {
    {"kind", 0, nullptr,
     [](const EventRow& r, char* out) { return put_text(out, episode_kind_name(r.episode.kind)); }},
    {"start", 0, nullptr,
     [](const EventRow& r, char* out) {
       return put_iso8601(out, floor_instant(r.episode.start_s), r.zone);
     }},
    {"end", 0, nullptr,
     [](const EventRow& r, char* out) {
       return put_iso8601(out, floor_instant(r.episode.end_s), r.zone);
     }},
    {"duration_s", 1, [](const EventRow& r) { return r.episode.end_s - r.episode.start_s; }},
    {"volume_L", 3, [](const EventRow& r) { return r.episode.volume_m3 * kLitresPerCubicMetre; }},
    {"peak_flow_L_per_s", 4,
     [](const EventRow& r) { return r.episode.peak_flow_m3_per_s * kLitresPerCubicMetre; }},
    {"energy_Wh", 5,
     [](const EventRow& r) {
       return episode_makes_energy(r.episode.kind) ? r.episode.energy_J / kJoulesPerWh
                                                   : detail::kNaN;
     }},
};

template <class Row>
void write_header(std::ostream& out, std::span<const OutputColumn<Row>> columns, UnitSystem units) {
  std::string line;
  for (const OutputColumn<Row>& c : columns) line += column_name(units, c.name) + ',';
  line.back() = '\n';
  out << line;
}

// A row's text is built in `line`, a writer's buffer with room for kCellRoom bytes in each cell,
// kept from row to row: each cell is written straight into it and the row goes out in one write.
template <class Row>
void write_row(std::ostream& out, std::span<const OutputColumn<Row>> columns, const Row& row,
               UnitSystem units, std::string& line) {
  line.resize(columns.size() * (kCellRoom + 1));
  char* const first = line.data();
  char* p = first;
  for (const OutputColumn<Row>& c : columns) {
    if (c.text != nullptr) {
      p = c.text(row, p);
    } else if (const double v = c.value(row); !std::isnan(v)) {
      const double shown = column_value(units, c.name, v);
      p = std::isfinite(shown)
              ? detail::put_fixed_trimmed(p, shown, column_decimals(units, c.name, c.decimals))
              : put_text(p, "nan");
    }
    *p++ = ',';
  }
  p[-1] = '\n';
  out.write(first, p - first);
}

}  // namespace

std::span<const OutputColumn<TimeseriesRow>> timeseries_columns() { return kTimeseriesColumns; }

std::span<const OutputColumn<EventRow>> events_columns() { return kEventsColumns; }

std::span<const OutputColumn<TraceRow>> trace_columns() { return kTraceColumns; }

// Trace points in a batch handed to the writing thread: about 700 kB (88 bytes a point), some
// five days of a moving chain's trace at a point a minute.
constexpr std::size_t kTraceBatch = 8192;

TraceWriter::TraceWriter(std::ostream& out, const Scenario& scenario, bool limited)
    : out_(out),
      scenario_(scenario),
      zone_(scenario.site.zone),
      units_(scenario.site.units),
      limited_(limited),
      system_(scenario) {
  write_header(out_, trace_columns(), units_);
  filling_.reserve(kTraceBatch);
  handed_.reserve(kTraceBatch);
  writer_ = std::thread([this] { write_batches(); });
}

TraceWriter::~TraceWriter() { finish(); }

void TraceWriter::on_trace(const TracePoint& p) { add(p); }

void TraceWriter::on_trace_state(const TraceState& s, const ChainSystem& system) {
  // The rates are worked out later by the writer's own system (the run's may be gone by then):
  // it must be built on the scenario the run simulates. Checked in every build (an assert is
  // compiled out of the Release and sanitizer builds alike); one comparison a point.
  if (&system.scenario() != &scenario_) {
    throw std::logic_error(
        "TraceWriter: a point handed by its state from a run of another scenario");
  }
  add(s);
}

void TraceWriter::add(const Entry& e) {
  if (limited_ && ++rows_ * kTraceRowBytes > kMaxTraceBytes) {
    throw InputError(scenario_.file.string(), 0, "simulation.trace",
                     "the run passed " + detail::fixed_trimmed(kMaxTraceBytes / 1e9, 1) +
                         " GB of trace.csv (" + detail::fixed_trimmed(rows_, 0) +
                         " rows); set simulation.trace: off, give a shorter period, or run "
                         "with --force");
  }
  filling_.push_back(e);
  if (filling_.size() == kTraceBatch) hand_over(false);
}

void TraceWriter::finish() {
  if (!writer_.joinable()) return;
  hand_over(true);
  writer_.join();
}

void TraceWriter::hand_over(bool last) {
  std::unique_lock lock(mutex_);
  changed_.wait(lock, [this] { return !waiting_; });
  std::swap(filling_, handed_);
  filling_.clear();
  waiting_ = true;
  last_ = last;
  changed_.notify_all();
}

void TraceWriter::write_batches() {
  std::vector<Entry> batch;
  batch.reserve(kTraceBatch);
  std::string line;  // a row's text, its allocation kept from row to row
  for (bool last = false; !last;) {
    {
      std::unique_lock lock(mutex_);
      changed_.wait(lock, [this] { return waiting_; });
      std::swap(batch, handed_);
      waiting_ = false;
      last = last_;
      changed_.notify_all();
    }
    for (const Entry& e : batch) {
      const TracePoint p = std::holds_alternative<TracePoint>(e)
                               ? std::get<TracePoint>(e)
                               : trace_point(std::get<TraceState>(e), system_);
      write_row(out_, trace_columns(), TraceRow{p, zone_}, units_, line);
    }
    batch.clear();
  }
}

TimeseriesWriter::TimeseriesWriter(std::ostream& out, const Scenario& scenario, bool limited)
    : out_(out),
      scenario_(scenario),
      area_m2_(scenario.roof.area_m2),
      zone_(scenario.site.zone),
      units_(scenario.site.units),
      limited_(limited) {
  write_header(out_, timeseries_columns(), units_);
}

void TimeseriesWriter::on_start(const Sample& s) { last_ = s; }

void TimeseriesWriter::on_sample(const Sample& s) {
  if (!s.output) return;
  if (limited_ && ++rows_ * kTimeseriesRowBytes > kMaxTimeseriesBytes) {
    refuse_output_size(scenario_, rows_, false);
  }
  write_row(out_, timeseries_columns(), TimeseriesRow{last_, s, area_m2_, zone_}, units_, line_);
  last_ = s;
}

EventsWriter::EventsWriter(std::ostream& out, const Scenario& scenario)
    : out_(out), zone_(scenario.site.zone), units_(scenario.site.units) {
  write_header(out_, events_columns(), units_);
}

void EventsWriter::on_episode(const Episode& e) {
  write_row(out_, events_columns(), EventRow{e, zone_}, units_, line_);
}

SummaryBuilder::SummaryBuilder(const Scenario& scenario) : scenario_(scenario) {}

void SummaryBuilder::on_start(const Sample& s) {
  month_start_ = s;
  min_soc_ = s.soc;
}

PeriodSummary& SummaryBuilder::month_of(double time_s) {
  const std::string label = month_label(floor_instant(time_s), scenario_.site.zone);
  auto it =
      std::lower_bound(months_.begin(), months_.end(), label,
                       [](const PeriodSummary& m, const std::string& l) { return m.label < l; });
  if (it == months_.end() || it->label != label) it = months_.insert(it, PeriodSummary{label});
  return *it;
}

void SummaryBuilder::on_sample(const Sample& s) {
  min_soc_ = std::min(min_soc_, s.soc);
  if (!s.month_end) return;
  // The month is the one the interval ending at s.time lies in.
  PeriodSummary& m = month_of(static_cast<double>(s.time) - 1.0);
  const Accounts& a = s.totals;
  const Accounts& b = month_start_.totals;
  m.rain_depth_m += (a.rain_m3 - b.rain_m3) / scenario_.roof.area_m2;
  m.electrical_J += a.electrical_J - b.electrical_J;
  m.overflow_m3 += a.overflow_m3() - b.overflow_m3();
  m.dribble_m3 += a.dribble_m3 - b.dribble_m3;
  m.nozzle_m3 += a.nozzle_m3 - b.nozzle_m3;
  month_start_ = s;
}

void SummaryBuilder::on_episode(const Episode& e) {
  if (e.kind == EpisodeKind::cycle) {
    ++month_of(e.start_s).cycles;
    cycle_energy_J_ += e.energy_J;
    ++cycle_count_;
  } else if (e.kind == EpisodeKind::overflow) {
    PeriodSummary& m = month_of(e.start_s);
    ++m.overflow_events;
    m.overflow_s += e.end_s - e.start_s;
    overflows_.push_back(e);
  }
}

const Episode* SummaryBuilder::largest_overflow() const {
  const Episode* largest = nullptr;
  for (const Episode& e : overflows_) {
    if (largest == nullptr || e.volume_m3 > largest->volume_m3) largest = &e;
  }
  return largest;
}

double SummaryBuilder::largest_overflow_m3() const {
  const Episode* e = largest_overflow();
  return e != nullptr ? std::max(0.0, e->volume_m3) : 0.0;
}

long SummaryBuilder::overflow_days() const {
  std::vector<std::string> days;
  const TimeZone& off = scenario_.site.zone;
  for (const Episode& e : overflows_) {
    for (double t = e.start_s;; t += kSecondsPerDay) {
      const double at = std::min(t, e.end_s);
      days.push_back(format_iso8601(floor_instant(at), off).substr(0, 10));
      if (at >= e.end_s) break;
    }
  }
  std::sort(days.begin(), days.end());
  return static_cast<long>(std::unique(days.begin(), days.end()) - days.begin());
}

double SummaryBuilder::energy_per_cycle_J() const {
  return cycle_count_ > 0 ? cycle_energy_J_ / static_cast<double>(cycle_count_) : 0.0;
}

std::string season_label(const std::string& month) {
  int year = std::stoi(month.substr(0, 4));
  const int mo = std::stoi(month.substr(5, 2));
  if (mo == 12) ++year;
  static const char* const kNames[] = {"DJF", "DJF", "MAM", "MAM", "MAM", "JJA",
                                       "JJA", "JJA", "SON", "SON", "SON", "DJF"};
  return std::to_string(year) + " " + kNames[mo - 1];
}

std::vector<PeriodSummary> SummaryBuilder::seasons() const {
  return fold_months([](const std::string& month) { return season_label(month); });
}

std::vector<PeriodSummary> SummaryBuilder::years() const {
  return fold_months([](const std::string& month) { return month.substr(0, 4); });
}

std::vector<PeriodSummary> SummaryBuilder::fold_months(
    const std::function<std::string(const std::string&)>& label_of) const {
  std::vector<PeriodSummary> out;
  for (const PeriodSummary& m : months_) {
    const std::string label = label_of(m.label);
    if (out.empty() || out.back().label != label) out.push_back(PeriodSummary{label});
    PeriodSummary& s = out.back();
    s.rain_depth_m += m.rain_depth_m;
    s.electrical_J += m.electrical_J;
    s.overflow_m3 += m.overflow_m3;
    s.dribble_m3 += m.dribble_m3;
    s.nozzle_m3 += m.nozzle_m3;
    s.cycles += m.cycles;
    s.overflow_events += m.overflow_events;
    s.overflow_s += m.overflow_s;
  }
  return out;
}

std::optional<double> load_served_share(const Accounts& a) {
  const double demand = a.served_J + a.unmet_J;
  if (demand <= 0.0) return std::nullopt;
  return a.served_J / demand;
}

double wettest_dry_intensity_m_per_s(const RainSeries& rain, Instant start, Instant end,
                                     const std::vector<Episode>& overflows) {
  double best = 0.0;
  auto episode = overflows.begin();
  for (const RainPulse& p : rain.pulses) {
    if (p.end <= start || p.start >= end) continue;
    const double t0 = static_cast<double>(p.start);
    const double t1 = static_cast<double>(p.end);
    while (episode != overflows.end() && episode->end_s <= t0) ++episode;
    const bool overflowed = episode != overflows.end() && episode->start_s < t1;
    if (!overflowed) best = std::max(best, p.depth_m / (t1 - t0));
  }
  return best;
}

namespace {

nlohmann::json period_json(const PeriodSummary& p, const char* key) {
  const auto L = json_litres;
  return {{key, p.label},
          {"rain_mm", round_to(p.rain_depth_m * kMmPerM, 4)},
          {"energy_Wh", json_watt_hours(p.electrical_J)},
          {"overflow_L", L(p.overflow_m3)},
          {"dribble_L", L(p.dribble_m3)},
          {"through_nozzle_L", L(p.nozzle_m3)},
          {"cycles", p.cycles},
          {"overflow_events", p.overflow_events},
          {"overflow_hours", round_to(p.overflow_s / kSecondsPerHour, 4)}};
}

}  // namespace

namespace {

using In = SummaryInputs;

double stored_change_m3(const RunResult& r) { return r.final.water_m3() - r.initial.water_m3(); }

template <double Accounts::*member>
double litres(const In& in) {
  return json_litres(in.result.totals.*member);
}

template <double Accounts::*member>
double watt_hours(const In& in) {
  return json_watt_hours(in.result.totals.*member);
}

bool has_set_points(const Scenario& sc) {
  return sc.release.kind == ReleaseKind::bell || sc.release.kind == ReleaseKind::float_valve;
}

constexpr SummaryNumber kSummaryNumbers[] = {
    {"water_L.rain", litres<&Accounts::rain_m3>},
    {"water_L.roof_loss", litres<&Accounts::roof_loss_m3>},
    {"water_L.roof_runoff", litres<&Accounts::roof_runoff_m3>},
    {"water_L.first_flush", litres<&Accounts::first_flush_m3>},
    {"water_L.reservoir_overflow", litres<&Accounts::reservoir_overflow_m3>},
    {"water_L.column_overflow", litres<&Accounts::column_overflow_m3>},
    {"water_L.dribble", litres<&Accounts::dribble_m3>},
    {"water_L.through_nozzle", litres<&Accounts::nozzle_m3>},
    {"water_L.storage_change",
     [](const In& in) { return json_litres(stored_change_m3(in.result)); }},
    {"water_L.balance_error",
     [](const In& in) { return in.result.balance_error_m3 * kLitresPerCubicMetre; }},
    {"water_L.evaporation", litres<&Accounts::evaporation_m3>},
    {"energy_Wh.jet", watt_hours<&Accounts::jet_J>},
    {"energy_Wh.electrical", watt_hours<&Accounts::electrical_J>},
    {"energy_Wh.stored", watt_hours<&Accounts::stored_J>},
    {"energy_Wh.curtailed", watt_hours<&Accounts::curtailed_J>},
    {"energy_Wh.unmet_load", watt_hours<&Accounts::unmet_J>},
    {"energy_Wh.discharge_loss", watt_hours<&Accounts::discharge_loss_J>},
    {"energy_Wh.self_discharge", watt_hours<&Accounts::self_discharge_J>},
    {"siphon.cycles", [](const In& in) { return static_cast<double>(in.result.cycles); }, true},
    {"overflow.events", [](const In& in) { return static_cast<double>(in.result.overflow_events); },
     true},
    {"overflow.hours",
     [](const In& in) { return round_to(in.result.overflow_s / kSecondsPerHour, 4); }},
    {"levels_mm.trigger",
     [](const In& in) {
       return has_set_points(in.scenario) ? in.scenario.release.trigger_level_m * kMmPerM
                                          : detail::kNaN;
     }},
    {"levels_mm.break",
     [](const In& in) {
       return has_set_points(in.scenario) ? in.scenario.release.break_level_m * kMmPerM
                                          : detail::kNaN;
     }},
    {"levels_mm.rim", [](const In& in) { return in.scenario.reservoir.rim_m * kMmPerM; }},
    {"battery.hours_below_half",
     [](const In& in) {
       return round_to(in.result.totals.battery_below_half_s / kSecondsPerHour, 4);
     }},
    {"battery.hours_empty",
     [](const In& in) { return round_to(in.result.totals.battery_empty_s / kSecondsPerHour, 4); }},
    {"battery.load_served_share",
     [](const In& in) {
       const auto share = load_served_share(in.result.totals);
       return share ? round_to(*share, 6) : detail::kNaN;
     }},
    {"standing_water.longest_days",
     [](const In& in) { return round_to(in.result.standing_longest_s / kSecondsPerDay, 4); }},
    {"standing_water.spells_over_7_days",
     [](const In& in) { return static_cast<double>(in.result.standing_spells_over_week); }, true},
    {"standing_water.days_total",
     [](const In& in) { return round_to(in.result.standing_s / kSecondsPerDay, 4); }},
};

}  // namespace

std::span<const SummaryNumber> summary_numbers() { return kSummaryNumbers; }

const SummaryNumber& summary_number(std::string_view key) {
  for (const SummaryNumber& n : kSummaryNumbers) {
    if (n.key == key) return n;
  }
  throw std::out_of_range("summary_numbers() has no key " + std::string(key));
}

void write_summary_json(std::ostream& out, const Scenario& sc, const RainSeries& rain,
                        const RunResult& r, const SummaryBuilder& summary,
                        const RunWarnings& warnings, const RealizationSpread* realizations,
                        const RealizationSpread* resampled) {
  using nlohmann::json;
  const Accounts& a = r.totals;
  const TimeZone& off = sc.site.zone;
  const auto L = json_litres;
  const auto Wh = json_watt_hours;
  json j;
  j["scenario"] = sc.file.filename().string();
  j["site"] = sc.site.name;
  j["start"] = format_iso8601(r.start, off);
  j["end"] = format_iso8601(r.end, off);
  j["roof_area_m2"] = sc.roof.area_m2;
  j["water_L"] = {{"balance_relative_error", r.balance_relative_error}};
  j["energy_Wh"] = {{"shaft", Wh(a.shaft_J)},
                    {"accepted", Wh(a.accepted_J)},
                    {"load_served", Wh(a.served_J)},
                    {"drawn_from_battery", Wh(a.drawn_J)}};
  j["siphon"] = {{"energy_per_cycle_Wh", Wh(summary.energy_per_cycle_J())},
                 {"dribble_episodes", r.dribble_episodes},
                 {"dribble_hours", round_to(r.dribble_s / kSecondsPerHour, 4)}};
  const double runoff = a.roof_runoff_m3 > 0.0 ? a.roof_runoff_m3 : 1.0;
  json largest = nullptr;
  if (const Episode* big = summary.largest_overflow()) {
    largest = {{"start", format_iso8601(floor_instant(big->start_s), off)},
               {"end", format_iso8601(floor_instant(big->end_s), off)},
               {"volume_L", L(big->volume_m3)},
               {"peak_flow_L_per_s", round_to(big->peak_flow_m3_per_s * kLitresPerCubicMetre, 6)}};
  }
  j["overflow"] = {
      {"days", summary.overflow_days()},
      {"largest", largest},
      {"wettest_interval_without_overflow_mm_per_h",
       round_to(wettest_dry_intensity_m_per_s(rain, r.start, r.end, summary.overflows()) *
                    kSecondsPerHour * kMmPerM,
                4)},
      {"share_of_runoff", round_to(a.overflow_m3() / runoff, 6)},
      {"dribble_share_of_runoff", round_to(a.dribble_m3 / runoff, 6)}};
  const double cap = sc.battery.capacity_J;
  j["battery"] = {
      {"capacity_Wh", Wh(cap)},
      {"initial_soc", round_to(cap > 0 ? r.initial.battery_J / cap : 0.0, 6)},
      {"final_soc", round_to(cap > 0 ? r.final.battery_J / cap : 0.0, 6)},
      {"min_soc", round_to(summary.min_soc(), 6)},
      {"chemistry",
       sc.battery.chemistry ? json(battery_chemistry_name(*sc.battery.chemistry)) : json()},
      {"cut_soc", sc.battery.min_soc},
      {"reconnect_soc", reconnect_soc(sc.battery)}};
  json coverage = json::array();
  for (const MonthCoverage& m : month_coverage(rain, r.start, r.end, off)) {
    coverage.push_back({{"month", m.month}, {"fraction", round_to(m.fraction, 6)}});
  }
  j["rain"] = {{"depth_mm", round_to(a.rain_m3 / sc.roof.area_m2 * kMmPerM, 6)},
               {"record_depth_mm", round_to(rain.total_depth_m * kMmPerM, 6)},
               {"gaps", rain.gaps.size()},
               {"coverage", coverage},
               {"warnings", rain.warnings}};
  j["solver"] = {{"steps", r.stats.steps},
                 {"switches", r.stats.switches},
                 {"segments", r.stats.segments},
                 {"coasted_hours", round_to(r.stats.coasted_s / kSecondsPerHour, 4)},
                 {"skipped_hours", round_to(r.stats.skipped_s / kSecondsPerHour, 4)},
                 {"rtol", sc.simulation.rtol}};
  j["warnings"] = {{"run", warnings.run}, {"design", warnings.design}};
  // The numbers the report reads, each by its one definition.
  const SummaryInputs inputs{sc, r, summary};
  for (const SummaryNumber& n : summary_numbers()) {
    std::string pointer(n.key);
    std::replace(pointer.begin(), pointer.end(), '.', '/');
    const double v = n.value(inputs);
    json& at = j[json::json_pointer("/" + pointer)];
    if (std::isnan(v)) {
      at = nullptr;
    } else if (n.count) {
      at = std::llround(v);
    } else {
      at = v;
    }
  }
  json months = json::array();
  for (const PeriodSummary& m : summary.months()) months.push_back(period_json(m, "month"));
  j["months"] = months;
  json seasons = json::array();
  for (const PeriodSummary& m : summary.seasons()) seasons.push_back(period_json(m, "season"));
  j["seasons"] = seasons;
  json years = json::array();
  for (const PeriodSummary& m : summary.years()) years.push_back(period_json(m, "year"));
  j["years"] = years;
  if (realizations) {
    const auto spread = [](const Spread& x) {
      return json{
          {"p10", round_to(x.p10, 6)}, {"p50", round_to(x.p50, 6)}, {"p90", round_to(x.p90, 6)}};
    };
    // Each metric's spread (kRealizationColumns) into `into`.
    const auto spreads = [&](const RealizationSpread& z, json& into) {
      for (const RealizationColumn& c : kRealizationColumns) into[c.key] = spread(z.*(c.spread));
    };
    const RealizationSpread& z = *realizations;
    json& block = j["realizations"];
    block = {{"n", z.n},
             {"seeds", {z.first_seed, z.first_seed + (z.n - 1)}},
             {"percentiles", kPercentileDefinition}};
    spreads(z, block);
    if (resampled) {
      json& more = block["calibration_resampled"];
      more = {{"n", resampled->n}, {"resampled", kCalibrationResample}};
      spreads(*resampled, more);
    }
  }
  // File names and --set values may hold any bytes: those that are not UTF-8 are shown as U+FFFD.
  out << j.dump(2, ' ', false, decltype(j)::error_handler_t::replace) << '\n';
}

void print_summary_table(std::ostream& out, const Scenario& sc, const RainSeries& rain,
                         const RunResult& r, const SummaryBuilder& summary,
                         const RealizationSpread* realizations,
                         const RealizationSpread* resampled) {
  const Accounts& a = r.totals;
  const TimeZone& off = sc.site.zone;
  const auto row = [&](const std::string& label, const std::string& value,
                       const std::string& unit) {
    out << "  " << std::left << std::setw(34) << label << std::right << std::setw(14) << value
        << "  " << unit << '\n';
  };
  // A quantity given in SI (`unit` as in a column name: L, mm_per_h), shown in the scenario's
  // units.
  const UnitSystem units = sc.site.units;
  const auto qty = [&](const std::string& label, double in_si, std::string_view si_unit) {
    const InUnits v = in_units(units, in_si, si_unit);
    row(label, detail::on_terminal(v.value), unit_label(v.unit));
  };
  const auto L = [&](const std::string& label, double m3) {
    qty(label, m3 * kLitresPerCubicMetre, "L");
  };
  out << sc.site.name << ": " << format_iso8601(r.start, off) << " to "
      << format_iso8601(r.end, off) << '\n';
  out << " water\n";
  L("rain on the roof", a.rain_m3);
  L("roof losses", a.roof_loss_m3);
  L("roof runoff", a.roof_runoff_m3);
  L("first flush diverted", a.first_flush_m3);
  L("reservoir overflow", a.reservoir_overflow_m3);
  if (sc.head_column) L("head column overflow", a.column_overflow_m3);
  L("through the nozzle", a.nozzle_m3);
  L("  of which dribble", a.dribble_m3);
  L("evaporated", a.evaporation_m3);
  L("storage change", r.final.water_m3() - r.initial.water_m3());
  row("balance error (relative)", detail::on_terminal(r.balance_relative_error), "");
  // Every share is of roof runoff, as on the report page.
  const double runoff = a.roof_runoff_m3 > 0.0 ? a.roof_runoff_m3 : 1.0;
  out << " shares of roof runoff\n";
  row("through the nozzle", detail::on_terminal(100.0 * a.nozzle_m3 / runoff), "%");
  row("  of which dribble", detail::on_terminal(100.0 * a.dribble_m3 / runoff), "%");
  row("overflow (rim and head column)", detail::on_terminal(100.0 * a.overflow_m3() / runoff), "%");
  out << " energy\n";
  row("jet", detail::on_terminal(a.jet_J / kJoulesPerWh), "Wh");
  row("electrical (generator out)", detail::on_terminal(a.electrical_J / kJoulesPerWh), "Wh");
  row("stored in the battery", detail::on_terminal(a.stored_J / kJoulesPerWh), "Wh");
  row("curtailed (battery full)", detail::on_terminal(a.curtailed_J / kJoulesPerWh), "Wh");
  row("load served", detail::on_terminal(a.served_J / kJoulesPerWh), "Wh");
  row("load unmet (cut at the minimum)", detail::on_terminal(a.unmet_J / kJoulesPerWh), "Wh");
  row("battery discharge loss", detail::on_terminal(a.discharge_loss_J / kJoulesPerWh), "Wh");
  row("battery self-discharge", detail::on_terminal(a.self_discharge_J / kJoulesPerWh), "Wh");
  out << " release and overflow\n";
  row("siphon cycles", std::to_string(r.cycles), "");
  row("energy per cycle", detail::on_terminal(summary.energy_per_cycle_J() / kJoulesPerWh), "Wh");
  row("dribble episodes", std::to_string(r.dribble_episodes), "");
  row("dribble time", detail::on_terminal(r.dribble_s / kSecondsPerHour), "h");
  row("overflow episodes", std::to_string(r.overflow_events), "");
  row("overflow time", detail::on_terminal(r.overflow_s / kSecondsPerHour), "h");
  row("days with overflow", std::to_string(summary.overflow_days()), "");
  L("largest overflow episode", summary.largest_overflow_m3());
  qty("wettest interval without overflow",
      wettest_dry_intensity_m_per_s(rain, r.start, r.end, summary.overflows()) * kSecondsPerHour *
          kMmPerM,
      "mm_per_h");
  out << " standing water (over 1 mm deep, release not running)\n";
  row("longest spell", detail::on_terminal(r.standing_longest_s / kSecondsPerDay), "days");
  row("spells over 7 days", std::to_string(r.standing_spells_over_week), "");
  row("days in all", detail::on_terminal(r.standing_s / kSecondsPerDay), "days");
  out << " battery\n";
  row("state of charge, lowest", detail::on_terminal(summary.min_soc() * 100.0), "%");
  row("time below half charge", detail::on_terminal(a.battery_below_half_s / kSecondsPerHour), "h");
  row("time empty (load cut)", detail::on_terminal(a.battery_empty_s / kSecondsPerHour), "h");
  const auto share = load_served_share(a);
  row("share of the load served", share ? detail::on_terminal(*share * 100.0) : "-",
      share ? "%" : "");
  if (realizations) {
    const RealizationSpread& z = *realizations;
    const RealizationMetrics own_metrics = realization_metrics(r);
    // A row for each metric: this run's figure when `own`, then the spread's median and range.
    const auto rows = [&](const RealizationSpread& spread, const RealizationMetrics* own) {
      for (const RealizationColumn& c : kRealizationColumns) {
        const Spread& x = spread.*(c.spread);
        const auto in = [&](double v) {
          return detail::on_terminal(column_value(units, c.key, v));
        };
        out << "  " << std::left << std::setw(34) << c.label << std::right << std::setw(14)
            << (own ? in(own->*(c.value)) : "") << std::setw(10) << in(x.p50) << std::setw(10)
            << in(x.p10) << " to " << std::left << std::setw(9) << in(x.p90) << std::right
            << unit_in(units, c.unit) << '\n';
      }
    };
    out << " realizations: " << z.n << " disaggregations of the record (seeds " << z.first_seed
        << " to " << z.first_seed + (z.n - 1) << "; this run is the first)\n";
    out << "  " << std::string(34, ' ') << "      this run    median      P10 to P90\n";
    rows(z, &own_metrics);
    out << "  (P10, median and P90 of the " << z.n << " runs: " << kPercentileDefinition << ")\n";
    if (resampled) {
      out << " with the calibration record resampled: " << resampled->n
          << " more runs with the same seeds, each on\n  " << kCalibrationResample << "\n";
      out << "  " << std::string(34, ' ') << "                median      P10 to P90\n";
      rows(*resampled, nullptr);
      out << "  (the range to quote: it holds what one short calibration record leaves unknown\n"
             "  as well as the draws, and is still the least the estimate is unsure by: README,\n"
             "  \"How sure the range is\")\n";
    }
  }
  const auto periods = [&](const char* title, const std::vector<PeriodSummary>& list) {
    out << " by " << title << "\n";
    const auto in = [&](double in_si, std::string_view si_unit) {
      return detail::on_terminal(in_units(units, in_si, si_unit).value);
    };
    const std::string rain = "rain " + unit_in(units, "mm");
    const std::string litres = unit_in(units, "L");
    const std::string overflow = "overflow " + litres;
    const std::string dribble = "dribble " + litres;
    // At least two spaces before a heading.
    const auto width = [](const std::string& heading, std::size_t least) {
      return static_cast<int>(std::max(least, heading.size() + 2));
    };
    const int w_overflow = width(overflow, 13);
    const int w_dribble = width(dribble, 12);
    out << "  " << std::left << std::setw(10) << title << std::right << std::setw(9) << rain
        << "  energy Wh   cycles  overflows" << std::setw(w_overflow) << overflow
        << std::setw(w_dribble) << dribble << '\n';
    for (const PeriodSummary& m : list) {
      out << "  " << std::left << std::setw(10) << m.label << std::right << std::setw(9)
          << in(m.rain_depth_m * kMmPerM, "mm") << std::setw(11)
          << detail::on_terminal(m.electrical_J / kJoulesPerWh) << std::setw(9) << m.cycles
          << std::setw(11) << m.overflow_events << std::setw(w_overflow)
          << in(m.overflow_m3 * kLitresPerCubicMetre, "L") << std::setw(w_dribble)
          << in(m.dribble_m3 * kLitresPerCubicMetre, "L") << '\n';
    }
  };
  // A long run's months would fill the screen: they stay in summary.json.
  const auto seasons = summary.seasons();
  if (summary.months().size() <= 24) periods("month", summary.months());
  if (seasons.size() <= 16) {
    periods("season", seasons);
  } else {
    periods("year", summary.years());
    out << "  (months and seasons are in summary.json)\n";
  }
}

}  // namespace gutterwatt
