#include "gutterwatt/rain_input.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <charconv>
#include <cstdio>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "gutterwatt/error.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt::rain_input_test {
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

TEST(RainInput, ReadsLongLinesAcrossTheReadChunks) {
  // 40 rows of 60 KiB, just under the 64 KiB a line may have, over three 1 MiB read chunks.
  const std::string filler(60 << 10, 'x');
  std::string text = "time,rain_mm,note\n";
  for (int i = 1; i <= 40; ++i) text += format_iso8601(kT0 + i * kMinute) + ",0.5," + filler + "\n";
  const RainSeries rain = read(text);
  EXPECT_EQ(rain.pulses.size(), 40u);
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
  fmt.zone = 7200;
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

// ---- tipping-bucket logs ----

constexpr Instant kHour = 3600;
constexpr double kTip_m = 0.2 * kMetresPerMm;  // invented 0.2 mm bucket

RainSeries read_tips(const std::string& text, Instant cap_s = kDefaultTipCap_s,
                     const SeriesFormat& fmt = {}) {
  std::istringstream in(text);
  return read_rain_tips(in, "tips.csv", fmt, TipSpreading{kTip_m, cap_s});
}

std::string tips_error_of(const std::string& text) {
  try {
    read_tips(text);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

TipLog tip_log(const std::string& label, const std::string& text) {
  std::istringstream in(text);
  return read_tip_log(in, label, SeriesFormat{});
}

// Invented tips: three close together, then one after a dry spell longer than the cap.
const char* const kTips =
    "time\n"
    "2025-03-01T00:10\n"
    "2025-03-01T00:20\n"
    "2025-03-01T00:25\n"
    "2025-03-01T02:00\n";

void expect_same_series(const RainSeries& a, const RainSeries& b) {
  ASSERT_EQ(a.pulses.size(), b.pulses.size());
  for (std::size_t k = 0; k < a.pulses.size(); ++k) {
    EXPECT_EQ(a.pulses[k].start, b.pulses[k].start) << k;
    EXPECT_EQ(a.pulses[k].end, b.pulses[k].end) << k;
    EXPECT_EQ(a.pulses[k].depth_m, b.pulses[k].depth_m) << k;
  }
  ASSERT_EQ(a.covered.size(), b.covered.size());
  for (std::size_t k = 0; k < a.covered.size(); ++k) {
    expect_span(a.covered[k], b.covered[k].start, b.covered[k].end);
  }
  EXPECT_EQ(a.gaps.size(), b.gaps.size());
  EXPECT_EQ(a.total_depth_m, b.total_depth_m);
}

TEST(RainTips, SpreadsEachTipOverTheTimeSinceThePreviousTip) {
  const RainSeries rain = read_tips(kTips);
  ASSERT_EQ(rain.pulses.size(), 4u);
  expect_pulse(rain.pulses[1], kT0 + 10 * kMinute, kT0 + 20 * kMinute, kTip_m);
  expect_pulse(rain.pulses[2], kT0 + 20 * kMinute, kT0 + 25 * kMinute, kTip_m);
}

TEST(RainTips, SpreadsTheFirstTipOverTheCap) {
  const RainSeries rain = read_tips(kTips);
  ASSERT_FALSE(rain.pulses.empty());
  expect_pulse(rain.pulses[0], kT0 + 10 * kMinute - kDefaultTipCap_s, kT0 + 10 * kMinute, kTip_m);
}

TEST(RainTips, CountsATipAfterALongDrySpellAsAShowerAsLongAsTheCap) {
  const RainSeries rain = read_tips(kTips);
  ASSERT_EQ(rain.pulses.size(), 4u);
  expect_pulse(rain.pulses[3], kT0 + 90 * kMinute, kT0 + 2 * kHour, kTip_m);
  const RainSeries hour_cap = read_tips(kTips, kHour);
  expect_pulse(hour_cap.pulses[3], kT0 + kHour, kT0 + 2 * kHour, kTip_m);
}

TEST(RainTips, CoversTheDrySpellsBetweenTips) {
  const RainSeries rain = read_tips(kTips);
  ASSERT_EQ(rain.covered.size(), 1u);
  expect_span(rain.covered[0], kT0 + 10 * kMinute - kDefaultTipCap_s, kT0 + 2 * kHour);
  EXPECT_TRUE(rain.gaps.empty());
  EXPECT_TRUE(rain.warnings.empty());
}

TEST(RainTips, SharesOneIntervalAmongTipsWithTheSameStamp) {
  const RainSeries rain =
      read_tips("time\n2025-03-01T00:10\n2025-03-01T00:20\n2025-03-01T00:20\n2025-03-01T00:20\n");
  ASSERT_EQ(rain.pulses.size(), 2u);
  expect_pulse(rain.pulses[1], kT0 + 10 * kMinute, kT0 + 20 * kMinute, 3 * kTip_m);
}

TEST(RainTips, GiveTheSameSeriesAsTheEquivalentSeriesFile) {
  // The same rain written as a period-ending series with a 30-minute step: each tip becomes a
  // row, and rows of zero fill the dry spell up to one cap before the late tip.
  SeriesFormat fmt;
  fmt.step_s = 1800.0;
  const RainSeries series = read(
      "time,rain_mm\n"
      "2025-03-01T00:10,0.2\n"
      "2025-03-01T00:20,0.2\n"
      "2025-03-01T00:25,0.2\n"
      "2025-03-01T00:55,0\n"
      "2025-03-01T01:25,0\n"
      "2025-03-01T01:30,0\n"
      "2025-03-01T02:00,0.2\n",
      fmt);
  expect_same_series(read_tips(kTips), series);
}

TEST(RainTips, ConservesTheDepthOfEveryTipExactly) {
  // 1000 invented tips at irregular spacings from 7 s to 2 h.
  std::string text = "time\n";
  Instant t = kT0;
  for (int i = 0; i < 1000; ++i) {
    t += 7 + (i * 7919) % 7200;
    text += format_iso8601(t) + "\n";
  }
  const RainSeries rain = read_tips(text);
  EXPECT_EQ(rain.pulses.size(), 1000u);
  EXPECT_EQ(rain.total_depth_m, 1000.0 * kTip_m);
  EXPECT_EQ(sum_depths_m(rain.pulses), 1000.0 * kTip_m);
}

TEST(RainTips, ReadsTheTimeColumnByNameAndStampsWithOffsets) {
  SeriesFormat fmt;
  fmt.time_column = "tipped";
  const RainSeries rain =
      read_tips("logger,tipped\nhill,2025-03-01T02:10+02:00\nhill,2025-03-01T02:20+02:00\n",
                kDefaultTipCap_s, fmt);
  ASSERT_EQ(rain.pulses.size(), 2u);
  expect_pulse(rain.pulses[1], kT0 + 10 * kMinute, kT0 + 20 * kMinute, kTip_m);
}

TEST(RainTips, JoinsLogsAsOneStream) {
  const TipLog early = tip_log("a.csv", "time\n2025-03-01T00:10\n2025-03-01T00:20\n");
  const TipLog late = tip_log("b.csv", "time\n2025-03-01T00:25\n");
  const RainSeries rain = spread_tips({late, early}, TipSpreading{kTip_m, kDefaultTipCap_s});
  ASSERT_EQ(rain.pulses.size(), 3u);
  expect_pulse(rain.pulses[2], kT0 + 20 * kMinute, kT0 + 25 * kMinute, kTip_m);
  ASSERT_EQ(rain.covered.size(), 1u);
}

TEST(RainTips, RejectsOverlappingLogsNamingBoth) {
  const TipLog a = tip_log("a.csv", "time\n2025-03-01T00:10\n2025-03-01T00:30\n");
  const TipLog b = tip_log("b.csv", "time\n2025-03-01T00:20\n2025-03-01T00:40\n");
  try {
    spread_tips({a, b}, TipSpreading{kTip_m, kDefaultTipCap_s});
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_STREQ(e.what(),
                 "b.csv: rain.files: overlaps a.csv from 2025-03-01T00:20 to 2025-03-01T00:30 "
                 "(UTC); each period must come from one file");
  }
}

TEST(RainTips, RejectsImplausibleIntensity) {
  SeriesFormat fmt;
  std::istringstream in("time\n2025-03-01T00:10:00\n2025-03-01T00:10:01\n");
  try {
    read_rain_tips(in, "tips.csv", fmt, TipSpreading{0.5 * kMetresPerMm, kDefaultTipCap_s});
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_STREQ(e.what(),
                 "tips.csv:3: time: implausible intensity 1800 mm/h (got 1 tip of 0.5 mm in 1s; "
                 "the limit is 1000 mm/h)");
  }
}

TEST(RainTips, RejectsATipEarlierThanThePreviousOne) {
  EXPECT_EQ(tips_error_of("time\n2025-03-01T00:20\n2025-03-01T00:10\n"),
            "tips.csv:3: time: \"2025-03-01T00:10\" is earlier than the previous stamp "
            "\"2025-03-01T00:20\" (line 2); rows must be in time order");
}

TEST(RainTips, RejectsABadStamp) {
  EXPECT_EQ(tips_error_of("time\n2025-03-01T00:20\nsoon\n"),
            "tips.csv:3: time: not an ISO 8601 date-time such as 2025-03-01T00:05 (got \"soon\")");
}

TEST(RainTips, RejectsALogWithoutTips) {
  EXPECT_EQ(tips_error_of("# invented, empty\ntime\n"), "tips.csv:2: no data rows");
}

TEST(RainTips, RejectsAMissingTimeColumn) {
  EXPECT_EQ(tips_error_of("when\n2025-03-01T00:20\n"),
            "tips.csv:1: time: no such column in the header (found \"when\")");
}

TEST(RainTips, RejectsAnEmptyFileNamingTheOneColumn) {
  EXPECT_EQ(tips_error_of(""),
            "tips.csv:1: empty file (expected a header row naming the column \"time\")");
}

// ---- daily totals ----

constexpr Instant kDay = 86400;

SeriesFormat daily_format(GapPolicy gaps = GapPolicy::error) {
  SeriesFormat fmt;
  fmt.time_column = "date";
  fmt.gaps = gaps;
  return fmt;
}

RainSeries read_daily(const std::string& text, const SeriesFormat& fmt = daily_format(),
                      const DayWindow& window = {}) {
  std::istringstream in(text);
  return read_rain_daily(in, "daily.csv", fmt, window);
}

std::string daily_error_of(const std::string& text, const SeriesFormat& fmt = daily_format()) {
  try {
    read_daily(text, fmt);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

TEST(RainDaily, SpreadsADayAsOneBlockInsideItsWindow) {
  const RainSeries rain = read_daily("date,rain_mm\n2025-03-01,12\n2025-03-02,0\n", daily_format(),
                                     {6 * kHour, 6 * kHour});
  ASSERT_EQ(rain.pulses.size(), 1u);
  expect_pulse(rain.pulses[0], kT0 + 6 * kHour, kT0 + 12 * kHour, 12e-3);
  ASSERT_EQ(rain.covered.size(), 1u);
  expect_span(rain.covered[0], kT0, kT0 + 2 * kDay);
  EXPECT_EQ(rain.step_s, kDay);
}

TEST(RainDaily, WarnsThatDailyTotalsHideIntensity) {
  const RainSeries rain = read_daily("date,rain_mm\n2025-03-01,12.3\n");
  ASSERT_EQ(rain.warnings.size(), 1u);
  EXPECT_EQ(rain.warnings[0],
            "daily totals hide rain intensity, and whether the siphon primes depends on it: the "
            "results follow the chosen rain.disaggregate method");
}

TEST(RainDaily, TakesDatesAtTheRecordsOffset) {
  SeriesFormat fmt = daily_format();
  fmt.zone = 2 * 3600;
  const RainSeries rain = read_daily("date,rain_mm\n2025-03-01,5\n", fmt);
  ASSERT_EQ(rain.covered.size(), 1u);
  expect_span(rain.covered[0], kT0 - 2 * kHour, kT0 + kDay - 2 * kHour);
}

TEST(RainDaily, ConvertsInches) {
  SeriesFormat fmt = daily_format();
  fmt.unit_m = kMetresPerInch;
  fmt.unit_name = "in";
  const RainSeries rain = read_daily("date,rain_mm\n2025-03-01,1.5\n", fmt);
  ASSERT_EQ(rain.pulses.size(), 1u);
  EXPECT_EQ(rain.pulses[0].depth_m, 1.5 * kMetresPerInch);
}

TEST(RainDaily, StopsAtAMissingDayByDefault) {
  EXPECT_EQ(daily_error_of("date,rain_mm\n2025-03-01,5\n2025-03-03,1\n"),
            "daily.csv:3: date: gap in the record from 2025-03-02T00:00 to 2025-03-03T00:00 (1d "
            "with no rows); set rain.gaps: zero to count gaps as dry, or rain.gaps: skip to "
            "leave them out");
}

TEST(RainDaily, ListsAMissingDayAsAGapWhenAskedTo) {
  const RainSeries rain =
      read_daily("date,rain_mm\n2025-03-01,5\n2025-03-03,1\n", daily_format(GapPolicy::skip));
  ASSERT_EQ(rain.gaps.size(), 1u);
  expect_span(rain.gaps[0], kT0 + kDay, kT0 + 2 * kDay);
  ASSERT_EQ(rain.covered.size(), 2u);
  ASSERT_EQ(rain.warnings.size(), 2u);
  EXPECT_EQ(rain.warnings[1],
            "daily.csv:3: gap in the record from 2025-03-02T00:00 to 2025-03-03T00:00 (1d with no "
            "rows), left out of the simulation");
}

TEST(RainDaily, RejectsADateWithATimeOfDay) {
  EXPECT_EQ(daily_error_of("date,rain_mm\n2025-03-01T00:00,5\n"),
            "daily.csv:2: date: not a date such as 2025-03-01 (got \"2025-03-01T00:00\")");
}

TEST(RainDaily, RejectsARepeatedDate) {
  EXPECT_EQ(daily_error_of("date,rain_mm\n2025-03-01,5\n2025-03-01,1\n"),
            "daily.csv:3: date: \"2025-03-01\" is the same day as the previous date "
            "\"2025-03-01\" (line 2)");
}

TEST(RainDaily, RejectsDatesOutOfOrder) {
  EXPECT_EQ(daily_error_of("date,rain_mm\n2025-03-02,5\n2025-03-01,1\n"),
            "daily.csv:3: date: \"2025-03-01\" is earlier than the previous date \"2025-03-02\" "
            "(line 2); rows must be in time order");
}

TEST(RainDaily, RejectsANegativeTotal) {
  EXPECT_EQ(daily_error_of("date,rain_mm\n2025-03-01,-5\n"),
            "daily.csv:2: rain_mm: must not be negative (got -5)");
}

TEST(RainDaily, RejectsAShortRow) {
  EXPECT_EQ(daily_error_of("date,rain_mm\n2025-03-01\n"),
            "daily.csv:2: rain_mm: missing (the row has 1 field, the column is field 2)");
}

TEST(RainDaily, RejectsAnImplausibleTotal) {
  EXPECT_EQ(daily_error_of("date,rain_mm\n2025-03-01,30000\n"),
            "daily.csv:2: rain_mm: implausible intensity 1250 mm/h (got 30000 mm in 1d; the "
            "limit is 1000 mm/h)");
}

// ---- coverage ----

TEST(RainCoverage, GivesTheShareOfEachMonthWithData) {
  RainSeries rain;
  // Invented: data for all of March 2025 but 6 hours, and for the first 15 days of April.
  const Instant april = month_start(2025, 4);
  rain.covered = {{kT0, kT0 + 10 * kDay}, {kT0 + 10 * kDay + 6 * kHour, april + 15 * kDay}};
  const std::vector<MonthCoverage> months = month_coverage(rain, kT0, month_start(2025, 6), 0);
  ASSERT_EQ(months.size(), 3u);
  EXPECT_EQ(months[0].month, "2025-03");
  EXPECT_EQ(months[0].covered_s, 31 * kDay - 6 * kHour);
  EXPECT_DOUBLE_EQ(months[0].fraction, (31.0 * 24 - 6) / (31.0 * 24));
  EXPECT_EQ(months[1].month, "2025-04");
  EXPECT_DOUBLE_EQ(months[1].fraction, 0.5);
  EXPECT_EQ(months[2].month, "2025-05");
  EXPECT_EQ(months[2].covered_s, 0);
  EXPECT_EQ(months[2].fraction, 0.0);
}

TEST(RainCoverage, CountsOnlyThePartOfAMonthInsideThePeriod) {
  RainSeries rain;
  rain.covered = {{kT0, kT0 + 20 * kDay}};
  const std::vector<MonthCoverage> months =
      month_coverage(rain, kT0 + 10 * kDay, kT0 + 30 * kDay, 0);
  ASSERT_EQ(months.size(), 1u);
  EXPECT_EQ(months[0].start, kT0 + 10 * kDay);
  EXPECT_EQ(months[0].end, kT0 + 30 * kDay);
  EXPECT_DOUBLE_EQ(months[0].fraction, 0.5);
}

TEST(RainCoverage, FollowsTheSitesOffset) {
  RainSeries rain;
  rain.covered = {{kT0, kT0 + 31 * kDay}};  // March in UTC
  // At UTC+10:00 local March starts 10 hours before kT0, and April 10 hours before UTC April.
  const int offset_s = 10 * 3600;
  const std::vector<MonthCoverage> months = month_coverage(
      rain, month_start(2025, 3, offset_s), month_start(2025, 5, offset_s), offset_s);
  ASSERT_EQ(months.size(), 2u);
  EXPECT_EQ(months[0].covered_s, 31 * kDay - 10 * kHour);
  EXPECT_EQ(months[1].month, "2025-04");
  EXPECT_EQ(months[1].covered_s, 10 * kHour);
}

TEST(RainCoverage, WarnsAboutMonthsBelowNinetyPercent) {
  RainSeries rain;
  const Instant april = month_start(2025, 4);
  // April: 30 days less 3 days and 1 minute, just below 90 %, which must not read as 90.0 %.
  rain.covered = {{kT0, april + 27 * kDay - kMinute}};
  const std::vector<std::string> warnings =
      coverage_warnings(month_coverage(rain, kT0, month_start(2025, 5), 0));
  ASSERT_EQ(warnings.size(), 1u);
  EXPECT_EQ(warnings[0],
            "rain data cover 89.9 % of 2025-04 (below 90 %): that month's rain and yield are "
            "understated");
}

TEST(RainCoverage, IsEmptyForAnEmptyPeriod) {
  EXPECT_TRUE(month_coverage(RainSeries{}, kT0, kT0, 0).empty());
}

}  // namespace
}  // namespace gutterwatt::rain_input_test

TEST(RainSeries, PlainDecimalsReadAsTheNearestDouble) {
  // The reader's fast path for plain decimals must give what std::from_chars gives (the nearest
  // double, C++17 [charconv]) for every form, including ones it hands on to from_chars. Rows a
  // billion seconds apart keep even the large values plausible as intensities.
  const char* const values[] = {"0",     "0.1",           "0.30", "12.7",  "0.0001",
                                "999.5", "123456789.012", "1e-2", "+0.25", "0.333333333333333333"};
  constexpr gutterwatt::Instant kStep = 1000000000;
  std::string csv = "time,rain_mm\n";
  gutterwatt::Instant t = 1740787200;
  for (const char* v : values) {
    csv += gutterwatt::format_iso8601(t) + "," + v + "\n";
    t += kStep;
  }
  gutterwatt::SeriesFormat fmt;
  fmt.step_s = static_cast<double>(kStep);
  std::istringstream in(csv);
  const gutterwatt::RainSeries rain = gutterwatt::read_rain_series(in, "plain.csv", fmt);
  std::size_t pulse = 0;
  for (const char* v : values) {
    std::string_view text(v);
    if (text.front() == '+') text.remove_prefix(1);
    double expected = 0.0;
    std::from_chars(text.data(), text.data() + text.size(), expected);
    if (expected == 0.0) continue;
    ASSERT_LT(pulse, rain.pulses.size());
    EXPECT_EQ(rain.pulses[pulse].depth_m, expected * 1e-3) << v;
    ++pulse;
  }
  EXPECT_EQ(pulse, rain.pulses.size());
}
