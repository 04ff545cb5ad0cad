#include "gutterwatt/rain_input.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstring>
#include <string_view>
#include <unordered_map>
#include <utility>

#include "gutterwatt/error.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt {
namespace {

constexpr std::size_t kChunkBytes = std::size_t{1} << 20;
constexpr std::size_t kMaxGapWarnings = 20;
constexpr std::size_t kMaxQuotedChars = 40;
constexpr std::string_view kByteOrderMark = "\xEF\xBB\xBF";

// Hands out the lines of a stream, reading it in large chunks into one reused buffer. A line
// stays valid until the next call. Line ends (LF or CRLF) are removed.
class LineReader {
 public:
  explicit LineReader(std::istream& in) : in_(in), buffer_(kChunkBytes) {}

  bool next(std::string_view& line) {
    for (;;) {
      const char* const first = buffer_.data() + begin_;
      const void* newline = std::memchr(first, '\n', end_ - begin_);
      if (newline != nullptr) {
        const auto length = static_cast<std::size_t>(static_cast<const char*>(newline) - first);
        line = std::string_view(first, length);
        begin_ += length + 1;
        drop_carriage_return(line);
        return true;
      }
      if (at_end_) {
        if (begin_ == end_) return false;
        line = std::string_view(first, end_ - begin_);
        begin_ = end_;
        drop_carriage_return(line);
        return true;
      }
      refill();
    }
  }

  bool failed() const { return in_.bad(); }

 private:
  static void drop_carriage_return(std::string_view& line) {
    if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
  }

  void refill() {
    const std::size_t kept = end_ - begin_;
    if (begin_ > 0) std::memmove(buffer_.data(), buffer_.data() + begin_, kept);
    begin_ = 0;
    end_ = kept;
    if (end_ == buffer_.size()) buffer_.resize(buffer_.size() * 2);  // one very long line
    in_.read(buffer_.data() + end_, static_cast<std::streamsize>(buffer_.size() - end_));
    const auto got = static_cast<std::size_t>(in_.gcount());
    end_ += got;
    if (got == 0 || !in_) at_end_ = true;
  }

  std::istream& in_;
  std::vector<char> buffer_;
  std::size_t begin_ = 0;
  std::size_t end_ = 0;
  bool at_end_ = false;
};

bool is_blank(char c) { return c == ' ' || c == '\t'; }

std::string_view trim_blanks(std::string_view text) {
  while (!text.empty() && is_blank(text.front())) text.remove_prefix(1);
  while (!text.empty() && is_blank(text.back())) text.remove_suffix(1);
  return text;
}

// Takes the next comma-separated field off the front of `rest`. The field comes back without the
// blanks around it and without enclosing double quotes (a doubled quote inside stays doubled).
// `more` turns false at the line's last field.
std::string_view next_field(std::string_view& rest, bool& more) {
  std::size_t start = 0;
  while (start < rest.size() && is_blank(rest[start])) ++start;
  if (start < rest.size() && rest[start] == '"') {
    std::size_t close = start + 1;
    for (;;) {
      close = rest.find('"', close);
      if (close == std::string_view::npos || close + 1 >= rest.size() || rest[close + 1] != '"') {
        break;
      }
      close += 2;
    }
    if (close == std::string_view::npos) {
      const std::string_view field = rest.substr(start + 1);
      rest = {};
      more = false;
      return field;
    }
    const std::string_view field = rest.substr(start + 1, close - start - 1);
    const std::size_t comma = rest.find(',', close + 1);
    more = comma != std::string_view::npos;
    rest = more ? rest.substr(comma + 1) : std::string_view{};
    return field;
  }
  const std::size_t comma = rest.find(',', start);
  more = comma != std::string_view::npos;
  const std::string_view field = trim_blanks(rest.substr(start, more ? comma - start : rest.npos));
  rest = more ? rest.substr(comma + 1) : std::string_view{};
  return field;
}

std::string unescape_quotes(std::string_view field) {
  std::string out;
  out.reserve(field.size());
  for (std::size_t i = 0; i < field.size(); ++i) {
    out += field[i];
    if (field[i] == '"' && i + 1 < field.size() && field[i + 1] == '"') ++i;
  }
  return out;
}

// `"text"` for messages, shortened when long.
std::string quoted(std::string_view text) {
  if (text.size() > kMaxQuotedChars) {
    return "\"" + std::string(text.substr(0, kMaxQuotedChars)) + "...\"";
  }
  return "\"" + std::string(text) + "\"";
}

// Six significant digits, like printf's %g, for numbers in messages.
std::string format_number(double value) {
  char buffer[64];
  const auto result =
      std::to_chars(buffer, buffer + sizeof buffer, value, std::chars_format::general, 6);
  return std::string(buffer, result.ptr);
}

bool is_comment_or_blank(std::string_view line) {
  const std::string_view trimmed = trim_blanks(line);
  return trimmed.empty() || trimmed.front() == '#';
}

// Line numbers and offsets change rarely from row to row, so they are kept as marks at the rows
// where the simple rule (next line, same offset) stops holding.
struct RowMark {
  std::size_t row;
  std::int64_t value;
};

const RowMark& mark_for(const std::vector<RowMark>& marks, std::size_t row) {
  const auto after = std::upper_bound(marks.begin(), marks.end(), row,
                                      [](std::size_t r, const RowMark& m) { return r < m.row; });
  return *(after - 1);
}

int line_of(const std::vector<RowMark>& line_marks, std::size_t row) {
  const RowMark& mark = mark_for(line_marks, row);
  return static_cast<int>(mark.value + static_cast<std::int64_t>(row - mark.row));
}

int offset_of(const std::vector<RowMark>& offset_marks, std::size_t row) {
  return static_cast<int>(mark_for(offset_marks, row).value);
}

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

struct Header {
  std::size_t time_index = 0;
  std::size_t value_index = 0;
};

Header read_header(std::string_view line, int line_number, const std::string& file_label,
                   const SeriesFormat& fmt) {
  std::vector<std::string> names;
  std::string_view rest = line;
  bool more = true;
  while (more) names.push_back(unescape_quotes(next_field(rest, more)));

  const auto find_column = [&](const std::string& wanted) {
    std::size_t found = names.size();
    for (std::size_t i = 0; i < names.size(); ++i) {
      if (names[i] != wanted) continue;
      if (found != names.size()) {
        throw InputError(file_label, line_number, wanted,
                         "appears twice in the header (columns " + std::to_string(found + 1) +
                             " and " + std::to_string(i + 1) + ")");
      }
      found = i;
    }
    if (found == names.size()) {
      std::string list;
      for (const std::string& name : names) {
        if (!list.empty()) list += ", ";
        list += quoted(name);
      }
      throw InputError(file_label, line_number, wanted,
                       "no such column in the header (found " + list + ")");
    }
    return found;
  };
  Header header;
  header.time_index = find_column(fmt.time_column);
  header.value_index = find_column(fmt.value_column);
  return header;
}

// What the first pass keeps of each data row.
struct Rows {
  std::vector<Instant> times;
  std::vector<double> values;  ///< as written, in the file's unit
  std::vector<RowMark> line_marks;
  std::vector<RowMark> offset_marks;
  int header_line = 0;
};

class RowParser {
 public:
  RowParser(const std::string& file_label, const SeriesFormat& fmt, const Header& header,
            Rows& rows)
      : file_(file_label), fmt_(fmt), header_(header), rows_(rows) {
    last_index_ = std::max(header.time_index, header.value_index);
  }

  void parse(std::string_view line, int line_number) {
    std::string_view time_text;
    std::string_view value_text;
    std::string_view rest = line;
    bool more = true;
    std::size_t index = 0;
    for (; more && index <= last_index_; ++index) {
      const std::string_view field = next_field(rest, more);
      if (index == header_.time_index) time_text = field;
      if (index == header_.value_index) value_text = field;
    }
    if (index <= last_index_) report_missing_field(index, line_number);

    const Instant instant = parse_time(time_text, line_number);
    const double value = parse_value(value_text, line_number);

    const std::size_t row = rows_.times.size();
    if (row == 0 || line_number != previous_line_ + 1) {
      rows_.line_marks.push_back({row, line_number});
    }
    if (row == 0 || offset_s_ != previous_offset_s_) rows_.offset_marks.push_back({row, offset_s_});
    rows_.times.push_back(instant);
    rows_.values.push_back(value);
    previous_line_ = line_number;
    previous_offset_s_ = offset_s_;
    previous_text_.assign(time_text);
  }

 private:
  [[noreturn]] void report_missing_field(std::size_t field_count, int line_number) const {
    const bool time_missing = header_.time_index >= field_count;
    const std::string& column = time_missing ? fmt_.time_column : fmt_.value_column;
    const std::size_t wanted = (time_missing ? header_.time_index : header_.value_index) + 1;
    throw InputError(file_, line_number, column,
                     "missing (the row has " + std::to_string(field_count) +
                         (field_count == 1 ? " field" : " fields") + ", the column is field " +
                         std::to_string(wanted) + ")");
  }

  Instant parse_time(std::string_view text, int line_number) {
    const std::optional<ParsedTime> parsed = parse_iso8601(text, fmt_.utc_offset_s);
    if (!parsed) {
      throw InputError(
          file_, line_number, fmt_.time_column,
          "not an ISO 8601 date-time such as 2025-03-01T00:05 (got " + quoted(text) + ")");
    }
    if (rows_.times.empty()) {
      first_has_offset_ = parsed->has_offset;
      first_line_ = line_number;
    } else {
      if (parsed->has_offset != first_has_offset_) {
        throw InputError(file_, line_number, fmt_.time_column,
                         "mixed time zones: " + quoted(text) +
                             (parsed->has_offset ? " has a UTC offset but the stamp on line " +
                                                       std::to_string(first_line_) + " has none"
                                                 : " has no UTC offset but the stamp on line " +
                                                       std::to_string(first_line_) + " has one"));
      }
      const Instant previous = rows_.times.back();
      if (parsed->instant == previous) {
        throw InputError(file_, line_number, fmt_.time_column,
                         quoted(text) + " is the same instant as the previous stamp " +
                             quoted(previous_text_) + " (line " + std::to_string(previous_line_) +
                             ")");
      }
      if (parsed->instant < previous) {
        throw InputError(file_, line_number, fmt_.time_column,
                         quoted(text) + " is earlier than the previous stamp " +
                             quoted(previous_text_) + " (line " + std::to_string(previous_line_) +
                             "); rows must be in time order");
      }
    }
    offset_s_ = parsed->offset_s;
    return parsed->instant;
  }

  double parse_value(std::string_view text, int line_number) const {
    std::string_view digits = text;
    if (digits.size() > 1 && digits.front() == '+') digits.remove_prefix(1);
    double value = 0.0;
    const char* const end = digits.data() + digits.size();
    const auto [stop, ec] = std::from_chars(digits.data(), end, value);
    if (ec == std::errc::result_out_of_range && stop == end) {
      // Too small for a double (1e-400) is no rain; too large (1e400) is not a finite amount.
      const bool underflow = digits.find("e-") != digits.npos || digits.find("E-") != digits.npos;
      if (underflow && digits.front() != '-') return 0.0;
      throw InputError(file_, line_number, fmt_.value_column,
                       (underflow ? "must not be negative (got " + std::string(text) + ")"
                                  : "not a finite number (got " + quoted(text) + ")"));
    }
    if (ec != std::errc{} || stop != end || digits.empty() || std::isnan(value)) {
      throw InputError(file_, line_number, fmt_.value_column,
                       "not a number (got " + quoted(text) + ")");
    }
    if (std::isinf(value)) {
      throw InputError(file_, line_number, fmt_.value_column,
                       "not a finite number (got " + quoted(text) + ")");
    }
    if (value < 0.0) {
      throw InputError(file_, line_number, fmt_.value_column,
                       "must not be negative (got " + std::string(text) + ")");
    }
    return value == 0.0 ? 0.0 : value;  // -0 becomes 0
  }

  const std::string& file_;
  const SeriesFormat& fmt_;
  const Header& header_;
  Rows& rows_;
  std::size_t last_index_ = 0;
  int previous_line_ = 0;
  int previous_offset_s_ = 0;
  int offset_s_ = 0;
  bool first_has_offset_ = false;
  int first_line_ = 0;
  std::string previous_text_;
};

Rows read_rows(std::istream& in, const std::string& file_label, const SeriesFormat& fmt) {
  LineReader reader(in);
  std::string_view line;
  int line_number = 0;
  std::optional<Header> header;
  std::optional<RowParser> parser;
  Rows rows;
  while (reader.next(line)) {
    ++line_number;
    if (line_number == 1 && line.substr(0, kByteOrderMark.size()) == kByteOrderMark) {
      line.remove_prefix(kByteOrderMark.size());
    }
    if (is_comment_or_blank(line)) continue;
    if (!header) {
      header = read_header(line, line_number, file_label, fmt);
      rows.header_line = line_number;
      parser.emplace(file_label, fmt, *header, rows);
      continue;
    }
    parser->parse(line, line_number);
  }
  if (reader.failed()) throw InputError(file_label, line_number, "", "read error");
  if (!header) {
    throw InputError(file_label, 1, "",
                     "empty file (expected a header row naming the columns " +
                         quoted(fmt.time_column) + " and " + quoted(fmt.value_column) + ")");
  }
  if (rows.times.empty()) throw InputError(file_label, rows.header_line, "", "no data rows");
  return rows;
}

Instant checked_step(const std::string& file_label, double step_s) {
  if (!std::isfinite(step_s) || step_s < 1.0 || step_s != std::floor(step_s) || step_s > 1e12) {
    throw InputError(
        file_label, 0, "step",
        "must be a whole number of seconds, at least 1 (got " + format_number(step_s) + " s)");
  }
  return static_cast<Instant>(step_s);
}

// The most common spacing of consecutive stamps; ties go to the smallest.
Instant inferred_step(const Rows& rows, const std::string& file_label, const SeriesFormat& fmt) {
  const std::vector<Instant>& times = rows.times;
  if (times.size() < 2) {
    throw InputError(file_label, line_of(rows.line_marks, 0), fmt.time_column,
                     "cannot tell the record step from a single row; give it in the scenario "
                     "(rain.step, e.g. 5min)");
  }
  std::unordered_map<Instant, std::size_t> counts;
  Instant run_spacing = times[1] - times[0];
  std::size_t run_length = 0;
  for (std::size_t k = 1; k < times.size(); ++k) {
    const Instant spacing = times[k] - times[k - 1];
    if (spacing != run_spacing) {
      counts[run_spacing] += run_length;
      run_spacing = spacing;
      run_length = 0;
    }
    ++run_length;
  }
  counts[run_spacing] += run_length;
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

}  // namespace

RainSeries read_rain_series(std::istream& in, const std::string& file_label,
                            const SeriesFormat& fmt) {
  const Rows rows = read_rows(in, file_label, fmt);
  const Instant step =
      fmt.step_s ? checked_step(file_label, *fmt.step_s) : inferred_step(rows, file_label, fmt);

  RainSeries series;
  series.policy = fmt.gaps;
  series.step_s = step;
  const char* const gap_fate =
      fmt.gaps == GapPolicy::zero ? ", counted as dry" : ", left out of the simulation";
  const bool intensity = fmt.value == RainValue::intensity;
  Instant gap_total_s = 0;
  ExactSum total;

  const std::vector<Instant>& times = rows.times;
  for (std::size_t k = 0; k < times.size(); ++k) {
    const Instant end = times[k];
    Instant start = end - step;
    if (k > 0 && end - times[k - 1] <= step) {
      start = times[k - 1];
    } else if (k > 0) {
      const Instant gap_start = times[k - 1];
      const int line = line_of(rows.line_marks, k);
      const std::string text = gap_text(gap_start, offset_of(rows.offset_marks, k - 1), start,
                                        offset_of(rows.offset_marks, k));
      if (fmt.gaps == GapPolicy::error) {
        throw InputError(file_label, line, fmt.time_column,
                         text +
                             "; set rain.gaps: zero to count gaps as dry, or rain.gaps: "
                             "skip to leave them out");
      }
      series.gaps.push_back({gap_start, start});
      gap_total_s += start - gap_start;
      if (series.gaps.size() <= kMaxGapWarnings) {
        series.warnings.push_back(file_label + ":" + std::to_string(line) + ": " + text + gap_fate);
      }
    }

    const double value = rows.values[k];
    const auto length_s = static_cast<double>(end - start);
    const double depth_m =
        intensity ? value * fmt.unit_m * (length_s / kSecondsPerHour) : value * fmt.unit_m;
    const double intensity_mm_per_h = intensity
                                          ? value * fmt.unit_m / kMetresPerMm
                                          : depth_m / kMetresPerMm * (kSecondsPerHour / length_s);
    if (intensity_mm_per_h > kMaxRainIntensity_mm_per_h) {
      const std::string got = intensity ? format_number(value) + " " + fmt.unit_name + "/h"
                                        : format_number(value) + " " + fmt.unit_name + " in " +
                                              format_duration(end - start);
      throw InputError(file_label, line_of(rows.line_marks, k), fmt.value_column,
                       "implausible intensity " + format_number(intensity_mm_per_h) +
                           " mm/h (got " + got + "; the limit is " +
                           format_number(kMaxRainIntensity_mm_per_h) + " mm/h)");
    }

    if (!series.covered.empty() && series.covered.back().end == start) {
      series.covered.back().end = end;
    } else {
      series.covered.push_back({start, end});
    }
    if (depth_m > 0.0) {
      series.pulses.push_back({start, end, depth_m});
      total.add(depth_m);
    }
  }

  if (series.gaps.size() > kMaxGapWarnings) {
    const std::size_t more = series.gaps.size() - kMaxGapWarnings;
    series.warnings.push_back(file_label + ": " + std::to_string(more) +
                              " more gaps in the record (" + std::to_string(series.gaps.size()) +
                              " gaps, " + format_duration(gap_total_s) + " in all)" + gap_fate);
  }
  series.total_depth_m = total.value();
  return series;
}

}  // namespace gutterwatt
