#pragma once
/// Civil time for gutterwatt: ISO 8601 stamps, UTC offsets, durations with units, months.
/// Instants are whole seconds since 1970-01-01T00:00Z (UTC), held as `Instant`.

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

namespace date {
class time_zone;
}  // namespace date

namespace gutterwatt {

/// Seconds since 1970-01-01T00:00:00Z.
using Instant = std::int64_t;

/// The instants at which a local clock shows a given reading: one; two in the hour repeated when
/// daylight saving ends (earlier first); none in the hour skipped when it begins, and then
/// `first` is the instant the clocks jumped.
struct LocalInstants {
  int count = 1;
  Instant first = 0;
  Instant second = 0;
};

/// Local civil time of a site: a fixed offset from UTC, or an IANA time zone (such as
/// America/Los_Angeles) with its daylight-saving changes, from the system's tz database
/// (/usr/share/zoneinfo, read by the date library's tz part). Cheap to copy.
class TimeZone {
 public:
  /// A fixed offset, seconds east of UTC (0: UTC).
  TimeZone(int offset_s = 0) : offset_s_(offset_s) {}  // NOLINT: an offset is a zone

  /// The zone of an IANA name; nullopt when the tz database does not hold it.
  static std::optional<TimeZone> named(const std::string& name);

  /// The IANA name; empty for a fixed offset.
  const std::string& name() const { return name_; }
  bool fixed() const { return zone_ == nullptr; }

  /// Seconds east of UTC in force at `t`. `until`, when given, is set to the instant the offset
  /// next changes (a far future for a fixed offset).
  int offset_s(Instant t, Instant* until = nullptr) const;

  /// The offset of the zone's standard time (without daylight saving) at `t`.
  int standard_offset_s(Instant t) const;

  /// The instants at which the local clock reads `local` (seconds since 1970-01-01T00:00 on
  /// that clock).
  LocalInstants from_local(Instant local) const;

 private:
  int offset_s_ = 0;
  const date::time_zone* zone_ = nullptr;
  std::string name_;
};

/// A parsed ISO 8601 date-time. `has_offset` is false for a naive stamp (no `Z`, no `+hh:mm`).
struct ParsedTime {
  Instant instant = 0;  ///< UTC, using the stamp's own offset or the default one for naive stamps
  Instant local = 0;    ///< the stamp as written: seconds since 1970-01-01T00:00 on its own clock
  bool has_offset = false;
  int offset_s = 0;  ///< the offset that was applied (own or default)
};

/// Parses `YYYY-MM-DD`, `YYYY-MM-DDThh:mm`, `YYYY-MM-DDThh:mm:ss` (a space may stand for `T`,
/// fractional seconds are rounded to the nearest second), optionally followed by `Z`, `+hh:mm`,
/// `-hh:mm`, `+hhmm` or `+hh`. A naive stamp is taken as local time at `default_offset_s`.
/// `24:00` is the midnight that ends the day. The text must hold the stamp alone (no blanks), and
/// an offset needs a time of day. Returns nullopt on anything else, including impossible dates
/// (2025-02-30), times (24:01, 23:59:60) and offsets (+24:00).
std::optional<ParsedTime> parse_iso8601(std::string_view text, int default_offset_s = 0);

/// The seconds into its day (0 to 86400, 24:00 included) of a naive stamp shaped
/// `YYYY-MM-DDThh:mm` or `YYYY-MM-DDThh:mm:ss` (`t` or a blank for `T`), the stamps of most
/// records, as parse_iso8601 reads its time; nullopt for any other shape and for a time it
/// refuses. The date is not looked at: a reader that remembers the day of a stamp it parsed in
/// full needs only this for the next stamps of that day.
std::optional<int> naive_stamp_time_of_day_s(std::string_view text);

/// Parses `text` by a strftime-style `format` with the date library's `date::parse` (`%Y`, `%m`,
/// `%d`, `%H`, `%I`, `%M`, `%S`, `%p`, `%b`, `%z`, ...; a blank in the format matches any run of
/// blanks, `%p` and `%b` are read in the C locale). A format without `%z` gives naive stamps,
/// taken at `default_offset_s`. Returns nullopt unless the format matches the whole text and the
/// date and time exist.
///
/// Example: parse_formatted("06/01/2025 01:05 PM", "%m/%d/%Y %I:%M %p") is 2025-06-01T13:05Z.
std::optional<ParsedTime> parse_formatted(std::string_view text, const std::string& format,
                                          int default_offset_s = 0);

/// Whether `format` (as for parse_formatted) reads a UTC offset (`%z`, `%Ez` or `%Oz`).
bool format_has_offset(std::string_view format);

/// Formats an instant as local time at `offset_s`: `YYYY-MM-DDThh:mm`, with `:ss` when the seconds
/// are not zero, and the offset appended (`+hh:mm`) when `offset_s` is not zero.
std::string format_iso8601(Instant instant, int offset_s = 0);
/// As above at the offset the zone has at `instant`.
std::string format_iso8601(Instant instant, const TimeZone& zone);

/// The most bytes put_iso8601 writes (a year of up to 19 digits with its sign, the offset).
inline constexpr std::size_t kIso8601Room = 48;
/// format_iso8601's text written at `out`, which has room for kIso8601Room bytes; returns its
/// end. No allocation: trace.csv writes a time on each row (issue 16).
char* put_iso8601(char* out, Instant instant, int offset_s);
/// As above at the offset the zone has at `instant`.
char* put_iso8601(char* out, Instant instant, const TimeZone& zone);

/// Parses a UTC offset: `Z`, `+hh:mm`, `-hh:mm`, `+hhmm`, `+hh`, `UTC+hh:mm` or a bare `UTC`.
/// Seconds east of UTC; hours up to 23.
std::optional<int> parse_utc_offset(std::string_view text);

/// Parses a duration with its unit: `30s`, `5min`, `1.5h`, `1d` (also `sec`, `m` for minutes,
/// `hr`, `day`, `days`). Returns seconds; nullopt for a bare number, a negative value or an
/// unknown unit.
std::optional<double> parse_duration_s(std::string_view text);

/// The rule every duration a user gives follows (scenario keys and command-line options alike):
/// time is kept in whole seconds, so `1.5s` is refused rather than rounded.
inline constexpr std::string_view kWholeSecondsRule =
    "must be a whole number of seconds (time is kept in whole seconds)";

/// Formats a whole number of seconds for people: `2h 55min`, `1d 6h`, `30s`, `0s`; the parts that
/// are zero are left out. A negative duration gets a leading `-`.
std::string format_duration(std::int64_t seconds);

/// Civil date parts of an instant as seen at `offset_s`.
struct CivilTime {
  int year;
  int month;  ///< 1..12
  int day;    ///< 1..31
  int hour;
  int minute;
  int second;
};
CivilTime to_civil(Instant instant, int offset_s = 0);
/// Civil date parts of an instant on the zone's clock.
CivilTime to_civil(Instant instant, const TimeZone& zone);

/// The instant of local midnight starting `year`-`month`-01 at `offset_s`. A month outside 1..12
/// rolls over into the neighbouring years (month 13 is January of the next year, 0 is December of
/// the year before), so `month_start(y, m + 1)` is the end of month `m`.
Instant month_start(int year, int month, int offset_s = 0);
/// As above on the zone's clock; a midnight the clocks skip starts the month when they jump.
Instant month_start(int year, int month, const TimeZone& zone);

/// `YYYY-MM` for an instant at `offset_s`.
std::string month_label(Instant instant, int offset_s = 0);
std::string month_label(Instant instant, const TimeZone& zone);

}  // namespace gutterwatt
