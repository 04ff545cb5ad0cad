#include "gutterwatt/battery.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <initializer_list>

namespace gutterwatt::battery_test {
namespace {

constexpr double kWh = 3600.0;

// An invented 60 Wh battery taking at most 30 W at 0.9 charge and discharge efficiency, without
// self-discharge or a minimum (the scenario's defaults).
BatteryConfig battery() {
  BatteryConfig c;
  c.capacity_J = 60.0 * kWh;
  c.initial_soc = 0.5;
  c.charge_efficiency = 0.9;
  c.discharge_efficiency = 0.9;
  c.max_charge_W = 30.0;
  c.load_W = 0.5;
  return c;
}

constexpr double kHalf_J = 30.0 * kWh;

// The flows of `c` with its own self-discharge constant, as the solver hands it over.
BatteryFlows flows(BatteryMode mode, double input_W, double load_W, double energy_J,
                   const BatteryConfig& c = battery()) {
  return battery_flows(mode, input_W, load_W, energy_J, c, self_discharge_rate_per_s(c));
}

TEST(Battery, ChargesWithTheSurplusAfterTheLoad) {
  const BatteryFlows f = flows(BatteryMode::normal, 10.0, 2.0, kHalf_J);
  EXPECT_EQ(f.served_W, 2.0);
  EXPECT_EQ(f.accepted_W, 8.0);
  EXPECT_DOUBLE_EQ(f.charge_W, 7.2);  // 0.9 x 8 W
  EXPECT_EQ(f.curtailed_W, 0.0);
  EXPECT_EQ(f.unmet_W, 0.0);
  EXPECT_EQ(f.drawn_W, 0.0);
}

TEST(Battery, ClampsChargeAtTheChargeLimit) {
  const BatteryFlows f = flows(BatteryMode::normal, 50.0, 0.0, kHalf_J);
  EXPECT_EQ(f.accepted_W, 30.0);
  EXPECT_EQ(f.curtailed_W, 20.0);
  EXPECT_DOUBLE_EQ(f.charge_W, 27.0);  // 0.9 x 30 W
}

TEST(Battery, CurtailsEverythingWhenFullWithoutSelfDischarge) {
  const BatteryFlows f = flows(BatteryMode::full, 5.0, 1.0, 60.0 * kWh);
  EXPECT_EQ(f.served_W, 1.0);
  EXPECT_EQ(f.accepted_W, 0.0);
  EXPECT_EQ(f.charge_W, 0.0);
  EXPECT_EQ(f.curtailed_W, 4.0);
}

TEST(Battery, DischargesThroughTheDischargeEfficiency) {
  // 0.7 W delivered to the load takes 0.7 / 0.9 = 0.777... W from the store.
  const BatteryFlows f = flows(BatteryMode::normal, 0.3, 1.0, kHalf_J);
  EXPECT_EQ(f.served_W, 1.0);
  EXPECT_DOUBLE_EQ(f.drawn_W, 0.7);
  EXPECT_NEAR(f.charge_W, -0.7777777777777778, 1e-15);
  EXPECT_EQ(f.unmet_W, 0.0);
}

TEST(Battery, ACutLoadLetsTheInputRechargeTheBattery) {
  // With the load disconnected (a low-voltage disconnect cuts the load, not the charging): the
  // 1 W load is all unmet and the 0.3 W input charges at 0.9, 0.27 W into the store; 45 W
  // against the 30 W charge limit curtails 15 W.
  const BatteryFlows f = flows(BatteryMode::empty, 0.3, 1.0, 0.0);
  EXPECT_EQ(f.served_W, 0.0);
  EXPECT_EQ(f.unmet_W, 1.0);
  EXPECT_DOUBLE_EQ(f.accepted_W, 0.3);
  EXPECT_DOUBLE_EQ(f.charge_W, 0.27);
  EXPECT_EQ(f.drawn_W, 0.0);
  const BatteryFlows big = flows(BatteryMode::empty, 45.0, 1.0, 0.0);
  EXPECT_EQ(big.accepted_W, 30.0);
  EXPECT_EQ(big.curtailed_W, 15.0);
}

TEST(Battery, ACutLoadReconnectsOnlyAtTheReconnectCharge) {
  // Hysteresis of a low-voltage disconnect (common practice, no source): cut at the minimum,
  // reconnected at reconnect_soc. Lead-acid preset: cut at 0.5, reconnect at 0.7 (common
  // practice, no source); 60 Wh: 30 and 42 Wh.
  BatteryConfig c = battery();
  apply_chemistry(BatteryChemistry::lead_acid, c);
  EXPECT_EQ(reconnect_soc(c), 0.7);
  EXPECT_EQ(battery_mode(30.0 * kWh, 0.0, 0.5, c), BatteryMode::empty);
  // Recharging while cut: still cut at 41.9 Wh, whatever the input, reconnected at 42 Wh.
  EXPECT_EQ(battery_mode(41.9 * kWh, 5.0, 0.5, c, BatteryMode::empty), BatteryMode::empty);
  EXPECT_EQ(battery_mode(41.9 * kWh, 0.0, 0.5, c, BatteryMode::empty), BatteryMode::empty);
  EXPECT_EQ(battery_mode(42.0 * kWh, 0.0, 0.5, c, BatteryMode::empty), BatteryMode::normal);
  // Never cut, the same 41.9 Wh serves the load.
  EXPECT_EQ(battery_mode(41.9 * kWh, 0.0, 0.5, c), BatteryMode::normal);
  // LiFePO4 preset: cut at 0.1, reconnect at 0.3 (common practice, no source). Without a
  // chemistry: the minimum plus a tenth, at most 1 (common practice, no source).
  apply_chemistry(BatteryChemistry::lifepo4, c);
  EXPECT_EQ(reconnect_soc(c), 0.3);
  BatteryConfig plain = battery();
  EXPECT_EQ(reconnect_soc(plain), 0.1);
  plain.min_soc = 0.95;
  EXPECT_EQ(reconnect_soc(plain), 1.0);
}

TEST(Battery, ACutBatteryAtRestStaysCut) {
  // 40 Wh stored (above the 12 Wh minimum) but cut, 1 W load, no self-discharge, 10 h: nothing
  // is drawn, 10 Wh are unmet, the store keeps 40 Wh.
  BatteryConfig c = battery();
  c.min_soc = 0.2;
  const BatteryRest r = battery_at_rest(40.0 * kWh, 1.0, 36000.0, c, true);
  EXPECT_EQ(r.drawn_J, 0.0);
  EXPECT_NEAR(r.unmet_J / kWh, 10.0, 1e-12);
  EXPECT_EQ(r.empty_s, 36000.0);
  EXPECT_EQ(r.energy_J, 40.0 * kWh);
  EXPECT_EQ(r.below_half_s, 0.0);
}

TEST(Battery, EnergyInThenOutReturnsTheRoundTrip) {
  // source: the Peukert-free model of REFERENCES.md section 10: energy in then out returns
  // eta_c x eta_d = 0.9 x 0.9 = 0.81.
  const BatteryConfig c = battery();
  const double charge_s = 3600.0;
  const BatteryFlows in = flows(BatteryMode::normal, 10.0, 0.0, kHalf_J, c);
  const double stored_J = in.charge_W * charge_s;
  const BatteryFlows out = flows(BatteryMode::normal, 0.0, 2.0, kHalf_J, c);
  const double discharge_s = stored_J / -out.charge_W;
  const double returned_J = out.served_W * discharge_s;
  EXPECT_NEAR(returned_J / (in.accepted_W * charge_s), 0.81, 1e-15);
}

TEST(Battery, PresetsHoldTheReferenceBands) {
  // REFERENCES.md section 10: round trip 0.70-0.85 lead-acid, 0.92-0.97 LiFePO4; self-discharge
  // 2-5 and 1-3 %/month. The minimums are common practice (no source): 50 % and 10 %.
  BatteryConfig lead = battery();
  apply_chemistry(BatteryChemistry::lead_acid, lead);
  EXPECT_NEAR(lead.charge_efficiency * lead.discharge_efficiency, 0.81, 1e-15);
  EXPECT_EQ(lead.self_discharge_per_month, 0.03);
  EXPECT_EQ(lead.min_soc, 0.5);
  BatteryConfig lfp = battery();
  apply_chemistry(BatteryChemistry::lifepo4, lfp);
  EXPECT_NEAR(lfp.charge_efficiency * lfp.discharge_efficiency, 0.9409, 1e-15);
  EXPECT_EQ(lfp.self_discharge_per_month, 0.02);
  EXPECT_EQ(lfp.min_soc, 0.1);
  EXPECT_EQ(lfp.capacity_J, 60.0 * kWh);  // the rest is kept
  EXPECT_EQ(battery_chemistry_name(BatteryChemistry::lifepo4), "lifepo4");
}

TEST(Battery, SelfDischargeLosesTheMonthlyShareInAMeanMonth) {
  // 3 %/month: a full 60 Wh battery at rest keeps 60 x 0.97 = 58.2 Wh after 365.25/12 days.
  // Rate constant by hand: -ln(0.97) / 2 629 800 s = 1.1582328e-8 /s, so 2.5017830e-3 W at
  // 60 Wh.
  BatteryConfig c = battery();
  c.self_discharge_per_month = 0.03;
  EXPECT_NEAR(self_discharge_rate_per_s(c), 1.1582328498e-8, 1e-17);
  const BatteryRest rest = battery_at_rest(60.0 * kWh, 0.0, 30.4375 * 86400.0, c);
  EXPECT_NEAR(rest.energy_J / kWh, 58.2, 1e-9);
  EXPECT_NEAR(rest.self_discharge_J / kWh, 1.8, 1e-9);
  EXPECT_EQ(rest.unmet_J, 0.0);
  const BatteryFlows f = flows(BatteryMode::normal, 0.0, 0.0, 60.0 * kWh, c);
  EXPECT_NEAR(f.self_discharge_W, 2.501782956e-3, 1e-12);
}

TEST(Battery, AFullBatteryTakesOnlyWhatHoldsItFull) {
  BatteryConfig c = battery();
  c.self_discharge_per_month = 0.03;
  const BatteryFlows f = flows(BatteryMode::full, 5.0, 1.0, 60.0 * kWh, c);
  EXPECT_NEAR(f.accepted_W, 2.501782956e-3 / 0.9, 1e-12);
  EXPECT_NEAR(f.charge_W, 0.0, 1e-18);
  EXPECT_NEAR(f.curtailed_W, 4.0 - 2.501782956e-3 / 0.9, 1e-12);
  // Below 2.5017830e-3 / 0.9 = 2.78e-3 W of surplus the charger cannot hold it: not full.
  EXPECT_EQ(battery_mode(60.0 * kWh, 1.003, 1.0, c), BatteryMode::full);
  EXPECT_EQ(battery_mode(60.0 * kWh, 1.0025, 1.0, c), BatteryMode::normal);
}

TEST(Battery, ServesTheLoadDownToTheMinimumThenCutsIt) {
  // 45 Wh stored, minimum 20 % (12 Wh), 1 W load through eta_d 0.9, no self-discharge, 36 h:
  // the store loses 1/0.9 W, so 33 Wh last 29.7 h (29.7 Wh delivered); then 6.3 h cut (6.3 Wh
  // unmet). Half charge (30 Wh) is reached after 15 Wh, at 13.5 h: 22.5 h below it.
  BatteryConfig c = battery();
  c.min_soc = 0.2;
  const BatteryRest r = battery_at_rest(45.0 * kWh, 1.0, 36.0 * 3600.0, c);
  EXPECT_NEAR(r.drawn_J / kWh, 29.7, 1e-9);
  EXPECT_NEAR(r.unmet_J / kWh, 6.3, 1e-9);
  EXPECT_NEAR(r.empty_s / 3600.0, 6.3, 1e-9);
  EXPECT_NEAR(r.below_half_s / 3600.0, 22.5, 1e-9);
  EXPECT_NEAR(r.energy_J / kWh, 12.0, 1e-9);
  EXPECT_EQ(r.self_discharge_J, 0.0);
}

TEST(Battery, LeadAcidAtRestServesItsHalfLessTheSelfDischarge) {
  // Lead-acid preset, 60 Wh from full, 0.5 W load, 72 h. By hand from dE/dt = -k E - P/eta_d:
  // t = ln((E0 + c) / (E_min + c)) / k with c = P / (eta_d k) gives 53.818257 h to the 30 Wh
  // minimum (54 h without self-discharge), 26.909128 Wh delivered; then 18.181743 h cut
  // (9.090872 Wh unmet) while 30 Wh self-discharges to 29.977265 Wh.
  BatteryConfig c = battery();
  apply_chemistry(BatteryChemistry::lead_acid, c);
  const BatteryRest r = battery_at_rest(60.0 * kWh, 0.5, 72.0 * 3600.0, c);
  EXPECT_NEAR(r.drawn_J / kWh, 26.909128252, 1e-8);
  EXPECT_NEAR(r.unmet_J / kWh, 9.090871748, 1e-8);
  EXPECT_NEAR(r.empty_s / 3600.0, 18.181743495, 1e-8);
  EXPECT_NEAR(r.energy_J / kWh, 29.977265231, 1e-8);
  EXPECT_NEAR(r.self_discharge_J / kWh, 0.123703378, 1e-8);
  // At the minimum (exactly half) and then below it for the 18.18 h cut.
  EXPECT_NEAR(r.below_half_s / 3600.0, 18.181743495, 1e-8);
}

TEST(Battery, TimeBelowHalfIsInterpolatedWithinAStep) {
  // From 40 Wh to 20 Wh in 1000 s the 30 Wh mark falls at 500 s.
  const BatteryConfig c = battery();
  EXPECT_DOUBLE_EQ(below_half_s(40.0 * kWh, 20.0 * kWh, 1000.0, c), 500.0);
  EXPECT_DOUBLE_EQ(below_half_s(20.0 * kWh, 35.0 * kWh, 1000.0, c), 2000.0 / 3.0);
  EXPECT_EQ(below_half_s(10.0 * kWh, 20.0 * kWh, 1000.0, c), 1000.0);
  EXPECT_EQ(below_half_s(31.0 * kWh, 50.0 * kWh, 1000.0, c), 0.0);
}

TEST(Battery, EveryFlowBalances) {
  // Exact balances of REFERENCES.md section 10: at the terminals, generator plus battery output
  // is what is accepted, curtailed or served; the load is served or unmet; the store changes by
  // eta_c accepted - drawn / eta_d - self-discharge.
  BatteryConfig c = battery();
  c.self_discharge_per_month = 0.05;
  for (BatteryMode mode : {BatteryMode::normal, BatteryMode::full, BatteryMode::empty}) {
    for (double input : {0.0, 0.3, 1.0, 12.0, 45.0}) {
      for (double load : {0.0, 0.5, 1.0, 20.0}) {
        if (mode == BatteryMode::full && input < load) continue;  // not a full battery's case
        const double energy = mode == BatteryMode::full ? c.capacity_J : kHalf_J;
        const BatteryFlows f = flows(mode, input, load, energy, c);
        EXPECT_NEAR(input + f.drawn_W, f.accepted_W + f.curtailed_W + f.served_W, 1e-12)
            << static_cast<int>(mode) << " " << input << " " << load;
        EXPECT_NEAR(load, f.served_W + f.unmet_W, 1e-12);
        EXPECT_NEAR(f.charge_W, 0.9 * f.accepted_W - f.drawn_W / 0.9 - f.self_discharge_W, 1e-12);
        EXPECT_GE(f.curtailed_W, 0.0);
        EXPECT_LE(f.accepted_W, c.max_charge_W);
      }
    }
  }
}

TEST(Battery, ModeFollowsEnergyAndSurplus) {
  BatteryConfig c = battery();
  EXPECT_EQ(battery_mode(c.capacity_J, 1.0, 0.5, c), BatteryMode::full);
  EXPECT_EQ(battery_mode(c.capacity_J, 0.0, 0.5, c), BatteryMode::normal);
  EXPECT_EQ(battery_mode(0.0, 0.0, 0.5, c), BatteryMode::empty);
  EXPECT_EQ(battery_mode(0.0, 1.0, 0.5, c), BatteryMode::normal);
  EXPECT_EQ(battery_mode(0.0, 1.0, 0.5, c, BatteryMode::empty), BatteryMode::empty);
  EXPECT_EQ(battery_mode(0.5 * c.capacity_J, 0.0, 0.5, c), BatteryMode::normal);
  c.min_soc = 0.5;
  EXPECT_EQ(battery_mode(0.5 * c.capacity_J, 0.0, 0.5, c), BatteryMode::empty);
  EXPECT_EQ(battery_mode(0.4 * c.capacity_J, 1.0, 0.5, c), BatteryMode::normal);
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
}  // namespace gutterwatt::battery_test
