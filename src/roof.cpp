#include "gutterwatt/roof.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace gutterwatt {
namespace {

// exp(-x) for x >= 0. Past 746 the result is 0 in double precision (below half the least
// subnormal, 4.9e-324 = exp(-744.4)), which the C library's exp reaches only through its
// underflow path, setting errno: with a lag of 0.01 s nearly every time in a minute's span is
// there, and that path made the 0.01 s lag's ten-year run about a quarter longer (0.30 to 0.39 s,
// docs/performance.md).
double decay(double x) { return x > 746.0 ? 0.0 : std::exp(-x); }

}  // namespace

RoofSpan::RoofSpan(const RoofConfig& roof, const FirstFlushConfig& flush, double rain_m_per_s,
                   const RoofStores& start)
    : roof_(roof),
      rain_m_per_s_(rain_m_per_s),
      start_(start),
      full_at_s_(rain_m_per_s > 0.0
                     ? std::max(0.0, roof.initial_loss_m - start.loss_filled_m) / rain_m_per_s
                     : std::numeric_limits<double>::infinity()),
      // Rational method Q = C i A on the rain left once the initial loss is full.
      effective_m3_s_(roof.runoff_coefficient * rain_m_per_s * roof.area_m2),
      room_m3_(std::max(0.0, flush.volume_m3 - start.diverted_m3)),
      roof_at_full_m3_(roof.lag_s > 0.0 && full_at_s_ < std::numeric_limits<double>::infinity()
                           ? start.roof_m3 * decay(full_at_s_ / roof.lag_s)
                           : 0.0) {}

// The linear reservoir dS/dt = E - S/k (Nash 1957; Chow, Maidment & Mays 1988, Applied
// Hydrology, section 8.5) with E = 0 until the initial loss is full and C i A after: for a
// constant input over a span, S(t) = E k + (S(0) - E k) exp(-t / k).
double RoofSpan::roof_m3(double t_s) const {
  const double k = roof_.lag_s;
  if (k <= 0.0) return 0.0;
  if (t_s == last_t_s_) return last_roof_m3_;
  last_t_s_ = t_s;
  if (t_s <= full_at_s_) {
    last_roof_m3_ = start_.roof_m3 * decay(t_s / k);
  } else {
    const double equilibrium = effective_m3_s_ * k;
    last_roof_m3_ = equilibrium + (roof_at_full_m3_ - equilibrium) * decay((t_s - full_at_s_) / k);
  }
  return last_roof_m3_;
}

RoofStores RoofSpan::stores(double t_s) const {
  RoofStores s;
  if (rain_m_per_s_ > 0.0) {
    s.loss_filled_m = t_s >= full_at_s_ ? std::max(start_.loss_filled_m, roof_.initial_loss_m)
                                        : start_.loss_filled_m + rain_m_per_s_ * t_s;
  } else {
    s.loss_filled_m = std::max(0.0, start_.loss_filled_m - roof_.drying_m_per_s * t_s);
  }
  s.roof_m3 = roof_m3(t_s);
  s.diverted_m3 = start_.diverted_m3 + std::min(runoff_m3(t_s), room_m3_);
  return s;
}

// What entered the roof store less its change; without a lag the runoff is what enters.
double RoofSpan::runoff_m3(double t_s) const {
  const double entered = effective_m3_s_ * std::max(0.0, t_s - full_at_s_);
  if (roof_.lag_s <= 0.0) return entered;
  // Rounding can leave -1e-19 here: clamp, keeping a NaN (an invalid input) visible.
  return std::max(start_.roof_m3 + entered - roof_m3(t_s), 0.0);
}

double RoofSpan::to_reservoir_m3(double t_s) const {
  return std::max(runoff_m3(t_s) - room_m3_, 0.0);
}

double RoofSpan::to_reservoir_m3_per_s(double t_s) const {
  if (runoff_m3(t_s) < room_m3_) return 0.0;
  if (roof_.lag_s <= 0.0) return t_s >= full_at_s_ ? effective_m3_s_ : 0.0;
  return roof_m3(t_s) / roof_.lag_s;
}

std::array<double, 2> RoofSpan::inflow_trend(double t_s) const {
  if (roof_.lag_s <= 0.0 || runoff_m3(t_s) < room_m3_) return {to_reservoir_m3_per_s(t_s), 0.0};
  return {t_s < full_at_s_ ? 0.0 : effective_m3_s_, 1.0 / roof_.lag_s};
}

RoofFlows RoofSpan::flows(double t_s) const {
  RoofFlows f;
  const double rain_m3_s = rain_m_per_s_ * roof_.area_m2;
  const double wet_s = std::max(0.0, t_s - full_at_s_);
  f.rain_m3 = rain_m3_s * t_s;
  f.loss_m3 = rain_m3_s * std::min(t_s, full_at_s_) + (rain_m3_s - effective_m3_s_) * wet_s;
  f.runoff_m3 = runoff_m3(t_s);
  f.diverted_m3 = std::min(f.runoff_m3, room_m3_);
  return f;
}

}  // namespace gutterwatt
