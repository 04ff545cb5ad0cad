#include "gutterwatt/float_valve.hpp"

#include <gtest/gtest.h>

#include <cmath>

#include "gutterwatt/hydraulics.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt::float_valve_test {
namespace {

// An invented float valve: opens at 300 mm, closes at 100 mm, 20 mm orifice, Cd 0.61.
ReleaseConfig valve() {
  ReleaseConfig c;
  c.kind = ReleaseKind::float_valve;
  c.trigger_level_m = 0.300;
  c.break_level_m = 0.100;
  c.orifice_diameter_m = 0.020;
  c.orifice_coefficient = 0.61;
  return c;
}

constexpr double kFullFlow = 1.0;  // m3/s: a conveyance that never limits (invented)

TEST(FloatValve, StartsOpenAtOrAboveTheOpeningLevel) {
  const FloatValve v(valve());
  EXPECT_EQ(v.initial_state(0.2), ReleaseState::closed);
  EXPECT_EQ(v.initial_state(0.3), ReleaseState::open);
  EXPECT_EQ(v.initial_state(0.5), ReleaseState::open);
}

TEST(FloatValve, OpenValveIsAnOrificeAtTheFloor) {
  const FloatValve v(valve());
  // source: orifice flow Q = Cd A sqrt(2 g h), value from REFERENCES.md section 5: d 20 mm,
  // h 2.0 m, Cd 0.61 -> 1.2002 L/s.
  EXPECT_NEAR(v.outflow_m3_per_s(ReleaseState::open, 2.0, kFullFlow), 1.2002e-3, 0.00005e-3);
  EXPECT_EQ(v.outflow_m3_per_s(ReleaseState::closed, 2.0, kFullFlow), 0.0);
}

TEST(FloatValve, ConveyanceCapsTheFlow) {
  const FloatValve v(valve());
  EXPECT_EQ(v.outflow_m3_per_s(ReleaseState::open, 2.0, 1e-4), 1e-4);
}

TEST(FloatValve, OpensAtTheOpeningLevel) {
  const FloatValve v(valve());
  Guard g[Release::kMaxGuards];
  ASSERT_EQ(v.guards(ReleaseState::closed, 0.3 - 1e-9, g), 1);
  EXPECT_EQ(g[0].next, ReleaseState::open);
  EXPECT_GT(g[0].value, 0.0);
  v.guards(ReleaseState::closed, 0.3 + 1e-9, g);
  EXPECT_LT(g[0].value, 0.0);
}

TEST(FloatValve, ClosesAtTheClosingLevel) {
  const FloatValve v(valve());
  Guard g[Release::kMaxGuards];
  ASSERT_EQ(v.guards(ReleaseState::open, 0.1 + 1e-9, g), 1);
  EXPECT_EQ(g[0].next, ReleaseState::closed);
  EXPECT_GT(g[0].value, 0.0);
  v.guards(ReleaseState::open, 0.1 - 1e-9, g);
  EXPECT_LT(g[0].value, 0.0);
  // Between the two levels an open valve stays open.
  v.guards(ReleaseState::open, 0.2, g);
  EXPECT_GT(g[0].value, 0.0);
}

TEST(FloatValve, RestsOnlyWhenClosed) {
  const FloatValve v(valve());
  EXPECT_EQ(v.rest_ceiling_m(ReleaseState::closed), 0.3);
  EXPECT_LT(v.rest_ceiling_m(ReleaseState::open), 0.0);
  EXPECT_TRUE(v.is_running(ReleaseState::open));
  EXPECT_FALSE(v.is_running(ReleaseState::closed));
}

TEST(FloatValve, MakeReleaseBuildsAValveForKindFloatValve) {
  const auto r = make_release(valve());
  EXPECT_NE(dynamic_cast<const FloatValve*>(r.get()), nullptr);
}

}  // namespace
}  // namespace gutterwatt::float_valve_test
