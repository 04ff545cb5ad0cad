#pragma once
/// The reservoir (a gutter or small tank): level-volume relation and overflow over the rim, under
/// the level-pool assumption (a flat water surface along the whole length).

#include <vector>

#include "gutterwatt/interpolation.hpp"

namespace gutterwatt {

enum class ReservoirShape { half_round, rectangular, table };

struct ReservoirConfig {
  ReservoirShape shape = ReservoirShape::half_round;
  double width_m = 0.0;               ///< half_round: diameter; rectangular: inside width
  double length_m = 0.0;              ///< half_round and rectangular
  double rim_m = 0.0;                 ///< overflow rim above the floor
  double overflow_coefficient = 1.7;  ///< weir C in Q = C L h^1.5, m^0.5/s
  double overflow_length_m = 0.0;     ///< weir length; defaults to length_m (0 for table: required)
  std::vector<double> table_level_m;  ///< table: levels above the floor, increasing from 0
  std::vector<double> table_area_m2;  ///< table: plan (water-surface) area at each level
  double initial_level_m = 0.0;
};

/// Level-volume geometry of a half-round or rectangular gutter, or of a level-area table. Above
/// the rim the walls are taken as vertical with the rim's surface area, so an overflowing
/// reservoir has a level. All functions accept any level >= 0 and any volume >= 0.
class ReservoirGeometry {
 public:
  explicit ReservoirGeometry(const ReservoirConfig& config);

  double volume_m3(double level_m) const;
  /// Inverse of volume_m3 (for the half-round section, tables solved once, with one Newton step
  /// near empty).
  double level_m(double volume_m3) const;
  /// Plan area of the water surface at `level_m`.
  double surface_area_m2(double level_m) const;
  double rim_m() const { return rim_m_; }
  /// Weir flow over the rim, Q = C L (h - h_rim)^1.5; 0 at or below the rim.
  double overflow_m3_per_s(double level_m) const;

 private:
  /// The section's own geometry at level h in [0, rim], ignoring the vertical walls above the rim.
  double section_area_m2(double h) const;
  double section_volume_m3(double h) const;
  /// Half-round: the level holding cross-section `area_m2`, by safeguarded Newton iteration.
  double solve_half_round_level_m(double area_m2) const;

  ReservoirShape shape_;
  double width_m_;
  double length_m_;
  double rim_m_;
  double weir_coefficient_;
  double weir_length_m_;
  std::vector<double> levels_m_;
  std::vector<double> areas_m2_;
  std::vector<double> volumes_m3_;  ///< table: volume at each tabulated level
  double rim_volume_m3_;
  double rim_area_m2_;
  UniformTable shallow_table_;  ///< half-round: level against w = A^(2/3)
  UniformTable volume_table_;   ///< half-round: level against volume above 10 % of the radius
};

/// Wetted cross-section of a circle of radius `radius_m` filled to depth `depth_m` (0..2r):
/// r^2 acos((r - h)/r) - (r - h) sqrt(2 r h - h^2) (circular-segment area).
double circular_segment_area_m2(double radius_m, double depth_m);

}  // namespace gutterwatt
