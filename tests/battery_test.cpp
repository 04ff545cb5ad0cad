#include "gutterwatt/battery.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <initializer_list>

namespace gutterwatt {
namespace {

// An invented 60 Wh battery taking at most 30 W at 0.9 charge efficiency.
BatteryConfig battery() {
  BatteryConfig c;
  c.capacity_J = 60.0 * 3600.0;
  c.initial_soc = 0.5;
  c.charge_efficiency = 0.9;
  c.max_charge_W = 30.0;
  c.load_W = 0.5;
  return c;
}

TEST(Battery, ChargesWithTheSurplusAfterTheLoad) {
  const BatteryFlows f = battery_flows(BatteryMode::normal, 10.0, 2.0, battery());
  EXPECT_EQ(f.served_W, 2.0);
  EXPECT_EQ(f.accepted_W, 8.0);
  EXPECT_DOUBLE_EQ(f.charge_W, 0.9 * 8.0);
  EXPECT_EQ(f.curtailed_W, 0.0);
  EXPECT_EQ(f.unmet_W, 0.0);
}

TEST(Battery, ClampsChargeAtTheChargeLimit) {
  const BatteryFlows f = battery_flows(BatteryMode::normal, 50.0, 0.0, battery());
  EXPECT_EQ(f.accepted_W, 30.0);
  EXPECT_EQ(f.curtailed_W, 20.0);
  EXPECT_DOUBLE_EQ(f.charge_W, 0.9 * 30.0);
}

TEST(Battery, CurtailsEverythingWhenFull) {
  const BatteryFlows f = battery_flows(BatteryMode::full, 5.0, 1.0, battery());
  EXPECT_EQ(f.served_W, 1.0);
  EXPECT_EQ(f.accepted_W, 0.0);
  EXPECT_EQ(f.charge_W, 0.0);
  EXPECT_EQ(f.curtailed_W, 4.0);
}

TEST(Battery, DischargesToServeTheLoad) {
  const BatteryFlows f = battery_flows(BatteryMode::normal, 0.3, 1.0, battery());
  EXPECT_EQ(f.served_W, 1.0);
  EXPECT_DOUBLE_EQ(f.charge_W, -0.7);
  EXPECT_EQ(f.unmet_W, 0.0);
}

TEST(Battery, LeavesLoadUnmetWhenEmpty) {
  const BatteryFlows f = battery_flows(BatteryMode::empty, 0.3, 1.0, battery());
  EXPECT_EQ(f.served_W, 0.3);
  EXPECT_DOUBLE_EQ(f.unmet_W, 0.7);
  EXPECT_EQ(f.charge_W, 0.0);
  EXPECT_EQ(f.accepted_W, 0.0);
}

TEST(Battery, EnergyInThenOutReturnsTheChargeEfficiency) {
  // source: Peukert-free model of REFERENCES.md section 10, with discharge efficiency 1 here:
  // energy in then out returns eta_c (0.9).
  const BatteryConfig c = battery();
  const double charge_s = 3600.0;
  const BatteryFlows in = battery_flows(BatteryMode::normal, 10.0, 0.0, c);
  const double stored_J = in.charge_W * charge_s;
  const BatteryFlows out = battery_flows(BatteryMode::normal, 0.0, 2.0, c);
  const double discharge_s = stored_J / -out.charge_W;
  const double returned_J = out.served_W * discharge_s;
  EXPECT_NEAR(returned_J / (in.accepted_W * charge_s), 0.9, 1e-15);
}

TEST(Battery, EveryFlowBalances) {
  // Exact balance of REFERENCES.md section 10: what comes in (generator plus discharge) is what
  // is stored, lost in charging, curtailed or served; the load is served or unmet.
  const BatteryConfig c = battery();
  for (BatteryMode mode : {BatteryMode::normal, BatteryMode::full, BatteryMode::empty}) {
    for (double input : {0.0, 0.3, 1.0, 12.0, 45.0}) {
      for (double load : {0.0, 0.5, 1.0, 20.0}) {
        if (mode == BatteryMode::full && input < load) continue;    // not a full battery's case
        if (mode == BatteryMode::empty && input >= load) continue;  // nor an empty one's
        const BatteryFlows f = battery_flows(mode, input, load, c);
        const double stored = std::max(0.0, f.charge_W);
        const double discharged = std::max(0.0, -f.charge_W);
        const double loss = f.accepted_W - stored;
        EXPECT_NEAR(input + discharged, stored + loss + f.curtailed_W + f.served_W, 1e-12)
            << static_cast<int>(mode) << " " << input << " " << load;
        EXPECT_NEAR(load, f.served_W + f.unmet_W, 1e-12);
        EXPECT_NEAR(loss, (1.0 - c.charge_efficiency) * f.accepted_W, 1e-12);
        EXPECT_GE(f.curtailed_W, 0.0);
        EXPECT_LE(f.accepted_W, c.max_charge_W);
      }
    }
  }
}

TEST(Battery, ModeFollowsEnergyAndSurplus) {
  const BatteryConfig c = battery();
  EXPECT_EQ(battery_mode(c.capacity_J, 1.0, 0.5, c), BatteryMode::full);
  EXPECT_EQ(battery_mode(c.capacity_J, 0.0, 0.5, c), BatteryMode::normal);
  EXPECT_EQ(battery_mode(0.0, 0.0, 0.5, c), BatteryMode::empty);
  EXPECT_EQ(battery_mode(0.0, 1.0, 0.5, c), BatteryMode::normal);
  EXPECT_EQ(battery_mode(0.5 * c.capacity_J, 0.0, 0.5, c), BatteryMode::normal);
}

TEST(Battery, LoadFollowsTheHourlyProfile) {
  BatteryConfig c = battery();
  EXPECT_EQ(battery_load_W(c, 7), 0.5);
  c.load_profile_W.assign(24, 0.1);
  c.load_profile_W[7] = 2.0;
  EXPECT_EQ(battery_load_W(c, 7), 2.0);
  EXPECT_EQ(battery_load_W(c, 8), 0.1);
}

}  // namespace
}  // namespace gutterwatt
