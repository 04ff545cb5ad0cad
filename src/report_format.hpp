#pragma once
// Text on the report page: HTML escaping, numbers to read, durations and calendar labels (wall
// clock, as the files write it). Internal to the report; tests in tests/report_test.cpp.

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

namespace gutterwatt::detail {

/// U+00A0, valid in HTML text and in SVG text: between a number and its unit.
inline constexpr const char* kNbsp = "\xC2\xA0";

/// `s` with & < > " ' as HTML character references.
std::string escape(std::string_view s);

/// Fixed-point text with digits grouped in threes by a narrow no-break space (U+202F).
std::string grouped(double v, int decimals);

/// A value to read, not to compute with: three or four significant figures, whole numbers
/// grouped. `html` allows a power of ten with <sup> for very small values; in SVG text `e`
/// notation is used instead. NaN prints as a dash.
std::string pretty(double v, bool html = true);

/// An SVG coordinate: one decimal.
std::string px(double v);

/// `part` as a percentage of `whole` with a unit, or a dash when `whole` is not positive.
std::string percent_of(double part, double whole);

/// A duration in the largest whole unit that fits (d, h, min), else to three figures.
std::string duration_text(double seconds);

/// Month abbreviations, January first.
std::string_view month_name(unsigned month);

/// `3 Apr`, `3 Apr 2025`, `14:05` and `3 Apr 2025 14:05` of wall-clock seconds since 1970.
std::string day_label(std::int64_t t);
std::string date_label(std::int64_t t);
std::string clock_label(std::int64_t t);
std::string stamp_label(std::int64_t t);

/// A whole number without decimals, else pretty(v) for SVG text.
std::string number_label(double v);

/// Labels for the values of a varied key with the decimals they share (1, 1.5, 2 print as 1.0,
/// 1.5, 2.0), so an axis reads evenly.
std::vector<std::string> shared_decimal_labels(const std::vector<double>& values);

}  // namespace gutterwatt::detail
