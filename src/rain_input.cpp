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

namespace gutterwatt {
namespace {

constexpr std::size_t kChunkBytes = std::size_t{1} << 20;
// Longest line a rain file may have: a record's rows are a few dozen bytes, and a file without
// line ends (binary data, a file saved with CR only) must not grow the buffer without bound.
constexpr std::size_t kMaxLineBytes = std::size_t{64} << 10;
constexpr std::size_t kMaxGapWarnings = 20;
constexpr std::size_t kMaxQuotedChars = 40;
constexpr std::string_view kByteOrderMark = "\xEF\xBB\xBF";

// Hands out the lines of a stream, reading it in large chunks into one reused buffer. A line
// stays valid until the next call. Line ends (LF or CRLF) are removed. A line longer than
// kMaxLineBytes ends the reading, with too_long() set.
class LineReader {
 public:
  explicit LineReader(std::istream& in) : in_(in), buffer_(kChunkBytes) {}

  bool next(std::string_view& line) {
    for (;;) {
      const char* const first = buffer_.data() + begin_;
      const void* newline = std::memchr(first, '\n', end_ - begin_);
      const std::size_t length =
          newline != nullptr ? static_cast<std::size_t>(static_cast<const char*>(newline) - first)
                             : end_ - begin_;
      if (length > kMaxLineBytes) {
        too_long_ = true;
        return false;
      }
      if (newline != nullptr) {
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
  bool too_long() const { return too_long_; }

 private:
  static void drop_carriage_return(std::string_view& line) {
    if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
  }

  void refill() {
    const std::size_t kept = end_ - begin_;
    if (begin_ > 0) std::memmove(buffer_.data(), buffer_.data() + begin_, kept);
    begin_ = 0;
    end_ = kept;
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
  bool too_long_ = false;
};

bool is_blank(char c) { return c == ' ' || c == '\t'; }

using detail::trim;

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
  const std::string_view field = trim(rest.substr(start, more ? comma - start : rest.npos));
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
  const std::string_view trimmed = trim(line);
  return trimmed.empty() || trimmed.front() == '#';
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

// The index of each wanted column in a header line, found by name; `count` is set to the number
// of columns the header names, and `unnamed` to the indexes of the columns without a name.
std::vector<std::size_t> find_columns(std::string_view line, int line_number,
                                      const std::string& file_label,
                                      const std::vector<std::string>& wanted, std::size_t& count,
                                      std::vector<std::size_t>& unnamed) {
  std::vector<std::string> names;
  std::string_view rest = line;
  bool more = true;
  while (more) names.push_back(unescape_quotes(next_field(rest, more)));
  count = names.size();
  unnamed.clear();
  for (std::size_t i = 0; i < names.size(); ++i) {
    if (trim(names[i]).empty()) unnamed.push_back(i);
  }

  const auto find_column = [&](const std::string& column) {
    std::size_t found = names.size();
    for (std::size_t i = 0; i < names.size(); ++i) {
      if (names[i] != column) continue;
      if (found != names.size()) {
        throw InputError(file_label, line_number, column,
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
      throw InputError(file_label, line_number, column,
                       "no such column in the header (found " + list + ")");
    }
    return found;
  };
  std::vector<std::size_t> indexes;
  for (const std::string& column : wanted) indexes.push_back(find_column(column));
  return indexes;
}

bool is_digits(std::string_view text) {
  return !text.empty() && text.find_first_not_of("0123456789") == std::string_view::npos;
}

// The fields of a row at `indexes` (header order of the wanted columns). Throws when the row is
// too short, naming the first column it lacks, and when it has a value beyond the header's
// `header_fields` columns (empty trailing fields are fine). Throws too for a whole number in a
// wanted column followed by digits in a column of the header without a name (`unnamed`): a
// decimal comma ("1,5") that the spare column would otherwise hide.
void take_fields(std::string_view line, int line_number, const std::string& file_label,
                 const std::vector<std::size_t>& indexes, const std::vector<std::string>& columns,
                 std::size_t header_fields, const std::vector<std::size_t>& unnamed,
                 std::vector<std::string_view>& fields) {
  const std::size_t last_index = indexes.size() == 2
                                     ? std::max(indexes[0], indexes[1])
                                     : *std::max_element(indexes.begin(), indexes.end());
  fields.resize(indexes.size());
  std::string_view rest = line;
  bool more = true;
  std::size_t index = 0;
  std::string_view previous;
  const auto check_spare = [&](std::string_view field) {
    if (unnamed.empty() || index == 0 || !is_digits(field) || !is_digits(previous)) return;
    if (std::find(unnamed.begin(), unnamed.end(), index) == unnamed.end()) return;
    for (std::size_t c = 0; c < indexes.size(); ++c) {
      if (indexes[c] != index - 1) continue;
      throw InputError(file_label, line_number, columns[c],
                       quoted(previous) + " and then " + quoted(field) +
                           " in the column without a name after it; a decimal comma (" +
                           std::string(previous) + "," + std::string(field) +
                           ")? write decimals with a point");
    }
  };
  for (; more && index <= last_index; ++index) {
    const std::string_view field = next_field(rest, more);
    check_spare(field);
    for (std::size_t c = 0; c < indexes.size(); ++c) {
      if (indexes[c] == index) fields[c] = field;
    }
    previous = field;
  }
  if (index > last_index) {
    // Most often a decimal comma ("0,2"), which would otherwise be read as its whole part.
    for (; more; ++index) {
      const std::string_view field = next_field(rest, more);
      check_spare(field);
      previous = field;
      if (index < header_fields || field.empty()) continue;
      throw InputError(file_label, line_number, "",
                       "the row has more fields than the " + std::to_string(header_fields) +
                           " columns of the header (field " + std::to_string(index + 1) + " is " +
                           quoted(field) + "); a decimal comma? write decimals with a point");
    }
    return;
  }
  std::size_t missing = 0;
  while (indexes[missing] < index) ++missing;
  throw InputError(file_label, line_number, columns[missing],
                   "missing (the row has " + std::to_string(index) +
                       (index == 1 ? " field" : " fields") + ", the column is field " +
                       std::to_string(indexes[missing] + 1) + ")");
}

// A depth or intensity as written: finite and not negative; too small for a double is no rain.
// Plain decimals ("0", "0.25", "12.7") as most records write them, without from_chars: with at
// most 15 digits the digits form an exact integer m and m / 10^k, one correctly rounded division
// of exact operands, is the nearest double to the decimal (Clinger 1990, How to read floating
// point numbers accurately, PLDI). Returns false for anything else.
bool parse_plain_decimal(std::string_view text, double& value) {
  static constexpr double kPowersOfTen[] = {1e0, 1e1, 1e2,  1e3,  1e4,  1e5,  1e6,  1e7,
                                            1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15};
  std::uint64_t mantissa = 0;
  int digits = 0;
  int decimals = -1;
  for (const char c : text) {
    if (c >= '0' && c <= '9') {
      mantissa = mantissa * 10 + static_cast<std::uint64_t>(c - '0');
      if (++digits > 15) return false;
      if (decimals >= 0) ++decimals;
    } else if (c == '.' && decimals < 0) {
      decimals = 0;
    } else {
      return false;
    }
  }
  if (digits == 0) return false;
  value = static_cast<double>(mantissa) / kPowersOfTen[decimals < 0 ? 0 : decimals];
  return true;
}

double parse_amount(std::string_view text, const std::string& file_label, int line_number,
                    const std::string& column) {
  double plain = 0.0;
  if (parse_plain_decimal(text, plain)) return plain;
  std::string_view digits = text;
  if (digits.size() > 1 && digits.front() == '+') digits.remove_prefix(1);
  double value = 0.0;
  const char* const end = digits.data() + digits.size();
  const auto [stop, ec] = std::from_chars(digits.data(), end, value);
  if (ec == std::errc::result_out_of_range && stop == end) {
    // Too small for a double (1e-400) is no rain; too large (1e400) is not a finite amount.
    const bool underflow = digits.find("e-") != digits.npos || digits.find("E-") != digits.npos;
    if (underflow && digits.front() != '-') return 0.0;
    throw InputError(file_label, line_number, column,
                     (underflow ? "must not be negative (got " + std::string(text) + ")"
                                : "not a finite number (got " + quoted(text) + ")"));
  }
  if (ec != std::errc{} || stop != end || digits.empty() || std::isnan(value)) {
    throw InputError(file_label, line_number, column, "not a number (got " + quoted(text) + ")");
  }
  if (std::isinf(value)) {
    throw InputError(file_label, line_number, column,
                     "not a finite number (got " + quoted(text) + ")");
  }
  if (value < 0.0) {
    throw InputError(file_label, line_number, column,
                     "must not be negative (got " + std::string(text) + ")");
  }
  return value == 0.0 ? 0.0 : value;  // -0 becomes 0
}

// Throws for a header line that shows the file is not text: UTF-16 (a spreadsheet's "Unicode
// text"), or any other file with NUL bytes.
void check_text(std::string_view line, int line_number, const std::string& file_label) {
  if (line.starts_with("\xFF\xFE") || line.starts_with("\xFE\xFF")) {
    throw InputError(file_label, line_number, "",
                     "UTF-16 text, not UTF-8; save the file as CSV in UTF-8 (or plain ASCII)");
  }
  if (line.find('\0') != std::string_view::npos) {
    throw InputError(file_label, line_number, "",
                     "binary data (a NUL byte on this line), not a CSV text file");
  }
}

// Words for the time column's messages: series stamps, tip stamps or dates.
struct StampWords {
  const char* expected;  ///< what a good value looks like
  const char* same;      ///< what an equal value is
  const char* noun;      ///< what one value is called
  bool repeats_allowed;
  bool dates_only;
};

constexpr StampWords kSeriesStamps{"an ISO 8601 date-time such as 2025-03-01T00:05",
                                   "the same instant as", "stamp", false, false};
constexpr StampWords kTipStamps{"an ISO 8601 date-time such as 2025-03-01T00:05",
                                "the same instant as", "stamp", true, false};
constexpr StampWords kDates{"a date such as 2025-03-01", "the same day as", "date", false, true};

// Parses the time column row by row and checks what holds across rows: one time-zone style per
// file, and time order.
class StampReader {
 public:
  StampReader(const std::string& file_label, const std::string& column, int default_offset_s,
              const StampWords& words)
      : file_(file_label), column_(column), default_offset_s_(default_offset_s), words_(words) {}

  ParsedTime read(std::string_view text, int line_number) {
    std::optional<ParsedTime> parsed = parse_iso8601(text, default_offset_s_);
    if (words_.dates_only && text.size() != 10) parsed.reset();
    if (!parsed) {
      throw InputError(file_, line_number, column_,
                       std::string("not ") + words_.expected + " (got " + quoted(text) + ")");
    }
    if (count_ == 0) {
      first_has_offset_ = parsed->has_offset;
      first_line_ = line_number;
    } else {
      if (parsed->has_offset != first_has_offset_) {
        throw InputError(file_, line_number, column_,
                         "mixed time zones: " + quoted(text) +
                             (parsed->has_offset ? " has a UTC offset but the stamp on line " +
                                                       std::to_string(first_line_) + " has none"
                                                 : " has no UTC offset but the stamp on line " +
                                                       std::to_string(first_line_) + " has one"));
      }
      // Built only on the error paths: this runs once per row of records of millions.
      const auto previous = [this] {
        return quoted(std::string_view(previous_text_.data(), previous_size_)) + " (line " +
               std::to_string(previous_line_) + ")";
      };
      if (parsed->instant == previous_ && !words_.repeats_allowed) {
        throw InputError(file_, line_number, column_,
                         quoted(text) + " is " + words_.same + " the previous " + words_.noun +
                             " " + previous());
      }
      if (parsed->instant < previous_) {
        throw InputError(file_, line_number, column_,
                         quoted(text) + " is earlier than the previous " + words_.noun + " " +
                             previous() + "; rows must be in time order");
      }
    }
    ++count_;
    previous_ = parsed->instant;
    previous_line_ = line_number;
    // A stamp longer than the buffer is cut in the message only; it parsed, so it is sane.
    previous_size_ = std::min(text.size(), previous_text_.size());
    std::memcpy(previous_text_.data(), text.data(), previous_size_);
    return *parsed;
  }

 private:
  const std::string& file_;
  const std::string& column_;
  int default_offset_s_;
  StampWords words_;
  std::size_t count_ = 0;
  Instant previous_ = 0;
  int previous_line_ = 0;
  bool first_has_offset_ = false;
  int first_line_ = 0;
  std::array<char, 64> previous_text_{};  // no allocation per row
  std::size_t previous_size_ = 0;
};

// Reads the header (the first line that is neither blank nor a comment) and hands each data row
// to `on_row(fields, line_number)`, the fields in the order of `columns`. Throws for an empty
// file, a file without data rows and a read error.
template <class OnRow>
void scan_rows(std::istream& in, const std::string& file_label,
               const std::vector<std::string>& columns, OnRow&& on_row) {
  LineReader reader(in);
  std::string_view line;
  int line_number = 0;
  int header_line = 0;
  std::vector<std::size_t> indexes;
  std::size_t header_fields = 0;
  std::vector<std::size_t> unnamed;
  std::vector<std::string_view> fields;
  std::size_t rows = 0;
  while (reader.next(line)) {
    ++line_number;
    if (line_number == 1 && line.substr(0, kByteOrderMark.size()) == kByteOrderMark) {
      line.remove_prefix(kByteOrderMark.size());
    }
    if (is_comment_or_blank(line)) continue;
    if (header_line == 0) {
      check_text(line, line_number, file_label);
      indexes = find_columns(line, line_number, file_label, columns, header_fields, unnamed);
      header_line = line_number;
      continue;
    }
    take_fields(line, line_number, file_label, indexes, columns, header_fields, unnamed, fields);
    on_row(fields, line_number);
    ++rows;
  }
  if (reader.failed()) {
    throw InputError(file_label, line_number, "",
                     "the file could not be read past this line (an input/output error)");
  }
  if (reader.too_long()) {
    throw InputError(file_label, line_number + 1, "",
                     "a line longer than " + std::to_string(kMaxLineBytes >> 10) +
                         " KiB; a rain record's lines are short (binary data, or line ends "
                         "other than LF or CRLF?)");
  }
  if (header_line == 0) {
    std::string names;
    for (std::size_t c = 0; c < columns.size(); ++c) {
      if (c > 0) names += c + 1 == columns.size() ? " and " : ", ";
      names += quoted(columns[c]);
    }
    throw InputError(file_label, 1, "",
                     "empty file (expected a header row naming the column" +
                         std::string(columns.size() > 1 ? "s " : " ") + names + ")");
  }
  if (rows == 0) throw InputError(file_label, header_line, "", "no data rows");
}

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
    if (has_previous_ && end - previous_.time <= step_) {
      start = previous_.time;
    } else if (has_previous_) {
      gaps_.note(series_, previous_.time, previous_.offset_s, start, row.offset_s, row.line);
    }
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
    extend_covered(series_.covered, start, end);
    if (depth_m > 0.0) {
      series_.pulses.push_back({start, end, depth_m});
      total_.add(depth_m);
    }
    previous_ = row;
    has_previous_ = true;
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
  StampReader stamps(file_label, fmt.time_column, fmt.utc_offset_s, kSeriesStamps);
  std::size_t rows_since_progress = 0;
  scan_rows(in, file_label, {fmt.time_column, fmt.value_column},
            [&](const std::vector<std::string_view>& fields, int line_number) {
              const ParsedTime stamp = stamps.read(fields[0], line_number);
              const SeriesRow row{
                  stamp.instant, parse_amount(fields[1], file_label, line_number, fmt.value_column),
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
  StampReader stamps(file_label, fmt.time_column, fmt.utc_offset_s, kTipStamps);
  scan_rows(in, file_label, {fmt.time_column},
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
  StampReader dates(file_label, fmt.time_column, fmt.utc_offset_s, kDates);
  scan_rows(
      in, file_label, {fmt.time_column, fmt.value_column},
      [&](const std::vector<std::string_view>& fields, int line_number) {
        const ParsedTime date = dates.read(fields[0], line_number);
        const double value = parse_amount(fields[1], file_label, line_number, fmt.value_column);
        const Instant start = date.instant;
        const Instant end = start + kDay_s;
        if (!series.covered.empty() && series.covered.back().end < start) {
          gaps.note(series, series.covered.back().end, previous_offset_s, start, date.offset_s,
                    line_number);
        }
        extend_covered(series.covered, start, end);
        previous_offset_s = date.offset_s;

        const double depth_m = value * fmt.unit_m;
        const double intensity_mm_per_h =
            depth_m / kMetresPerMm * (kSecondsPerHour / static_cast<double>(window.duration_s));
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
                                          int utc_offset_s) {
  std::vector<MonthCoverage> out;
  if (end <= start) return out;
  const CivilTime first = to_civil(start, utc_offset_s);
  auto span = rain.covered.begin();
  for (int k = 0;; ++k) {
    const Instant month_begin = month_start(first.year, first.month + k, utc_offset_s);
    if (month_begin >= end) break;
    MonthCoverage m;
    m.month = month_label(month_begin, utc_offset_s);
    m.start = std::max(start, month_begin);
    m.end = std::min(end, month_start(first.year, first.month + k + 1, utc_offset_s));
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
