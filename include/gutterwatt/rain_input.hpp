#pragma once
/// Rain records in, plain rain series out. Readers take a stream so tests can pass strings.

#include <cstdint>
#include <istream>
#include <optional>
#include <string>
#include <vector>

#include "gutterwatt/calendar.hpp"

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
  /// Nominal record step; when absent, the most common spacing of the timestamps.
  std::optional<double> step_s;
  GapPolicy gaps = GapPolicy::error;
  /// Offset applied to naive timestamps, seconds east of UTC.
  int utc_offset_s = 0;
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

/// Reads a period-ending CSV: each row's value belongs to the interval that ends at its
/// timestamp, of length the nominal step (or the time since the previous row when shorter).
/// A longer spacing is a gap, handled by `fmt.gaps`: `error` throws, `zero` counts it as dry,
/// `skip` leaves it out of the simulated time. Accepts a UTF-8 byte-order mark, CRLF line ends,
/// quoted header names and blank lines. Throws InputError naming `file_label`, the line and the
/// column for anything it cannot take.
///
/// Details: the header is the first line that is neither blank nor a `#` comment; columns are
/// found by name and others are ignored; a quoted field may not span lines. The first row covers
/// (T0 - step, T0]. Timestamps must strictly increase; naive ones are taken at `fmt.utc_offset_s`,
/// and a file may not mix naive stamps with stamps that carry an offset. Without `fmt.step_s` the
/// step is the most common spacing of consecutive stamps (ties: the smallest), which needs at
/// least two rows. Values must be finite, not negative, and imply at most
/// kMaxRainIntensity_mm_per_h over their interval.
///
/// Example:
///   std::istringstream csv("time,rain_mm\n2025-03-01T00:05,0.2\n2025-03-01T00:10,0\n");
///   RainSeries rain = read_rain_series(csv, "rain.csv", SeriesFormat{});
///   // rain.pulses == {{T0 - 300, T0, 0.2e-3}}, rain.covered == {{T0 - 300, T0 + 300}}
RainSeries read_rain_series(std::istream& in, const std::string& file_label,
                            const SeriesFormat& fmt);

}  // namespace gutterwatt
