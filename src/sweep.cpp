#include "gutterwatt/sweep.hpp"

#include <algorithm>
#include <charconv>
#include <chrono>
#include <cmath>
#include <condition_variable>
#include <exception>
#include <mutex>
#include <nlohmann/json.hpp>
#include <optional>
#include <sstream>
#include <stdexcept>
#include <thread>

#include "detail.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/output_folder.hpp"
#include "gutterwatt/report.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt {
namespace {

const std::string kVaryLabel = "--vary";
// Relative tolerance for reaching TO in a range, against float noise in FROM + i * STEP.
constexpr double kRangeTolerance = 1e-9;
// More decimals than a range spec can sensibly ask for.
constexpr int kMaxRangeDecimals = 30;

/// One metric column: its name, where it lives and its natural order.
struct MetricColumn {
  std::string_view name;
  double SweepMetrics::*member;
  bool lower_is_better;
};

constexpr MetricColumn kMetrics[] = {
    {"energy_Wh", &SweepMetrics::energy_Wh, false},
    {"overflow_L", &SweepMetrics::overflow_L, true},
    {"dribble_L", &SweepMetrics::dribble_L, true},
    {"cycles", &SweepMetrics::cycles, false},
    {"overflow_events", &SweepMetrics::overflow_events, true},
    {"overflow_hours", &SweepMetrics::overflow_hours, true},
    {"curtailed_Wh", &SweepMetrics::curtailed_Wh, true},
    {"jet_Wh", &SweepMetrics::jet_Wh, false},
    {"stored_Wh", &SweepMetrics::stored_Wh, false},
    {"unmet_load_Wh", &SweepMetrics::unmet_load_Wh, true},
    {"dribble_share", &SweepMetrics::dribble_share, true},
    {"overflow_days", &SweepMetrics::overflow_days, true},
    {"largest_overflow_L", &SweepMetrics::largest_overflow_L, true},
    {"standing_longest_days", &SweepMetrics::standing_longest_days, true},
    {"standing_spells_over_7_days", &SweepMetrics::standing_spells_over_7_days, true},
};

/// The metric named `name` in either system of units (`overflow_L` or `overflow_gal`).
const MetricColumn* find_metric(std::string_view name) {
  for (const MetricColumn& m : kMetrics) {
    if (m.name == name || column_name(UnitSystem::us, m.name) == name) return &m;
  }
  return nullptr;
}

using detail::to_number;

/// Decimals a number's text asks for: `0.25` 2, `5` 0, `1e-3` 3, `2.5e1` 0.
int decimals_of(std::string_view text) {
  const std::size_t e = text.find_first_of("eE");
  const std::string_view mantissa = text.substr(0, e);
  const std::size_t dot = mantissa.find('.');
  int decimals = dot == std::string_view::npos ? 0 : static_cast<int>(mantissa.size() - dot - 1);
  if (e != std::string_view::npos) {
    if (const auto exponent = to_number(text.substr(e + 1))) {
      decimals -= static_cast<int>(std::clamp(*exponent, -1000.0, 1000.0));
    }
  }
  return std::clamp(decimals, 0, kMaxRangeDecimals);
}

std::vector<std::string> range_values(const std::string& key, const std::string& body) {
  std::vector<std::string> parts;
  std::size_t begin = 0;
  while (true) {
    const std::size_t colon = body.find(':', begin);
    parts.push_back(std::string(detail::trim(std::string_view(body).substr(begin, colon - begin))));
    if (colon == std::string::npos) break;
    begin = colon + 1;
  }
  std::optional<double> from, to, step;
  if (parts.size() == 3) {
    from = to_number(parts[0]);
    to = to_number(parts[1]);
    step = to_number(parts[2]);
  }
  if (!from || !to || !step) {
    throw InputError(kVaryLabel, 0, key,
                     "expected FROM:TO:STEP with three numbers (got \"" + body + "\")");
  }
  if (*step <= 0.0) {
    throw InputError(kVaryLabel, 0, key, "the step must be greater than 0 (got " + parts[2] + ")");
  }
  if (*from > *to) {
    throw InputError(kVaryLabel, 0, key,
                     "the range runs backwards (from " + parts[0] + " to " + parts[1] +
                         "); FROM must not exceed TO");
  }
  const double tolerance =
      kRangeTolerance * std::max({std::abs(*from), std::abs(*to), std::abs(*step)});
  const double count = std::floor((*to - *from + tolerance) / *step) + 1.0;
  if (count > static_cast<double>(kMaxSweepCombinations)) {
    throw InputError(kVaryLabel, 0, key,
                     detail::fixed_trimmed(count, 0) + " values; a sweep is limited to " +
                         std::to_string(kMaxSweepCombinations) + " combinations");
  }
  const int decimals =
      std::max({decimals_of(parts[0]), decimals_of(parts[1]), decimals_of(parts[2])});
  std::vector<std::string> values;
  for (std::size_t i = 0;; ++i) {
    const double v = *from + static_cast<double>(i) * *step;
    if (v > *to + tolerance) break;
    values.push_back(detail::fixed_trimmed(v, decimals));
  }
  return values;
}

std::vector<std::string> list_values(const std::string& key, const std::string& body) {
  std::vector<std::string> values;
  std::size_t begin = 0;
  while (true) {
    const std::size_t comma = body.find(',', begin);
    std::string value =
        std::string(detail::trim(std::string_view(body).substr(begin, comma - begin)));
    if (value.empty()) {
      throw InputError(kVaryLabel, 0, key, "empty value in the list \"" + body + "\"");
    }
    if (std::find(values.begin(), values.end(), value) != values.end()) {
      throw InputError(kVaryLabel, 0, key, "the value \"" + value + "\" is listed twice");
    }
    values.push_back(std::move(value));
    if (comma == std::string::npos) break;
    begin = comma + 1;
  }
  return values;
}

/// `key` of a `key=value` override.
std::string override_key(const std::string& text) {
  return std::string(detail::trim(text.substr(0, text.find('='))));
}

/// The metrics of several runs: each metric's median (Hyndman & Fan type 7, as realizations).
SweepMetrics median_metrics(const std::vector<SweepMetrics>& runs) {
  SweepMetrics out;
  for (const MetricColumn& m : kMetrics) {
    std::vector<double> values;
    for (const SweepMetrics& run : runs) values.push_back(run.*(m.member));
    out.*(m.member) = percentile(values, 0.5);
  }
  return out;
}

/// Runs one combination on each record. Interrupted (and anything unexpected) propagates.
SweepRow run_combination(const SweepPlan& plan, std::size_t cell,
                         std::span<const RainSeries> records, const SweepOptions& options,
                         const RunOptions& run_options) {
  SweepRow row;
  row.cell = cell;
  row.site = plan.site_of(cell);
  row.values = plan.combinations[cell % plan.combinations.size()];
  try {
    const Scenario scenario = parse_scenario(plan.scenario_text, plan.scenario_label, plan.base_dir,
                                             plan.overrides(cell));
    std::vector<SweepMetrics> runs;
    for (const RainSeries& rain : records) {
      SummaryBuilder summary(scenario);
      const RunResult result = options.simulate
                                   ? options.simulate(scenario, rain, summary, run_options)
                                   : simulate(scenario, rain, summary, run_options);
      runs.push_back(sweep_metrics(result, summary));
    }
    row.metrics = runs.size() == 1 ? runs.front() : median_metrics(runs);
    if (runs.size() > 1) {
      std::vector<double> ranked;
      for (const SweepMetrics& run : runs) ranked.push_back(sweep_metric(run, plan.rank.metric));
      row.rank_spread = spread_of(ranked);
    }
  } catch (const InputError& e) {
    row.status = SweepStatus::skipped;
    row.reason = e.what();
  } catch (const SimulationError& e) {
    row.status = SweepStatus::failed;
    row.reason = e.what();
  }
  return row;
}

/// The column of `sites` that holds `key`, counted from 1 as a spreadsheet shows it.
std::string column_label(const SweepSites& sites, std::size_t key_index) {
  return "column " + std::to_string(key_index + 2) + " (" + sites.keys[key_index] + ")";
}

/// Checks the sites against the plan's --set keys and loads each site's scenario.
void add_sites(SweepPlan& plan, const SweepSites& sites) {
  for (std::size_t k = 0; k < sites.keys.size(); ++k) {
    for (const std::string& set : plan.base_overrides) {
      if (override_key(set) == sites.keys[k]) {
        throw InputError(sites.file, 1, column_label(sites, k),
                         "is also given with --set; give it per site or set it, not both");
      }
    }
  }
  const double cells =
      static_cast<double>(sites.sites.size()) * static_cast<double>(plan.combinations.size());
  if (cells > static_cast<double>(kMaxSweepCombinations)) {
    throw InputError(sites.file, 0, "",
                     std::to_string(sites.sites.size()) + " sites by " +
                         std::to_string(plan.combinations.size()) +
                         " combinations; a sweep is limited to " +
                         std::to_string(kMaxSweepCombinations));
  }
  for (const SweepSite& site : sites.sites) {
    std::vector<std::string> overrides = plan.base_overrides;
    overrides.insert(overrides.end(), site.overrides.begin(), site.overrides.end());
    try {
      plan.site_scenarios.push_back(
          parse_scenario(plan.scenario_text, plan.scenario_label, plan.base_dir, overrides));
    } catch (const InputError& e) {
      // The loader names the key it rejects (or one inside it); name that key's column.
      for (std::size_t k = 0; k < sites.keys.size(); ++k) {
        const std::string& key = sites.keys[k];
        if (e.field() == key || e.field().rfind(key + ".", 0) == 0 ||
            e.field().rfind(key + "[", 0) == 0) {
          throw InputError(sites.file, site.line, column_label(sites, k),
                           "site " + site.name + ": " + e.message());
        }
      }
      throw InputError(sites.file, site.line, "", "site " + site.name + ": " + e.text());
    }
  }
  plan.sites = sites.sites;
  plan.sites_file = sites.file;
  plan.sites_text = sites.text;
}

}  // namespace

SweepAxis parse_vary(const std::string& spec) {
  const std::size_t eq = spec.find('=');
  SweepAxis axis;
  if (eq != std::string::npos)
    axis.key = std::string(detail::trim(std::string_view(spec).substr(0, eq)));
  if (axis.key.empty()) {
    throw InputError(kVaryLabel, 0, "",
                     "expected KEY=FROM:TO:STEP or KEY=v1,v2,... (got \"" + spec + "\")");
  }
  const std::string body = std::string(detail::trim(std::string_view(spec).substr(eq + 1)));
  if (body.empty()) throw InputError(kVaryLabel, 0, axis.key, "no values after \"=\"");
  const bool is_range = body.find(',') == std::string::npos && body.find(':') != std::string::npos;
  axis.values = is_range ? range_values(axis.key, body) : list_values(axis.key, body);
  return axis;
}

std::vector<std::vector<std::string>> expand_combinations(const std::vector<SweepAxis>& axes) {
  double count = 1.0;
  for (const SweepAxis& axis : axes) count *= static_cast<double>(axis.values.size());
  if (count > static_cast<double>(kMaxSweepCombinations)) {
    throw InputError(kVaryLabel, 0, "",
                     detail::fixed_trimmed(count, 0) + " combinations; a sweep is limited to " +
                         std::to_string(kMaxSweepCombinations));
  }
  std::vector<std::vector<std::string>> out;
  if (axes.empty() || count == 0.0) return out;
  std::vector<std::size_t> at(axes.size(), 0);
  while (true) {
    std::vector<std::string> combination;
    for (std::size_t k = 0; k < axes.size(); ++k) combination.push_back(axes[k].values[at[k]]);
    out.push_back(std::move(combination));
    std::size_t k = axes.size();
    while (k > 0) {
      --k;
      if (++at[k] < axes[k].values.size()) break;
      at[k] = 0;
      if (k == 0) return out;
    }
  }
}

SweepMetrics sweep_metrics(const RunResult& r, const SummaryBuilder& summary) {
  const Accounts& a = r.totals;
  SweepMetrics m;
  m.energy_Wh = a.electrical_J / kJoulesPerWh;
  m.overflow_L = a.overflow_m3() * kLitresPerCubicMetre;
  m.dribble_L = a.dribble_m3 * kLitresPerCubicMetre;
  m.cycles = static_cast<double>(r.cycles);
  m.overflow_events = static_cast<double>(r.overflow_events);
  m.overflow_hours = r.overflow_s / kSecondsPerHour;
  m.curtailed_Wh = a.curtailed_J / kJoulesPerWh;
  m.jet_Wh = a.jet_J / kJoulesPerWh;
  m.stored_Wh = a.stored_J / kJoulesPerWh;
  m.unmet_load_Wh = a.unmet_J / kJoulesPerWh;
  m.dribble_share = a.roof_runoff_m3 > 0.0 ? a.dribble_m3 / a.roof_runoff_m3 : 0.0;
  m.overflow_days = static_cast<double>(summary.overflow_days());
  m.largest_overflow_L = summary.largest_overflow_m3() * kLitresPerCubicMetre;
  m.standing_longest_days = r.standing_longest_s / kSecondsPerDay;
  m.standing_spells_over_7_days = static_cast<double>(r.standing_spells_over_week);
  return m;
}

std::vector<std::string> sweep_metric_names() {
  std::vector<std::string> names;
  for (const MetricColumn& m : kMetrics) names.emplace_back(m.name);
  return names;
}

std::string_view sweep_status_name(SweepStatus status) {
  switch (status) {
    case SweepStatus::ok:
      return "ok";
    case SweepStatus::skipped:
      return "skipped";
    case SweepStatus::failed:
      return "failed";
  }
  return "ok";
}

double& sweep_metric(SweepMetrics& metrics, std::string_view name) {
  const MetricColumn* m = find_metric(name);
  if (m == nullptr) throw std::out_of_range("no sweep metric named " + std::string(name));
  return metrics.*(m->member);
}

double sweep_metric(const SweepMetrics& metrics, std::string_view name) {
  const MetricColumn* m = find_metric(name);
  if (m == nullptr) throw std::out_of_range("no sweep metric named " + std::string(name));
  return metrics.*(m->member);
}

SweepRank parse_rank(const std::string& text) {
  std::string_view name = text;
  std::optional<bool> forced_descending;
  if (!name.empty() && (name.front() == '-' || name.front() == '+')) {
    forced_descending = name.front() == '-';
    name.remove_prefix(1);
  }
  const MetricColumn* m = find_metric(name);
  if (m == nullptr) {
    std::string names;
    for (const MetricColumn& c : kMetrics)
      names += (names.empty() ? "" : ", ") + std::string(c.name);
    throw InputError("", 0, "--rank",
                     "unknown metric \"" + text + "\"; expected one of " + names +
                         " (with - or + in front to force descending or ascending)");
  }
  return SweepRank{std::string(m->name), forced_descending.value_or(!m->lower_is_better)};
}

std::string format_metric(double value) {
  if (value == 0.0) return "0";
  char buf[64];
  const auto [end, ec] = std::to_chars(buf, buf + sizeof buf, value);
  return ec == std::errc() ? std::string(buf, end) : std::string("nan");
}

std::vector<std::string> SweepPlan::overrides(std::size_t cell) const {
  std::vector<std::string> out = base_overrides;
  if (!sites.empty()) {
    const std::vector<std::string>& site = sites[site_of(cell)].overrides;
    out.insert(out.end(), site.begin(), site.end());
  }
  const std::vector<std::string>& combination = combinations[cell % combinations.size()];
  for (std::size_t k = 0; k < axes.size(); ++k) out.push_back(axes[k].key + "=" + combination[k]);
  return out;
}

SweepPlan plan_sweep(std::string scenario_text, const std::string& scenario_label,
                     const std::filesystem::path& base_dir,
                     const std::vector<std::string>& vary_specs,
                     const std::vector<std::string>& base_overrides, const std::string& rank_text,
                     const SweepSites* sites) {
  if (vary_specs.empty()) {
    throw InputError(kVaryLabel, 0, "",
                     "give at least one key to vary, as KEY=FROM:TO:STEP or KEY=v1,v2,...");
  }
  SweepPlan plan;
  for (const std::string& spec : vary_specs) {
    SweepAxis axis = parse_vary(spec);
    check_scenario_key(axis.key, kVaryLabel);
    if (axis.key == "rain" || axis.key.rfind("rain.", 0) == 0) {
      throw InputError(kVaryLabel, 0, axis.key,
                       "the rain record is read once for the whole sweep, so keys under rain. "
                       "cannot be varied; sweep each record separately");
    }
    for (const SweepAxis& other : plan.axes) {
      if (other.key == axis.key) throw InputError(kVaryLabel, 0, axis.key, "is varied twice");
    }
    for (const std::string& set : base_overrides) {
      if (override_key(set) == axis.key) {
        throw InputError(kVaryLabel, 0, axis.key,
                         "is also given with --set; vary it or set it, not both");
      }
    }
    if (sites != nullptr &&
        std::find(sites->keys.begin(), sites->keys.end(), axis.key) != sites->keys.end()) {
      throw InputError(kVaryLabel, 0, axis.key,
                       "is also a column of " + sites->file + "; vary it or give it per site");
    }
    plan.axes.push_back(std::move(axis));
  }
  plan.rank = parse_rank(rank_text);
  plan.combinations = expand_combinations(plan.axes);
  plan.base = parse_scenario(scenario_text, scenario_label, base_dir, base_overrides);
  plan.scenario_text = std::move(scenario_text);
  plan.scenario_label = scenario_label;
  plan.base_dir = base_dir;
  plan.base_overrides = base_overrides;
  if (sites != nullptr) add_sites(plan, *sites);
  return plan;
}

namespace {

/// Runs cells [first, end) of `plan` on `records` into `out[0 .. end - first)` on the worker
/// threads; progress counts `done_before` cells done already out of `total`.
void run_cells(const SweepPlan& plan, std::size_t first, std::size_t end,
               std::span<const RainSeries> records, const SweepOptions& options, SweepRow* out,
               std::size_t done_before, std::size_t total,
               std::chrono::steady_clock::time_point started) {
  using Clock = std::chrono::steady_clock;
  const std::size_t n = end - first;
  const std::size_t jobs = worker_threads(options.jobs, n);
  const auto user_stop = [&] { return options.stop != nullptr && options.stop->load(); };

  // Workers stop on `halt`: set for the user's stop and for an unexpected error.
  std::atomic<bool> halt{false};
  std::atomic<std::size_t> next{0};
  std::mutex mutex;
  std::condition_variable changed;
  std::size_t done = 0;
  std::size_t running = jobs;
  bool interrupted = false;
  std::exception_ptr error;

  const auto worker = [&] {
    RunOptions run_options;
    run_options.stop = &halt;
    try {
      while (!halt.load() && !user_stop()) {
        const std::size_t i = next.fetch_add(1);
        if (i >= n) break;
        SweepRow row = run_combination(plan, first + i, records, options, run_options);
        const std::lock_guard<std::mutex> lock(mutex);
        out[i] = std::move(row);
        ++done;
        changed.notify_all();
      }
    } catch (const Interrupted&) {
      const std::lock_guard<std::mutex> lock(mutex);
      interrupted = true;
    } catch (...) {
      const std::lock_guard<std::mutex> lock(mutex);
      if (!error) error = std::current_exception();
      halt.store(true);
    }
    const std::lock_guard<std::mutex> lock(mutex);
    --running;
    changed.notify_all();
  };

  std::vector<std::thread> threads;
  try {
    for (std::size_t j = 0; j < jobs; ++j) threads.emplace_back(worker);
  } catch (...) {
    halt.store(true);
    for (std::thread& t : threads) t.join();
    throw;
  }
  {
    std::unique_lock<std::mutex> lock(mutex);
    std::size_t reported = 0;
    bool first_report = true;
    while (true) {
      changed.wait_for(lock, std::chrono::milliseconds(50));
      if (user_stop()) halt.store(true);
      if (options.progress && (first_report || done != reported) && !halt.load()) {
        first_report = false;
        reported = done;
        const SweepProgress p{done_before + done, total,
                              std::chrono::duration<double>(Clock::now() - started).count()};
        lock.unlock();
        try {
          options.progress(p);
        } catch (...) {
          lock.lock();
          if (!error) error = std::current_exception();
          halt.store(true);
          continue;
        }
        lock.lock();
        if (user_stop()) halt.store(true);
      }
      if (running == 0) break;
    }
  }
  for (std::thread& t : threads) t.join();
  if (error) std::rethrow_exception(error);
  if (interrupted || user_stop()) throw Interrupted();
}

}  // namespace

SweepResult run_sweep(const SweepPlan& plan, std::span<const RainSeries> realizations,
                      const SweepOptions& options) {
  SweepResult result;
  result.realizations = realizations.size();
  const std::size_t n = plan.cell_count();
  result.rows.resize(n);
  run_cells(plan, 0, n, realizations, options, result.rows.data(), 0, n,
            std::chrono::steady_clock::now());
  finish_sweep(plan, result);
  return result;
}

SweepResult run_sweep_sites(const SweepPlan& plan, const SiteRecords& records,
                            const SweepOptions& options, std::size_t first, std::size_t end) {
  const auto started = std::chrono::steady_clock::now();
  end = std::min(end, plan.cell_count());
  first = std::min(first, end);
  SweepResult result;
  result.rows.resize(end - first);
  for (std::size_t cell = first; cell < end;) {
    const std::size_t site = plan.site_of(cell);
    const std::size_t site_end = std::min(end, (site + 1) * plan.combinations.size());
    const std::vector<RainSeries> site_records = records(site);
    result.realizations = site_records.size();
    run_cells(plan, cell, site_end, site_records, options, result.rows.data() + (cell - first),
              cell - first, end - first, started);
    cell = site_end;
  }
  finish_sweep(plan, result);
  return result;
}

void finish_sweep(const SweepPlan& plan, SweepResult& result) {
  result.skipped = 0;
  result.failed = 0;
  for (const SweepRow& row : result.rows) {
    if (row.status == SweepStatus::skipped) ++result.skipped;
    if (row.status == SweepStatus::failed) ++result.failed;
  }
  result.ranked = rank_rows(result.rows, plan.rank);
  if (!result.ranked.empty() && result.rows[result.ranked.front()].rank_spread) {
    const Spread best = *result.rows[result.ranked.front()].rank_spread;
    for (const std::size_t i : result.ranked) {
      const double median = result.rows[i].rank_spread->p50;
      result.rows[i].within_best = median >= best.p10 && median <= best.p90;
    }
  }
}

std::vector<std::string> sweep_warnings(const SweepPlan& plan, const SweepResult& result) {
  std::vector<std::string> out;
  const auto varies = [&](std::string_view key) {
    return std::any_of(plan.axes.begin(), plan.axes.end(),
                       [&](const SweepAxis& a) { return a.key == key; });
  };
  if (varies("release.priming_flow_L_per_min") && !varies("release.build") &&
      !varies("drop_pipe.minor_loss_k")) {
    out.push_back(
        "release.priming_flow_L_per_min is a property of a build: what makes a siphon prime at a "
        "lower flow (a restriction at its outlet) also lowers its running flow, which this sweep "
        "holds fixed. Measure builds on the bench (gutterwatt fit) and compare them with --vary "
        "release.build=NAME,NAME (README, \"The bench test\")");
  }
  if (result.ranked.empty()) return out;
  const SweepRow& best = result.rows[result.ranked.front()];
  for (std::size_t a = 0; a < plan.axes.size(); ++a) {
    const SweepAxis& axis = plan.axes[a];
    if (axis.values.size() < 3) continue;
    std::vector<double> numbers;
    for (const std::string& v : axis.values) {
      const std::optional<double> x = detail::to_number(v);
      if (!x) break;
      numbers.push_back(*x);
    }
    if (numbers.size() != axis.values.size()) continue;
    const double value = *detail::to_number(best.values[a]);
    const auto [lo, hi] = std::minmax_element(numbers.begin(), numbers.end());
    if (value != *lo && value != *hi) continue;
    out.push_back("the best " + axis.key + " is the " + (value == *hi ? "highest" : "lowest") +
                  " tried (" + best.values[a] + "): extend the range");
  }
  return out;
}

std::vector<std::size_t> rank_rows(const std::vector<SweepRow>& rows, const SweepRank& rank) {
  std::vector<std::size_t> order;
  for (std::size_t i = 0; i < rows.size(); ++i) {
    if (rows[i].status == SweepStatus::ok) order.push_back(i);
  }
  const MetricColumn* m = find_metric(rank.metric);
  if (m == nullptr) throw std::out_of_range("no sweep metric named " + rank.metric);
  const auto value = [&](std::size_t i) { return rows[i].metrics.*(m->member); };
  std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
    return rank.descending ? value(a) > value(b) : value(a) < value(b);
  });
  return order;
}

void write_sweep_csv(std::ostream& out, const SweepPlan& plan, const SweepResult& result) {
  const UnitSystem units = plan.base.site.units;
  const auto cell = [&](std::string_view metric, double v) {
    return format_metric(column_value(units, metric, v));
  };
  const bool sites = !plan.sites.empty();
  std::string header = sites ? "site,site_rank," : "";
  for (const SweepAxis& axis : plan.axes) header += detail::csv_cell(axis.key) + ",";
  for (const MetricColumn& m : kMetrics) header += column_name(units, m.name) + ",";
  const bool spread = result.realizations > 1;
  const std::string rank = column_name(units, plan.rank.metric);
  if (spread) header += rank + "_p10," + rank + "_p90,within_best_range,";
  header.back() = '\n';
  out << header;
  std::vector<std::size_t> site_rank(plan.site_count(), 0);
  for (const std::size_t i : result.ranked) {
    const SweepRow& row = result.rows[i];
    std::string line;
    if (sites) {
      line += detail::csv_cell(plan.sites[row.site].name) + "," +
              std::to_string(++site_rank[row.site]) + ",";
    }
    for (const std::string& v : row.values) line += detail::csv_cell(v) + ",";
    for (const MetricColumn& m : kMetrics) line += cell(m.name, row.metrics.*(m.member)) + ",";
    if (spread) {
      line += cell(plan.rank.metric, row.rank_spread->p10) + "," +
              cell(plan.rank.metric, row.rank_spread->p90) + (row.within_best ? ",1," : ",0,");
    }
    line.back() = '\n';
    out << line;
  }
}

void write_skipped_csv(std::ostream& out, const SweepPlan& plan, const SweepResult& result) {
  const bool sites = !plan.sites.empty();
  if (sites) out << "site,";
  for (const SweepAxis& axis : plan.axes) out << detail::csv_cell(axis.key) << ',';
  out << "status,reason\n";
  for (const SweepRow& row : result.rows) {
    if (row.status == SweepStatus::ok) continue;
    if (sites) out << detail::csv_cell(plan.sites[row.site].name) << ',';
    for (const std::string& v : row.values) out << detail::csv_cell(v) << ',';
    out << sweep_status_name(row.status) << ',' << detail::csv_cell(row.reason) << '\n';
  }
}

void write_sweep_json(std::ostream& out, const SweepPlan& plan, const SweepResult& result) {
  using nlohmann::ordered_json;
  ordered_json j;
  j["scenario"] = std::filesystem::path(plan.scenario_label).filename().string();
  j["site"] = plan.base.site.name;
  if (!plan.sites.empty()) {
    j["sites"] = std::filesystem::path(plan.sites_file).filename().string();
    ordered_json names = ordered_json::array();
    for (const SweepSite& site : plan.sites) names.push_back(site.name);
    j["site_names"] = names;
  }
  ordered_json vary = ordered_json::array();
  ordered_json values = ordered_json::object();
  for (const SweepAxis& axis : plan.axes) {
    vary.push_back(axis.key);
    values[axis.key] = axis.values;
  }
  j["vary"] = vary;
  j["values"] = values;
  j["set"] = plan.base_overrides;
  // The rank metric as sweep.csv names it, in the units the sweep was written in.
  j["rank"] = column_name(plan.base.site.units, plan.rank.metric);
  j["units"] = unit_system_name(plan.base.site.units);
  j["order"] = plan.rank.descending ? "descending" : "ascending";
  j["combinations"] = result.rows.size();
  j["ran"] = result.ranked.size();
  j["skipped"] = result.skipped;
  j["failed"] = result.failed;
  if (result.realizations > 1) {
    j["realizations"] = result.realizations;
    j["percentiles"] = kPercentileDefinition;
  }
  // File names and --set values may hold any bytes: those that are not UTF-8 are shown as U+FFFD.
  out << j.dump(2, ' ', false, decltype(j)::error_handler_t::replace) << '\n';
}

SweepResult run_sweep_into(const std::filesystem::path& dir, const SweepPlan& plan,
                           std::span<const RainSeries> realizations, const SweepOptions& options) {
  OutputFolder folder(dir);
  SweepResult result = run_sweep(plan, realizations, options);
  write_sweep_files(folder, plan, result);
  return result;
}

bool write_sweep_files(OutputFolder& folder, const SweepPlan& plan, const SweepResult& result) {
  if (result.ranked.empty()) return false;
  write_sweep_csv(folder.open("sweep.csv"), plan, result);
  write_skipped_csv(folder.open("skipped.csv"), plan, result);
  write_sweep_json(folder.open("sweep.json"), plan, result);
  // An earlier report was drawn from the results these replace.
  folder.retire(kReportFile);
  folder.commit();
  return true;
}

}  // namespace gutterwatt
