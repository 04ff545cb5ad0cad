#pragma once
/// Brings a coarse rain record down to a fine step (rain.disaggregate): each interval's depth is
/// spread over steps by a 24-hour shape or a random cascade, and conserved exactly.

#include <cstdint>
#include <string_view>
#include <vector>

#include "gutterwatt/disaggregation_config.hpp"
#include "gutterwatt/rain_input.hpp"

namespace gutterwatt {

/// The depths of one interval of `length_s` (>= 1) seconds, in time order over its steps of
/// `how.step_s` (the last one shorter when the step does not divide the length); the interval
/// as one value when it is no longer than a step or the method is `block`. Every depth is a
/// whole multiple of the spacing of doubles at `depth_m`, so the depths add up to `depth_m`
/// exactly in any order. `key` (with `how.seed`) picks the cascade's draw. An NRCS method needs
/// `length_s` of 24 h; another length is returned as one value.
std::vector<double> disaggregate_interval(double depth_m, Instant length_s, std::uint64_t key,
                                          const Disaggregation& how);

/// The record with every pulse longer than `how.step_s` spread by disaggregate_interval (the
/// pulse's start instant is its key); coverage, gaps, warnings and the total depth are those of
/// `as_read`, and `step_s` becomes `how.step_s` when a pulse was spread. Each pulse's depth is
/// conserved exactly. A record that is not daily (step other than 1 d) gains a warning like
/// kDailyWarning when a pulse was spread.
RainSeries disaggregate(const RainSeries& as_read, const Disaggregation& how);

/// True when the method draws at random (the cascade): its realizations differ by seed.
bool is_random(DisaggregationMethod method);

/// The seed of realization `k` (0-based) of a record disaggregated with `seed`: `seed + k`
/// (modulo 2^64), so realization 0 is the single run and any realization can be repeated alone
/// by giving its seed.
std::uint64_t realization_seed(std::uint64_t seed, std::uint64_t k);

/// The scenario name of a method (`nrcs-II`, `cascade`, ...).
std::string_view method_name(DisaggregationMethod method);

}  // namespace gutterwatt
