#include "gutterwatt/reservoir.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <initializer_list>

#include "gutterwatt/units.hpp"

namespace gutterwatt {
namespace {

// Invented reservoirs for the tests.
ReservoirConfig half_round(double diameter_m, double length_m, double rim_m) {
  ReservoirConfig c;
  c.shape = ReservoirShape::half_round;
  c.width_m = diameter_m;
  c.length_m = length_m;
  c.rim_m = rim_m;
  c.overflow_coefficient = 1.7;
  return c;
}

ReservoirConfig rectangular(double width_m, double length_m, double rim_m) {
  ReservoirConfig c = half_round(width_m, length_m, rim_m);
  c.shape = ReservoirShape::rectangular;
  return c;
}

// A tank narrow at the floor that widens to 2 m2 at 0.1 m and stays so up to the rim at 0.3 m.
ReservoirConfig table() {
  ReservoirConfig c;
  c.shape = ReservoirShape::table;
  c.table_level_m = {0.0, 0.1, 0.2};
  c.table_area_m2 = {1.0, 2.0, 2.0};
  c.rim_m = 0.3;
  c.overflow_coefficient = 1.7;
  c.overflow_length_m = 0.5;
  return c;
}

// Circular segment A = r^2 (theta - sin theta) / 2 with the central angle
// theta = 2 acos((r - h) / r): plane geometry, a form independent of the one in the source.
double segment_by_angle(double r, double h) {
  const double theta = 2.0 * std::acos((r - h) / r);
  return 0.5 * r * r * (theta - std::sin(theta));
}

TEST(Reservoir, HalfFullSegmentIsHalfTheCircle) {
  // Half a circle of radius r: pi r^2 / 2 (plane geometry, exact).
  const double r = 0.0625;
  EXPECT_NEAR(circular_segment_area_m2(r, r), 0.5 * kPi * r * r, 1e-15 * r * r);
  EXPECT_NEAR(circular_segment_area_m2(r, 2.0 * r), kPi * r * r, 1e-15 * r * r);
  EXPECT_EQ(circular_segment_area_m2(r, 0.0), 0.0);
}

TEST(Reservoir, SegmentAreaMatchesTheCentralAngleFormula) {
  const double r = 0.0625;
  for (double f : {0.01, 0.1, 0.25, 0.5, 0.75, 0.9, 1.0, 1.3, 1.9}) {
    const double h = f * r;
    EXPECT_NEAR(circular_segment_area_m2(r, h), segment_by_angle(r, h), 1e-12 * r * r) << f;
  }
}

TEST(Reservoir, HalfRoundVolumeIsSegmentAreaTimesLength) {
  const ReservoirGeometry g(half_round(0.125, 8.0, 0.0625));
  // Brim-full half-round: pi r^2 L / 2 (plane geometry).
  EXPECT_NEAR(g.volume_m3(0.0625), 0.5 * kPi * 0.0625 * 0.0625 * 8.0, 1e-15);
  EXPECT_NEAR(g.volume_m3(0.02), segment_by_angle(0.0625, 0.02) * 8.0, 1e-14);
  EXPECT_EQ(g.volume_m3(0.0), 0.0);
}

TEST(Reservoir, HalfRoundSurfaceIsTheChordTimesLength) {
  const ReservoirGeometry g(half_round(0.125, 8.0, 0.0625));
  // Chord of a circle at depth h: 2 sqrt(2 r h - h^2) (plane geometry).
  const double h = 0.02;
  EXPECT_NEAR(g.surface_area_m2(h), 2.0 * std::sqrt(2.0 * 0.0625 * h - h * h) * 8.0, 1e-14);
  EXPECT_NEAR(g.surface_area_m2(0.0625), 0.125 * 8.0, 1e-14);
}

TEST(Reservoir, HalfRoundLevelAndVolumeRoundTrip) {
  const ReservoirGeometry g(half_round(0.125, 8.0, 0.0625));
  for (double h : {1e-6, 1e-4, 0.001, 0.008, 0.03, 0.05, 0.0624, 0.0625, 0.07, 0.2}) {
    EXPECT_NEAR(g.level_m(g.volume_m3(h)), h, 1e-12) << h;
  }
  EXPECT_EQ(g.level_m(0.0), 0.0);
  // A fine sweep, between any nodes an interpolating inverse may use.
  for (int k = 1; k <= 1000; ++k) {
    const double h = 0.0625 * k / 1000.0;
    EXPECT_NEAR(g.level_m(g.volume_m3(h)), h, 1e-12) << h;
  }
}

TEST(Reservoir, RectangularLevelAndVolumeRoundTrip) {
  const ReservoirGeometry g(rectangular(0.1, 8.0, 0.062));
  EXPECT_NEAR(g.volume_m3(0.05), 0.1 * 8.0 * 0.05, 1e-16);
  for (double h : {0.0, 1e-6, 0.01, 0.05, 0.062, 0.08}) {
    EXPECT_NEAR(g.level_m(g.volume_m3(h)), h, 1e-14) << h;
  }
}

TEST(Reservoir, TableIntegratesTheTrapezoidalArea) {
  const ReservoirGeometry g(table());
  // V(h) = integral of the linearly interpolated area: exact for this piecewise-linear table.
  EXPECT_NEAR(g.volume_m3(0.05), 1.0 * 0.05 + 0.5 * 10.0 * 0.05 * 0.05, 1e-15);
  EXPECT_NEAR(g.volume_m3(0.1), 0.15, 1e-15);
  EXPECT_NEAR(g.volume_m3(0.2), 0.35, 1e-15);
  // Above the last tabulated level the area stays at its last value.
  EXPECT_NEAR(g.volume_m3(0.25), 0.45, 1e-15);
  EXPECT_NEAR(g.surface_area_m2(0.05), 1.5, 1e-15);
  EXPECT_NEAR(g.surface_area_m2(0.15), 2.0, 1e-15);
}

TEST(Reservoir, TableLevelAndVolumeRoundTrip) {
  const ReservoirGeometry g(table());
  for (double h : {0.0, 1e-6, 0.03, 0.1, 0.14, 0.2, 0.27, 0.3, 0.4}) {
    EXPECT_NEAR(g.level_m(g.volume_m3(h)), h, 1e-14) << h;
  }
}

TEST(Reservoir, WallsAreVerticalAboveTheRim) {
  const ReservoirGeometry g(half_round(0.125, 8.0, 0.05));
  const double rim_area = g.surface_area_m2(0.05);
  EXPECT_NEAR(g.volume_m3(0.06) - g.volume_m3(0.05), 0.01 * rim_area, 1e-15);
  EXPECT_EQ(g.surface_area_m2(0.3), rim_area);
}

TEST(Reservoir, OverflowsAsAWeirAboveTheRimOnly) {
  const ReservoirGeometry g(rectangular(0.1, 8.0, 0.062));
  EXPECT_EQ(g.overflow_m3_per_s(0.0), 0.0);
  EXPECT_EQ(g.overflow_m3_per_s(0.062), 0.0);
  // Weir Q = C L h^1.5 on the head over the rim: source: ISO 3846 broad-crested form, REFERENCES.md
  // section 6 (lumped C = 1.7 m^0.5/s, from Cd 1.0 the 1.7046 of that section).
  const double head = 0.01;
  EXPECT_NEAR(g.overflow_m3_per_s(0.062 + head), 1.7 * 8.0 * std::pow(head, 1.5), 1e-15);
}

TEST(Reservoir, OverflowUsesTheGivenWeirLength) {
  const ReservoirGeometry g(table());
  const double head = 0.02;
  EXPECT_NEAR(g.overflow_m3_per_s(0.3 + head), 1.7 * 0.5 * std::pow(head, 1.5), 1e-15);
}

TEST(Reservoir, BroadCrestedExampleFlow) {
  // source: ISO 3846 broad-crested weir, value from REFERENCES.md section 6: b 0.5 m, H 0.10 m,
  // Cd 1 -> 26.95 L/s, i.e. C = 1.7046 m^0.5/s.
  ReservoirConfig c = rectangular(0.5, 0.5, 0.2);
  c.overflow_coefficient = 1.7046;
  const ReservoirGeometry g(c);
  EXPECT_NEAR(g.overflow_m3_per_s(0.3), 26.95e-3, 0.005e-3);
}

}  // namespace
}  // namespace gutterwatt
