#pragma once
/// Rain records in, plain rain series out. Readers take a stream so tests can pass strings.

#include <cstddef>
#include <cstdint>
#include <functional>
#include <istream>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "gutterwatt/calendar.hpp"
#include "gutterwatt/disaggregation_config.hpp"

namespace gutterwatt {

/// One interval of the record with rain in it: [start, end), depth on the plan roof area.
/// Intensity is piecewise constant over the interval: depth_m / (end - start).
struct RainPulse {
  Instant start;
  Instant end;
  double depth_m;
};

/// A half-open span of time [start, end).
struct TimeSpan {
  Instant start;
  Instant end;
};

/// Highest rain intensity a record may imply before it is taken as a unit or column mix-up.
/// A plausibility limit chosen for this project (common practice, no source).
inline constexpr double kMaxRainIntensity_mm_per_h = 1000.0;

enum class RainValue { depth, intensity };
enum class GapPolicy { error, zero, skip };

/// How to read a `series` CSV. `unit_m` is metres per depth unit (mm: 1e-3, in: 0.0254); for
/// intensity values it is the same depth unit per hour.
struct SeriesFormat {
  std::string time_column = "time";
  std::string value_column = "rain_mm";
  RainValue value = RainValue::depth;
  double unit_m = 1e-3;
  std::string unit_name = "mm";
  /// Nominal record step; when absent, the most common spacing of the first 4096 timestamps.
  std::optional<double> step_s;
  GapPolicy gaps = GapPolicy::error;
  /// The clock of naive timestamps: a fixed offset or a time zone with daylight saving.
  TimeZone zone;
  /// How the time column is written: a strftime-style format read by parse_formatted (such as
  /// `%m/%d/%Y %I:%M %p`); empty: ISO 8601.
  std::string time_format;
  /// The character between fields: `,`, `;` or a tab.
  char delimiter = ',';
  /// The decimal mark of the values: `.` or `,` (then the fields are not separated by commas).
  char decimal = '.';
  /// Lines at the top of the file passed over unread, before the header (a logger's titles).
  int skip_lines = 0;
  /// Keeps only the rows whose column (first) holds the text (second), all of them; other rows
  /// are left out before their stamps and values are read (one station of a download of many).
  std::vector<std::pair<std::string, std::string>> where;
};

/// A rain record as the simulation sees it. Only intervals with rain are stored, so a long
/// record of mostly dry minutes stays small; `covered` says which time the record speaks for.
struct RainSeries {
  std::vector<RainPulse> pulses;  ///< sorted, non-overlapping, every depth > 0
  std::vector<TimeSpan> covered;  ///< merged spans with data (zero rain included), sorted
  std::vector<TimeSpan> gaps;     ///< spans inside the record with no data, sorted
  GapPolicy policy = GapPolicy::error;
  Instant step_s = 0;          ///< nominal record step used: `fmt.step_s` or the inferred one
  double total_depth_m = 0.0;  ///< sum of the pulse depths, correctly rounded
  std::vector<std::string> warnings;  ///< things a user should hear about (gaps filled, ...)
};

/// The sum of the pulse depths, correctly rounded (exact summation, independent of order).
double sum_depths_m(const std::vector<RainPulse>& pulses);

/// Rows read_rain_series reads between two calls of its progress function.
inline constexpr std::size_t kProgressRows = 16384;

/// Hears of a series while it is read: the series so far, final before the end of its last
/// covered span, and append-only from call to call (see RainFeed::publish).
using SeriesProgress = std::function<void(const RainSeries& so_far)>;

/// Reads a period-ending CSV: each row's value belongs to the interval that ends at its
/// timestamp, of length the nominal step (or the time since the previous row when shorter).
/// A longer spacing is a gap, handled by `fmt.gaps`: `error` throws, `zero` counts it as dry,
/// `skip` leaves it out of the simulated time. Accepts a UTF-8 byte-order mark, CRLF line ends,
/// quoted header names and blank lines. Throws InputError naming `file_label`, the line and the
/// column for anything it cannot take.
///
/// Details: the header is the first line past `fmt.skip_lines` that is neither blank nor a `#`
/// comment; columns are found by name and others are ignored; fields are separated by
/// `fmt.delimiter`; a quoted field may not span lines; rows that `fmt.where` leaves out are not
/// read further. Stamps are ISO 8601, or in `fmt.time_format`. The first row covers
/// (T0 - step, T0]. Timestamps must strictly increase; naive ones are read on the clock of
/// `fmt.zone`, and a file may not mix naive stamps with stamps that carry an offset. Without
/// `fmt.step_s` the step is the most common spacing of consecutive stamps among the first 4096 rows
/// (ties: the smallest), which needs at least two rows. A step of whole days on a `fmt.zone` with
/// daylight saving is counted on the local clock: each interval is a calendar day (23 or 25 h
/// across a change), not a gap or an overlap. Rows stream through once the step is known:
/// memory holds the wet intervals, not every row. Values must be finite, not negative, and imply at
/// most kMaxRainIntensity_mm_per_h over their interval. `progress`, when given, is called every
/// kProgressRows rows once the step is known.
///
/// Example:
///   std::istringstream csv("time,rain_mm\n2025-03-01T00:05,0.2\n2025-03-01T00:10,0\n");
///   RainSeries rain = read_rain_series(csv, "rain.csv", SeriesFormat{});
///   // rain.pulses == {{T0 - 300, T0, 0.2e-3}}, rain.covered == {{T0 - 300, T0 + 300}}
RainSeries read_rain_series(std::istream& in, const std::string& file_label,
                            const SeriesFormat& fmt, const SeriesProgress& progress = {});

/// Longest time one tip's depth is spread over, by default: 30 min. A tip that follows a dry
/// spell longer than this counts as a shower of this length ending at the tip. A project choice
/// (common practice, no source): about the time a light shower takes to fill a 0.2 mm bucket.
inline constexpr Instant kDefaultTipCap_s = 1800;

/// How a tipping-bucket log becomes intensity. Each tip's depth is spread uniformly over the
/// time since the previous tip, but over no more than `cap_s`; the first tip of a log counts
/// as following a long dry spell. Tips that share a stamp share one interval.
struct TipSpreading {
  double tip_depth_m = 0.0;          ///< depth of one tip, > 0
  Instant cap_s = kDefaultTipCap_s;  ///< >= 1
};

/// The tips of one log file as read, before spreading: times (non-decreasing; equal stamps are
/// several tips at once) and the line each came from, for messages.
struct TipLog {
  std::string label;
  std::string time_column;
  std::vector<Instant> times;
  std::vector<int> lines;
};

/// Reads a tipping-bucket log: a CSV with one row per tip, the tip's time in column
/// `fmt.time_column` (other columns are ignored). Same file rules and messages as
/// read_rain_series (header, comments, BOM, CRLF, quoting, offsets), except that a stamp may
/// repeat. Throws InputError for a stamp earlier than the one before it, or a log without tips.
TipLog read_tip_log(std::istream& in, const std::string& file_label, const SeriesFormat& fmt);

/// Spreads the tips of one or more logs (one instrument, files in any order) into pulses, one
/// pulse per distinct stamp: n tips at stamp t give n * tip depth over
/// [t - min(t - t_previous, cap), t). The logs are joined into one stream, so the first tip of a
/// file follows the last tip of the file before it. A log cannot tell a logger outage from dry
/// weather: the record covers the whole time from the first pulse's start to the last tip,
/// without gaps. `policy` is only passed on (for the time outside the record).
///
/// Throws InputError naming both files when two logs overlap (a tip of one at or before the
/// last tip of the other), and naming the file and line of a tip that implies more than
/// kMaxRainIntensity_mm_per_h. `total_depth_m` is the correctly rounded sum of the pulses: with
/// one tip per stamp, exactly (number of tips) x (tip depth), rounded once. `step_s` is the cap.
RainSeries spread_tips(const std::vector<TipLog>& logs, const TipSpreading& tips,
                       GapPolicy policy = GapPolicy::error);

/// read_tip_log then spread_tips, for one file.
RainSeries read_rain_tips(std::istream& in, const std::string& file_label, const SeriesFormat& fmt,
                          const TipSpreading& tips);

/// The warning a daily record always carries (once per record, however many files).
inline constexpr std::string_view kDailyWarning =
    "daily totals hide rain intensity, and whether the siphon primes depends on it: the "
    "results follow the chosen rain.disaggregate method";

/// Reads daily totals: a CSV with a date column (`fmt.time_column`, dates such as 2025-03-01,
/// the local day of `fmt.zone`, at its standard time) and a depth column (`fmt.value_column`, in
/// `fmt.unit_m`; `fmt.value` must be depth). Each day covers its 24 hours; its depth is one pulse
/// over `window` (see disaggregate() for bringing it down to a finer step). Missing days are gaps,
/// handled by `fmt.gaps` as in read_rain_series. Same file rules and messages as
/// read_rain_series; a day's depth may imply at most kMaxRainIntensity_mm_per_h over the
/// window. The series carries kDailyWarning; `step_s` is one day.
RainSeries read_rain_daily(std::istream& in, const std::string& file_label, const SeriesFormat& fmt,
                           const DayWindow& window = {});

/// The share of one local calendar month (the part inside the period asked about) for which the
/// record has data.
struct MonthCoverage {
  std::string month;  ///< YYYY-MM
  Instant start;      ///< start of the month, or of the period when later
  Instant end;        ///< end of the month, or of the period when earlier
  Instant covered_s;  ///< seconds of [start, end) inside `RainSeries::covered`
  double fraction;    ///< covered_s / (end - start)
};

/// Months below this share of data get a warning: 90 % (common practice, no source).
inline constexpr double kMinMonthCoverage = 0.9;

/// Coverage of every local month (on the clock of `zone`) that overlaps [start, end), in order;
/// empty when end <= start.
std::vector<MonthCoverage> month_coverage(const RainSeries& rain, Instant start, Instant end,
                                          const TimeZone& zone);

/// One warning per month below kMinMonthCoverage, e.g. `rain data cover 85.2 % of 2025-04
/// (below 90 %): that month's rain and yield are understated`.
std::vector<std::string> coverage_warnings(const std::vector<MonthCoverage>& months);

}  // namespace gutterwatt
