#include "gutterwatt/fragments.hpp"

#include <algorithm>
#include <array>
#include <cassert>
#include <cmath>
#include <limits>
#include <map>
#include <random>
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

// Candidates in each season window (kSeasonWindows_days), the narrowest first.
using WindowCounts = std::array<std::size_t, kSeasonWindows_days.size()>;

// The narrowest season window (index into kSeasonWindows_days) whose count of candidates
// reaches kMinFragmentCandidates and whose count of those matching the depth reaches
// `matches_needed`, or the widest: the whole year. The count of matching ones widens it to the
// whole year (the last window) only when `matches_to_whole_year`, else only the count of
// candidates does (kMinDepthMatches).
std::size_t narrowest_window(const WindowCounts& counts, const WindowCounts& matching = {},
                             std::size_t matches_needed = 0, bool matches_to_whole_year = false) {
  std::size_t window = 0;
  while (window + 1 < counts.size() && (counts[window] < kMinFragmentCandidates ||
                                        (matching[window] < matches_needed &&
                                         (matches_to_whole_year || window + 2 < counts.size())))) {
    ++window;
  }
  return window;
}

// The index of the library interval drawn with knn_weights by `u` among `candidates`
// (distance, index): the k = round(sqrt(n)) nearest, the earlier first on a tie, narrowed by
// `keep` when any of the k passes it (Lall & Sharma 1996, section 3, as remembered).
template <typename Keep>
std::size_t draw_nearest(std::vector<std::pair<double, std::size_t>>& candidates, double u,
                         Keep keep) {
  const auto k = std::max<std::size_t>(
      1, static_cast<std::size_t>(std::lround(std::sqrt(static_cast<double>(candidates.size())))));
  std::partial_sort(candidates.begin(), candidates.begin() + static_cast<std::ptrdiff_t>(k),
                    candidates.end());
  candidates.resize(k);
  if (std::any_of(candidates.begin(), candidates.end(), keep)) {
    std::erase_if(candidates, [&](const auto& c) { return !keep(c); });
  }
  const std::vector<double> weights = knn_weights(candidates.size());
  double below = 0.0;
  for (std::size_t j = 0; j + 1 < candidates.size(); ++j) {
    below += weights[j];
    if (u < below) return candidates[j].second;
  }
  return candidates.back().second;
}

}  // namespace

double season_day(Instant t) {
  const double days = static_cast<double>(detail::floor_div(t, kDay_s));
  return days - kSeasonYear_days * std::floor(days / kSeasonYear_days);
}

Instant library_length_s(const std::optional<TimeZone>& calendar, Instant start, Instant end) {
  if (!calendar) return end - start;
  const Instant on_clock = end + calendar->offset_s(end) - (start + calendar->offset_s(start));
  return on_clock > 0 && on_clock % kDay_s == 0 ? on_clock : end - start;
}

FragmentLibrary build_fragment_library(const RainSeries& fine, Instant length_s, Instant phase_s,
                                       Instant step_s, const std::optional<TimeZone>& calendar) {
  assert(length_s > step_s && step_s >= 1);
  FragmentLibrary library;
  library.length_s = length_s;
  // Calendar days are cut on the local clock (midnight to midnight, 23 or 25 h across a change
  // of daylight saving), anything else in elapsed time.
  if (calendar && length_s % kDay_s == 0) library.calendar = calendar;
  const auto clock = [&](Instant t) {
    return library.calendar ? t + library.calendar->offset_s(t) : t;
  };
  const Instant phase = clock(phase_s);
  library.phase_s = phase - length_s * detail::floor_div(phase, length_s);
  const auto interval_of = [&](Instant t) {
    return detail::floor_div(clock(t) - library.phase_s, length_s);
  };
  const auto start_of = [&](std::int64_t k) {
    const Instant on_clock = library.phase_s + k * length_s;
    return library.calendar ? library.calendar->from_local(on_clock).first : on_clock;
  };
  // The intervals the record covers in full (the spans are sorted and merged).
  std::vector<std::int64_t> whole;
  for (const TimeSpan& span : fine.covered) {
    std::int64_t k = interval_of(span.start);
    if (start_of(k) < span.start) ++k;
    for (; start_of(k + 1) <= span.end; ++k) whole.push_back(k);
  }
  std::map<std::int64_t, std::vector<double>> wet;  // interval -> depth by step
  for (const RainPulse& p : fine.pulses) {
    const std::int64_t k = interval_of(p.start);
    if (!std::binary_search(whole.begin(), whole.end(), k)) continue;
    std::vector<double>& by_step = wet[k];
    by_step.resize(static_cast<std::size_t>((start_of(k + 1) - start_of(k) + step_s - 1) / step_s),
                   0.0);
    by_step[static_cast<std::size_t>((p.start - start_of(k)) / step_s)] += p.depth_m;
  }
  for (const auto& [k, by_step] : wet) {
    Fragment f;
    f.length_s = start_of(k + 1) - start_of(k);
    f.wet_before = wet.count(k - 1) > 0;
    f.wet_after = wet.count(k + 1) > 0;
    f.season_day = season_day(start_of(k));
    f.cumulative.assign(by_step.size() + 1, 0.0);
    double sum = 0.0;
    for (std::size_t j = 0; j < by_step.size(); ++j) {
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

FragmentLibrary resample_spells(const FragmentLibrary& library, std::uint64_t seed) {
  const std::vector<Fragment>& all = library.intervals;
  std::vector<std::size_t> starts;  // the first interval of each spell, then the end
  for (std::size_t i = 0; i < all.size(); ++i) {
    if (i == 0 || !all[i].wet_before) starts.push_back(i);
  }
  const std::size_t spells = starts.size();
  starts.push_back(all.size());
  std::vector<std::size_t> drawn(spells);
  std::mt19937_64 rng(seed);
  for (std::size_t& s : drawn) {
    s = std::min(spells - 1,
                 static_cast<std::size_t>(detail::uniform_open(rng) * static_cast<double>(spells)));
  }
  std::sort(drawn.begin(), drawn.end());
  FragmentLibrary out;
  out.length_s = library.length_s;
  out.phase_s = library.phase_s;
  out.calendar = library.calendar;
  for (const std::size_t s : drawn) {
    out.intervals.insert(out.intervals.end(), all.begin() + static_cast<std::ptrdiff_t>(starts[s]),
                         all.begin() + static_cast<std::ptrdiff_t>(starts[s + 1]));
  }
  return out;
}

std::vector<double> stretched_cumulative(const Fragment& f, Instant length_s, Instant step_s) {
  if (f.length_s == length_s) return f.cumulative;
  const Instant steps = (length_s + step_s - 1) / step_s;
  const auto last = static_cast<Instant>(f.cumulative.size()) - 1;  // the fragment's steps
  std::vector<double> out(static_cast<std::size_t>(steps) + 1, 1.0);
  out[0] = 0.0;
  for (Instant j = 1; j < steps; ++j) {
    // Boundary j falls at j step_s f.length_s / length_s into the fragment: in its step i, r /
    // length_s seconds past that step's start (exact integers).
    const Instant position = std::min(j * step_s, length_s) * f.length_s;
    const Instant i = position / (step_s * length_s);
    if (i >= last) break;
    const Instant r = position - i * step_s * length_s;
    const Instant width_s = std::min((i + 1) * step_s, f.length_s) - i * step_s;
    const auto at = static_cast<std::size_t>(i);
    out[static_cast<std::size_t>(j)] =
        f.cumulative[at] + (f.cumulative[at + 1] - f.cumulative[at]) * static_cast<double>(r) /
                               static_cast<double>(width_s * length_s);
  }
  return out;
}

std::vector<double> knn_weights(std::size_t k) {
  std::vector<double> w(k);
  double sum = 0.0;
  for (std::size_t j = 0; j < k; ++j) sum += 1.0 / static_cast<double>(j + 1);
  for (std::size_t j = 0; j < k; ++j) w[j] = 1.0 / static_cast<double>(j + 1) / sum;
  return w;
}

bool depth_matches(double library_m, double depth_m, double factor) {
  return library_m <= depth_m * factor && depth_m <= library_m * factor;
}

const Fragment& choose_fragment(const FragmentLibrary& library, double depth_m, double when,
                                bool wet_before, bool wet_after, double u, double edge_m) {
  const std::vector<Fragment>& all = library.intervals;
  assert(!all.empty() && depth_m > 0.0);
  // Whether a library interval matches this one's depth (kMinDepthMatches): for days, at least
  // as deep, and the window widens for them up to ±61 days; for shorter intervals, within
  // `factor` either way, and the window widens for them to the whole year.
  const bool shorter_than_day = library.length_s < kDay_s;
  const auto matches = [&](const Fragment& f, double factor) {
    return shorter_than_day ? depth_matches(f.depth_m, depth_m, factor) : f.depth_m >= depth_m;
  };
  // How many intervals each stage admits: the same neighbour states first (Westra et al. 2012),
  // the season window widening; then any states. Also how many of them match the depth.
  constexpr std::size_t windows = kSeasonWindows_days.size();
  WindowCounts same{};
  WindowCounts any{};
  WindowCounts same_matching{};
  WindowCounts any_matching{};
  for (const Fragment& f : all) {
    const std::size_t w = window_of(season_distance(f.season_day, when));
    const bool states = f.wet_before == wet_before && f.wet_after == wet_after;
    const bool match = matches(f, kDepthFactor);
    for (std::size_t wider = w; wider < windows; ++wider) {
      ++any[wider];
      any_matching[wider] += match;
      same[wider] += states;
      same_matching[wider] += states && match;
    }
  }
  std::size_t window = narrowest_window(same, same_matching, kMinDepthMatches, shorter_than_day);
  const bool same_states = same[window] >= kMinFragmentCandidates;
  if (!same_states) {
    window = narrowest_window(any, any_matching, kMinDepthMatches, shorter_than_day);
  }
  // The candidates by distance in depth, the earlier first on a tie.
  std::vector<std::pair<double, std::size_t>> candidates;
  for (std::size_t i = 0; i < all.size(); ++i) {
    const Fragment& f = all[i];
    if (same_states && (f.wet_before != wet_before || f.wet_after != wet_after)) continue;
    if (season_distance(f.season_day, when) > kSeasonWindows_days[window]) continue;
    candidates.emplace_back(std::fabs(f.depth_m - depth_m), i);
  }
  // Shorter than a day: only those within the depth factor, widened (multiplied by itself) until
  // kMinDepthMatches of them are, or all (kDepthFactor).
  if (shorter_than_day) {
    double factor = kDepthFactor;
    const auto inside = [&](const std::pair<double, std::size_t>& c) {
      return matches(all[c.second], factor);
    };
    const auto needed = static_cast<std::ptrdiff_t>(std::min(kMinDepthMatches, candidates.size()));
    while (std::count_if(candidates.begin(), candidates.end(), inside) < needed) {
      factor *= kDepthFactor;
    }
    std::erase_if(candidates, [&](const auto& c) { return !inside(c); });
  }
  // Days: only those at least 1 / kMaxDayScaleUp as deep, when any are.
  const auto deep_enough = [&](const std::pair<double, std::size_t>& c) {
    return all[c.second].depth_m * kMaxDayScaleUp >= depth_m;
  };
  if (!shorter_than_day && std::any_of(candidates.begin(), candidates.end(), deep_enough)) {
    std::erase_if(candidates, [&](const auto& c) { return !deep_enough(c); });
  }
  // After a wet last step, those of the k whose first step, scaled to this depth, goes on at
  // about its depth (this project's rule: see kEdgeRatio), when there are any.
  const auto goes_on = [&](const std::pair<double, std::size_t>& c) {
    const double first_m = depth_m * all[c.second].cumulative[1];
    return edge_m > 0.0 && first_m * kEdgeRatio >= edge_m && first_m <= edge_m * kEdgeRatio;
  };
  return all[draw_nearest(candidates, u, goes_on)];
}

std::optional<std::size_t> choose_spell(const FragmentLibrary& library,
                                        const std::vector<double>& depths_m, double when,
                                        double u) {
  const std::vector<Fragment>& all = library.intervals;
  const std::size_t length = depths_m.size();
  assert(length > 0);
  // The library's spells of this length: the index of the first interval of each.
  std::vector<std::size_t> spells;
  for (std::size_t i = 0; i < all.size();) {
    std::size_t end = i + 1;
    while (end < all.size() && all[end].wet_before) ++end;
    if (end - i == length) spells.push_back(i);
    i = end;
  }
  if (spells.empty()) return std::nullopt;
  constexpr std::size_t windows = kSeasonWindows_days.size();
  WindowCounts in_window{};
  for (const std::size_t i : spells) {
    for (std::size_t w = window_of(season_distance(all[i].season_day, when)); w < windows; ++w) {
      ++in_window[w];
    }
  }
  const std::size_t window = narrowest_window(in_window);
  std::vector<std::pair<double, std::size_t>> candidates;
  for (const std::size_t i : spells) {
    if (season_distance(all[i].season_day, when) > kSeasonWindows_days[window]) continue;
    double squares = 0.0;
    for (std::size_t j = 0; j < length; ++j) {
      squares += std::pow(depths_m[j] - all[i + j].depth_m, 2);
    }
    candidates.emplace_back(std::sqrt(squares), i);
  }
  return draw_nearest(candidates, u, [](const auto&) { return false; });
}

}  // namespace gutterwatt
