#include "rain_csv.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdint>
#include <cstring>
#include <optional>

#include "detail.hpp"

namespace gutterwatt::detail {
namespace {

constexpr std::size_t kMaxQuotedChars = 40;
// Values of a where column that a message lists, at most.
constexpr std::size_t kMaxValuesShown = 8;

// Blanks around a field: spaces, and tabs unless they separate the fields. Compared one by one
// rather than looked up in a string: this runs for every character around every field.
bool is_blank(char c, char delimiter) { return c == ' ' || (c == '\t' && delimiter != '\t'); }

// Takes the next field off the front of `rest`, fields separated by `delimiter`. The field comes
// back without the blanks around it and without enclosing double quotes (a doubled quote inside
// stays doubled). `more` turns false at the line's last field.
std::string_view next_field(std::string_view& rest, bool& more, char delimiter) {
  std::size_t start = 0;
  while (start < rest.size() && is_blank(rest[start], delimiter)) ++start;
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
    const std::size_t separator = rest.find(delimiter, close + 1);
    more = separator != std::string_view::npos;
    rest = more ? rest.substr(separator + 1) : std::string_view{};
    return field;
  }
  const char* const first = rest.data() + start;
  const char* const end = rest.data() + rest.size();
  const char* separator = static_cast<const char*>(
      std::memchr(first, delimiter, static_cast<std::size_t>(end - first)));
  more = separator != nullptr;
  if (!more) separator = end;
  const char* stop = separator;
  while (stop > first && is_blank(stop[-1], delimiter)) --stop;
  rest = more ? std::string_view(separator + 1, static_cast<std::size_t>(end - separator - 1))
              : std::string_view{};
  return {first, static_cast<std::size_t>(stop - first)};
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

// Every field of a line, unquoted.
std::vector<std::string> all_fields(std::string_view line, char delimiter) {
  std::vector<std::string> out;
  bool more = true;
  while (more) out.push_back(unescape_quotes(next_field(line, more, delimiter)));
  return out;
}

// A blank line, or a `#` comment: the first character that is not a space or a tab is none or `#`.
bool is_comment_or_blank(std::string_view line) {
  for (const char c : line) {
    if (c != ' ' && c != '\t') return c == '#';
  }
  return true;
}

// What the user is told to do about a decimal comma the reader cannot take.
constexpr const char* kDecimalCommaAdvice =
    "write decimals with a point, or separate the fields with another character and set "
    "rain.delimiter and rain.decimal: \",\"";

// The index of each column of `wanted` in a header of `names`; `keys` names each wanted column
// in messages (the column itself, or the scenario key that asks for it).
std::vector<std::size_t> find_columns(const std::vector<std::string>& names, int line_number,
                                      const std::string& file_label,
                                      const std::vector<std::string>& wanted,
                                      const std::vector<std::string>& keys) {
  const auto find_column = [&](std::size_t c) {
    const std::string& column = wanted[c];
    std::size_t found = names.size();
    for (std::size_t i = 0; i < names.size(); ++i) {
      if (names[i] != column) continue;
      if (found != names.size()) {
        throw InputError(file_label, line_number, keys[c],
                         "appears twice in the header (columns " + std::to_string(found + 1) +
                             " and " + std::to_string(i + 1) + ")");
      }
      found = i;
    }
    if (found == names.size()) {
      std::string list;
      for (const std::string& name : names) {
        if (!list.empty()) list += ", ";
        list += in_quotes(name);
      }
      throw InputError(file_label, line_number, keys[c],
                       "no such column in the header (found " + list + ")");
    }
    return found;
  };
  std::vector<std::size_t> indexes;
  for (std::size_t c = 0; c < wanted.size(); ++c) indexes.push_back(find_column(c));
  return indexes;
}

bool is_digits(std::string_view text) {
  return !text.empty() && text.find_first_not_of("0123456789") == std::string_view::npos;
}

// The header of a file and where its wanted columns are.
struct Header {
  std::vector<std::string> names;
  std::vector<std::size_t> indexes;  ///< of the wanted columns, then of the where columns
  std::vector<std::size_t> unnamed;  ///< columns without a name
  char delimiter = ',';
  std::size_t last_index = 0;  ///< the largest of `indexes`
  /// Comma-separated with a column without a name: a decimal comma may hide in it (take_fields).
  bool spare_columns = false;
  /// What each byte is to take_plain_fields (kInField, kSeparator or kNotPlain).
  std::array<unsigned char, 256> kinds{};
};

constexpr unsigned char kInField = 0;
constexpr unsigned char kSeparator = 1;
constexpr unsigned char kNotPlain = 2;  // a quote or a blank: the row is not plain

// Completes a header once its names and indexes are known.
void prepare_header(Header& h) {
  h.last_index = *std::max_element(h.indexes.begin(), h.indexes.end());
  h.spare_columns = h.delimiter == ',' && !h.unnamed.empty();
  h.kinds.fill(kInField);
  h.kinds['"'] = kNotPlain;
  h.kinds[' '] = kNotPlain;
  h.kinds['\t'] = kNotPlain;
  h.kinds[static_cast<unsigned char>(h.delimiter)] = kSeparator;  // a tab may separate
}

// Columns up to which take_plain_fields reads a row.
constexpr std::size_t kMaxPlainFields = 16;

// The fields of a plain row, the most common kind: no quote and no blank anywhere, every wanted
// column present and no field past the header's columns, and no spare column to check. Its
// fields are then the text between separators, just what take_fields finds there, and there is
// nothing to check. False for any other row, which take_fields reads.
bool take_plain_fields(std::string_view line, const Header& h,
                       std::vector<std::string_view>& fields) {
  if (h.spare_columns || h.last_index >= kMaxPlainFields) return false;
  std::pair<const char*, std::size_t> parts[kMaxPlainFields];  // not zeroed: a row's cost
  std::size_t count = 0;
  const char* start = line.data();
  const char* const end = start + line.size();
  const auto field_ends = [&](const char* p) {
    if (count <= h.last_index) parts[count] = {start, static_cast<std::size_t>(p - start)};
    ++count;
    start = p + 1;
  };
  for (const char* p = start; p != end; ++p) {
    const unsigned char kind = h.kinds[static_cast<unsigned char>(*p)];
    if (kind == kInField) continue;
    if (kind == kNotPlain) return false;
    field_ends(p);
  }
  field_ends(end);
  if (count <= h.last_index || count > h.names.size()) return false;
  fields.resize(h.indexes.size());
  for (std::size_t c = 0; c < h.indexes.size(); ++c) {
    const auto [data, size] = parts[h.indexes[c]];
    fields[c] = std::string_view(data, size);
  }
  return true;
}

// The fields of a row at `h.indexes` (header order of the wanted columns). Throws when the row
// is too short, naming the first column it lacks, and when it has a value beyond the header's
// columns (empty trailing fields are fine). Throws too for a whole number in a wanted column
// followed by digits in a column of the header without a name: a decimal comma ("1,5") that the
// spare column would otherwise hide.
void take_fields(std::string_view line, int line_number, const std::string& file_label,
                 const Header& h, const std::vector<std::string>& columns,
                 std::vector<std::string_view>& fields) {
  const std::vector<std::size_t>& indexes = h.indexes;
  const std::size_t header_fields = h.names.size();
  const std::size_t last_index = h.last_index;
  fields.resize(indexes.size());
  std::string_view rest = line;
  bool more = true;
  std::size_t index = 0;
  std::string_view previous;
  const bool comma_separated = h.delimiter == ',';
  const bool spare_columns = h.spare_columns;
  const auto check_spare = [&](std::string_view field) {
    if (!spare_columns || index == 0 || !is_digits(field) || !is_digits(previous)) return;
    if (std::find(h.unnamed.begin(), h.unnamed.end(), index) == h.unnamed.end()) return;
    for (std::size_t c = 0; c < indexes.size(); ++c) {
      if (indexes[c] != index - 1) continue;
      throw InputError(file_label, line_number, columns[c],
                       in_quotes(previous) + " and then " + in_quotes(field) +
                           " in the column without a name after it; a decimal comma (" +
                           std::string(previous) + "," + std::string(field) + ")? " +
                           kDecimalCommaAdvice);
    }
  };
  for (; more && index <= last_index; ++index) {
    const std::string_view field = next_field(rest, more, h.delimiter);
    if (spare_columns) check_spare(field);
    for (std::size_t c = 0; c < indexes.size(); ++c) {
      if (indexes[c] == index) fields[c] = field;
    }
    previous = field;
  }
  if (index > last_index) {
    // Most often a decimal comma ("0,2"), which would otherwise be read as its whole part.
    for (; more; ++index) {
      const std::string_view field = next_field(rest, more, h.delimiter);
      check_spare(field);
      previous = field;
      if (index < header_fields || field.empty()) continue;
      throw InputError(
          file_label, line_number, "",
          "the row has more fields than the " + std::to_string(header_fields) +
              " columns of the header (field " + std::to_string(index + 1) + " is " +
              in_quotes(field) + ")" +
              (comma_separated ? std::string("; a decimal comma? ") + kDecimalCommaAdvice : ""));
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
  // 0 / 10^k is 0: the dry rows of a record skip the division.
  value = mantissa == 0 ? 0.0
                        : static_cast<double>(mantissa) / kPowersOfTen[decimals < 0 ? 0 : decimals];
  return true;
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

// Values that may name a series: not a number (a station's name or code, a sensor's label).
bool names_a_series(const std::string& value) { return !value.empty() && !to_number(value); }

// The column that tells series apart at the row `current`: it held the same value on the first
// and the previous kept row, and another one here. Empty when no column does.
std::string series_column(const Header& h, std::size_t wanted, const std::string& first,
                          const std::string& previous, std::string_view current) {
  const std::vector<std::string> a = all_fields(first, h.delimiter);
  const std::vector<std::string> b = all_fields(previous, h.delimiter);
  const std::vector<std::string> c = all_fields(current, h.delimiter);
  for (std::size_t i = 0; i < h.names.size() && i < a.size() && i < b.size() && i < c.size(); ++i) {
    const auto asked = std::find(h.indexes.begin(), h.indexes.begin() + wanted, i);
    if (asked != h.indexes.begin() + wanted || h.names[i].empty()) continue;
    if (a[i] != b[i] || b[i] == c[i] || !names_a_series(b[i]) || !names_a_series(c[i])) continue;
    return "; the column " + in_quotes(h.names[i]) + " changes here from " + in_quotes(b[i]) +
           " to " + in_quotes(c[i]) + ": several series in one file? keep one with rain.where: {" +
           h.names[i] + ": " + c[i] + "}";
  }
  return "";
}

}  // namespace

std::string in_quotes(std::string_view text) {
  if (text.size() > kMaxQuotedChars) {
    return "\"" + std::string(text.substr(0, kMaxQuotedChars)) + "...\"";
  }
  return "\"" + std::string(text) + "\"";
}

std::string format_number(double value) {
  char buffer[64];
  const auto result =
      std::to_chars(buffer, buffer + sizeof buffer, value, std::chars_format::general, 6);
  return std::string(buffer, result.ptr);
}

double parse_amount(std::string_view text, const std::string& file_label, int line_number,
                    const std::string& column, char decimal) {
  double plain = 0.0;
  std::array<char, 64> buffer;
  if (decimal != '.') {
    // A decimal comma becomes a point; a point in such a file is a thousands mark, refused.
    if (text.size() > buffer.size() || text.find('.') != std::string_view::npos) {
      throw InputError(
          file_label, line_number, column,
          "not a number with a decimal comma, rain.decimal: \",\" (got " + in_quotes(text) + ")");
    }
    std::replace_copy(text.begin(), text.end(), buffer.begin(), decimal, '.');
    text = std::string_view(buffer.data(), text.size());
  }
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
                                : "not a finite number (got " + in_quotes(text) + ")"));
  }
  if (ec != std::errc{} || stop != end || digits.empty() || std::isnan(value)) {
    const bool comma = decimal == '.' && text.find(',') != std::string_view::npos;
    throw InputError(file_label, line_number, column,
                     "not a number (got " + in_quotes(text) + ")" +
                         (comma ? "; a decimal comma? set rain.decimal: \",\"" : ""));
  }
  if (std::isinf(value)) {
    throw InputError(file_label, line_number, column,
                     "not a finite number (got " + in_quotes(text) + ")");
  }
  if (value < 0.0) {
    throw InputError(file_label, line_number, column,
                     "must not be negative (got " + std::string(text) + ")");
  }
  return value == 0.0 ? 0.0 : value;  // -0 becomes 0
}

StampReader::StampReader(const std::string& file_label, const SeriesFormat& fmt,
                         const StampWords& words)
    : file_(file_label),
      fmt_(fmt),
      words_(words),
      // A zone with daylight saving reads the stamp as written first, then places it (place()).
      default_offset_s_(fmt.zone.fixed() ? fmt.zone.offset_s(0) : 0) {}

std::optional<ParsedTime> StampReader::parse(std::string_view text) {
  if (fmt_.time_format.empty()) {
    if (words_.dates_only) {
      std::optional<ParsedTime> parsed = parse_iso8601(text, default_offset_s_);
      if (text.size() != 10) parsed.reset();
      return parsed;
    }
    const std::optional<int> time_of_day_s = naive_stamp_time_of_day_s(text);
    if (!time_of_day_s) return parse_iso8601(text, default_offset_s_);
    if (has_day_ && std::memcmp(text.data(), day_text_.data(), day_text_.size()) == 0) {
      ParsedTime parsed;
      parsed.offset_s = default_offset_s_;
      parsed.local = day_number_ * kDay_s + *time_of_day_s;
      parsed.instant = parsed.local - parsed.offset_s;
      return parsed;
    }
    std::optional<ParsedTime> parsed = parse_iso8601(text, default_offset_s_);
    if (parsed) {
      std::memcpy(day_text_.data(), text.data(), day_text_.size());
      day_number_ = (parsed->local - *time_of_day_s) / kDay_s;  // exact: a midnight
      has_day_ = true;
    }
    return parsed;
  }
  std::optional<ParsedTime> parsed = parse_formatted(text, fmt_.time_format, default_offset_s_);
  if (parsed && words_.dates_only && floor_div(parsed->local, kDay_s) * kDay_s != parsed->local) {
    parsed.reset();
  }
  return parsed;
}

void StampReader::place(ParsedTime& parsed, std::string_view text, int line_number) const {
  const TimeZone& zone = fmt_.zone;
  if (words_.dates_only) {
    // Days of a daily record are 24 hours long: midnight to midnight of standard time.
    parsed.offset_s = zone.standard_offset_s(parsed.local - zone.offset_s(parsed.local));
    parsed.instant = parsed.local - parsed.offset_s;
    return;
  }
  const LocalInstants at = zone.from_local(parsed.local);
  if (at.count == 0) {
    throw InputError(file_, line_number, fmt_.time_column,
                     in_quotes(text) + " is not a time in " + zone.name() +
                         ": the clocks skip that hour when daylight saving begins");
  }
  // In the hour the clocks repeat, the rows' order tells the two apart: the first reading that
  // does not go back in time.
  parsed.instant = at.first;
  if (at.count == 2 && count_ > 0 &&
      (at.first < previous_ || (at.first == previous_ && !words_.repeats_allowed))) {
    parsed.instant = at.second;
  }
  parsed.offset_s = static_cast<int>(parsed.local - parsed.instant);
}

ParsedTime StampReader::read(std::string_view text, int line_number) {
  const std::string& column = fmt_.time_column;
  std::optional<ParsedTime> parsed = parse(text);
  if (!parsed && !fmt_.time_format.empty()) {
    throw InputError(file_, line_number, column,
                     "does not match rain.time_format " + in_quotes(fmt_.time_format) +
                         (words_.dates_only ? " as a date, at midnight" : "") + " (got " +
                         in_quotes(text) + ")");
  }
  if (!parsed) {
    throw InputError(file_, line_number, column,
                     std::string("not ") + words_.expected + " (got " + in_quotes(text) + ")");
  }
  // A fixed offset was applied by parse(); a stamp's own offset needs no zone.
  if (!parsed->has_offset && !fmt_.zone.fixed()) place(*parsed, text, line_number);
  if (count_ == 0) {
    first_has_offset_ = parsed->has_offset;
    first_line_ = line_number;
  } else {
    if (parsed->has_offset != first_has_offset_) {
      throw InputError(file_, line_number, column,
                       "mixed time zones: " + in_quotes(text) +
                           (parsed->has_offset ? " has a UTC offset but the stamp on line " +
                                                     std::to_string(first_line_) + " has none"
                                               : " has no UTC offset but the stamp on line " +
                                                     std::to_string(first_line_) + " has one"));
    }
    // Built only on the error paths: this runs once per row of records of millions.
    const auto previous = [this] {
      return in_quotes(std::string_view(previous_text_.data(), previous_size_)) + " (line " +
             std::to_string(previous_line_) + ")";
    };
    if (parsed->instant == previous_ && !words_.repeats_allowed) {
      throw OutOfOrder(file_, line_number, column,
                       in_quotes(text) + " is " + words_.same + " the previous " + words_.noun +
                           " " + previous());
    }
    if (parsed->instant < previous_) {
      throw OutOfOrder(file_, line_number, column,
                       in_quotes(text) + " is earlier than the previous " + words_.noun + " " +
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

void scan_rows(std::istream& in, const std::string& file_label, const SeriesFormat& fmt,
               const std::vector<std::string>& columns, const RowFunction& on_row) {
  std::vector<std::string> wanted = columns;
  std::vector<std::string> keys = columns;
  for (const auto& [column, value] : fmt.where) {
    wanted.push_back(column);
    keys.push_back("rain.where." + column);
  }
  LineReader reader(in);
  std::string_view line;
  int line_number = 0;
  int header_line = 0;
  Header header;
  header.delimiter = fmt.delimiter;
  std::vector<std::string_view> fields;
  std::size_t rows = 0;
  std::size_t rows_left_out = 0;
  // For the messages: the values of the first where column in rows it left out (a few), and
  // the first and the previous kept rows, kept only when the header has a named column not
  // asked for (one that may tell series apart: series_column).
  std::vector<std::string> other_values;
  bool other_columns = false;
  std::string first_row;
  std::string previous_row;
  while (reader.next(line)) {
    ++line_number;
    if (line_number <= fmt.skip_lines) continue;
    if (line_number == 1 && line.substr(0, kByteOrderMark.size()) == kByteOrderMark) {
      line.remove_prefix(kByteOrderMark.size());
    }
    if (is_comment_or_blank(line)) continue;
    if (header_line == 0) {
      check_text(line, line_number, file_label);
      header.names = all_fields(line, fmt.delimiter);
      for (std::size_t i = 0; i < header.names.size(); ++i) {
        if (trim(header.names[i]).empty()) header.unnamed.push_back(i);
      }
      header.indexes = find_columns(header.names, line_number, file_label, wanted, keys);
      prepare_header(header);
      const auto asked = header.indexes.begin() + static_cast<std::ptrdiff_t>(columns.size());
      for (std::size_t i = 0; i < header.names.size(); ++i) {
        other_columns = other_columns || (!header.names[i].empty() &&
                                          std::find(header.indexes.begin(), asked, i) == asked);
      }
      header_line = line_number;
      continue;
    }
    if (!take_plain_fields(line, header, fields)) {
      take_fields(line, line_number, file_label, header, keys, fields);
    }
    bool kept = true;
    for (std::size_t k = 0; k < fmt.where.size() && kept; ++k) {
      const std::string_view field = fields[columns.size() + k];
      kept = field == fmt.where[k].second || (field.find('"') != std::string_view::npos &&
                                              unescape_quotes(field) == fmt.where[k].second);
      if (!kept && k == 0 && other_values.size() < kMaxValuesShown &&
          std::find(other_values.begin(), other_values.end(), field) == other_values.end()) {
        other_values.emplace_back(field);
      }
    }
    if (!kept) {
      ++rows_left_out;
      continue;
    }
    try {
      on_row(fields, line_number);
    } catch (const OutOfOrder& e) {
      throw InputError(
          e.file(), e.line(), e.field(),
          e.message() + series_column(header, columns.size(), first_row, previous_row, line));
    }
    if (other_columns) {
      if (rows == 0) first_row.assign(line);
      previous_row.assign(line);
    }
    ++rows;
  }
  check_read_to_end(reader, file_label, line_number, "a rain record");
  if (header_line == 0 && fmt.skip_lines > 0 && line_number <= fmt.skip_lines) {
    throw InputError(file_label, line_number, "rain.skip_lines",
                     "the file ends within the " + std::to_string(fmt.skip_lines) +
                         " lines it skips (it has " + std::to_string(line_number) + ")");
  }
  if (header_line == 0) {
    std::string names;
    for (std::size_t c = 0; c < columns.size(); ++c) {
      if (c > 0) names += c + 1 == columns.size() ? " and " : ", ";
      names += in_quotes(columns[c]);
    }
    throw InputError(file_label, fmt.skip_lines + 1, "",
                     "empty file (expected a header row naming the column" +
                         std::string(columns.size() > 1 ? "s " : " ") + names + ")");
  }
  if (rows == 0 && rows_left_out > 0 && fmt.where.size() > 1) {
    throw InputError(file_label, header_line, "rain.where", "no row meets all its conditions");
  }
  if (rows == 0 && rows_left_out > 0) {
    std::string found;
    for (const std::string& value : other_values) {
      found += (found.empty() ? "" : ", ") + in_quotes(value);
    }
    if (other_values.size() == kMaxValuesShown) found += ", ...";
    throw InputError(file_label, header_line, keys[columns.size()],
                     "no row holds " + in_quotes(fmt.where.front().second) +
                         " in this column (found " + found + ")");
  }
  if (rows == 0) throw InputError(file_label, header_line, "", "no data rows");
}

}  // namespace gutterwatt::detail
