#include "gutterwatt/fragments.hpp"

#include <gtest/gtest.h>

#include <optional>
#include <vector>

#include "gutterwatt/disaggregation.hpp"

namespace gutterwatt::fragments_test {
namespace {

// Seconds since the epoch of 2025-03-01T00:00Z.
// source: POSIX.1-2017 Base Definitions 4.16 (Seconds Since the Epoch), formula worked by hand.
constexpr Instant kT0 = 1740787200;
constexpr Instant kHour = 3600;
constexpr Instant kDay = 24 * kHour;

// An invented fine record at 1 minute covering kT0 to kT0 + 3 h: in the first hour 0.2 mm a
// minute over minutes 10-14 and 0.6 mm over minutes 15-19 (1 mm, then 3 mm); in the second hour
// 0.5 mm in minute 40; the third hour dry.
RainSeries one_pattern() {
  RainSeries fine;
  fine.step_s = 60;
  fine.covered = {{kT0, kT0 + 3 * kHour}};
  for (Instant m = 10; m < 20; ++m) {
    fine.pulses.push_back({kT0 + 60 * m, kT0 + 60 * (m + 1), m < 15 ? 0.2e-3 : 0.6e-3});
  }
  fine.pulses.push_back({kT0 + kHour + 2400, kT0 + kHour + 2460, 0.5e-3});
  fine.total_depth_m = sum_depths_m(fine.pulses);
  return fine;
}

TEST(Fragments, KnnWeightsAreOneOverJNormalised) {
  // Lall & Sharma (1996): weight of the j-th nearest (1/j) / sum 1/i. Hand values: k = 3,
  // sum 1 + 1/2 + 1/3 = 11/6, so 6/11, 3/11, 2/11.
  const std::vector<double> w = knn_weights(3);
  ASSERT_EQ(w.size(), 3u);
  EXPECT_DOUBLE_EQ(w[0], 6.0 / 11.0);
  EXPECT_DOUBLE_EQ(w[1], 3.0 / 11.0);
  EXPECT_DOUBLE_EQ(w[2], 2.0 / 11.0);
  EXPECT_EQ(knn_weights(1), std::vector<double>{1.0});
}

TEST(Fragments, LibraryKeepsEachWetIntervalsSharesByStep) {
  const FragmentLibrary library = build_fragment_library(one_pattern(), kHour, 0, 300);
  ASSERT_EQ(library.intervals.size(), 2u);  // the dry third hour is left out
  const Fragment& first = library.intervals[0];
  // Hand: 1 mm in the step 10-15 min (index 2) and 3 mm in 15-20 min (index 3) of 4 mm.
  EXPECT_DOUBLE_EQ(first.depth_m, 4e-3);
  std::vector<double> expected(13, 1.0);
  expected[0] = expected[1] = expected[2] = 0.0;
  expected[3] = 0.25;
  EXPECT_EQ(first.cumulative, expected);
  EXPECT_FALSE(first.wet_before);
  EXPECT_TRUE(first.wet_after);
  // 2025-03-01 is 20148 days after the epoch: 20148 - 55 * 365.2425 = 59.66 days into the year.
  EXPECT_NEAR(first.season_day, 59.66, 0.01);
  const Fragment& second = library.intervals[1];
  EXPECT_TRUE(second.wet_before);
  EXPECT_FALSE(second.wet_after);  // the third hour is dry
  EXPECT_EQ(second.cumulative[8], 0.0);
  EXPECT_EQ(second.cumulative[9], 1.0);  // all of it in 40-45 min
}

TEST(Fragments, ALibraryOfOnePatternReproducesIt) {
  Disaggregation how;
  how.method = DisaggregationMethod::fragments;
  how.step_s = 300;
  RainSeries fine = one_pattern();
  fine.pulses.resize(10);  // the first hour's pattern only
  how.fragments.push_back(build_fragment_library(fine, kHour, 0, 300));
  for (std::uint64_t seed = 1; seed <= 5; ++seed) {
    how.seed = seed;
    const std::vector<double> parts = disaggregate_interval(8e-3, kHour, kT0 + 7 * kHour, how);
    ASSERT_EQ(parts.size(), 12u);
    // Hand: a quarter of 8 mm in 10-15 min, the rest in 15-20 min, nothing elsewhere.
    for (std::size_t j = 0; j < parts.size(); ++j) {
      // Within a unit in the last place of 8 mm (the parts are whole multiples of it).
      if (j == 2) {
        EXPECT_NEAR(parts[j], 2e-3, 2e-18);
      } else if (j == 3) {
        EXPECT_NEAR(parts[j], 6e-3, 2e-18);
      } else {
        EXPECT_EQ(parts[j], 0.0) << j;
      }
    }
    EXPECT_EQ(parts[2] + parts[3], 8e-3);  // exactly
  }
}

// A library by hand of intervals of `length_s`: 16 of 1 to 16 mm with both neighbours dry on day
// 100 of the year; 10 of 5.1 mm after a wet interval, on day 100; 5 of 5.1 mm with dry neighbours
// on day 300.
FragmentLibrary hand_library(Instant length_s = kHour) {
  FragmentLibrary library;
  library.length_s = length_s;
  const auto add = [&](double depth_m, bool before, double day) {
    library.intervals.push_back({depth_m, before, false, day, {0.0, 1.0}, length_s});
  };
  for (int mm = 1; mm <= 16; ++mm) add(mm * 1e-3, false, 100.0);
  for (int i = 0; i < 10; ++i) add(5.1e-3, true, 100.0);
  for (int i = 0; i < 5; ++i) add(5.1e-3, false, 300.0);
  return library;
}

TEST(Fragments, DrawsAmongTheKNearestOfTheSameStatesAndSeason) {
  // The depth drawn for an interval of 5.1 mm on day 100 with dry neighbours.
  const auto drawn_mm = [](const FragmentLibrary& library, double u) {
    return choose_fragment(library, 5.1e-3, 100.0, false, false, u).depth_m * 1e3;
  };
  // Days: 16 candidates (same states, within 15 days; 11 of them as deep, enough), k =
  // round(sqrt(16)) = 4; nearest to 5.1 mm: 5, 6, 4, 7 mm. Weights 1/j over 25/12: 12/25, 6/25,
  // 4/25, 3/25; cumulative 0.48, 0.72, 0.88.
  const FragmentLibrary days = hand_library(kDay);
  EXPECT_DOUBLE_EQ(drawn_mm(days, 0.47), 5.0);
  EXPECT_DOUBLE_EQ(drawn_mm(days, 0.49), 6.0);
  EXPECT_DOUBLE_EQ(drawn_mm(days, 0.75), 4.0);
  EXPECT_DOUBLE_EQ(drawn_mm(days, 0.95), 7.0);
  // Hours: the same 16, but the draw is among those within kDepthFactor = 1.25 of 5.1 mm either
  // way only (4.08 to 6.375 mm): 5 and 6 mm, 2 (enough), k = round(sqrt(2)) = 1: 5 mm whatever u,
  // where the days draw 6, 4 or 7 mm too.
  const FragmentLibrary hours = hand_library(kHour);
  for (const double u : {0.47, 0.49, 0.75, 0.95}) EXPECT_DOUBLE_EQ(drawn_mm(hours, u), 5.0);
}

TEST(Fragments, DepthsMatchWithinTheFactorEitherWay) {
  // kDepthFactor = 1.25: 20 matches 16 to 25, the ends included (hand values, exact in binary;
  // any one unit).
  EXPECT_TRUE(depth_matches(25.0, 20.0));
  EXPECT_TRUE(depth_matches(16.0, 20.0));
  EXPECT_FALSE(depth_matches(25.5, 20.0));
  EXPECT_FALSE(depth_matches(15.9, 20.0));
  EXPECT_TRUE(depth_matches(15.9, 20.0, 2.0));
}

TEST(Fragments, AfterAWetStepPrefersAFragmentThatGoesOnAtItsDepth) {
  // A library by hand: 9 days of 1 to 9 mm in two half-day steps, dry neighbours, day 100; the
  // first step's share 0.1, 0.5 and 0.9 for 5, 4 and 6 mm, 0.5 for the others. (Days: hours
  // would draw among those within kDepthFactor only;
  // AnHourOutsideTheFactorOfItsCalibrationHourGoesOnItsOwn has the edge rule with that.)
  FragmentLibrary library;
  library.length_s = kDay;
  for (int mm = 1; mm <= 9; ++mm) {
    const double first = mm == 5 ? 0.1 : mm == 6 ? 0.9 : 0.5;
    library.intervals.push_back({mm * 1e-3, false, false, 100.0, {0.0, first, 1.0}, kDay});
  }
  // 9 candidates (5 as deep, enough), k = 3; nearest to 5 mm: 5, 4, 6 mm (4 before 6 on the tie:
  // the earlier). Their first steps scaled to 5 mm: 0.5, 2.5 and 4.5 mm.
  const auto depth_mm = [&](double u, double edge_mm) {
    return choose_fragment(library, 5e-3, 100.0, false, false, u, edge_mm * 1e-3).depth_m * 1e3;
  };
  // The last step before held 2 mm: within a factor 2 (1 to 4 mm) only 4 mm's 2.5 mm.
  for (const double u : {0.1, 0.5, 0.99}) EXPECT_DOUBLE_EQ(depth_mm(u, 2.0), 4.0);
  // 3 mm: 1.5 to 6 mm keeps 4 and 6 mm, drawn 2/3 and 1/3 (knn_weights(2)).
  EXPECT_DOUBLE_EQ(depth_mm(0.6, 3.0), 4.0);
  EXPECT_DOUBLE_EQ(depth_mm(0.7, 3.0), 6.0);
  // 20 mm: none within 10 to 40 mm, so all three, 6/11, 3/11, 2/11 (cumulative 0.545, 0.818);
  // a dry step before (0) is the same.
  for (const double edge_mm : {20.0, 0.0}) {
    EXPECT_DOUBLE_EQ(depth_mm(0.5, edge_mm), 5.0);
    EXPECT_DOUBLE_EQ(depth_mm(0.6, edge_mm), 4.0);
    EXPECT_DOUBLE_EQ(depth_mm(0.9, edge_mm), 6.0);
  }
}

TEST(Fragments, WidensTheSeasonThenLetsTheNeighboursGo) {
  const FragmentLibrary library = hand_library();
  // Hours, day 300, dry neighbours: 5 within the window, too few (10); the whole year gives 21,
  // 7 of them within a factor 1.25 of 5.1 mm (5 and 6 mm and the five on day 300), the draw
  // among those: k = round(sqrt(7)) = 3, the five of 5.1 mm on day 300 are nearest (distance 0).
  for (const double u : {0.1, 0.5, 0.99}) {
    EXPECT_EQ(choose_fragment(library, 5.1e-3, 300.0, false, false, u).season_day, 300.0);
  }
  // Wet on both sides: no interval in the library is; any state within 15 days of day 100
  // gives 26, 12 of them within the factor (5 and 6 mm and the ten of 5.1 mm); k =
  // round(sqrt(12)) = 3; the nearest are the ten of 5.1 mm after a wet one (the earliest on a
  // tie).
  EXPECT_TRUE(choose_fragment(library, 5.1e-3, 100.0, true, true, 0.5).wet_before);
}

// A library by hand of intervals of `length_s`, dry neighbours: 12 of 1 to 12 mm on day 100 of
// the year and 3 of 16 mm on day `deep_day`.
FragmentLibrary deep_library(Instant length_s, double deep_day) {
  FragmentLibrary library;
  library.length_s = length_s;
  for (int mm = 1; mm <= 12; ++mm) {
    library.intervals.push_back({mm * 1e-3, false, false, 100.0, {0.0, 1.0}, length_s});
  }
  for (int i = 0; i < 3; ++i) {
    library.intervals.push_back({16e-3, false, false, deep_day, {0.0, 1.0}, length_s});
  }
  return library;
}

TEST(Fragments, ADeepDayWidensTheSeasonUntilItHoldsDeeperDays) {
  // The same intervals cut as days and as hours: the three of 16 mm on day 120.
  const auto library_of = [](Instant length_s) { return deep_library(length_s, 120.0); };
  // A day of 15 mm on day 100: within 15 days 12 candidates (enough) but none as deep as
  // 15 mm, fewer than kMinDepthMatches = 2, so the window widens to 30 days: 15 candidates, 3 of
  // them deeper; the draw among the 8 at least 1 / kMaxDayScaleUp = 1/2 as deep (7.5 mm: 8 to
  // 12 mm and the three of 16 mm). k = round(sqrt(8)) = 3, the nearest: the three of 16 mm
  // (1 mm away), whatever u.
  const FragmentLibrary days = library_of(kDay);
  const auto day_mm = [&](double u) {
    return choose_fragment(days, 15e-3, 100.0, false, false, u).depth_m * 1e3;
  };
  for (const double u : {0.1, 0.5, 0.8, 0.95}) EXPECT_DOUBLE_EQ(day_mm(u), 16.0);
  // An hour of 15 mm: within 15 days only 12 mm lies within kDepthFactor = 1.25 of it (12 to
  // 18.75 mm), one of the two needed, so the window widens to 30 days as well; the draw among
  // the four within the factor there (12 mm and the three of 16 mm), k = round(sqrt(4)) = 2: two
  // of 16 mm, whatever u.
  const FragmentLibrary hours = library_of(kHour);
  const auto hour_mm = [&](double u) {
    return choose_fragment(hours, 15e-3, 100.0, false, false, u).depth_m * 1e3;
  };
  for (const double u : {0.01, 0.5, 0.99}) EXPECT_DOUBLE_EQ(hour_mm(u), 16.0);
  // An hour of 5 mm: 12 candidates within 15 days, 3 of them within the factor (4 to 6.25 mm:
  // 4, 5 and 6 mm), so the window stays; those 3, k = round(sqrt(3)) = 2: 5 and 4 mm (4 and 6 mm
  // are 1 mm away: the earlier), cumulative weight 2/3, where all 12 would also give 6 mm.
  const auto hour5_mm = [&](double u) {
    return choose_fragment(hours, 5e-3, 100.0, false, false, u).depth_m * 1e3;
  };
  EXPECT_DOUBLE_EQ(hour5_mm(0.6), 5.0);
  EXPECT_DOUBLE_EQ(hour5_mm(0.7), 4.0);
  // A day of 12 mm: within 15 days only the 12 mm one is as deep (one of the two needed), so
  // the window widens to 30 days as well: 10 at least 6 mm deep (6 to 12 mm and the three of
  // 16 mm), k = round(sqrt(10)) = 3, the nearest 12, 11 and 10 mm (16 mm is 4 mm away),
  // cumulative weights 6/11 and 9/11: u = 0.95 draws 10 mm (without the rule k =
  // round(sqrt(15)) = 4 and the fourth, 9 mm).
  EXPECT_DOUBLE_EQ(choose_fragment(days, 12e-3, 100.0, false, false, 0.95).depth_m * 1e3, 10.0);
}

TEST(Fragments, TheDepthRuleWidensTheSeasonNoFurtherThan61Days) {
  // Days, the three of 16 mm on day 250 (150 days away, outside every window but the whole year).
  const FragmentLibrary days = deep_library(kDay, 250.0);
  // A day of 15 mm on day 100: no library day as deep within ±15, ±30 or ±61 days, but the rule
  // stops at ±61 (a deep day keeps its season): 12 candidates, the draw among the 5 at least
  // 1 / kMaxDayScaleUp = 1/2 as deep (8 to 12 mm), k = round(sqrt(5)) = 2, the nearest 12 and
  // 11 mm, cumulative weight 2/3. Widened to the whole year it would draw 16 mm with u = 0.1.
  const auto day_mm = [&](double u) {
    return choose_fragment(days, 15e-3, 100.0, false, false, u).depth_m * 1e3;
  };
  EXPECT_DOUBLE_EQ(day_mm(0.1), 12.0);
  EXPECT_DOUBLE_EQ(day_mm(0.6), 12.0);
  EXPECT_DOUBLE_EQ(day_mm(0.9), 11.0);
}

TEST(Fragments, ADaysPatternIsNotAMuchShallowerDaysScaledUp) {
  // A library by hand, all on day 100 with dry neighbours: 9 days of 1 mm, then 2, 7 and 8 mm
  // (12 candidates, enough).
  FragmentLibrary library;
  library.length_s = kDay;
  for (const double mm : {1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0, 2.0, 7.0, 8.0}) {
    library.intervals.push_back({mm * 1e-3, false, false, 100.0, {0.0, 1.0}, kDay});
  }
  const auto day_mm = [&](double depth_mm, double u) {
    return choose_fragment(library, depth_mm * 1e-3, 100.0, false, false, u).depth_m * 1e3;
  };
  // A day of 5 mm: 7 and 8 mm as deep (2, enough). Without the rule k = round(sqrt(12)) = 3,
  // the nearest 7 mm (2 mm away), then 2 and 8 mm (3 mm away, 2 mm the earlier), cumulative
  // weights 6/11 and 9/11: u = 0.7 would draw 2 mm, scaled up 2.5 times. With it the draw is
  // among those at least 1 / kMaxDayScaleUp = 1/2 as deep (2.5 mm): 7 and 8 mm, k =
  // round(sqrt(2)) = 1: 7 mm whatever u.
  for (const double u : {0.1, 0.7, 0.99}) EXPECT_DOUBLE_EQ(day_mm(5.0, u), 7.0);
  // A day of 30 mm: none at least 15 mm deep, so all 12 (the window stops at ±61 days), k = 3,
  // the nearest 8, 7 and 2 mm: u = 0.9 draws 2 mm.
  EXPECT_DOUBLE_EQ(day_mm(30.0, 0.1), 8.0);
  EXPECT_DOUBLE_EQ(day_mm(30.0, 0.9), 2.0);
}

TEST(Fragments, AnHourWidensTheSeasonToTheWholeYearThenTheFactor) {
  // The three of 16 mm on day 250: within 61 days of day 100 only 1 to 12 mm.
  const FragmentLibrary hours = deep_library(kHour, 250.0);
  const auto hour_mm = [&](double depth_mm, double u) {
    return choose_fragment(hours, depth_mm * 1e-3, 100.0, false, false, u).depth_m * 1e3;
  };
  // An hour of 18 mm: none within kDepthFactor = 1.25 (14.4 to 22.5 mm) within ±61 days, so
  // the whole year (15 candidates): the three of 16 mm, the draw among those only, k =
  // round(sqrt(3)) = 2: 16 mm whatever u, where the ±61 days of a day would give 12, 11 or
  // 10 mm.
  for (const double u : {0.01, 0.5, 0.99}) EXPECT_DOUBLE_EQ(hour_mm(18.0, u), 16.0);
  // An hour of 40 mm: none within 1.25 (32 to 50 mm) in the whole year, nor within 1.25^2 =
  // 1.5625 (25.6 to 62.5 mm); 1.25^3 = 1.953 (20.5 to 78.1 mm) holds none either, 1.25^4 =
  // 2.441 (16.4 to 97.7 mm) none; 1.25^5 = 3.052 (13.1 to 122 mm) the three of 16 mm: the draw
  // among those, 16 mm.
  for (const double u : {0.01, 0.5, 0.99}) EXPECT_DOUBLE_EQ(hour_mm(40.0, u), 16.0);
  // An hour of 0.4 mm: no library hour within 1.25^4 (0.164 to 0.977 mm); 1.25^5 (0.131 to
  // 1.22 mm) holds 1 mm only, one of the two needed; 1.25^6 = 3.815 (0.105 to 1.53 mm) likewise;
  // 1.25^7 = 4.768 (0.084 to 1.91 mm) likewise; 1.25^8 = 5.96 (0.067 to 2.38 mm) 1 and 2 mm:
  // k = round(sqrt(2)) = 1, 1 mm whatever u.
  for (const double u : {0.01, 0.99}) EXPECT_DOUBLE_EQ(hour_mm(0.4, u), 1.0);
}

// A library by hand of hours in two half-hour steps, day 100 of the year: a spell A of 4 mm all
// in the second half then 2 mm all in the first; a one-hour spell C of 3 mm, half in each; a
// spell B of 1 mm in the first half then 1 mm in the second.
FragmentLibrary spell_library() {
  FragmentLibrary library;
  library.length_s = kHour;
  const auto add = [&](double mm, bool before, bool after, double first_share) {
    library.intervals.push_back({mm * 1e-3, before, after, 100.0, {0.0, first_share, 1.0}, kHour});
  };
  add(4.0, false, true, 0.0);   // A
  add(2.0, true, false, 1.0);   // A
  add(3.0, false, false, 0.5);  // C
  add(1.0, false, true, 1.0);   // B
  add(1.0, true, false, 0.0);   // B
  return library;
}

TEST(Fragments, ASpellTakesTheNearestCalibrationSpellOfItsLength) {
  const FragmentLibrary library = spell_library();
  // Two spells of 2 h (fewer than 10: the whole year), k = round(sqrt(2)) = 1: the nearest
  // always. Hand distances for 3.9 and 2.1 mm: A sqrt(0.1^2 + 0.1^2) = 0.14 mm, B sqrt(2.9^2 +
  // 1.1^2) = 3.10 mm; for 1.2 and 0.8 mm: A 3.03 mm, B 0.28 mm.
  for (const double u : {0.01, 0.5, 0.99}) {
    EXPECT_EQ(choose_spell(library, {3.9e-3, 2.1e-3}, 100.0, u), 0u);
    EXPECT_EQ(choose_spell(library, {1.2e-3, 0.8e-3}, 100.0, u), 3u);
    EXPECT_EQ(choose_spell(library, {0.5e-3}, 100.0, u), 2u);  // the one spell of 1 h
  }
  EXPECT_FALSE(choose_spell(library, {1e-3, 1e-3, 1e-3}, 100.0, 0.5).has_value());
}

// An hourly record from kT0: a spell of 3.9 and 1.9 mm, a dry hour, a spell of 1.7, 5.3 and
// 0.4 mm (no calibration spell is 3 h long), a dry hour, one hour of 2.5 mm.
RainSeries hourly_spells() {
  RainSeries hourly;
  hourly.step_s = kHour;
  hourly.covered = {{kT0, kT0 + 9 * kHour}};
  const std::vector<std::pair<Instant, double>> hours = {{0, 3.9e-3}, {1, 1.9e-3}, {3, 1.7e-3},
                                                         {4, 5.3e-3}, {5, 0.4e-3}, {7, 2.5e-3}};
  for (const auto& [h, depth_m] : hours) {
    hourly.pulses.push_back({kT0 + h * kHour, kT0 + (h + 1) * kHour, depth_m});
  }
  hourly.total_depth_m = sum_depths_m(hourly.pulses);
  return hourly;
}

TEST(Fragments, AMatchedSpellKeepsTheGaugesPatternAcrossTheHourEdge) {
  Disaggregation how;
  how.method = DisaggregationMethod::fragments;
  how.step_s = 1800;
  how.fragments = {spell_library()};
  const RainSeries spread = disaggregate(hourly_spells(), how);
  // The first spell (3.9, 1.9 mm) takes A, the nearest (sqrt(0.1^2 + 0.1^2) = 0.14 mm against
  // B's 3.13 mm): all of 3.9 mm in 00:30-01:00 and all of 1.9 mm in 01:00-01:30, one storm across
  // the hour edge, each hour's depth exactly.
  ASSERT_GE(spread.pulses.size(), 2u);
  EXPECT_EQ(spread.pulses[0].start, kT0 + 1800);
  EXPECT_EQ(spread.pulses[0].depth_m, 3.9e-3);
  EXPECT_EQ(spread.pulses[1].start, kT0 + kHour);
  EXPECT_EQ(spread.pulses[1].depth_m, 1.9e-3);
}

TEST(Fragments, AnHourOutsideTheFactorOfItsCalibrationHourGoesOnItsOwn) {
  Disaggregation how;
  how.method = DisaggregationMethod::fragments;
  how.step_s = 1800;
  how.fragments = {spell_library()};
  // Three spells of two hours, a dry hour between them.
  RainSeries hourly;
  hourly.step_s = kHour;
  hourly.covered = {{kT0, kT0 + 9 * kHour}};
  const std::vector<std::pair<Instant, double>> hours = {{0, 3.9e-3}, {1, 2.1e-3}, {3, 3.9e-3},
                                                         {4, 4.5e-3}, {6, 1.2e-3}, {7, 0.4e-3}};
  for (const auto& [h, depth_m] : hours) {
    hourly.pulses.push_back({kT0 + h * kHour, kT0 + (h + 1) * kHour, depth_m});
  }
  hourly.total_depth_m = sum_depths_m(hourly.pulses);
  const RainSeries spread = disaggregate(hourly, how);
  // Two calibration spells of 2 h, k = round(sqrt(2)) = 1: the nearest. (3.9, 2.1 mm) takes A
  // (0.14 mm away against B's 3.10): both hours within kDepthFactor = 1.25 of A's 4 and 2 mm,
  // so all of 3.9 mm in 00:30-01:00 and all of 2.1 mm in 01:00-01:30, A's pattern.
  // (3.9, 4.5 mm) takes A (sqrt(0.1^2 + 2.5^2) = 2.50 mm against B's sqrt(2.9^2 + 3.5^2) =
  // 4.55): 4.5 mm is more than 1.25 times A's second hour, so it goes on its own. Wet before,
  // dry after: 2 library hours share that state (fewer than 10), so all 5 in any state, the
  // whole year; within 1.25 of 4.5 mm (3.6 to 5.625 mm) only A's 4 mm, within 1.25^2 (2.88 to
  // 7.03 mm) A's 4 mm and C's 3 mm (2, enough); k = 1: A's first hour (0.5 mm away), all in the
  // second half hour, 04:30-05:00 (the edge rule has no candidate to prefer: 0 mm is not within
  // a factor 2 of the 3.9 mm before). A's second hour would have put it in 04:00-04:30.
  // (1.2, 0.4 mm) takes B (sqrt(0.2^2 + 0.6^2) = 0.63 mm against A's 3.22): 1.2 mm lies within
  // 1.25 of B's 1 mm, all of it in 06:00-06:30; 0.4 mm is less than B's second hour over 1.25,
  // so it goes on its own: no library hour within 1.25^4 (0.164 to 0.977 mm), within 1.25^5 =
  // 3.052 (0.131 to 1.22 mm) B's two: k = 1, the earlier on the tie, B's first hour, all in
  // 07:00-07:30 (the last step before was dry: no edge rule). B's second hour would have put it
  // in 07:30-08:00.
  const std::vector<std::pair<Instant, double>> expected = {{1800, 3.9e-3},
                                                            {kHour, 2.1e-3},
                                                            {3 * kHour + 1800, 3.9e-3},
                                                            {4 * kHour + 1800, 4.5e-3},
                                                            {6 * kHour, 1.2e-3},
                                                            {7 * kHour, 0.4e-3}};
  ASSERT_EQ(spread.pulses.size(), expected.size());
  for (std::size_t i = 0; i < expected.size(); ++i) {
    EXPECT_EQ(spread.pulses[i].start, kT0 + expected[i].first) << i;
    EXPECT_EQ(spread.pulses[i].depth_m, expected[i].second) << i;
  }
}

TEST(Fragments, SpellsMatchedOrNotKeepEveryHoursDepthExactly) {
  const RainSeries hourly = hourly_spells();
  Disaggregation how;
  how.method = DisaggregationMethod::fragments;
  how.step_s = 300;
  // Seeds 1 to 20 with the library as built, 21 to 40 with a resample of it (resample_spells).
  for (std::uint64_t seed = 1; seed <= 40; ++seed) {
    how.seed = seed;
    how.fragments = {seed <= 20 ? spell_library() : resample_spells(spell_library(), seed)};
    const RainSeries spread = disaggregate(hourly, how);
    for (const RainPulse& hour : hourly.pulses) {
      double sum = 0.0;
      for (const RainPulse& p : spread.pulses) {
        if (p.start >= hour.start && p.end <= hour.end) sum += p.depth_m;
      }
      EXPECT_EQ(sum, hour.depth_m) << "seed " << seed << ", hour from " << hour.start;
    }
  }
}

// The spells of `library` as the depths of their intervals, in order.
std::vector<std::vector<double>> spells_of(const FragmentLibrary& library) {
  std::vector<std::vector<double>> out;
  for (const Fragment& f : library.intervals) {
    if (out.empty() || !f.wet_before) out.emplace_back();
    out.back().push_back(f.depth_m);
  }
  return out;
}

TEST(Fragments, AResampleTakesWholeSpellsInTimeOrder) {
  // spell_library by hand: spells A (4, 2 mm), C (3 mm) and B (1, 1 mm), in that order.
  const FragmentLibrary library = spell_library();
  for (std::uint64_t seed = 1; seed <= 50; ++seed) {
    const FragmentLibrary resample = resample_spells(library, seed);
    EXPECT_EQ(resample.length_s, library.length_s);
    const std::vector<std::vector<double>> spells = spells_of(resample);
    ASSERT_EQ(spells.size(), 3u) << seed;
    std::size_t last = 0;
    for (const std::vector<double>& spell : spells) {
      // Each an original spell whole, never before the one drawn before it.
      std::size_t which = 3;
      if (spell == std::vector<double>{4e-3, 2e-3}) which = 0;
      if (spell == std::vector<double>{3e-3}) which = 1;
      if (spell == std::vector<double>{1e-3, 1e-3}) which = 2;
      ASSERT_LT(which, 3u) << seed;
      EXPECT_GE(which, last) << seed;
      last = which;
    }
  }
}

TEST(Fragments, AResampleHoldsEachSpellAsOftenAsTheBootstrapSays) {
  // A bootstrap sample of n drawn with replacement holds a given one of the n with probability
  // 1 - (1 - 1/n)^n (Efron & Tibshirani 1993, An Introduction to the Bootstrap, section 7.3 as
  // remembered): 19/27 = 0.7037 for n = 3, and each of the n is drawn once on average. Over 4000
  // seeds the share's standard error is sqrt(0.7037 x 0.2963 / 4000) = 0.0072: four of them.
  const FragmentLibrary library = spell_library();
  constexpr int kSeeds = 4000;
  int holding_c = 0;
  int copies_of_c = 0;
  for (std::uint64_t seed = 1; seed <= kSeeds; ++seed) {
    int copies = 0;
    for (const std::vector<double>& spell : spells_of(resample_spells(library, seed))) {
      copies += spell == std::vector<double>{3e-3};
    }
    holding_c += copies > 0;
    copies_of_c += copies;
  }
  EXPECT_NEAR(static_cast<double>(holding_c) / kSeeds, 19.0 / 27.0, 0.029);
  // Copies per sample: mean 1, variance (1 - 1/3) = 2/3, standard error sqrt(2/3 / 4000) = 0.013.
  EXPECT_NEAR(static_cast<double>(copies_of_c) / kSeeds, 1.0, 0.052);
}

// America/Los_Angeles in 2025 (Energy Policy Act of 2005, sec. 110: daylight saving from 2:00
// on the second Sunday of March to 2:00 on the first Sunday of November; PST -8 h, PDT -7 h).
// Local midnights, worked by hand from kT0 = 2025-03-01T00:00Z: 8 March 00:00 PST = 08:00Z;
// 9 March 00:00 PST = 08:00Z; 10 March 00:00 PDT = 07:00Z (9 March is 23 h); 11 March likewise.
constexpr Instant kMar8 = kT0 + 7 * 86400 + 8 * kHour;
constexpr Instant kMar9 = kMar8 + 86400;
constexpr Instant kMar10 = kMar9 + 23 * kHour;
constexpr Instant kMar11 = kMar10 + 86400;

TimeZone los_angeles() {
  const std::optional<TimeZone> zone = TimeZone::named("America/Los_Angeles");
  EXPECT_TRUE(zone.has_value());
  return zone.value_or(TimeZone{});
}

// One fragment of a 24 h day, all its rain in 06:00-06:05 (5-minute step 72 of 288).
Fragment six_oclock_day() {
  Fragment f;
  f.length_s = 86400;
  f.cumulative.assign(289, 1.0);
  for (std::size_t j = 0; j <= 72; ++j) f.cumulative[j] = 0.0;
  return f;
}

TEST(Fragments, CalendarDaysAreCutOnTheLocalClock) {
  // An invented 5-minute record over 8-10 March, Los Angeles time: 1 mm at 06:00-06:05 local on
  // 8 March (14:00Z) and 2 mm at 06:00-06:05 local on 9 March, the 23 h day (13:00Z).
  RainSeries fine;
  fine.step_s = 300;
  fine.covered = {{kMar8, kMar11}};
  fine.pulses = {{kMar8 + 6 * kHour, kMar8 + 6 * kHour + 300, 1e-3},
                 {kMar9 + 5 * kHour, kMar9 + 5 * kHour + 300, 2e-3}};
  const FragmentLibrary library = build_fragment_library(fine, 86400, kMar9, 300, los_angeles());
  ASSERT_TRUE(library.calendar.has_value());
  ASSERT_EQ(library.intervals.size(), 2u);  // 10 March is dry
  const Fragment& eighth = library.intervals[0];
  EXPECT_EQ(eighth.length_s, 86400);
  ASSERT_EQ(eighth.cumulative.size(), 289u);
  EXPECT_EQ(eighth.cumulative[72], 0.0);  // 06:00 is 6 h into a 24 h day: step 72
  EXPECT_EQ(eighth.cumulative[73], 1.0);
  const Fragment& ninth = library.intervals[1];
  EXPECT_EQ(ninth.length_s, 23 * kHour);
  ASSERT_EQ(ninth.cumulative.size(), 277u);  // 23 h of 5-minute steps
  EXPECT_EQ(ninth.cumulative[60], 0.0);      // 06:00 PDT is 5 h after midnight PST: step 60
  EXPECT_EQ(ninth.cumulative[61], 1.0);
  EXPECT_TRUE(ninth.wet_before);
  EXPECT_FALSE(ninth.wet_after);
  // Both are 24 h on the local clock; 9 March's 23 h is what elapses.
  EXPECT_EQ(library_length_s(library.calendar, kMar9, kMar10), 86400);
  EXPECT_EQ(library_length_s(std::nullopt, kMar9, kMar10), 23 * kHour);
  // An hour across the change is an hour (01:00 PST to 03:00 PDT on the clock, not a day).
  EXPECT_EQ(library_length_s(library.calendar, kMar9 + kHour, kMar9 + 2 * kHour), kHour);
}

TEST(Fragments, ADayFragmentIsStretchedOverA23Or25HourDay) {
  const Fragment f = six_oclock_day();
  // 23 h: the fragment's 06:00-06:05 (21600-21900 s) lands on 21600 x 23/24 = 20700 to 20987.5 s,
  // inside step 69 (20700-21000 s): all of the depth there.
  const std::vector<double> short_day = stretched_cumulative(f, 23 * kHour, 300);
  ASSERT_EQ(short_day.size(), 277u);
  EXPECT_EQ(short_day[69], 0.0);
  EXPECT_EQ(short_day[70], 1.0);
  // 25 h: on 22500 to 22812.5 s; step 75 (22500-22800 s) holds 300 / 312.5 = 0.96 of it, step
  // 76 the remaining 0.04.
  const std::vector<double> long_day = stretched_cumulative(f, 25 * kHour, 300);
  ASSERT_EQ(long_day.size(), 301u);
  EXPECT_EQ(long_day[75], 0.0);
  EXPECT_NEAR(long_day[76], 0.96, 1e-15);
  EXPECT_EQ(long_day[77], 1.0);
  EXPECT_EQ(long_day[300], 1.0);
  // The same length: the fragment as it is.
  EXPECT_EQ(stretched_cumulative(f, 86400, 300), f.cumulative);
}

TEST(Fragments, ACalendarDayKeepsItsDepthExactlyAndInsideIt) {
  Disaggregation how;
  how.method = DisaggregationMethod::fragments;
  how.step_s = 300;
  FragmentLibrary library;
  library.length_s = 86400;
  library.calendar = los_angeles();
  library.intervals = {six_oclock_day()};
  how.fragments = {library};
  // 9 March (23 h) and 2 November (25 h: 00:00 PDT = 07:00Z to 00:00 PST on 3 November = 08:00Z;
  // 2 November is 246 days after 1 March, counted by hand on the calendar).
  const Instant nov2 = kT0 + 246 * 86400 + 7 * kHour;
  const double depth_m = 7.3e-3;
  const std::vector<double> short_day = disaggregate_interval(depth_m, 23 * kHour, kMar9, how);
  ASSERT_EQ(short_day.size(), 276u);  // no step beyond the day's end
  EXPECT_EQ(short_day[69], depth_m);
  const std::vector<double> long_day = disaggregate_interval(depth_m, 25 * kHour, nov2, how);
  ASSERT_EQ(long_day.size(), 300u);
  // 0.96 and 0.04 of 7.3 mm (hand), within a unit in the last place; their sum exactly 7.3 mm.
  EXPECT_NEAR(long_day[75], 7.008e-3, 2e-18);
  EXPECT_NEAR(long_day[76], 0.292e-3, 2e-18);
  EXPECT_EQ(long_day[75] + long_day[76], depth_m);
  double rest = 0.0;
  for (std::size_t j = 0; j < long_day.size(); ++j) rest += j == 75 || j == 76 ? 0.0 : long_day[j];
  EXPECT_EQ(rest, 0.0);
}

TEST(Fragments, SeasonGoesRoundTheYear) {
  // 1970-01-01 is day 0; 365 days later is 365 of 365.2425.
  EXPECT_EQ(season_day(0), 0.0);
  EXPECT_DOUBLE_EQ(season_day(365 * 86400), 365.0);
  EXPECT_NEAR(season_day(366 * 86400), 0.7575, 1e-9);
}

}  // namespace
}  // namespace gutterwatt::fragments_test
