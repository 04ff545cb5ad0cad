#include "gutterwatt/fragments.hpp"

#include <algorithm>
#include <array>
#include <cassert>
#include <cmath>
#include <limits>
#include <map>
#include <utility>

#include "detail.hpp"

namespace gutterwatt {
namespace {

using detail::kDay_s;

// Half-widths of the season window, days, tried in turn; the last is the whole year. Westra et
// al. (2012) take days within ±15 days of the day's date (from memory); the wider ones are this
// project's fallback for a short calibration record (common practice, no source).
constexpr std::array<double, 4> kSeasonWindows_days = {15.0, 30.0, 61.0,
                                                       std::numeric_limits<double>::infinity()};

// Days between two places in the season, going round the year the short way.
double season_distance(double a, double b) {
  const double d = std::fabs(a - b);
  return std::min(d, kSeasonYear_days - d);
}

// The first season window that holds `distance`.
std::size_t window_of(double distance) {
  std::size_t w = 0;
  while (distance > kSeasonWindows_days[w]) ++w;
  return w;
}

}  // namespace

double season_day(Instant t) {
  const double days = static_cast<double>(detail::floor_div(t, kDay_s));
  return days - kSeasonYear_days * std::floor(days / kSeasonYear_days);
}

FragmentLibrary build_fragment_library(const RainSeries& fine, Instant length_s, Instant phase_s,
                                       Instant step_s) {
  assert(length_s > step_s && step_s >= 1);
  FragmentLibrary library;
  library.length_s = length_s;
  library.phase_s = phase_s - length_s * detail::floor_div(phase_s, length_s);
  const auto interval_of = [&](Instant t) {
    return detail::floor_div(t - library.phase_s, length_s);
  };
  // The intervals the record covers in full (the spans are sorted and merged).
  std::vector<std::int64_t> whole;
  for (const TimeSpan& span : fine.covered) {
    const std::int64_t first = -detail::floor_div(-(span.start - library.phase_s), length_s);
    for (std::int64_t k = first; k < interval_of(span.end); ++k) whole.push_back(k);
  }
  const auto steps = static_cast<std::size_t>((length_s + step_s - 1) / step_s);
  std::map<std::int64_t, std::vector<double>> wet;  // interval -> depth by step
  for (const RainPulse& p : fine.pulses) {
    const std::int64_t k = interval_of(p.start);
    if (!std::binary_search(whole.begin(), whole.end(), k)) continue;
    std::vector<double>& by_step = wet[k];
    by_step.resize(steps, 0.0);
    by_step[static_cast<std::size_t>((p.start - library.phase_s - k * length_s) / step_s)] +=
        p.depth_m;
  }
  for (const auto& [k, by_step] : wet) {
    Fragment f;
    f.wet_before = wet.count(k - 1) > 0;
    f.wet_after = wet.count(k + 1) > 0;
    f.season_day = season_day(library.phase_s + k * length_s);
    f.cumulative.assign(steps + 1, 0.0);
    double sum = 0.0;
    for (std::size_t j = 0; j < steps; ++j) {
      sum += by_step[j];
      f.cumulative[j + 1] = sum;
    }
    f.depth_m = sum;
    for (double& c : f.cumulative) c = std::min(c / sum, 1.0);
    f.cumulative.back() = 1.0;
    library.intervals.push_back(std::move(f));
  }
  return library;
}

std::vector<double> knn_weights(std::size_t k) {
  std::vector<double> w(k);
  double sum = 0.0;
  for (std::size_t j = 0; j < k; ++j) sum += 1.0 / static_cast<double>(j + 1);
  for (std::size_t j = 0; j < k; ++j) w[j] = 1.0 / static_cast<double>(j + 1) / sum;
  return w;
}

const Fragment& choose_fragment(const FragmentLibrary& library, double depth_m, double when,
                                bool wet_before, bool wet_after, double u) {
  const std::vector<Fragment>& all = library.intervals;
  assert(!all.empty());
  // How many intervals each stage admits: the same neighbour states first (Westra et al. 2012),
  // the season window widening; then any states.
  constexpr std::size_t windows = kSeasonWindows_days.size();
  std::array<std::size_t, windows> same{};
  std::array<std::size_t, windows> any{};
  for (const Fragment& f : all) {
    const std::size_t w = window_of(season_distance(f.season_day, when));
    for (std::size_t wider = w; wider < windows; ++wider) {
      ++any[wider];
      if (f.wet_before == wet_before && f.wet_after == wet_after) ++same[wider];
    }
  }
  bool same_states = true;
  std::size_t window = 0;
  while (window + 1 < windows && same[window] < kMinFragmentCandidates) ++window;
  if (same[window] < kMinFragmentCandidates) {
    same_states = false;
    window = 0;
    while (window + 1 < windows && any[window] < kMinFragmentCandidates) ++window;
  }
  // The candidates by distance in depth, the earlier first on a tie.
  std::vector<std::pair<double, std::size_t>> candidates;
  for (std::size_t i = 0; i < all.size(); ++i) {
    const Fragment& f = all[i];
    if (same_states && (f.wet_before != wet_before || f.wet_after != wet_after)) continue;
    if (season_distance(f.season_day, when) > kSeasonWindows_days[window]) continue;
    candidates.emplace_back(std::fabs(f.depth_m - depth_m), i);
  }
  // k = round(sqrt(n)): Lall & Sharma (1996), section 3 (from memory).
  const auto k = std::max<std::size_t>(
      1, static_cast<std::size_t>(std::lround(std::sqrt(static_cast<double>(candidates.size())))));
  std::partial_sort(candidates.begin(), candidates.begin() + static_cast<std::ptrdiff_t>(k),
                    candidates.end());
  const std::vector<double> weights = knn_weights(k);
  double below = 0.0;
  for (std::size_t j = 0; j + 1 < k; ++j) {
    below += weights[j];
    if (u < below) return all[candidates[j].second];
  }
  return all[candidates[k - 1].second];
}

}  // namespace gutterwatt
