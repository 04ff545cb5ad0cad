#include "gutterwatt/calendar.hpp"

#include <date/date.h>
#include <date/tz.h>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <limits>
#include <sstream>
#include <stdexcept>
#include <string>
#include <string_view>

#include "detail.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt {
namespace {

using detail::floor_div;
using detail::kDay_s;
using detail::trim;
constexpr int kMaxOffsetHours = 23;

// Reads `count` decimal digits at `pos`; false if any is not a digit or the text is too short.
// Written out by hand: this runs once per row of multi-million-row rain records.
bool read_digits(std::string_view text, std::size_t pos, std::size_t count, int& out) {
  if (pos + count > text.size()) return false;
  int value = 0;
  for (std::size_t i = pos; i < pos + count; ++i) {
    const unsigned digit = static_cast<unsigned char>(text[i]) - '0';
    if (digit > 9) return false;
    value = value * 10 + static_cast<int>(digit);
  }
  out = value;
  return true;
}

// A time of day parse_iso8601 takes: ISO 8601 allows 24:00 for the midnight that ends a day;
// leap seconds are not representable.
bool valid_time_of_day(int hour, int minute, int second) {
  return minute <= 59 && second <= 59 && hour <= 24 && (hour < 24 || (minute == 0 && second == 0));
}

// Parses an offset that must fill `text` exactly: `Z`, `+hh`, `+hhmm`, `+hh:mm` (or `-`).
std::optional<int> parse_offset_exact(std::string_view text) {
  if (text == "Z" || text == "z") return 0;
  if (text.size() < 3 || (text[0] != '+' && text[0] != '-')) return std::nullopt;
  int hours = 0;
  int minutes = 0;
  if (!read_digits(text, 1, 2, hours)) return std::nullopt;
  if (text.size() == 3) {
    minutes = 0;
  } else if (text.size() == 5) {
    if (!read_digits(text, 3, 2, minutes)) return std::nullopt;
  } else if (text.size() == 6 && text[3] == ':') {
    if (!read_digits(text, 4, 2, minutes)) return std::nullopt;
  } else {
    return std::nullopt;
  }
  if (hours > kMaxOffsetHours || minutes > 59) return std::nullopt;
  const int magnitude = hours * 3600 + minutes * 60;
  return text[0] == '-' ? -magnitude : magnitude;
}

std::int64_t days_from_civil(const date::year_month_day& ymd) {
  return date::sys_days{ymd}.time_since_epoch().count();
}

// Writes a zero-padded number of at least `width` digits (a leading `-` for negatives) at `p`,
// which has room for 24 characters past `width`; returns the end. Into a buffer, not a string:
// trace.csv has a time on each row (issue 16).
char* put_padded(char* p, long long value, int width) {
  if (value < 0) {
    *p++ = '-';
    --width;
  }
  char digits[24];
  const char* end = std::to_chars(digits, digits + sizeof digits, value).ptr;
  std::string_view text(digits, static_cast<std::size_t>(end - digits));
  if (value < 0) text.remove_prefix(1);
  for (int k = static_cast<int>(text.size()); k < width; ++k) *p++ = '0';
  return std::copy(text.begin(), text.end(), p);
}

// Appends a zero-padded number of at least `width` digits (a leading `-` for negatives).
void append_padded(std::string& out, long long value, int width) {
  char buf[32];
  out.append(buf, put_padded(buf, value, width));
}

// Writes a number from 0 to 99 as two digits at `p`; returns the end.
char* put_two_digits(char* p, std::int64_t value) {
  *p++ = static_cast<char>('0' + value / 10);
  *p++ = static_cast<char>('0' + value % 10);
  return p;
}

// Writes a UTC offset `+hh:mm` (`:ss` when its seconds are not zero) at `p`; returns the end.
char* put_offset(char* p, int offset_s) {
  *p++ = offset_s < 0 ? '-' : '+';
  const int magnitude = offset_s < 0 ? -offset_s : offset_s;
  p = put_padded(p, magnitude / 3600, 2);
  *p++ = ':';
  p = put_padded(p, magnitude / 60 % 60, 2);
  if (magnitude % 60 != 0) {
    *p++ = ':';
    p = put_padded(p, magnitude % 60, 2);
  }
  return p;
}

}  // namespace

std::optional<ParsedTime> parse_iso8601(std::string_view text, int default_offset_s) {
  int year = 0;
  int month = 0;
  int day = 0;
  if (text.size() < 10 || !read_digits(text, 0, 4, year) || text[4] != '-' ||
      !read_digits(text, 5, 2, month) || text[7] != '-' || !read_digits(text, 8, 2, day)) {
    return std::nullopt;
  }
  // Records hold many stamps of one day in a row: the day's number is kept from the last call.
  thread_local int cached_year = 0, cached_month = 0, cached_day = -1;  // no valid date yet
  thread_local std::int64_t cached_days = 0;
  std::int64_t days = 0;
  if (year == cached_year && month == cached_month && day == cached_day) {
    days = cached_days;
  } else {
    const date::year_month_day ymd{date::year{year}, date::month{static_cast<unsigned>(month)},
                                   date::day{static_cast<unsigned>(day)}};
    if (!ymd.ok()) return std::nullopt;
    days = days_from_civil(ymd);
    cached_year = year;
    cached_month = month;
    cached_day = day;
    cached_days = days;
  }

  int hour = 0;
  int minute = 0;
  int second = 0;
  int round_up = 0;
  std::size_t pos = 10;
  if (pos < text.size() && (text[pos] == 'T' || text[pos] == 't' || text[pos] == ' ')) {
    if (!read_digits(text, pos + 1, 2, hour) || pos + 3 >= text.size() || text[pos + 3] != ':' ||
        !read_digits(text, pos + 4, 2, minute)) {
      return std::nullopt;
    }
    pos += 6;
    if (pos < text.size() && text[pos] == ':') {
      if (!read_digits(text, pos + 1, 2, second)) return std::nullopt;
      pos += 3;
      if (pos < text.size() && (text[pos] == '.' || text[pos] == ',')) {
        const std::size_t first = ++pos;
        bool any_nonzero = false;
        while (pos < text.size() && text[pos] >= '0' && text[pos] <= '9') {
          any_nonzero = any_nonzero || text[pos] != '0';
          ++pos;
        }
        if (pos == first) return std::nullopt;
        // Nearest second, halves rounded up.
        round_up = text[first] >= '5' ? 1 : 0;
        if (hour == 24 && any_nonzero) return std::nullopt;
      }
    }
    if (!valid_time_of_day(hour, minute, second)) return std::nullopt;
  }

  ParsedTime parsed;
  if (pos == text.size()) {
    parsed.offset_s = default_offset_s;
  } else {
    if (pos == 10) return std::nullopt;  // an offset on a bare date says nothing
    const std::optional<int> offset = parse_offset_exact(text.substr(pos));
    if (!offset) return std::nullopt;
    parsed.has_offset = true;
    parsed.offset_s = *offset;
  }
  parsed.local = days * kDay_s + hour * 3600 + minute * 60 + second + round_up;
  parsed.instant = parsed.local - parsed.offset_s;
  return parsed;
}

std::optional<int> naive_stamp_time_of_day_s(std::string_view text) {
  const bool with_seconds = text.size() == 19;
  if (text.size() != 16 && !with_seconds) return std::nullopt;
  const char t = text[10];
  if ((t != 'T' && t != 't' && t != ' ') || text[13] != ':' || (with_seconds && text[16] != ':')) {
    return std::nullopt;
  }
  int hour = 0;
  int minute = 0;
  int second = 0;
  if (!read_digits(text, 11, 2, hour) || !read_digits(text, 14, 2, minute) ||
      (with_seconds && !read_digits(text, 17, 2, second)) ||
      !valid_time_of_day(hour, minute, second)) {
    return std::nullopt;
  }
  return hour * 3600 + minute * 60 + second;
}

std::optional<ParsedTime> parse_formatted(std::string_view text, const std::string& format,
                                          int default_offset_s) {
  // One stream per thread, reused: this runs once per row of a record.
  thread_local std::istringstream in;
  in.clear();
  in.str(std::string(text));
  date::local_seconds local{};
  std::string* const no_abbreviation = nullptr;
  std::chrono::minutes offset{0};
  date::from_stream(in, format.c_str(), local, no_abbreviation, &offset);
  if (in.fail() || in.peek() != std::char_traits<char>::eof()) return std::nullopt;
  ParsedTime parsed;
  parsed.local = local.time_since_epoch().count();
  parsed.has_offset = format_has_offset(format);
  parsed.offset_s = parsed.has_offset ? static_cast<int>(offset.count()) * 60 : default_offset_s;
  parsed.instant = parsed.local - parsed.offset_s;
  return parsed;
}

bool format_has_offset(std::string_view format) {
  for (std::size_t i = 0; i + 1 < format.size(); ++i) {
    if (format[i] != '%') continue;
    const std::string_view rest = format.substr(i + 1);
    if (rest.starts_with("z") || rest.starts_with("Ez") || rest.starts_with("Oz")) return true;
    ++i;  // `%%` and every other conversion
  }
  return false;
}

char* put_iso8601(char* out, Instant instant, int offset_s) {
  const std::int64_t local = instant + offset_s;
  const std::int64_t days = floor_div(local, kDay_s);
  const std::int64_t second_of_day = local - days * kDay_s;
  // Outputs write many times of one day in a row (trace.csv a row a minute): the date's text,
  // with its `T`, is kept from the last call.
  thread_local std::int64_t cached_days = std::numeric_limits<std::int64_t>::min();
  thread_local char date_text[32];
  thread_local std::size_t date_length = 0;
  if (days != cached_days) {
    const CivilTime t = to_civil(instant, offset_s);
    char* p = put_padded(date_text, t.year, 4);
    *p++ = '-';
    p = put_padded(p, t.month, 2);
    *p++ = '-';
    p = put_padded(p, t.day, 2);
    *p++ = 'T';
    date_length = static_cast<std::size_t>(p - date_text);
    cached_days = days;
  }
  char* p = std::copy(date_text, date_text + date_length, out);
  p = put_two_digits(p, second_of_day / 3600);
  *p++ = ':';
  p = put_two_digits(p, second_of_day / 60 % 60);
  if (second_of_day % 60 != 0) {
    *p++ = ':';
    p = put_two_digits(p, second_of_day % 60);
  }
  return offset_s != 0 ? put_offset(p, offset_s) : p;
}

std::string format_iso8601(Instant instant, int offset_s) {
  char buf[kIso8601Room];
  return std::string(buf, put_iso8601(buf, instant, offset_s));
}

std::optional<int> parse_utc_offset(std::string_view text) {
  text = trim(text);
  if (text.size() >= 3 && (text.substr(0, 3) == "UTC" || text.substr(0, 3) == "utc")) {
    text.remove_prefix(3);
    if (text.empty()) return 0;
    if (text.front() != '+' && text.front() != '-') return std::nullopt;
  }
  return parse_offset_exact(text);
}

std::optional<double> parse_duration_s(std::string_view text) {
  text = trim(text);
  if (!text.empty() && text.front() == '-') return std::nullopt;
  double value = 0.0;
  const char* const end = text.data() + text.size();
  const auto [rest, ec] = std::from_chars(text.data(), end, value);
  if (ec != std::errc{} || !std::isfinite(value) || value < 0.0) return std::nullopt;
  const std::string_view unit = trim(std::string_view(rest, static_cast<std::size_t>(end - rest)));
  double factor = 0.0;
  if (unit == "s" || unit == "sec" || unit == "secs" || unit == "second" || unit == "seconds") {
    factor = 1.0;
  } else if (unit == "min" || unit == "m" || unit == "mins" || unit == "minute" ||
             unit == "minutes") {
    factor = kSecondsPerMinute;
  } else if (unit == "h" || unit == "hr" || unit == "hrs" || unit == "hour" || unit == "hours") {
    factor = kSecondsPerHour;
  } else if (unit == "d" || unit == "day" || unit == "days") {
    factor = kSecondsPerDay;
  } else {
    return std::nullopt;
  }
  return value * factor;
}

std::string format_duration(std::int64_t seconds) {
  if (seconds == 0) return "0s";
  std::string out;
  // Built from the magnitude as unsigned so the most negative value does not overflow.
  std::uint64_t rest =
      seconds < 0 ? 0 - static_cast<std::uint64_t>(seconds) : static_cast<std::uint64_t>(seconds);
  if (seconds < 0) out += '-';
  const struct {
    std::uint64_t size;
    const char* name;
  } parts[] = {{86400, "d"}, {3600, "h"}, {60, "min"}, {1, "s"}};
  for (const auto& part : parts) {
    const std::uint64_t count = rest / part.size;
    rest %= part.size;
    if (count == 0) continue;
    if (out.size() > (seconds < 0 ? 1u : 0u)) out += ' ';
    out += std::to_string(count);
    out += part.name;
  }
  return out;
}

CivilTime to_civil(Instant instant, int offset_s) {
  const std::int64_t local = instant + offset_s;
  const std::int64_t days = floor_div(local, kDay_s);
  const std::int64_t second_of_day = local - days * kDay_s;
  const date::year_month_day ymd{date::sys_days{date::days{static_cast<int>(days)}}};
  return CivilTime{static_cast<int>(ymd.year()),
                   static_cast<int>(static_cast<unsigned>(ymd.month())),
                   static_cast<int>(static_cast<unsigned>(ymd.day())),
                   static_cast<int>(second_of_day / 3600),
                   static_cast<int>(second_of_day / 60 % 60),
                   static_cast<int>(second_of_day % 60)};
}

Instant month_start(int year, int month, int offset_s) {
  const date::year_month ym = date::year{year} / date::January + date::months{month - 1};
  return days_from_civil(ym / date::day{1}) * kDay_s - offset_s;
}

std::string month_label(Instant instant, int offset_s) {
  const CivilTime t = to_civil(instant, offset_s);
  std::string out;
  append_padded(out, t.year, 4);
  out += '-';
  append_padded(out, t.month, 2);
  return out;
}

CivilTime to_civil(Instant instant, const TimeZone& zone) {
  return to_civil(instant, zone.offset_s(instant));
}

Instant month_start(int year, int month, const TimeZone& zone) {
  if (zone.fixed()) return month_start(year, month, zone.offset_s(0));
  return zone.from_local(month_start(year, month, 0)).first;
}

std::string month_label(Instant instant, const TimeZone& zone) {
  return month_label(instant, zone.offset_s(instant));
}

std::string format_iso8601(Instant instant, const TimeZone& zone) {
  return format_iso8601(instant, zone.offset_s(instant));
}

char* put_iso8601(char* out, Instant instant, const TimeZone& zone) {
  return put_iso8601(out, instant, zone.offset_s(instant));
}

std::optional<TimeZone> TimeZone::named(const std::string& name) {
  TimeZone zone;
  try {
    zone.zone_ = date::locate_zone(name);
  } catch (const std::runtime_error&) {
    return std::nullopt;
  }
  zone.name_ = name;
  return zone;
}

namespace {

using Seconds = std::chrono::seconds;

date::sys_info info_at(const date::time_zone& zone, Instant t) {
  return zone.get_info(date::sys_seconds{Seconds{t}});
}

Instant to_instant(const date::sys_seconds& t) { return t.time_since_epoch().count(); }

}  // namespace

int TimeZone::offset_s(Instant t, Instant* until) const {
  if (zone_ == nullptr) {
    if (until != nullptr) *until = std::numeric_limits<Instant>::max();
    return offset_s_;
  }
  const date::sys_info info = info_at(*zone_, t);
  if (until != nullptr) *until = to_instant(info.end);
  return static_cast<int>(info.offset.count());
}

int TimeZone::standard_offset_s(Instant t) const {
  if (zone_ == nullptr) return offset_s_;
  // Read from the system's zone files, `save` only tells daylight time (non-zero) from standard
  // time, not its size: the standard offset is that of the nearest period before without it.
  date::sys_info info = info_at(*zone_, t);
  for (int k = 0; k < 4 && info.save != std::chrono::minutes{0}; ++k) {
    info = info_at(*zone_, to_instant(info.begin) - 1);
  }
  return static_cast<int>(info.offset.count());
}

LocalInstants TimeZone::from_local(Instant local) const {
  if (zone_ == nullptr) return {1, local - offset_s_, local - offset_s_};
  const date::local_info info = zone_->get_info(date::local_seconds{Seconds{local}});
  const Instant first = local - info.first.offset.count();
  switch (info.result) {
    case date::local_info::unique:
      return {1, first, first};
    case date::local_info::ambiguous:
      return {2, first, local - info.second.offset.count()};
    default:
      return {0, to_instant(info.first.end), to_instant(info.first.end)};
  }
}

}  // namespace gutterwatt
