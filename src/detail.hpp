#pragma once
// Small helpers the library and the command line share, written once: whitespace trimming,
// plain comma-separated fields and data lines (past a UTF-8 byte-order mark), floor division,
// a safeguarded root of an increasing function, the onset of a condition by bisection, whole-text
// number parsing, fixed-point text, whole seconds of the calendar and the exit statuses. Internal
// (not installed, not public API); tests in tests/detail_test.cpp.

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <istream>
#include <limits>
#include <optional>
#include <random>
#include <string>
#include <string_view>
#include <system_error>
#include <utility>
#include <vector>

#include "gutterwatt/error.hpp"
#include "gutterwatt/units.hpp"
#include "report_format.hpp"

namespace gutterwatt::detail {

/// The root in [lo, hi] of the increasing f(h) = target, by Newton steps on f' = slope(h) that
/// fall back to bisection whenever a step leaves the bracket; stops when a step is below
/// `tolerance`.
template <class F, class Slope>
double solve_increasing(double target, F f, Slope slope, double lo, double hi, double guess,
                        double tolerance) {
  double h = std::clamp(guess, lo, hi);
  for (int iter = 0; iter < 100; ++iter) {
    const double miss = f(h) - target;
    if (miss > 0.0) {
      hi = h;
    } else {
      lo = h;
    }
    const double s = slope(h);
    double next = s > 0.0 ? h - miss / s : 0.5 * (lo + hi);
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (std::abs(next - h) <= tolerance) return next;
    h = next;
  }
  return h;
}

/// Where a condition that, once it holds, holds for every larger x starts within [lo, hi]: the
/// bracket narrowed by bisection to `width` (60 halvings at most), the condition false at its
/// first end and true at its second. A condition false at `hi` gives {hi, hi}.
template <class Holds>
std::pair<double, double> narrow_to_onset(Holds holds, double lo, double hi, double width) {
  if (!holds(hi)) return {hi, hi};
  for (int k = 0; k < 60 && hi - lo > width; ++k) {
    const double mid = 0.5 * (lo + hi);
    (holds(mid) ? hi : lo) = mid;
  }
  return {lo, hi};
}

/// Whole seconds, for calendar arithmetic on instants.
inline constexpr std::int64_t kMinute_s = 60;
inline constexpr std::int64_t kHour_s = 3600;
inline constexpr std::int64_t kDay_s = 86400;

/// The UTF-8 byte-order mark some editors put at the start of a text file.
inline constexpr std::string_view kByteOrderMark = "\xEF\xBB\xBF";

/// A quiet NaN, for a value that is missing.
inline constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

/// Exit statuses of the command line: success, a simulation failure, bad input, interrupted
/// (128 + SIGINT, as shells report it).
inline constexpr int kExitOk = 0;
inline constexpr int kExitFailure = 1;
inline constexpr int kExitBadInput = 2;
inline constexpr int kExitInterrupted = 130;

/// `text` without the characters of `blanks` at either end (spaces and tabs by default).
inline std::string_view trim(std::string_view text, std::string_view blanks = " \t") {
  const std::size_t first = text.find_first_not_of(blanks);
  if (first == std::string_view::npos) return {};
  return text.substr(first, text.find_last_not_of(blanks) - first + 1);
}

// Uniform on (0, 1) from the top 53 bits of one draw; std::mt19937_64's sequence is fixed by the
// standard, the standard distributions are not, so random draws that must repeat use this.
inline double uniform_open(std::mt19937_64& rng) {
  return (static_cast<double>(rng() >> 11) + 0.5) * 0x1.0p-53;
}

/// The p-quantile (0 <= p <= 1) of `sorted` (ascending, not empty) by Hyndman & Fan (1996),
/// Sample quantiles in statistical packages, The American Statistician 50(4), 361-365,
/// definition 7: h = (n - 1) p (0-based), Q = x[floor h] + (h - floor h)(x[floor h + 1] - x[floor
/// h]).
inline double quantile_of_sorted(const std::vector<double>& sorted, double p) {
  const double h = static_cast<double>(sorted.size() - 1) * p;
  const auto below = static_cast<std::size_t>(std::floor(h));
  if (below + 1 >= sorted.size()) return sorted.back();
  return sorted[below] + (h - static_cast<double>(below)) * (sorted[below + 1] - sorted[below]);
}

/// The weighted median of (value, weight) pairs (weights > 0, not empty): the value v whose
/// weights below it come to less than half the total and whose weights at or below it to at
/// least half, the value at which the running weight first reaches half with the pairs in
/// ascending order. Found by selection (Hoare's FIND, quickselect, with a three-way partition)
/// in linear expected time rather than by a sort. Reorders `pairs`. Exact for weights whose
/// sums are exact, such as whole seconds.
inline double weighted_median(std::vector<std::pair<double, double>>& pairs) {
  double total = 0.0;
  for (const auto& [value, weight] : pairs) total += weight;
  double half = 0.5 * total;
  auto lo = pairs.begin();
  auto hi = pairs.end();
  for (;;) {
    const double pivot = lo[(hi - lo) / 2].first;
    const auto less_end =
        std::partition(lo, hi, [pivot](const auto& p) { return p.first < pivot; });
    const auto equal_end =
        std::partition(less_end, hi, [pivot](const auto& p) { return p.first == pivot; });
    if (equal_end == less_end) return pivot;  // a NaN value: no order to select by
    double below = 0.0;
    for (auto it = lo; it != less_end; ++it) below += it->second;
    double at = 0.0;
    for (auto it = less_end; it != equal_end; ++it) at += it->second;
    if (half <= below) {
      hi = less_end;
    } else if (half <= below + at) {
      return pivot;
    } else {
      half -= below + at;
      lo = equal_end;
    }
  }
}

/// a / b rounded toward negative infinity (instants before 1970 fall on the right day). b != 0.
inline constexpr std::int64_t floor_div(std::int64_t a, std::int64_t b) {
  return a / b - ((a % b != 0) && ((a < 0) != (b < 0)) ? 1 : 0);
}

/// RFC 4180 cell: quoted when it holds a comma, a quote or a line break.
inline std::string csv_cell(const std::string& s) {
  if (s.find_first_of(",\"\r\n") == std::string::npos) return s;
  std::string out = "\"";
  for (const char c : s) {
    out += c;
    if (c == '"') out += '"';
  }
  return out + "\"";
}

/// The whole of `text` as a number (decimal or `e` notation, a leading `+` allowed, `nan` and
/// `inf` too), or nullopt when any of it is not part of the number.
inline std::optional<double> parse_double(std::string_view text) {
  if (text.size() > 1 && text.front() == '+' && text[1] != '-') text.remove_prefix(1);
  double value = 0.0;
  const char* end = text.data() + text.size();
  const auto [ptr, ec] = std::from_chars(text.data(), end, value);
  if (text.empty() || ec != std::errc() || ptr != end) return std::nullopt;
  return value;
}

/// As parse_double, for finite numbers only.
inline std::optional<double> to_number(std::string_view text) {
  const std::optional<double> value = parse_double(text);
  if (!value || !std::isfinite(*value)) return std::nullopt;
  return value;
}

/// The buffer fixed_text writes in: longer text is cut there, as snprintf cuts it.
inline constexpr std::size_t kFixedRoom = 400;

/// The integer printf's `%.*f` rounds |v| 10^decimals to, where an exact short path finds it
/// (nullopt elsewhere: near-ties, large numbers, NaN, decimals outside 0..9). |v| 10^d is rounded
/// once by the multiplication, by at most half a unit in its last place (ulp), so while it stays
/// below 2^52 and its fraction is more than an ulp from one half, the integer nearest to it is
/// the one nearest to the exact product, which printf prints. trace.csv's rows are most of the
/// numbers a run writes (issue 16).
inline std::optional<std::uint64_t> fixed_scaled(double v, int decimals) {
  static constexpr double kPow10[] = {1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9};
  if (decimals < 0 || decimals >= static_cast<int>(std::size(kPow10))) return std::nullopt;
  const double s = std::abs(v) * kPow10[decimals];
  if (!(s < 0x1p52)) return std::nullopt;  // NaN and infinities too
  const auto whole = static_cast<std::uint64_t>(static_cast<std::int64_t>(s));  // floor: s >= 0
  const double fraction = s - static_cast<double>(whole);                       // exact below 2^52
  if (!(std::abs(fraction - 0.5) > s * 0x1p-52)) return std::nullopt;
  return whole + (fraction > 0.5 ? 1u : 0u);
}

/// Writes the digits of `n` with `places` of them after a point and at least one before it,
/// after a `-` when `negative` ("-0.0012" from 12 with 4 places), at `out`, which has room for
/// 24 bytes past `places`; returns the end. Written from the right, in place.
inline char* put_scaled(char* out, std::uint64_t n, std::size_t places, bool negative) {
  std::size_t count = 1;  // n's digits
  for (std::uint64_t bound = 10; count < 20 && n >= bound; bound *= 10) ++count;
  if (negative) *out++ = '-';
  char* const end = out + std::max(count, places + 1) + (places > 0 ? 1 : 0);
  char* p = end;
  for (std::size_t k = 0; k < places; ++k) {
    *--p = static_cast<char>('0' + n % 10);
    n /= 10;
  }
  if (places > 0) *--p = '.';
  do {
    *--p = static_cast<char>('0' + n % 10);
    n /= 10;
  } while (p != out);
  return end;
}

/// `v` with `decimals` places (printf `%.*f`), written in `buf`, never a negative zero (`-0.00`
/// gives `0.00`). Most numbers take fixed_scaled's exact short path, whose integer's digits with
/// the point put in are printf's text; the rest go through std::to_chars, which gives printf's
/// text in the C locale.
inline std::string_view fixed_text(double v, int decimals, char (&buf)[kFixedRoom]) {
  if (const std::optional<std::uint64_t> n = fixed_scaled(v, decimals)) {
    const char* const end =
        put_scaled(buf, *n, static_cast<std::size_t>(decimals), v < 0.0 && *n != 0);
    return {buf, static_cast<std::size_t>(end - buf)};
  }
  const auto [end, ec] =
      std::to_chars(buf, buf + kFixedRoom, v, std::chars_format::fixed, decimals);
  std::string_view text(buf, static_cast<std::size_t>(end - buf));
  if (ec != std::errc()) {  // past the room: printf's text, truncated
    std::snprintf(buf, kFixedRoom, "%.*f", decimals, v);
    text = buf;
  }
  if (text.starts_with('-') && text.find_first_not_of("-0.") == std::string_view::npos) {
    text.remove_prefix(1);
  }
  return text;
}

/// `v` with `decimals` places (printf `%.*f`), never a negative zero (fixed_text).
inline std::string fixed(double v, int decimals) {
  char buf[kFixedRoom];
  return std::string(fixed_text(v, decimals, buf));
}

/// A number by the report's one rule, as the terminal shows it.
inline std::string on_terminal(double x) { return pretty(x, Medium::terminal); }

/// A flow in m3/s as a person reads it: `12.3 L/min`, by the one rule (pretty, terminal).
inline std::string litres_per_minute(double flow_m3_per_s) {
  return on_terminal(flow_m3_per_s / kLitrePerMinute_m3_per_s) + " L/min";
}

/// As fixed_text, without trailing zeros after the point (and without a bare point), written at
/// `out`, which has room for kFixedRoom bytes; returns the end. Into the caller's buffer: the
/// output writers put each cell straight into their row (issue 16).
inline char* put_fixed_trimmed(char* out, double v, int decimals) {
  if (const std::optional<std::uint64_t> scaled = fixed_scaled(v, decimals)) {
    std::uint64_t n = *scaled;
    auto places = n != 0 ? static_cast<std::size_t>(decimals) : 0;
    for (; places > 0 && n % 10 == 0; --places) n /= 10;
    return put_scaled(out, n, places, v < 0.0 && n != 0);
  }
  char buf[kFixedRoom];
  std::string_view text = fixed_text(v, decimals, buf);
  if (text.find('.') != std::string_view::npos) {
    while (text.back() == '0') text.remove_suffix(1);
    if (text.back() == '.') text.remove_suffix(1);
  }
  if (text == "-0") text = "0";
  return std::copy(text.begin(), text.end(), out);
}

/// As fixed_text, without trailing zeros after the point (and without a bare point).
inline std::string_view fixed_trimmed_text(double v, int decimals, char (&buf)[kFixedRoom]) {
  return {buf, static_cast<std::size_t>(put_fixed_trimmed(buf, v, decimals) - buf)};
}

/// As fixed, without trailing zeros after the point (and without a bare point).
inline std::string fixed_trimmed(double v, int decimals) {
  char buf[kFixedRoom];
  return std::string(fixed_trimmed_text(v, decimals, buf));
}

/// The comma-separated fields of `line`, each trimmed (no quoting).
inline std::vector<std::string_view> split_fields(std::string_view line) {
  std::vector<std::string_view> fields;
  for (;;) {
    const std::size_t comma = line.find(',');
    fields.push_back(trim(line.substr(0, comma), " \t\r"));
    if (comma == std::string_view::npos) return fields;
    line.remove_prefix(comma + 1);
  }
}

/// Longest line a text input may have: a record's rows are a few dozen bytes, and a file without
/// line ends (binary data, a file saved with CR only) must not grow a buffer without bound.
inline constexpr std::size_t kMaxLineBytes = std::size_t{64} << 10;

/// Hands out the lines of a stream, reading it in large chunks into one reused buffer. A line
/// stays valid until the next call. Line ends (LF or CRLF) are removed. A line longer than
/// kMaxLineBytes ends the reading, with too_long() set.
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
  static constexpr std::size_t kChunkBytes = std::size_t{1} << 20;

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

/// Throws InputError naming `file_label` when `reader` stopped before the end of its input: at
/// a read error after line `line_number`, or at the line after it, past kMaxLineBytes (`what`
/// names the input in the message: `a rain record`, `a bench log`).
inline void check_read_to_end(const LineReader& reader, const std::string& file_label,
                              int line_number, std::string_view what) {
  if (reader.failed()) {
    throw InputError(file_label, line_number, "",
                     "the file could not be read past this line (an input/output error)");
  }
  if (reader.too_long()) {
    throw InputError(file_label, line_number + 1, "",
                     "a line longer than " + std::to_string(kMaxLineBytes >> 10) + " KiB; " +
                         std::string(what) +
                         "'s lines are short (binary data, or line ends other than LF or CRLF?)");
  }
}

/// Reads lines from `reader` up to the next one that holds data, skipping blank lines and `#`
/// comments and a UTF-8 byte-order mark on line 1. Sets `text` to that line, trimmed (valid
/// until the next call), counts lines in `line_number`; false at the end of the input, or at a
/// line past kMaxLineBytes (reader.too_long()) or a read error (reader.failed()).
inline bool next_data_line(LineReader& reader, int& line_number, std::string_view& text) {
  while (reader.next(text)) {
    ++line_number;
    if (line_number == 1 && text.starts_with(kByteOrderMark)) {
      text.remove_prefix(kByteOrderMark.size());
    }
    text = trim(text, " \t\r");
    if (!text.empty() && text.front() != '#') return true;
  }
  return false;
}

/// The length of the UTF-8 sequence starting at text[i] (1 for ASCII), or 0 when the bytes
/// there are not one (a stray continuation byte, an overlong form, a surrogate, a cut sequence).
inline std::size_t utf8_length(std::string_view text, std::size_t i) {
  const auto byte = [&](std::size_t k) { return static_cast<unsigned char>(text[k]); };
  const unsigned char lead = byte(i);
  std::size_t n = 0;
  unsigned char lo = 0x80;
  unsigned char hi = 0xBF;
  if (lead < 0x80) {
    return 1;
  } else if (lead >= 0xC2 && lead <= 0xDF) {
    n = 2;
  } else if (lead >= 0xE0 && lead <= 0xEF) {
    n = 3;
    if (lead == 0xE0) lo = 0xA0;
    if (lead == 0xED) hi = 0x9F;
  } else if (lead >= 0xF0 && lead <= 0xF4) {
    n = 4;
    if (lead == 0xF0) lo = 0x90;
    if (lead == 0xF4) hi = 0x8F;
  } else {
    return 0;
  }
  if (i + n > text.size()) return 0;
  for (std::size_t k = 1; k < n; ++k) {
    const unsigned char c = byte(i + k);
    if (c < (k == 1 ? lo : 0x80) || c > (k == 1 ? hi : 0xBF)) return 0;
  }
  return n;
}

/// Where the first byte of `text` that is not part of UTF-8 text lies, or nullopt.
inline std::optional<std::size_t> first_non_utf8(std::string_view text) {
  for (std::size_t i = 0; i < text.size();) {
    const std::size_t n = utf8_length(text, i);
    if (n == 0) return i;
    i += n;
  }
  return std::nullopt;
}

}  // namespace gutterwatt::detail
