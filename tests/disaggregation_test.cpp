#include "gutterwatt/disaggregation.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <sstream>
#include <string>
#include <utility>
#include <vector>

#include "gutterwatt/fragments.hpp"
#include "gutterwatt/rain_input.hpp"

namespace gutterwatt::disaggregation_test {
namespace {

// Seconds since the epoch of 2025-03-01T00:00Z.
// source: POSIX.1-2017 Base Definitions 4.16 (Seconds Since the Epoch), formula worked by hand.
constexpr Instant kT0 = 1740787200;
constexpr Instant kHour = 3600;
constexpr Instant kDay = 86400;

// An invented fine record at 1 minute for the fragments' libraries: 40 days from 20 days before
// kT0, wet from 03:00 to 09:00 in 20-minute spells 20 minutes apart, 0.01 to 0.13 mm a minute.
RainSeries fine_minutes() {
  RainSeries fine;
  fine.step_s = 60;
  const Instant start = kT0 - 20 * kDay;
  fine.covered = {{start, start + 40 * kDay}};
  for (Instant d = 0; d < 40; ++d) {
    for (Instant m = 180; m < 540; ++m) {
      if ((m / 20) % 2 != 0) continue;
      const Instant t = start + d * kDay + 60 * m;
      fine.pulses.push_back({t, t + 60, static_cast<double>(1 + (m + d) % 13) * 1e-5});
    }
  }
  fine.total_depth_m = sum_depths_m(fine.pulses);
  return fine;
}

// The method with the step; for fragments, libraries of days, hours and half-hours from
// fine_minutes().
Disaggregation method(DisaggregationMethod m, Instant step_s = 300) {
  Disaggregation how;
  how.method = m;
  how.step_s = step_s;
  if (m == DisaggregationMethod::fragments) {
    const RainSeries fine = fine_minutes();
    for (const Instant length_s : {kDay, kHour, Instant{1800}}) {
      if (length_s > step_s) {
        how.fragments.push_back(build_fragment_library(fine, length_s, 0, step_s));
      }
    }
  }
  return how;
}

RainSeries read_daily(const std::string& text) {
  std::istringstream in(text);
  SeriesFormat fmt;
  fmt.time_column = "date";
  return read_rain_daily(in, "daily.csv", fmt);
}

RainSeries read_series(const std::string& text) {
  std::istringstream in(text);
  return read_rain_series(in, "hourly.csv", SeriesFormat{});
}

// Invented daily totals, including awkward depths.
const char* const kDaily =
    "date,rain_mm\n"
    "2025-03-01,12.3\n"
    "2025-03-02,0\n"
    "2025-03-03,0.1\n"
    "2025-03-04,87.65\n"
    "2025-03-05,1e-5\n"
    "2025-03-06,0.7\n";
const std::vector<double> kDailyDepths_m = {12.3e-3, 0.0, 0.1e-3, 87.65e-3, 1e-8, 0.7e-3};

// Invented hourly totals: wet hours, a dry one, and a row 30 min after the one before (an
// interval no longer than the step of 30 min below is kept as read).
const char* const kHourly =
    "time,rain_mm\n"
    "2025-03-01T01:00,4.3\n"
    "2025-03-01T02:00,0\n"
    "2025-03-01T03:00,0.01\n"
    "2025-03-01T04:00,17.77\n"
    "2025-03-01T04:30,0.6\n"
    "2025-03-01T05:30,2.2\n";

// The depths of the pulses inside each span [starts[k], starts[k + 1]), added left to right.
std::vector<double> sums_between(const RainSeries& rain, const std::vector<Instant>& starts) {
  std::vector<double> sums(starts.size() - 1, 0.0);
  for (const RainPulse& p : rain.pulses) {
    const auto k = static_cast<std::size_t>(
        std::upper_bound(starts.begin(), starts.end(), p.start) - starts.begin() - 1);
    EXPECT_LT(k, sums.size());
    EXPECT_LE(p.end, starts[k + 1]) << "pulse crosses the end of its interval";
    sums[k] += p.depth_m;
  }
  return sums;
}

TEST(Disaggregation, ConservesEachDayExactlyForEveryMethod) {
  const RainSeries as_read = read_daily(kDaily);
  std::vector<Instant> days;
  for (Instant d = 0; d <= 6; ++d) days.push_back(kT0 + d * kDay);
  for (const DisaggregationMethod m : kDisaggregationMethods) {
    const RainSeries rain = disaggregate(as_read, method(m));
    EXPECT_EQ(sums_between(rain, days), kDailyDepths_m) << method_name(m);
    EXPECT_EQ(rain.total_depth_m, sum_depths_m(rain.pulses)) << method_name(m);
    EXPECT_EQ(rain.total_depth_m, as_read.total_depth_m) << method_name(m);
    EXPECT_EQ(rain.covered.size(), 1u);
  }
}

TEST(Disaggregation, ConservesEachIntervalOfACoarseSeriesExactly) {
  const RainSeries as_read = read_series(kHourly);
  ASSERT_EQ(as_read.step_s, kHour);
  for (const auto& [m, step_s] : {std::pair{DisaggregationMethod::cascade, Instant{300}},
                                  std::pair{DisaggregationMethod::cascade, Instant{1800}},
                                  std::pair{DisaggregationMethod::cascade, Instant{420}},
                                  std::pair{DisaggregationMethod::fragments, Instant{300}},
                                  std::pair{DisaggregationMethod::fragments, Instant{420}}}) {
    const RainSeries rain = disaggregate(as_read, method(m, step_s));
    const std::vector<Instant> ends = {kT0,
                                       kT0 + kHour,
                                       kT0 + 2 * kHour,
                                       kT0 + 3 * kHour,
                                       kT0 + 4 * kHour,
                                       kT0 + 4 * kHour + 1800,
                                       kT0 + 5 * kHour + 1800};
    const std::vector<double> sums = sums_between(rain, ends);
    const std::vector<double> expected = {4.3e-3, 0.0, 0.01e-3, 17.77e-3, 0.6e-3, 2.2e-3};
    EXPECT_EQ(sums, expected) << "step " << step_s;
    EXPECT_EQ(rain.step_s, step_s);
    for (const RainPulse& p : rain.pulses) {
      EXPECT_LE(p.end - p.start, step_s) << "step " << step_s;
      // Steps start at whole steps from their interval's start (7 min: 0, 7, ..., 56 min; the
      // last one 4 min long).
      const Instant interval_start = *(std::upper_bound(ends.begin(), ends.end(), p.start) - 1);
      EXPECT_EQ((p.start - interval_start) % step_s, 0) << "step " << step_s;
    }
  }
}

TEST(Disaggregation, KeepsAnIntervalNoLongerThanTheStepAsRead) {
  const RainSeries as_read = read_series(kHourly);
  const RainSeries rain = disaggregate(as_read, method(DisaggregationMethod::cascade, 1800));
  const auto half_hour =
      std::find_if(rain.pulses.begin(), rain.pulses.end(),
                   [](const RainPulse& p) { return p.start == kT0 + 4 * kHour; });
  ASSERT_NE(half_hour, rain.pulses.end());
  EXPECT_EQ(half_hour->end, kT0 + 4 * kHour + 1800);
  EXPECT_EQ(half_hour->depth_m, 0.6e-3);
  // A step as long as the record's leaves it as it is.
  const RainSeries same = disaggregate(as_read, method(DisaggregationMethod::cascade, kHour));
  EXPECT_EQ(same.pulses.size(), as_read.pulses.size());
  EXPECT_EQ(same.step_s, kHour);
}

TEST(Disaggregation, KeepsABlockAsRead) {
  const RainSeries as_read = read_series(kHourly);
  const RainSeries rain = disaggregate(as_read, method(DisaggregationMethod::block));
  ASSERT_EQ(rain.pulses.size(), as_read.pulses.size());
  EXPECT_EQ(rain.step_s, kHour);
}

TEST(Disaggregation, ConservesEachDayExactlyInAnyOrder) {
  // Every part is a whole multiple of the spacing of doubles at the day's depth, so the sum
  // does not depend on the order of addition.
  const double depth_m = 87.65e-3;
  std::vector<double> parts =
      disaggregate_interval(depth_m, kDay, 20148, method(DisaggregationMethod::cascade, 60));
  ASSERT_EQ(parts.size(), 1440u);
  std::sort(parts.begin(), parts.end());
  double rising = 0.0;
  for (double part : parts) rising += part;
  double falling = 0.0;
  for (auto it = parts.rbegin(); it != parts.rend(); ++it) falling += *it;
  EXPECT_EQ(rising, depth_m);
  EXPECT_EQ(falling, depth_m);
}

// The cumulative fraction of a 50 mm day at each whole hour, spread by `m` in half hours.
std::vector<double> fraction_at_hours(DisaggregationMethod m) {
  const std::vector<double> parts = disaggregate_interval(50e-3, kDay, 0, method(m, 1800));
  EXPECT_EQ(parts.size(), 48u);
  double by_hour = 0.0;
  std::vector<double> fraction(25, 0.0);
  for (std::size_t j = 0; j < parts.size(); ++j) {
    by_hour += parts[j];
    if (j % 2 == 1) fraction[(j + 1) / 2] = by_hour / 50e-3;
  }
  return fraction;
}

// source: TR-55 (1986) App. B, values from REFERENCES.md section 8 (tolerance 0.005; 0.01 for
// the values that table marks as interpolated).
TEST(Disaggregation, FollowsTheNrcsShapeOfEachRegion) {
  struct Row {
    DisaggregationMethod m;
    double at6, at10, at12, at16, at20;
  };
  const Row rows[] = {
      {DisaggregationMethod::nrcs_i, 0.125, 0.515, 0.682, 0.830, 0.926},
      {DisaggregationMethod::nrcs_ia, 0.206, 0.577, 0.664, 0.800, 0.906},
      {DisaggregationMethod::nrcs_ii, 0.080, 0.181, 0.663, 0.880, 0.952},
      {DisaggregationMethod::nrcs_iii, 0.072, 0.189, 0.500, 0.886, 0.957},
  };
  for (const Row& r : rows) {
    const std::vector<double> f = fraction_at_hours(r.m);
    EXPECT_NEAR(f[6], r.at6, 0.005) << method_name(r.m);
    EXPECT_NEAR(f[10], r.at10, 0.005) << method_name(r.m);
    EXPECT_NEAR(f[12], r.at12, 0.005) << method_name(r.m);
    EXPECT_NEAR(f[16], r.at16, 0.005) << method_name(r.m);
    EXPECT_NEAR(f[20], r.at20, 0.005) << method_name(r.m);
    EXPECT_EQ(f[24], 1.0) << method_name(r.m);
  }
}

TEST(Disaggregation, RepeatsTheCascadeForTheSameSeedAndInterval) {
  const Disaggregation how = method(DisaggregationMethod::cascade);
  const RainSeries whole = disaggregate(read_daily(kDaily), how);
  // The fourth day alone, in a file of its own, gets the same draw.
  const RainSeries alone = disaggregate(read_daily("date,rain_mm\n2025-03-04,87.65\n"), how);
  std::vector<RainPulse> fourth;
  for (const RainPulse& p : whole.pulses) {
    if (p.start >= kT0 + 3 * kDay && p.start < kT0 + 4 * kDay) fourth.push_back(p);
  }
  ASSERT_EQ(fourth.size(), alone.pulses.size());
  for (std::size_t k = 0; k < fourth.size(); ++k) {
    EXPECT_EQ(fourth[k].start, alone.pulses[k].start);
    EXPECT_EQ(fourth[k].depth_m, alone.pulses[k].depth_m);
  }
  Disaggregation other_seed = how;
  other_seed.seed = realization_seed(how.seed, 1);
  const RainSeries other = disaggregate(read_daily("date,rain_mm\n2025-03-04,87.65\n"), other_seed);
  bool differs = other.pulses.size() != alone.pulses.size();
  for (std::size_t k = 0; !differs && k < other.pulses.size(); ++k) {
    differs = other.pulses[k].depth_m != alone.pulses[k].depth_m;
  }
  EXPECT_TRUE(differs);
}

TEST(Disaggregation, PutsADayInOneStepWhenTheCascadeAlwaysSendsRainToOneHalf) {
  Disaggregation how = method(DisaggregationMethod::cascade, kDay / 128);  // seven halvings
  how.intermittency = 1.0;
  const std::vector<double> parts = disaggregate_interval(10e-3, kDay, 7, how);
  ASSERT_EQ(parts.size(), 128u);
  EXPECT_EQ(std::count(parts.begin(), parts.end(), 0.0), 127);
  EXPECT_EQ(*std::max_element(parts.begin(), parts.end()), 10e-3);
}

TEST(Disaggregation, WetsEveryStepWhenTheCascadeNeverSendsRainToOneHalf) {
  Disaggregation how = method(DisaggregationMethod::cascade);
  how.intermittency = 0.0;
  const std::vector<double> parts = disaggregate_interval(10e-3, kDay, 7, how);
  ASSERT_EQ(parts.size(), 288u);
  EXPECT_EQ(std::count(parts.begin(), parts.end(), 0.0), 0);
}

TEST(Disaggregation, SharesRainEvenlyBetweenHalvesOnAverage) {
  // Each halving splits W : 1 - W with W symmetric about 1/2, so over many days the first half
  // of the day holds half of the rain. Over n days the share's standard deviation is about
  // sqrt(1/12 (1 - p) + 1/4 p) / sqrt(n) = 0.0096 for p = 0.3, n = 2000; the tolerance is 4 sd.
  const Disaggregation how = method(DisaggregationMethod::cascade, kHour);
  double first_half = 0.0;
  constexpr int kDays = 2000;
  for (int day = 0; day < kDays; ++day) {
    const std::vector<double> parts =
        disaggregate_interval(1.0, kDay, static_cast<std::uint64_t>(day) * kDay, how);
    for (std::size_t j = 0; j < 12; ++j) first_half += parts[j];
  }
  EXPECT_NEAR(first_half / kDays, 0.5, 4 * 0.0096);
}

// ---- calibration (Olsson 1998) ----

// A known cascade, the same at every box duration: P(1/0) 0.15, P(0/1) 0.25, and W uniform on
// (0.2, 0.8) in the x/(1-x) splits.
CascadeLevel known_level(double box_s) {
  CascadeLevel level;
  level.box_s = box_s;
  level.p10 = 0.15;
  level.p01 = 0.25;
  for (std::size_t k = 0; k < kWQuantiles; ++k) {
    level.w_quantiles.push_back(0.2 + 0.6 * static_cast<double>(k) / (kWQuantiles - 1));
  }
  return level;
}

// `intervals` wet intervals of 76800 s (2^8 steps of 5 min) in a row, each of 10 mm, brought down
// to 5 min by the known cascade: a fine record made by a known cascade.
RainSeries known_cascade_record(int intervals) {
  Disaggregation how = method(DisaggregationMethod::cascade, 300);
  how.seed = 2024;
  for (double box_s = 600; box_s <= 76800; box_s *= 2) how.levels.push_back(known_level(box_s));
  RainSeries coarse;
  coarse.step_s = 76800;
  coarse.covered = {{kT0, kT0 + intervals * Instant{76800}}};
  for (int k = 0; k < intervals; ++k) {
    const Instant start = kT0 + k * Instant{76800};
    coarse.pulses.push_back({start, start + 76800, 10e-3});
  }
  coarse.total_depth_m = sum_depths_m(coarse.pulses);
  return disaggregate(coarse, how);
}

TEST(Disaggregation, RecoversTheParametersOfAKnownCascade) {
  const RainSeries fine = known_cascade_record(400);
  ASSERT_EQ(fine.step_s, 300);
  const std::vector<CascadeLevel> levels = estimate_cascade(fine, 76800);
  ASSERT_GE(levels.size(), 8u);
  for (std::size_t j = 0; j < 8; ++j) {
    const CascadeLevel& got = levels[j];
    EXPECT_EQ(got.box_s, 600.0 * (1 << j));
    // Within 4 standard errors of the estimate from got.boxes wet boxes: binomial for the
    // probabilities; for the quartiles and median of W (uniform on 0.2..0.8, density 1/0.6),
    // sqrt(p (1 - p)) * 0.6 / sqrt(n).
    const auto n = static_cast<double>(got.boxes);
    const double n_split = n * (1.0 - 0.15 - 0.25);
    EXPECT_NEAR(got.p10, 0.15, 4.0 * std::sqrt(0.15 * 0.85 / n)) << got.box_s;
    EXPECT_NEAR(got.p01, 0.25, 4.0 * std::sqrt(0.25 * 0.75 / n)) << got.box_s;
    ASSERT_EQ(got.w_quantiles.size(), kWQuantiles);
    for (const double p : {0.25, 0.5, 0.75}) {
      const auto k = static_cast<std::size_t>(p * (kWQuantiles - 1));
      EXPECT_NEAR(got.w_quantiles[k], 0.2 + 0.6 * p,
                  4.0 * std::sqrt(p * (1 - p)) * 0.6 / std::sqrt(n_split))
          << got.box_s << " P" << p;
    }
    EXPECT_GE(got.w_quantiles.front(), 0.2 - 1e-9);
    EXPECT_LE(got.w_quantiles.back(), 0.8 + 1e-9);
  }
  // The top level rests on the 400 intervals, every one wet.
  EXPECT_EQ(levels[7].boxes, 400u);
}

TEST(Disaggregation, EstimatesTheSplitsByPositionAndVolume) {
  // Invented: in every 2-hour block, 5-minute steps 1 to 6 are wet (0.2, 1, 1, 1, 1, 0.2 mm).
  // Of the 10-minute boxes, steps 0-1 start a run and send all to their second half (0/1),
  // steps 6-7 end it (1/0), and the two between split evenly; the ends hold 0.2 mm, at most the
  // median of the wet boxes (1.1 mm), the middle ones 2 mm, above it.
  RainSeries fine;
  fine.step_s = 300;
  fine.covered = {{kT0, kT0 + 3 * kDay}};
  const double mm[] = {0.0, 0.2, 1, 1, 1, 1, 0.2};
  for (Instant block = 0; block < 36; ++block) {
    for (Instant k = 1; k <= 6; ++k) {
      const Instant start = kT0 + block * 7200 + k * 300;
      fine.pulses.push_back({start, start + 300, mm[k] * 1e-3});
    }
  }
  const std::vector<CascadeLevel> levels = estimate_cascade(fine, 86400);
  ASSERT_FALSE(levels.empty());
  const CascadeLevel& ten = levels.front();
  ASSERT_EQ(ten.classes.size(), kCascadeClasses);
  const auto at = [&](BoxPosition position, bool above) -> const CascadeSplit& {
    return ten.classes[2 * static_cast<std::size_t>(position) + (above ? 1 : 0)];
  };
  EXPECT_EQ(at(BoxPosition::starting, false).boxes, 36u);
  EXPECT_EQ(at(BoxPosition::starting, false).p01, 1.0);
  EXPECT_EQ(at(BoxPosition::ending, false).p10, 1.0);
  EXPECT_EQ(at(BoxPosition::enclosed, true).boxes, 72u);
  EXPECT_EQ(at(BoxPosition::enclosed, true).p10 + at(BoxPosition::enclosed, true).p01, 0.0);
  EXPECT_DOUBLE_EQ(at(BoxPosition::enclosed, true).w_quantiles[10], 0.5);
  EXPECT_EQ(at(BoxPosition::isolated, false).boxes, 0u);
  EXPECT_DOUBLE_EQ(ten.median_volume_m, 1.1e-3);
  // Pooled: 36 of 144 boxes each way.
  EXPECT_EQ(ten.p10, 0.25);
  EXPECT_EQ(ten.p01, 0.25);
  // A cascade calibrated on it sends the rain of a small 10-minute box that starts a storm (the
  // next interval wet) into its second half, and of one that ends a storm into its first.
  Disaggregation how = method(DisaggregationMethod::cascade, 300);
  how.levels = {ten};
  const std::vector<double> starting = disaggregate_interval(0.2e-3, 600, 0, how, false, true);
  EXPECT_EQ(starting, (std::vector<double>{0.0, 0.2e-3}));
  const std::vector<double> ending = disaggregate_interval(0.2e-3, 600, 0, how, true, false);
  EXPECT_EQ(ending, (std::vector<double>{0.2e-3, 0.0}));
}

TEST(Disaggregation, InterpolatesCalibratedLevelsInLogDuration) {
  CascadeLevel a = known_level(600);
  CascadeLevel b = known_level(2400);
  b.p10 = 0.35;
  const std::vector<CascadeLevel> levels = {a, b};
  // 1200 s lies halfway between 600 and 2400 in log duration.
  EXPECT_DOUBLE_EQ(cascade_level_at(levels, 1200).p10, 0.25);
  EXPECT_EQ(cascade_level_at(levels, 100).p10, 0.15);
  EXPECT_EQ(cascade_level_at(levels, 1e6).p10, 0.35);
}

TEST(Disaggregation, NeedsEnoughWetBoxesToCalibrate) {
  EXPECT_TRUE(estimate_cascade(known_cascade_record(0), 76800).empty());
  // A single wet interval gives at most 19 wet boxes of 10 min in 200 min of rain.
  RainSeries fine;
  fine.step_s = 300;
  fine.covered = {{kT0, kT0 + 86400}};
  for (Instant k = 0; k < 19; ++k)
    fine.pulses.push_back({kT0 + 600 * k, kT0 + 600 * k + 300, 1e-3});
  EXPECT_TRUE(estimate_cascade(fine, 86400).empty());
  fine.pulses.push_back({kT0 + 600 * 19, kT0 + 600 * 19 + 300, 1e-3});
  const std::vector<CascadeLevel> levels = estimate_cascade(fine, 86400);
  ASSERT_EQ(levels.size(), 1u);
  EXPECT_EQ(levels[0].p10, 1.0);
}

TEST(Disaggregation, WarnsOnlyOfAnUncalibratedCascade) {
  const RainSeries as_read = read_series(kHourly);
  const RainSeries by_default = disaggregate(as_read, method(DisaggregationMethod::cascade));
  EXPECT_NE(std::find(by_default.warnings.begin(), by_default.warnings.end(), kUncalibratedWarning),
            by_default.warnings.end());
  Disaggregation calibrated = method(DisaggregationMethod::cascade);
  calibrated.levels = {known_level(600)};
  const RainSeries rain = disaggregate(as_read, calibrated);
  EXPECT_EQ(std::find(rain.warnings.begin(), rain.warnings.end(), kUncalibratedWarning),
            rain.warnings.end());
  // The pulses themselves add up to the record (total_depth_m is copied from it).
  EXPECT_EQ(sum_depths_m(rain.pulses), as_read.total_depth_m);
}

TEST(Disaggregation, TakesTheMedianOfTheAnnualMaximaOverAWindow) {
  // Invented: 1, 3, 2 mm in three 5-minute steps of 2025, 1 mm in one of 2026. Worked by hand:
  // 2025's largest 5-minute depth 3 mm (36 mm/h), 15-minute 6 mm (24 mm/h); 2026's 1 mm. The
  // median of two maxima (definition 7) is their mean.
  RainSeries rain;
  rain.step_s = 300;
  rain.covered = {{kT0, kT0 + 400 * kDay}};
  rain.pulses = {{kT0 + 600, kT0 + 900, 1e-3},
                 {kT0 + 900, kT0 + 1200, 3e-3},
                 {kT0 + 1200, kT0 + 1500, 2e-3},
                 {kT0 + 365 * kDay, kT0 + 365 * kDay + 300, 1e-3}};
  constexpr double kMmPerHour = 1e-3 / 3600.0;
  EXPECT_NEAR(median_annual_max_intensity_m_per_s(rain, 300), (36.0 + 12.0) / 2 * kMmPerHour,
              1e-15);
  EXPECT_NEAR(median_annual_max_intensity_m_per_s(rain, 900), (24.0 + 4.0) / 2 * kMmPerHour, 1e-15);
}

TEST(Disaggregation, FitsABurstierCascadeToASteeperIdfCurve) {
  // Invented daily totals: 60 wet days of 10 mm. Two invented curves with the same hourly
  // intensity: the steeper one asks for more rain in 5 minutes, so a more intermittent cascade.
  RainSeries daily;
  daily.step_s = kDay;
  daily.covered = {{kT0, kT0 + 60 * kDay}};
  for (Instant d = 0; d < 60; ++d)
    daily.pulses.push_back({kT0 + d * kDay, kT0 + (d + 1) * kDay, 10e-3});
  daily.total_depth_m = sum_depths_m(daily.pulses);
  const Disaggregation how = method(DisaggregationMethod::cascade);
  // i(60) = a / (60 + b)^c: steep a 400, b 5, c 0.9 gives 9.9 mm/h; flat a 14.2, b 5, c 0.1.
  const double steep = fit_intermittency(daily, how, IdfCurve{400, 5, 0.9});
  const double flat = fit_intermittency(daily, how, IdfCurve{14.2, 5, 0.1});
  EXPECT_GT(steep, flat);
  Disaggregation fitted = how;
  fitted.intermittency = steep;
  fitted.idf = IdfCurve{400, 5, 0.9};
  const RainSeries rain = disaggregate(daily, fitted);
  EXPECT_EQ(sum_depths_m(rain.pulses), daily.total_depth_m);
  EXPECT_EQ(std::find(rain.warnings.begin(), rain.warnings.end(), kUncalibratedWarning),
            rain.warnings.end());
}

TEST(Disaggregation, IdfFitFollowsAPublishedCurve) {
  // The published curve of REFERENCES.md section 8 (the Chicago check: i = a / (t + b)^c with
  // a 1500 mm/h, b 10 min, c 0.75), whose depths are 26.434 mm in 10 min, 47.154 mm in 30 min
  // and 61.982 mm in 60 min (its check values, a T / (T + b)^c / 60). Invented daily totals, eight
  // years from 2025-03-01 of 60 wet days each: 59 of 2 to 31 mm and one storm day of 200 mm.
  RainSeries daily;
  daily.step_s = kDay;
  daily.covered = {{kT0, kT0 + 8 * 365 * kDay}};
  for (Instant year = 0; year < 8; ++year) {
    for (Instant d = 0; d < 60; ++d) {
      const double mm = d == 30 ? 200.0 : 2.0 + static_cast<double>((d * 7 + year) % 30);
      const Instant start = kT0 + (year * 365 + d * 6) * kDay;
      daily.pulses.push_back({start, start + kDay, mm * 1e-3});
    }
  }
  daily.total_depth_m = sum_depths_m(daily.pulses);
  const IdfCurve chicago{1500, 10, 0.75};
  Disaggregation how = method(DisaggregationMethod::cascade);
  how.intermittency = fit_intermittency(daily, how, chicago);
  how.idf = chicago;
  const RainSeries rain = disaggregate(daily, how);
  // One number fitted to three durations cannot meet the curve at each: the fitted record's
  // 2-year depths are asked to lie within a factor of 1.25 of the published ones (a project
  // tolerance, no source). The default intermittency (0.3) misses it: 48 mm in 10 minutes,
  // 1.8 times the curve's (worked out when this test was written).
  const double published_mm[][2] = {{10, 26.434}, {30, 47.154}, {60, 61.982}};
  for (const auto& [minutes, mm] : published_mm) {
    const auto duration_s = static_cast<Instant>(minutes * 60);
    const double got_mm = median_annual_max_intensity_m_per_s(rain, duration_s) *
                          static_cast<double>(duration_s) * 1e3;
    EXPECT_GT(got_mm, mm / 1.25) << minutes << " min";
    EXPECT_LT(got_mm, mm * 1.25) << minutes << " min";
  }
}

TEST(Disaggregation, NumbersRealizationsFromTheGivenSeed) {
  EXPECT_EQ(realization_seed(42, 0), 42u);
  EXPECT_EQ(realization_seed(42, 19), 61u);
  EXPECT_EQ(realization_seed(18446744073709551615ULL, 1), 0u);
  EXPECT_TRUE(is_random(DisaggregationMethod::cascade));
  EXPECT_TRUE(is_random(DisaggregationMethod::fragments));
  EXPECT_FALSE(is_random(DisaggregationMethod::nrcs_ii));
}

}  // namespace
}  // namespace gutterwatt::disaggregation_test
