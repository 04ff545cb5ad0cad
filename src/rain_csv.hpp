#pragma once
// The rows of a rain file as written, shared by the series, tip and daily readers
// (rain_input.cpp): lines, fields and their separator, the header, the rows kept by rain.where,
// amounts with their decimal mark, and time stamps with their order across rows.
// Internal (not installed, not public API); tested through the readers (rain_input_test.cpp).

#include <array>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <istream>
#include <string>
#include <string_view>
#include <vector>

#include "gutterwatt/calendar.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/rain_input.hpp"

namespace gutterwatt::detail {

/// `"text"` for messages, shortened when long.
std::string in_quotes(std::string_view text);

/// Six significant digits, like printf's %g, for numbers in messages.
std::string format_number(double value);

/// A depth or intensity as written, with `decimal` as its decimal mark: finite and not negative;
/// too small for a double is no rain. Throws InputError naming the file, line and column.
double parse_amount(std::string_view text, const std::string& file_label, int line_number,
                    const std::string& column, char decimal);

/// A stamp out of time order (earlier than, or the same as, the one before it). scan_rows adds
/// the column that tells series apart, when one does.
class OutOfOrder : public InputError {
 public:
  using InputError::InputError;
};

/// Words for the time column's messages: series stamps, tip stamps or dates.
struct StampWords {
  const char* expected;  ///< what a good value looks like
  const char* same;      ///< what an equal value is
  const char* noun;      ///< what one value is called
  bool repeats_allowed;
  bool dates_only;
};

inline constexpr StampWords kSeriesStamps{"an ISO 8601 date-time such as 2025-03-01T00:05",
                                          "the same instant as", "stamp", false, false};
inline constexpr StampWords kTipStamps{"an ISO 8601 date-time such as 2025-03-01T00:05",
                                       "the same instant as", "stamp", true, false};
inline constexpr StampWords kDates{"a date such as 2025-03-01", "the same day as", "date", false,
                                   true};

/// Parses the time column row by row (ISO 8601, or `fmt.time_format` when given), reads naive
/// stamps on the clock of `fmt.zone` (dates at its standard time; in an hour the clocks repeat,
/// the first reading not earlier than the row before) and checks what holds across rows: one
/// time-zone style per file, and time order (OutOfOrder otherwise).
class StampReader {
 public:
  StampReader(const std::string& file_label, const SeriesFormat& fmt, const StampWords& words);

  ParsedTime read(std::string_view text, int line_number);

 private:
  std::optional<ParsedTime> parse(std::string_view text);
  /// Puts a naive stamp on the clock of a zone with daylight saving: throws for a time the
  /// clocks skip.
  void place(ParsedTime& parsed, std::string_view text, int line_number) const;

  const std::string& file_;
  const SeriesFormat& fmt_;
  StampWords words_;
  int default_offset_s_;  ///< of naive stamps as parsed: the zone's when fixed, 0 otherwise
  // The fast path for the naive stamps of most records (`YYYY-MM-DDThh:mm[:ss]`): the date of
  // the last such stamp parsed in full and its day number, so that the next ones of that day
  // only read their time of day.
  std::array<char, 10> day_text_{};
  std::int64_t day_number_ = 0;
  bool has_day_ = false;
  std::size_t count_ = 0;
  Instant previous_ = 0;
  int previous_line_ = 0;
  bool first_has_offset_ = false;
  int first_line_ = 0;
  std::array<char, 64> previous_text_{};  // no allocation per row
  std::size_t previous_size_ = 0;
};

/// Called with the fields of one kept row, in the order of the columns asked for, and its line.
using RowFunction = std::function<void(const std::vector<std::string_view>& fields, int line)>;

/// Reads the header (the first line past `fmt.skip_lines` that is neither blank nor a `#`
/// comment), finds `columns` and the columns of `fmt.where` in it by name, and hands each data
/// row that `fmt.where` keeps to `on_row`. Fields are separated by `fmt.delimiter`. Throws
/// InputError for an empty file, a file without (kept) data rows and a read error; adds to an
/// OutOfOrder from `on_row` the column that changes at that row while it held one value before
/// (the mark of several series in one file), when there is one.
void scan_rows(std::istream& in, const std::string& file_label, const SeriesFormat& fmt,
               const std::vector<std::string>& columns, const RowFunction& on_row);

}  // namespace gutterwatt::detail
