// The sweep page (see report_sweep.hpp): one function per section, in page order.

#include "report_sweep.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <limits>
#include <utility>
#include <vector>

#include "chart.hpp"
#include "detail.hpp"
#include "report_files.hpp"
#include "report_format.hpp"
#include "report_page.hpp"

namespace gutterwatt::detail {
namespace {

namespace fs = std::filesystem;

struct HeatGrid {
  std::string x_name, y_name;
  std::vector<double> xs, ys;
  std::vector<std::vector<double>> value;  ///< [y][x], NaN where there is no combination
  std::size_t best_x = 0, best_y = 0;
};

std::string heat_svg(const std::string& id, const std::string& title, const std::string& unit,
                     const HeatGrid& grid, const Ramp& ramp) {
  const std::vector<std::string> x_labels = shared_decimal_labels(grid.xs);
  const std::vector<std::string> y_labels = shared_decimal_labels(grid.ys);
  const std::size_t nx = grid.xs.size();
  const std::size_t ny = grid.ys.size();
  const double left = 130.0;
  const double top = 62.0;
  const double cell_w = std::min(110.0, (kFigureWidth - left - 190.0) / static_cast<double>(nx));
  const double cell_h = std::clamp(360.0 / static_cast<double>(ny), 12.0, 44.0);
  const double plot_w = cell_w * static_cast<double>(nx);
  const double plot_h = cell_h * static_cast<double>(ny);
  const double height = top + plot_h + 80.0;
  double lo = std::numeric_limits<double>::infinity();
  double hi = -lo;
  for (const auto& row : grid.value) {
    for (const double v : row) {
      if (!std::isnan(v)) {
        lo = std::min(lo, v);
        hi = std::max(hi, v);
      }
    }
  }
  if (!std::isfinite(lo)) lo = hi = 0.0;
  const auto u_of = [&](double v) { return hi > lo ? (v - lo) / (hi - lo) : 0.5; };
  std::string out;
  svg_open(out, id, height, title);
  svg_text(out, 8.0, 18.0, escape(title), "start", "ptitle");
  svg_text(out, 8.0, top - 26.0, escape(key_label(grid.y_name)) + " &#8593;", "start", "axis");
  svg_text(out, 8.0, top - 11.0, escape(grid.y_name), "start", "key");
  const bool values = cell_w >= 46.0 && cell_h >= 17.0;
  const auto x_every = static_cast<std::size_t>(std::max(1.0, std::ceil(48.0 / cell_w)));
  const auto y_every = static_cast<std::size_t>(std::max(1.0, std::ceil(15.0 / cell_h)));
  for (std::size_t yi = 0; yi < ny; ++yi) {
    const double y0 = top + plot_h - cell_h * static_cast<double>(yi + 1);
    if (yi % y_every == 0) {
      svg_text(out, left - 8.0, y0 + cell_h / 2.0 + 4.0, y_labels[yi], "end", "tick");
    }
    for (std::size_t xi = 0; xi < nx; ++xi) {
      const double x0 = left + cell_w * static_cast<double>(xi);
      const double v = grid.value[yi][xi];
      if (std::isnan(v)) {
        svg_rect(out, x0, y0, cell_w, cell_h, "#f0f0f0");
        continue;
      }
      const Rgb c = ramp_at(ramp, u_of(v));
      const std::string fill = css_colour(c);
      svg_rect(out, x0, y0, cell_w, cell_h, fill.c_str());
      if (values) {
        out += "<text x=\"" + px(x0 + cell_w / 2.0) + "\" y=\"" + px(y0 + cell_h / 2.0 + 4.0) +
               "\" text-anchor=\"middle\" class=\"" + (is_dark(c) ? "cell light" : "cell") + "\">" +
               pretty(v, Medium::svg) + "</text>";
      }
    }
  }
  for (std::size_t xi = 0; xi < nx; xi += x_every) {
    svg_text(out, left + cell_w * (static_cast<double>(xi) + 0.5), top + plot_h + 17.0,
             x_labels[xi], "middle", "tick");
  }
  svg_text(out, left + plot_w / 2.0, top + plot_h + 40.0,
           escape(key_label(grid.x_name)) + " &#8594;", "middle", "axis");
  svg_text(out, left + plot_w / 2.0, top + plot_h + 56.0, escape(grid.x_name), "middle", "key");
  // The best-ranked combination is outlined on both maps.
  out += "<rect x=\"" + px(left + cell_w * static_cast<double>(grid.best_x) + 1.5) + "\" y=\"" +
         px(top + plot_h - cell_h * static_cast<double>(grid.best_y + 1) + 1.5) + "\" width=\"" +
         px(cell_w - 3.0) + "\" height=\"" + px(cell_h - 3.0) +
         "\" fill=\"none\" stroke=\"#000000\" stroke-width=\"3\"/>";
  out += "<rect x=\"" + px(left + cell_w * static_cast<double>(grid.best_x) + 4.0) + "\" y=\"" +
         px(top + plot_h - cell_h * static_cast<double>(grid.best_y + 1) + 4.0) + "\" width=\"" +
         px(cell_w - 8.0) + "\" height=\"" + px(cell_h - 8.0) +
         "\" fill=\"none\" stroke=\"#ffffff\" stroke-width=\"1.5\"/>";
  // Colour key.
  const double kx = left + plot_w + 40.0;
  const double key_h = std::max(plot_h, 120.0);
  const Linear ky{lo, hi > lo ? hi : lo + 1.0, top + key_h, top};
  constexpr int kSteps = 48;
  for (int i = 0; i < kSteps; ++i) {
    const double u = (i + 0.5) / kSteps;
    const std::string fill = css_colour(ramp_at(ramp, u));
    svg_rect(out, kx, top + key_h * (1.0 - static_cast<double>(i + 1) / kSteps), 18.0,
             key_h / kSteps + 0.4, fill.c_str());
  }
  svg_text(out, kx, top - 10.0, escape(unit), "start", "axis");
  if (hi > lo) {
    const Ticks kt = nice_ticks(lo, hi, 4);
    for (const double v : kt.values) {
      if (v < lo - 1e-9 || v > hi + 1e-9) continue;
      svg_line(out, kx + 18.0, ky(v), kx + 23.0, ky(v), kAxis, 1.0);
      svg_text(out, kx + 27.0, ky(v) + 4.0, grouped(v, kt.decimals), "start", "tick");
    }
  } else {
    svg_text(out, kx + 27.0, top + key_h / 2.0 + 4.0, pretty(lo, Medium::svg), "start", "tick");
  }
  out += "</svg>\n";
  return out;
}

/// One varied numeric key: energy and overflow (in `units`) against it.
std::string sweep_line_svg(const std::string& key, const std::vector<double>& x,
                           const std::vector<double>& energy, const std::vector<double>& overflow,
                           UnitSystem units) {
  const double panel_h = 150.0;
  const double height = 2.0 * (kPanelHeader + panel_h) + kPanelGap + kTimeAxisHeight + 16.0;
  double x_lo = *std::min_element(x.begin(), x.end());
  double x_hi = *std::max_element(x.begin(), x.end());
  if (x_hi == x_lo) {
    x_lo -= 1.0;
    x_hi += 1.0;
  }
  const Linear xs{x_lo, x_hi, kPlotLeft + 12.0, kPlotRight - 12.0};
  const Ticks xt = nice_ticks(x_lo, x_hi, 8);
  std::string out;
  svg_open(out, "chart-sweep-line", height, "Energy and overflow against " + key);
  struct Series {
    std::string title;
    const std::vector<double>* v;
    const char* colour;
  };
  const std::array<Series, 2> series{{{"Electrical energy, Wh", &energy, kVermillion},
                                      {"Overflow, " + unit_in(units, "L"), &overflow, kBlue}}};
  double y = 0.0;
  for (const Series& s : series) {
    svg_text(out, 8.0, y + 17.0, escape(s.title), "start", "ptitle");
    const double top = y + kPanelHeader;
    const double bottom = top + panel_h;
    double max = 0.0;
    for (const double v : *s.v) {
      if (!std::isnan(v)) max = std::max(max, v);
    }
    const Ticks yt = nice_ticks(0.0, axis_top(max), 4);
    const Linear ys{0.0, yt.top, bottom, top};
    for (const double v : yt.values) {
      if (v != 0.0) svg_line(out, kPlotLeft, ys(v), kPlotRight, ys(v), kGrid, 1.0);
      svg_text(out, kPlotLeft - 7.0, ys(v) + 4.0, fixed(v, yt.decimals), "end", "tick");
    }
    for (const double v : xt.values) {
      if (v >= x_lo - 1e-9 && v <= x_hi + 1e-9) {
        svg_line(out, xs(v), top, xs(v), bottom, kGrid, 1.0);
      }
    }
    std::string d;
    for (std::size_t i = 0; i < x.size(); ++i) {
      if (std::isnan((*s.v)[i])) continue;
      d += (d.empty() ? "M" : "L") + px(xs(x[i])) + " " + px(ys((*s.v)[i]));
    }
    out += "<path d=\"" + d + "\" fill=\"none\" stroke=\"" + s.colour +
           "\" stroke-width=\"1.8\" stroke-linejoin=\"round\"/>";
    for (std::size_t i = 0; i < x.size(); ++i) {
      if (std::isnan((*s.v)[i])) continue;
      out += "<circle cx=\"" + px(xs(x[i])) + "\" cy=\"" + px(ys((*s.v)[i])) +
             "\" r=\"3.5\" fill=\"" + s.colour + "\"/>";
    }
    svg_line(out, kPlotLeft, bottom, kPlotRight, bottom, kAxis, 1.0);
    y = bottom + kPanelGap;
  }
  const double axis = y - kPanelGap;
  for (const double v : xt.values) {
    if (v < x_lo - 1e-9 || v > x_hi + 1e-9) continue;
    svg_line(out, xs(v), axis, xs(v), axis + 5.0, kAxis, 1.0);
    svg_text(out, xs(v), axis + 19.0, fixed(v, xt.decimals), "middle", "tick");
  }
  svg_text(out, (kPlotLeft + kPlotRight) / 2.0, axis + 40.0, escape(key_label(key)), "middle",
           "axis");
  svg_text(out, (kPlotLeft + kPlotRight) / 2.0, axis + 56.0, escape(key), "middle", "key");
  out += "</svg>\n";
  return out;
}

// The class attribute of a ranked-table cell: numbers align right, the rank column is shaded.
std::string cell_class(bool number, bool rank) {
  if (!number && !rank) return "";
  return std::string(" class=\"") + (number ? "n" : "") + (number && rank ? " " : "") +
         (rank ? "rank" : "") + "\"";
}

// A column name that may break after its dots and underscores.
std::string breakable(const std::string& name) {
  std::string out;
  for (const char c : escape(name)) {
    out += c;
    if (c == '.' || c == '_') out += "<wbr>";
  }
  return out;
}

// A key or column in plain words with its unit, the raw name in small print beneath.
std::string labelled(const std::string& name) {
  return escape(key_label(name)) + "<br><small class=\"key\"><code>" + breakable(name) +
         "</code></small>";
}

/// A sweep folder, read once.
struct SweepPage {
  Sweep sweep;
  std::string title;

  /// The cell as the table shows it: a number by the one rule (pretty), else the text.
  std::string cell_text(std::size_t r, std::size_t c) const {
    if (!std::isnan(sweep.num[r][c])) return pretty(sweep.num[r][c]);
    const std::string& text = sweep.csv.rows[r][c];
    return text.empty() ? std::string("&ndash;") : escape(text);
  }
};

std::string title_section(const SweepPage& page) {
  const Sweep& sw = page.sweep;
  const Csv& csv = page.sweep.csv;
  const std::size_t n = page.sweep.csv.rows.size();
  std::string body;
  std::string keys_text;
  for (std::size_t k = 0; k < sw.keys.size(); ++k) {
    keys_text += (k == 0                    ? ""
                  : k + 1 == sw.keys.size() ? " and "
                                            : ", ") +
                 (escape(key_label(csv.header[sw.keys[k]])) + " (<code>" +
                  escape(csv.header[sw.keys[k]]) + "</code>)");
  }
  std::string not_run;
  if (sw.skipped.value_or(0.0) > 0.0 || sw.failed.value_or(0.0) > 0.0) {
    not_run = " &middot; not in the table: " + pretty(sw.skipped.value_or(0.0)) + " skipped, " +
              pretty(sw.failed.value_or(0.0)) + " failed (see skipped.csv)";
  }
  body += "<header>\n<h1>" + escape(page.title) + "</h1>\n<p>" +
          (sw.site.empty() ? "" : escape(sw.site) + " &middot; ") + std::to_string(n) +
          " combinations" + (keys_text.empty() ? "" : " of " + keys_text) + ", ranked by <code>" +
          escape(sw.rank) + "</code>" + (sw.order.empty() ? "" : " (" + escape(sw.order) + ")") +
          ", best first" + not_run + "</p>\n</header>\n";
  return body;
}

std::string best_section(const SweepPage& page) {
  const Sweep& sw = page.sweep;
  const Csv& csv = page.sweep.csv;
  std::string body;
  body +=
      "<section class=\"first\" id=\"headline\">\n<h2>Best combination</h2>\n<table>\n<tbody>\n";
  for (std::size_t c = 0; c < csv.header.size(); ++c) {
    const bool is_key = std::find(sw.keys.begin(), sw.keys.end(), c) != sw.keys.end();
    const std::string value = page.cell_text(0, c);
    body += std::string("<tr><td>") + (is_key ? "<strong>" : "") + labelled(csv.header[c]) +
            (is_key ? "</strong>" : "") + "</td><td class=\"n\">" + value + "</td></tr>\n";
  }
  body += "</tbody>\n</table>\n</section>\n";
  return body;
}

std::string maps_section(const SweepPage& page, std::vector<std::string>& charts) {
  const Sweep& sw = page.sweep;
  const Csv& csv = page.sweep.csv;
  const std::size_t n = page.sweep.csv.rows.size();
  std::string body;
  std::vector<std::size_t> numeric;
  for (std::size_t k = 0; k < sw.keys.size(); ++k) {
    if (sw.numeric_key[k]) numeric.push_back(sw.keys[k]);
  }
  const std::size_t c_energy = csv.require("energy_Wh");
  const std::size_t c_overflow = csv.require(column_name(sw.units, "overflow_L"));
  const std::string litres = unit_in(sw.units, "L");
  if (numeric.size() >= 2) {
    HeatGrid grid;
    const std::size_t cx = numeric[0];
    const std::size_t cy = numeric[1];
    grid.x_name = csv.header[cx];
    grid.y_name = csv.header[cy];
    for (std::size_t r = 0; r < n; ++r) {
      grid.xs.push_back(sw.num[r][cx]);
      grid.ys.push_back(sw.num[r][cy]);
    }
    for (auto* v : {&grid.xs, &grid.ys}) {
      std::sort(v->begin(), v->end());
      v->erase(std::unique(v->begin(), v->end()), v->end());
    }
    const auto index = [](const std::vector<double>& v, double x) {
      return static_cast<std::size_t>(std::lower_bound(v.begin(), v.end(), x) - v.begin());
    };
    // Rows come best first, so the first row seen for a cell is the best one for it.
    std::vector<std::vector<long>> row_of(grid.ys.size(), std::vector<long>(grid.xs.size(), -1));
    for (std::size_t r = 0; r < n; ++r) {
      long& cell = row_of[index(grid.ys, sw.num[r][cy])][index(grid.xs, sw.num[r][cx])];
      if (cell < 0) cell = static_cast<long>(r);
    }
    grid.best_x = index(grid.xs, sw.num[0][cx]);
    grid.best_y = index(grid.ys, sw.num[0][cy]);
    const auto grid_of = [&](std::size_t column) {
      std::vector<std::vector<double>> v(grid.ys.size(), std::vector<double>(grid.xs.size(), kNaN));
      for (std::size_t yi = 0; yi < grid.ys.size(); ++yi) {
        for (std::size_t xi = 0; xi < grid.xs.size(); ++xi) {
          if (row_of[yi][xi] >= 0)
            v[yi][xi] = sw.num[static_cast<std::size_t>(row_of[yi][xi])][column];
        }
      }
      return v;
    };
    std::string others;
    for (const std::size_t c : sw.keys) {
      if (c != cx && c != cy)
        others += (others.empty() ? "" : ", ") + escape(key_label(csv.header[c])) + " (<code>" +
                  escape(csv.header[c]) + "</code>)";
    }
    const std::string note =
        " The outlined cell is the best-ranked combination." +
        (others.empty() ? std::string()
                        : " Where " + others +
                              " also vary, each cell shows the best-ranked combination among "
                              "them.") +
        " Grey cells: no combination.";
    body += "<section id=\"maps\">\n<h2>Energy and overflow over " +
            escape(key_label(grid.x_name)) + " and " + escape(key_label(grid.y_name)) + "</h2>\n";
    grid.value = grid_of(c_energy);
    charts.push_back("chart-heat-energy");
    body += figure(
        heat_svg("chart-heat-energy", "Electrical energy, Wh", "energy, Wh", grid, kEnergyRamp),
        "Season electrical energy for each pair of values; brighter is more." + note);
    grid.value = grid_of(c_overflow);
    charts.push_back("chart-heat-overflow");
    body += figure(heat_svg("chart-heat-overflow", "Overflow, " + litres, "overflow, " + litres,
                            grid, kOverflowRamp),
                   "Water lost over the rim (and the head column) for each pair of values; darker "
                   "is more." +
                       note);
    body += "</section>\n";
  } else if (numeric.size() == 1 && sw.keys.size() == 1) {
    std::vector<std::size_t> order(n);
    for (std::size_t r = 0; r < n; ++r) order[r] = r;
    const std::size_t cx = numeric[0];
    std::sort(order.begin(), order.end(),
              [&](std::size_t a, std::size_t b) { return sw.num[a][cx] < sw.num[b][cx]; });
    std::vector<double> x, energy, overflow;
    for (const std::size_t r : order) {
      x.push_back(sw.num[r][cx]);
      energy.push_back(sw.num[r][c_energy]);
      overflow.push_back(sw.num[r][c_overflow]);
    }
    charts.push_back("chart-sweep-line");
    body += "<section id=\"maps\">\n<h2>Energy and overflow against " +
            escape(key_label(csv.header[cx])) + "</h2>\n";
    body += figure(sweep_line_svg(csv.header[cx], x, energy, overflow, sw.units),
                   "Season electrical energy and overflow for each value of the varied key.");
    body += "</section>\n";
  } else {
    body +=
        "<section id=\"maps\">\n<h2>Maps</h2>\n<p class=\"note\">Heat maps need two varied "
        "keys with numeric values; this sweep has " +
        std::to_string(numeric.size()) + ".</p>\n</section>\n";
  }
  return body;
}

std::string ranked_section(const SweepPage& page) {
  const Sweep& sw = page.sweep;
  const Csv& csv = page.sweep.csv;
  const std::size_t n = page.sweep.csv.rows.size();
  std::string body;
  constexpr std::size_t kMaxRows = 200;
  body += "<section id=\"ranked\">\n<h2>Ranked combinations</h2>\n";
  if (n > kMaxRows) {
    body += "<p class=\"note\">The best " + std::to_string(kMaxRows) + " of " + std::to_string(n) +
            " combinations; sweep.csv has them all.</p>\n";
  }
  body += std::string("<div class=\"wide\"><table class=\"ranked") +
          (csv.header.size() > 11 ? " many" : "") + "\">\n<thead><tr><th class=\"n\">#</th>";
  for (std::size_t c = 0; c < csv.header.size(); ++c) {
    const bool is_rank = csv.header[c] == sw.rank;
    body += "<th" + cell_class(!std::isnan(sw.num[0][c]), is_rank) + ">" + labelled(csv.header[c]) +
            "</th>";
  }
  body += "</tr></thead>\n<tbody>\n";
  for (std::size_t r = 0; r < std::min(n, kMaxRows); ++r) {
    body += std::string("<tr") + (r == 0 ? " class=\"best\"" : "") + "><td class=\"n\">" +
            std::to_string(r + 1) + "</td>";
    for (std::size_t c = 0; c < csv.header.size(); ++c) {
      const bool is_rank = csv.header[c] == sw.rank;
      body += "<td" + cell_class(!std::isnan(sw.num[r][c]), is_rank) + ">" + page.cell_text(r, c) +
              "</td>";
    }
    body += "</tr>\n";
  }
  body += "</tbody>\n</table></div>\n</section>\n";
  return body;
}

}  // namespace

std::string render_sweep(const fs::path& dir, std::optional<UnitSystem> units) {
  SweepPage page{read_sweep(dir, units), ""};
  const Sweep& sw = page.sweep;
  page.title = (sw.scenario.empty() ? std::string("Sweep") : sw.scenario) + ": sweep report";
  std::vector<std::string> charts;
  std::string body = title_section(page);
  body += best_section(page);
  body += maps_section(page, charts);
  body += ranked_section(page);
  return page_open(page.title, charts) + body + page_close();
}

}  // namespace gutterwatt::detail
