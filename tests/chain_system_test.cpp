#include "gutterwatt/chain_system.hpp"

#include <gtest/gtest.h>

#include "test_support.hpp"

namespace gutterwatt {
namespace {

using test_support::make_scenario;

// The test scenario's reservoir is a box 0.1 m wide and 8 m long (plan area 0.8 m2), its rim
// at 62 mm, a bell siphon's lip at 50 mm, a 40 m2 roof with C = 1 and no initial loss.
constexpr double kPlan_m2 = 0.1 * 8.0;
constexpr double kRain_m_per_s = 36e-3 / 3600.0;  // 36 mm/h

ChainMode wet_mode() {
  ChainMode m;
  m.depression = Depression::full;
  m.flush_full = true;
  return m;
}

TEST(ChainSystem, RoofLinearReservoirDrainsAtItsStorageOverTheLag) {
  Scenario sc = make_scenario();
  sc.roof.lag_s = 60.0;
  const ChainSystem system(sc);
  ChainState x{};
  x[kRoof] = 6e-3;  // 6 L on the roof
  ChainState d;
  ChainRates r;
  system.rates(x, wet_mode(), Forcing{kRain_m_per_s, 0.0}, r, d);
  // By hand: inflow C i A = 1e-5 m/s x 40 m2 = 4e-4 m3/s; outflow S/k = 6e-3 / 60 = 1e-4 m3/s.
  EXPECT_DOUBLE_EQ(d[kRoof], 3e-4);
  EXPECT_DOUBLE_EQ(d[kReservoir], 1e-4);  // idle siphon: all the runoff stays
}

TEST(ChainSystem, FirstFlushTakesTheRunoffUntilFull) {
  Scenario sc = make_scenario();
  sc.first_flush.volume_m3 = 10e-3;
  const ChainSystem system(sc);
  ChainMode m = wet_mode();
  m.flush_full = false;
  ChainState x{};
  x[kFlush] = 4e-3;
  ChainState d;
  ChainRates r;
  const Forcing f{kRain_m_per_s, 0.0};
  system.rates(x, m, f, r, d);
  EXPECT_DOUBLE_EQ(d[kFlush], 4e-4);  // lag 0: runoff C i A goes to the diverter
  EXPECT_DOUBLE_EQ(d[kReservoir], 0.0);
  Guards g;
  system.guards(x, m, f, r, g);
  EXPECT_DOUBLE_EQ(g[kGuardFlush], 6e-3);  // 10 L - 4 L
  x[kFlush] = 10.2e-3;
  EXPECT_EQ(system.apply_switch(kGuardFlush, x, m, f, r), 0.0);
  EXPECT_TRUE(m.flush_full);
  EXPECT_DOUBLE_EQ(x[kFlush], 10e-3);
}

TEST(ChainSystem, GuardsMeasureTheDistanceToLipAndRim) {
  const Scenario sc = make_scenario();
  const ChainSystem system(sc);
  ChainState x{};
  x[kReservoir] = kPlan_m2 * 0.030;  // 30 mm in the box
  const ChainMode m = wet_mode();
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
  const ChainMode m = wet_mode();
  const Forcing f{kRain_m_per_s, 0.0};
  // 4e-4 m3/s over 0.8 m2 lifts the level 0.5 mm/s: 20 mm to the lip take 40 s.
  EXPECT_TRUE(system.at_rest(x, m, f, 39.0));
  EXPECT_FALSE(system.at_rest(x, m, f, 41.0));
}

}  // namespace
}  // namespace gutterwatt
