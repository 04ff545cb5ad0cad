// The accuracy comparison of tools/accuracy (issue 11), small: one invented year of 5-minute
// rain, its hourly (and, for the method of fragments, daily) totals disaggregated by the cascade
// or the fragments calibrated with another invented year of the same climate, against the run on
// the 5-minute record. The climate is the Poisson
// rectangular pulses model (src/synth.cpp) with the invented monthly statistics of
// data/demo/synth-monthly.csv; the two years differ by seed only.
//
// The target is issue 11's: energy within 15 % and siphon cycles within 20 % of the fine run
// (a project target, no source). It holds here for the demo design with a priming flow of
// 1 L/min (measured when written: energy +10 %, cycles +6 %, median of 8 realizations). It does
// not hold everywhere: on this record the demo design's 2 L/min gives +28 % energy from hourly
// totals and daily totals give +180 %; README, "How far to trust a disaggregated record", has
// the full table of tools/accuracy and why. The method of fragments holds it from hourly and
// from daily totals here (measured when written: energy +6.1 % and +13.6 %, cycles -0.2 % and
// -7.5 %, median of 8 realizations; with the edge rule of choose_fragment, +3.5 % and +12.9 %,
// -0.4 % and -8.7 %; with whole wet spells of hours matched (choose_spell), +8.7 % and +12.9 %,
// +0.4 % and -8.7 %; with the depth rule for days (kMinDepthMatches), +8.7 % and +13.4 %,
// +0.4 % and -6.5 %; with its rule for hours, -0.8 % and +13.4 %, -1.1 % and -6.5 %; with that
// rule symmetric (kDepthFactor), -2.0 % and +13.4 %, -1.7 % and -6.5 %; with a day's pattern
// scaled up at most kMaxDayScaleUp times, -2.0 % and +12.9 %, -1.7 % and -8.1 %).

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <string>
#include <vector>

#include "detail.hpp"
#include "gutterwatt/disaggregation.hpp"
#include "gutterwatt/fragments.hpp"
#include "gutterwatt/scenario.hpp"
#include "gutterwatt/simulation.hpp"
#include "gutterwatt/synth.hpp"

namespace gutterwatt::disaggregation_accuracy_test {
namespace {

constexpr Instant kStep_s = 300;
constexpr Instant kHour_s = 3600;
constexpr int kRealizations = 8;

Instant at(const char* stamp) { return parse_iso8601(stamp)->instant; }

// One invented year of 5-minute rain from the model, as the series reader would give it.
RainSeries invented_year(std::uint64_t seed) {
  std::ifstream in(std::string(GUTTERWATT_SOURCE_DIR) + "/data/demo/synth-monthly.csv");
  const PrpParameters parameters = read_prp_parameters(in, "synth-monthly.csv");
  SynthSpec spec;
  spec.start = at("2025-01-01T00:00");
  spec.end = at("2026-01-01T00:00");
  spec.step_s = kStep_s;
  spec.seed = seed;
  RainSeries rain;
  rain.step_s = kStep_s;
  rain.covered.push_back({spec.start, spec.end});
  generate_prp(parameters, spec, [&](Instant end, double depth_m) {
    if (depth_m > 0.0) rain.pulses.push_back({end - kStep_s, end, depth_m});
  });
  rain.total_depth_m = sum_depths_m(rain.pulses);
  return rain;
}

// The record's totals over intervals of `length_s` (its coverage starts on the hour and day).
RainSeries totals(const RainSeries& fine, Instant length_s) {
  RainSeries coarse = fine;
  coarse.step_s = length_s;
  coarse.pulses.clear();
  const Instant t0 = fine.covered.front().start;
  for (const RainPulse& p : fine.pulses) {
    const Instant start = t0 + detail::floor_div(p.start - t0, length_s) * length_s;
    if (!coarse.pulses.empty() && coarse.pulses.back().start == start) {
      coarse.pulses.back().depth_m += p.depth_m;
    } else {
      coarse.pulses.push_back({start, start + length_s, p.depth_m});
    }
  }
  return coarse;
}

struct Outcome {
  double energy_J = 0.0;
  double cycles = 0.0;
};

Outcome run_on(const RainSeries& rain) {
  // The demo design (invented) with a priming flow of 1 L/min, over the invented year.
  const Scenario sc =
      load_scenario(std::string(GUTTERWATT_SOURCE_DIR) + "/scenarios/demo.yaml",
                    {"simulation.start=2025-01-01T00:00", "simulation.end=2026-01-01T00:00",
                     "simulation.output_interval=1d", "release.priming_flow_L_per_min=1"});
  Observer none;
  const RunResult r = simulate(sc, rain, none, RunOptions{});
  return {r.totals.electrical_J, static_cast<double>(r.cycles)};
}

double median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  return detail::quantile_of_sorted(v, 0.5);
}

// The median energy and cycles of kRealizations disaggregations of `coarse` by `how`, as
// shares of the fine run's, minus 1.
Outcome median_error(const RainSeries& coarse, Disaggregation how, const Outcome& truth) {
  std::vector<double> energy;
  std::vector<double> cycles;
  for (std::uint64_t k = 0; k < kRealizations; ++k) {
    how.seed = realization_seed(1, k);
    const Outcome o = run_on(disaggregate(coarse, how));
    energy.push_back(o.energy_J);
    cycles.push_back(o.cycles);
  }
  return {median(energy) / truth.energy_J - 1.0, median(cycles) / truth.cycles - 1.0};
}

TEST(DisaggregationAccuracy, HourlyTotalsCalibratedByAnotherYearMeetTheTarget) {
  const RainSeries fine = invented_year(1);
  const RainSeries hourly = totals(fine, kHour_s);
  ASSERT_EQ(hourly.total_depth_m, fine.total_depth_m);  // the totals keep the year's rain
  Disaggregation how;
  how.method = DisaggregationMethod::cascade;
  how.step_s = kStep_s;
  how.levels = estimate_cascade(invented_year(2), kHour_s);  // as calibrate_with does
  ASSERT_FALSE(how.levels.empty());

  const Outcome truth = run_on(fine);
  ASSERT_GT(truth.cycles, 100.0);  // enough cycles for a 20 % band to mean something
  const Outcome error = median_error(hourly, how, truth);
  EXPECT_LT(std::abs(error.energy_J), 0.15);
  EXPECT_LT(std::abs(error.cycles), 0.20);
}

TEST(DisaggregationAccuracy, HourlyAndDailyTotalsByFragmentsMeetTheTarget) {
  const RainSeries fine = invented_year(1);
  const RainSeries calibration = invented_year(2);
  const Outcome truth = run_on(fine);
  for (const Instant length_s : {kHour_s, detail::kDay_s}) {
    const RainSeries coarse = totals(fine, length_s);
    Disaggregation how;
    how.method = DisaggregationMethod::fragments;
    how.step_s = kStep_s;
    // As calibrate_with does: the intervals cut as the totals' are (on the hour, the day).
    how.fragments = {build_fragment_library(calibration, length_s, 0, kStep_s)};
    const Outcome error = median_error(coarse, how, truth);
    EXPECT_LT(std::abs(error.energy_J), 0.15) << length_s;
    EXPECT_LT(std::abs(error.cycles), 0.20) << length_s;
  }
}

}  // namespace
}  // namespace gutterwatt::disaggregation_accuracy_test
