// The layouts of real rain files (src/rain_csv.cpp), read through the public readers: other field
// separators and decimal marks, title lines above the header, stamps in a strftime-style format,
// the rows of one series out of a file of several.

#include <gtest/gtest.h>

#include <sstream>
#include <string>

#include "gutterwatt/error.hpp"
#include "gutterwatt/rain_input.hpp"
#include "test_support.hpp"

namespace gutterwatt::rain_csv_test {
namespace {

// Seconds since the epoch of 2025-03-01T00:00Z.
// source: POSIX.1-2017 Base Definitions 4.16 (Seconds Since the Epoch), formula worked by hand.
constexpr Instant kT0 = 1740787200;
constexpr Instant kMinute = 60;
constexpr Instant kHour = 3600;

RainSeries read(const std::string& text, const SeriesFormat& fmt) {
  std::istringstream in(text);
  return read_rain_series(in, "rain.csv", fmt);
}

std::string error_of(const std::string& text, const SeriesFormat& fmt) {
  return test_support::input_error_of([&] { read(text, fmt); });
}

SeriesFormat daily() {
  SeriesFormat fmt;
  fmt.time_column = "date";
  fmt.value_column = "precipitation";
  return fmt;
}

RainSeries read_daily(const std::string& text, const SeriesFormat& fmt) {
  std::istringstream in(text);
  return read_rain_daily(in, "daily.csv", fmt);
}

std::string daily_error_of(const std::string& text, const SeriesFormat& fmt) {
  return test_support::input_error_of([&] { read_daily(text, fmt); });
}

// The pulses of the same invented 5-minute record as written with a point and commas.
void expect_five_minute_record(const RainSeries& rain) {
  ASSERT_EQ(rain.pulses.size(), 2u);
  EXPECT_EQ(rain.pulses[0].start, kT0);
  EXPECT_EQ(rain.pulses[0].end, kT0 + 5 * kMinute);
  EXPECT_EQ(rain.pulses[0].depth_m, 0.2e-3);
  EXPECT_EQ(rain.pulses[1].start, kT0 + 10 * kMinute);
  EXPECT_EQ(rain.pulses[1].depth_m, 1.25e-3);
}

TEST(RainCsv, ReadsSemicolonsAndDecimalCommas) {
  SeriesFormat fmt;
  fmt.delimiter = ';';
  fmt.decimal = ',';
  expect_five_minute_record(
      read("time;rain_mm\n2025-03-01T00:05;0,2\n2025-03-01T00:10;0\n2025-03-01T00:15;1,25\n", fmt));
}

TEST(RainCsv, ReadsTabsBetweenFields) {
  SeriesFormat fmt;
  fmt.delimiter = '\t';
  // A blank after a tab is still trimmed; an empty trailing field is fine.
  expect_five_minute_record(
      read("time\train_mm\n2025-03-01T00:05\t 0.2\n2025-03-01T00:10\t0\t\n2025-03-01T00:15\t1.25\n",
           fmt));
}

// Plain rows (no quotes, no blanks) are split by a shorter path than rows with quotes or blanks
// around their fields; both must give the same record.
TEST(RainCsv, ReadsPlainRowsAsTheirQuotedAndPaddedTwins) {
  const SeriesFormat fmt;
  expect_five_minute_record(
      read("time,rain_mm\n2025-03-01T00:05,0.2\n2025-03-01T00:10,0\n2025-03-01T00:15,1.25\n", fmt));
  expect_five_minute_record(
      read("time,rain_mm\n\"2025-03-01T00:05\", 0.2\n 2025-03-01T00:10,0\n"
           "2025-03-01T00:15,\"1.25\"\n",
           fmt));
  // Columns in another order, a column not asked for, an empty field past the header's columns.
  expect_five_minute_record(
      read("note,rain_mm,time\nx,0.2,2025-03-01T00:05\n,0,2025-03-01T00:10,\n"
           "y,1.25,2025-03-01T00:15\n",
           fmt));
  // More columns than the short path reads: the value is column 18.
  std::string header = "time";
  std::string row_tail;
  for (int k = 0; k < 16; ++k) {
    header += ",c" + std::to_string(k);
    row_tail += ",0";
  }
  expect_five_minute_record(read(header + ",rain_mm\n2025-03-01T00:05" + row_tail +
                                     ",0.2\n2025-03-01T00:10" + row_tail + ",0\n2025-03-01T00:15" +
                                     row_tail + ",1.25\n",
                                 fmt));
}

TEST(RainCsv, SkipsTitleLinesAboveTheHeader) {
  SeriesFormat fmt;
  fmt.skip_lines = 2;
  // Title lines a logger writes, with commas that would make a header of their own.
  expect_five_minute_record(
      read("Logger 7, firmware 1.2\nsite: roof, north\ntime,rain_mm\n2025-03-01T00:05,0.2\n"
           "2025-03-01T00:10,0\n2025-03-01T00:15,1.25\n",
           fmt));
}

TEST(RainCsv, CountsSkippedLinesInMessages) {
  SeriesFormat fmt;
  fmt.skip_lines = 1;
  EXPECT_EQ(error_of("Logger 7\ntime,rain_mm\n2025-03-01T00:05,x\n", fmt),
            "rain.csv:3: rain_mm: not a number (got \"x\")");
  EXPECT_EQ(error_of("Logger 7\n", fmt),
            "rain.csv:1: rain.skip_lines: the file ends within the 1 lines it skips (it has 1)");
}

TEST(RainCsv, ReadsStampsInATimeFormat) {
  SeriesFormat fmt;
  fmt.time_format = "%m/%d/%Y %I:%M %p";
  // 06/01/2025 01:05 PM is 2025-06-01T13:05Z: 92 days after 2025-03-01 (31 + 30 + 31), 13 h 5 min.
  const RainSeries rain = read(
      "time,rain_mm\n06/01/2025 01:00 PM,0\n06/01/2025 01:05 PM,0.4\n06/01/2025 01:10 PM,0\n", fmt);
  ASSERT_EQ(rain.pulses.size(), 1u);
  EXPECT_EQ(rain.pulses[0].end, kT0 + 92 * 86400 + 13 * 3600 + 5 * kMinute);
  EXPECT_EQ(rain.pulses[0].end - rain.pulses[0].start, 5 * kMinute);
}

TEST(RainCsv, TakesATimeFormatsOffset) {
  SeriesFormat fmt;
  fmt.time_format = "%d.%m.%Y %H:%M %z";
  fmt.zone = 3600;  // not used: the stamps carry their own
  const RainSeries rain =
      read("time,rain_mm\n01.03.2025 02:05 +0200,0.2\n01.03.2025 02:10 +0200,0\n", fmt);
  ASSERT_EQ(rain.pulses.size(), 1u);
  EXPECT_EQ(rain.pulses[0].end, kT0 + 5 * kMinute);
}

TEST(RainCsv, NamesTheLineATimeFormatDoesNotMatch) {
  SeriesFormat fmt;
  fmt.time_format = "%m/%d/%Y %I:%M %p";
  EXPECT_EQ(error_of("time,rain_mm\n06/01/2025 01:00 PM,0\n06/01/2025 13:05,0.4\n", fmt),
            "rain.csv:3: time: does not match rain.time_format \"%m/%d/%Y %I:%M %p\" (got "
            "\"06/01/2025 13:05\")");
  EXPECT_EQ(error_of("time,rain_mm\n02/30/2025 01:00 PM,0\n", fmt),
            "rain.csv:2: time: does not match rain.time_format \"%m/%d/%Y %I:%M %p\" (got "
            "\"02/30/2025 01:00 PM\")");
}

TEST(RainCsv, ReadsDatesInATimeFormat) {
  SeriesFormat fmt = daily();
  fmt.time_format = "%d/%m/%Y";
  const RainSeries rain = read_daily("date,precipitation\n01/03/2025,2\n02/03/2025,0\n", fmt);
  ASSERT_EQ(rain.pulses.size(), 1u);
  EXPECT_EQ(rain.pulses[0].start, kT0);
  fmt.time_format = "%d/%m/%Y %H:%M";
  EXPECT_EQ(daily_error_of("date,precipitation\n01/03/2025 06:00,2\n", fmt),
            "daily.csv:2: date: does not match rain.time_format \"%d/%m/%Y %H:%M\" as a date, at "
            "midnight (got \"01/03/2025 06:00\")");
}

// Two invented stations in one daily file, the second starting over at the first date.
const char* const kTwoStations =
    "station,date,precipitation\n"
    "Hilltop,2025-03-01,1.5\n"
    "Hilltop,2025-03-02,0\n"
    "Valley,2025-03-01,4\n"
    "Valley,2025-03-02,2.5\n";

TEST(RainCsv, KeepsTheRowsOfOneStation) {
  SeriesFormat fmt = daily();
  fmt.where = {{"station", "Valley"}};
  const RainSeries rain = read_daily(kTwoStations, fmt);
  ASSERT_EQ(rain.pulses.size(), 2u);
  EXPECT_EQ(rain.pulses[0].depth_m, 4e-3);
  EXPECT_EQ(rain.pulses[1].depth_m, 2.5e-3);
  EXPECT_EQ(rain.pulses[1].start, kT0 + 86400);
}

TEST(RainCsv, LeavesOutOtherStationsBeforeReadingTheirValues) {
  SeriesFormat fmt = daily();
  fmt.where = {{"station", "Hilltop"}};
  const RainSeries rain =
      read_daily("station,date,precipitation\nHilltop,2025-03-01,1\nValley,bad,n/a\n", fmt);
  EXPECT_EQ(rain.total_depth_m, 1e-3);
}

TEST(RainCsv, NamesTheColumnThatTellsSeriesApart) {
  EXPECT_EQ(daily_error_of(kTwoStations, daily()),
            "daily.csv:4: date: \"2025-03-01\" is earlier than the previous date \"2025-03-02\" "
            "(line 3); rows must be in time order; the column \"station\" changes here from "
            "\"Hilltop\" to \"Valley\": several series in one file? keep one with rain.where: "
            "{station: Valley}");
}

TEST(RainCsv, NamesTheColumnWhenSeriesAreInterleaved) {
  EXPECT_EQ(error_of("time,gauge,rain_mm\n2025-03-01T00:05,north,0\n2025-03-01T00:05,south,0\n",
                     SeriesFormat{}),
            "rain.csv:3: time: \"2025-03-01T00:05\" is the same instant as the previous stamp "
            "\"2025-03-01T00:05\" (line 2); the column \"gauge\" changes here from \"north\" to "
            "\"south\": several series in one file? keep one with rain.where: {gauge: south}");
}

TEST(RainCsv, RejectsAnUnknownWhereColumn) {
  SeriesFormat fmt = daily();
  fmt.where = {{"location", "Valley"}};
  EXPECT_EQ(daily_error_of(kTwoStations, fmt),
            "daily.csv:1: rain.where.location: no such column in the header (found \"station\", "
            "\"date\", \"precipitation\")");
}

TEST(RainCsv, ListsTheValuesFoundWhenNoRowMatches) {
  SeriesFormat fmt = daily();
  fmt.where = {{"station", "valley"}};
  EXPECT_EQ(daily_error_of(kTwoStations, fmt),
            "daily.csv:1: rain.where.station: no row holds \"valley\" in this column (found "
            "\"Hilltop\", \"Valley\")");
  fmt.where = {{"station", "Valley"}, {"date", "2025-04-01"}};
  EXPECT_EQ(daily_error_of(kTwoStations, fmt),
            "daily.csv:1: rain.where: no row meets all its conditions");
}

TEST(RainCsv, PointsADecimalCommaToRainDecimal) {
  SeriesFormat fmt;
  fmt.delimiter = ';';
  EXPECT_EQ(error_of("time;rain_mm\n2025-03-01T00:05;0,2\n", fmt),
            "rain.csv:2: rain_mm: not a number (got \"0,2\"); a decimal comma? set rain.decimal: "
            "\",\"");
  fmt.decimal = ',';
  EXPECT_EQ(error_of("time;rain_mm\n2025-03-01T00:05;1.500\n", fmt),
            "rain.csv:2: rain_mm: not a number with a decimal comma, rain.decimal: \",\" (got "
            "\"1.500\")");
}

// ---- naive stamps in a zone with daylight saving ----

// The US changes of 2025 in Los Angeles (Energy Policy Act of 2005, sec. 110: second Sunday of
// March and first Sunday of November at 2:00 local): 2025-03-09T02:00 PST = 10:00Z and
// 2025-11-02T02:00 PDT = 09:00Z, worked by hand from kT0.
constexpr Instant kSpringForward = kT0 + 8 * 86400 + 10 * 3600;
constexpr Instant kFallBack = kT0 + 246 * 86400 + 9 * 3600;

SeriesFormat in_los_angeles() {
  SeriesFormat fmt;
  fmt.zone = *TimeZone::named("America/Los_Angeles");
  return fmt;
}

TEST(RainCsvZones, ReadsStampsAcrossTheSpringChange) {
  // 01:55 PST and 03:00 PDT are five minutes apart: no gap, one 5-minute interval each.
  const RainSeries rain = read(
      "time,rain_mm\n2025-03-09T01:50,0\n2025-03-09T01:55,0.2\n2025-03-09T03:00,0.3\n"
      "2025-03-09T03:05,0\n",
      in_los_angeles());
  ASSERT_EQ(rain.pulses.size(), 2u);
  EXPECT_EQ(rain.pulses[0].end, kSpringForward - 5 * kMinute);
  EXPECT_EQ(rain.pulses[1].start, kSpringForward - 5 * kMinute);
  EXPECT_EQ(rain.pulses[1].end, kSpringForward);
  EXPECT_TRUE(rain.gaps.empty());
  ASSERT_EQ(rain.covered.size(), 1u);
}

TEST(RainCsvZones, NamesAStampInTheSkippedHour) {
  EXPECT_EQ(error_of("time,rain_mm\n2025-03-09T01:55,0\n2025-03-09T02:00,0.2\n", in_los_angeles()),
            "rain.csv:3: time: \"2025-03-09T02:00\" is not a time in America/Los_Angeles: the "
            "clocks skip that hour when daylight saving begins");
}

TEST(RainCsvZones, ResolvesTheRepeatedHourByTheOrderOfTheRows) {
  // 01:00 PST comes five minutes after 01:55 PDT.
  const RainSeries rain = read(
      "time,rain_mm\n2025-11-02T01:50,0\n2025-11-02T01:55,0.1\n2025-11-02T01:00,0.2\n"
      "2025-11-02T01:05,0.4\n2025-11-02T01:10,0\n",
      in_los_angeles());
  ASSERT_EQ(rain.pulses.size(), 3u);
  EXPECT_EQ(rain.pulses[0].end, kFallBack - 5 * kMinute);  // 01:55 PDT
  EXPECT_EQ(rain.pulses[1].end, kFallBack);                // 01:00 PST
  EXPECT_EQ(rain.pulses[1].start, kFallBack - 5 * kMinute);
  EXPECT_EQ(rain.pulses[2].end, kFallBack + 5 * kMinute);  // 01:05 PST
  EXPECT_TRUE(rain.gaps.empty());
}

TEST(RainCsvZones, ReadsTheFirstPassageOfTheRepeatedHourFirst) {
  // Through the whole repeated hour twice: 01:00 .. 01:55 PDT, then 01:00 .. 01:55 PST.
  std::string csv = "time,rain_mm\n2025-11-02T00:55,0\n";
  for (int pass = 0; pass < 2; ++pass) {
    for (int m = 0; m < 60; m += 5) {
      csv += "2025-11-02T01:" + std::string(m < 10 ? "0" : "") + std::to_string(m) + ",0.1\n";
    }
  }
  const RainSeries rain = read(csv, in_los_angeles());
  ASSERT_EQ(rain.pulses.size(), 24u);
  EXPECT_EQ(rain.pulses.front().end, kFallBack - kHour);
  EXPECT_EQ(rain.pulses.back().end, kFallBack + 55 * kMinute);
  EXPECT_TRUE(rain.gaps.empty());
}

TEST(RainCsvZones, ReadsDatesAtStandardTime) {
  SeriesFormat fmt = in_los_angeles();
  fmt.time_column = "date";
  fmt.value_column = "precipitation";
  // 2025-07-01 is a local day of standard time: from 08:00Z (PST, UTC-8), 24 hours long.
  const RainSeries rain = read_daily("date,precipitation\n2025-07-01,3\n2025-07-02,1\n", fmt);
  ASSERT_EQ(rain.pulses.size(), 2u);
  EXPECT_EQ(rain.pulses[0].start, kT0 + 122 * 86400 + 8 * 3600);  // 31+30+31+30 days
  EXPECT_EQ(rain.pulses[0].end - rain.pulses[0].start, 86400);
}

}  // namespace
}  // namespace gutterwatt::rain_csv_test
