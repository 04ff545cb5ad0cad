#include "gutterwatt/rain_files.hpp"

#include <gtest/gtest.h>
#include <unistd.h>

#include <algorithm>
#include <cstdio>
#include <fstream>
#include <string>
#include <vector>

#include "gutterwatt/disaggregation.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/scenario.hpp"
#include "gutterwatt/units.hpp"
#include "test_support.hpp"

namespace gutterwatt::rain_files_test {
namespace {

// Seconds since the epoch of 2025-03-01T00:00Z.
// source: POSIX.1-2017 Base Definitions 4.16 (Seconds Since the Epoch), formula worked by hand.
constexpr Instant kT0 = 1740787200;
constexpr Instant kMinute = 60;
constexpr Instant kDay = 86400;

const std::filesystem::path kFixtures =
    std::filesystem::path(GUTTERWATT_SOURCE_DIR) / "tests/data/rain";

// A folder of its own for each test, emptied first.
class RainFiles : public ::testing::Test {
 protected:
  void SetUp() override {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    dir_ = std::filesystem::temp_directory_path() /
           ("gutterwatt-rain-files-" + std::to_string(::getpid()) + "-" + info->name());
    std::filesystem::remove_all(dir_);
    std::filesystem::create_directories(dir_);
  }
  void TearDown() override { std::filesystem::remove_all(dir_); }

  std::filesystem::path write(const std::string& name, const std::string& text) const {
    const std::filesystem::path path = dir_ / name;
    std::ofstream(path, std::ios::binary) << text;
    return path;
  }

  std::string label(const std::string& name) const { return (dir_ / name).string(); }

  std::filesystem::path dir_;
};

RainConfig config(RainFormat format, std::vector<std::filesystem::path> files,
                  GapPolicy gaps = GapPolicy::error) {
  RainConfig c;
  c.format = format;
  c.files = std::move(files);
  c.series.gaps = gaps;
  return c;
}

std::string error_of(const RainConfig& c) {
  try {
    load_rain(c);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

// Invented records: two 5-minute files that follow each other, and one that overlaps the first.
const char* const kSeriesA = "time,rain_mm\n2025-03-01T00:05,0.2\n2025-03-01T00:10,0.4\n";
const char* const kSeriesB = "time,rain_mm\n2025-03-01T00:15,1.0\n2025-03-01T00:20,0\n";
const char* const kSeriesOverlap = "time,rain_mm\n2025-03-01T00:10,1.0\n2025-03-01T00:15,0\n";
const char* const kSeriesLater = "time,rain_mm\n2025-03-01T01:05,1.0\n2025-03-01T01:10,0\n";

TEST_F(RainFiles, JoinsSeriesFilesInTimeOrder) {
  const RainSeries rain =
      load_rain(config(RainFormat::series, {write("b.csv", kSeriesB), write("a.csv", kSeriesA)}));
  ASSERT_EQ(rain.pulses.size(), 3u);
  EXPECT_EQ(rain.pulses[2].start, kT0 + 10 * kMinute);
  ASSERT_EQ(rain.covered.size(), 1u);
  EXPECT_EQ(rain.covered[0].start, kT0);
  EXPECT_EQ(rain.covered[0].end, kT0 + 20 * kMinute);
  EXPECT_EQ(rain.total_depth_m, 1.6e-3);
  EXPECT_EQ(rain.step_s, 300);
}

TEST_F(RainFiles, RejectsOverlappingFilesNamingBoth) {
  EXPECT_EQ(error_of(config(RainFormat::series,
                            {write("a.csv", kSeriesA), write("c.csv", kSeriesOverlap)})),
            label("c.csv") + ": rain.files: overlaps " + label("a.csv") +
                " from 2025-03-01T00:05 to 2025-03-01T00:10 (UTC); each period must come from "
                "one file");
}

TEST_F(RainFiles, StopsAtAGapBetweenFilesByDefault) {
  EXPECT_EQ(
      error_of(
          config(RainFormat::series, {write("a.csv", kSeriesA), write("d.csv", kSeriesLater)})),
      label("d.csv") +
          ": rain.files: gap between the files from 2025-03-01T00:10 to 2025-03-01T01:00 (UTC, "
          "50min) after " +
          label("a.csv") +
          "; set rain.gaps: zero to count gaps as dry, or rain.gaps: skip to leave them out");
}

TEST_F(RainFiles, CountsAGapBetweenFilesAsDryWhenAskedTo) {
  const RainSeries rain =
      load_rain(config(RainFormat::series, {write("a.csv", kSeriesA), write("d.csv", kSeriesLater)},
                       GapPolicy::zero));
  EXPECT_EQ(rain.policy, GapPolicy::zero);
  ASSERT_EQ(rain.gaps.size(), 1u);
  EXPECT_EQ(rain.gaps[0].start, kT0 + 10 * kMinute);
  EXPECT_EQ(rain.gaps[0].end, kT0 + 60 * kMinute);
  ASSERT_EQ(rain.covered.size(), 2u);
  ASSERT_EQ(rain.warnings.size(), 1u);
  EXPECT_EQ(rain.warnings[0], label("d.csv") +
                                  ": gap between the files from 2025-03-01T00:10 to "
                                  "2025-03-01T01:00 (UTC, 50min) after " +
                                  label("a.csv") + ", counted as dry");
}

TEST_F(RainFiles, KeepsEachFilesOwnWarningsAsTheyAre) {
  const RainSeries rain = load_rain(
      config(RainFormat::series,
             {write("a.csv",
                    "time,rain_mm\n2025-03-01T00:05,0\n2025-03-01T00:10,0\n2025-03-01T00:30,0\n")},
             GapPolicy::skip));
  ASSERT_EQ(rain.warnings.size(), 1u);
  EXPECT_EQ(rain.warnings[0], label("a.csv") +
                                  ":4: gap in the record from 2025-03-01T00:10 to "
                                  "2025-03-01T00:25 (15min with no rows), left out of the "
                                  "simulation");
}

TEST_F(RainFiles, JoinsTipFilesAsOneStream) {
  RainConfig c = config(RainFormat::tips, {write("b.csv", "time\n2025-03-01T00:25\n"),
                                           write("a.csv", "time\n2025-03-01T00:10\n")});
  c.tips.tip_depth_m = 0.2e-3;
  const RainSeries rain = load_rain(c);
  ASSERT_EQ(rain.pulses.size(), 2u);
  EXPECT_EQ(rain.pulses[1].start, kT0 + 10 * kMinute);
  EXPECT_EQ(rain.pulses[1].end, kT0 + 25 * kMinute);
  ASSERT_EQ(rain.covered.size(), 1u);
  EXPECT_TRUE(rain.gaps.empty());
}

TEST_F(RainFiles, RejectsOverlappingTipFilesNamingBoth) {
  RainConfig c =
      config(RainFormat::tips, {write("a.csv", "time\n2025-03-01T00:10\n2025-03-01T00:30\n"),
                                write("b.csv", "time\n2025-03-01T00:30\n")});
  c.tips.tip_depth_m = 0.2e-3;
  EXPECT_EQ(error_of(c), label("b.csv") + ": rain.files: overlaps " + label("a.csv") +
                             " from 2025-03-01T00:30 to 2025-03-01T00:30 (UTC); each period "
                             "must come from one file");
}

TEST_F(RainFiles, WarnsOnceAboutDailyTotalsFromSeveralFiles) {
  RainConfig c = config(RainFormat::daily, {write("a.csv", "date,rain_mm\n2025-03-01,4\n"),
                                            write("b.csv", "date,rain_mm\n2025-03-02,6\n")});
  c.series.time_column = "date";
  const RainSeries rain = load_rain(c);
  ASSERT_EQ(rain.warnings.size(), 1u);
  EXPECT_EQ(rain.warnings[0], kDailyWarning);
  ASSERT_EQ(rain.covered.size(), 1u);
  EXPECT_EQ(rain.covered[0].end, kT0 + 2 * kDay);
  EXPECT_EQ(rain.total_depth_m, 10e-3);
}

TEST_F(RainFiles, ReadsTheOverrideFileInPlaceOfTheScenariosFiles) {
  const RainSeries rain =
      load_rain(config(RainFormat::series, {write("a.csv", kSeriesA)}), write("b.csv", kSeriesB));
  ASSERT_EQ(rain.pulses.size(), 1u);
  EXPECT_EQ(rain.pulses[0].depth_m, 1.0e-3);
}

TEST_F(RainFiles, NamesAMissingFile) {
  EXPECT_EQ(error_of(config(RainFormat::daily, {dir_ / "none.csv"})),
            label("none.csv") + ": rain.file: no such file");
}

// ---- the scenario keys of each format, end to end ----

// Only the required keys besides rain, with invented values (not a real site).
const std::string kScenarioRest = std::string("site: {name: Test shed}\n") +
                                  test_support::kMinimalSystemYaml + "battery: {capacity_Wh: 20}\n";

Scenario scenario(const std::string& rain, const std::filesystem::path& base_dir,
                  const std::vector<std::string>& overrides = {}) {
  return parse_scenario("rain:\n" + rain + kScenarioRest, "demo.yaml", base_dir, overrides);
}

std::string scenario_error_of(const std::string& rain,
                              const std::vector<std::string>& overrides = {}) {
  try {
    scenario(rain, "base", overrides);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

TEST(RainScenario, LoadsATipLogFromAScenario) {
  const Scenario s = scenario(
      "  file: tips-log.csv\n  format: tips\n  time_column: tipped\n  unit: in\n"
      "  tip_depth: 0.01\n  tip_cap: 20min\n",
      kFixtures);
  EXPECT_EQ(s.rain.tips.tip_depth_m, 0.01 * kMetresPerInch);
  EXPECT_EQ(s.rain.tips.cap_s, 1200);
  const RainSeries rain = load_rain(s.rain);
  ASSERT_EQ(rain.pulses.size(), 4u);
  EXPECT_EQ(rain.pulses[0].start, kT0 + 5 * kMinute - 20 * kMinute);
  EXPECT_EQ(rain.total_depth_m, 5 * s.rain.tips.tip_depth_m);
}

TEST(RainScenario, LoadsDailyTotalsFromAScenario) {
  const Scenario s = scenario(
      "  file: daily-totals.csv\n  format: daily\n  gaps: zero\n"
      "  disaggregate: {method: cascade, step: 10min, seed: 42, intermittency: 0.5}\n",
      kFixtures);
  EXPECT_EQ(s.rain.series.time_column, "date");
  EXPECT_EQ(s.rain.disaggregate->method, DisaggregationMethod::cascade);
  EXPECT_EQ(s.rain.disaggregate->step_s, 600);
  EXPECT_EQ(s.rain.disaggregate->seed, 42u);
  EXPECT_EQ(s.rain.disaggregate->intermittency, 0.5);
  EXPECT_EQ(s.rain.disaggregate->window.duration_s, kDay);
  const RainSeries rain = load_rain(s.rain);
  EXPECT_EQ(rain.total_depth_m, sum_depths_m(rain.pulses));
  EXPECT_DOUBLE_EQ(rain.total_depth_m, (3.5 + 12.25 + 0.4) * 1e-3);
  ASSERT_EQ(rain.gaps.size(), 1u);
  EXPECT_EQ(rain.warnings.front(), kDailyWarning);
}

TEST(RainScenario, ReadsTheWindowOfABlock) {
  const Scenario s = scenario(
      "  file: d.csv\n  format: daily\n"
      "  disaggregate: {method: block, start_hour: 14, duration_h: 2.5}\n",
      "base");
  EXPECT_EQ(s.rain.disaggregate->window.start_s, 14 * 3600);
  EXPECT_EQ(s.rain.disaggregate->window.duration_s, 9000);
}

TEST(RainScenario, SetsTheMethodFromTheCommandLine) {
  const Scenario s = scenario("  file: d.csv\n  format: daily\n  disaggregate: {method: block}\n",
                              "base", {"rain.disaggregate.method=nrcs-II"});
  EXPECT_EQ(s.rain.disaggregate->method, DisaggregationMethod::nrcs_ii);
}

TEST(RainScenario, DisaggregatesACoarseSeries) {
  const Scenario s =
      scenario("  file: station-5min.csv\n  disaggregate: {method: cascade, step: 1min, seed: 7}\n",
               kFixtures);
  ASSERT_TRUE(s.rain.disaggregate);
  const RainSeries as_read = load_rain_as_read(s.rain);
  const RainSeries rain = load_rain(s.rain);
  EXPECT_EQ(as_read.step_s, 300);
  EXPECT_EQ(rain.step_s, 60);
  EXPECT_EQ(rain.total_depth_m, as_read.total_depth_m);
  EXPECT_EQ(rain.total_depth_m, sum_depths_m(rain.pulses));
  EXPECT_EQ(rain.warnings.back(),
            "totals over 5min hide rain intensity, and whether the siphon primes depends on it: "
            "the results follow the chosen rain.disaggregate method");
}

TEST(RainScenario, KeepsTheDayWindowToDailyRecords) {
  EXPECT_EQ(scenario_error_of("  file: s.csv\n  disaggregate: {method: cascade, start_hour: 6}\n"),
            "demo.yaml:3: rain.disaggregate.start_hour: only for format: daily (an interval of a "
            "series is spread over itself)");
}

TEST(RainScenario, KeepsNrcsShapesToDailyRecords) {
  EXPECT_EQ(scenario_error_of("  file: s.csv\n  disaggregate: {method: nrcs-III}\n"),
            "demo.yaml:3: rain.disaggregate.method: is a 24-hour shape, for format: daily only; "
            "use cascade or block for a series (got nrcs-III)");
}

TEST(RainScenario, RefusesToDisaggregateATipLog) {
  EXPECT_EQ(scenario_error_of("  file: t.csv\n  format: tips\n  tip_depth: 0.2\n"
                              "  disaggregate: {method: cascade}\n"),
            "demo.yaml:5: rain.disaggregate: not used by format: tips (a tip log is spread by "
            "rain.tip_cap)");
}

TEST(RainScenario, NeedsATipDepthForTips) {
  EXPECT_EQ(scenario_error_of("  file: t.csv\n  format: tips\n"),
            "demo.yaml:1: rain.tip_depth: missing required key (needed by format: tips)");
}

TEST(RainScenario, NeedsADisaggregationMethodForDailyTotals) {
  EXPECT_EQ(scenario_error_of("  file: d.csv\n  format: daily\n"),
            "demo.yaml:1: rain.disaggregate: missing required key (needed by format: daily)");
  EXPECT_EQ(scenario_error_of("  file: d.csv\n  format: daily\n  disaggregate: {step: 5min}\n"),
            "demo.yaml:4: rain.disaggregate.method: missing required key");
}

TEST(RainScenario, SuggestsTheNearestDisaggregationKey) {
  EXPECT_EQ(scenario_error_of("  file: d.csv\n  format: daily\n"
                              "  disaggregate:\n    method: cascade\n    sead: 3\n"),
            "demo.yaml:6: rain.disaggregate.sead: unknown key; did you mean seed?");
}

TEST(RainScenario, RejectsAnUnknownMethod) {
  EXPECT_EQ(scenario_error_of("  file: d.csv\n  format: daily\n  disaggregate: {method: nrcs}\n"),
            "demo.yaml:4: rain.disaggregate.method: expected one of block, nrcs-I, nrcs-IA, "
            "nrcs-II, nrcs-III, cascade or fragments, got \"nrcs\"");
}

TEST(RainScenario, KeepsNrcsToItsTwentyFourHours) {
  EXPECT_EQ(scenario_error_of("  file: d.csv\n  format: daily\n"
                              "  disaggregate: {method: nrcs-II, duration_h: 12}\n"),
            "demo.yaml:4: rain.disaggregate.duration_h: must be 24 for method: nrcs-II, a "
            "24-hour shape (got 12)");
  EXPECT_EQ(scenario_error_of("  file: d.csv\n  format: daily\n"
                              "  disaggregate: {method: nrcs-IA, start_hour: 2}\n"),
            "demo.yaml:4: rain.disaggregate.start_hour: must be 0 for method: nrcs-IA, a "
            "24-hour shape (got 2)");
}

TEST(RainScenario, KeepsEachDaysRainInItsDay) {
  EXPECT_EQ(scenario_error_of("  file: d.csv\n  format: daily\n"
                              "  disaggregate: {method: block, start_hour: 18, duration_h: 12}\n"),
            "demo.yaml:4: rain.disaggregate.duration_h: must be <= 24 - "
            "rain.disaggregate.start_hour = 6, so that each day's rain stays in its day (got 12)");
}

TEST(RainScenario, NeedsAStepThatDividesTheWindow) {
  EXPECT_EQ(scenario_error_of("  file: d.csv\n  format: daily\n"
                              "  disaggregate: {method: cascade, step: 7min}\n"),
            "demo.yaml:4: rain.disaggregate.step: must divide rain.disaggregate.duration_h = 24 "
            "into whole steps (got 7min)");
}

TEST(RainScenario, RejectsASeedThatIsNotAWholeNumber) {
  EXPECT_EQ(scenario_error_of("  file: d.csv\n  format: daily\n"
                              "  disaggregate: {method: cascade, seed: -1}\n"),
            "demo.yaml:4: rain.disaggregate.seed: expected a whole number from 0 to "
            "18446744073709551615, got \"-1\"");
}

TEST(RainScenario, RejectsIntensityForDailyTotals) {
  EXPECT_EQ(scenario_error_of("  file: d.csv\n  format: daily\n  value: intensity\n  unit: mm/h\n"
                              "  disaggregate: {method: block}\n"),
            "demo.yaml:4: rain.value: must be depth for format: daily (got intensity)");
}

TEST(RainScenario, RejectsATipCapOfPartSeconds) {
  EXPECT_EQ(scenario_error_of("  file: t.csv\n  format: tips\n  tip_depth: 0.2\n  tip_cap: 1.5s\n"),
            "demo.yaml:5: rain.tip_cap: must be a whole number of seconds (time is kept in whole "
            "seconds) (got 1.5s)");
}

// A real record as published: the daily series of a rainy maritime city, 2012-2015, from the
// public npm package vega-datasets 3.2.1 (fetched by tools/setup). Each year's total as read
// must equal the sum of the published column.
// source: yearly sums of the `precipitation` column of data/seattle-weather.csv, summed with awk
// outside gutterwatt (also stated in issue #11): 2012 1226.0, 2013 828.0, 2014 1232.8,
// 2015 1139.2 mm.
TEST(RainScenario, ReadsTheKeysOfAFilesLayout) {
  const Scenario s = scenario(
      "  file: r.csv\n  delimiter: tab\n  decimal: \",\"\n  skip_lines: 3\n"
      "  time_format: \"%m/%d/%Y %I:%M %p\"\n  where: {station: North 2, sensor: 7}\n",
      "base");
  EXPECT_EQ(s.rain.series.delimiter, '\t');
  EXPECT_EQ(s.rain.series.decimal, ',');
  EXPECT_EQ(s.rain.series.skip_lines, 3);
  EXPECT_EQ(s.rain.series.time_format, "%m/%d/%Y %I:%M %p");
  using Where = std::vector<std::pair<std::string, std::string>>;
  EXPECT_EQ(s.rain.series.where, (Where{{"station", "North 2"}, {"sensor", "7"}}));
  EXPECT_EQ(scenario("  file: r.csv\n  delimiter: \";\"\n", "base").rain.series.delimiter, ';');
}

TEST(RainScenario, RejectsADecimalCommaBetweenCommaSeparatedFields) {
  EXPECT_EQ(scenario_error_of("  file: r.csv\n  decimal: \",\"\n"),
            "demo.yaml:3: rain.decimal: a decimal comma needs fields separated by another "
            "character: set rain.delimiter to ; or tab");
}

TEST(RainScenario, RejectsBadLayoutKeys) {
  EXPECT_EQ(scenario_error_of("  file: r.csv\n  delimiter: \"|\"\n"),
            "demo.yaml:3: rain.delimiter: expected \",\", \";\" or tab, got \"|\"");
  EXPECT_EQ(scenario_error_of("  file: r.csv\n  skip_lines: 1.5\n"),
            "demo.yaml:3: rain.skip_lines: must be a whole number of lines (got 1.5)");
  EXPECT_EQ(scenario_error_of("  file: r.csv\n  where: Seattle\n"),
            "demo.yaml:3: rain.where: expected a section of columns and values such as "
            "{location: Seattle}, got \"Seattle\"");
  EXPECT_EQ(scenario_error_of("  file: r.csv\n  where:\n    location: [a, b]\n"),
            "demo.yaml:4: rain.where.location: expected a text, got a list");
  EXPECT_EQ(scenario_error_of("  file: r.csv\n  time_format: ISO\n"),
            "demo.yaml:3: rain.time_format: expected a strftime-style format such as %m/%d/%Y "
            "%I:%M %p (got ISO)");
}

// The yearly totals of seattle-weather.csv (vega-datasets 3.2.1) as issue 11 gives them, each
// year's pulses summed by when they start.
void expect_seattle_years(const RainSeries& rain) {
  // 2012-01-01T00:00Z ... 2016-01-01T00:00Z, worked by hand from POSIX.1-2017 4.16.
  const Instant years[] = {1325376000, 1356998400, 1388534400, 1420070400, 1451606400};
  const double expected_mm[] = {1226.0, 828.0, 1232.8, 1139.2};
  for (int y = 0; y < 4; ++y) {
    double sum_mm = 0.0;
    for (const RainPulse& p : rain.pulses)
      if (p.start >= years[y] && p.start < years[y + 1]) sum_mm += p.depth_m * 1e3;
    EXPECT_NEAR(sum_mm, expected_mm[y], 1e-6) << "year " << 2012 + y;
  }
}

TEST(RainScenario, KeepsEachYearOfAPublicDailyRecord) {
  const std::filesystem::path file =
      test_support::public_data_file("vega-datasets-3.2.1/data/seattle-weather.csv");
  const Scenario s = scenario("  file: " + file.string() +
                                  "\n  format: daily\n  value_column: precipitation\n"
                                  "  unit: mm\n  disaggregate: {method: block}\n",
                              kFixtures);
  const RainSeries rain = load_rain(s.rain);
  expect_seattle_years(rain);
  EXPECT_TRUE(rain.gaps.empty());
}

// The same public record disaggregated by a cascade fitted to an IDF curve (invented for the
// test, not a published curve of that city) keeps each year's total.
TEST(RainScenario, KeepsEachYearOfAPublicDailyRecordDisaggregatedByAnIdfCurve) {
  const std::filesystem::path file =
      test_support::public_data_file("vega-datasets-3.2.1/data/seattle-weather.csv");
  const Scenario s = scenario("  file: " + file.string() +
                                  "\n  format: daily\n  value_column: precipitation\n"
                                  "  unit: mm\n  disaggregate:\n    method: cascade\n"
                                  "    idf: {a: 200, b: 8, c: 0.7}\n",
                              kFixtures);
  ASSERT_TRUE(s.rain.disaggregate && s.rain.disaggregate->idf);
  const RainSeries rain = load_rain(s.rain);
  EXPECT_EQ(rain.step_s, 300);
  expect_seattle_years(rain);
  EXPECT_EQ(std::find(rain.warnings.begin(), rain.warnings.end(), kUncalibratedWarning),
            rain.warnings.end());
}

TEST(RainScenario, RefusesAnIdfCurveWithANonPositiveParameter) {
  EXPECT_EQ(scenario_error_of("  file: d.csv\n  format: daily\n"
                              "  disaggregate: {method: cascade, idf: {a: 0, b: 10, c: 0.75}}\n"),
            "demo.yaml:4: rain.disaggregate.idf.a: must be > 0 (got 0)");
  EXPECT_EQ(
      scenario_error_of("  file: d.csv\n  format: daily\n"
                        "  disaggregate: {method: cascade, idf: {a: 1500, b: -1, c: 0.75}}\n"),
      "demo.yaml:4: rain.disaggregate.idf.b: must be > 0 (got -1)");
  EXPECT_EQ(
      scenario_error_of("  file: d.csv\n  format: daily\n"
                        "  disaggregate: {method: nrcs-II, idf: {a: 1500, b: 10, c: 0.75}}\n"),
      "demo.yaml:4: rain.disaggregate.idf: is for method: cascade only (got method: nrcs-II)");
}

// ---- calibration of the cascade by a fine record ----

// An invented fine record: `days` days of 5-minute depths, wet in alternating half-hours from
// 06:00 to 12:00 (12 wet steps an hour-pair), dry otherwise; `step` minutes apart.
std::string fine_record(int days, int step_min = 5, double mm = 0.4) {
  std::string text = "time,rain_mm\n";
  for (int d = 0; d < days; ++d) {
    for (int m = step_min; m <= 24 * 60; m += step_min) {
      const int minute = m - step_min;
      const bool wet = minute >= 360 && minute < 720 && (minute / 30) % 2 == 0;
      char row[64];
      std::snprintf(row, sizeof row, "2025-04-%02dT%02d:%02d,%s\n", 1 + d + m / (24 * 60),
                    m / 60 % 24, m % 60, wet ? std::to_string(mm).c_str() : "0");
      text += row;
    }
  }
  return text;
}

class RainCalibration : public RainFiles {
 protected:
  Scenario scenario_with(const std::string& calibrate_with, const std::string& method = "cascade") {
    write("daily.csv", "date,rain_mm\n2025-03-01,12\n2025-03-02,3\n");
    return parse_scenario(
        "rain:\n  file: daily.csv\n  format: daily\n"
        "  disaggregate:\n    method: " +
            method + "\n    calibrate_with: " + calibrate_with + "\n" + kScenarioRest,
        "demo.yaml", dir_);
  }

  std::string error_with(const std::string& calibrate_with, const std::string& method = "cascade") {
    try {
      load_rain(scenario_with(calibrate_with, method).rain);
    } catch (const InputError& e) {
      return e.what();
    }
    return "no error";
  }
};

TEST_F(RainCalibration, EstimatesTheCascadeFromAFineRecord) {
  write("gauge.csv", fine_record(3));
  const Scenario s = scenario_with("{file: gauge.csv}");
  ASSERT_TRUE(s.rain.calibrate_with);
  EXPECT_EQ(s.rain.calibrate_with->file, dir_ / "gauge.csv");
  const RainSeries as_read = load_rain_as_read(s.rain);
  const std::optional<Disaggregation> how = calibrated_disaggregation(s.rain, as_read);
  ASSERT_TRUE(how);
  ASSERT_FALSE(how->levels.empty());
  // Boxes of 10 min: a wet step is always followed by a wet one inside each wet half-hour
  // (06:00-06:30 holds 6 steps), so no 10-minute box sends its rain to one half.
  EXPECT_EQ(how->levels.front().box_s, 600.0);
  EXPECT_EQ(how->levels.front().p10, 0.0);
  EXPECT_EQ(how->levels.front().p01, 0.0);
  const RainSeries rain = load_rain(s.rain);
  EXPECT_EQ(sum_depths_m(rain.pulses), as_read.total_depth_m);
  EXPECT_EQ(std::find(rain.warnings.begin(), rain.warnings.end(), kUncalibratedWarning),
            rain.warnings.end());
}

TEST_F(RainCalibration, RefusesARecordCoarserThanTheTargetStep) {
  write("hourly.csv", fine_record(3, 60));
  EXPECT_EQ(error_with("{file: hourly.csv}"),
            label("hourly.csv") +
                ": rain.disaggregate.calibrate_with: the record's step (1h) is coarser than "
                "rain.disaggregate.step (5min): a calibration record must have the target step or "
                "a finer one");
}

TEST_F(RainCalibration, RefusesADryRecord) {
  write("dry.csv", fine_record(1, 5, 0.0));
  EXPECT_EQ(error_with("{file: dry.csv}"),
            label("dry.csv") +
                ": rain.disaggregate.calibrate_with: no interval with rain: a dry record cannot "
                "calibrate the cascade");
}

TEST_F(RainCalibration, RefusesARecordWithTooFewWetIntervals) {
  write("short.csv", "time,rain_mm\n2025-04-01T00:05,1\n2025-04-01T00:10,0\n");
  EXPECT_EQ(error_with("{file: short.csv}"),
            label("short.csv") +
                ": rain.disaggregate.calibrate_with: too few wet intervals: fewer than 20 wet "
                "boxes of 10min to estimate the cascade from; give a longer record");
}

TEST_F(RainCalibration, RefusesAnEmptyRecordNamingIt) {
  write("empty.csv", "");
  EXPECT_EQ(error_with("{file: empty.csv}"),
            label("empty.csv") +
                ":1: empty file (expected a header row naming the columns \"time\" and "
                "\"rain_mm\")");
}

TEST_F(RainCalibration, NamesAMissingCalibrationFile) {
  EXPECT_EQ(error_with("{file: none.csv}"),
            label("none.csv") + ": rain.disaggregate.calibrate_with.file: no such file");
  EXPECT_EQ(error_with("{time_column: t}"),
            "demo.yaml:6: rain.disaggregate.calibrate_with.file: missing required key");
}

// ---- the method of fragments ----

TEST_F(RainCalibration, SpreadsEachDayByTheFineRecordsDays) {
  // Every day of fine_record(3) rains 0.4 mm in each 5-minute step of the half-hours from 06:00,
  // 07:00, ..., 11:00 (36 steps): a library of one pattern, so each day of the daily record gets
  // it, its total shared equally: 12 mm / 36 on 2025-03-01 and 3 mm / 36 on 03-02 (by hand).
  write("gauge.csv", fine_record(3));
  const Scenario s = scenario_with("{file: gauge.csv}", "fragments");
  const RainSeries as_read = load_rain_as_read(s.rain);
  const std::optional<Disaggregation> how = calibrated_disaggregation(s.rain, as_read);
  ASSERT_TRUE(how);
  ASSERT_EQ(how->fragments.size(), 1u);
  EXPECT_EQ(how->fragments[0].intervals.size(), 3u);
  const RainSeries rain = load_rain(s.rain);
  ASSERT_EQ(rain.pulses.size(), 72u);
  for (std::size_t k = 0; k < rain.pulses.size(); ++k) {
    const RainPulse& p = rain.pulses[k];
    const Instant minute = (p.start - as_read.pulses[k / 36].start) / 60;
    EXPECT_TRUE(minute >= 360 && minute < 720 && (minute / 30) % 2 == 0) << minute;
    EXPECT_NEAR(p.depth_m, (k < 36 ? 12e-3 : 3e-3) / 36, 1e-17);
  }
  EXPECT_EQ(sum_depths_m(rain.pulses), as_read.total_depth_m);
}

TEST_F(RainCalibration, RefusesFragmentsWithoutACalibrationRecord) {
  EXPECT_EQ(scenario_error_of("  file: daily.csv\n  format: daily\n"
                              "  disaggregate: {method: fragments}\n"),
            "demo.yaml:4: rain.disaggregate.method: fragments needs "
            "rain.disaggregate.calibrate_with: a fine record whose intervals lend their patterns");
  EXPECT_EQ(scenario_error_of("  file: daily.csv\n  format: daily\n"
                              "  disaggregate: {method: fragments, idf: {a: 1, b: 1, c: 0.5}}\n"),
            "demo.yaml:4: rain.disaggregate.idf: is for method: cascade only (got method: "
            "fragments)");
}

TEST_F(RainCalibration, RefusesFragmentsFromACoarseDryOrMisfittingRecord) {
  write("hourly.csv", fine_record(3, 60));
  EXPECT_EQ(error_with("{file: hourly.csv}", "fragments"),
            label("hourly.csv") +
                ": rain.disaggregate.calibrate_with: the record's step (1h) is coarser than "
                "rain.disaggregate.step (5min): a calibration record must have the target step or "
                "a finer one");
  write("three.csv", fine_record(3, 3));
  EXPECT_EQ(error_with("{file: three.csv}", "fragments"),
            label("three.csv") +
                ": rain.disaggregate.calibrate_with: the record's step (3min) does not divide "
                "rain.disaggregate.step (5min): method: fragments adds the record up to the "
                "target step");
  write("dry.csv", fine_record(1, 5, 0.0));
  EXPECT_EQ(error_with("{file: dry.csv}", "fragments"),
            label("dry.csv") +
                ": rain.disaggregate.calibrate_with: no interval with rain: a dry record cannot "
                "calibrate the fragments");
  // Rain, but no whole day of it: 06:00 to 18:00 only.
  std::string half = "time,rain_mm\n";
  for (int m = 365; m <= 1080; m += 5) {
    half += "2025-04-01T" + std::to_string(m / 600) + std::to_string(m / 60 % 10) + ":" +
            std::to_string(m % 60 / 10) + std::to_string(m % 10) + (m == 365 ? ",1\n" : ",0\n");
  }
  write("half.csv", half);
  EXPECT_EQ(error_with("{file: half.csv}", "fragments"),
            label("half.csv") +
                ": rain.disaggregate.calibrate_with: no whole interval of 1d with rain (the "
                "record's intervals of that length, as the target record's are cut, are all dry "
                "or not covered in full); give a longer record");
}

}  // namespace
}  // namespace gutterwatt::rain_files_test
