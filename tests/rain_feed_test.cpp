#include "gutterwatt/rain_feed.hpp"

#include <gtest/gtest.h>

#include <atomic>
#include <chrono>
#include <filesystem>
#include <fstream>
#include <string>
#include <thread>
#include <vector>

#include "gutterwatt/error.hpp"
#include "gutterwatt/rain_files.hpp"
#include "gutterwatt/simulation.hpp"
#include "test_support.hpp"

namespace gutterwatt::rain_feed_test {
namespace {

using test_support::block_rain;
using test_support::kLitre_m3;
using test_support::kPerMinute;
using test_support::kStart;
using test_support::make_scenario;

// What a reader has published when it has read the rows up to `t`: the pulses that end by `t`
// and the covered time before it. `t` must fall on a pulse boundary of `whole` (a whole step).
RainSeries read_up_to(const RainSeries& whole, Instant t) {
  RainSeries part;
  part.policy = whole.policy;
  for (const RainPulse& p : whole.pulses) {
    if (p.end <= t) part.pulses.push_back(p);
  }
  for (const TimeSpan& c : whole.covered) {
    if (c.start < t) part.covered.push_back({c.start, std::min(c.end, t)});
  }
  return part;
}

// Publishes `whole` in pieces every `every_s` from a second thread, as a reader would.
std::thread stream(const RainSeries& whole, RainFeed& feed, Instant every_s) {
  return std::thread([&whole, &feed, every_s] {
    const Instant first = whole.covered.front().start;
    for (Instant t = first + every_s; t < whole.covered.back().end; t += every_s) {
      feed.publish(read_up_to(whole, t));
      std::this_thread::yield();
    }
    feed.finish(whole);
  });
}

// An invented day: rain near the priming flow, a burst that overflows, a drizzle that dribbles.
RainSeries storm_day(Instant start, Instant end) {
  const double area = make_scenario().roof.area_m2;
  const auto inflow = [&](double litres_per_minute) {
    return litres_per_minute * kLitre_m3 * kPerMinute / area;
  };
  return block_rain(start, end,
                    {{start + 1800, start + 3 * 3600, inflow(4.0)},
                     {start + 4 * 3600, start + 4 * 3600 + 900, inflow(200.0)},
                     {start + 6 * 3600, start + 10 * 3600, inflow(0.5)},
                     {start + 12 * 3600, start + 14 * 3600, inflow(3.2)}},
                    60);
}

void expect_same_run(const RunResult& a, const RunResult& b) {
  EXPECT_EQ(a.start, b.start);
  EXPECT_EQ(a.end, b.end);
  EXPECT_EQ(a.totals.rain_m3, b.totals.rain_m3);
  EXPECT_EQ(a.totals.release_m3, b.totals.release_m3);
  EXPECT_EQ(a.totals.dribble_m3, b.totals.dribble_m3);
  EXPECT_EQ(a.totals.reservoir_overflow_m3, b.totals.reservoir_overflow_m3);
  EXPECT_EQ(a.totals.electrical_J, b.totals.electrical_J);
  EXPECT_EQ(a.cycles, b.cycles);
  EXPECT_EQ(a.overflow_events, b.overflow_events);
  EXPECT_EQ(a.dribble_s, b.dribble_s);
  EXPECT_EQ(a.stats.steps, b.stats.steps);
  EXPECT_EQ(a.stats.segments, b.stats.segments);
  EXPECT_EQ(a.stats.skipped_s, b.stats.skipped_s);
}

// Runs `sc` on `whole` at once and streamed in pieces of `every_s`; both must agree exactly.
void expect_streaming_changes_nothing(const Scenario& sc, const RainSeries& whole,
                                      Instant every_s) {
  test_support::RecordingObserver at_once;
  const RunResult expected = simulate(sc, whole, at_once);
  RainFeed feed(whole.policy);
  std::thread reader = stream(whole, feed, every_s);
  RainView view(feed);
  test_support::RecordingObserver streamed;
  const RunResult got = simulate(sc, view, streamed);
  reader.join();
  expect_same_run(got, expected);
  EXPECT_EQ(streamed.samples.size(), at_once.samples.size());
  EXPECT_EQ(streamed.episodes.size(), at_once.episodes.size());
  EXPECT_GT(expected.cycles, 0);
}

TEST(RainView, WholeRecordIsCompleteAndWalksItsPulses) {
  const RainSeries rain = block_rain(0, 3600, {{600, 1200, 1e-6}}, 300);
  RainView view(rain);
  EXPECT_TRUE(view.complete());
  view.need(kAllFinal);  // returns at once
  ASSERT_EQ(view.covered().size(), 1u);
  EXPECT_EQ(view.pulses_from(0).size(), 2u);
  EXPECT_EQ(view.pulses_from(900).size(), 1u);  // the pulse [600, 900) has passed
  EXPECT_EQ(view.pulses_from(900).front().start, 900);
  EXPECT_TRUE(view.pulses_from(1200).empty());
}

TEST(RainFeed, ViewSeesWhatIsFinalAndWaitsForMore) {
  const RainSeries whole = block_rain(0, 7200, {{600, 1200, 1e-6}, {3000, 3600, 2e-6}}, 300);
  RainFeed feed(GapPolicy::error);
  feed.publish(read_up_to(whole, 1800));
  RainView view(feed);
  view.need(1800);
  EXPECT_EQ(view.final_before(), 1800);
  EXPECT_FALSE(view.complete());
  EXPECT_EQ(view.pulses_from(0).size(), 2u);
  ASSERT_EQ(view.covered().size(), 1u);
  EXPECT_EQ(view.covered().front().end, 1800);

  std::thread reader([&] {
    std::this_thread::sleep_for(std::chrono::milliseconds(20));
    feed.publish(read_up_to(whole, 3600));
    feed.finish(whole);
  });
  view.need(3000);  // blocks until the reader has read that far
  EXPECT_GE(view.final_before(), 3600);
  EXPECT_EQ(view.pulses_from(1200).size(), 2u);
  view.need(kAllFinal);
  reader.join();
  EXPECT_TRUE(view.complete());
  EXPECT_EQ(view.covered().front().end, 7200);
}

TEST(RainFeed, ReadingErrorReachesTheView) {
  RainFeed feed(GapPolicy::error);
  feed.fail(std::make_exception_ptr(InputError("rain.csv", 9, "rain_mm", "not a number")));
  RainView view(feed);
  EXPECT_THROW(view.need(100), InputError);
  EXPECT_TRUE(feed.error());
}

TEST(RainFeed, CancelStopsTheReaderAtItsNextPublication) {
  RainFeed feed(GapPolicy::error);
  feed.cancel();
  EXPECT_THROW(feed.publish(block_rain(0, 600, {}, 300)), RainFeed::Cancelled);
}

TEST(RainFeed, ReaderFarAheadWaitsForTheSimulation) {
  // Rain every minute for 150 days: many backlogs' worth of pulses.
  const Instant days = 150;
  const RainSeries whole = block_rain(0, days * 86400, {{0, days * 86400, 1e-7}}, 60);
  ASSERT_GT(whole.pulses.size(), 3 * RainFeed::kMaxBacklog);
  RainFeed feed(GapPolicy::error);
  std::atomic<Instant> read_to{0};
  std::thread reader([&] {
    for (Instant t = 86400; t < days * 86400; t += 86400) {
      feed.publish(read_up_to(whole, t));
      read_to = t;
    }
    feed.finish(whole);
    read_to = days * 86400;
  });
  RainView view(feed);
  view.need(86400);
  const Instant taken = view.final_before();
  std::this_thread::sleep_for(std::chrono::milliseconds(50));
  // The reader has stopped about one backlog (a day holds 1440 pulses) ahead of what was taken.
  const auto backlog_days = static_cast<Instant>(RainFeed::kMaxBacklog / 1440);
  EXPECT_LE(read_to.load(), taken + (backlog_days + 2) * 86400);
  EXPECT_LT(read_to.load(), days * 86400);
  view.need(kAllFinal);
  reader.join();
  EXPECT_EQ(view.pulses_from(0).size(), whole.pulses.size());
}

TEST(RainFeed, StreamedRecordGivesTheSameRunAsTheWholeRecord) {
  Scenario sc = make_scenario(86400.0, 3600.0);
  const RainSeries whole = storm_day(kStart, kStart + 86400);
  // Pieces that end inside rain intervals, outputs and switches, and a last piece shorter.
  for (Instant every : {420, 3600, 7 * 3600}) expect_streaming_changes_nothing(sc, whole, every);
  // The end taken from the record, which a streamed run learns only when the record ends.
  sc.simulation.start.reset();
  sc.simulation.end.reset();
  expect_streaming_changes_nothing(sc, whole, 420);
}

TEST(RainFeed, StreamedRecordWithAGapGivesTheSameRun) {
  Scenario sc = make_scenario(86400.0, 3600.0);
  RainSeries whole = storm_day(kStart, kStart + 86400);
  // Take [kStart + 5 h, kStart + 7 h) out of the record.
  const Instant cut0 = kStart + 5 * 3600, cut1 = kStart + 7 * 3600;
  std::erase_if(whole.pulses, [&](const RainPulse& p) { return p.start < cut1 && p.end > cut0; });
  whole.covered = {{kStart, cut0}, {cut1, kStart + 86400}};
  for (GapPolicy policy : {GapPolicy::skip, GapPolicy::zero}) {
    whole.policy = policy;
    expect_streaming_changes_nothing(sc, whole, 420);
  }
}

TEST(RainFeed, StreamedRecordReportsItsGapLikeTheWholeRecord) {
  const Scenario sc = make_scenario(86400.0, 3600.0);
  RainSeries whole = storm_day(kStart + 3600, kStart + 86400);  // the run starts an hour early
  whole.policy = GapPolicy::error;
  std::string expected;
  try {
    test_support::RecordingObserver o;
    simulate(sc, whole, o);
  } catch (const InputError& e) {
    expected = e.what();
  }
  EXPECT_NE(expected.find("simulation.start: the rain record has no data from"), std::string::npos)
      << expected;
  RainFeed feed(GapPolicy::error);
  std::thread reader = stream(whole, feed, 420);
  RainView view(feed);
  test_support::RecordingObserver o;
  try {
    simulate(sc, view, o);
    ADD_FAILURE() << "no error";
  } catch (const InputError& e) {
    EXPECT_EQ(std::string(e.what()), expected);
  }
  reader.join();
}

// A series file of more rows than one publication, dry, with `last` as its final value.
std::filesystem::path long_series_file(const std::string& name, const std::string& last) {
  const auto path = std::filesystem::temp_directory_path() / name;
  std::ofstream out(path);
  out << "time,rain_mm\n";
  const int rows = static_cast<int>(kProgressRows) * 2 + 100;
  for (int m = 1; m <= rows; ++m) {
    out << format_iso8601(kStart + 60 * m) << ',' << (m == rows ? last : "0") << '\n';
  }
  return path;
}

RainConfig series_config(const std::filesystem::path& file) {
  RainConfig config;
  config.format = RainFormat::series;
  config.files = {file};
  config.series.step_s = 60;
  return config;
}

TEST(LoadRainWhile, ReadingErrorWinsOverAnErrorOfTheRun) {
  // The run fails at once (its period starts before the record); the file fails on its last
  // row. Read first, the file's error would have been the one reported, so it still is.
  const auto file = long_series_file("gutterwatt-feed-bad-last.csv", "lots");
  Scenario sc = make_scenario();
  sc.simulation.start = kStart - 3600;
  try {
    load_rain_while(series_config(file), {}, [&](RainView& view) {
      test_support::RecordingObserver o;
      simulate(sc, view, o);
    });
    ADD_FAILURE() << "no error";
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("rain_mm: not a number"), std::string::npos) << e.what();
  }
  std::filesystem::remove(file);
}

TEST(LoadRainWhile, ReturnsTheWholeRecordReadOnASecondThread) {
  const auto file = long_series_file("gutterwatt-feed-good.csv", "0.2");
  std::size_t seen = 0;
  const RainSeries rain = load_rain_while(series_config(file), {}, [&](RainView& view) {
    view.need(kAllFinal);
    seen = view.pulses_from(kStart).size();
  });
  EXPECT_EQ(seen, 1u);
  ASSERT_EQ(rain.pulses.size(), 1u);
  EXPECT_EQ(rain.covered.size(), 1u);
  EXPECT_DOUBLE_EQ(rain.total_depth_m, 0.2e-3);
  std::filesystem::remove(file);
}

TEST(LoadRainWhile, RunThatEndsEarlyLetsTheReaderFinish) {
  // More wet rows than a backlog, and a consumer that takes none of them.
  const auto path = std::filesystem::temp_directory_path() / "gutterwatt-feed-early-end.csv";
  {
    std::ofstream out(path);
    out << "time,rain_mm\n";
    for (std::size_t m = 1; m <= RainFeed::kMaxBacklog + 5000; ++m) {
      out << format_iso8601(kStart + 60 * static_cast<Instant>(m)) << ",0.1\n";
    }
  }
  const RainSeries rain = load_rain_while(series_config(path), {}, [](RainView&) {});
  EXPECT_EQ(rain.pulses.size(), RainFeed::kMaxBacklog + 5000);
  std::filesystem::remove(path);
}

TEST(LoadRainWhile, InterruptStopsTheReading) {
  const auto file = long_series_file("gutterwatt-feed-interrupt.csv", "0");
  EXPECT_THROW(load_rain_while(series_config(file), {}, [](RainView&) { throw Interrupted(); }),
               Interrupted);
  std::filesystem::remove(file);
}

}  // namespace
}  // namespace gutterwatt::rain_feed_test
