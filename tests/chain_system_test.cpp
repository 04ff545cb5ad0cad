#include "gutterwatt/chain_system.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <stdexcept>

#include "test_support.hpp"

namespace gutterwatt::chain_system_test {
namespace {

using test_support::make_scenario;

// The test scenario's reservoir is a box 0.1 m wide and 8 m long (plan area 0.8 m2), its rim
// at 62 mm, a bell siphon's lip at 50 mm, a 40 m2 roof with C = 1 and no initial loss.
constexpr double kPlan_m2 = 0.1 * 8.0;
constexpr double kRain_m_per_s = 36e-3 / 3600.0;  // 36 mm/h

// A trickle limit asked for in place of the column's own (RunOptions::trickle_head_m) is taken
// below it, and refused above it, where the jet could run the generator while the column trickles.
TEST(ChainSystem, TakesATrickleLimitBelowTheColumnsOwnAndRefusesOneAbove) {
  Scenario sc = make_scenario();
  sc.head_column = HeadColumnConfig{0.12, 3.0};
  const ChainSystem own(sc);
  const double own_m = trickle_head_m(own.plant());
  ASSERT_GT(own_m, 0.004);
  // The 120 mm column's water at 4 mm, by hand: pi / 4 x 0.12^2 x 0.004 = 4.52389e-5 m3.
  EXPECT_NEAR(ChainSystem(sc, 0.004).trickle_volume_m3(), 4.52389e-5, 1e-10);
  EXPECT_THROW(ChainSystem(sc, 1.01 * own_m), std::invalid_argument);
}

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

TEST(ChainSystem, RatesAndGuardsReadOnlyTheReadSlots) {
  // The solver forms its intermediate stages for kReadSlots alone (dormand_prince.hpp): every
  // other slot may hold anything there. Changing them all must change no rate and no guard, in
  // every mode of the release, the column, the generator and the battery.
  Scenario sc = make_scenario();
  sc.head_column = HeadColumnConfig{0.12, 3.0};
  sc.battery.self_discharge_per_month = 0.03;
  const ChainSystem system(sc);
  const Forcing f{kRain_m_per_s, 0.2, 1e-8};
  for (ReleaseState release : {ReleaseState::idle, ReleaseState::dribble, ReleaseState::running}) {
    for (ColumnMode column : {ColumnMode::trickle, ColumnMode::partial, ColumnMode::full}) {
      for (bool on : {false, true}) {
        for (BatteryMode battery : {BatteryMode::normal, BatteryMode::full, BatteryMode::empty}) {
          const ChainMode m{release, on, column, on, battery};
          ChainState x{};
          x[kReservoir] = kPlan_m2 * 0.055;
          x[kColumn] = 0.2 * system.plant().column_area_m2();
          x[kBattery] = 0.6 * sc.battery.capacity_J;
          ChainState y = x;
          for (std::size_t i = 0; i < kSlots; ++i) {
            if (std::find(kReadSlots.begin(), kReadSlots.end(), i) == kReadSlots.end()) {
              y[i] = 1e3 + static_cast<double>(i);
            }
          }
          ChainRates rx, ry;
          ChainState dx, dy;
          system.rates(x, m, f, rx, dx);
          system.rates(y, m, f, ry, dy);
          EXPECT_EQ(dx, dy);
          Guards gx, gy;
          system.guards(x, m, f, rx, gx);
          system.guards(y, m, f, ry, gy);
          EXPECT_EQ(gx, gy);
        }
      }
    }
  }
}

}  // namespace
}  // namespace gutterwatt::chain_system_test
