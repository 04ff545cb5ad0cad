#include "gutterwatt/realizations.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <exception>
#include <string>
#include <thread>

#include "detail.hpp"
#include "gutterwatt/disaggregation.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/fragments.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt {

std::size_t default_realizations(const RainConfig& rain) {
  return rain.disaggregate && is_random(rain.disaggregate->method) ? kDefaultRealizations : 1;
}

std::size_t realization_count(std::size_t asked, const RainConfig& rain) {
  if (asked == 0) return default_realizations(rain);
  if (asked > 1 && default_realizations(rain) == 1) {
    throw InputError(
        "", 0, "--realizations",
        rain.disaggregate
            ? "method: " + std::string(method_name(rain.disaggregate->method)) +
                  " spreads the record the same way every time, so every realization would be "
                  "the same run; use method: cascade or fragments, or leave --realizations out"
            : "the record is used as read (no rain.disaggregate), so every realization would be "
              "the same run; leave --realizations out");
  }
  return asked;
}

std::uint64_t resample_seed(std::uint64_t seed) {
  // The bits of `seed` turned about and flipped, so that the draw of the spells shares no
  // stream with the intervals' draws (interval_seed mixes the seed with each start).
  return ~((seed << 32) | (seed >> 32));
}

RainSeries realization_record(const RainSeries& as_read, const std::optional<Disaggregation>& how,
                              std::size_t k, bool resampled) {
  if (!how) return as_read;
  Disaggregation seeded = *how;
  seeded.seed = realization_seed(how->seed, k);
  if (resampled) {
    for (FragmentLibrary& library : seeded.fragments) {
      library = resample_spells(library, resample_seed(seeded.seed));
    }
  }
  return disaggregate(as_read, seeded);
}

bool resamples_calibration(const std::optional<Disaggregation>& how) {
  return how && how->method == DisaggregationMethod::fragments;
}

RealizationMetrics realization_metrics(const RunResult& result) {
  const Accounts& a = result.totals;
  RealizationMetrics m;
  m.energy_Wh = a.electrical_J / kJoulesPerWh;
  m.cycles = static_cast<double>(result.cycles);
  m.reservoir_overflow_L = a.reservoir_overflow_m3 / kCubicMetresPerLitre;
  m.dribble_L = a.dribble_m3 / kCubicMetresPerLitre;
  return m;
}

double percentile(std::vector<double> values, double p) {
  assert(!values.empty() && p >= 0.0 && p <= 1.0);
  std::sort(values.begin(), values.end());
  return detail::quantile_of_sorted(values, p);
}

Spread spread_of(const std::vector<double>& values) {
  return {percentile(values, 0.1), percentile(values, 0.5), percentile(values, 0.9)};
}

std::size_t worker_threads(unsigned asked, std::size_t tasks) {
  const unsigned cores = std::max(1u, std::thread::hardware_concurrency());
  return std::max<std::size_t>(1, std::min<std::size_t>(asked > 0 ? asked : cores, tasks));
}

RealizationSpread spread_of(const std::vector<RealizationMetrics>& runs, std::uint64_t first_seed) {
  RealizationSpread s;
  s.n = runs.size();
  s.first_seed = first_seed;
  for (const RealizationColumn& c : kRealizationColumns) {
    std::vector<double> values;
    values.reserve(runs.size());
    for (const RealizationMetrics& m : runs) values.push_back(m.*(c.value));
    s.*(c.spread) = spread_of(values);
  }
  return s;
}

std::vector<RealizationMetrics> run_realizations(const Scenario& scenario,
                                                 const RainSeries& as_read, std::size_t n,
                                                 const RealizationOptions& options) {
  assert(n >= 1);
  const RealizationRun run =
      options.run ? options.run
                  : RealizationRun([&](std::size_t, const RainSeries& rain, const RunOptions& o) {
                      Observer none;
                      return simulate(scenario, rain, none, o);
                    });

  const std::size_t tasks = options.resample_calibration ? 2 * n : n;
  const std::size_t jobs = worker_threads(options.jobs, tasks);
  // Workers take no more realizations once `halt` is set: for the user's stop and for any error.
  // A realization under way stops only for the user's stop.
  std::atomic<bool> halt{false};
  std::atomic<std::size_t> next{0};
  std::vector<RealizationMetrics> metrics(tasks);
  std::vector<std::exception_ptr> errors(tasks);
  const auto user_stop = [&] { return options.stop != nullptr && options.stop->load(); };
  const auto worker = [&] {
    RunOptions run_options;
    run_options.stop = options.stop;
    for (;;) {
      if (user_stop()) halt.store(true);
      if (halt.load()) return;
      const std::size_t k = next.fetch_add(1);
      if (k >= tasks) return;
      try {
        metrics[k] = realization_metrics(
            run(k, realization_record(as_read, scenario.rain.disaggregate, k % n, k >= n),
                run_options));
      } catch (...) {
        errors[k] = std::current_exception();
        halt.store(true);
      }
    }
  };
  std::vector<std::thread> threads;
  try {
    for (std::size_t j = 1; j < jobs; ++j) threads.emplace_back(worker);
  } catch (...) {
    halt.store(true);
    for (std::thread& t : threads) t.join();
    throw;
  }
  worker();
  for (std::thread& t : threads) t.join();
  // Any other error comes before an Interrupted.
  std::exception_ptr interrupted;
  for (const std::exception_ptr& e : errors) {
    if (!e) continue;
    try {
      std::rethrow_exception(e);
    } catch (const Interrupted&) {
      if (!interrupted) interrupted = e;
    } catch (...) {
      throw;
    }
  }
  if (interrupted || user_stop()) throw Interrupted();
  return metrics;
}

}  // namespace gutterwatt
