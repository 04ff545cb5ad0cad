#include "gutterwatt/orifice_release.hpp"

#include <gtest/gtest.h>

#include <cmath>

#include "gutterwatt/hydraulics.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt::orifice_release_test {
namespace {

// An invented always-open 20 mm orifice, Cd 0.61.
ReleaseConfig orifice() {
  ReleaseConfig c;
  c.kind = ReleaseKind::orifice;
  c.orifice_diameter_m = 0.020;
  c.orifice_coefficient = 0.61;
  return c;
}

constexpr double kFullFlow = 1.0;  // m3/s: a conveyance that never limits (invented)

TEST(OrificeRelease, FlowsByTorricelli) {
  const OrificeRelease o(orifice());
  // source: orifice flow Q = Cd A sqrt(2 g h), value from REFERENCES.md section 5: d 20 mm,
  // h 2.0 m, Cd 0.61 -> 1.2002 L/s.
  EXPECT_NEAR(o.outflow_m3_per_s(ReleaseState::open, 2.0, kFullFlow), 1.2002e-3, 0.00005e-3);
  // Torricelli v = sqrt(2 g h) = 6.2631 m/s at 2.0 m (REFERENCES.md section 5), times Cd A.
  EXPECT_NEAR(o.outflow_m3_per_s(ReleaseState::open, 2.0, kFullFlow),
              0.61 * circle_area_m2(0.020) * 6.2631, 0.61 * circle_area_m2(0.020) * 0.00005);
}

TEST(OrificeRelease, ConveyanceCapsTheFlow) {
  const OrificeRelease o(orifice());
  EXPECT_EQ(o.outflow_m3_per_s(ReleaseState::open, 2.0, 2e-4), 2e-4);
}

TEST(OrificeRelease, IdlesOnlyWhenEmpty) {
  const OrificeRelease o(orifice());
  EXPECT_EQ(o.initial_state(0.0), ReleaseState::idle);
  EXPECT_EQ(o.initial_state(0.5 * kHoldHead_m), ReleaseState::idle);
  EXPECT_EQ(o.initial_state(2.0 * kHoldHead_m), ReleaseState::open);
  EXPECT_EQ(o.outflow_m3_per_s(ReleaseState::idle, 0.3, kFullFlow), 0.0);
  EXPECT_EQ(o.rest_ceiling_m(ReleaseState::idle), kHoldHead_m);
  EXPECT_LT(o.rest_ceiling_m(ReleaseState::open), 0.0);
}

TEST(OrificeRelease, GuardsSwitchAroundTheHoldHead) {
  const OrificeRelease o(orifice());
  Guard g[Release::kMaxGuards];
  ASSERT_EQ(o.guards(ReleaseState::open, 0.6 * kHoldHead_m, g), 1);
  EXPECT_EQ(g[0].next, ReleaseState::idle);
  EXPECT_GT(g[0].value, 0.0);
  o.guards(ReleaseState::open, 0.4 * kHoldHead_m, g);
  EXPECT_LT(g[0].value, 0.0);
  ASSERT_EQ(o.guards(ReleaseState::idle, 0.9 * kHoldHead_m, g), 1);
  EXPECT_EQ(g[0].next, ReleaseState::open);
  EXPECT_GT(g[0].value, 0.0);
  o.guards(ReleaseState::idle, 1.1 * kHoldHead_m, g);
  EXPECT_LT(g[0].value, 0.0);
}

TEST(OrificeRelease, CountsAsARunningRelease) {
  const OrificeRelease o(orifice());
  EXPECT_TRUE(o.is_running(ReleaseState::open));
  EXPECT_FALSE(o.is_running(ReleaseState::idle));
}

TEST(OrificeRelease, NoReleaseOnlyEverRests) {
  const NoRelease n;
  Guard g[Release::kMaxGuards];
  EXPECT_EQ(n.initial_state(0.5), ReleaseState::closed);
  EXPECT_EQ(n.outflow_m3_per_s(ReleaseState::closed, 0.5, kFullFlow), 0.0);
  EXPECT_EQ(n.guards(ReleaseState::closed, 0.5, g), 0);
  EXPECT_FALSE(n.is_running(ReleaseState::closed));
  EXPECT_GT(n.rest_ceiling_m(ReleaseState::closed), 1e6);
}

TEST(OrificeRelease, MakeReleaseBuildsEachKind) {
  ReleaseConfig c = orifice();
  EXPECT_NE(dynamic_cast<const OrificeRelease*>(make_release(c).get()), nullptr);
  c.kind = ReleaseKind::none;
  EXPECT_NE(dynamic_cast<const NoRelease*>(make_release(c).get()), nullptr);
}

}  // namespace
}  // namespace gutterwatt::orifice_release_test
