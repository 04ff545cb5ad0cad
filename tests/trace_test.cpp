// The fine trace (item 1 of issue 17): a point at every mode switch (in the mode before and the
// mode after), at least every kTraceStep_s while anything moves, none while the chain rests; and
// trace.csv's columns in SI and in US units.

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include "gutterwatt/output.hpp"
#include "gutterwatt/simulation.hpp"
#include "test_support.hpp"

namespace gutterwatt::trace_test {
namespace {

using test_support::block_rain;
using test_support::kLitre_m3;
using test_support::kPerMinute;
using test_support::kStart;
using test_support::make_scenario;
using test_support::RecordingObserver;

// A recording observer that takes the fine trace.
struct TraceRecorder : RecordingObserver {
  TraceRecorder() { record_trace = true; }
};

// The default box (simulation_test's kBoxCycle, by hand from the published forms): from the
// break level at 0.1 L/s inflow the bell primes 399.1883 s after the start at the priming level
// 56.072891 mm and breaks at the rim of the bell, 8 mm, 614.4202 s later. The rain stops after
// an hour; the run goes on dry for three more.
constexpr double kPrimingAfter_s = 399.1883;
constexpr double kPrimingLevel_m = 0.056072891;
constexpr double kBreakLevel_m = 0.008;

Scenario box_run() {
  Scenario s = make_scenario(4.0 * 3600.0, 3600.0);
  s.reservoir.initial_level_m = s.release.break_level_m;
  s.simulation.rtol = 1e-9;
  return s;
}

RainSeries one_hour_of_inflow(const Scenario& s) {
  const double intensity = 6.0 * kLitre_m3 * kPerMinute / s.roof.area_m2;
  return block_rain(*s.simulation.start, *s.simulation.end, {{kStart, kStart + 3600, intensity}},
                    300);
}

TEST(Trace, MarksEverySwitchInTheModesBeforeAndAfter) {
  const Scenario s = box_run();
  TraceRecorder obs;
  simulate(s, one_hour_of_inflow(s), obs);
  const std::vector<Episode> cycles = obs.of_kind(EpisodeKind::cycle);
  ASSERT_GE(cycles.size(), 3u);
  // The first priming: a dribble point and a running point at its time, at the priming level.
  const double priming = static_cast<double>(kStart) + kPrimingAfter_s;
  std::size_t at = 0;
  while (at < obs.trace.size() && obs.trace[at].time_s < priming - 1e-3) ++at;
  ASSERT_LT(at + 1, obs.trace.size());
  EXPECT_NEAR(obs.trace[at].time_s, priming, 2e-3);
  EXPECT_EQ(obs.trace[at].release, ReleaseState::dribble);
  EXPECT_EQ(obs.trace[at + 1].release, ReleaseState::running);
  EXPECT_EQ(obs.trace[at + 1].time_s, obs.trace[at].time_s);
  EXPECT_NEAR(obs.trace[at].level_m, kPrimingLevel_m, 1e-6);
  EXPECT_GT(obs.trace[at + 1].release_m3_per_s, obs.trace[at].release_m3_per_s);
  EXPECT_GT(obs.trace[at + 1].power_W, 0.0);
  // Every cycle's start and end are points of the trace; each end at the break level.
  for (const Episode& c : cycles) {
    for (const double t : {c.start_s, c.end_s}) {
      const bool found = std::any_of(obs.trace.begin(), obs.trace.end(),
                                     [&](const TracePoint& p) { return p.time_s == t; });
      EXPECT_TRUE(found) << t;
    }
  }
  for (std::size_t k = 0; k + 1 < cycles.size(); ++k) {
    const auto end = std::find_if(obs.trace.begin(), obs.trace.end(), [&](const TracePoint& p) {
      return p.time_s == cycles[k].end_s && p.release == ReleaseState::idle;
    });
    ASSERT_NE(end, obs.trace.end()) << k;
    EXPECT_NEAR(end->level_m, kBreakLevel_m, 1e-6) << k;
  }
}

TEST(Trace, AtLeastEveryMinuteWhileMovingAndNothingAtRest) {
  const Scenario s = box_run();
  TraceRecorder obs;
  simulate(s, one_hour_of_inflow(s), obs);
  ASSERT_GT(obs.trace.size(), 60u);
  for (std::size_t i = 0; i + 1 < obs.trace.size(); ++i) {
    const TracePoint& a = obs.trace[i];
    const TracePoint& b = obs.trace[i + 1];
    EXPECT_LE(a.time_s, b.time_s) << i;
    if (b.time_s - a.time_s <= kTraceStep_s + 1e-9) continue;
    // A longer gap is a rest: nothing flows at its start and the level has not moved.
    EXPECT_EQ(a.release_m3_per_s, 0.0) << i;
    EXPECT_EQ(a.overflow_m3_per_s, 0.0) << i;
    EXPECT_NEAR(b.level_m, a.level_m, 1e-9) << i;
  }
  // The chain comes to rest once the last cycle has broken and nothing more arrives: the dry
  // hours after it hold no point.
  const double last_cycle_end = obs.of_kind(EpisodeKind::cycle).back().end_s;
  EXPECT_LE(obs.trace.back().time_s, std::max(last_cycle_end, kStart + 3600.0) + 1e-6);
}

TEST(Trace, TakingItChangesNothingInTheRun) {
  const Scenario s = box_run();
  TraceRecorder traced;
  RecordingObserver plain;
  const RunResult a = simulate(s, one_hour_of_inflow(s), traced);
  const RunResult b = simulate(s, one_hour_of_inflow(s), plain);
  EXPECT_EQ(a.totals.electrical_J, b.totals.electrical_J);
  EXPECT_EQ(a.totals.nozzle_m3, b.totals.nozzle_m3);
  EXPECT_EQ(a.cycles, b.cycles);
  EXPECT_EQ(a.stats.steps, b.stats.steps);
}

TEST(TraceCsv, WritesTheColumnsOfTheOneTableInEitherUnits) {
  Scenario s = box_run();
  TracePoint p;
  p.time_s = static_cast<double>(kStart) + 90.7;  // written to the second
  p.level_m = 0.0254;                             // 1 in exactly (NIST)
  p.release = ReleaseState::running;
  p.release_m3_per_s = 3.785411784e-3 / 60.0;  // 1 US gal/min exactly (NIST)
  p.overflow_m3_per_s = 0.0;
  p.head_m = 0.3048;  // 1 ft exactly (NIST)
  p.power_W = 2.5;
  std::ostringstream si;
  {
    TraceWriter w(si, s, false);
    w.on_trace(p);
  }
  EXPECT_EQ(si.str(),
            "time,reservoir_level_mm,release_state,release_L_per_s,overflow_L_per_s,head_m,"
            "power_W\n2025-03-01T00:01:30,25.4,running,0.0631,0,0.3048,2.5\n");
  s.site.units = UnitSystem::us;
  std::ostringstream us;
  {
    TraceWriter w(us, s, false);
    w.on_trace(p);
  }
  EXPECT_EQ(us.str(),
            "time,reservoir_level_in,release_state,release_gpm,overflow_gpm,head_ft,power_W\n"
            "2025-03-01T00:01:30,1,running,1,0,1,2.5\n");
}

// The rows are written on a thread of their own, in batches: every point comes out once, in the
// order handed in, whether the writer is finished or only ended, and over several batches.
TEST(TraceCsv, WritesEveryPointInOrderAcrossBatches) {
  const Scenario s = box_run();
  constexpr int kPoints = 20000;  // two batches and part of a third
  const auto hand_in = [&](TraceWriter& w) {
    TracePoint p;
    for (int k = 0; k < kPoints; ++k) {
      p.time_s = static_cast<double>(kStart) + k;
      p.level_m = 1e-3 * k;
      w.on_trace(p);
    }
  };
  std::ostringstream finished;
  TraceWriter w(finished, s, false);
  hand_in(w);
  w.finish();
  std::ostringstream ended;
  {
    TraceWriter e(ended, s, false);
    hand_in(e);
  }
  EXPECT_EQ(ended.str(), finished.str());
  std::istringstream rows(finished.str());
  std::string line;
  std::getline(rows, line);  // the header
  int k = 0;
  for (; std::getline(rows, line); ++k) {
    // The level in mm is the row's number: 1e-3 m a point.
    const std::size_t first = line.find(',');
    ASSERT_NE(first, std::string::npos) << k;
    EXPECT_EQ(line.substr(first + 1, line.find(',', first + 1) - first - 1), std::to_string(k));
  }
  EXPECT_EQ(k, kPoints);
}

// Points inside a step and where the chain comes to rest are handed over by their state, and
// the writer works their rates out on its own thread: its rows are those of the points as the
// simulation works them out (an observer that keeps the default), and an observer in the same
// list that does not take the trace is handed none.
TEST(TraceCsv, PointsGivenByTheirStateComeOutAsTheRunWorksThemOut) {
  const Scenario s = box_run();
  const RainSeries rain = one_hour_of_inflow(s);
  std::ostringstream by_writer;
  TraceRecorder by_run;
  {
    TraceWriter w(by_writer, s, false);
    RecordingObserver without_trace;
    ObserverList both;
    both.add(w);
    both.add(by_run);
    both.add(without_trace);
    simulate(s, rain, both);
    w.finish();
    EXPECT_TRUE(without_trace.trace.empty());
  }
  // Most points are the grid's, at whole minutes, inside steps.
  const auto on_grid =
      std::count_if(by_run.trace.begin(), by_run.trace.end(),
                    [](const TracePoint& p) { return std::fmod(p.time_s, 60.0) == 0.0; });
  EXPECT_GT(2 * on_grid, static_cast<long>(by_run.trace.size())) << on_grid;
  std::ostringstream from_points;
  {
    TraceWriter w(from_points, s, false);
    for (const TracePoint& p : by_run.trace) w.on_trace(p);
  }
  EXPECT_EQ(by_writer.str(), from_points.str());
}

// The writer works a point's rates out with a system of its own on its scenario, so a point
// handed by a run of another scenario (a copy, however alike) is refused at once; its own
// scenario's run is taken.
TEST(TraceCsv, RefusesAPointHandedByARunOfAnotherScenario) {
  const Scenario s = box_run();
  const Scenario copy = s;
  const ChainSystem other(copy);
  const ChainSystem own(s);
  std::ostringstream out;
  TraceWriter w(out, s, false);
  EXPECT_THROW(w.on_trace_state(TraceState{}, other), std::logic_error);
  EXPECT_NO_THROW(w.on_trace_state(TraceState{}, own));
  w.finish();
  const std::string text = out.str();
  EXPECT_EQ(std::count(text.begin(), text.end(), '\n'), 2) << text;  // the header and the one row
}

}  // namespace
}  // namespace gutterwatt::trace_test
