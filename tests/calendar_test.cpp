#include "gutterwatt/calendar.hpp"

#include <gtest/gtest.h>

#include <optional>
#include <string>
#include <thread>

namespace gutterwatt {
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

}  // namespace
}  // namespace gutterwatt
