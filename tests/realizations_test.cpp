#include "gutterwatt/realizations.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <atomic>
#include <mutex>
#include <thread>
#include <utility>
#include <vector>

#include "gutterwatt/disaggregation.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/fragments.hpp"
#include "test_support.hpp"

namespace gutterwatt::realizations_test {
namespace {

using test_support::kStart;

// source: Hyndman & Fan (1996), definition 7, worked by hand: for 1..10, h = 9p + 1, so
// P10 = x1 + 0.9 (x2 - x1) = 1.9, P50 = x5 + 0.5 = 5.5, P90 = x9 + 0.1 = 9.1 (also what R's
// quantile() gives by default, from memory).
TEST(Realizations, PercentilesFollowHyndmanAndFanDefinitionSeven) {
  const std::vector<double> one_to_ten = {10, 9, 8, 7, 6, 5, 4, 3, 2, 1};
  EXPECT_DOUBLE_EQ(percentile(one_to_ten, 0.1), 1.9);
  EXPECT_DOUBLE_EQ(percentile(one_to_ten, 0.5), 5.5);
  EXPECT_DOUBLE_EQ(percentile(one_to_ten, 0.9), 9.1);
  EXPECT_DOUBLE_EQ(percentile(one_to_ten, 0.0), 1.0);
  EXPECT_DOUBLE_EQ(percentile(one_to_ten, 1.0), 10.0);
  // 3, 1, 4, 1, 5 sorted is 1, 1, 3, 4, 5: h = 4p + 1; P10 at h = 1.4 is 1, P90 at h = 4.6 is
  // 4 + 0.6 (5 - 4) = 4.6.
  const Spread s = spread_of(std::vector<double>{3, 1, 4, 1, 5});
  EXPECT_DOUBLE_EQ(s.p10, 1.0);
  EXPECT_DOUBLE_EQ(s.p50, 3.0);
  EXPECT_DOUBLE_EQ(s.p90, 4.6);
  const Spread single = spread_of(std::vector<double>{7.25});
  EXPECT_EQ(single.p10, 7.25);
  EXPECT_EQ(single.p90, 7.25);
}

// Each metric's spread is of its own column. Worked by hand (definition 7, n = 3: P10 at
// h = 0.2, P90 at h = 1.8, 0-based): energy 1, 2, 3 gives 1.2, 2, 2.8; cycles 10, 20, 30 gives
// 12, 20, 28; overflow 0, 0, 6 gives 0, 0, 4.8; dribble 5, 5, 5 gives 5 throughout.
TEST(Realizations, SpreadsEachMetricOverTheRuns) {
  const std::vector<RealizationMetrics> runs = {{1, 10, 0, 5}, {2, 30, 0, 5}, {3, 20, 6, 5}};
  const RealizationSpread z = spread_of(runs, 7);
  EXPECT_EQ(z.n, 3u);
  EXPECT_EQ(z.first_seed, 7u);
  EXPECT_DOUBLE_EQ(z.energy_Wh.p10, 1.2);
  EXPECT_DOUBLE_EQ(z.energy_Wh.p50, 2.0);
  EXPECT_DOUBLE_EQ(z.energy_Wh.p90, 2.8);
  EXPECT_DOUBLE_EQ(z.cycles.p10, 12.0);
  EXPECT_DOUBLE_EQ(z.cycles.p50, 20.0);
  EXPECT_DOUBLE_EQ(z.cycles.p90, 28.0);
  EXPECT_DOUBLE_EQ(z.reservoir_overflow_L.p10, 0.0);
  EXPECT_DOUBLE_EQ(z.reservoir_overflow_L.p50, 0.0);
  EXPECT_DOUBLE_EQ(z.reservoir_overflow_L.p90, 4.8);
  EXPECT_DOUBLE_EQ(z.dribble_L.p10, 5.0);
  EXPECT_DOUBLE_EQ(z.dribble_L.p90, 5.0);
}

TEST(Realizations, TakeTheThreadsAskedButNoMoreThanTheTasks) {
  EXPECT_EQ(worker_threads(3, 10), 3u);
  EXPECT_EQ(worker_threads(8, 2), 2u);
  EXPECT_EQ(worker_threads(0, 1), 1u);
  const std::size_t per_core = worker_threads(0, 1000);
  EXPECT_GE(per_core, 1u);
  EXPECT_LE(per_core, std::max(1u, std::thread::hardware_concurrency()));
}

TEST(Realizations, DefaultToTwentyForARandomDisaggregationOnly) {
  RainConfig rain;
  EXPECT_EQ(default_realizations(rain), 1u);
  rain.disaggregate.emplace();
  rain.disaggregate->method = DisaggregationMethod::nrcs_ii;
  EXPECT_EQ(default_realizations(rain), 1u);
  rain.disaggregate->method = DisaggregationMethod::cascade;
  EXPECT_EQ(default_realizations(rain), 20u);
}

// An invented coarse record: three wet hours in a six-hour run, spread to 5 min by the cascade.
Scenario hourly_scenario() {
  Scenario s = test_support::make_scenario();
  s.rain.disaggregate.emplace();
  s.rain.disaggregate->method = DisaggregationMethod::cascade;
  s.rain.disaggregate->seed = 11;
  return s;
}

RainSeries hourly_record() {
  RainSeries rain;
  rain.covered = {{kStart, kStart + 6 * 3600}};
  rain.step_s = 3600;
  rain.pulses = {{kStart + 3600, kStart + 7200, 3e-3},
                 {kStart + 7200, kStart + 10800, 6e-3},
                 {kStart + 14400, kStart + 18000, 10e-3}};
  rain.total_depth_m = sum_depths_m(rain.pulses);
  return rain;
}

void expect_same(const RealizationMetrics& a, const RealizationMetrics& b) {
  EXPECT_EQ(a.energy_Wh, b.energy_Wh);
  EXPECT_EQ(a.cycles, b.cycles);
  EXPECT_EQ(a.reservoir_overflow_L, b.reservoir_overflow_L);
  EXPECT_EQ(a.dribble_L, b.dribble_L);
}

TEST(Realizations, GiveTheSameResultsWhateverTheNumberOfThreads) {
  const Scenario s = hourly_scenario();
  const RainSeries as_read = hourly_record();
  RealizationOptions one;
  one.jobs = 1;
  RealizationOptions three;
  three.jobs = 3;
  const std::vector<RealizationMetrics> serial = run_realizations(s, as_read, 4, one);
  const std::vector<RealizationMetrics> parallel = run_realizations(s, as_read, 4, three);
  ASSERT_EQ(serial.size(), 4u);
  ASSERT_EQ(parallel.size(), 4u);
  for (std::size_t k = 0; k < 4; ++k) expect_same(serial[k], parallel[k]);
  // Realization 0 is the single run with the scenario's seed; the others differ from it.
  Observer none;
  const RunResult single = simulate(s, disaggregate(as_read, *s.rain.disaggregate), none);
  expect_same(serial[0], realization_metrics(single));
  bool differs = false;
  for (std::size_t k = 1; k < 4; ++k)
    differs = differs || serial[k].energy_Wh != serial[0].energy_Wh;
  EXPECT_TRUE(differs);
}

TEST(Realizations, RunEachRealizationOnItsOwnSeed) {
  const Scenario s = hourly_scenario();
  const RainSeries as_read = hourly_record();
  RealizationOptions options;
  options.jobs = 2;
  std::vector<double> first_depth(3, 0.0);
  options.run = [&](std::size_t k, const RainSeries& rain, const RunOptions&) {
    first_depth[k] = rain.pulses.front().depth_m;
    EXPECT_EQ(sum_depths_m(rain.pulses), as_read.total_depth_m);
    return RunResult{};
  };
  run_realizations(s, as_read, 3, options);
  for (std::size_t k = 0; k < 3; ++k) {
    Disaggregation how = *s.rain.disaggregate;
    how.seed = 11 + k;
    EXPECT_EQ(first_depth[k], disaggregate(as_read, how).pulses.front().depth_m) << k;
  }
}

TEST(Realizations, RecordOfRealizationKIsTheDisaggregationWithTheSeedPlusK) {
  const Scenario s = hourly_scenario();
  const RainSeries as_read = hourly_record();
  // Seed 11, realization 2: the cascade drawn with seed 13; every depth kept.
  Disaggregation how = *s.rain.disaggregate;
  how.seed = 13;
  const RainSeries expected = disaggregate(as_read, how);
  const RainSeries record = realization_record(as_read, s.rain.disaggregate, 2);
  ASSERT_EQ(record.pulses.size(), expected.pulses.size());
  for (std::size_t i = 0; i < record.pulses.size(); ++i) {
    EXPECT_EQ(record.pulses[i].start, expected.pulses[i].start) << i;
    EXPECT_EQ(record.pulses[i].depth_m, expected.pulses[i].depth_m) << i;
  }
  EXPECT_EQ(record.step_s, 300);
  // A record used as read is every realization's record.
  const RainSeries plain = realization_record(as_read, std::nullopt, 5);
  ASSERT_EQ(plain.pulses.size(), 3u);
  EXPECT_EQ(plain.pulses[1].depth_m, 6e-3);
  EXPECT_EQ(plain.step_s, 3600);
}

// A hand library of half-hour steps: two one-hour spells, all in the first half and all in the
// second.
FragmentLibrary half_hour_library() {
  FragmentLibrary library;
  library.length_s = 3600;
  library.intervals = {{4e-3, false, false, 0.0, {0.0, 1.0, 1.0}, 3600},
                       {4e-3, false, false, 0.0, {0.0, 0.0, 1.0}, 3600}};
  return library;
}

// hourly_scenario with its record spread by fragments of half_hour_library.
Scenario fragments_scenario() {
  Scenario s = hourly_scenario();
  Disaggregation& how = *s.rain.disaggregate;
  how.method = DisaggregationMethod::fragments;
  how.step_s = 1800;
  how.fragments = {half_hour_library()};
  return s;
}

TEST(Realizations, AResampledRealizationDrawsOnItsOwnResampleOfTheCalibration) {
  // hourly_record's three hours spread by fragments of half_hour_library.
  const Scenario s = fragments_scenario();
  const Disaggregation& how = *s.rain.disaggregate;
  const FragmentLibrary library = half_hour_library();
  EXPECT_TRUE(resamples_calibration(s.rain.disaggregate));
  EXPECT_FALSE(resamples_calibration(hourly_scenario().rain.disaggregate));  // cascade
  EXPECT_FALSE(resamples_calibration(std::nullopt));
  const RainSeries as_read = hourly_record();
  for (std::size_t k = 0; k < 8; ++k) {
    // Realization k: seed 11 + k, the library resampled with resample_seed of that seed.
    Disaggregation expected_how = how;
    expected_how.seed = 11 + k;
    expected_how.fragments = {resample_spells(library, resample_seed(11 + k))};
    const RainSeries expected = disaggregate(as_read, expected_how);
    const RainSeries record = realization_record(as_read, s.rain.disaggregate, k, true);
    // Whatever the resample, each hour keeps its depth exactly: 3, 6 and 10 mm (hourly_record).
    const std::pair<Instant, double> hours[] = {
        {kStart + 3600, 3e-3}, {kStart + 7200, 6e-3}, {kStart + 14400, 10e-3}};
    for (const auto& [start, depth_m] : hours) {
      double sum = 0.0;
      for (const RainPulse& p : record.pulses) {
        if (p.start >= start && p.end <= start + 3600) sum += p.depth_m;
      }
      EXPECT_EQ(sum, depth_m) << k << ' ' << start;
    }
    ASSERT_EQ(record.pulses.size(), expected.pulses.size()) << k;
    for (std::size_t i = 0; i < record.pulses.size(); ++i) {
      EXPECT_EQ(record.pulses[i].start, expected.pulses[i].start) << k << ' ' << i;
      EXPECT_EQ(record.pulses[i].depth_m, expected.pulses[i].depth_m) << k << ' ' << i;
    }
  }
  // The resample seeds differ from the draw seeds they come from, and from one another.
  EXPECT_NE(resample_seed(11), 11u);
  EXPECT_NE(resample_seed(11), resample_seed(12));
}

TEST(Realizations, RunTheResampledSetAfterTheDrawsInOnePool) {
  // With resample_calibration, tasks n to 2n - 1 are realizations 0 to n - 1 on resamples of the
  // calibration record, after the draws.
  const Scenario s = fragments_scenario();
  const RainSeries as_read = hourly_record();
  constexpr std::size_t n = 3;
  std::vector<RainSeries> records(2 * n);
  std::mutex records_mutex;
  RealizationOptions two;
  two.jobs = 2;
  two.resample_calibration = true;
  two.run = [&](std::size_t k, const RainSeries& rain, const RunOptions&) {
    const std::lock_guard<std::mutex> lock(records_mutex);
    records.at(k) = rain;
    return RunResult{};
  };
  ASSERT_EQ(run_realizations(s, as_read, n, two).size(), 2 * n);
  for (std::size_t k = 0; k < 2 * n; ++k) {
    const RainSeries expected = realization_record(as_read, s.rain.disaggregate, k % n, k >= n);
    ASSERT_EQ(records[k].pulses.size(), expected.pulses.size()) << k;
    for (std::size_t i = 0; i < expected.pulses.size(); ++i) {
      EXPECT_EQ(records[k].pulses[i].start, expected.pulses[i].start) << k << ' ' << i;
      EXPECT_EQ(records[k].pulses[i].depth_m, expected.pulses[i].depth_m) << k << ' ' << i;
    }
  }
  // The metrics: the same on one thread as on two, in the same order.
  RealizationOptions one;
  one.jobs = 1;
  one.resample_calibration = true;
  two.run = nullptr;
  const std::vector<RealizationMetrics> serial = run_realizations(s, as_read, n, one);
  const std::vector<RealizationMetrics> parallel = run_realizations(s, as_read, n, two);
  ASSERT_EQ(serial.size(), 2 * n);
  ASSERT_EQ(parallel.size(), 2 * n);
  for (std::size_t k = 0; k < 2 * n; ++k) expect_same(serial[k], parallel[k]);
}

TEST(Realizations, ThrowTheErrorOfAFailedRealization) {
  const Scenario s = hourly_scenario();
  RealizationOptions options;
  options.jobs = 2;
  options.run = [](std::size_t k, const RainSeries&, const RunOptions&) {
    if (k == 2) throw InputError("rain.csv", 3, "rain_mm", "invented failure");
    return RunResult{};
  };
  try {
    run_realizations(s, hourly_record(), 5, options);
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_STREQ(e.what(), "rain.csv:3: rain_mm: invented failure");
  }
}

TEST(Realizations, StopWhenAsked) {
  const Scenario s = hourly_scenario();
  std::atomic<bool> stop{true};
  RealizationOptions options;
  options.stop = &stop;
  EXPECT_THROW(run_realizations(s, hourly_record(), 3, options), Interrupted);
}

}  // namespace
}  // namespace gutterwatt::realizations_test
