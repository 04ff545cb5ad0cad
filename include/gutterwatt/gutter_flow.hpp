#pragma once
/// What a long level gutter can deliver to an outlet at one end. A level gutter is not a flat
/// pool while it drains: the depth at the outlet is about critical for the flow and the water
/// stands deeper towards the closed end (spatially varied flow). The model is quasi-steady: at
/// each instant the stored volume takes the profile of a level channel with the discharge growing
/// linearly towards a free outfall (Beij 1934); the most the gutter delivers is the flow of that
/// profile, and the release takes no more. SI units throughout.

#include <cstddef>
#include <optional>
#include <utility>
#include <vector>

#include "gutterwatt/reservoir.hpp"

namespace gutterwatt {

/// Flow with critical depth `depth_m` in `section`: Q = sqrt(g A^3 / T), from the critical
/// condition Q^2 T / (g A^3) = 1 (Chow 1959, Open-Channel Hydraulics, eq. 4-3). 0 at depth 0.
double critical_flow_m3_per_s(const CrossSection& section, double depth_m);

/// The critical depth of `flow_m3_per_s` (>= 0) in `section`: the root of Q^2 / g = A^3 / T.
double critical_depth_m(const CrossSection& section, double flow_m3_per_s);

/// Depth over the outlet's critical depth at fraction `s` (0 at the closed end, 1 at the outlet)
/// of a level, frictionless channel whose discharge grows linearly to a free outfall: the
/// subcritical root of eta^3 - 3 eta + 2 s^2 = 0, eta = 2 cos(acos(-s^2) / 3): sqrt(3) at the
/// closed end, 1 at the outlet (Beij 1934 for a rectangular channel).
double level_channel_depth_ratio(double s);

/// BS EN 12056-3:2000 length factor F_L of a level eaves gutter: 1.00, 0.93, 0.86, 0.80 at
/// length over depth 50, 100, 150, 200, linear between; 1 below 50; held at 0.80 past 200 (a
/// project choice: the standard's table ends there).
double en12056_length_factor(double length_over_depth);

/// Beij's profile with the outlet at critical depth overstates what tests give a brim-full
/// half-round: it delivers 1.089 times BS EN 12056-3's design capacity 0.9 Q_N (Approved
/// Document H Table 2), 0.980 times the nominal Q_N = 2.78e-5 A^1.25. The delivery is scaled by
/// their ratio, 0.9184 (hand-computed: 0.9 x 2.78e-5 x (pi/8)^1.25 x 1e3^2.5 / 1e3 L/s over
/// sqrt(g) r^2.5 times the semicircle's sqrt(A^3/T) at r/sqrt(3), 0.5386), so a level half-round
/// gutter brim-full delivers the standard's rating; the depths stay Beij's.
inline constexpr double kGutterRatingCoefficient = 0.9184;

/// A release drawing more than a gutter delivers (a siphon's full-bore flow hardly depends on
/// the level) drains the little water around the outlet in seconds: the outlet depth falls from
/// critical to 0 as the draw exceeds the delivery by 1 / kOutletDrawdownRamp, a steep continuous
/// ramp standing in for that drop (a project choice) so that a siphon breaks there.
inline constexpr double kOutletDrawdownRamp = 100.0;

/// The delivery of one level gutter against the volume it holds, tabulated once.
class GutterDelivery {
 public:
  /// A level gutter of `section` and `length_m`, rim `rim_m` above the floor (the depth in the
  /// length factor), tabulated up to `max_volume_m3` (> 0) and held at its last value above.
  GutterDelivery(const CrossSection& section, double length_m, double rim_m, double max_volume_m3);

  /// Volume held by the profile whose outlet depth is critical at `outlet_depth_m`.
  double profile_volume_m3(double outlet_depth_m) const;
  /// What the gutter delivers with the water at its closed end at `depth_m`: at the rim, its
  /// brim-full capacity (the depth BS EN 12056-3 rates a gutter at).
  double flow_with_closed_end_at_m3_per_s(double depth_m) const;
  /// The most the gutter delivers to its outlet holding `volume_m3`.
  double max_flow_m3_per_s(double volume_m3) const;
  /// The depth at the outlet while the gutter holds `volume_m3` (a level pool would stand at
  /// `pool_level_m`) and the release draws `flow_m3_per_s`: the pool level with no flow, the
  /// critical depth of the profile at the most it delivers, and between them a drawdown growing
  /// with the square of the flow (as the momentum balance gives for small flows; a project choice
  /// between the two ends). A release drawing more than the gutter delivers empties the outlet
  /// below critical: the depth falls to 0 over kOutletDrawdownRamp.
  double outlet_depth_m(double volume_m3, double pool_level_m, double flow_m3_per_s) const;

 private:
  /// Index k with volumes_m3_[k] <= v < volumes_m3_[k + 1] and the fraction of the way.
  std::pair<std::size_t, double> locate(double volume_m3) const;

  CrossSection section_;
  double length_m_;
  double flow_factor_;  ///< kGutterRatingCoefficient times the length factor
  std::vector<double> volumes_m3_;
  std::vector<double> flows_m3_per_s_;
  std::vector<double> outlet_depths_m_;
  /// For each of kBuckets equal spans of volume up to the table's last, the cell holding the
  /// span's lower end: locate() starts there and steps over the few cells the span covers.
  std::vector<std::size_t> first_cell_;
  double buckets_per_m3_;
};

/// The delivery of the reservoir of `config` when it is a level gutter (is_level_gutter), else
/// nullopt: a tank, a table and a gutter laid to a fall are taken as level pools.
std::optional<GutterDelivery> gutter_delivery(const ReservoirConfig& config);

}  // namespace gutterwatt
