#include "gutterwatt/reservoir.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <initializer_list>

#include "gutterwatt/units.hpp"

namespace gutterwatt::reservoir_test {
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

TEST(Reservoir, EvaporationIsTheRateTimesTheSurfaceAboveTheFilm) {
  // 3 mm/day over 2 m2 is 6 L/day = 6.944444e-8 m3/s; at half the 1 mm film, half of it.
  const double rate = 3e-3 / 86400.0;
  EXPECT_NEAR(evaporation_m3_per_s(rate, 2.0, 0.05), 6.944444444e-8, 1e-16);
  EXPECT_NEAR(evaporation_m3_per_s(rate, 2.0, 0.0005), 3.472222222e-8, 1e-16);
  EXPECT_EQ(evaporation_m3_per_s(rate, 2.0, 0.0), 0.0);
}

TEST(Reservoir, EvaporationRateIsOneForTheYearOrOneAMonth) {
  ReservoirConfig c;
  EXPECT_EQ(evaporation_rate_m_per_s(c, 7), 0.0);
  c.evaporation_m_per_s = {2.0};
  EXPECT_EQ(evaporation_rate_m_per_s(c, 7), 2.0);
  c.evaporation_m_per_s = {1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12};
  EXPECT_EQ(evaporation_rate_m_per_s(c, 1), 1.0);
  EXPECT_EQ(evaporation_rate_m_per_s(c, 12), 12.0);
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
  // By hand at 20 mm: theta = 2 acos(42.5 / 62.5) = 1.6461 rad, segment 0.5 r^2 (theta -
  // sin theta) = 1.267381e-3 m2, times 8 m = 10.139046 L.
  EXPECT_NEAR(g.volume_m3(0.02), 10.139046e-3, 1e-9);
  EXPECT_EQ(g.volume_m3(0.0), 0.0);
}

TEST(Reservoir, HalfRoundSurfaceIsTheChordTimesLength) {
  const ReservoirGeometry g(half_round(0.125, 8.0, 0.0625));
  // Chord of a circle at depth h: 2 sqrt(2 r h - h^2) (plane geometry).
  // By hand at 20 mm: 2 sqrt(2 x 0.0625 x 0.02 - 0.02^2) x 8 = 0.733212 m2.
  EXPECT_NEAR(g.surface_area_m2(0.02), 0.7332121, 1e-7);
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
  // The rim's chord at 50 mm of a 62.5 mm radius, by hand: 2 sqrt(2 x 0.0625 x 0.05 - 0.05^2)
  // = 0.122474 m, so 0.979796 m2 over 8 m, and 10 mm above the rim 9.797959 L.
  EXPECT_NEAR(g.volume_m3(0.06) - g.volume_m3(0.05), 9.797959e-3, 1e-9);
  EXPECT_NEAR(g.surface_area_m2(0.3), 0.9797959, 1e-7);
}

TEST(Reservoir, OverflowsAsAWeirAboveTheRimOnly) {
  const ReservoirGeometry g(rectangular(0.1, 8.0, 0.062));
  EXPECT_EQ(g.overflow_m3_per_s(0.0), 0.0);
  EXPECT_EQ(g.overflow_m3_per_s(0.062), 0.0);
  // Weir Q = C L h^1.5 on the head over the rim: source: ISO 3846 broad-crested form, REFERENCES.md
  // section 6 (lumped C = 1.7 m^0.5/s, from Cd 1.0 the 1.7046 of that section).
  // By hand: 1.7 x 8 x 0.01^1.5 = 0.0136 m3/s.
  EXPECT_NEAR(g.overflow_m3_per_s(0.062 + 0.01), 0.0136, 1e-15);
}

TEST(Reservoir, OverflowUsesTheGivenWeirLength) {
  const ReservoirGeometry g(table());
  // By hand: 1.7 x 0.5 x 0.02^1.5 = 2.404163e-3 m3/s.
  EXPECT_NEAR(g.overflow_m3_per_s(0.3 + 0.02), 2.404163e-3, 1e-9);
}

TEST(Reservoir, BroadCrestedExampleFlow) {
  // source: ISO 3846 broad-crested weir, value from REFERENCES.md section 6: b 0.5 m, H 0.10 m,
  // Cd 1 -> 26.95 L/s, i.e. C = 1.7046 m^0.5/s.
  ReservoirConfig c = rectangular(0.5, 0.5, 0.2);
  c.overflow_coefficient = 1.7046;
  const ReservoirGeometry g(c);
  EXPECT_NEAR(g.overflow_m3_per_s(0.3), 26.95e-3, 0.005e-3);
}

// Square inches to square metres: (25.4 mm)^2 = 645.16 mm^2 (NIST Handbook 44, exact).
constexpr double kSquareMetresPerSquareInch = 645.16e-6;

TEST(CrossSection, TrapezoidAreaIsTheMeanWidthTimesTheDepth) {
  // By hand: floor 60 mm, top 100 mm at 80 mm deep. At 40 mm the walls have spread by half of
  // 40 mm, so the surface is 80 mm wide and the area (60 + 80) / 2 * 40 = 2800 mm^2; full:
  // (60 + 100) / 2 * 80 = 6400 mm^2; each wall is the hypotenuse of 80 and 20 mm.
  const CrossSection t = CrossSection::trapezoid(0.060, 0.100, 0.080);
  EXPECT_NEAR(t.top_width_m(0.040), 0.080, 1e-15);
  EXPECT_NEAR(t.area_m2(0.040), 2800e-6, 1e-17);
  EXPECT_NEAR(t.area_m2(0.080), 6400e-6, 1e-17);
  EXPECT_NEAR(t.wetted_perimeter_m(0.080), 0.060 + 2.0 * std::sqrt(0.080 * 0.080 + 0.020 * 0.020),
              1e-15);
  // Above the top the walls are vertical: 10 mm more adds 100 mm * 10 mm.
  EXPECT_NEAR(t.area_m2(0.090), 6400e-6 + 1000e-6, 1e-17);
  EXPECT_EQ(t.area_m2(0.0), 0.0);
}

TEST(CrossSection, BoxIsATrapezoidWithUprightWalls) {
  // By hand: 100 mm wide, 30 mm of water: 3000 mm^2, wetted perimeter 100 + 2 * 30 mm.
  const CrossSection b = CrossSection::box(0.100, 0.075);
  EXPECT_NEAR(b.area_m2(0.030), 3000e-6, 1e-17);
  EXPECT_NEAR(b.top_width_m(0.030), 0.100, 1e-15);
  EXPECT_NEAR(b.wetted_perimeter_m(0.030), 0.160, 1e-15);
}

TEST(CrossSection, KStyleFiveInchArea) {
  // By hand, the 5-inch profile (floor 3 1/2 in, top 5 in, 3 3/8 in deep): brim-full
  // (3.5 + 5) / 2 * 3.375 = 14.34375 in^2; half full, 1.6875 in deep, the surface is
  // 3.5 + 1.5 / 2 = 4.25 in wide and the area (3.5 + 4.25) / 2 * 1.6875 = 6.5390625 in^2.
  const auto k = k_style_section(5.0 * kMetresPerInch);
  ASSERT_TRUE(k.has_value());
  EXPECT_NEAR(k->depth_m(), 3.375 * kMetresPerInch, 1e-15);
  EXPECT_NEAR(k->area_m2(k->depth_m()), 14.34375 * kSquareMetresPerSquareInch, 1e-15);
  EXPECT_NEAR(k->area_m2(1.6875 * kMetresPerInch), 6.5390625 * kSquareMetresPerSquareInch, 1e-15);
}

TEST(CrossSection, KStyleSixInchArea) {
  // By hand, the 6-inch profile (floor 4 1/4 in, top 6 in, 4 1/2 in deep):
  // (4.25 + 6) / 2 * 4.5 = 23.0625 in^2.
  const auto k = k_style_section(6.0 * kMetresPerInch);
  ASSERT_TRUE(k.has_value());
  EXPECT_NEAR(k->area_m2(k->depth_m()), 23.0625 * kSquareMetresPerSquareInch, 1e-15);
}

TEST(CrossSection, KStyleMetricSizesKeepTheInchProportions) {
  // By hand: 125 mm across, floor 125 * 3.5 / 5 = 87.5 mm, depth 125 * 3.375 / 5 = 84.375 mm:
  // (87.5 + 125) / 2 * 84.375 = 8964.84375 mm^2; 150 mm: floor 106.25, depth 112.5 mm:
  // (106.25 + 150) / 2 * 112.5 = 14414.0625 mm^2.
  EXPECT_NEAR(k_style_section(0.125)->area_m2(0.084375), 8964.84375e-6, 1e-15);
  EXPECT_NEAR(k_style_section(0.150)->area_m2(0.1125), 14414.0625e-6, 1e-15);
}

TEST(CrossSection, KStyleHasOnlyTradeSizes) {
  EXPECT_FALSE(k_style_section(0.100).has_value());
  EXPECT_FALSE(k_style_section(5.5 * kMetresPerInch).has_value());
}

TEST(CrossSection, HalfRoundByNominalSize) {
  // By hand: a 5-inch half-round brim-full holds half a circle of radius 2.5 in,
  // pi * 2.5^2 / 2 = 9.817477042 in^2, on a wetted arc of pi * 2.5 in; 6-inch: pi * 3^2 / 2.
  const CrossSection five = CrossSection::half_round(5.0 * kMetresPerInch);
  EXPECT_NEAR(five.area_m2(2.5 * kMetresPerInch), 9.817477042 * kSquareMetresPerSquareInch, 1e-12);
  EXPECT_NEAR(five.wetted_perimeter_m(2.5 * kMetresPerInch), kPi * 2.5 * kMetresPerInch, 1e-15);
  const CrossSection six = CrossSection::half_round(6.0 * kMetresPerInch);
  EXPECT_NEAR(six.area_m2(3.0 * kMetresPerInch), kPi * 4.5 * kSquareMetresPerSquareInch, 1e-15);
  EXPECT_NEAR(six.top_width_m(3.0 * kMetresPerInch), 6.0 * kMetresPerInch, 1e-15);
}

TEST(CrossSection, AreaIntegralOfATrapezoid) {
  // By hand: the integral of 60 y + (40 / 80) y^2 / 2 (mm) from 0 to 80 mm is
  // 60 * 80^2 / 2 + 0.5 * 80^3 / 6 = 192000 + 42666.67 mm^3 per mm of length.
  const CrossSection t = CrossSection::trapezoid(0.060, 0.100, 0.080);
  EXPECT_NEAR(t.area_integral_m3_per_m(0.080), (192000.0 + 0.5 * 512000.0 / 6.0) * 1e-9, 1e-18);
}

TEST(CrossSection, AreaIntegralOfAHalfRound) {
  // By hand: A(y) is the integral of the chord w, so the integral of A from 0 to r is that of
  // w(eta) (r - eta); with u = r - eta and w = 2 sqrt(r^2 - u^2) it is the integral of
  // 2 u sqrt(r^2 - u^2) from 0 to r, (2/3) r^3.
  const double r = 0.0635;
  const CrossSection h = CrossSection::half_round(2.0 * r);
  EXPECT_NEAR(h.area_integral_m3_per_m(r), 2.0 * r * r * r / 3.0, 1e-18);
  // Part way up, against Simpson's rule on the segment area (independent of the closed form).
  const double y = 0.3 * r;
  const int n = 2000;
  double sum = 0.0;
  for (int i = 0; i <= n; ++i) {
    const double weight = i == 0 || i == n ? 1.0 : (i % 2 == 1 ? 4.0 : 2.0);
    sum += weight * segment_by_angle(r, y * i / n);
  }
  // Simpson's rule converges slowly on the y^1.5 start of the segment area: 1e-9 relative.
  EXPECT_NEAR(h.area_integral_m3_per_m(y), sum * y / n / 3.0, 1e-9 * sum * y / n / 3.0);
}

TEST(Reservoir, KStyleGutterVolumeIsItsAreaTimesItsLength) {
  ReservoirConfig c;
  c.shape = ReservoirShape::k_style;
  c.width_m = 5.0 * kMetresPerInch;
  c.length_m = 40.0 * 0.3048;
  c.rim_m = 3.375 * kMetresPerInch;
  const ReservoirGeometry g(c);
  // 14.34375 in^2 over 40 ft (480 in) = 6885 in^3 = 29.8052 US gal (231 in^3 each).
  EXPECT_NEAR(g.volume_m3(c.rim_m), 6885.0 * 0.0254 * 0.0254 * 0.0254, 1e-15);
  for (int k = 0; k <= 200; ++k) {
    const double h = c.rim_m * k / 200.0;
    EXPECT_NEAR(g.level_m(g.volume_m3(h)), h, 1e-14) << h;
  }
}

// A box gutter 100 mm wide and 10 m long whose floor falls 20 mm towards the outlet.
ReservoirConfig falling_box() {
  ReservoirConfig c = rectangular(0.1, 10.0, 0.06);
  c.shape = ReservoirShape::box;
  c.fall_m = 0.02;
  return c;
}

TEST(Reservoir, FallingBoxHoldsAWedge) {
  const ReservoirGeometry g(falling_box());
  // By hand. Level 10 mm at the outlet, below the fall: the water reaches back 10 / 20 of the
  // 10 m, a wedge of 0.1 m * 5 m * 0.01 m / 2 = 2.5 L over 0.1 * 5 = 0.5 m^2.
  EXPECT_NEAR(g.volume_m3(0.01), 2.5e-3, 1e-17);
  EXPECT_NEAR(g.surface_area_m2(0.01), 0.5, 1e-15);
  // Level 50 mm: 50 mm deep at the outlet, 30 mm at the far end, mean 40 mm over 1 m^2: 40 L.
  EXPECT_NEAR(g.volume_m3(0.05), 40e-3, 1e-16);
  EXPECT_NEAR(g.surface_area_m2(0.05), 1.0, 1e-15);
}

TEST(Reservoir, FallingGuttersRoundTrip) {
  ReservoirConfig k;
  k.shape = ReservoirShape::k_style;
  k.width_m = 6.0 * kMetresPerInch;
  k.length_m = 12.0;
  k.fall_m = 0.03;
  k.rim_m = 0.1;
  ReservoirConfig h = half_round(0.125, 8.0, 0.0625);
  h.fall_m = 0.01;
  for (const ReservoirConfig& c : {falling_box(), k, h}) {
    const ReservoirGeometry g(c);
    for (int i = 0; i <= 400; ++i) {
      const double level = c.rim_m * 1.1 * i / 400.0;
      EXPECT_NEAR(g.level_m(g.volume_m3(level)), level, 1e-13) << level;
    }
    // Closely around the kinks in the volume: where the water reaches the far end, and the rim.
    for (const double edge : {c.fall_m, c.rim_m}) {
      for (int i = -200; i <= 200; ++i) {
        const double level = edge * (1.0 + 1e-5 * i);
        EXPECT_NEAR(g.level_m(g.volume_m3(level)), level, 1e-13) << level;
      }
    }
  }
}

TEST(Reservoir, TinyFallApproachesTheLevelGutter) {
  ReservoirConfig c = half_round(0.125, 8.0, 0.0625);
  const ReservoirGeometry level(c);
  c.fall_m = 1e-6;
  const ReservoirGeometry sloped(c);
  // The wedge loses half the fall in mean depth: about chord * L * F / 2 of volume (the
  // difference of two close integrals keeps about 1e-10 of the volume).
  EXPECT_NEAR(sloped.volume_m3(0.03),
              level.volume_m3(0.03) - 0.5 * level.surface_area_m2(0.03) * 1e-6,
              1e-10 * level.volume_m3(0.03));
}

}  // namespace
}  // namespace gutterwatt::reservoir_test
