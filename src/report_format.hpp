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

/// Where a number is shown: in HTML text, in SVG text on the page, or in a terminal table.
enum class Medium { html, svg, terminal };

/// The one rule for a number a person reads, on the page and in the terminal: three significant
/// figures (whole numbers from 100 up), no trailing zeros (`0.9`, not `0.900`), never `-0`; zero
/// prints `0`. Below 0.001 a power of ten: `1.2e-9` in SVG and terminal text,
/// `1.2&times;10<sup>-9</sup>` in HTML. On the page digits are grouped in threes by a narrow
/// no-break space; in the terminal they are not, so columns line up. NaN prints as a dash.
std::string pretty(double v, Medium medium = Medium::html);

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

/// The period from `start` to `end` (wall-clock seconds, `end` not included) as a title names it:
/// `2025`, `2012–2015`, `Mar 2025`, `Mar–Nov 2025`, `Dec 2024 – Feb 2025` for whole months and
/// years, else by days: `30 Mar – 1 Apr 2025`. A run over more than a year in several years is
/// named by its years.
std::string period_label(std::int64_t start, std::int64_t end);

/// A scenario key or output column in plain words with its unit, for a person to read beside
/// (or above) the raw name: `release.priming_flow_L_per_min` -> `Release: priming flow, L/min`,
/// `energy_Wh` -> `Energy, Wh`, `overflow_gal` -> `Overflow, gal`, `cycles` -> `Cycles`. The
/// unit is the name's ending when it is one a key or column carries (the unit twins' SI and US
/// names, W, Wh, V, Ah, h, s, min, rpm); underscores read as spaces, and the few
/// abbreviations keys use (soc, cd, k, p10...) are spelt out.
std::string key_label(std::string_view key);

/// Labels for the values of a varied key with the decimals they share (1, 1.5, 2 print as 1.0,
/// 1.5, 2.0), so an axis reads evenly.
std::vector<std::string> shared_decimal_labels(const std::vector<double>& values);

}  // namespace gutterwatt::detail
