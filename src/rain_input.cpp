#include "gutterwatt/rain_input.hpp"

#include <algorithm>
#include <array>
#include <cassert>
#include <charconv>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <limits>
#include <string_view>
#include <unordered_map>
#include <utility>

#include "detail.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/units.hpp"
#include "rain_csv.hpp"

namespace gutterwatt {
namespace {

constexpr std::size_t kMaxGapWarnings = 20;

using detail::format_number;
using detail::kDates;
using detail::kSeriesStamps;
using detail::kTipStamps;
using detail::parse_amount;
using detail::scan_rows;
using detail::StampReader;

// Exact summation: the running sum is held as non-overlapping partials and rounded once at the
// end. Source: Shewchuk (1997), Adaptive precision floating-point arithmetic and fast robust
// geometric predicates, Discrete Comput. Geom. 18, 305-363 (grow-expansion, Theorem 13).
class ExactSum {
 public:
  void add(double x) {
    std::size_t kept = 0;
    for (double y : partials_) {
      if (std::abs(x) < std::abs(y)) std::swap(x, y);
      const double high = x + y;
      const double low = y - (high - x);
      if (low != 0.0) partials_[kept++] = low;
      x = high;
    }
    partials_.resize(kept);
    partials_.push_back(x);
  }

  // Adds the partials from the largest down and stops at the first inexact step; the last
  // correction keeps round-half-to-even right when the remaining partials tip a tie.
  double value() const {
    std::size_t n = partials_.size();
    if (n == 0) return 0.0;
    double high = partials_[--n];
    double low = 0.0;
    while (n > 0) {
      const double x = high;
      const double y = partials_[--n];
      high = x + y;
      low = y - (high - x);
      if (low != 0.0) break;
    }
    if (n > 0 && ((low < 0.0 && partials_[n - 1] < 0.0) || (low > 0.0 && partials_[n - 1] > 0.0))) {
      const double y = low * 2.0;
      const double x = high + y;
      if (y == x - high) high = x;
    }
    return high;
  }

 private:
  std::vector<double> partials_;
};

// One data row of a series file, as read.
struct SeriesRow {
  Instant time;
  double value;  ///< as written, in the file's unit
  int line;
  int offset_s;
};

// Rows read before the step is known, when the scenario does not give it: the step is the most
// common spacing among them, so a long record is not held in memory row by row.
constexpr std::size_t kStepInferenceRows = 4096;

Instant checked_step(const std::string& file_label, double step_s) {
  if (!std::isfinite(step_s) || step_s < 1.0 || step_s != std::floor(step_s) || step_s > 1e12) {
    throw InputError(
        file_label, 0, "step",
        "must be a whole number of seconds, at least 1 (got " + format_number(step_s) + " s)");
  }
  return static_cast<Instant>(step_s);
}

// The most common spacing of consecutive stamps; ties go to the smallest.
Instant inferred_step(const std::vector<SeriesRow>& rows, const std::string& file_label,
                      const SeriesFormat& fmt) {
  if (rows.size() < 2) {
    throw InputError(file_label, rows.front().line, fmt.time_column,
                     "cannot tell the record step from a single row; give it in the scenario "
                     "(rain.step, e.g. 5min)");
  }
  std::unordered_map<Instant, std::size_t> counts;
  for (std::size_t k = 1; k < rows.size(); ++k) ++counts[rows[k].time - rows[k - 1].time];
  Instant best = 0;
  std::size_t best_count = 0;
  for (const auto& [spacing, count] : counts) {
    if (count > best_count || (count == best_count && spacing < best)) {
      best = spacing;
      best_count = count;
    }
  }
  return best;
}

std::string gap_text(Instant start, int start_offset_s, Instant end, int end_offset_s) {
  return "gap in the record from " + format_iso8601(start, start_offset_s) + " to " +
         format_iso8601(end, end_offset_s) + " (" + format_duration(end - start) + " with no rows)";
}

// The gaps of one record as its rows reveal them: thrown under `gaps: error`, otherwise kept,
// warned about one by one up to kMaxGapWarnings and summed up in one more warning at the end.
class GapNotes {
 public:
  GapNotes(const std::string& file_label, const SeriesFormat& fmt)
      : file_label_(file_label), fmt_(fmt) {}

  // The gap [start, end) found at `line`; the offsets are those of the stamps either side.
  void note(RainSeries& series, Instant start, int start_offset_s, Instant end, int end_offset_s,
            int line) {
    const std::string text = gap_text(start, start_offset_s, end, end_offset_s);
    if (fmt_.gaps == GapPolicy::error) {
      throw InputError(file_label_, line, fmt_.time_column,
                       text +
                           "; set rain.gaps: zero to count gaps as dry, or rain.gaps: skip to "
                           "leave them out");
    }
    series.gaps.push_back({start, end});
    total_s_ += end - start;
    if (series.gaps.size() <= kMaxGapWarnings) {
      series.warnings.push_back(file_label_ + ":" + std::to_string(line) + ": " + text + fate());
    }
  }

  void finish(RainSeries& series) const {
    if (series.gaps.size() <= kMaxGapWarnings) return;
    const std::size_t more = series.gaps.size() - kMaxGapWarnings;
    series.warnings.push_back(file_label_ + ": " + std::to_string(more) +
                              " more gaps in the record (" + std::to_string(series.gaps.size()) +
                              " gaps, " + format_duration(total_s_) + " in all)" + fate());
  }

 private:
  const char* fate() const {
    return fmt_.gaps == GapPolicy::zero ? ", counted as dry" : ", left out of the simulation";
  }

  const std::string& file_label_;
  const SeriesFormat& fmt_;
  Instant total_s_ = 0;
};

// Rejects a value implying `intensity_mm_per_h`, above kMaxRainIntensity_mm_per_h; `got` says
// what the file gave.
[[noreturn]] void implausible_intensity(const std::string& file, int line,
                                        const std::string& column, double intensity_mm_per_h,
                                        const std::string& got) {
  throw InputError(file, line, column,
                   "implausible intensity " + format_number(intensity_mm_per_h) + " mm/h (got " +
                       got + "; the limit is " + format_number(kMaxRainIntensity_mm_per_h) +
                       " mm/h)");
}

// Adds [start, end) to the covered spans, extending the last one when the two touch.
void extend_covered(std::vector<TimeSpan>& covered, Instant start, Instant end) {
  if (!covered.empty() && covered.back().end == start) {
    covered.back().end = end;
  } else {
    covered.push_back({start, end});
  }
}

using detail::kDay_s;

}  // namespace

double sum_depths_m(const std::vector<RainPulse>& pulses) {
  ExactSum sum;
  for (const RainPulse& p : pulses) sum.add(p.depth_m);
  return sum.value();
}

namespace {

// Turns series rows, in order, into the record: intervals, gaps, coverage and pulses.
class SeriesBuilder {
 public:
  SeriesBuilder(const std::string& file_label, const SeriesFormat& fmt, Instant step)
      : file_label_(file_label), fmt_(fmt), step_(step), gaps_(file_label, fmt) {
    series_.policy = fmt.gaps;
    series_.step_s = step;
  }

  void add(const SeriesRow& row) {
    const Instant end = row.time;
    Instant start = end - step_;
    // Rows a step apart: on the local clock for a step of whole days in a zone with daylight
    // saving, so that each interval is a calendar day (23 or 25 h across a change), in elapsed
    // time otherwise.
    const bool calendar = step_ % kDay_s == 0 && !fmt_.zone.fixed();
    const Instant local_end = end + row.offset_s;
    if (calendar) start = fmt_.zone.from_local(local_end - step_).first;
    if (has_previous_ && (calendar ? local_end - (previous_.time + previous_.offset_s)
                                   : end - previous_.time) <= step_) {
      start = previous_.time;
    } else if (has_previous_) {
      gaps_.note(series_, previous_.time, previous_.offset_s, start, row.offset_s, row.line);
    }
    extend_covered(series_.covered, start, end);
    previous_ = row;
    has_previous_ = true;
    // Most rows of a record are dry: no depth, no intensity to check, no pulse.
    if (row.value == 0.0) return;
    const bool intensity = fmt_.value == RainValue::intensity;
    const auto length_s = static_cast<double>(end - start);
    const double depth_m = intensity ? row.value * fmt_.unit_m * (length_s / kSecondsPerHour)
                                     : row.value * fmt_.unit_m;
    const double intensity_mm_per_h = intensity
                                          ? row.value * fmt_.unit_m / kMetresPerMm
                                          : depth_m / kMetresPerMm * (kSecondsPerHour / length_s);
    if (intensity_mm_per_h > kMaxRainIntensity_mm_per_h) {
      const std::string got = intensity ? format_number(row.value) + " " + fmt_.unit_name + "/h"
                                        : format_number(row.value) + " " + fmt_.unit_name + " in " +
                                              format_duration(end - start);
      implausible_intensity(file_label_, row.line, fmt_.value_column, intensity_mm_per_h, got);
    }
    if (depth_m > 0.0) {
      series_.pulses.push_back({start, end, depth_m});
      total_.add(depth_m);
    }
  }

  const RainSeries& so_far() const { return series_; }

  RainSeries finish() {
    gaps_.finish(series_);
    series_.total_depth_m = total_.value();
    return std::move(series_);
  }

 private:
  const std::string& file_label_;
  const SeriesFormat& fmt_;
  Instant step_;
  GapNotes gaps_;
  RainSeries series_;
  ExactSum total_;
  SeriesRow previous_{};
  bool has_previous_ = false;
};

}  // namespace

RainSeries read_rain_series(std::istream& in, const std::string& file_label,
                            const SeriesFormat& fmt, const SeriesProgress& progress) {
  // Rows stream into the builder once the step is known, so memory holds the wet intervals
  // only, not every row of the record.
  std::optional<SeriesBuilder> builder;
  if (fmt.step_s) builder.emplace(file_label, fmt, checked_step(file_label, *fmt.step_s));
  std::vector<SeriesRow> head;
  const auto start_building = [&] {
    builder.emplace(file_label, fmt, inferred_step(head, file_label, fmt));
    for (const SeriesRow& row : head) builder->add(row);
    head = {};
  };
  StampReader stamps(file_label, fmt, kSeriesStamps);
  std::size_t rows_since_progress = 0;
  scan_rows(in, file_label, fmt, {fmt.time_column, fmt.value_column},
            [&](const std::vector<std::string_view>& fields, int line_number) {
              const ParsedTime stamp = stamps.read(fields[0], line_number);
              const SeriesRow row{
                  stamp.instant,
                  parse_amount(fields[1], file_label, line_number, fmt.value_column, fmt.decimal),
                  line_number, stamp.offset_s};
              if (builder) {
                builder->add(row);
                if (progress && ++rows_since_progress == kProgressRows) {
                  progress(builder->so_far());
                  rows_since_progress = 0;
                }
                return;
              }
              head.push_back(row);
              if (head.size() == kStepInferenceRows) start_building();
            });
  if (!builder) start_building();
  return builder->finish();
}

TipLog read_tip_log(std::istream& in, const std::string& file_label, const SeriesFormat& fmt) {
  TipLog log;
  log.label = file_label;
  log.time_column = fmt.time_column;
  StampReader stamps(file_label, fmt, kTipStamps);
  scan_rows(in, file_label, fmt, {fmt.time_column},
            [&](const std::vector<std::string_view>& fields, int line_number) {
              log.times.push_back(stamps.read(fields[0], line_number).instant);
              log.lines.push_back(line_number);
            });
  return log;
}

RainSeries spread_tips(const std::vector<TipLog>& logs, const TipSpreading& tips,
                       GapPolicy policy) {
  assert(tips.tip_depth_m > 0.0 && tips.cap_s >= 1);
  std::vector<const TipLog*> order;
  for (const TipLog& log : logs) {
    if (!log.times.empty()) order.push_back(&log);
  }
  std::sort(order.begin(), order.end(),
            [](const TipLog* a, const TipLog* b) { return a->times.front() < b->times.front(); });
  for (std::size_t k = 1; k < order.size(); ++k) {
    const TipLog& earlier = *order[k - 1];
    const TipLog& later = *order[k];
    if (later.times.front() <= earlier.times.back()) {
      throw InputError(later.label, 0, "rain.files",
                       "overlaps " + earlier.label + " from " +
                           format_iso8601(later.times.front()) + " to " +
                           format_iso8601(std::min(earlier.times.back(), later.times.back())) +
                           " (UTC); each period must come from one file");
    }
  }

  RainSeries series;
  series.policy = policy;
  series.step_s = tips.cap_s;
  ExactSum total;
  std::optional<Instant> previous;
  for (const TipLog* log : order) {
    const std::vector<Instant>& times = log->times;
    for (std::size_t k = 0; k < times.size();) {
      const Instant end = times[k];
      std::size_t count = 0;
      for (; k < times.size() && times[k] == end; ++k) ++count;
      const Instant start = previous ? std::max(*previous, end - tips.cap_s) : end - tips.cap_s;
      const double depth_m = static_cast<double>(count) * tips.tip_depth_m;
      const double intensity_mm_per_h =
          depth_m / kMetresPerMm * (kSecondsPerHour / static_cast<double>(end - start));
      if (intensity_mm_per_h > kMaxRainIntensity_mm_per_h) {
        implausible_intensity(log->label, log->lines[k - 1], log->time_column, intensity_mm_per_h,
                              std::to_string(count) + (count == 1 ? " tip" : " tips") + " of " +
                                  format_number(tips.tip_depth_m / kMetresPerMm) + " mm in " +
                                  format_duration(end - start));
      }
      series.pulses.push_back({start, end, depth_m});
      total.add(depth_m);
      if (series.covered.empty()) {
        series.covered.push_back({start, end});
      } else {
        series.covered.back().end = end;  // dry time between tips is data too
      }
      previous = end;
    }
  }
  series.total_depth_m = total.value();
  return series;
}

RainSeries read_rain_tips(std::istream& in, const std::string& file_label, const SeriesFormat& fmt,
                          const TipSpreading& tips) {
  return spread_tips({read_tip_log(in, file_label, fmt)}, tips, fmt.gaps);
}

RainSeries read_rain_daily(std::istream& in, const std::string& file_label, const SeriesFormat& fmt,
                           const DayWindow& window) {
  RainSeries series;
  series.policy = fmt.gaps;
  series.step_s = kDay_s;
  series.warnings.emplace_back(kDailyWarning);
  GapNotes gaps(file_label, fmt);
  ExactSum total;
  int previous_offset_s = 0;
  StampReader dates(file_label, fmt, kDates);
  scan_rows(in, file_label, fmt, {fmt.time_column, fmt.value_column},
            [&](const std::vector<std::string_view>& fields, int line_number) {
              const ParsedTime date = dates.read(fields[0], line_number);
              const double value =
                  parse_amount(fields[1], file_label, line_number, fmt.value_column, fmt.decimal);
              const Instant start = date.instant;
              const Instant end = start + kDay_s;
              if (!series.covered.empty() && series.covered.back().end < start) {
                gaps.note(series, series.covered.back().end, previous_offset_s, start,
                          date.offset_s, line_number);
              }
              extend_covered(series.covered, start, end);
              previous_offset_s = date.offset_s;

              const double depth_m = value * fmt.unit_m;
              const double intensity_mm_per_h =
                  depth_m / kMetresPerMm *
                  (kSecondsPerHour / static_cast<double>(window.duration_s));
              if (intensity_mm_per_h > kMaxRainIntensity_mm_per_h) {
                implausible_intensity(file_label, line_number, fmt.value_column, intensity_mm_per_h,
                                      format_number(value) + " " + fmt.unit_name + " in " +
                                          format_duration(window.duration_s));
              }
              if (depth_m == 0.0) return;
              const Instant rain_start = start + window.start_s;
              series.pulses.push_back({rain_start, rain_start + window.duration_s, depth_m});
              total.add(depth_m);
            });
  gaps.finish(series);
  series.total_depth_m = total.value();
  return series;
}

std::vector<MonthCoverage> month_coverage(const RainSeries& rain, Instant start, Instant end,
                                          const TimeZone& zone) {
  std::vector<MonthCoverage> out;
  if (end <= start) return out;
  const CivilTime first = to_civil(start, zone);
  auto span = rain.covered.begin();
  for (int k = 0;; ++k) {
    const Instant month_begin = month_start(first.year, first.month + k, zone);
    if (month_begin >= end) break;
    MonthCoverage m;
    m.month = month_label(month_begin, zone);
    m.start = std::max(start, month_begin);
    m.end = std::min(end, month_start(first.year, first.month + k + 1, zone));
    m.covered_s = 0;
    while (span != rain.covered.end() && span->end <= m.start) ++span;
    for (auto s = span; s != rain.covered.end() && s->start < m.end; ++s) {
      m.covered_s += std::min(s->end, m.end) - std::max(s->start, m.start);
    }
    m.fraction = static_cast<double>(m.covered_s) / static_cast<double>(m.end - m.start);
    out.push_back(m);
  }
  return out;
}

std::vector<std::string> coverage_warnings(const std::vector<MonthCoverage>& months) {
  std::vector<std::string> out;
  for (const MonthCoverage& m : months) {
    if (m.fraction >= kMinMonthCoverage) continue;
    // Rounded down, so that 89.96 % does not read as 90.0 %.
    char percent[16];
    std::snprintf(percent, sizeof percent, "%.1f", std::floor(m.fraction * 1000.0) / 10.0);
    out.push_back("rain data cover " + std::string(percent) + " % of " + m.month + " (below " +
                  format_number(kMinMonthCoverage * 100.0) +
                  " %): that month's rain and yield are understated");
  }
  return out;
}

}  // namespace gutterwatt
