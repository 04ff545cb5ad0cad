#include "gutterwatt/disaggregation.hpp"

#include <algorithm>
#include <cassert>
#include <cmath>
#include <limits>
#include <random>
#include <utility>

#include "detail.hpp"
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

// W at the probabilities 0, 1/(m - 1), ..., 1 of a level; uniform when it has none.
std::vector<double> w_quantiles_of(const CascadeLevel& level) {
  if (!level.w_quantiles.empty()) return level.w_quantiles;
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

// Box weights of a microcanonical binary cascade after `levels` halvings of an interval of
// `length_s` (2^levels boxes, summing to 1 up to rounding). Structure after Olsson (1998), Hydrol.
// Earth Syst. Sci. 2, 19-30: each box splits 1/0, 0/1 or W/(1 - W). Uncalibrated: 1/0 and 0/1
// together with probability `intermittency`, either with equal chance, W uniform.
std::vector<double> cascade_weights(int levels, std::uint64_t seed, const Disaggregation& how,
                                    Instant length_s) {
  std::mt19937_64 rng(seed);
  std::vector<double> weights{1.0};
  for (int level = 0; level < levels; ++level) {
    const bool calibrated = !how.levels.empty();
    const CascadeLevel at =
        calibrated ? cascade_level_at(how.levels, std::ldexp(static_cast<double>(length_s), -level))
                   : CascadeLevel{};
    const std::vector<double> q = calibrated ? w_quantiles_of(at) : std::vector<double>{};
    std::vector<double> next(weights.size() * 2, 0.0);
    for (std::size_t i = 0; i < weights.size(); ++i) {
      const double w = weights[i];
      if (w == 0.0) continue;
      const double u = detail::uniform_open(rng);
      if (!calibrated && u < how.intermittency) {
        next[2 * i + (detail::uniform_open(rng) < 0.5 ? 0 : 1)] = w;
      } else if (calibrated && u < at.p10 + at.p01) {
        next[2 * i + (u < at.p10 ? 0 : 1)] = w;
      } else {
        const double share =
            calibrated ? draw_w(q, detail::uniform_open(rng)) : detail::uniform_open(rng);
        const double left = share * w;
        next[2 * i] = left;
        next[2 * i + 1] = w - left;
      }
    }
    weights = std::move(next);
  }
  return weights;
}

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

CascadeLevel cascade_level_at(const std::vector<CascadeLevel>& levels, double box_s) {
  assert(!levels.empty());
  if (box_s <= levels.front().box_s) return levels.front();
  if (box_s >= levels.back().box_s) return levels.back();
  std::size_t k = 1;
  while (levels[k].box_s < box_s) ++k;
  const CascadeLevel& a = levels[k - 1];
  const CascadeLevel& b = levels[k];
  const double f = std::log(box_s / a.box_s) / std::log(b.box_s / a.box_s);
  const auto mix = [f](double x, double y) { return x + f * (y - x); };
  CascadeLevel out;
  out.box_s = box_s;
  out.p10 = mix(a.p10, b.p10);
  out.p01 = mix(a.p01, b.p01);
  const std::vector<double> qa = w_quantiles_of(a);
  const std::vector<double> qb = w_quantiles_of(b);
  out.w_quantiles.resize(qa.size());
  for (std::size_t i = 0; i < qa.size(); ++i) out.w_quantiles[i] = mix(qa[i], qb[i]);
  out.boxes = std::min(a.boxes, b.boxes);
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
  // 2^j steps; each wet box of 2^j steps is seen as the parent of its two halves. Over the
  // wet parents of one duration, P(1/0) = n(1/0) / n, P(0/1) = n(0/1) / n and
  // P(x/(1-x)) = n(x/(1-x)) / n, and W = V(first half) / V(parent) of the x/(1-x) splits gives
  // the distribution of W, kept here as its quantiles (Hyndman & Fan definition 7).
  for (Instant box_s = 2 * fine.step_s; box_s <= 2 * longest_s; box_s *= 2) {
    std::vector<std::pair<std::int64_t, double>> parents;
    CascadeLevel level;
    level.box_s = static_cast<double>(box_s);
    std::vector<double> w;
    std::size_t n10 = 0;
    std::size_t n01 = 0;
    for (std::size_t i = 0; i < boxes.size();) {
      const std::int64_t parent = detail::floor_div(boxes[i].first, 2);
      double first = 0.0;
      double second = 0.0;
      for (; i < boxes.size() && detail::floor_div(boxes[i].first, 2) == parent; ++i) {
        (boxes[i].first - 2 * parent == 0 ? first : second) += boxes[i].second;
      }
      parents.emplace_back(parent, first + second);
      if (second == 0.0) {
        ++n10;
      } else if (first == 0.0) {
        ++n01;
      } else {
        w.push_back(first / (first + second));
      }
    }
    boxes = std::move(parents);
    const std::size_t n = n10 + n01 + w.size();
    if (n < kMinCalibrationBoxes) break;
    level.boxes = n;
    level.p10 = static_cast<double>(n10) / static_cast<double>(n);
    level.p01 = static_cast<double>(n01) / static_cast<double>(n);
    if (w.size() >= 2) {
      std::sort(w.begin(), w.end());
      level.w_quantiles.resize(kWQuantiles);
      for (std::size_t k = 0; k < kWQuantiles; ++k) {
        level.w_quantiles[k] = detail::quantile_of_sorted(
            w, static_cast<double>(k) / static_cast<double>(kWQuantiles - 1));
      }
    }
    out.push_back(std::move(level));
  }
  return out;
}

bool is_random(DisaggregationMethod method) { return method == DisaggregationMethod::cascade; }

std::uint64_t realization_seed(std::uint64_t seed, std::uint64_t k) { return seed + k; }

std::string_view method_name(DisaggregationMethod method) {
  switch (method) {
    case DisaggregationMethod::block:
      return "block";
    case DisaggregationMethod::nrcs_i:
      return "nrcs-I";
    case DisaggregationMethod::nrcs_ia:
      return "nrcs-IA";
    case DisaggregationMethod::nrcs_ii:
      return "nrcs-II";
    case DisaggregationMethod::nrcs_iii:
      return "nrcs-III";
    case DisaggregationMethod::cascade:
      return "cascade";
  }
  return "";
}

std::vector<double> disaggregate_interval(double depth_m, Instant length_s, std::uint64_t key,
                                          const Disaggregation& how) {
  assert(length_s >= 1 && how.step_s >= 1);
  const bool nrcs = how.method != DisaggregationMethod::block && !is_random(how.method);
  if (how.method == DisaggregationMethod::block || length_s <= how.step_s ||
      (nrcs && length_s != kDay_s)) {
    return {depth_m};
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
    const std::uint64_t seed = split_mix(how.seed ^ split_mix(key));
    const std::vector<double> weights = cascade_weights(levels, seed, how, length_s);
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
          (before[i] + weights[i] * static_cast<double>(r) / static_cast<double>(length_s)) /
          total;
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
  for (const RainPulse& p : as_read.pulses) {
    const Instant length_s = p.end - p.start;
    const std::vector<double> parts =
        disaggregate_interval(p.depth_m, length_s, static_cast<std::uint64_t>(p.start), how);
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
  if (spread && is_random(how.method) && how.levels.empty()) {
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
