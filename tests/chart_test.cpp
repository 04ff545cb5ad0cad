// Tests of the report's chart model: scales, ticks, thinning, panels and colour ramps. Expected
// values are worked out by hand in the comments.

#include "chart.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <string>
#include <vector>

#include "gutterwatt/calendar.hpp"

namespace gutterwatt::detail {
namespace {

TEST(Linear, MapsTheDomainOntoTheRange) {
  // Value 0 at the bottom (y 200), 50 at the top (y 100): 25 halfway, 10 a fifth of the way up.
  const Linear y{0.0, 50.0, 200.0, 100.0};
  EXPECT_DOUBLE_EQ(y(0.0), 200.0);
  EXPECT_DOUBLE_EQ(y(50.0), 100.0);
  EXPECT_DOUBLE_EQ(y(25.0), 150.0);
  EXPECT_DOUBLE_EQ(y(10.0), 180.0);
}

TEST(Linear, SendsEverythingToTheRangeStartWhenTheDomainIsAPoint) {
  const Linear y{3.0, 3.0, 10.0, 20.0};
  EXPECT_DOUBLE_EQ(y(3.0), 10.0);
  EXPECT_DOUBLE_EQ(y(99.0), 10.0);
}

TEST(NiceTicks, StepsByOneTwoTwoAndAHalfOrFiveTimesAPowerOfTen) {
  // 0 to 62 in about 4 ticks: raw step 15.5, the next nice step 20; ticks 0..80, top 80.
  const Ticks a = nice_ticks(0.0, 62.0, 4);
  EXPECT_EQ(a.values, (std::vector<double>{0.0, 20.0, 40.0, 60.0, 80.0}));
  EXPECT_EQ(a.decimals, 0);
  EXPECT_DOUBLE_EQ(a.top, 80.0);
  // 0 to 0.9 in about 4: raw 0.225, nice 0.25 (two decimals); ticks 0, 0.25, ..., 1.
  const Ticks b = nice_ticks(0.0, 0.9, 4);
  ASSERT_EQ(b.values.size(), 5u);
  EXPECT_NEAR(b.values[1], 0.25, 1e-12);
  EXPECT_EQ(b.decimals, 2);
  EXPECT_NEAR(b.top, 1.0, 1e-12);
}

TEST(NiceTicks, StartsAtTheFirstStepAtOrAboveLo) {
  // 12 to 47 in about 4: raw 8.75, nice 10; first tick 20, top 50.
  const Ticks t = nice_ticks(12.0, 47.0, 4);
  EXPECT_EQ(t.values, (std::vector<double>{20.0, 30.0, 40.0, 50.0}));
}

TEST(NiceTicks, TakesAnEmptyRangeAsOneUnit) {
  const Ticks t = nice_ticks(0.0, 0.0, 4);
  EXPECT_EQ(t.values, (std::vector<double>{0.0, 0.25, 0.5, 0.75, 1.0}));
}

TEST(AxisTop, LeavesFourPercentHeadroomAndAUnitAxisForNothing) {
  EXPECT_DOUBLE_EQ(axis_top(50.0), 52.0);
  EXPECT_DOUBLE_EQ(axis_top(0.0), 1.0);
}

TEST(TimeTicks, PutsHourTicksOnTheHourAndNamesTheDayAtMidnight) {
  // 2025-03-01T22:10 to 2025-03-02T03:50, at most 10 ticks: hourly, 23:00 to 03:00.
  const std::int64_t day = parse_iso8601("2025-03-02T00:00", 0)->instant;
  const std::vector<TimeTick> ticks = time_ticks(day - 110 * 60, day + 230 * 60, 10);
  ASSERT_EQ(ticks.size(), 5u);
  EXPECT_EQ(ticks[0].label, "23:00");
  EXPECT_EQ(ticks[1].t, day);
  EXPECT_EQ(ticks[1].label, "2 Mar");
  EXPECT_EQ(ticks[4].label, "03:00");
}

TEST(TimeTicks, NamesTheYearOnJanuaryAndOnTheFirstMonthTick) {
  // 2024-11-15 to 2025-03-20 at most 10 ticks: monthly, Dec 2024, Jan 2025, Feb, Mar.
  const auto at = [](const char* text) { return parse_iso8601(text, 0)->instant; };
  const std::vector<TimeTick> ticks =
      time_ticks(at("2024-11-15T00:00"), at("2025-03-20T00:00"), 10);
  std::vector<std::string> labels;
  for (const auto& t : ticks) labels.push_back(t.label);
  EXPECT_EQ(labels, (std::vector<std::string>{"Dec 2024", "Jan 2025", "Feb", "Mar"}));
}

TEST(Panel, DataMaxSkipsMissingValuesAndCountsReferenceLines) {
  Panel p;
  p.bars.push_back({{0.0}, {1.0}, {3.0}, kBlue});
  p.lines.push_back({{0.0, 1.0}, {std::nan(""), 5.0}, {false, false}, kBlue, 1.4, "", false});
  EXPECT_DOUBLE_EQ(p.data_max(), 5.0);
  p.refs.push_back({62.0, kVermillion, "", "rim"});
  EXPECT_DOUBLE_EQ(p.data_max(), 62.0);
}

TEST(TimeFigure, DrawsOneClipPerPanelAndTheReferenceLabels) {
  TimeFigure fig(0.0, 3600.0);
  Panel& a = fig.add("Rain", 100.0);
  a.bars.push_back({{0.0}, {600.0}, {2.0}, kSkyBlue});
  Panel& b = fig.add("Level", 100.0);
  b.refs.push_back({50.0, kGreen, "7 4", "trigger 50 mm"});
  const std::string svg = fig.svg("chart-x", "A figure");
  EXPECT_NE(svg.find("<clipPath id=\"chart-x-c0\">"), std::string::npos);
  EXPECT_NE(svg.find("<clipPath id=\"chart-x-c1\">"), std::string::npos);
  EXPECT_NE(svg.find(">trigger 50 mm</text>"), std::string::npos);
  EXPECT_NE(svg.find("<title id=\"chart-x-t\">A figure</title>"), std::string::npos);
}

TEST(Ramp, RunsFromTheFirstStopToTheLastAndInterpolatesBetween) {
  EXPECT_EQ(css_colour(ramp_at(kOverflowRamp, 0.0)), "#f7fbff");
  EXPECT_EQ(css_colour(ramp_at(kOverflowRamp, 1.0)), "#08306b");
  EXPECT_EQ(css_colour(ramp_at(kOverflowRamp, 2.0)), "#08306b");
  // Halfway between stops 0 (247, 251, 255) and 1 (222, 235, 247) is u = 1/16:
  // (234.5, 243, 251), rounded half away from zero -> #ebf3fb.
  EXPECT_EQ(css_colour(ramp_at(kOverflowRamp, 1.0 / 16.0)), "#ebf3fb");
  EXPECT_TRUE(is_dark(ramp_at(kEnergyRamp, 0.0)));
  EXPECT_FALSE(is_dark(ramp_at(kEnergyRamp, 1.0)));
}

TEST(ThinMinMax, KeepsTheLargestAndSmallestSample) {
  std::vector<double> values(10000);
  for (std::size_t i = 0; i < values.size(); ++i) values[i] = std::sin(0.01 * i);
  values[4321] = 99.0;
  values[777] = -50.0;
  const std::vector<std::size_t> kept = thin_min_max(values, 100);
  EXPECT_LE(kept.size(), 202u);
  EXPECT_TRUE(std::is_sorted(kept.begin(), kept.end()));
  EXPECT_EQ(std::adjacent_find(kept.begin(), kept.end()), kept.end()) << "no repeats";
  EXPECT_NE(std::find(kept.begin(), kept.end(), 4321u), kept.end());
  EXPECT_NE(std::find(kept.begin(), kept.end(), 777u), kept.end());
  EXPECT_EQ(kept.front(), 0u);
  EXPECT_EQ(kept.back(), 9999u);
}

TEST(ThinMinMax, KeepsEveryBucketExtreme) {
  // A sawtooth of period 10 over 100 buckets of 10: each bucket's 0 and 9 survive.
  std::vector<double> values(1000);
  for (std::size_t i = 0; i < values.size(); ++i) values[i] = static_cast<double>(i % 10);
  const std::vector<std::size_t> kept = thin_min_max(values, 100);
  ASSERT_EQ(kept.size(), 200u);
  for (std::size_t b = 0; b < 100; ++b) {
    EXPECT_EQ(kept[2 * b], 10 * b);
    EXPECT_EQ(kept[2 * b + 1], 10 * b + 9);
  }
}

TEST(ThinMinMax, PassesShortSeriesThrough) {
  const std::vector<double> values{3.0, 1.0, 4.0, 1.0, 5.0};
  EXPECT_EQ(thin_min_max(values, 10), (std::vector<std::size_t>{0, 1, 2, 3, 4}));
  EXPECT_EQ(thin_min_max(values, 0), (std::vector<std::size_t>{0, 1, 2, 3, 4}));
}

TEST(ThinMinMax, NeverKeepsMissingSamples) {
  std::vector<double> values(400, 1.0);
  values[0] = std::nan("");
  values[5] = std::nan("");
  values[399] = std::nan("");
  values[200] = 8.0;
  const std::vector<std::size_t> kept = thin_min_max(values, 10);
  for (const std::size_t i : kept) EXPECT_FALSE(std::isnan(values[i])) << i;
  EXPECT_EQ(kept.front(), 1u);
  EXPECT_EQ(kept.back(), 398u);
  EXPECT_NE(std::find(kept.begin(), kept.end(), 200u), kept.end());
}

}  // namespace
}  // namespace gutterwatt::detail
