// The time column of a series record (StampReader, src/rain_csv.cpp). Naive stamps shaped
// `YYYY-MM-DDThh:mm[:ss]` take a fast path that remembers the day of the stamp before and reads
// only the time of day; every other stamp, and the first of each day, goes through
// parse_iso8601. The instants are checked against epoch seconds worked by hand on the proleptic
// Gregorian calendar, and the fast path against parse_iso8601 on the same text.

#include <gtest/gtest.h>

#include <optional>
#include <string>
#include <vector>

#include "gutterwatt/calendar.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/rain_input.hpp"
#include "rain_csv.hpp"
#include "test_support.hpp"

namespace gutterwatt::stamp_reader_test {
namespace {

using detail::kSeriesStamps;
using detail::StampReader;

// Epoch seconds worked by hand (proleptic Gregorian calendar, 86400 s a day):
// 2015-01-01T00:00Z: 45 years of 365 days from 1970 plus the 11 leap days of 1972, 1976, ...,
// 2012 -> 16436 days -> 1420070400 s.
constexpr Instant kJan2015 = 1420070400;
// 2016-01-01T00:00Z: 16436 + 365 (2015) = 16801 days -> 1451606400 s.
constexpr Instant kJan2016 = 1451606400;
// 2000-01-01T00:00Z: 30 years of 365 days plus the 7 leap days of 1972 ... 1996 -> 10957 days.
constexpr Instant kJan2000 = 946684800;
constexpr Instant kDay = 86400;

// The instants a fresh reader gives for `stamps`, read in order as the rows of one file.
std::vector<Instant> read_all(const std::vector<std::string>& stamps, const SeriesFormat& fmt) {
  const std::string file = "rain.csv";
  StampReader reader(file, fmt, kSeriesStamps);
  std::vector<Instant> out;
  int line = 1;
  for (const std::string& text : stamps) out.push_back(reader.read(text, ++line).instant);
  return out;
}

TEST(StampReader, GivesHandWorkedEpochSeconds) {
  const SeriesFormat fmt;
  // The second stamp of each day takes the fast path (same date as the stamp before).
  const std::vector<Instant> got =
      read_all({"2015-01-01T00:01", "2015-01-01T23:59:59", "2015-01-02T00:00", "2015-01-02T24:00",
                // 2016-02-29, the leap day: 31 + 28 days after 2016-01-01.
                "2016-02-29T12:00", "2016-02-29T12:00:30", "2016-03-01 00:00", "2016-03-01t06:15"},
               fmt);
  const std::vector<Instant> expected = {kJan2015 + 60,
                                         kJan2015 + kDay - 1,
                                         kJan2015 + kDay,
                                         kJan2015 + 2 * kDay,  // 24:00 ends 2015-01-02
                                         kJan2016 + 59 * kDay + 12 * 3600,
                                         kJan2016 + 59 * kDay + 12 * 3600 + 30,
                                         kJan2016 + 60 * kDay,
                                         kJan2016 + 60 * kDay + 6 * 3600 + 15 * 60};
  EXPECT_EQ(got, expected);
}

TEST(StampReader, GivesHandWorkedEpochSecondsAroundCenturies) {
  const SeriesFormat fmt;
  // 2000 is a leap year (divisible by 400): 2000-02-29 exists, 2000-03-01 is 60 days in.
  EXPECT_EQ(read_all({"2000-02-29T00:00", "2000-02-29T00:01", "2000-03-01T00:00"}, fmt),
            (std::vector<Instant>{kJan2000 + 59 * kDay, kJan2000 + 59 * kDay + 60,
                                  kJan2000 + 60 * kDay}));
  // Before the epoch the day number is negative: 1969-12-31 is day -1.
  EXPECT_EQ(read_all({"1969-12-31T23:59", "1969-12-31T23:59:30", "1970-01-01T00:00"}, fmt),
            (std::vector<Instant>{-60, -30, 0}));
}

TEST(StampReader, PutsNaiveStampsOnTheFixedOffset) {
  SeriesFormat fmt;
  fmt.zone = TimeZone(3600);  // +01:00: local midnight is 23:00 UTC the day before
  EXPECT_EQ(read_all({"2015-01-01T00:00", "2015-01-01T00:01"}, fmt),
            (std::vector<Instant>{kJan2015 - 3600, kJan2015 - 3600 + 60}));
}

// Each stamp read after "2015-01-01T00:00" (so that the day is remembered) against
// parse_iso8601 on the same text: the same instant, or an error where it refuses the text.
TEST(StampReader, FastPathAgreesWithTheFullParse) {
  const SeriesFormat fmt;
  const std::string file = "rain.csv";
  const std::vector<std::string> stamps = {
      "2015-01-01T00:01",    "2015-01-01T00:59",     "2015-01-01T09:30:15", "2015-01-01T23:59:59",
      "2015-01-01 12:00",    "2015-01-01t12:00",     "2015-01-01T24:00",    "2015-01-01T24:00:00",
      "2015-01-01T24:01",    "2015-01-01T24:00:01",  "2015-01-01T25:00",    "2015-01-01T00:60",
      "2015-01-01T00:00:60", "2015-01-01T0a:00",     "2015-01-01T00:0a",    "2015-01-01T00:00:0a",
      "2015-01-01X00:01",    "2015-01-01T00-01",     "2015-01-01T00:01-00", "2015-01-01T00:01:",
      "2015-01-01T00:01:5",  "2015-01-01T00:01:05.6"};
  for (const std::string& text : stamps) {
    StampReader reader(file, fmt, kSeriesStamps);
    reader.read("2015-01-01T00:00", 2);
    const std::optional<ParsedTime> full = parse_iso8601(text);
    if (full && !full->has_offset) {
      EXPECT_EQ(reader.read(text, 3).instant, full->instant) << text;
    } else {
      EXPECT_NE(test_support::input_error_of([&] { reader.read(text, 3); }), "no error") << text;
    }
  }
}

TEST(StampReader, KeepsItsMessagesOnTheFastPath) {
  const SeriesFormat fmt;
  const std::string file = "rain.csv";
  StampReader reader(file, fmt, kSeriesStamps);
  reader.read("2015-01-01T00:00", 2);
  EXPECT_EQ(test_support::input_error_of([&] { reader.read("2015-01-01T00:60", 3); }),
            "rain.csv:3: time: not an ISO 8601 date-time such as 2025-03-01T00:05 (got "
            "\"2015-01-01T00:60\")");
  EXPECT_EQ(test_support::input_error_of([&] { reader.read("2015-01-01T00:00", 4); }),
            "rain.csv:4: time: \"2015-01-01T00:00\" is the same instant as the previous stamp "
            "\"2015-01-01T00:00\" (line 2)");
  // A day never read (2015-02-29 does not exist) is not taken for the remembered one.
  EXPECT_EQ(test_support::input_error_of([&] { reader.read("2015-02-29T00:00", 5); }),
            "rain.csv:5: time: not an ISO 8601 date-time such as 2025-03-01T00:05 (got "
            "\"2015-02-29T00:00\")");
}

}  // namespace
}  // namespace gutterwatt::stamp_reader_test
