// The run page's charts (see report_run_figures.hpp).

#include "report_run_figures.hpp"

#include <algorithm>
#include <cmath>
#include <map>
#include <utility>

#include "detail.hpp"
#include "report_format.hpp"
#include "report_page.hpp"

namespace gutterwatt::detail {

/// Per interval bars, or, with more intervals than display columns, the largest interval value
/// in each column (so a downpour keeps its height). `bucket_s` receives the column width.
BarSet bars_of(const Timeseries& ts, const std::vector<double>& v, const Window& w,
               const char* colour, double* bucket_s) {
  BarSet b{{}, {}, {}, colour};
  if (w.i1 - w.i0 <= kBuckets) {
    for (std::size_t i = w.i0; i < w.i1; ++i) {
      if (v[i] > 0.0) {
        b.x0.push_back(static_cast<double>(ts.t[i]) - ts.dt_s[i]);
        b.x1.push_back(static_cast<double>(ts.t[i]));
        b.v.push_back(v[i]);
      }
    }
    return b;
  }
  const double width = (w.t_hi - w.t_lo) / kBuckets;
  if (bucket_s != nullptr) *bucket_s = width;
  std::vector<double> peak(kBuckets, 0.0);
  for (std::size_t i = w.i0; i < w.i1; ++i) {
    const double mid = static_cast<double>(ts.t[i]) - ts.dt_s[i] / 2.0;
    const auto k = static_cast<std::size_t>(
        std::clamp(std::floor((mid - w.t_lo) / width), 0.0, static_cast<double>(kBuckets - 1)));
    if (!std::isnan(v[i])) peak[k] = std::max(peak[k], v[i]);
  }
  for (std::size_t k = 0; k < kBuckets; ++k) {
    if (peak[k] > 0.0) {
      b.x0.push_back(w.t_lo + static_cast<double>(k) * width);
      b.x1.push_back(w.t_lo + static_cast<double>(k + 1) * width);
      b.v.push_back(peak[k]);
    }
  }
  return b;
}

LineSet line_of(const Timeseries& ts, const std::vector<double>& v, const Window& w,
                const char* colour, double width, double scale) {
  LineSet l{{}, {}, {}, colour, width, "", false};
  const std::vector<double> part(v.begin() + static_cast<long>(w.i0),
                                 v.begin() + static_cast<long>(w.i1));
  std::vector<std::size_t> nan_before(part.size() + 1, 0);
  for (std::size_t i = 0; i < part.size(); ++i) {
    nan_before[i + 1] = nan_before[i] + (std::isnan(part[i]) ? 1 : 0);
  }
  std::size_t previous = 0;
  bool have_previous = false;
  for (const std::size_t i : thin_min_max(part, kBuckets)) {
    l.x.push_back(static_cast<double>(ts.t[w.i0 + i]));
    l.v.push_back(part[i] * scale);
    l.pen_up.push_back(have_previous && nan_before[i] != nan_before[previous + 1]);
    previous = i;
    have_previous = true;
  }
  return l;
}

namespace {

/// The release states a panel's shading shows.
struct StatesSeen {
  bool running = false, open = false, dribble = false;

  /// Notes `s`; its grade: 2 full-bore flow (running, open), 1 dribble, 0 neither.
  int grade(ReleaseState s) {
    if (s == ReleaseState::running) running = true;
    if (s == ReleaseState::open) open = true;
    if (s == ReleaseState::dribble) dribble = true;
    return s == ReleaseState::running || s == ReleaseState::open ? 2
           : s == ReleaseState::dribble                          ? 1
                                                                 : 0;
  }
};

/// Green shading for full-bore flow and orange for dribble, built span by span (adjacent spans of
/// one grade merge).
struct StateBands {
  BandSet flowing{{}, {}, kGreen, 0.17};
  BandSet dribble{{}, {}, kOrange, 0.30};

  void add(int grade, double x0, double x1) {
    if (grade == 0 || !(x1 > x0)) return;
    BandSet& set = grade == 2 ? flowing : dribble;
    if (!set.x1.empty() && std::fabs(set.x1.back() - x0) < 1e-6) {
      set.x1.back() = x1;
    } else {
      set.x0.push_back(x0);
      set.x1.push_back(x1);
    }
  }
  std::vector<BandSet> sets() const { return {flowing, dribble}; }
};

/// Shading for the release state at the end of each interval. With more intervals than display
/// columns, each column takes the most telling state found in it, full-bore flow first, then
/// dribble.
std::vector<BandSet> bands_of(const Timeseries& ts, const Window& w, StatesSeen& seen) {
  StateBands bands;
  const auto grade = [&](ReleaseState s) { return seen.grade(s); };
  const auto add = [&](int g, double x0, double x1) { bands.add(g, x0, x1); };
  if (w.i1 - w.i0 <= kBuckets) {
    for (std::size_t i = w.i0; i < w.i1; ++i) {
      add(grade(ts.state[i]), static_cast<double>(ts.t[i]) - ts.dt_s[i],
          static_cast<double>(ts.t[i]));
    }
  } else {
    const double width = (w.t_hi - w.t_lo) / kBuckets;
    std::vector<int> best(kBuckets, 0);
    for (std::size_t i = w.i0; i < w.i1; ++i) {
      const double mid = static_cast<double>(ts.t[i]) - ts.dt_s[i] / 2.0;
      const auto k = static_cast<std::size_t>(
          std::clamp(std::floor((mid - w.t_lo) / width), 0.0, static_cast<double>(kBuckets - 1)));
      best[k] = std::max(best[k], grade(ts.state[i]));
    }
    for (std::size_t k = 0; k < kBuckets; ++k) {
      add(best[k], w.t_lo + static_cast<double>(k) * width,
          w.t_lo + static_cast<double>(k + 1) * width);
    }
  }
  return bands.sets();
}

/// The trace's rows that draw [t_lo, t_hi]: those inside and one on each side, so a line runs
/// to the edges.
struct TraceWindow {
  std::size_t i0 = 0, i1 = 0;
};

TraceWindow trace_window(const Trace& tr, double t_lo, double t_hi) {
  TraceWindow w;
  while (w.i0 < tr.size() && static_cast<double>(tr.t[w.i0]) < t_lo) ++w.i0;
  if (w.i0 > 0) --w.i0;
  w.i1 = w.i0;
  while (w.i1 < tr.size() && static_cast<double>(tr.t[w.i1]) <= t_hi) ++w.i1;
  if (w.i1 < tr.size()) ++w.i1;
  return w;
}

/// A line through the trace's points (thinned min/max per display column when there are more).
/// Where the chain rests no point is written and nothing changes, so the line runs straight.
LineSet trace_line(const Trace& tr, const std::vector<double>& v, const TraceWindow& w,
                   const char* colour, double width) {
  LineSet l{{}, {}, {}, colour, width, "", false};
  const std::vector<double> part(v.begin() + static_cast<long>(w.i0),
                                 v.begin() + static_cast<long>(w.i1));
  for (const std::size_t i : thin_min_max(part, kBuckets)) {
    l.x.push_back(static_cast<double>(tr.t[w.i0 + i]));
    l.v.push_back(part[i]);
    l.pen_up.push_back(false);
  }
  return l;
}

/// Shading for the release state between trace points: each point's state holds until the next.
std::vector<BandSet> trace_bands(const Trace& tr, const TraceWindow& w, StatesSeen& seen) {
  StateBands bands;
  for (std::size_t i = w.i0; i + 1 < w.i1; ++i) {
    bands.add(seen.grade(tr.state[i]), static_cast<double>(tr.t[i]),
              static_cast<double>(tr.t[i + 1]));
  }
  return bands.sets();
}

struct MonthLabel {
  std::string month;
  std::string year;
};

MonthLabel month_label_of(const std::string& text) {
  if (text.size() >= 7 && text[4] == '-') {
    const auto m = to_number(text.substr(5, 2));
    if (m && *m >= 1 && *m <= 12) {
      return {std::string(month_name(static_cast<unsigned>(*m))), text.substr(0, 4)};
    }
  }
  return {text, ""};
}

}  // namespace

std::string monthly_svg(const std::vector<MonthRow>& months, UnitSystem units) {
  const double height = 282.0;
  const double top = 40.0;
  const double bottom = 222.0;
  struct Half {
    std::string title;
    const char* colour;
    double left, right;
    double MonthRow::*field;
    std::string_view unit;  ///< of `field`, in SI
  };
  const std::array<Half, 2> halves{
      {{"Electrical energy, Wh per month", kVermillion, 70.0, 520.0, &MonthRow::energy_Wh, "Wh"},
       {"Overflow (reservoir rim and head column), " + unit_in(units, "L") + " per month", kBlue,
        620.0, 1070.0, &MonthRow::overflow_L, "L"}}};
  std::string out;
  svg_open(out, "chart-monthly", height, "Monthly electrical energy and overflow");
  const double n = static_cast<double>(months.size());
  for (const Half& h : halves) {
    double max = 0.0;
    const auto value = [&](const MonthRow& m) {
      return in_units(units, m.*(h.field), h.unit).value;
    };
    for (const auto& m : months) max = std::max(max, value(m));
    const Ticks yt = nice_ticks(0.0, axis_top(max), 4);
    const Linear ys{0.0, yt.top, bottom, top};
    svg_text(out, h.left - 62.0, 18.0, escape(h.title), "start", "ptitle");
    for (const double v : yt.values) {
      if (v != 0.0) svg_line(out, h.left, ys(v), h.right, ys(v), kGrid, 1.0);
      svg_text(out, h.left - 7.0, ys(v) + 4.0, fixed(v, yt.decimals), "end", "tick");
    }
    const double slot = (h.right - h.left) / std::max(n, 1.0);
    const auto every = static_cast<std::size_t>(std::max(1.0, std::ceil(30.0 / slot)));
    for (std::size_t i = 0; i < months.size(); ++i) {
      const double v = value(months[i]);
      const double x0 = h.left + slot * static_cast<double>(i);
      svg_rect(out, x0 + slot * 0.17, ys(v), slot * 0.66, bottom - ys(v), h.colour);
      if (slot >= 34.0) {
        svg_text(out, x0 + slot / 2.0, ys(v) - 5.0, pretty(v, Medium::svg), "middle", "val");
      }
      if (i % every == 0) {
        const MonthLabel label = month_label_of(months[i].month);
        svg_text(out, x0 + slot / 2.0, bottom + 17.0, escape(label.month), "middle", "tick");
        const bool new_year = i == 0 || month_label_of(months[i - every].month).year != label.year;
        if (new_year && !label.year.empty()) {
          svg_text(out, x0 + slot / 2.0, bottom + 32.0, label.year, "middle", "tick");
        }
      }
    }
    svg_line(out, h.left, bottom, h.right, bottom, kAxis, 1.0);
    svg_text(out, (h.left + h.right) / 2.0, bottom + 52.0, "month", "middle", "axis");
  }
  out += "</svg>\n";
  return out;
}

/// The busiest day: the most electrical energy, else the most rain. Day of each row by the
/// middle of its interval. Returns the day's first second, or nullopt for a dry, idle run.
std::optional<std::int64_t> busiest_day(const Timeseries& ts) {
  std::map<std::int64_t, std::pair<double, double>> days;  // day -> (energy, rain)
  for (std::size_t i = 0; i < ts.size(); ++i) {
    const auto mid = ts.t[i] - static_cast<std::int64_t>(ts.dt_s[i] / 2.0);
    auto& d = days[floor_div(mid, kDay_s)];
    d.first += ts.energy_Wh[i];
    d.second += ts.rain_mm[i];
  }
  std::optional<std::int64_t> best;
  std::pair<double, double> best_value{0.0, 0.0};
  for (const auto& [day, value] : days) {
    if (value > best_value) {
      best_value = value;
      best = day;
    }
  }
  if (best) return *best * kDay_s;
  return std::nullopt;
}

Window window_of(const Timeseries& ts, double t_lo, double t_hi) {
  Window w{0, 0, t_lo, t_hi};
  while (w.i0 < ts.size() && static_cast<double>(ts.t[w.i0]) <= t_lo) ++w.i0;
  w.i1 = w.i0;
  while (w.i1 < ts.size() && static_cast<double>(ts.t[w.i1]) - ts.dt_s[w.i1] < t_hi) ++w.i1;
  return w;
}

std::string thinning_note(double bucket_s) {
  return "tallest interval in each " + duration_text(bucket_s) + " column";
}

/// Rain bars per output interval, thinned to the display columns.
void add_rain(TimeFigure& fig, const Timeseries& ts, const Window& w, const std::string& step,
              double height, UnitSystem units) {
  double bucket_s = 0.0;
  BarSet rain = bars_of(ts, values_in(units, ts.rain_mm, "mm"), w, kSkyBlue, &bucket_s);
  std::string title = "Rain, " + unit_in(units, "mm") + " per " + step + " interval";
  if (bucket_s > 0.0) title += " (" + thinning_note(bucket_s) + ")";
  Panel& r = fig.add(title, height);
  r.bars.push_back(std::move(rain));
}

namespace {

/// The legend of the level panel's line and shading, the cycle starts from events.csv in
/// [t_lo, t_hi] along its top, and the set-point lines.
void finish_level(Panel& l, const Summary& s, const std::vector<Event>& events, double t_lo,
                  double t_hi, const StatesSeen& seen, UnitSystem units) {
  l.legend.push_back({LegendEntry::kLine, kBlue, "", "level"});
  if (seen.running || seen.open) {
    std::string label = seen.running && seen.open ? "running / open"
                        : seen.running            ? "running (siphon full bore)"
                                                  : "open (valve)";
    l.legend.push_back({LegendEntry::kBand, kGreen, "", label, 0.17});
  }
  if (seen.dribble) {
    l.legend.push_back({LegendEntry::kBand, kOrange, "", "dribble (not sealed)", 0.30});
  }
  for (const auto& e : events) {
    const auto t = static_cast<double>(e.start);
    if (e.kind == EpisodeKind::cycle && t >= t_lo && t <= t_hi) l.marks.push_back(t);
  }
  l.mark_colour = kGreen;
  if (!l.marks.empty()) l.legend.push_back({LegendEntry::kMark, kGreen, "", "cycle start"});
  const std::string depth = unit_in(units, "mm");
  // A set-point line at `mm` above the floor, drawn and labelled in the page's units.
  const auto level = [&](std::optional<double> mm, const char* colour, const char* dash,
                         const std::string& name) {
    if (!mm) return;
    const double v = in_units(units, *mm, "mm").value;
    l.refs.push_back({v, colour, dash, name + " " + pretty(v, Medium::svg) + " " + depth});
  };
  level(s.rim_mm, kVermillion, "", "rim");
  level(s.trigger_mm, kGreen, "7 4", "trigger");
  level(s.break_mm, kOrange, "3 3", "break");
}

std::string level_title(UnitSystem units) {
  return "Reservoir level, " + unit_in(units, "mm") + " above the floor";
}

}  // namespace

/// Rain bars and the reservoir level at the end of each output interval with its set-points and
/// the release state. Release cycles last minutes, so an hourly row rarely ends in one; their
/// starts from events.csv are marked along the top of the level panel.
void add_rain_and_level(TimeFigure& fig, const Timeseries& ts, const Summary& s,
                        const std::vector<Event>& events, const Window& w, const std::string& step,
                        double rain_h, double level_h, UnitSystem units) {
  add_rain(fig, ts, w, step, rain_h, units);
  Panel& l = fig.add(level_title(units), level_h);
  StatesSeen seen;
  l.bands = bands_of(ts, w, seen);
  l.lines.push_back(line_of(ts, values_in(units, ts.level_mm, "mm"), w, kBlue, 1.6));
  finish_level(l, s, events, w.t_lo, w.t_hi, seen, units);
}

/// The reservoir level from the trace, at every switch and at least every minute while anything
/// moves, with its set-points and the release state.
void add_trace_level(TimeFigure& fig, const Trace& tr, const Summary& s,
                     const std::vector<Event>& events, double t_lo, double t_hi, double height,
                     UnitSystem units) {
  const TraceWindow w = trace_window(tr, t_lo, t_hi);
  Panel& l = fig.add(level_title(units) + " (trace: every switch, at least every minute)", height);
  StatesSeen seen;
  l.bands = trace_bands(tr, w, seen);
  l.lines.push_back(trace_line(tr, values_in(units, tr.level_mm, "mm"), w, kBlue, 1.6));
  finish_level(l, s, events, t_lo, t_hi, seen, units);
}

/// The release's and the overflow's flow from the trace.
Panel& add_trace_flows(TimeFigure& fig, const Trace& tr, double t_lo, double t_hi, double height,
                       UnitSystem units) {
  const TraceWindow w = trace_window(tr, t_lo, t_hi);
  Panel& p = fig.add("Flow, " + unit_in(units, "L_per_s"), height);
  p.lines.push_back(
      trace_line(tr, values_in(units, tr.release_L_per_s, "L_per_s"), w, kGreen, 1.4));
  p.legend.push_back({LegendEntry::kLine, kGreen, "", "release"});
  p.lines.push_back(
      trace_line(tr, values_in(units, tr.overflow_L_per_s, "L_per_s"), w, kVermillion, 1.4));
  p.legend.push_back({LegendEntry::kLine, kVermillion, "", "overflow (rim and head column)"});
  return p;
}

/// Electrical power from the trace.
void add_trace_power(TimeFigure& fig, const Trace& tr, double t_lo, double t_hi, double height) {
  const TraceWindow w = trace_window(tr, t_lo, t_hi);
  Panel& p = fig.add("Electrical power, W", height);
  p.lines.push_back(trace_line(tr, tr.power_W, w, kVermillion, 1.4));
}

}  // namespace gutterwatt::detail
