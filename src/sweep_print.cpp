// The terminal's view of a sweep (see sweep.hpp): the best rows as a table, the progress line.

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iomanip>
#include <iterator>
#include <sstream>

#include "detail.hpp"
#include "gutterwatt/sweep.hpp"
#include "gutterwatt/units.hpp"
#include "report_format.hpp"

namespace gutterwatt {
namespace {

// The columns the terminal table shows besides the varied keys and the rank metric.
constexpr std::string_view kTableMetrics[] = {"energy_Wh", "overflow_L", "dribble_L", "cycles",
                                              "overflow_events"};

std::string clock_text(double seconds) {
  const long s = std::lround(std::max(0.0, seconds));
  char buf[32];
  if (s >= 3600) {
    std::snprintf(buf, sizeof buf, "%ld:%02ld:%02ld", s / 3600, s / 60 % 60, s % 60);
  } else {
    std::snprintf(buf, sizeof buf, "%ld:%02ld", s / 60, s % 60);
  }
  return buf;
}

}  // namespace

void print_sweep_table(std::ostream& out, const SweepPlan& plan, const SweepResult& result,
                       std::size_t top) {
  std::vector<std::string_view> shown(std::begin(kTableMetrics), std::end(kTableMetrics));
  if (std::find(shown.begin(), shown.end(), plan.rank.metric) == shown.end()) {
    shown.push_back(plan.rank.metric);
  }

  const UnitSystem units = plan.base.site.units;
  const std::string rank_name = column_name(units, plan.rank.metric);
  const auto pretty = [&](std::string_view metric, double v) {
    return detail::on_terminal(column_value(units, metric, v));
  };
  const bool spread = result.realizations > 1;
  const bool sites = !plan.sites.empty();
  std::vector<std::string> header{"#"};
  if (sites) header.emplace_back("site");
  for (const SweepAxis& axis : plan.axes) header.push_back(axis.key);
  for (const std::string_view m : shown) header.push_back(column_name(units, m));
  if (spread) {
    header.push_back(rank_name + " P10 to P90");
    header.emplace_back("~best");
  }
  std::vector<std::vector<std::string>> cells;
  const std::size_t rows = std::min(top, result.ranked.size());
  for (std::size_t r = 0; r < rows; ++r) {
    const SweepRow& row = result.rows[result.ranked[r]];
    std::vector<std::string> line{std::to_string(r + 1)};
    if (sites) line.push_back(plan.sites[row.site].name);
    line.insert(line.end(), row.values.begin(), row.values.end());
    for (const std::string_view m : shown) line.push_back(pretty(m, sweep_metric(row.metrics, m)));
    if (spread) {
      line.push_back(pretty(plan.rank.metric, row.rank_spread->p10) + " to " +
                     pretty(plan.rank.metric, row.rank_spread->p90));
      line.emplace_back(row.within_best ? "~" : "");
    }
    cells.push_back(std::move(line));
  }
  std::vector<std::size_t> width(header.size());
  for (std::size_t c = 0; c < header.size(); ++c) {
    width[c] = header[c].size();
    for (const auto& line : cells) width[c] = std::max(width[c], line[c].size());
  }
  // Varied keys are left-aligned (they may be text); the rank and the metrics right-aligned.
  const auto print = [&](const std::vector<std::string>& line) {
    std::string text;
    for (std::size_t c = 0; c < line.size(); ++c) {
      const bool left = c > 0 && c <= plan.axes.size() + (sites ? 1 : 0);
      const std::string pad(width[c] - line[c].size(), ' ');
      text += "  " + (left ? line[c] + pad : pad + line[c]);
    }
    while (!text.empty() && text.back() == ' ') text.pop_back();
    out << text << '\n';
  };
  out << (sites ? std::to_string(plan.sites.size()) + " sites" : plan.base.site.name) << ": "
      << result.ranked.size() << " of " << result.rows.size() << " combinations ran, best first by "
      << rank_name << " (" << (plan.rank.descending ? "highest" : "lowest") << " first)\n";
  if (spread) {
    out << "  metrics are medians over " << result.realizations
        << " realizations of the record; ~ marks rows whose median lies inside the best row's "
           "P10 to P90 ("
        << kPercentileDefinition << ")\n";
  }
  print(header);
  for (const auto& line : cells) print(line);
  if (result.ranked.size() > rows) {
    out << "  ... " << result.ranked.size() - rows << " more in sweep.csv\n";
  }
  if (!sites) return;
  // Each site's best row: the first of its rows in the overall order (site_rank 1).
  out << "best at each site:\n";
  std::vector<bool> shown_site(plan.sites.size(), false);
  for (const std::size_t i : result.ranked) {
    const SweepRow& row = result.rows[i];
    if (shown_site[row.site]) continue;
    shown_site[row.site] = true;
    std::string values;
    for (std::size_t k = 0; k < plan.axes.size(); ++k) {
      values += (k > 0 ? ", " : "") + plan.axes[k].key + "=" + row.values[k];
    }
    out << "  " << plan.sites[row.site].name << ": " << values << " (" << rank_name << ' '
        << pretty(plan.rank.metric, sweep_metric(row.metrics, plan.rank.metric)) << ")\n";
  }
}

std::string progress_line(const SweepProgress& p, std::size_t width) {
  const double share = p.total > 0 ? static_cast<double>(p.done) / static_cast<double>(p.total) : 1;
  const auto filled = static_cast<std::size_t>(std::floor(share * static_cast<double>(width)));
  const std::string count = std::to_string(p.total);
  std::ostringstream out;
  out << '[' << std::string(filled, '#') << std::string(width - filled, '.') << "]  "
      << std::setw(static_cast<int>(count.size())) << p.done << '/' << count << "  " << std::setw(3)
      << static_cast<int>(std::floor(share * 100.0)) << '%';
  if (p.done > 0) {
    const double left =
        p.elapsed_s / static_cast<double>(p.done) * static_cast<double>(p.total - p.done);
    out << "  " << clock_text(left) << " left";
  }
  return out.str();
}

}  // namespace gutterwatt
