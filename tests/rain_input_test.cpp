#include "gutterwatt/rain_input.hpp"

#include <gtest/gtest.h>

#include <cstdio>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "gutterwatt/error.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt {
namespace {

// Seconds since the epoch of 2025-03-01T00:00Z.
// source: POSIX.1-2017 Base Definitions 4.16 (Seconds Since the Epoch), formula worked by hand.
constexpr Instant kT0 = 1740787200;
constexpr Instant kMinute = 60;

RainSeries read(const std::string& text, const SeriesFormat& fmt = {}) {
  std::istringstream in(text);
  return read_rain_series(in, "rain.csv", fmt);
}

std::string error_of(const std::string& text, const SeriesFormat& fmt = {}) {
  try {
    read(text, fmt);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

SeriesFormat with_gaps(GapPolicy policy) {
  SeriesFormat fmt;
  fmt.gaps = policy;
  return fmt;
}

void expect_pulse(const RainPulse& pulse, Instant start, Instant end, double depth_m) {
  EXPECT_EQ(pulse.start, start);
  EXPECT_EQ(pulse.end, end);
  EXPECT_DOUBLE_EQ(pulse.depth_m, depth_m);
}

void expect_span(const TimeSpan& span, Instant start, Instant end) {
  EXPECT_EQ(span.start, start);
  EXPECT_EQ(span.end, end);
}

// Invented 5-minute record used by several tests.
const char* const kFiveMinute =
    "time,rain_mm\n"
    "2025-03-01T00:05,0.2\n"
    "2025-03-01T00:10,0\n"
    "2025-03-01T00:15,1.0\n"
    "2025-03-01T00:20,0.4\n";

TEST(RainInput, ReadsPeriodEndingDepths) {
  const RainSeries rain = read(kFiveMinute);
  EXPECT_EQ(rain.step_s, 300);
  ASSERT_EQ(rain.pulses.size(), 3u);
  expect_pulse(rain.pulses[0], kT0, kT0 + 5 * kMinute, 0.2e-3);
  expect_pulse(rain.pulses[1], kT0 + 10 * kMinute, kT0 + 15 * kMinute, 1.0e-3);
  expect_pulse(rain.pulses[2], kT0 + 15 * kMinute, kT0 + 20 * kMinute, 0.4e-3);
  ASSERT_EQ(rain.covered.size(), 1u);
  expect_span(rain.covered[0], kT0, kT0 + 20 * kMinute);
  EXPECT_TRUE(rain.gaps.empty());
  EXPECT_TRUE(rain.warnings.empty());
  EXPECT_DOUBLE_EQ(rain.total_depth_m, 1.6e-3);
}

TEST(RainInput, KeepsAdjacentWetIntervalsApart) {
  const RainSeries rain = read(kFiveMinute);
  ASSERT_EQ(rain.pulses.size(), 3u);
  EXPECT_EQ(rain.pulses[1].end, rain.pulses[2].start);
}

TEST(RainInput, FirstRowCoversOneStep) {
  SeriesFormat fmt;
  fmt.step_s = 600.0;
  const RainSeries rain = read("time,rain_mm\n2025-03-01T00:10,0.3\n2025-03-01T00:15,0.3\n", fmt);
  EXPECT_EQ(rain.step_s, 600);
  ASSERT_EQ(rain.pulses.size(), 2u);
  expect_pulse(rain.pulses[0], kT0, kT0 + 10 * kMinute, 0.3e-3);
  expect_pulse(rain.pulses[1], kT0 + 10 * kMinute, kT0 + 15 * kMinute, 0.3e-3);
}

TEST(RainInput, InfersTheMostCommonSpacingAsStep) {
  const RainSeries rain = read(
      "time,rain_mm\n"
      "2025-03-01T00:05,0\n"
      "2025-03-01T00:10,0\n"
      "2025-03-01T00:11,0.1\n"
      "2025-03-01T00:15,0\n"
      "2025-03-01T00:20,0\n");
  EXPECT_EQ(rain.step_s, 300);
}

TEST(RainInput, BreaksStepTiesTowardTheSmallestSpacing) {
  const RainSeries rain = read(
      "time,rain_mm\n"
      "2025-03-01T00:01,0\n"
      "2025-03-01T00:02,0\n"
      "2025-03-01T00:04,0\n"
      "2025-03-01T00:05,0\n"
      "2025-03-01T00:07,0\n",
      with_gaps(GapPolicy::zero));
  EXPECT_EQ(rain.step_s, 60);
  ASSERT_EQ(rain.gaps.size(), 2u);
}

TEST(RainInput, ShortSpacingCoversOnlyTheTimeSinceThePreviousRow) {
  SeriesFormat fmt;
  fmt.step_s = 300.0;
  const RainSeries rain = read(
      "time,rain_mm\n"
      "2025-03-01T00:05,0.5\n"
      "2025-03-01T00:06,0.1\n"
      "2025-03-01T00:10,0.4\n",
      fmt);
  ASSERT_EQ(rain.pulses.size(), 3u);
  expect_pulse(rain.pulses[0], kT0, kT0 + 5 * kMinute, 0.5e-3);
  expect_pulse(rain.pulses[1], kT0 + 5 * kMinute, kT0 + 6 * kMinute, 0.1e-3);
  expect_pulse(rain.pulses[2], kT0 + 6 * kMinute, kT0 + 10 * kMinute, 0.4e-3);
  ASSERT_EQ(rain.covered.size(), 1u);
  expect_span(rain.covered[0], kT0, kT0 + 10 * kMinute);
}

TEST(RainInput, ReadsIntensityOverEachRowsOwnInterval) {
  SeriesFormat fmt;
  fmt.value = RainValue::intensity;
  fmt.value_column = "rain_mm_per_h";
  fmt.step_s = 300.0;
  const RainSeries rain = read(
      "time,rain_mm_per_h\n"
      "2025-03-01T00:05,12\n"
      "2025-03-01T00:06,30\n",
      fmt);
  ASSERT_EQ(rain.pulses.size(), 2u);
  expect_pulse(rain.pulses[0], kT0, kT0 + 5 * kMinute, 1.0e-3);
  expect_pulse(rain.pulses[1], kT0 + 5 * kMinute, kT0 + 6 * kMinute, 0.5e-3);
}

TEST(RainInput, ConvertsInchesExactly) {
  SeriesFormat fmt;
  fmt.value_column = "rain_in";
  fmt.unit_m = kMetresPerInch;
  fmt.unit_name = "in";
  fmt.step_s = 3600.0;
  const RainSeries rain = read("time,rain_in\n2025-03-01T01:00,1\n", fmt);
  ASSERT_EQ(rain.pulses.size(), 1u);
  // source: 1959 yard and pound agreement, 1 in = 25.4 mm exactly (REFERENCES.md, inch).
  EXPECT_EQ(rain.pulses[0].depth_m, 0.0254);
}

// Prints a number with all the digits a double needs to come back unchanged.
std::string exact_text(double value) {
  char buffer[64];
  std::snprintf(buffer, sizeof buffer, "%.17g", value);
  return buffer;
}

TEST(RainInput, GivesTheSamePulsesFromMillimetresInchesAndIntensity) {
  // Invented 5-minute depths in mm, with one short 1-minute interval.
  const std::vector<const char*> stamps = {"2025-03-01T00:05", "2025-03-01T00:10",
                                           "2025-03-01T00:15", "2025-03-01T00:16",
                                           "2025-03-01T00:20", "2025-03-01T00:25"};
  const std::vector<double> depth_mm = {0.2, 0.0, 1.27, 0.3, 2.54, 0.05};
  const std::vector<double> length_h = {5.0 / 60, 5.0 / 60, 5.0 / 60, 1.0 / 60, 4.0 / 60, 5.0 / 60};
  std::string mm = "time,rain\n";
  std::string in = "time,rain\n";
  std::string mm_per_h = "time,rain\n";
  for (std::size_t i = 0; i < stamps.size(); ++i) {
    mm += std::string(stamps[i]) + "," + exact_text(depth_mm[i]) + "\n";
    in += std::string(stamps[i]) + "," + exact_text(depth_mm[i] / 25.4) + "\n";
    mm_per_h += std::string(stamps[i]) + "," + exact_text(depth_mm[i] / length_h[i]) + "\n";
  }
  SeriesFormat fmt;
  fmt.value_column = "rain";
  fmt.step_s = 300.0;
  const RainSeries from_mm = read(mm, fmt);
  fmt.unit_m = kMetresPerInch;
  fmt.unit_name = "in";
  const RainSeries from_in = read(in, fmt);
  fmt.unit_m = kMetresPerMm;
  fmt.unit_name = "mm";
  fmt.value = RainValue::intensity;
  const RainSeries from_intensity = read(mm_per_h, fmt);

  ASSERT_EQ(from_mm.pulses.size(), 5u);
  for (const RainSeries* other : {&from_in, &from_intensity}) {
    ASSERT_EQ(other->pulses.size(), from_mm.pulses.size());
    for (std::size_t i = 0; i < from_mm.pulses.size(); ++i) {
      EXPECT_EQ(other->pulses[i].start, from_mm.pulses[i].start);
      EXPECT_EQ(other->pulses[i].end, from_mm.pulses[i].end);
      EXPECT_NEAR(other->pulses[i].depth_m, from_mm.pulses[i].depth_m, 1e-12);
    }
    EXPECT_NEAR(other->total_depth_m, from_mm.total_depth_m, 1e-12);
  }
}

TEST(RainInput, FindsColumnsByNameAndIgnoresOthers) {
  const RainSeries rain = read(
      "station,rain_mm,quality,time\n"
      "hill,0.5,ok,2025-03-01T00:05\n"
      "hill,0,ok,2025-03-01T00:10\n");
  ASSERT_EQ(rain.pulses.size(), 1u);
  expect_pulse(rain.pulses[0], kT0, kT0 + 5 * kMinute, 0.5e-3);
}

TEST(RainInput, AcceptsQuotedNamesAndValues) {
  const RainSeries rain = read(
      "\"time\", \"rain_mm\",\"note, with comma\"\n"
      "\"2025-03-01 00:05\",\"0.5\",\"a \"\"quoted\"\" note, too\"\n"
      "2025-03-01 00:10 , 0 ,\n");
  ASSERT_EQ(rain.pulses.size(), 1u);
  expect_pulse(rain.pulses[0], kT0, kT0 + 5 * kMinute, 0.5e-3);
  expect_span(rain.covered[0], kT0, kT0 + 10 * kMinute);
}

TEST(RainInput, AcceptsByteOrderMarkAndCrlf) {
  const RainSeries rain = read(
      "\xEF\xBB\xBFtime,rain_mm\r\n"
      "2025-03-01T00:05,0.5\r\n"
      "\r\n"
      "2025-03-01T00:10,0.25\r\n");
  ASSERT_EQ(rain.pulses.size(), 2u);
  expect_pulse(rain.pulses[1], kT0 + 5 * kMinute, kT0 + 10 * kMinute, 0.25e-3);
}

TEST(RainInput, SkipsBlankAndCommentLinesButCountsThem) {
  EXPECT_EQ(error_of("# invented record\n"
                     "time,rain_mm\n"
                     "\n"
                     "2025-03-01T00:05,0.5\n"
                     "   \n"
                     "  # checked by hand\n"
                     "2025-03-01T00:10,abc\n"),
            "rain.csv:7: rain_mm: not a number (got \"abc\")");
}

TEST(RainInput, ReadsAFileFixture) {
  std::ifstream file(GUTTERWATT_SOURCE_DIR "/tests/data/rain/station-5min.csv", std::ios::binary);
  ASSERT_TRUE(file.is_open());
  const RainSeries rain = read_rain_series(file, "station-5min.csv", SeriesFormat{});
  ASSERT_EQ(rain.pulses.size(), 2u);
  expect_pulse(rain.pulses[0], kT0, kT0 + 5 * kMinute, 0.2e-3);
  expect_pulse(rain.pulses[1], kT0 + 10 * kMinute, kT0 + 15 * kMinute, 1.4e-3);
  expect_span(rain.covered[0], kT0, kT0 + 20 * kMinute);
}

TEST(RainInput, ReadsLinesLongerThanTheReadChunk) {
  const std::string filler(3 << 20, 'x');
  const RainSeries rain =
      read("time,rain_mm,note\n2025-03-01T00:05,0.5," + filler + "\n2025-03-01T00:10,0.5,\n");
  EXPECT_EQ(rain.pulses.size(), 2u);
}

TEST(RainInput, ReadsManyRowsAcrossChunks) {
  // Invented: 0.1 mm in every third 1-minute interval for 200 000 minutes.
  std::string text = "time,rain_mm\n";
  const int rows = 200000;
  for (int i = 1; i <= rows; ++i) {
    text += format_iso8601(kT0 + i * kMinute) + (i % 3 == 0 ? ",0.1\n" : ",0\n");
  }
  const RainSeries rain = read(text);
  EXPECT_EQ(rain.step_s, 60);
  ASSERT_EQ(rain.pulses.size(), static_cast<std::size_t>(rows / 3));
  ASSERT_EQ(rain.covered.size(), 1u);
  expect_span(rain.covered[0], kT0, kT0 + rows * kMinute);
  EXPECT_DOUBLE_EQ(rain.total_depth_m, (rows / 3) * 0.1e-3);
}

TEST(RainInput, SumsTheTotalDepthExactly) {
  // One 1000 mm hour followed by 1000 hours of 1e-14 mm: added one by one in double precision
  // the small depths vanish against the large one; the exact sum keeps them.
  SeriesFormat fmt;
  fmt.step_s = 3600.0;
  std::string text = "time,rain_mm\n" + format_iso8601(kT0 + 3600) + ",1000\n";
  double small_sum_m = 0.0;
  for (int i = 2; i <= 1001; ++i) {
    text += format_iso8601(kT0 + i * 3600) + ",1e-14\n";
    small_sum_m += 1e-14 * kMetresPerMm;
  }
  const RainSeries rain = read(text, fmt);
  EXPECT_EQ(rain.total_depth_m, 1.0 + small_sum_m);
  EXPECT_NE(rain.total_depth_m, 1.0);
}

TEST(RainInput, AcceptsIntensityAtTheLimit) {
  SeriesFormat fmt;
  fmt.step_s = 3600.0;
  const RainSeries rain = read("time,rain_mm\n2025-03-01T01:00,1000\n", fmt);
  EXPECT_EQ(rain.pulses.size(), 1u);
}

TEST(RainInput, RejectsImplausibleDepth) {
  EXPECT_EQ(error_of("time,rain_mm\n"
                     "2025-03-01T00:05,0\n"
                     "2025-03-01T00:10,100\n"),
            "rain.csv:3: rain_mm: implausible intensity 1200 mm/h (got 100 mm in 5min; the limit "
            "is 1000 mm/h)");
}

TEST(RainInput, RejectsImplausibleDepthOverAShortInterval) {
  SeriesFormat fmt;
  fmt.step_s = 300.0;
  EXPECT_EQ(error_of("time,rain_mm\n"
                     "2025-03-01T00:05,20\n"
                     "2025-03-01T00:06,20\n",
                     fmt),
            "rain.csv:3: rain_mm: implausible intensity 1200 mm/h (got 20 mm in 1min; the limit "
            "is 1000 mm/h)");
}

TEST(RainInput, RejectsImplausibleIntensity) {
  SeriesFormat fmt;
  fmt.value = RainValue::intensity;
  fmt.value_column = "rain_in_per_h";
  fmt.unit_m = kMetresPerInch;
  fmt.unit_name = "in";
  fmt.step_s = 300.0;
  EXPECT_EQ(error_of("time,rain_in_per_h\n2025-03-01T00:05,50\n", fmt),
            "rain.csv:2: rain_in_per_h: implausible intensity 1270 mm/h (got 50 in/h; the limit "
            "is 1000 mm/h)");
}

TEST(RainInput, RejectsNonNumericValues) {
  EXPECT_EQ(error_of("time,rain_mm\n2025-03-01T00:05,abc\n"),
            "rain.csv:2: rain_mm: not a number (got \"abc\")");
  EXPECT_EQ(error_of("time,rain_mm\n2025-03-01T00:05,0.2mm\n"),
            "rain.csv:2: rain_mm: not a number (got \"0.2mm\")");
  EXPECT_EQ(error_of("time,rain_mm\n2025-03-01T00:05,\n"),
            "rain.csv:2: rain_mm: not a number (got \"\")");
}

TEST(RainInput, RejectsNotANumber) {
  EXPECT_EQ(error_of("time,rain_mm\n2025-03-01T00:05,NaN\n"),
            "rain.csv:2: rain_mm: not a number (got \"NaN\")");
}

TEST(RainInput, RejectsInfiniteValues) {
  EXPECT_EQ(error_of("time,rain_mm\n2025-03-01T00:05,inf\n"),
            "rain.csv:2: rain_mm: not a finite number (got \"inf\")");
  EXPECT_EQ(error_of("time,rain_mm\n2025-03-01T00:05,1e999\n"),
            "rain.csv:2: rain_mm: not a finite number (got \"1e999\")");
}

TEST(RainInput, RejectsNegativeValues) {
  EXPECT_EQ(error_of("time,rain_mm\n2025-03-01T00:05,-0.2\n"),
            "rain.csv:2: rain_mm: must not be negative (got -0.2)");
}

TEST(RainInput, TakesVanishinglySmallValuesAsDry) {
  SeriesFormat fmt;
  fmt.step_s = 300.0;
  const RainSeries rain = read("time,rain_mm\n2025-03-01T00:05,1e-999\n", fmt);
  EXPECT_TRUE(rain.pulses.empty());
  EXPECT_EQ(rain.covered.size(), 1u);
}

TEST(RainInput, RejectsAMissingColumnListingTheOnesFound) {
  EXPECT_EQ(error_of("time,\"depth_mm\"\n2025-03-01T00:05,0.2\n"),
            "rain.csv:1: rain_mm: no such column in the header (found \"time\", \"depth_mm\")");
}

TEST(RainInput, RejectsAColumnNamedTwice) {
  EXPECT_EQ(error_of("time,rain_mm,time\n2025-03-01T00:05,0.2,x\n"),
            "rain.csv:1: time: appears twice in the header (columns 1 and 3)");
}

TEST(RainInput, RejectsAnEmptyFile) {
  const std::string expected =
      "rain.csv:1: empty file (expected a header row naming the columns \"time\" and "
      "\"rain_mm\")";
  EXPECT_EQ(error_of(""), expected);
  EXPECT_EQ(error_of("\xEF\xBB\xBF\r\n# only a comment\n\n"), expected);
}

TEST(RainInput, RejectsAHeaderWithoutRows) {
  EXPECT_EQ(error_of("time,rain_mm\n\n# nothing else\n"), "rain.csv:1: no data rows");
}

TEST(RainInput, RejectsAShortRow) {
  EXPECT_EQ(error_of("time,rain_mm\n2025-03-01T00:05,0\n2025-03-01T00:10\n"),
            "rain.csv:3: rain_mm: missing (the row has 1 field, the column is field 2)");
  EXPECT_EQ(error_of("station,rain_mm,time\nhill,0\n"),
            "rain.csv:2: time: missing (the row has 2 fields, the column is field 3)");
}

TEST(RainInput, RejectsImpossibleTimestamps) {
  EXPECT_EQ(error_of("time,rain_mm\n2025-02-30T00:05,0\n"),
            "rain.csv:2: time: not an ISO 8601 date-time such as 2025-03-01T00:05 (got "
            "\"2025-02-30T00:05\")");
  EXPECT_EQ(error_of("time,rain_mm\n01/03/2025 00:05,0\n"),
            "rain.csv:2: time: not an ISO 8601 date-time such as 2025-03-01T00:05 (got "
            "\"01/03/2025 00:05\")");
}

TEST(RainInput, RejectsARepeatedStamp) {
  EXPECT_EQ(error_of("time,rain_mm\n"
                     "2025-03-01T00:05,0\n"
                     "2025-03-01T00:05,0.2\n"),
            "rain.csv:3: time: \"2025-03-01T00:05\" is the same instant as the previous stamp "
            "\"2025-03-01T00:05\" (line 2)");
}

TEST(RainInput, RejectsTheSameInstantWrittenAtAnotherOffset) {
  EXPECT_EQ(error_of("time,rain_mm\n"
                     "2025-03-01T00:00Z,0\n"
                     "2025-03-01T01:00+01:00,0.2\n"),
            "rain.csv:3: time: \"2025-03-01T01:00+01:00\" is the same instant as the previous "
            "stamp \"2025-03-01T00:00Z\" (line 2)");
}

TEST(RainInput, RejectsStampsOutOfOrder) {
  EXPECT_EQ(error_of("time,rain_mm\n"
                     "2025-03-01T00:05,0\n"
                     "2025-03-01T00:15,0\n"
                     "\n"
                     "2025-03-01T00:10,0.2\n"),
            "rain.csv:5: time: \"2025-03-01T00:10\" is earlier than the previous stamp "
            "\"2025-03-01T00:15\" (line 3); rows must be in time order");
}

TEST(RainInput, ReadsStampsWithOffsets) {
  const RainSeries rain = read(
      "time,rain_mm\n"
      "2025-03-01T00:05+02:00,0.2\n"
      "2025-03-01T00:10+02:00,0\n");
  ASSERT_EQ(rain.pulses.size(), 1u);
  expect_pulse(rain.pulses[0], kT0 - 7200, kT0 + 5 * kMinute - 7200, 0.2e-3);
}

TEST(RainInput, AcceptsChangingOffsetsWhileInstantsIncrease) {
  // A clock change: 01:55 at +01:00 and 03:00 at +02:00 are five minutes apart.
  const RainSeries rain = read(
      "time,rain_mm\n"
      "2025-03-30T01:50+01:00,0\n"
      "2025-03-30T01:55+01:00,0\n"
      "2025-03-30T03:00+02:00,0.3\n");
  ASSERT_EQ(rain.pulses.size(), 1u);
  EXPECT_EQ(rain.pulses[0].end - rain.pulses[0].start, 300);
  EXPECT_TRUE(rain.gaps.empty());
}

TEST(RainInput, TakesNaiveStampsAtTheDefaultOffset) {
  SeriesFormat fmt;
  fmt.utc_offset_s = 7200;
  const RainSeries rain = read("time,rain_mm\n2025-03-01T00:05,0.2\n2025-03-01T00:10,0\n", fmt);
  ASSERT_EQ(rain.pulses.size(), 1u);
  expect_pulse(rain.pulses[0], kT0 - 7200, kT0 + 5 * kMinute - 7200, 0.2e-3);
}

TEST(RainInput, RejectsMixedTimeZones) {
  EXPECT_EQ(error_of("time,rain_mm\n"
                     "2025-03-01T00:05+02:00,0\n"
                     "2025-03-01T00:10,0\n"),
            "rain.csv:3: time: mixed time zones: \"2025-03-01T00:10\" has no UTC offset but the "
            "stamp on line 2 has one");
  EXPECT_EQ(error_of("time,rain_mm\n"
                     "2025-03-01T00:05,0\n"
                     "2025-03-01T00:10Z,0\n"),
            "rain.csv:3: time: mixed time zones: \"2025-03-01T00:10Z\" has a UTC offset but the "
            "stamp on line 2 has none");
}

TEST(RainInput, NeedsAStepForASingleRow) {
  EXPECT_EQ(error_of("time,rain_mm\n2025-03-01T00:05,0.2\n"),
            "rain.csv:2: time: cannot tell the record step from a single row; give it in the "
            "scenario (rain.step, e.g. 5min)");
  SeriesFormat fmt;
  fmt.step_s = 300.0;
  const RainSeries rain = read("time,rain_mm\n2025-03-01T00:05,0.2\n", fmt);
  ASSERT_EQ(rain.pulses.size(), 1u);
  expect_pulse(rain.pulses[0], kT0, kT0 + 5 * kMinute, 0.2e-3);
}

TEST(RainInput, RejectsAStepThatIsNotWholeSeconds) {
  SeriesFormat fmt;
  fmt.step_s = 0.5;
  EXPECT_EQ(error_of(kFiveMinute, fmt),
            "rain.csv: step: must be a whole number of seconds, at least 1 (got 0.5 s)");
}

// Invented 5-minute record with no rows for 00:15 and 00:20 and 00:25.
const char* const kWithGap =
    "time,rain_mm\n"
    "2025-03-01T00:05,0.2\n"
    "2025-03-01T00:10,0\n"
    "2025-03-01T00:30,0.4\n"
    "2025-03-01T00:35,0\n";

TEST(RainInput, StopsAtAGapByDefault) {
  EXPECT_EQ(error_of(kWithGap),
            "rain.csv:4: time: gap in the record from 2025-03-01T00:10 to 2025-03-01T00:25 "
            "(15min with no rows); set rain.gaps: zero to count gaps as dry, or rain.gaps: skip "
            "to leave them out");
}

TEST(RainInput, CountsAGapAsDryWhenAskedTo) {
  const RainSeries rain = read(kWithGap, with_gaps(GapPolicy::zero));
  EXPECT_EQ(rain.policy, GapPolicy::zero);
  ASSERT_EQ(rain.gaps.size(), 1u);
  expect_span(rain.gaps[0], kT0 + 10 * kMinute, kT0 + 25 * kMinute);
  ASSERT_EQ(rain.covered.size(), 2u);
  expect_span(rain.covered[0], kT0, kT0 + 10 * kMinute);
  expect_span(rain.covered[1], kT0 + 25 * kMinute, kT0 + 35 * kMinute);
  ASSERT_EQ(rain.pulses.size(), 2u);
  expect_pulse(rain.pulses[1], kT0 + 25 * kMinute, kT0 + 30 * kMinute, 0.4e-3);
  ASSERT_EQ(rain.warnings.size(), 1u);
  EXPECT_EQ(rain.warnings[0],
            "rain.csv:4: gap in the record from 2025-03-01T00:10 to 2025-03-01T00:25 (15min with "
            "no rows), counted as dry");
}

TEST(RainInput, ListsAGapToSkipWhenAskedTo) {
  const RainSeries rain = read(kWithGap, with_gaps(GapPolicy::skip));
  EXPECT_EQ(rain.policy, GapPolicy::skip);
  ASSERT_EQ(rain.gaps.size(), 1u);
  expect_span(rain.gaps[0], kT0 + 10 * kMinute, kT0 + 25 * kMinute);
  ASSERT_EQ(rain.covered.size(), 2u);
  ASSERT_EQ(rain.warnings.size(), 1u);
  EXPECT_EQ(rain.warnings[0],
            "rain.csv:4: gap in the record from 2025-03-01T00:10 to 2025-03-01T00:25 (15min with "
            "no rows), left out of the simulation");
}

TEST(RainInput, NamesGapEndsAtTheStampsOffset) {
  EXPECT_EQ(error_of("time,rain_mm\n"
                     "2025-03-01T00:05+02:00,0\n"
                     "2025-03-01T00:10+02:00,0\n"
                     "2025-03-01T02:00+02:00,0\n"),
            "rain.csv:4: time: gap in the record from 2025-03-01T00:10+02:00 to "
            "2025-03-01T01:55+02:00 (1h 45min with no rows); set rain.gaps: zero to count gaps "
            "as dry, or rain.gaps: skip to leave them out");
}

TEST(RainInput, SummarisesManyGapsInOneWarning) {
  // Invented: rows every 5 minutes with one missing row after every two.
  std::string text = "time,rain_mm\n";
  for (int i = 1; i <= 75; ++i) {
    if (i % 3 != 0) text += format_iso8601(kT0 + i * 5 * kMinute) + ",0\n";
  }
  const RainSeries rain = read(text, with_gaps(GapPolicy::zero));
  ASSERT_EQ(rain.gaps.size(), 24u);
  ASSERT_EQ(rain.warnings.size(), 21u);
  EXPECT_EQ(rain.warnings[20],
            "rain.csv: 4 more gaps in the record (24 gaps, 2h in all), counted as dry");
}

}  // namespace
}  // namespace gutterwatt
