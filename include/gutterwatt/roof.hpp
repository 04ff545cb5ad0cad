#pragma once
/// The roof stage in closed form: initial loss, runoff coefficient, the roof's linear reservoir
/// and the first-flush diverter are linear and driven by the rain alone, so over a span of
/// constant rain their state and flows at any time follow exactly from the state at the span's
/// start. The reservoir downstream takes the roof's inflow as a known function of time; a lag of
/// 0 and a lag of a millisecond are then one path, neither stiff.

#include <array>
#include <limits>

#include "gutterwatt/units.hpp"

namespace gutterwatt {

struct RoofConfig {
  double area_m2 = 0.0;  ///< plan (horizontal) area
  double runoff_coefficient = 0.9;
  double initial_loss_m = 0.5e-3;
  double drying_m_per_s = 3e-3 / kSecondsPerDay;  ///< 3 mm a day
  double lag_s = 60.0;  ///< linear-reservoir constant; 0 passes runoff straight through
};

struct FirstFlushConfig {
  double volume_m3 = 0.0;  ///< 0: no diverter
  double reset_after_dry_s = 12.0 * 3600.0;
};

/// The roof stage's stores at one instant.
struct RoofStores {
  double loss_filled_m = 0.0;  ///< depth of the initial loss filled, 0..initial_loss_m
  double roof_m3 = 0.0;        ///< water on the roof's linear reservoir
  double diverted_m3 = 0.0;    ///< first-flush diverter fill, 0..volume_m3
};

/// What the roof stage made of a span, m3.
struct RoofFlows {
  double rain_m3 = 0.0;
  double loss_m3 = 0.0;
  double runoff_m3 = 0.0;  ///< out of the roof's linear reservoir
  double diverted_m3 = 0.0;
};

/// The roof stage over a span of constant rain `rain_m_per_s` from the stores `start`, as a
/// function of the time `t_s` >= 0 since the span's start. With rain, the initial loss fills at
/// the rain rate and then the runoff coefficient passes C i A on; without, the loss dries at its
/// drying rate. The linear reservoir dS/dt = E - S/k is solved exactly (exponential solution for
/// piecewise-constant input), and the diverter takes the first of the runoff until it is full.
class RoofSpan {
 public:
  RoofSpan(const RoofConfig& roof, const FirstFlushConfig& flush, double rain_m_per_s,
           const RoofStores& start);

  RoofStores stores(double t_s) const;
  /// Runoff out of the roof's linear reservoir since the span's start, m3 (nondecreasing).
  double runoff_m3(double t_s) const;
  /// The part of runoff_m3 that passed the diverter into the reservoir, m3 (nondecreasing).
  double to_reservoir_m3(double t_s) const;
  /// The rate of to_reservoir_m3 at `t_s`, m3/s (from the right at a kink).
  double to_reservoir_m3_per_s(double t_s) const;
  /// What to_reservoir_m3_per_s tends to from `t_s` on and at what rate (1/s; 0: it stays as it
  /// is), were the law in force at `t_s` to hold: the roof's linear reservoir draining toward its
  /// equilibrium (C i A once the initial loss is full, else 0); nothing while the diverter fills.
  std::array<double, 2> inflow_trend(double t_s) const;
  /// The flows over [0, t_s].
  RoofFlows flows(double t_s) const;

 private:
  double roof_m3(double t_s) const;

  RoofConfig roof_;
  double rain_m_per_s_;
  RoofStores start_;
  double full_at_s_;        // when the initial loss is full (infinite without rain)
  double effective_m3_s_;   // C i A once the loss is full
  double room_m3_;          // what the diverter still takes
  double roof_at_full_m3_;  // water on the roof as the loss fills, computed once
  // The last roof_m3 computed and its time: the stepper asks for the stores and the inflow at
  // one time several times over (each takes an exp), and for the next time only after that.
  mutable double last_t_s_ = std::numeric_limits<double>::quiet_NaN();
  mutable double last_roof_m3_ = 0.0;
};

}  // namespace gutterwatt
