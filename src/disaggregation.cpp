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

// Box weights of a microcanonical binary cascade after `levels` halvings (2^levels boxes, summing
// to 1 up to rounding). Structure after Olsson (1998), Hydrol. Earth Syst. Sci. 2, 19-30: each box
// splits 0/1 or 1/0 (together with probability `intermittency`) or W/(1 - W) with W uniform.
std::vector<double> cascade_weights(int levels, std::uint64_t seed, double intermittency) {
  std::mt19937_64 rng(seed);
  std::vector<double> weights{1.0};
  for (int level = 0; level < levels; ++level) {
    std::vector<double> next(weights.size() * 2, 0.0);
    for (std::size_t i = 0; i < weights.size(); ++i) {
      const double w = weights[i];
      if (w == 0.0) continue;
      if (detail::uniform_open(rng) < intermittency) {
        next[2 * i + (detail::uniform_open(rng) < 0.5 ? 0 : 1)] = w;
      } else {
        const double left = detail::uniform_open(rng) * w;
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
    const std::vector<double> weights = cascade_weights(levels, seed, how.intermittency);
    std::vector<double> before(weights.size() + 1, 0.0);  // weight of the boxes before box i
    for (std::size_t i = 0; i < weights.size(); ++i) before[i + 1] = before[i] + weights[i];
    const auto boxes = static_cast<Instant>(weights.size());
    for (Instant j = 1; j < steps; ++j) {
      // Step boundary j falls in box i, a share r / length into it (exact integers).
      const Instant position = boundary(j) * boxes;
      const auto i = static_cast<std::size_t>(position / length_s);
      const Instant r = position % length_s;
      cumulative[j] =
          before[i] + weights[i] * static_cast<double>(r) / static_cast<double>(length_s);
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
  // A daily record says so when it is read.
  if (spread && as_read.step_s != kDay_s) {
    out.warnings.push_back("totals over " + format_duration(as_read.step_s) +
                           " hide rain intensity, and whether the siphon primes depends on it: "
                           "the results follow the chosen rain.disaggregate method");
  }
  return out;
}

}  // namespace gutterwatt
