#include "gutterwatt/calendar.hpp"

#include <gtest/gtest.h>

#include <optional>
#include <stdexcept>
#include <string>
#include <thread>

namespace gutterwatt::calendar_test {
namespace {

// Seconds since the epoch of 2025-03-01T00:00Z.
// source: POSIX.1-2017 Base Definitions 4.16 (Seconds Since the Epoch), formula worked by hand:
// tm_yday 59, tm_year 125 -> 59*86400 + 55*31536000 + (14 - 1 + 1)*86400.
constexpr Instant kMarch2025 = 1740787200;
// source: POSIX.1-2017 Base Definitions 4.16, same formula for 2000-01-01T00:00Z.
constexpr Instant kYear2000 = 946684800;

Instant parse_or_fail(const char* text, int default_offset_s = 0) {
  const std::optional<ParsedTime> parsed = parse_iso8601(text, default_offset_s);
  EXPECT_TRUE(parsed.has_value()) << text;
  return parsed ? parsed->instant : -1;
}

TEST(Calendar, ParsesDateAsMidnightUtc) {
  EXPECT_EQ(parse_or_fail("2000-01-01"), kYear2000);
  EXPECT_EQ(parse_or_fail("2025-03-01"), kMarch2025);
}

TEST(Calendar, ParsesMinutesAndSeconds) {
  EXPECT_EQ(parse_or_fail("2025-03-01T00:05"), kMarch2025 + 300);
  EXPECT_EQ(parse_or_fail("2025-03-01T13:47:09"), kMarch2025 + 13 * 3600 + 47 * 60 + 9);
}

TEST(Calendar, ReadsTheTimeOfDayOfANaiveStamp) {
  // Hand arithmetic: 13 h 47 min 9 s = 13*3600 + 47*60 + 9 = 49629 s; 24:00 ends the day.
  EXPECT_EQ(naive_stamp_time_of_day_s("2025-03-01T13:47:09"), 49629);
  EXPECT_EQ(naive_stamp_time_of_day_s("2025-03-01 00:05"), 300);
  EXPECT_EQ(naive_stamp_time_of_day_s("2025-03-01t24:00"), 86400);
  // Other shapes, and times parse_iso8601 refuses, are left to it.
  for (const char* text : {"2025-03-01", "2025-03-01T00:05Z", "2025-03-01T00:05+01",
                           "2025-03-01T00:05:00.5", "2025-03-01T24:01", "2025-03-01T23:60",
                           "2025-03-01T23:59:60", "2025-03-01X00:05", "2025-03-01T0x:05"}) {
    EXPECT_FALSE(naive_stamp_time_of_day_s(text).has_value()) << text;
  }
}

TEST(Calendar, AcceptsSpaceForT) {
  EXPECT_EQ(parse_or_fail("2025-03-01 00:05"), kMarch2025 + 300);
  EXPECT_EQ(parse_or_fail("2025-03-01 00:05:30"), kMarch2025 + 330);
}

TEST(Calendar, RoundsFractionalSecondsToNearest) {
  EXPECT_EQ(parse_or_fail("2025-03-01T00:05:10.49"), kMarch2025 + 310);
  EXPECT_EQ(parse_or_fail("2025-03-01T00:05:10.5"), kMarch2025 + 311);
  EXPECT_EQ(parse_or_fail("2025-03-01T00:05:59.999"), kMarch2025 + 360);
  EXPECT_EQ(parse_or_fail("2025-03-01T00:05:10,7"), kMarch2025 + 311);
}

TEST(Calendar, AppliesTheStampsOwnOffset) {
  const std::optional<ParsedTime> parsed = parse_iso8601("2025-03-01T00:05+02:00", 3600);
  ASSERT_TRUE(parsed.has_value());
  EXPECT_EQ(parsed->instant, kMarch2025 + 300 - 7200);
  EXPECT_TRUE(parsed->has_offset);
  EXPECT_EQ(parsed->offset_s, 7200);
  EXPECT_EQ(parse_or_fail("2025-03-01T00:05+0200"), kMarch2025 + 300 - 7200);
  EXPECT_EQ(parse_or_fail("2025-03-01T00:05+02"), kMarch2025 + 300 - 7200);
  EXPECT_EQ(parse_or_fail("2025-03-01T00:05-05:30"), kMarch2025 + 300 + 5 * 3600 + 1800);
  EXPECT_EQ(parse_or_fail("2025-03-01T00:05:00Z"), kMarch2025 + 300);
}

TEST(Calendar, TakesNaiveStampAtDefaultOffset) {
  const std::optional<ParsedTime> parsed = parse_iso8601("2025-03-01T00:05", -3600);
  ASSERT_TRUE(parsed.has_value());
  EXPECT_EQ(parsed->instant, kMarch2025 + 300 + 3600);
  EXPECT_FALSE(parsed->has_offset);
  EXPECT_EQ(parsed->offset_s, -3600);
}

TEST(Calendar, ReadsHour24AsTheMidnightEndingTheDay) {
  EXPECT_EQ(parse_or_fail("2025-02-28T24:00"), kMarch2025);
  EXPECT_EQ(parse_or_fail("2025-02-28T24:00:00"), kMarch2025);
}

TEST(Calendar, KnowsLeapYears) {
  // Gregorian rule: every 4th year, except centuries not divisible by 400.
  EXPECT_EQ(parse_or_fail("2024-02-29T12:00"), kMarch2025 - 366 * 86400 + 12 * 3600);
  EXPECT_TRUE(parse_iso8601("2000-02-29").has_value());
  EXPECT_FALSE(parse_iso8601("2100-02-29").has_value());
  EXPECT_FALSE(parse_iso8601("2025-02-29").has_value());
}

TEST(Calendar, RejectsImpossibleDates) {
  for (const char* text :
       {"2025-02-30", "2025-04-31", "2025-13-01", "2025-00-10", "2025-01-00", "2025-01-32"}) {
    EXPECT_FALSE(parse_iso8601(text).has_value()) << text;
  }
}

TEST(Calendar, RejectsTheAllZeroDateAsTheFirstDateOfAThread) {
  // The day of the last stamp parsed is cached per thread; a fresh thread's cache must not take
  // 0000-00-00 for a date it already knows.
  bool parsed = true;
  std::thread fresh([&] { parsed = parse_iso8601("0000-00-00T00:00").has_value(); });
  fresh.join();
  EXPECT_FALSE(parsed);
  EXPECT_FALSE(parse_iso8601("0000-00-00").has_value());
}

TEST(Calendar, RejectsImpossibleTimes) {
  for (const char* text : {"2025-03-01T24:01", "2025-03-01T23:60", "2025-03-01T12:00:60",
                           "2025-03-01T25:00", "2025-03-01T24:00:01", "2025-03-01T24:00:00.5"}) {
    EXPECT_FALSE(parse_iso8601(text).has_value()) << text;
  }
}

TEST(Calendar, RejectsMalformedStamps) {
  for (const char* text :
       {"", "2025-3-1", "2025/03/01", "x2025-03-01", "2025-03-01T", "2025-03-01T0005",
        "2025-03-01T00:5", "2025-03-01T00:05 ", " 2025-03-01", "2025-03-01T00:05:00.",
        "2025-03-01T00:05+2", "2025-03-01T00:05+24:00", "2025-03-01T00:05+02:60",
        "2025-03-01T00:05+02:00:00", "2025-03-01Z", "2025-03-01T00:05.5"}) {
    EXPECT_FALSE(parse_iso8601(text).has_value()) << '"' << text << '"';
  }
}

TEST(Calendar, FormatsSecondsOnlyWhenNotZero) {
  EXPECT_EQ(format_iso8601(kMarch2025 + 300), "2025-03-01T00:05");
  EXPECT_EQ(format_iso8601(kMarch2025 + 309), "2025-03-01T00:05:09");
}

TEST(Calendar, FormatsLocalTimeWithItsOffset) {
  EXPECT_EQ(format_iso8601(kMarch2025 + 300 - 7200, 7200), "2025-03-01T00:05+02:00");
  EXPECT_EQ(format_iso8601(kMarch2025, -5 * 3600 - 1800), "2025-02-28T18:30-05:30");
}

TEST(Calendar, FormattedStampsParseBack) {
  for (Instant t = kYear2000 - 86400; t < kMarch2025 + 86400 * 400; t += 86400 * 37 + 3607) {
    for (int offset_s : {0, 7200, -16200}) {
      const std::optional<ParsedTime> back = parse_iso8601(format_iso8601(t, offset_s));
      ASSERT_TRUE(back.has_value());
      EXPECT_EQ(back->instant, t);
    }
  }
}

TEST(Calendar, ParsesUtcOffsets) {
  EXPECT_EQ(parse_utc_offset("Z"), 0);
  EXPECT_EQ(parse_utc_offset("+02:00"), 7200);
  EXPECT_EQ(parse_utc_offset("-0530"), -19800);
  EXPECT_EQ(parse_utc_offset("+02"), 7200);
  EXPECT_EQ(parse_utc_offset("UTC+01:00"), 3600);
  EXPECT_EQ(parse_utc_offset("UTC-03"), -10800);
  EXPECT_EQ(parse_utc_offset("UTC"), 0);
}

TEST(Calendar, RejectsBadUtcOffsets) {
  for (const char* text : {"", "2", "+2", "+24:00", "+01:60", "UTC1", "GMT+1", "+01:00x"}) {
    EXPECT_FALSE(parse_utc_offset(text).has_value()) << text;
  }
}

TEST(Calendar, ParsesDurationsWithUnits) {
  EXPECT_EQ(parse_duration_s("30s"), 30.0);
  EXPECT_EQ(parse_duration_s("90sec"), 90.0);
  EXPECT_EQ(parse_duration_s("5min"), 300.0);
  EXPECT_EQ(parse_duration_s("10m"), 600.0);
  EXPECT_EQ(parse_duration_s("1h"), 3600.0);
  EXPECT_EQ(parse_duration_s("1.5h"), 5400.0);
  EXPECT_EQ(parse_duration_s("3hr"), 10800.0);
  EXPECT_EQ(parse_duration_s("1d"), 86400.0);
  EXPECT_EQ(parse_duration_s("1day"), 86400.0);
  EXPECT_EQ(parse_duration_s("2 days"), 172800.0);
  EXPECT_EQ(parse_duration_s("0s"), 0.0);
}

TEST(Calendar, RejectsDurationsWithoutAKnownUnit) {
  for (const char* text : {"", "30", "h", "-5min", "5 parsecs", "5mins5", "infh", "nan s", "1e"}) {
    EXPECT_FALSE(parse_duration_s(text).has_value()) << text;
  }
}

TEST(Calendar, FormatsDurationsInParts) {
  EXPECT_EQ(format_duration(0), "0s");
  EXPECT_EQ(format_duration(30), "30s");
  EXPECT_EQ(format_duration(300), "5min");
  EXPECT_EQ(format_duration(2 * 3600 + 55 * 60), "2h 55min");
  EXPECT_EQ(format_duration(86400 + 6 * 3600 + 1), "1d 6h 1s");
  EXPECT_EQ(format_duration(-90), "-1min 30s");
}

TEST(Calendar, SplitsInstantsBeforeTheEpoch) {
  const CivilTime t = to_civil(-1);
  EXPECT_EQ(t.year, 1969);
  EXPECT_EQ(t.month, 12);
  EXPECT_EQ(t.day, 31);
  EXPECT_EQ(t.hour, 23);
  EXPECT_EQ(t.minute, 59);
  EXPECT_EQ(t.second, 59);
}

TEST(Calendar, SplitsInstantsAtAnOffset) {
  const CivilTime t = to_civil(kMarch2025 - 3600, 7200);
  EXPECT_EQ(t.year, 2025);
  EXPECT_EQ(t.month, 3);
  EXPECT_EQ(t.day, 1);
  EXPECT_EQ(t.hour, 1);
  EXPECT_EQ(t.minute, 0);
}

TEST(Calendar, FindsMonthStartsAtAnOffset) {
  EXPECT_EQ(month_start(2025, 3), kMarch2025);
  EXPECT_EQ(month_start(2025, 3, 7200), kMarch2025 - 7200);
  EXPECT_EQ(month_start(2025, 4) - month_start(2025, 3), 31 * 86400);
}

TEST(Calendar, RollsMonthStartsIntoNeighbouringYears) {
  EXPECT_EQ(month_start(2025, 13), month_start(2026, 1));
  EXPECT_EQ(month_start(2025, 0), month_start(2024, 12));
  EXPECT_EQ(month_start(2000, 1), kYear2000);
}

TEST(Calendar, LabelsMonthsInLocalTime) {
  EXPECT_EQ(month_label(kMarch2025 - 3600), "2025-02");
  EXPECT_EQ(month_label(kMarch2025 - 3600, 7200), "2025-03");
}

// ---- time zones with daylight saving ----

// 2025-03-01T00:00Z, worked by hand from POSIX.1-2017 Base Definitions 4.16.
constexpr Instant kMarch1 = 1740787200;
constexpr Instant kHour = 3600;
constexpr Instant kDay = 86400;
// The two US changes of 2025 (Energy Policy Act of 2005, sec. 110: from the second Sunday of
// March to the first Sunday of November, at 2:00 local time). In Los Angeles (PST = UTC-8,
// PDT = UTC-7): 2025-03-09T02:00 PST = 10:00Z and 2025-11-02T02:00 PDT = 09:00Z.
constexpr Instant kSpringForward = kMarch1 + 8 * kDay + 10 * kHour;
constexpr Instant kFallBack = kMarch1 + 246 * kDay + 9 * kHour;  // 31+30+31+30+31+31+30+31+1 days

TimeZone los_angeles() {
  const std::optional<TimeZone> zone = TimeZone::named("America/Los_Angeles");
  if (!zone) throw std::runtime_error("the tz database lacks America/Los_Angeles");
  return *zone;
}

TEST(TimeZones, FollowBothUsChangesOf2025) {
  const TimeZone la = los_angeles();
  EXPECT_EQ(la.name(), "America/Los_Angeles");
  EXPECT_FALSE(la.fixed());
  Instant until = 0;
  EXPECT_EQ(la.offset_s(kSpringForward - 1, &until), -8 * 3600);
  EXPECT_EQ(until, kSpringForward);
  EXPECT_EQ(la.offset_s(kSpringForward), -7 * 3600);
  EXPECT_EQ(la.offset_s(kFallBack - 1), -7 * 3600);
  EXPECT_EQ(la.offset_s(kFallBack), -8 * 3600);
  EXPECT_EQ(la.standard_offset_s(kFallBack - 1), -8 * 3600);
}

TEST(TimeZones, FindNoInstantInTheSkippedHourAndTwoInTheRepeatedOne) {
  const TimeZone la = los_angeles();
  // 2025-03-09T02:30 local does not exist; the clocks jumped at kSpringForward.
  const Instant spring_0230 = kMarch1 + 8 * kDay + 2 * kHour + 1800;
  const LocalInstants skipped = la.from_local(spring_0230);
  EXPECT_EQ(skipped.count, 0);
  EXPECT_EQ(skipped.first, kSpringForward);
  // 2025-11-02T01:30 local happens at 08:30Z (PDT) and again at 09:30Z (PST).
  const Instant fall_0130 = kMarch1 + 246 * kDay + kHour + 1800;
  const LocalInstants repeated = la.from_local(fall_0130);
  EXPECT_EQ(repeated.count, 2);
  EXPECT_EQ(repeated.first, kFallBack - 1800);
  EXPECT_EQ(repeated.second, kFallBack + 1800);
  const LocalInstants plain = la.from_local(fall_0130 + 2 * kHour);  // 03:30 PST, 11:30Z
  EXPECT_EQ(plain.count, 1);
  EXPECT_EQ(plain.first, kFallBack + 2 * kHour + 1800);
}

TEST(TimeZones, PutMonthsAndStampsOnTheLocalClock) {
  const TimeZone la = los_angeles();
  // April starts at 2025-04-01T00:00 PDT = 07:00Z; March at 2025-03-01T00:00 PST = 08:00Z.
  EXPECT_EQ(month_start(2025, 4, la), kMarch1 + 31 * kDay + 7 * kHour);
  EXPECT_EQ(month_start(2025, 3, la), kMarch1 + 8 * kHour);
  EXPECT_EQ(month_label(kMarch1 + 31 * kDay + 6 * kHour, la), "2025-03");
  EXPECT_EQ(to_civil(kFallBack, la).hour, 1);
  EXPECT_EQ(format_iso8601(kFallBack - 1800, la), "2025-11-02T01:30-07:00");
  EXPECT_EQ(format_iso8601(kFallBack + 1800, la), "2025-11-02T01:30-08:00");
}

TEST(TimeZones, RefuseAnUnknownName) {
  EXPECT_FALSE(TimeZone::named("America/Los Angeles"));
  EXPECT_FALSE(TimeZone::named("PDT8"));
}

TEST(TimeZones, KeepFixedOffsetsAsTheyWere) {
  const TimeZone plus2(7200);
  EXPECT_TRUE(plus2.fixed());
  EXPECT_EQ(plus2.offset_s(kFallBack), 7200);
  EXPECT_EQ(month_start(2025, 4, plus2), month_start(2025, 4, 7200));
  EXPECT_EQ(plus2.from_local(kMarch1).first, kMarch1 - 7200);
}

}  // namespace
}  // namespace gutterwatt::calendar_test
