#include "gutterwatt/fit_logs.hpp"

#include <gtest/gtest.h>

#include <sstream>
#include <string>

#include "test_support.hpp"

namespace gutterwatt::fit_logs_test {
namespace {

std::vector<BenchRow> read(const std::string& text) {
  std::istringstream in(text);
  return read_bench_log(in, "bench.csv");
}

std::string error_of(const std::string& text) {
  return test_support::input_error_of([&] { read(text); });
}

TEST(BenchLog, ReadsRatesContainersAndUsUnits) {
  const auto rows = read(
      "# a comment\n"
      "inflow_L_per_min,inflow_gpm,fill_volume_gal,fill_time_s,outcome,drain_time_s\n"
      "2,,,,dribbled,\n"
      ",0.5,,,primed,80\n"
      ",,1,30,primed,\n");
  ASSERT_EQ(rows.size(), 3u);
  EXPECT_EQ(rows[0].line, 3);
  EXPECT_FALSE(rows[0].primed);
  EXPECT_DOUBLE_EQ(rows[0].inflow_m3_per_s, 2e-3 / 60.0);
  // 0.5 US gal/min = 1.892705892 L/min (REFERENCES.md section 11).
  EXPECT_NEAR(rows[1].inflow_m3_per_s, 1.892705892e-3 / 60.0, 1e-15);
  EXPECT_EQ(rows[1].drain_time_s, 80.0);
  // 1 US gal in 30 s = 3.785411784 L / 30 s.
  EXPECT_NEAR(rows[2].inflow_m3_per_s, 3.785411784e-3 / 30.0, 1e-15);
  EXPECT_FALSE(rows[2].drain_time_s);
}

TEST(BenchLog, RejectsAnUnknownOutcome) {
  EXPECT_EQ(error_of("inflow_L_per_min,outcome\n2,prime\n"),
            "bench.csv:2: outcome: expected primed or dribbled, got \"prime\"");
}

TEST(BenchLog, RejectsANegativeTime) {
  EXPECT_EQ(error_of("inflow_L_per_min,outcome,drain_time_s\n3,primed,-40\n"),
            "bench.csv:2: drain_time_s: must be > 0 (got -40)");
}

TEST(BenchLog, RejectsAContainerWithoutItsTime) {
  EXPECT_EQ(error_of("fill_volume_L,fill_time_s,outcome\n10,,primed\n"),
            "bench.csv:2: fill_time_s: missing: the time the hose container took to fill");
}

TEST(BenchLog, RejectsAMissingOutcomeColumn) {
  EXPECT_EQ(error_of("inflow_L_per_min,drain_time_s\n3,40\n"),
            "bench.csv:1: outcome: missing column (primed or dribbled, per row)");
}

TEST(BenchLog, RejectsALinePastSixtyFourKibNamingIt) {
  // One test, then 8 MiB without a line end: refused after 64 KiB, not read whole.
  EXPECT_EQ(error_of("inflow_L_per_min,outcome\n3,primed\n" + std::string(8 << 20, '7')),
            "bench.csv:3: a line longer than 64 KiB; a bench log's lines are short (binary data, "
            "or line ends other than LF or CRLF?)");
}

TEST(BenchLog, RejectsTheInflowGivenTwiceInTwoUnits) {
  EXPECT_EQ(error_of("inflow_L_per_min,inflow_gpm,outcome\n3,0.8,primed\n"),
            "bench.csv:2: inflow_gpm: the inflow is given twice on this row (inflow_L_per_min "
            "and inflow_gpm); give it once");
}

TEST(BenchLog, RejectsTimesOnATestThatDribbled) {
  EXPECT_EQ(error_of("inflow_L_per_min,outcome,drain_time_s\n1,dribbled,30\n"),
            "bench.csv:2: drain_time_s: a test that only dribbled has no cycle to time; leave it "
            "empty");
}

TEST(BenchLog, RejectsAnUnknownColumn) {
  EXPECT_EQ(error_of("inflow_L_per_min,outcome,temperature\n1,dribbled,12\n"),
            "bench.csv:1: temperature: unknown column; expected any of inflow_L_per_min, "
            "inflow_gpm, fill_volume_L, fill_volume_gal, fill_time_s, outcome, time_to_prime_s, "
            "drain_time_s, cycle_period_s, nozzle_volume_L, nozzle_volume_gal, nozzle_time_s, "
            "note");
}

CycleLog read_cycles(const std::string& text, int utc_offset_s = 0,
                     const std::string& time_format = "") {
  std::istringstream in(text);
  SeriesFormat rain_format;
  rain_format.zone = utc_offset_s;
  rain_format.time_format = time_format;
  return read_cycle_log(in, "cycles.csv", rain_format);
}

std::string cycle_error_of(const std::string& text) {
  return test_support::input_error_of([&] { read_cycles(text); });
}

TEST(CycleLog, ReadsStartsAsARainRecordTakesItsStamps) {
  // Naive stamps at the record's offset (+01:00), a note column ignored, comments skipped.
  const CycleLog log = read_cycles(
      "# float switch\ntime,note\n2025-03-01T01:00,first\n2025-03-01T01:12:30,\n", 3600);
  ASSERT_EQ(log.starts.size(), 2u);
  EXPECT_EQ(log.starts[0], 1740787200);  // 2025-03-01T00:00Z
  EXPECT_EQ(log.starts[1], 1740787200 + 12 * 60 + 30);
  EXPECT_EQ(log.lines, (std::vector<int>{3, 4}));
}

TEST(CycleLog, ReadsStampsInTheRainRecordsTimeFormat) {
  const CycleLog log =
      read_cycles("time\n03/01/2025 01:20 AM\n03/01/2025 02:05 PM\n", 0, "%m/%d/%Y %I:%M %p");
  ASSERT_EQ(log.starts.size(), 2u);
  EXPECT_EQ(log.starts[0], 1740787200 + 80 * 60);             // 2025-03-01T01:20Z
  EXPECT_EQ(log.starts[1], 1740787200 + (14 * 60 + 5) * 60);  // 2025-03-01T14:05Z
}

TEST(CycleLog, RejectsAStampThatIsNotATime) {
  EXPECT_EQ(cycle_error_of("time\n2025-03-01T01:00\n01/03/2025 01:20\n"),
            "cycles.csv:3: time: not an ISO 8601 date-time such as 2025-03-01T00:05 (got "
            "\"01/03/2025 01:20\")");
}

TEST(CycleLog, RejectsStartsOutOfTimeOrder) {
  EXPECT_EQ(cycle_error_of("time\n2025-03-01T01:00\n2025-03-01T00:50\n"),
            "cycles.csv:3: time: \"2025-03-01T00:50\" is earlier than the previous stamp "
            "\"2025-03-01T01:00\" (line 2); rows must be in time order");
}

TEST(CycleLog, RejectsTheSameStartTwice) {
  EXPECT_EQ(cycle_error_of("time\n2025-03-01T01:00\n2025-03-01T01:00\n"),
            "cycles.csv:3: time: the same instant as the cycle on line 2; one row per cycle, "
            "each cycle once");
}

TEST(CycleLog, RejectsALogWithoutATimeColumn) {
  EXPECT_EQ(cycle_error_of("start\n2025-03-01T01:00\n"),
            "cycles.csv:1: time: no such column in the header (found \"start\")");
}

}  // namespace
}  // namespace gutterwatt::fit_logs_test
