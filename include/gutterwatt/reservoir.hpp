#pragma once
/// The reservoir (a gutter or small tank): level-volume relation and overflow over the rim, under
/// the level-pool assumption (a flat water surface along the whole length). A gutter's floor may
/// fall towards its outlet; the level is then measured above the floor at the outlet and the
/// water it holds is a wedge. What a long level gutter can deliver to its outlet (its water
/// surface is not flat while it drains) is gutter_flow.hpp's.

#include <optional>
#include <vector>

#include "gutterwatt/interpolation.hpp"

namespace gutterwatt {

/// A gutter's cross-section: the wetted area, the water-surface (top) width and the wetted
/// perimeter as functions of the depth of water above the floor. Above depth_m() the walls are
/// taken as vertical, so every function accepts any depth >= 0.
class CrossSection {
 public:
  /// A trapezoid, symmetric about its centre line: `floor_width_m` (>= 0) at the floor, widening
  /// linearly to `top_width_m` (> 0) at `depth_m` (> 0). Equal widths make a box.
  static CrossSection trapezoid(double floor_width_m, double top_width_m, double depth_m);
  /// A rectangular section.
  static CrossSection box(double width_m, double depth_m);
  /// The lower half of a circle of diameter `diameter_m` (depth: the radius).
  static CrossSection half_round(double diameter_m);

  double depth_m() const { return depth_m_; }
  /// Width of the water surface at `depth_m`.
  double top_width_m(double depth_m) const;
  /// Wetted cross-section area at `depth_m`.
  double area_m2(double depth_m) const;
  /// Length of the wetted boundary (floor and walls) at `depth_m`.
  double wetted_perimeter_m(double depth_m) const;
  /// The integral of area_m2 from 0 to `depth_m` (what a falling floor turns into volume).
  double area_integral_m3_per_m(double depth_m) const;

 private:
  enum class Kind { trapezoid, circle };
  CrossSection(Kind kind, double floor_width_m, double top_width_m, double depth_m)
      : kind_(kind), floor_width_m_(floor_width_m), top_width_m_(top_width_m), depth_m_(depth_m) {}

  Kind kind_;
  double floor_width_m_;  ///< circle: 0
  double top_width_m_;    ///< circle: the diameter
  double depth_m_;        ///< circle: the radius
};

/// A K-style (ogee-fronted) gutter by its nominal size (the width across the top): the trade
/// sizes 5 in and 6 in, and the metric 125 mm and 150 mm; nullopt for any other size. The section
/// is the trapezoid with the profile's floor width, top width and depth.
std::optional<CrossSection> k_style_section(double size_m);

/// Gutter sections (half_round .. rectangular), a level-area table, and a tank or barrel: a
/// vertical-sided section of plan area tank_area_m2, or a level-area table.
enum class ReservoirShape { half_round, k_style, box, trapezoid, rectangular, table, tank };

struct ReservoirConfig {
  ReservoirShape shape = ReservoirShape::half_round;
  /// half_round: diameter; k_style: nominal size; box, rectangular: inside width; trapezoid: top
  double width_m = 0.0;
  double floor_width_m = 0.0;         ///< trapezoid: width at the floor
  double depth_m = 0.0;               ///< trapezoid: depth at the top width; box: 0 = the rim
  double length_m = 0.0;              ///< every shape but table
  double fall_m = 0.0;                ///< drop of the floor over the length, towards the outlet
  double rim_m = 0.0;                 ///< overflow rim above the floor (at the outlet)
  double overflow_coefficient = 1.7;  ///< weir C in Q = C L h^1.5, m^0.5/s
  double overflow_length_m = 0.0;     ///< weir length; defaults to length_m (0 for table: required)
  std::vector<double> table_level_m;  ///< table: levels above the floor, increasing from 0
  std::vector<double> table_area_m2;  ///< table: plan (water-surface) area at each level
  double tank_area_m2 = 0.0;          ///< tank with vertical sides: plan area (0: the table)
  double initial_level_m = 0.0;
  /// Open-water evaporation from the exposed surface, m/s: none, one value for the year, or twelve
  /// for January to December (local months).
  std::vector<double> evaporation_m_per_s;
};

/// The evaporation rate of local `month` (1..12), m/s; 0 when none is given.
double evaporation_rate_m_per_s(const ReservoirConfig& config, int month);

/// Depth below which evaporation slows in proportion to the depth left (a film held in the
/// roughness of the floor), so that a flat-floored reservoir dries towards empty without passing
/// it: a project choice, no source.
inline constexpr double kEvaporationFilm_m = 1e-3;

/// Evaporation from a reservoir at `level_m` whose water surface has plan area `surface_m2`, at
/// rate `rate_m_per_s`: E A, times level / kEvaporationFilm_m below the film depth, m3/s.
double evaporation_m3_per_s(double rate_m_per_s, double surface_m2, double level_m);

/// True for a gutter section laid level (no fall): the shapes whose delivery to the outlet the
/// water-surface profile limits (gutter_flow.hpp). A tank and a table are level pools.
bool is_level_gutter(const ReservoirConfig& config);

/// The cross-section of every shape but table and tank (a k_style of a size without a profile: a
/// box).
CrossSection section_of(const ReservoirConfig& config);

/// Level-volume geometry of a gutter of any cross-section, level or falling, or of a level-area
/// table. Above the rim the walls are taken as vertical with the rim's surface area, so an
/// overflowing reservoir has a level. All functions accept any level >= 0 and any volume >= 0.
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
  enum class Kind { level_half_round, level_trapezoid, sloped, table };

  /// The reservoir's own geometry at level h in [0, rim], ignoring the vertical walls above it.
  double section_area_m2(double h) const;
  double section_volume_m3(double h) const;
  /// The level in [0, rim] holding `volume_m3`, by safeguarded Newton iteration from `guess`.
  double solve_level_m(double volume_m3, double guess) const;

  Kind kind_;
  CrossSection section_;
  double length_m_;
  double fall_m_;
  double rim_m_;
  double weir_coefficient_;
  double weir_length_m_;
  std::vector<double> levels_m_;
  std::vector<double> areas_m2_;
  std::vector<double> volumes_m3_;  ///< table: volume at each tabulated level
  double rim_volume_m3_;
  double rim_area_m2_;
  UniformTable shallow_table_;  ///< half-round: level against w = A^(2/3)
  UniformTable volume_table_;   ///< half-round, sloped: level against volume above 10 % of rim
};

/// Wetted cross-section of a circle of radius `radius_m` filled to depth `depth_m` (0..2r):
/// r^2 acos((r - h)/r) - (r - h) sqrt(2 r h - h^2) (circular-segment area).
double circular_segment_area_m2(double radius_m, double depth_m);

}  // namespace gutterwatt
