#pragma once
// The run page's charts, built from a run folder's files (timeseries.csv and trace.csv): rain bars,
// the reservoir level with its set-points and release state, flows, power and the monthly chart,
// thinned to the display columns. Internal to the report; tests in tests/report_test.cpp.

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "chart.hpp"
#include "gutterwatt/units.hpp"
#include "report_files.hpp"

namespace gutterwatt::detail {

/// Rows [i0, i1) of the run shown over [t_lo, t_hi].
struct Window {
  std::size_t i0, i1;
  double t_lo, t_hi;
};

/// The rows of `ts` whose intervals meet [t_lo, t_hi].
Window window_of(const Timeseries& ts, double t_lo, double t_hi);

/// Per interval bars, or, with more intervals than display columns, the largest interval value
/// in each column (so a downpour keeps its height). `bucket_s` receives the column width.
BarSet bars_of(const Timeseries& ts, const std::vector<double>& v, const Window& w,
               const char* colour, double* bucket_s);

/// A line through `v` over `w`, thinned to min/max per display column, scaled by `scale`; a
/// missing value lifts the pen.
LineSet line_of(const Timeseries& ts, const std::vector<double>& v, const Window& w,
                const char* colour, double width, double scale = 1.0);

/// The monthly chart of energy and rain (SVG).
std::string monthly_svg(const std::vector<MonthRow>& months, UnitSystem units);

/// The busiest day: the most electrical energy, else the most rain. Day of each row by the
/// middle of its interval. Returns the day's first second, or nullopt for a dry, idle run.
std::optional<std::int64_t> busiest_day(const Timeseries& ts);

/// A caption's note on thinned bars: the width of a display column.
std::string thinning_note(double bucket_s);

/// Rain bars per output interval, thinned to the display columns.
void add_rain(TimeFigure& fig, const Timeseries& ts, const Window& w, const std::string& step,
              double height, UnitSystem units);

/// Rain bars and the reservoir level at the end of each output interval with its set-points and
/// the release state; cycle starts from `events` marked along the top of the level panel.
void add_rain_and_level(TimeFigure& fig, const Timeseries& ts, const Summary& s,
                        const std::vector<Event>& events, const Window& w, const std::string& step,
                        double rain_h, double level_h, UnitSystem units);

/// The reservoir level from the trace, at every switch and at least every minute while anything
/// moves, with its set-points and the release state.
void add_trace_level(TimeFigure& fig, const Trace& tr, const Summary& s,
                     const std::vector<Event>& events, double t_lo, double t_hi, double height,
                     UnitSystem units);

/// The release's and the overflow's flow from the trace.
Panel& add_trace_flows(TimeFigure& fig, const Trace& tr, double t_lo, double t_hi, double height,
                       UnitSystem units);

/// Electrical power from the trace.
void add_trace_power(TimeFigure& fig, const Trace& tr, double t_lo, double t_hi, double height);

}  // namespace gutterwatt::detail
