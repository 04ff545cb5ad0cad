#include "gutterwatt/disaggregation.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <limits>
#include <map>
#include <optional>
#include <random>
#include <utility>

#include "detail.hpp"
#include "gutterwatt/fragments.hpp"
#include "gutterwatt/storm.hpp"

namespace gutterwatt {
namespace {

using detail::kDay_s;

// One step of SplitMix64, used to turn (seed, key) into a generator seed: Steele, Lea & Flood
// (2014), Fast splittable pseudorandom number generators, OOPSLA '14 (constants from memory).
std::uint64_t split_mix(std::uint64_t x) {
  x += 0x9e3779b97f4a7c15ULL;
  x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9ULL;
  x = (x ^ (x >> 27)) * 0x94d049bb133111ebULL;
  return x ^ (x >> 31);
}

// W at the probabilities 0, 1/(m - 1), ..., 1; uniform when none are given.
std::vector<double> w_quantiles_of(const std::vector<double>& given) {
  if (!given.empty()) return given;
  std::vector<double> q(kWQuantiles);
  for (std::size_t i = 0; i < q.size(); ++i) {
    q[i] = static_cast<double>(i) / static_cast<double>(q.size() - 1);
  }
  return q;
}

// A draw of W by its quantiles, linear between them (inverse-CDF sampling).
double draw_w(const std::vector<double>& q, double u) {
  const double position = u * static_cast<double>(q.size() - 1);
  const auto i = std::min(static_cast<std::size_t>(position), q.size() - 2);
  return q[i] + (position - static_cast<double>(i)) * (q[i + 1] - q[i]);
}

BoxPosition position_of(bool wet_before, bool wet_after) {
  if (wet_before && wet_after) return BoxPosition::enclosed;
  if (wet_after) return BoxPosition::starting;
  if (wet_before) return BoxPosition::ending;
  return BoxPosition::isolated;
}

std::size_t class_of(BoxPosition position, double volume_m, double median_volume_m) {
  return 2 * static_cast<std::size_t>(position) + (volume_m > median_volume_m ? 1 : 0);
}

// The split of a wet box of one level: its class's when that rests on enough boxes, else the
// level's pooled one. W quantiles are filled in (uniform when none were estimated).
CascadeSplit split_for(const CascadeLevel& at, BoxPosition position, double volume_m) {
  CascadeSplit split{at.p10, at.p01, at.w_quantiles, at.boxes};
  if (!at.classes.empty()) {
    const CascadeSplit& c = at.classes[class_of(position, volume_m, at.median_volume_m)];
    if (c.boxes >= kMinCalibrationBoxes) split = c;
  }
  split.w_quantiles = w_quantiles_of(split.w_quantiles);
  return split;
}

// Box weights of a microcanonical binary cascade after `levels` halvings of an interval of
// `length_s` holding `depth_m` (2^levels boxes, summing to 1 up to rounding). Structure after
// Olsson (1998), Hydrol. Earth Syst. Sci. 2, 19-30: each box splits 1/0, 0/1 or W/(1 - W).
// Uncalibrated: 1/0 and 0/1 together with probability `intermittency`, either with equal chance,
// W uniform. Calibrated: by the box's duration, position among its neighbours (the boxes at the
// interval's ends see the neighbouring intervals as `wet_before`, `wet_after`) and volume.
std::vector<double> cascade_weights(int levels, std::uint64_t seed, const Disaggregation& how,
                                    Instant length_s, double depth_m, bool wet_before,
                                    bool wet_after) {
  std::mt19937_64 rng(seed);
  std::vector<double> weights{1.0};
  const bool calibrated = !how.levels.empty();
  for (int level = 0; level < levels; ++level) {
    const CascadeLevel at =
        calibrated ? cascade_level_at(how.levels, std::ldexp(static_cast<double>(length_s), -level))
                   : CascadeLevel{};
    std::vector<double> next(weights.size() * 2, 0.0);
    for (std::size_t i = 0; i < weights.size(); ++i) {
      const double w = weights[i];
      if (w == 0.0) continue;
      const double u = detail::uniform_open(rng);
      if (!calibrated) {
        if (u < how.intermittency) {
          next[2 * i + (detail::uniform_open(rng) < 0.5 ? 0 : 1)] = w;
        } else {
          const double left = detail::uniform_open(rng) * w;
          next[2 * i] = left;
          next[2 * i + 1] = w - left;
        }
        continue;
      }
      const bool before = i > 0 ? weights[i - 1] > 0.0 : wet_before;
      const bool after = i + 1 < weights.size() ? weights[i + 1] > 0.0 : wet_after;
      const CascadeSplit split = split_for(at, position_of(before, after), w * depth_m);
      if (u < split.p10 + split.p01) {
        next[2 * i + (u < split.p10 ? 0 : 1)] = w;
      } else {
        const double left = draw_w(split.w_quantiles, detail::uniform_open(rng)) * w;
        next[2 * i] = left;
        next[2 * i + 1] = w - left;
      }
    }
    weights = std::move(next);
  }
  return weights;
}

// The two splits mixed: `f` of the way from `a` to `b`.
CascadeSplit mix_splits(const CascadeSplit& a, const CascadeSplit& b, double f) {
  const auto mix = [f](double x, double y) { return x + f * (y - x); };
  CascadeSplit out;
  out.p10 = mix(a.p10, b.p10);
  out.p01 = mix(a.p01, b.p01);
  const std::vector<double> qa = w_quantiles_of(a.w_quantiles);
  const std::vector<double> qb = w_quantiles_of(b.w_quantiles);
  out.w_quantiles.resize(qa.size());
  for (std::size_t i = 0; i < qa.size(); ++i) out.w_quantiles[i] = mix(qa[i], qb[i]);
  out.boxes = std::min(a.boxes, b.boxes);
  return out;
}

// The split of a list of wet parent boxes (first half, second half), in order of `index`: the
// counts of 1/0 and 0/1 and the quantiles of W of the others.
struct SplitCount {
  std::size_t n10 = 0;
  std::size_t n01 = 0;
  std::vector<double> w;

  void add(double first, double second) {
    if (second == 0.0) {
      ++n10;
    } else if (first == 0.0) {
      ++n01;
    } else {
      w.push_back(first / (first + second));
    }
  }

  // Olsson (1998): P(1/0) = n(1/0) / n, P(0/1) = n(0/1) / n; W by its quantiles (Hyndman & Fan
  // definition 7).
  CascadeSplit estimate() {
    CascadeSplit split;
    split.boxes = n10 + n01 + w.size();
    if (split.boxes == 0) return split;
    split.p10 = static_cast<double>(n10) / static_cast<double>(split.boxes);
    split.p01 = static_cast<double>(n01) / static_cast<double>(split.boxes);
    if (w.size() >= 2) {
      std::sort(w.begin(), w.end());
      split.w_quantiles.resize(kWQuantiles);
      for (std::size_t k = 0; k < kWQuantiles; ++k) {
        split.w_quantiles[k] = detail::quantile_of_sorted(
            w, static_cast<double>(k) / static_cast<double>(kWQuantiles - 1));
      }
    }
    return split;
  }
};

// Splits `depth_m` at the cumulative fractions (non-decreasing, 0 first, 1 last) into parts that
// are whole multiples of u, the spacing of doubles at `depth_m`: depth_m = N u with N < 2^53,
// so every partial sum is a multiple of u below 2^53 u and is exact, in any order.
std::vector<double> split_exactly(double depth_m, const std::vector<double>& cumulative) {
  const std::size_t parts = cumulative.size() - 1;
  std::vector<double> out(parts, 0.0);
  int exponent = 0;
  const double mantissa = std::frexp(depth_m, &exponent);
  const int unit_exponent = exponent - std::numeric_limits<double>::digits;
  if (depth_m == 0.0) return out;
  if (unit_exponent <
      std::numeric_limits<double>::min_exponent - std::numeric_limits<double>::digits) {
    // A depth far below anything a gauge reads (subnormal range): all of it in the wettest step.
    std::size_t wettest = 0;
    for (std::size_t j = 1; j < parts; ++j) {
      if (cumulative[j + 1] - cumulative[j] > cumulative[wettest + 1] - cumulative[wettest]) {
        wettest = j;
      }
    }
    out[wettest] = depth_m;
    return out;
  }
  const auto units =
      static_cast<std::int64_t>(std::ldexp(mantissa, std::numeric_limits<double>::digits));
  std::int64_t previous = 0;
  for (std::size_t j = 0; j < parts; ++j) {
    std::int64_t next = j + 1 == parts ? units : std::llround(cumulative[j + 1] * units);
    next = std::clamp(next, previous, units);
    out[j] = std::ldexp(static_cast<double>(next - previous), unit_exponent);
    previous = next;
  }
  return out;
}

// The random draw of the interval from `start`: fixed by the seed and the start alone.
std::uint64_t interval_seed(const Disaggregation& how, Instant start) {
  return split_mix(how.seed ^ split_mix(static_cast<std::uint64_t>(start)));
}

// For `fragments`, the calibration interval that spreads each pulse of a wet spell matched
// whole (choose_spell); null where none was (other methods, a spell of a length the library
// lacks, or one whose intervals are not all spread by one library) and for a pulse whose depth
// does not match the calibration interval's in its place (depth_matches), which goes on its own
// (kMinDepthMatches).
std::vector<const Fragment*> spell_fragments(const std::vector<RainPulse>& pulses,
                                             const Disaggregation& how) {
  std::vector<const Fragment*> out(pulses.size(), nullptr);
  if (how.method != DisaggregationMethod::fragments) return out;
  for (std::size_t first = 0; first < pulses.size();) {
    std::size_t end = first + 1;
    while (end < pulses.size() && pulses[end].start == pulses[end - 1].end) ++end;
    const FragmentLibrary* library =
        library_for(how, pulses[first].start, pulses[first].end - pulses[first].start);
    std::vector<double> depths_m;
    for (std::size_t k = first; k < end && library != nullptr; ++k) {
      const Instant length_s = pulses[k].end - pulses[k].start;
      if (length_s <= how.step_s || library_for(how, pulses[k].start, length_s) != library) {
        library = nullptr;
      }
      depths_m.push_back(pulses[k].depth_m);
    }
    if (library != nullptr && library->length_s < kDay_s) {
      std::mt19937_64 rng(interval_seed(how, pulses[first].start));
      const std::optional<std::size_t> chosen = choose_spell(
          *library, depths_m, season_day(pulses[first].start), detail::uniform_open(rng));
      for (std::size_t k = first; chosen && k < end; ++k) {
        const Fragment& f = library->intervals[*chosen + (k - first)];
        if (depth_matches(f.depth_m, pulses[k].depth_m)) out[k] = &f;
      }
    }
    first = end;
  }
  return out;
}

StormKind nrcs_kind(DisaggregationMethod method) {
  switch (method) {
    case DisaggregationMethod::nrcs_i:
      return StormKind::nrcs_i;
    case DisaggregationMethod::nrcs_ia:
      return StormKind::nrcs_ia;
    case DisaggregationMethod::nrcs_ii:
      return StormKind::nrcs_ii;
    default:
      return StormKind::nrcs_iii;
  }
}

}  // namespace

const FragmentLibrary* library_for(const Disaggregation& how, Instant start, Instant length_s) {
  const auto library =
      std::find_if(how.fragments.begin(), how.fragments.end(), [&](const FragmentLibrary& l) {
        return library_length_s(l.calendar, start, start + length_s) == l.length_s;
      });
  return library == how.fragments.end() || library->intervals.empty() ? nullptr : &*library;
}

CascadeLevel cascade_level_at(const std::vector<CascadeLevel>& levels, double box_s) {
  assert(!levels.empty());
  if (box_s <= levels.front().box_s) return levels.front();
  if (box_s >= levels.back().box_s) return levels.back();
  std::size_t k = 1;
  while (levels[k].box_s < box_s) ++k;
  const CascadeLevel& a = levels[k - 1];
  const CascadeLevel& b = levels[k];
  const double f = std::log(box_s / a.box_s) / std::log(b.box_s / a.box_s);
  const CascadeSplit pooled =
      mix_splits({a.p10, a.p01, a.w_quantiles, a.boxes}, {b.p10, b.p01, b.w_quantiles, b.boxes}, f);
  CascadeLevel out;
  out.box_s = box_s;
  out.p10 = pooled.p10;
  out.p01 = pooled.p01;
  out.w_quantiles = pooled.w_quantiles;
  out.boxes = pooled.boxes;
  // Volumes grow about in proportion to duration: interpolated in log volume.
  out.median_volume_m = a.median_volume_m > 0.0 && b.median_volume_m > 0.0
                            ? a.median_volume_m * std::pow(b.median_volume_m / a.median_volume_m, f)
                            : 0.0;
  if (a.classes.size() == kCascadeClasses && b.classes.size() == kCascadeClasses) {
    for (std::size_t c = 0; c < kCascadeClasses; ++c) {
      out.classes.push_back(mix_splits(a.classes[c], b.classes[c], f));
    }
  }
  return out;
}

std::vector<CascadeLevel> estimate_cascade(const RainSeries& fine, Instant longest_s) {
  std::vector<CascadeLevel> out;
  if (fine.pulses.empty() || fine.covered.empty() || fine.step_s < 1) return out;
  // The record on its step grid from its first covered instant: (step index, depth).
  const Instant t0 = fine.covered.front().start;
  std::vector<std::pair<std::int64_t, double>> boxes;
  for (const RainPulse& p : fine.pulses) {
    const std::int64_t index = detail::floor_div(p.start - t0, fine.step_s);
    if (!boxes.empty() && boxes.back().first == index) {
      boxes.back().second += p.depth_m;
    } else {
      boxes.emplace_back(index, p.depth_m);
    }
  }
  // Olsson (1998), section 3 (from memory): the record is aggregated to boxes of duration
  // 2^j steps; each wet box of 2^j steps is seen as the parent of its two halves, and classed by
  // its position among its wet or dry neighbours of the same duration and by its volume (at
  // most or above the median of the wet boxes).
  struct Parent {
    std::int64_t index;
    double first;
    double second;
  };
  for (Instant box_s = 2 * fine.step_s; box_s <= 2 * longest_s; box_s *= 2) {
    std::vector<Parent> parents;
    for (std::size_t i = 0; i < boxes.size();) {
      const std::int64_t parent = detail::floor_div(boxes[i].first, 2);
      Parent p{parent, 0.0, 0.0};
      for (; i < boxes.size() && detail::floor_div(boxes[i].first, 2) == parent; ++i) {
        (boxes[i].first - 2 * parent == 0 ? p.first : p.second) += boxes[i].second;
      }
      parents.push_back(p);
    }
    std::vector<double> volumes;
    for (const Parent& p : parents) volumes.push_back(p.first + p.second);
    std::sort(volumes.begin(), volumes.end());
    const double median_volume_m = detail::quantile_of_sorted(volumes, 0.5);
    SplitCount pooled;
    std::vector<SplitCount> classes(kCascadeClasses);
    for (std::size_t i = 0; i < parents.size(); ++i) {
      const Parent& p = parents[i];
      const bool before = i > 0 && parents[i - 1].index == p.index - 1;
      const bool after = i + 1 < parents.size() && parents[i + 1].index == p.index + 1;
      pooled.add(p.first, p.second);
      classes[class_of(position_of(before, after), p.first + p.second, median_volume_m)].add(
          p.first, p.second);
    }
    boxes.clear();
    for (const Parent& p : parents) boxes.emplace_back(p.index, p.first + p.second);
    const CascadeSplit all = pooled.estimate();
    if (all.boxes < kMinCalibrationBoxes) break;
    CascadeLevel level;
    level.box_s = static_cast<double>(box_s);
    level.p10 = all.p10;
    level.p01 = all.p01;
    level.w_quantiles = all.w_quantiles;
    level.boxes = all.boxes;
    level.median_volume_m = median_volume_m;
    for (SplitCount& c : classes) level.classes.push_back(c.estimate());
    out.push_back(std::move(level));
  }
  return out;
}

double median_annual_max_intensity_m_per_s(const RainSeries& rain, Instant duration_s) {
  if (rain.pulses.empty() || rain.step_s < 1) return 0.0;
  const Instant t0 = rain.covered.empty() ? rain.pulses.front().start : rain.covered.front().start;
  const Instant steps = std::max<Instant>(1, duration_s / rain.step_s);
  std::map<int, double> annual_max;
  // A window's largest sum starts at a wet step: slide over the wet steps only.
  const std::vector<RainPulse>& p = rain.pulses;
  double sum = 0.0;
  std::size_t end = 0;
  for (std::size_t first = 0; first < p.size(); ++first) {
    const Instant first_step = detail::floor_div(p[first].start - t0, rain.step_s);
    while (end < p.size() &&
           detail::floor_div(p[end].start - t0, rain.step_s) < first_step + steps) {
      sum += p[end++].depth_m;
    }
    const int year = to_civil(p[first].start, 0).year;
    annual_max[year] = std::max(annual_max[year], sum);
    sum -= p[first].depth_m;
  }
  std::vector<double> maxima;
  for (const auto& [year, depth] : annual_max) maxima.push_back(depth);
  std::sort(maxima.begin(), maxima.end());
  return detail::quantile_of_sorted(maxima, 0.5) / static_cast<double>(steps * rain.step_s);
}

double fit_intermittency(const RainSeries& as_read, const Disaggregation& how,
                         const IdfCurve& idf) {
  double best = how.intermittency;
  double best_misfit = std::numeric_limits<double>::infinity();
  for (int k = 0; k <= 38; ++k) {
    Disaggregation trial = how;
    trial.levels.clear();
    trial.intermittency = 0.025 * k;
    const RainSeries rain = disaggregate(as_read, trial);
    double misfit = 0.0;
    for (const Instant d : kIdfCheckDurations_s) {
      if (d < how.step_s) continue;
      const double got = median_annual_max_intensity_m_per_s(rain, d);
      const double want = idf_intensity_m_per_s(idf, static_cast<double>(d));
      misfit += got > 0.0 ? std::pow(std::log(got / want), 2) : 1e9;
    }
    if (misfit < best_misfit) {
      best_misfit = misfit;
      best = trial.intermittency;
    }
  }
  return best;
}

bool is_random(DisaggregationMethod method) {
  return method == DisaggregationMethod::cascade || method == DisaggregationMethod::fragments;
}

bool is_uncalibrated(const Disaggregation& how) {
  return how.method == DisaggregationMethod::cascade && how.levels.empty() && !how.idf;
}

std::uint64_t realization_seed(std::uint64_t seed, std::uint64_t k) { return seed + k; }

std::string_view method_name(DisaggregationMethod method) {
  switch (method) {
    case DisaggregationMethod::block:
      return "block";
    case DisaggregationMethod::cascade:
      return "cascade";
    case DisaggregationMethod::fragments:
      return "fragments";
    default:
      return storm_kind_name(nrcs_kind(method));  // the NRCS shapes share storm's names
  }
}

std::vector<double> disaggregate_interval(double depth_m, Instant length_s, Instant start,
                                          const Disaggregation& how, bool wet_before,
                                          bool wet_after, double edge_m) {
  assert(length_s >= 1 && how.step_s >= 1);
  const bool nrcs = how.method != DisaggregationMethod::block && !is_random(how.method);
  if (how.method == DisaggregationMethod::block || length_s <= how.step_s ||
      (nrcs && length_s != kDay_s)) {
    return {depth_m};
  }
  const std::uint64_t seed = interval_seed(how, start);
  if (how.method == DisaggregationMethod::fragments) {
    const FragmentLibrary* library = library_for(how, start, length_s);
    if (library == nullptr) return {depth_m};
    std::mt19937_64 rng(seed);
    const Fragment& f = choose_fragment(*library, depth_m, season_day(start), wet_before, wet_after,
                                        detail::uniform_open(rng), wet_before ? edge_m : 0.0);
    return split_exactly(depth_m, stretched_cumulative(f, length_s, how.step_s));
  }
  const Instant steps = (length_s + how.step_s - 1) / how.step_s;
  // Boundary j of the steps, seconds after the interval's start.
  const auto boundary = [&](Instant j) { return std::min(j * how.step_s, length_s); };
  std::vector<double> cumulative(static_cast<std::size_t>(steps) + 1, 0.0);
  if (nrcs) {
    for (Instant j = 1; j < steps; ++j) {
      cumulative[j] =
          nrcs_cumulative_fraction(nrcs_kind(how.method), static_cast<double>(boundary(j)));
    }
  } else {
    int levels = 0;
    while (length_s > (how.step_s << levels)) ++levels;
    const std::vector<double> weights =
        cascade_weights(levels, seed, how, length_s, depth_m, wet_before, wet_after);
    std::vector<double> before(weights.size() + 1, 0.0);  // weight of the boxes before box i
    for (std::size_t i = 0; i < weights.size(); ++i) before[i + 1] = before[i] + weights[i];
    const auto boxes = static_cast<Instant>(weights.size());
    // Fractions of the weights' own sum (1 up to rounding), so that the boundaries after the
    // last wet box are exactly 1 and the dry steps there get nothing, not a unit of rounding.
    const double total = before.back();
    for (Instant j = 1; j < steps; ++j) {
      // Step boundary j falls in box i, a share r / length into it (exact integers).
      const Instant position = boundary(j) * boxes;
      const auto i = static_cast<std::size_t>(position / length_s);
      const Instant r = position % length_s;
      cumulative[j] =
          (before[i] + weights[i] * static_cast<double>(r) / static_cast<double>(length_s)) / total;
    }
  }
  cumulative.back() = 1.0;
  return split_exactly(depth_m, cumulative);
}

RainSeries disaggregate(const RainSeries& as_read, const Disaggregation& how) {
  RainSeries out;
  out.covered = as_read.covered;
  out.gaps = as_read.gaps;
  out.policy = as_read.policy;
  out.step_s = as_read.step_s;
  out.total_depth_m = as_read.total_depth_m;
  out.warnings = as_read.warnings;
  out.pulses.reserve(as_read.pulses.size());
  bool spread = false;
  double edge_m = 0.0;  // the last step of the interval before, as spread
  const std::vector<RainPulse>& pulses = as_read.pulses;
  const std::vector<const Fragment*> matched = spell_fragments(pulses, how);
  for (std::size_t k = 0; k < pulses.size(); ++k) {
    const RainPulse& p = pulses[k];
    const Instant length_s = p.end - p.start;
    // A wet interval right before or after: the storm goes on across the interval's ends.
    const bool wet_before = k > 0 && pulses[k - 1].end == p.start;
    const bool wet_after = k + 1 < pulses.size() && pulses[k + 1].start == p.end;
    const std::vector<double> parts =
        matched[k] != nullptr
            ? split_exactly(p.depth_m, stretched_cumulative(*matched[k], length_s, how.step_s))
            : disaggregate_interval(p.depth_m, length_s, p.start, how, wet_before, wet_after,
                                    edge_m);
    edge_m = parts.size() > 1 ? parts.back() : 0.0;
    if (parts.size() == 1) {
      out.pulses.push_back(p);
      continue;
    }
    spread = true;
    out.step_s = std::min(as_read.step_s, how.step_s);
    for (std::size_t j = 0; j < parts.size(); ++j) {
      if (parts[j] == 0.0) continue;
      const Instant start = p.start + static_cast<Instant>(j) * how.step_s;
      out.pulses.push_back({start, std::min(start + how.step_s, p.end), parts[j]});
    }
  }
  if (spread && is_uncalibrated(how)) {
    out.warnings.emplace_back(kUncalibratedWarning);
  }
  // A daily record says so when it is read.
  if (spread && as_read.step_s != kDay_s) {
    out.warnings.push_back("totals over " + format_duration(as_read.step_s) +
                           " hide rain intensity, and whether the siphon primes depends on it: "
                           "the results follow the chosen rain.disaggregate method");
  }
  return out;
}

}  // namespace gutterwatt
