#pragma once
// The report's chart model: linear scales, nice and calendar ticks, panels of bars, lines, bands
// and reference lines stacked over one time axis, min/max thinning for display, colour ramps,
// and the few SVG primitives they are drawn with. Internal to the report; tests in
// tests/chart_test.cpp.

#include <array>
#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

namespace gutterwatt::detail {

// Okabe & Ito (2008), "Color Universal Design": eight colours told apart with every common
// colour-vision deficiency.
inline constexpr const char* kBlack = "#000000";
inline constexpr const char* kOrange = "#E69F00";
inline constexpr const char* kSkyBlue = "#56B4E9";
inline constexpr const char* kGreen = "#009E73";
inline constexpr const char* kBlue = "#0072B2";
inline constexpr const char* kVermillion = "#D55E00";
inline constexpr const char* kGrid = "#e3e3e3";
inline constexpr const char* kAxis = "#555555";

inline constexpr double kFigureWidth = 1100.0;
inline constexpr double kPlotLeft = 70.0;
inline constexpr double kPlotRight = kFigureWidth - 125.0;  // the margin holds reference labels
inline constexpr double kPanelHeader = 30.0;
inline constexpr double kPanelGap = 14.0;
inline constexpr double kTimeAxisHeight = 48.0;
inline constexpr double kCharWidth = 6.6;     // mean advance of 12 px sans-serif, for legends
inline constexpr std::size_t kBuckets = 450;  // display columns of a full-width chart, ~2 px each

/// The linear map of [d0, d1] onto [r0, r1]; every value to r0 when d0 == d1.
struct Linear {
  double d0, d1, r0, r1;
  double operator()(double v) const {
    return d1 == d0 ? r0 : r0 + (v - d0) * (r1 - r0) / (d1 - d0);
  }
};

/// Tick values, the decimals that print them exactly, and the axis top they reach.
struct Ticks {
  std::vector<double> values;
  int decimals = 0;
  double top = 1.0;
};

/// Ticks at 1, 2, 2.5 or 5 times a power of ten from `lo` (0 for a value axis) up to the first
/// tick at or above `hi`, about `target` of them. `hi <= lo` is taken as `lo + 1`.
Ticks nice_ticks(double lo, double hi, int target);

/// The top of a value axis from 0: a little headroom over the largest value, and a unit axis
/// when everything is zero.
double axis_top(double max);

/// A tick of a time axis: wall-clock seconds since 1970 and its label.
struct TimeTick {
  std::int64_t t;
  std::string label;
};

/// Ticks on calendar boundaries (hours, days, weeks, months, years) of [lo, hi], the finest step
/// that gives at most `max_ticks`.
std::vector<TimeTick> time_ticks(std::int64_t lo, std::int64_t hi, std::size_t max_ticks);

/// Min/max-per-bucket thinning for display: splits `values` into `buckets` runs of consecutive
/// samples and keeps, from each, the index of its smallest and of its largest value (once when
/// they coincide), plus the first and last sample overall. Returns increasing indices. NaN samples
/// are never kept. With `values.size() <= 2 * buckets` (or `buckets == 0`) every index of a
/// non-NaN sample is returned, so short series pass through unchanged. Peaks and troughs survive.
std::vector<std::size_t> thin_min_max(const std::vector<double>& values, std::size_t buckets);

/// Bars from x0 to x1 of height v (time axis units).
struct BarSet {
  std::vector<double> x0, x1, v;
  const char* colour;
};

/// A polyline through (x, v).
struct LineSet {
  std::vector<double> x, v;
  std::vector<bool> pen_up;  ///< start a new stroke here (after missing values)
  const char* colour;
  double width = 1.4;
  std::string dash;
  bool markers = false;
};

/// A horizontal line at `value` across the plot, named in the right margin.
struct RefLine {
  double value;
  const char* colour;
  std::string dash;
  std::string label;
};

/// Full-height shading from x0 to x1.
struct BandSet {
  std::vector<double> x0, x1;
  const char* colour;
  double opacity;
};

struct LegendEntry {
  enum Kind { kBar, kLine, kBand, kMark } kind;
  const char* colour;
  std::string dash;
  std::string label;
  double opacity = 1.0;
};

/// One panel of a TimeFigure: a value axis from 0 to `y_top` (or to a little over the data).
struct Panel {
  std::string title;
  double height = 150.0;
  std::optional<double> y_top;
  std::string tick_suffix;
  std::vector<BandSet> bands;
  std::vector<BarSet> bars;
  std::vector<LineSet> lines;
  std::vector<RefLine> refs;
  std::vector<double> marks;  ///< times marked by a short tick along the top (event starts)
  const char* mark_colour = kBlack;
  std::vector<LegendEntry> legend;

  /// The largest bar, line value (NaN skipped) or reference line; 0 for an empty panel.
  double data_max() const;
};

/// Stacked panels over one time axis [t_lo, t_hi] (wall-clock seconds).
class TimeFigure {
 public:
  TimeFigure(double t_lo, double t_hi) : t_lo_(t_lo), t_hi_(t_hi) {}
  Panel& add(std::string title, double height);
  /// The figure as an <svg> element with `id` and the accessible name `label`.
  std::string svg(const std::string& id, const std::string& label) const;

 private:
  double t_lo_, t_hi_;
  std::vector<Panel> panels_;
};

/// SVG primitives: coordinates to one decimal, `text` already escaped.
void svg_open(std::string& out, const std::string& id, double height, const std::string& label);
void svg_text(std::string& out, double x, double y, const std::string& text,
              const char* anchor = "start", const char* cls = nullptr);
void svg_line(std::string& out, double x1, double y1, double x2, double y2, const char* colour,
              double width, const std::string& dash = "");
void svg_rect(std::string& out, double x, double y, double w, double h, const char* fill,
              double opacity = 1.0);

/// The width of `s` in 12 px sans-serif, about (entities and multi-byte characters count once).
double text_width(const std::string& s);

/// A colour as components 0 to 255.
struct Rgb {
  double r, g, b;
};

/// Sequential ramps for the heat maps, both readable with colour-vision deficiencies and in grey:
/// energy on the viridis ramp (van der Walt & Smith (2015), perceptually uniform), overflow on a
/// single-hue blue ramp from pale to dark.
using Ramp = std::array<const char*, 9>;
inline constexpr Ramp kEnergyRamp{"#440154", "#472d7b", "#3b528b", "#2c728e", "#21918c",
                                  "#28ae80", "#5ec962", "#addc30", "#fde725"};
inline constexpr Ramp kOverflowRamp{"#f7fbff", "#deebf7", "#c6dbef", "#9ecae1", "#6baed6",
                                    "#4292c6", "#2171b5", "#08519c", "#08306b"};

/// The colour at `u` (clamped to [0, 1]) along `ramp`, linear between its stops.
Rgb ramp_at(const Ramp& ramp, double u);
/// `#rrggbb`.
std::string css_colour(const Rgb& c);
/// Whether white text reads better than black on `c`.
bool is_dark(const Rgb& c);

}  // namespace gutterwatt::detail
