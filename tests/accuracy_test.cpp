// Accuracy at benchmark speed (issue 7, item 3), at a small size: the demo design
// (scenarios/demo.yaml) on three invented storm days of 1-minute rain, run with its default
// tolerance (rtol 1e-6) and against a fine fixed-step reference.
//
// The reference integrates the same model with the classic fourth-order Runge-Kutta method
// (Kutta 1901; Hairer, Norsett & Wanner, Solving Ordinary Differential Equations I, 2nd ed.,
// 1993, II.1) at a fixed 0.05 s step: no error estimate, no step-size control and no dense
// output, so none of the default solver's step choices or interpolation enter it. Its switches
// are placed by bisection on re-taken steps. Between switches the model is smooth, and the
// method's global error falls as h^4; the suite checks that the reference has converged
// (0.1 s and 0.05 s steps agree far more closely than the default run is asked to). A second
// check runs the default solver at rtol 1e-10 and asks it to agree with the fixed-step reference.
// What neither reference can see is a mistake in the model itself; the physics tests look for
// those.

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>
#include <string>
#include <vector>

#include "gutterwatt/rain_files.hpp"
#include "gutterwatt/rain_input.hpp"
#include "gutterwatt/scenario.hpp"
#include "gutterwatt/simulation.hpp"
#include "test_support.hpp"

namespace gutterwatt::accuracy_test {
namespace {

constexpr int kMinutes = 3 * 1440;

// Invented rain intensity, mm/h, in minute `m` of the three days (from 2025-06-01T00:00):
// day 1 a long frontal rain whose intensity wanders around the priming flow, day 2 a convective
// storm with a burst that overflows the gutter, day 3 a drizzle too light to prime the siphon
// followed by an afternoon of steady rain.
double intensity_mm_per_h(int m) {
  const double pi = std::acos(-1.0);
  const int day = m / 1440;
  const double h = (m % 1440) / 60.0;
  if (day == 0 && h >= 4.0 && h < 11.0) return 4.0 + 2.5 * std::sin(2.0 * pi * h / 0.7);
  if (day == 1 && h >= 15.0 && h < 16.5) {
    return 6.0 + 90.0 * std::exp(-0.5 * std::pow((h - 15.4) / 0.1, 2));
  }
  if (day == 2 && h >= 1.0 && h < 8.0) return 0.8;
  if (day == 2 && h >= 14.0 && h < 18.0) return 5.0;
  return 0.0;
}

// Invented choppy drizzle, mm/h, in minute `m` of a day: a new intensity every minute between 0
// and 3 mm/h (around the demo siphon's priming flow), so that the level rises and falls inside
// the solver's steps and a dribble's peak seldom falls on a step's end.
double choppy_mm_per_h(int m) {
  if (m % 480 >= 40) return 0.0;
  return 3.0 * static_cast<double>((m * 7919) % 13) / 12.0;
}

// The storm days as a period-ending 1-minute record, read by the series reader.
RainSeries storm_days(double (*rain_mm_per_h)(int) = intensity_mm_per_h) {
  std::ostringstream csv;
  csv << "time,rain_mm\n";
  char row[64];
  for (int m = 0; m < kMinutes; ++m) {
    const int end = m + 1;  // the row is stamped at the end of its minute
    std::snprintf(row, sizeof row, "2025-06-%02dT%02d:%02d,%.4f\n", 1 + end / 1440, end % 1440 / 60,
                  end % 60, rain_mm_per_h(m) / 60.0);
    csv << row;
  }
  std::istringstream in(csv.str());
  SeriesFormat fmt;
  fmt.step_s = 60.0;
  return read_rain_series(in, "storm-days.csv", fmt);
}

// A run's results with its episodes and the times of its switches, as a run's observer receives
// them.
struct RunWithEpisodes : RunResult {
  std::vector<Episode> episodes;
  std::vector<double> switch_times;
};

RunWithEpisodes run_on(const RainSeries& rain, const std::vector<std::string>& overrides,
                       double fixed_step_s) {
  // The demo design (invented), on the storm days instead of its own record.
  std::vector<std::string> all = {"simulation.start=2025-06-01T00:00",
                                  "simulation.end=2025-06-04T00:00",
                                  "simulation.output_interval=1d"};
  all.insert(all.end(), overrides.begin(), overrides.end());
  const Scenario sc =
      load_scenario(std::string(GUTTERWATT_SOURCE_DIR) + "/scenarios/demo.yaml", all);
  test_support::RecordingObserver records;
  records.record_trace = true;
  RunOptions options;
  options.fixed_step_s = fixed_step_s;
  RunWithEpisodes run{simulate(sc, rain, records, options), std::move(records.episodes),
                      records.switch_times()};
  return run;
}

RunWithEpisodes run_with(const std::vector<std::string>& overrides, double fixed_step_s = 0.0) {
  static const RainSeries rain = storm_days();
  return run_on(rain, overrides, fixed_step_s);
}

const RunWithEpisodes& default_run() {
  static const RunWithEpisodes r = run_with({});
  return r;
}

const RunWithEpisodes& reference_run() {
  static const RunWithEpisodes r = run_with({}, 0.05);
  return r;
}

double relative_difference(double a, double b) { return std::abs(a - b) / std::abs(b); }

// Each episode's peak flow and energy against the reference's, episode by episode (the same
// episodes, in the same order). The reference looks every 0.05 s, so it misses a peak by less
// than the flow's curvature times (0.05 s)^2 / 8: far below these limits. An episode that makes
// no energy in the reference (an overflow, a dribble below the generator's cut-in) makes none in
// the run.
void expect_episodes_close(const RunWithEpisodes& run, const RunWithEpisodes& reference,
                           double tolerance) {
  ASSERT_EQ(run.episodes.size(), reference.episodes.size());
  for (std::size_t k = 0; k < run.episodes.size(); ++k) {
    const Episode& got = run.episodes[k];
    const Episode& want = reference.episodes[k];
    ASSERT_EQ(got.kind, want.kind) << k;
    EXPECT_LT(relative_difference(got.peak_flow_m3_per_s, want.peak_flow_m3_per_s), tolerance)
        << "episode " << k << " (" << episode_kind_name(got.kind) << ")";
    if (want.energy_J > 0.0) {
      EXPECT_LT(relative_difference(got.energy_J, want.energy_J), tolerance)
          << "energy of episode " << k << " (" << episode_kind_name(got.kind) << ")";
    } else {
      EXPECT_EQ(got.energy_J, 0.0) << "energy of episode " << k;
    }
  }
}

// Each test runs in a process of its own under ctest, so the tests that need the 0.05 s reference
// (1.4 million steps) are few: each computes it once.
TEST(Accuracy, FixedStepReferenceCyclesClosesItsBalanceAndHasConverged) {
  const RunResult& r = reference_run();
  // The storm days exercise every mode.
  EXPECT_GE(r.cycles, 5);
  EXPECT_GE(r.dribble_episodes, 1);
  EXPECT_GE(r.overflow_events, 1);
  EXPECT_GT(r.totals.electrical_J, 0.0);
  EXPECT_LT(r.balance_relative_error, kMaxBalanceError);
  EXPECT_GT(r.stats.steps, 100000);  // it did take the fine steps
  // Halving the step changes nothing that matters.
  const RunWithEpisodes coarser = run_with({}, 0.1);
  EXPECT_EQ(coarser.cycles, r.cycles);
  EXPECT_LT(relative_difference(coarser.totals.electrical_J, r.totals.electrical_J), 1e-5);
}

TEST(Accuracy, DefaultAndTightToleranceAgreeWithTheFixedStepReference) {
  const RunWithEpisodes& reference = reference_run();
  // The 0.5 % limit is issue 7's target (a project choice, no source).
  EXPECT_LT(relative_difference(default_run().totals.electrical_J, reference.totals.electrical_J),
            0.005);
  EXPECT_LT(relative_difference(default_run().totals.stored_J, reference.totals.stored_J), 0.005);
  EXPECT_EQ(default_run().cycles, reference.cycles);
  EXPECT_EQ(default_run().overflow_events, reference.overflow_events);
  const RunWithEpisodes tight = run_with({"simulation.rtol=1e-10"});
  EXPECT_EQ(tight.cycles, reference.cycles);
  EXPECT_EQ(tight.overflow_events, reference.overflow_events);
  EXPECT_LT(relative_difference(tight.totals.electrical_J, reference.totals.electrical_J), 1e-5);
  expect_episodes_close(default_run(), reference, 0.005);
  expect_episodes_close(tight, reference, 1e-5);
}

// Issue 16: a design run at the default tolerance and at rtol 1e-10 against its own fixed-step
// reference (0.05 s): the same cycles and overflows, and the energy, the dribble, the overflow
// and every episode's peak flow and energy within 0.5 % (issue 7's target) and 1e-5 (issue
// 16's); a quantity the reference has none of must be none in the run too (the small gutter never
// primes on these days). The rows of tools/bench, on the demo design; the demo's own 60 s lag is
// checked above.
void expect_close(const RunWithEpisodes& run, const RunWithEpisodes& reference, double tolerance) {
  EXPECT_EQ(run.cycles, reference.cycles);
  EXPECT_EQ(run.overflow_events, reference.overflow_events);
  const struct {
    const char* what;
    double got, want;
  } quantities[] = {{"electrical energy", run.totals.electrical_J, reference.totals.electrical_J},
                    {"dribble", run.totals.dribble_m3, reference.totals.dribble_m3},
                    {"overflow", run.totals.overflow_m3(), reference.totals.overflow_m3()}};
  for (const auto& q : quantities) {
    if (q.want > 0.0) {
      EXPECT_LT(relative_difference(q.got, q.want), tolerance) << q.what;
    } else {
      EXPECT_EQ(q.got, 0.0) << q.what;
    }
  }
  expect_episodes_close(run, reference, tolerance);
}

void agrees_with_its_reference(const std::vector<std::string>& design) {
  const RunWithEpisodes reference = run_with(design, 0.05);
  EXPECT_GT(reference.totals.dribble_m3, 0.0);  // every design dribbles on day 3
  expect_close(run_with(design), reference, 0.005);
  std::vector<std::string> tight_design = design;
  tight_design.push_back("simulation.rtol=1e-10");
  expect_close(run_with(tight_design), reference, 1e-5);
}

// The roof stage in closed form makes a short lag cost what no lag costs, and leaves the answer
// where the fixed-step reference (which steps the same closed-form roof) puts it.
TEST(Accuracy, ShortRoofLagAgreesWithTheFixedStepReference) {
  agrees_with_its_reference({"roof.lag_s=0.01"});
}

TEST(Accuracy, OneSecondRoofLagAgreesWithTheFixedStepReference) {
  agrees_with_its_reference({"roof.lag_s=1"});
}

TEST(Accuracy, SmallGutterAgreesWithTheFixedStepReference) {
  agrees_with_its_reference({"reservoir.width_mm=60", "reservoir.length_m=1", "reservoir.rim_mm=30",
                             "release.trigger_level_mm=24", "release.break_level_mm=4"});
}

TEST(Accuracy, ThinHeadColumnAgreesWithTheFixedStepReference) {
  agrees_with_its_reference({"head_column.diameter_mm=30"});
}

TEST(Accuracy, TighterToleranceAgreesWithTheFixedStepReference) {
  const RunWithEpisodes& reference = reference_run();
  const RunWithEpisodes run = run_with({"simulation.rtol=1e-8"});
  EXPECT_EQ(run.cycles, reference.cycles);
  EXPECT_EQ(run.overflow_events, reference.overflow_events);
  EXPECT_LT(relative_difference(run.totals.electrical_J, reference.totals.electrical_J), 1e-5);
  expect_episodes_close(run, reference, 1e-5);
}

// Issue 16: no valid design makes the solver give up. Each key of the demo design taken alone to
// an extreme (lags of 0 to an hour, roofs of 1 and 2,000 m2, gutters of 30 mm and 0.2 m, columns
// of 10 to 500 mm, nozzles of 1 to 15 mm, set-points 1 mm apart, priming flows of 0.1 and 20
// L/min, tolerances of 1e-3 and 1e-10, no cut-in and 50 W, a 0.1 Wh battery, a 60 m drop pipe, a
// 500 L diverter, an orifice): each runs the storm days to the end and closes its water balance.
// On the bench record's first year the same designs ran to the end too, the slowest in 0.37 s
// (docs/performance.md; the 20 L/min priming flow on 7a4f343, the others on 2b23f80).
TEST(Accuracy, DesignsAtTheEndsOfTheirKeysRunToTheEnd) {
  const std::vector<std::vector<std::string>> designs = {
      {"roof.lag_s=0"},
      {"roof.lag_s=0.0001"},
      {"roof.lag_s=3600"},
      {"roof.area_m2=1"},
      {"roof.area_m2=2000"},
      {"roof.initial_loss_mm=0"},
      {"reservoir.length_m=0.2"},
      {"reservoir.width_mm=30", "reservoir.rim_mm=15", "release.trigger_level_mm=12",
       "release.break_level_mm=2"},
      {"head_column.diameter_mm=10"},
      {"head_column.diameter_mm=500"},
      {"nozzle.diameter_mm=1"},
      {"nozzle.diameter_mm=15"},
      {"release.priming_flow_L_per_min=0.1"},
      {"release.priming_flow_L_per_min=20"},
      {"release.trigger_level_mm=9"},
      {"release.break_level_mm=49"},
      {"simulation.rtol=1e-3"},
      {"simulation.rtol=1e-10"},
      {"generator.cut_in_W=0"},
      {"generator.cut_in_W=50"},
      {"battery.capacity_Wh=0.1"},
      {"battery.load_W=5"},
      {"drop_pipe.length_m=60", "drop_pipe.drop_m=50"},
      {"reservoir.evaporation_mm_per_day=20"},
      {"first_flush.volume_L=500"},
      {"release.kind=orifice", "release.orifice_diameter_mm=5"}};
  for (const std::vector<std::string>& design : designs) {
    std::string keys;
    for (const std::string& k : design) keys += k + " ";
    try {
      const RunWithEpisodes run = run_with(design);
      EXPECT_LT(run.balance_relative_error, kMaxBalanceError) << keys;
      EXPECT_GT(run.stats.steps, 0) << keys;
    } catch (const std::exception& e) {
      ADD_FAILURE() << keys << ": " << e.what();
    }
  }
}

// Every flow an episode follows rises with the reservoir's level, so where the level peaks inside
// a step, so do they. An episode's peak flow is looked for there too, not only at the steps'
// ends, which see every peak that falls between them too low: on this rain, before the level's
// peaks were placed on the dense output, the run at the default tolerance had every one of the 7
// episodes' peaks below the reference's, 6 of them by more than 0.1 % and the worst by 2.8 %.
TEST(Accuracy, PeakFlowsOnChoppyRainAgreeWithTheFixedStepReference) {
  const RainSeries rain = storm_days(choppy_mm_per_h);
  const RunWithEpisodes reference = run_on(rain, {}, 0.05);
  EXPECT_GE(reference.dribble_episodes, 3);
  expect_episodes_close(run_on(rain, {}, 0.0), reference, 1e-4);
}

// Invented: an hour of steady rain that cycles the siphon, an hour and a half dry, then light rain
// that rises over ten minutes and goes on for forty in whole hundredths of a millimetre a minute,
// as a tipping logger records it (the pattern drawn once with a fixed seed).
double light_after_dry_mm_per_h(int m) {
  static constexpr char kHundredths[] = "4435543335543455444344344444443545544454";
  double mm = 0.0;
  if (m < 60) {
    mm = 0.08;
  } else if (m >= 150 && m < 160) {
    mm = 0.01 * (1 + (m - 150) / 3);
  } else if (m >= 160 && m < 200) {
    mm = 0.01 * (kHundredths[m - 160] - '0');
  }
  return 60.0 * mm;
}

// Issue 16: a switch can happen and un-happen inside a step, where the reservoir's level turns
// between the step's ends, so the guards are looked at there too. On this rain the dribble's level
// peaks just over the head column's trickle limit inside a step: before, the run found the column
// filling 1,093 s after the reference did (its steps' ends all fell below the limit, and the next
// peak over it came later); after, within 0.1 s. The rain was drawn for a trickle limit of 0.05 m
// of head; the generator's cut-in here is the jet's power at that head, which puts the limit
// there (trickle_head_m): at the demo's own 0.1 m the siphon primes before a dribble reaches it.
// The run stops before the dribble ends: that switch's time is ill-conditioned (the level creeps to
// half the hold head, 5 um over the lip), and is some seconds late at the default tolerance,
// converging with it.
TEST(Accuracy, SwitchesWhereTheLevelTurnsInsideAStepAgreeWithTheFixedStepReference) {
  const RainSeries rain = storm_days(light_after_dry_mm_per_h);
  const std::vector<std::string> design = {"simulation.end=2025-06-01T05:00",
                                           "reservoir.evaporation_mm_per_day=0",
                                           "generator.cut_in_W=0.01227"};
  const RunWithEpisodes reference = run_on(rain, design, 0.05);
  const RunWithEpisodes run = run_on(rain, design, 0.0);
  EXPECT_GE(reference.cycles, 4);
  // The times traced twice are the switches, and no more, on this rain.
  ASSERT_EQ(run.switch_times.size(), static_cast<std::size_t>(run.stats.switches));
  ASSERT_EQ(reference.switch_times.size(), static_cast<std::size_t>(reference.stats.switches));
  ASSERT_EQ(run.switch_times.size(), reference.switch_times.size());
  for (std::size_t k = 0; k < run.switch_times.size(); ++k) {
    EXPECT_NEAR(run.switch_times[k], reference.switch_times[k], 1.0) << "switch " << k;
  }
}

// Invented: two hours of the benchmark's invented one-minute record (tools/make_long_rain.py,
// seed 10, from 2015-08-23T01:00) in hundredths of a millimetre a minute, placed from the second
// hour: a drizzle that swells to 0.15 mm a minute and eases.
double swelling_drizzle_mm_per_h(int m) {
  static constexpr int kHundredths[] = {
      1,  2,  2,  1,  2,  1,  2,  2,  1, 2, 2,  3,  2,  2,  3,  2,  2,  3,  1,  2,  2,  2,  2,  2,
      1,  2,  2,  2,  2,  2,  2,  1,  2, 2, 2,  1,  2,  2,  1,  2,  2,  2,  2,  3,  2,  3,  2,  3,
      3,  4,  3,  5,  4,  5,  6,  6,  8, 8, 10, 10, 11, 12, 12, 13, 14, 14, 14, 15, 15, 15, 14, 14,
      14, 13, 12, 12, 11, 11, 11, 10, 9, 9, 8,  8,  7,  6,  5,  6,  5,  5,  5,  6,  4,  4,  3,  2,
      3,  3,  2,  3,  4,  4,  4,  4,  4, 3, 4,  3,  4,  2,  3,  3,  3,  3,  2,  2,  3,  3,  3,  3};
  if (m < 60 || m >= 180) return 0.0;
  return 60.0 * 0.01 * kHundredths[m - 60];
}

// Issue 16: the head column's guard back to trickle is the larger of two terms, its puddle's and
// its inflow's (ChainSystem::trickle_guard_terms), so it can fall below zero and rise again
// between two steps' ends with neither end showing it. On this rain with a 1 s roof lag, a
// dribble grows after a cycle while the column's puddle drains: the reference passes the column
// to trickle for 32 s (02:12:18 to 02:12:50). Before the stepper looked where the term larger at
// a step's start crosses zero, the run passed over that spell: 27 switches against the
// reference's 29.
TEST(Accuracy, ATrickleSpellBetweenTwoStepsEndsAgreesWithTheFixedStepReference) {
  const RainSeries rain = storm_days(swelling_drizzle_mm_per_h);
  const std::vector<std::string> design = {
      "simulation.start=2025-06-01T01:00", "simulation.end=2025-06-01T03:00", "roof.lag_s=1",
      "reservoir.evaporation_mm_per_day=0", "turbine.speed_rpm=best"};
  const RunWithEpisodes reference = run_on(rain, design, 0.05);
  const RunWithEpisodes run = run_on(rain, design, 0.0);
  EXPECT_GE(reference.cycles, 2);
  EXPECT_EQ(run.cycles, reference.cycles);
  ASSERT_EQ(run.stats.switches, reference.stats.switches);
  // The instants traced twice: a switch, several at once, or one where the chain comes to rest.
  const auto instants = [](std::vector<double> times) {
    times.erase(std::unique(times.begin(), times.end()), times.end());
    return times;
  };
  const std::vector<double> got = instants(run.switch_times);
  const std::vector<double> want = instants(reference.switch_times);
  ASSERT_EQ(got.size(), want.size());
  for (std::size_t k = 0; k < got.size(); ++k) {
    EXPECT_NEAR(got[k], want[k], 1.0) << "switch " << k;
  }
  EXPECT_LT(relative_difference(run.totals.electrical_J, reference.totals.electrical_J), 1e-5);
}

// The demo scenario (invented) on its own nine months of invented 5-minute rain, run with
// `options`.
RunResult run_demo_scenario(const RunOptions& options) {
  static const Scenario sc =
      load_scenario(std::string(GUTTERWATT_SOURCE_DIR) + "/scenarios/demo.yaml", {});
  static const RainSeries rain = load_rain(sc.rain);
  Observer none;
  return simulate(sc, rain, none, options);
}

// Issue 16: the demo scenario itself, nine months of its invented 5-minute record, against its
// fixed-step reference, within issue 16's 1e-5. Before the guards were looked at where the level
// turns inside a step, its energy was 3.4e-5 above the reference's: the head column's filling at
// 2025-06-22 14:15:20 was passed over between two steps' ends. Then 1.6e-6; since the solver's
// linear reference (d1fab0a to b18377e), 1.3e-6 (jet energy 1.0e-6).
TEST(Accuracy, DemoScenarioAgreesWithItsFixedStepReference) {
  RunOptions fixed;
  fixed.fixed_step_s = 0.05;
  const RunResult reference = run_demo_scenario(fixed);
  const RunResult run = run_demo_scenario(RunOptions{});
  EXPECT_EQ(run.cycles, reference.cycles);
  EXPECT_EQ(run.overflow_events, reference.overflow_events);
  EXPECT_LT(relative_difference(run.totals.electrical_J, reference.totals.electrical_J), 1e-5);
  EXPECT_LT(relative_difference(run.totals.jet_J, reference.totals.jet_J), 1e-5);
}

// Issue 16: below the trickle limit a head column passes what arrives straight to the nozzle
// while its water follows its own law beside the solver (column_trickle.hpp), so where the limit
// sits is a matter of the solver's steps, not of the answer. The demo scenario's nine months with
// the limit at the demo's own 0.1 m, at 0.05 m, and at 5 mm (the column stepped nearly dry): the
// same cycles and overflows, and the electrical energy within 2e-5 (measured: 1.8e-6 and 3.3e-6;
// since the solver's linear reference, 2.5e-7 and 6.4e-8).
// With the column's water held still in trickle (the following switched off), the 0.05 m and
// 0.1 m runs come out 5.1e-5 and 2.2e-4 below the 5 mm one, and this test fails.
TEST(Accuracy, TheTrickleLimitDoesNotMoveTheDemoScenariosEnergy) {
  RunOptions stepped;
  stepped.trickle_head_m = 0.005;
  const RunResult nearly_dry = run_demo_scenario(stepped);
  RunOptions halved;
  halved.trickle_head_m = 0.05;
  for (const RunOptions& options : {RunOptions{}, halved}) {
    const RunResult run = run_demo_scenario(options);
    EXPECT_EQ(run.cycles, nearly_dry.cycles) << options.trickle_head_m;
    EXPECT_EQ(run.overflow_events, nearly_dry.overflow_events) << options.trickle_head_m;
    EXPECT_LT(relative_difference(run.totals.electrical_J, nearly_dry.totals.electrical_J), 2e-5)
        << options.trickle_head_m;
    EXPECT_LT(run.stats.steps, nearly_dry.stats.steps);  // the higher limit's point
  }
}

}  // namespace
}  // namespace gutterwatt::accuracy_test
