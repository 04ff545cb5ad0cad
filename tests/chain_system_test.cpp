#include "gutterwatt/chain_system.hpp"

#include <gtest/gtest.h>

#include "test_support.hpp"

namespace gutterwatt::chain_system_test {
namespace {

using test_support::make_scenario;

// The test scenario's reservoir is a box 0.1 m wide and 8 m long (plan area 0.8 m2), its rim
// at 62 mm, a bell siphon's lip at 50 mm, a 40 m2 roof with C = 1 and no initial loss.
constexpr double kPlan_m2 = 0.1 * 8.0;
constexpr double kRain_m_per_s = 36e-3 / 3600.0;  // 36 mm/h

TEST(ChainSystem, ReservoirRateLeavesOutTheRoofAndTheRoofSlotsStayPut) {
  Scenario sc = make_scenario();
  sc.roof.lag_s = 60.0;
  const ChainSystem system(sc);
  ChainState x{};
  x[kRoof] = 6e-3;  // 6 L on the roof
  x[kReservoir] = kPlan_m2 * 0.030;
  ChainState d;
  ChainRates r;
  system.rates(x, ChainMode{}, Forcing{kRain_m_per_s, 0.0}, r, d);
  // The roof stage is advanced in closed form (RoofSpan): no rate of its own here, and an idle
  // siphon below its lip with no overflow leaves the reservoir unchanged.
  EXPECT_EQ(d[kRoof], 0.0);
  EXPECT_EQ(d[kDepression], 0.0);
  EXPECT_EQ(d[kFlush], 0.0);
  EXPECT_EQ(d[kReservoir], 0.0);
}

TEST(ChainSystem, GuardsMeasureTheDistanceToLipAndRim) {
  const Scenario sc = make_scenario();
  const ChainSystem system(sc);
  ChainState x{};
  x[kReservoir] = kPlan_m2 * 0.030;  // 30 mm in the box
  const ChainMode m;
  const Forcing f{0.0, 0.0};
  const ChainRates r = system.rates(x, m, f);
  EXPECT_DOUBLE_EQ(r.level_m, 0.030);
  Guards g;
  system.guards(x, m, f, r, g);
  // Idle bell: 50 mm lip + 0.01 mm hold head - 30 mm; rim: 62 mm + 0.01 mm - 30 mm.
  EXPECT_NEAR(g[kGuardRelease0], 0.02001, 1e-15);
  EXPECT_NEAR(g[kGuardOverflow], 0.03201, 1e-15);
  EXPECT_EQ(g[kGuardRelease1], 1.0);  // not active while idle
}

TEST(ChainSystem, AtRestWhileTheRainCannotLiftTheLevelToTheLip) {
  const Scenario sc = make_scenario();
  const ChainSystem system(sc);
  ChainState x{};
  x[kReservoir] = kPlan_m2 * 0.030;
  const ChainMode m;
  // 20 mm to the lip over 0.8 m2 hold 16 L (the lip's hold head of 0.01 mm adds 8 mL).
  EXPECT_NEAR(system.rest_capacity_m3(x, m) - x[kReservoir], 16.008e-3, 1e-9);
  ChainMode running;
  running.release = ReleaseState::running;
  EXPECT_LT(system.rest_capacity_m3(x, running), 0.0);
  ChainMode overflowing;
  overflowing.overflowing = true;
  EXPECT_LT(system.rest_capacity_m3(x, overflowing), 0.0);
}

}  // namespace
}  // namespace gutterwatt::chain_system_test
