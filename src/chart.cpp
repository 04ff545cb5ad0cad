// The report's chart model (see chart.hpp). The SVG is written here by hand rather than through a
// plotting program or a charting library: the page then needs no external process at report time
// and no runtime dependency (a missing plotter cannot break `gutterwatt report`), the same inputs
// give a byte-identical page (testable, diff-able), and inline SVG prints as vectors at any size.
// The charts needed are few and plain (bars, lines, bands, heat maps), so a little code serves.

#include "chart.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <string_view>
#include <utility>

#include "detail.hpp"
#include "gutterwatt/calendar.hpp"
#include "report_format.hpp"

namespace gutterwatt::detail {

std::vector<TimeTick> time_ticks(std::int64_t lo, std::int64_t hi, std::size_t max_ticks) {
  const std::int64_t span = std::max<std::int64_t>(hi - lo, 1);
  const auto fits = [&](double step_s) { return span / step_s <= static_cast<double>(max_ticks); };
  std::vector<TimeTick> ticks;
  for (const std::int64_t step : {900, 1800, 3600, 7200, 10800, 21600, 43200}) {
    if (!fits(static_cast<double>(step))) continue;
    for (std::int64_t t = floor_div(lo + step - 1, step) * step; t <= hi; t += step) {
      ticks.push_back({t, t % kDay_s == 0 ? day_label(t) : clock_label(t)});
    }
    return ticks;
  }
  for (const std::int64_t k : {1, 2}) {
    if (!fits(static_cast<double>(k * kDay_s))) continue;
    for (std::int64_t d = floor_div(lo + kDay_s - 1, kDay_s); d * kDay_s <= hi; ++d) {
      if (floor_div(d, k) * k == d) ticks.push_back({d * kDay_s, day_label(d * kDay_s)});
    }
    return ticks;
  }
  if (fits(7.0 * kDay_s)) {
    for (std::int64_t d = floor_div(lo + kDay_s - 1, kDay_s); d * kDay_s <= hi; ++d) {
      const unsigned dom = to_civil(d * kDay_s).day;
      if (dom == 1 || dom == 8 || dom == 15 || dom == 22) {
        ticks.push_back({d * kDay_s, day_label(d * kDay_s)});
      }
    }
    if (ticks.size() <= max_ticks) return ticks;
    ticks.clear();
  }
  const CivilTime first = to_civil(lo);
  for (const int k : {1, 2, 3, 6, 12, 24, 60, 120}) {
    if (!fits(k * 30.4 * kDay_s)) continue;
    for (int index = first.year * 12 + static_cast<int>(first.month) - 1;; ++index) {
      const int year = floor_div(index, 12);
      const auto month = static_cast<unsigned>(index - year * 12 + 1);
      const std::int64_t t = month_start(year, month);
      if (t > hi) break;
      if (t < lo || index % k != 0) continue;
      std::string label = std::to_string(year);
      if (k < 12) {
        label = std::string(month_name(month));
        if (ticks.empty() || month == 1) label += " " + std::to_string(year);
      }
      ticks.push_back({t, label});
    }
    if (ticks.size() <= max_ticks) return ticks;
    ticks.clear();
  }
  return ticks;
}

Ticks nice_ticks(double lo, double hi, int target) {
  if (!(hi > lo)) hi = lo + 1.0;
  const double raw = (hi - lo) / target;
  const double magnitude = std::pow(10.0, std::floor(std::log10(raw)));
  double step = 10.0 * magnitude;
  for (const double m : {1.0, 2.0, 2.5, 5.0}) {
    if (m * magnitude >= raw * (1.0 - 1e-9)) {
      step = m * magnitude;
      break;
    }
  }
  Ticks ticks;
  while (ticks.decimals < 8) {
    const double scaled = step * std::pow(10.0, ticks.decimals);
    if (std::fabs(scaled - std::round(scaled)) < 1e-6) break;
    ++ticks.decimals;
  }
  const double first = std::ceil(lo / step - 1e-9) * step;
  ticks.top = std::ceil(hi / step - 1e-9) * step;
  for (double v = first; v <= ticks.top + step * 1e-6; v += step) ticks.values.push_back(v);
  return ticks;
}

double axis_top(double max) { return max > 0.0 ? max * 1.04 : 1.0; }

double Panel::data_max() const {
  double m = 0.0;
  for (const auto& b : bars) {
    for (const double v : b.v) m = std::max(m, v);
  }
  for (const auto& l : lines) {
    for (const double v : l.v) {
      if (!std::isnan(v)) m = std::max(m, v);
    }
  }
  for (const auto& r : refs) m = std::max(m, r.value);
  return m;
}

void svg_open(std::string& out, const std::string& id, double height, const std::string& label) {
  out += "<svg id=\"" + id + "\" class=\"chart\" viewBox=\"0 0 " + px(kFigureWidth) + " " +
         px(height) + "\" role=\"img\" aria-labelledby=\"" + id + "-t\"><title id=\"" + id +
         "-t\">" + escape(label) + "</title>\n";
}

void svg_text(std::string& out, double x, double y, const std::string& text, const char* anchor,
              const char* cls) {
  out += "<text x=\"" + px(x) + "\" y=\"" + px(y) + "\"";
  if (std::string_view(anchor) != "start") out += std::string(" text-anchor=\"") + anchor + "\"";
  if (cls != nullptr) out += std::string(" class=\"") + cls + "\"";
  out += ">" + text + "</text>";
}

void svg_line(std::string& out, double x1, double y1, double x2, double y2, const char* colour,
              double width, const std::string& dash) {
  out += "<line x1=\"" + px(x1) + "\" y1=\"" + px(y1) + "\" x2=\"" + px(x2) + "\" y2=\"" + px(y2) +
         "\" stroke=\"" + colour + "\" stroke-width=\"" + fixed(width, 1) + "\"";
  if (!dash.empty()) out += " stroke-dasharray=\"" + dash + "\"";
  out += "/>";
}

void svg_rect(std::string& out, double x, double y, double w, double h, const char* fill,
              double opacity) {
  out += "<rect x=\"" + px(x) + "\" y=\"" + px(y) + "\" width=\"" + px(std::max(w, 0.0)) +
         "\" height=\"" + px(std::max(h, 0.0)) + "\" fill=\"" + fill + "\"";
  if (opacity < 1.0) out += " fill-opacity=\"" + fixed(opacity, 2) + "\"";
  out += "/>";
}

double text_width(const std::string& s) {
  // Entities and multi-byte characters count as one glyph each.
  double n = 0.0;
  for (std::size_t i = 0; i < s.size(); ++i) {
    const auto c = static_cast<unsigned char>(s[i]);
    if (c == '&') {
      i = s.find(';', i);
      if (i == std::string::npos) break;
    } else if ((c & 0xC0) == 0x80) {
      continue;
    }
    n += 1.0;
  }
  return n * kCharWidth;
}

namespace {

// Legend entries laid out right-aligned, ending at `right`, on one row at baseline `y`.
void svg_legend(std::string& out, const std::vector<LegendEntry>& entries, double right, double y) {
  double width = 0.0;
  for (const auto& e : entries) width += 18.0 + 5.0 + text_width(e.label) + 16.0;
  double x = right - width + 16.0;
  for (const auto& e : entries) {
    switch (e.kind) {
      case LegendEntry::kBar:
        svg_rect(out, x + 3, y - 10, 12, 11, e.colour);
        break;
      case LegendEntry::kBand:
        svg_rect(out, x, y - 11, 18, 13, e.colour, e.opacity);
        break;
      case LegendEntry::kMark:
        svg_line(out, x + 9, y - 11, x + 9, y + 1, e.colour, 2.0);
        break;
      case LegendEntry::kLine:
        svg_line(out, x, y - 4, x + 18, y - 4, e.colour, 2.0, e.dash);
        break;
    }
    svg_text(out, x + 23, y, escape(e.label), "start", "legend");
    x += 18.0 + 5.0 + text_width(e.label) + 16.0;
  }
}

double legend_width(const std::vector<LegendEntry>& entries) {
  double width = 0.0;
  for (const auto& e : entries) width += 18.0 + 5.0 + text_width(e.label) + 16.0;
  return width;
}

}  // namespace

Panel& TimeFigure::add(std::string title, double height) {
  panels_.push_back(Panel{});
  panels_.back().title = std::move(title);
  panels_.back().height = height;
  return panels_.back();
}

std::string TimeFigure::svg(const std::string& id, const std::string& label) const {
  std::vector<double> headers;
  double height = 0.0;
  for (const auto& p : panels_) {
    const bool wrap = text_width(p.title) + 24.0 + legend_width(p.legend) > kPlotRight - 8.0;
    headers.push_back(wrap ? 2.0 * kPanelHeader - 6.0 : kPanelHeader);
    height += headers.back() + p.height + kPanelGap;
  }
  height += kTimeAxisHeight - kPanelGap;
  std::string out;
  svg_open(out, id, height, label);
  const Linear x{t_lo_, t_hi_, kPlotLeft, kPlotRight};
  const auto ticks = time_ticks(static_cast<std::int64_t>(std::ceil(t_lo_)),
                                static_cast<std::int64_t>(std::floor(t_hi_)), 10);
  double y = 0.0;
  for (std::size_t k = 0; k < panels_.size(); ++k) {
    const Panel& p = panels_[k];
    svg_text(out, 8.0, y + 17.0, escape(p.title), "start", "ptitle");
    if (!p.legend.empty()) {
      svg_legend(out, p.legend, kPlotRight,
                 y + headers[k] - (headers[k] > kPanelHeader ? 8.0 : 9.0));
    }
    const double top = y + headers[k];
    const double bottom = top + p.height;
    const Ticks yt = nice_ticks(0.0, p.y_top ? *p.y_top : axis_top(p.data_max()), 4);
    const Linear ys{0.0, p.y_top ? *p.y_top : yt.top, bottom, top};
    const std::string clip = id + "-c" + std::to_string(k);
    out += "<clipPath id=\"" + clip + "\"><rect x=\"" + px(kPlotLeft) + "\" y=\"" + px(top - 1) +
           "\" width=\"" + px(kPlotRight - kPlotLeft) + "\" height=\"" + px(p.height + 1) +
           "\"/></clipPath>\n";
    for (const double v : yt.values) {
      if (p.y_top && v > *p.y_top + 1e-9) continue;
      if (v != 0.0) svg_line(out, kPlotLeft, ys(v), kPlotRight, ys(v), kGrid, 1.0);
      svg_text(out, kPlotLeft - 7.0, ys(v) + 4.0, fixed(v, yt.decimals) + p.tick_suffix, "end",
               "tick");
    }
    for (const auto& tick : ticks) {
      svg_line(out, x(static_cast<double>(tick.t)), top, x(static_cast<double>(tick.t)), bottom,
               kGrid, 1.0);
    }
    out += "<g clip-path=\"url(#" + clip + ")\">";
    for (const auto& b : p.bands) {
      for (std::size_t i = 0; i < b.x0.size(); ++i) {
        const double x0 = x(b.x0[i]);
        svg_rect(out, x0, top, std::max(x(b.x1[i]) - x0, 0.6), p.height, b.colour, b.opacity);
      }
    }
    for (const auto& b : p.bars) {
      for (std::size_t i = 0; i < b.v.size(); ++i) {
        const double x0 = x(b.x0[i]);
        const double w = x(b.x1[i]) - x0;
        const double gap = w > 4.0 ? 0.18 * w : 0.0;
        svg_rect(out, x0 + gap / 2.0, ys(b.v[i]), std::max(w - gap, 0.7), bottom - ys(b.v[i]),
                 b.colour);
      }
    }
    for (const auto& l : p.lines) {
      std::string d;
      for (std::size_t i = 0; i < l.v.size(); ++i) {
        d += (d.empty() || l.pen_up[i]) ? "M" : "L";
        d += px(x(l.x[i])) + " " + px(ys(l.v[i]));
      }
      if (!d.empty()) {
        out += "<path d=\"" + d + "\" fill=\"none\" stroke=\"" + l.colour + "\" stroke-width=\"" +
               fixed(l.width, 1) + "\" stroke-linejoin=\"round\"";
        if (!l.dash.empty()) out += " stroke-dasharray=\"" + l.dash + "\"";
        out += "/>";
      }
    }
    if (!p.marks.empty()) {
      // One tick per half pixel at most, however many events fall there.
      std::string d;
      double last = -1.0;
      for (const double m : p.marks) {
        const double mx = std::round(x(m) * 2.0) / 2.0;
        if (mx == last) continue;
        last = mx;
        d += "M" + px(mx) + " " + px(top) + "V" + px(top + 10.0);
      }
      out += "<path d=\"" + d + "\" stroke=\"" + p.mark_colour + "\" stroke-width=\"1.6\"/>";
    }
    out += "</g>\n";
    // Reference lines run across the plot and are named in the right margin; the names are
    // nudged apart when lines lie close together.
    std::vector<std::pair<double, std::size_t>> label_y;
    for (std::size_t i = 0; i < p.refs.size(); ++i) {
      const RefLine& r = p.refs[i];
      svg_line(out, kPlotLeft, ys(r.value), kPlotRight, ys(r.value), r.colour, 1.6, r.dash);
      label_y.emplace_back(ys(r.value) + 4.0, i);
    }
    std::sort(label_y.begin(), label_y.end());
    for (std::size_t i = 1; i < label_y.size(); ++i) {
      label_y[i].first = std::max(label_y[i].first, label_y[i - 1].first + 14.0);
    }
    for (const auto& [ly, i] : label_y) {
      svg_text(out, kPlotRight + 8.0, ly, escape(p.refs[i].label), "start", "reflabel");
    }
    svg_line(out, kPlotLeft, bottom, kPlotRight, bottom, kAxis, 1.0);
    y = bottom + kPanelGap;
  }
  const double axis = y - kPanelGap;
  for (const auto& tick : ticks) {
    const double tx = x(static_cast<double>(tick.t));
    svg_line(out, tx, axis, tx, axis + 5.0, kAxis, 1.0);
    svg_text(out, tx, axis + 19.0, escape(tick.label), "middle", "tick");
  }
  svg_text(out, (kPlotLeft + kPlotRight) / 2.0, axis + 40.0,
           "date and time (each value belongs to the interval that ends there)", "middle", "axis");
  out += "</svg>\n";
  return out;
}

namespace {

Rgb hex_rgb(const char* hex) {
  const unsigned v = static_cast<unsigned>(std::strtoul(hex + 1, nullptr, 16));
  return {static_cast<double>((v >> 16) & 0xFF), static_cast<double>((v >> 8) & 0xFF),
          static_cast<double>(v & 0xFF)};
}

}  // namespace

Rgb ramp_at(const Ramp& ramp, double u) {
  u = std::clamp(u, 0.0, 1.0) * static_cast<double>(ramp.size() - 1);
  const auto i = std::min(static_cast<std::size_t>(u), ramp.size() - 2);
  const double f = u - static_cast<double>(i);
  const Rgb a = hex_rgb(ramp[i]);
  const Rgb b = hex_rgb(ramp[i + 1]);
  return {a.r + f * (b.r - a.r), a.g + f * (b.g - a.g), a.b + f * (b.b - a.b)};
}

std::string css_colour(const Rgb& c) {
  char buf[8];
  std::snprintf(buf, sizeof buf, "#%02x%02x%02x", static_cast<unsigned>(std::lround(c.r)),
                static_cast<unsigned>(std::lround(c.g)), static_cast<unsigned>(std::lround(c.b)));
  return buf;
}

bool is_dark(const Rgb& c) { return 0.299 * c.r + 0.587 * c.g + 0.114 * c.b < 140.0; }

std::vector<std::size_t> thin_min_max(const std::vector<double>& values, std::size_t buckets) {
  std::vector<std::size_t> kept;
  const std::size_t n = values.size();
  if (buckets == 0 || n <= 2 * buckets) {
    for (std::size_t i = 0; i < n; ++i) {
      if (!std::isnan(values[i])) kept.push_back(i);
    }
    return kept;
  }
  std::size_t first = 0;
  while (first < n && std::isnan(values[first])) ++first;
  std::size_t last = n;
  while (last > first && std::isnan(values[last - 1])) --last;
  if (first == n) return kept;
  kept.reserve(2 * buckets + 2);
  kept.push_back(first);
  const auto keep = [&](std::size_t i) {
    if (kept.back() != i) kept.push_back(i);
  };
  for (std::size_t b = 0; b < buckets; ++b) {
    const std::size_t lo = b * n / buckets;
    const std::size_t hi = (b + 1) * n / buckets;
    std::size_t i_min = n, i_max = n;
    for (std::size_t i = lo; i < hi; ++i) {
      if (std::isnan(values[i])) continue;
      if (i_min == n || values[i] < values[i_min]) i_min = i;
      if (i_max == n || values[i] > values[i_max]) i_max = i;
    }
    if (i_min == n) continue;
    keep(std::min(i_min, i_max));
    keep(std::max(i_min, i_max));
  }
  keep(last - 1);
  return kept;
}

}  // namespace gutterwatt::detail
