#include "gutterwatt/plant.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <initializer_list>

#include "gutterwatt/hydraulics.hpp"
#include "gutterwatt/units.hpp"
#include "test_support.hpp"

namespace gutterwatt::plant_test {
namespace {

using test_support::make_scenario;

double relative_error(double actual, double expected) {
  return std::abs(actual - expected) / std::abs(expected);
}

// The plant may interpolate the full flow from a table; it promises 1e-9 relative.
constexpr double kFullFlowTolerance = 1e-9;

TEST(Plant, FullFlowIsNozzleControlledWithoutAColumn) {
  const Scenario s = make_scenario();
  const Plant p(plant_config(s));
  // The plant's table against the direct solve of hydraulics.cpp: an interpolation check only;
  // the physics is checked by the hand value below.
  const double nu = water_kinematic_viscosity_m2_per_s(s.site.temperature_C);
  for (double level : {0.0, 0.003, 0.008, 0.05, 0.0567, 0.062, 0.1, 0.5}) {
    const double direct =
        nozzle_controlled_flow_m3_per_s(s.drop_pipe, s.nozzle, level + s.drop_m, nu);
    EXPECT_LT(relative_error(p.full_flow_m3_per_s(level), direct), kFullFlowTolerance) << level;
  }
  EXPECT_DOUBLE_EQ(p.full_flow_m3_per_s(-0.01), p.full_flow_m3_per_s(0.0));
  // Hand computation (energy equation with Darcy-Weisbach and Colebrook, REFERENCES.md sections
  // 3-5, iterated to convergence outside the code): level 0.05 m, H = 4.05 m, pipe D 19 mm,
  // L 4.5 m, K 2.0, roughness 0.0015 mm, nozzle 5 mm at Cd 0.95, 15 C (nu 1.1386 mm2/s):
  // H = Q^2 / (2 g) [1 / (Cd A_n)^2 + (K + f L/D) / A_p^2] -> Q 0.162958 L/s, Re 9591,
  // f 0.03135, 3.891 m of it at the nozzle. nu +-0.5 % moves Q by 2e-5.
  EXPECT_LT(relative_error(p.full_flow_m3_per_s(0.05), 0.162958e-3), 1e-4);
}

TEST(Plant, FullFlowIsAFreeOutfallIntoTheColumnTop) {
  Scenario s = make_scenario();
  s.head_column = HeadColumnConfig{0.040, 3.5};
  const Plant p(plant_config(s));
  // Interpolation check against the direct solve, as above; the hand value follows.
  const double nu = water_kinematic_viscosity_m2_per_s(s.site.temperature_C);
  for (double level : {0.0, 0.03, 0.062, 0.3}) {
    const double direct = free_outfall_flow_m3_per_s(s.drop_pipe, level + 4.0 - 3.5, nu);
    EXPECT_LT(relative_error(p.full_flow_m3_per_s(level), direct), kFullFlowTolerance) << level;
  }
  // Hand computation (free outfall, REFERENCES.md section 4: V = sqrt(2 g H / (1 + K + f L/D))
  // with Colebrook, iterated outside the code): level 0.3 m, H = 0.3 + 4.0 - 3.5 = 0.8 m, pipe
  // D 19 mm, L 4.5 m, K 2.0, roughness 0.0015 mm, 15 C (nu 1.1386 mm2/s) -> Q 0.373687 L/s,
  // Re 21 993, f 0.02547. nu +-0.5 % moves Q by 4e-4.
  EXPECT_LT(relative_error(p.full_flow_m3_per_s(0.3), 0.373687e-3), 1e-3);
}

TEST(Plant, FullFlowNeverFallsBelowItsFloor) {
  // The rates look the full flow up only above this floor (Release::outflow_m3_per_s caps its
  // own law there): the flow grows with the level, in the table and beyond it, with and without
  // a column, so it holds at every level from empty to well above the table's top.
  Scenario column = make_scenario();
  column.head_column = HeadColumnConfig{0.040, 3.5};
  for (const Scenario& s : {make_scenario(), column}) {
    const Plant p(plant_config(s));
    EXPECT_GT(p.full_flow_floor_m3_per_s(), 0.0);
    for (double level = 0.0; level < 1.0; level += 1e-4) {
      EXPECT_GE(p.full_flow_m3_per_s(level), p.full_flow_floor_m3_per_s()) << level;
    }
  }
}

TEST(Plant, FullBoreSiphonMatchesTheWorkedExample) {
  // source: worked check of REFERENCES.md section 4 (Darcy-Weisbach with Colebrook): free outfall,
  // head 1.5 m, D 40 mm, L 3 m, K 0.5 + 2 x 0.3, 20 C, roughness 0.0015 mm -> Q 3.684 L/s (0.5 %).
  Scenario s = make_scenario();
  s.site.temperature_C = 20.0;
  s.drop_pipe = Pipe{0.040, 3.0, 0.0015e-3, 0.5 + 2.0 * 0.3};
  s.head_column = HeadColumnConfig{0.1, 1.0};
  s.drop_m = 2.5;
  const Plant p(plant_config(s));
  EXPECT_LT(relative_error(p.full_flow_m3_per_s(0.0), 3.684e-3), 0.005);
}

TEST(Plant, ColumnHoldsItsVolumeAndSetsTheHead) {
  Scenario s = make_scenario();
  s.head_column = HeadColumnConfig{0.040, 3.5};
  const Plant p(plant_config(s));
  const double area = 0.25 * kPi * 0.040 * 0.040;
  EXPECT_TRUE(p.has_column());
  EXPECT_DOUBLE_EQ(p.column_area_m2(), area);
  EXPECT_DOUBLE_EQ(p.column_capacity_m3(), area * 3.5);
  EXPECT_DOUBLE_EQ(p.column_head_m(area * 2.0), 2.0);
  EXPECT_EQ(p.column_head_m(-1.0), 0.0);
}

TEST(Plant, ColumnNozzleIsAnOrificeAboveTheLinearHead) {
  Scenario s = make_scenario();
  s.head_column = HeadColumnConfig{0.040, 3.5};
  const Plant p(plant_config(s));
  const double area = p.column_area_m2();
  // Hand computation, Q = Cd a sqrt(2 g h) (REFERENCES.md section 5): 0.95 x 1.963495e-5 m2 x
  // sqrt(2 x 9.80665 x 2.0) = 0.95 x 1.963495e-5 x 6.263100 = 0.116827 L/s.
  EXPECT_NEAR(p.column_nozzle_flow_m3_per_s(area * 2.0), 0.116827e-3, 1e-9);
  // Below kNozzleLinearHead_m (10 mm) the flow is linear in head, continuous at the threshold:
  // by hand 0.95 x 1.963495e-5 x sqrt(2 x 9.80665 x 0.01) = 8.260928e-6 m3/s there.
  ASSERT_EQ(kNozzleLinearHead_m, 0.01);
  const double at_threshold = 8.260928e-6;
  EXPECT_NEAR(p.column_nozzle_flow_m3_per_s(area * kNozzleLinearHead_m), at_threshold, 1e-12);
  EXPECT_NEAR(p.column_nozzle_flow_m3_per_s(area * 0.25 * kNozzleLinearHead_m), 0.25 * at_threshold,
              1e-12);
  EXPECT_EQ(p.column_nozzle_flow_m3_per_s(0.0), 0.0);
}

TEST(Plant, NoColumnMeansNoColumnVolume) {
  const Plant p(plant_config(make_scenario()));
  EXPECT_FALSE(p.has_column());
  EXPECT_EQ(p.column_capacity_m3(), 0.0);
  EXPECT_EQ(p.column_head_m(1.0), 0.0);
}

TEST(Plant, NozzleHeadInvertsTheOrificeLaw) {
  const Plant p(plant_config(make_scenario()));
  const PlantPower w = p.power_for_flow(1.2e-4);
  EXPECT_NEAR(orifice_flow_m3_per_s(0.95, circle_area_m2(0.005), w.head_m), 1.2e-4, 1e-18);
  // Hand computation, h = (Q / (Cd a))^2 / (2 g): 1.2e-4 / (0.95 x 1.963495e-5) = 6.433210 m/s,
  // squared over 2 x 9.80665 = 2.110109 m; the jet Cv sqrt(2 g h) = 0.97 x 6.433210 = 6.240214
  // m/s, as power() has it from that head.
  EXPECT_NEAR(w.head_m, 2.110109, 1e-6);
  EXPECT_NEAR(w.jet_velocity_m_per_s, 6.240214, 1e-6);
  const PlantPower at_head = p.power(1.2e-4, w.head_m);
  EXPECT_NEAR(w.jet_W, at_head.jet_W, 1e-12 * at_head.jet_W);
  EXPECT_NEAR(w.electrical_W, at_head.electrical_W, 1e-12 * at_head.electrical_W);
}

TEST(Plant, JetPowerMatchesTheWorkedExample) {
  // source: nozzle jet check of REFERENCES.md section 5: H 10 m, Cv 0.98 -> V 13.7247 m/s; 1 L/s
  // at 20 C: rho g Q H 97.89 W -> jet 94.01 W.
  Scenario s = make_scenario();
  s.site.temperature_C = 20.0;
  s.nozzle.velocity_coefficient = 0.98;
  const Plant p(plant_config(s));
  const PlantPower w = p.power(1e-3, 10.0);
  EXPECT_EQ(w.head_m, 10.0);
  EXPECT_NEAR(w.jet_velocity_m_per_s, 13.7247, 0.00005);
  EXPECT_NEAR(w.jet_W, 94.01, 0.005);
}

TEST(Plant, BestSpeedEfficiencyIsThePeak) {
  Scenario s = make_scenario();
  s.turbine.best_at_every_head = true;
  const Plant p(plant_config(s));
  for (double head : {0.5, 4.0, 20.0}) {
    const PlantPower w = p.power(1e-4, head);
    EXPECT_NEAR(w.shaft_W, s.turbine.peak_efficiency * w.jet_W, 1e-15 * w.jet_W) << head;
  }
}

TEST(Plant, FixedSpeedFollowsTheIdealImpulseCurve) {
  // source: ideal impulse-runner curve 4x(1 - x), Dixon and Hall, REFERENCES.md section 7:
  // x 0.3 -> 0.84 of the peak.
  Scenario s = make_scenario();
  const double head = 4.0;
  const double jet = 0.97 * std::sqrt(2.0 * kGravity_m_per_s2 * head);
  s.turbine.speed_rpm = 0.3 * jet * 60.0 / (kPi * s.turbine.runner_diameter_m);
  const Plant p(plant_config(s));
  const PlantPower w = p.power(1e-4, head);
  EXPECT_NEAR(w.shaft_W / w.jet_W, 0.84 * s.turbine.peak_efficiency, 1e-12);
}

// The demo's runner under its head column: 70 mm pitch diameter, column 3.0 m, Cv 0.97.
Scenario runner_under_a_column() {
  Scenario s = make_scenario();
  s.head_column = HeadColumnConfig{0.120, 3.0};
  s.nozzle.velocity_coefficient = 0.97;
  s.turbine.runner_diameter_m = 0.070;
  return s;
}

// The same runner on a 12 V battery through a generator of `volts_per_rpm`.
Scenario runner_on_a_12V_battery(double volts_per_rpm) {
  Scenario s = runner_under_a_column();
  s.generator.volts_per_rpm = volts_per_rpm;
  s.battery.voltage_V = 12.0;
  return s;
}

TEST(Plant, RunnerIsHeldAtTheBestSpeedForTheDesignHead) {
  // Hand computation: V_j = 0.97 sqrt(2 x 9.80665 x 3.0) = 7.440596 m/s; best at x = 0.5
  // (Dixon and Hall, REFERENCES.md section 7): N = 60 x 0.5 x 7.440596 / (pi x 0.070)
  // = 1015.035 rpm.
  const Plant p(plant_config(runner_under_a_column()));
  EXPECT_DOUBLE_EQ(p.design_head_m(), 3.0);
  EXPECT_NEAR(p.held_speed_rpm(), 1015.035, 0.001);
  const PlantPower w = p.power(1e-4, 3.0);
  EXPECT_NEAR(runner_speed_for_ratio_rpm(0.070, w.speed_ratio, w.jet_velocity_m_per_s), 1015.035,
              0.001);
  EXPECT_NEAR(w.speed_ratio, 0.5, 1e-12);
}

TEST(Plant, RunnerWithoutAColumnIsHeldForTheNozzleHeadAtThePrimingLevel) {
  // Hand computation, outside the code: the bell primes at 50 mm + (5e-5 / (1.77 pi 0.019))^(2/3)
  // = 56.073 mm (below the 62 mm rim); the full flow from there (H = 4.056073 m; energy equation
  // with Colebrook as in FullFlowIsNozzleControlledWithoutAColumn) is 0.163080 L/s, 3.89713 m of
  // it at the nozzle, V_j = 0.97 sqrt(2 g 3.89713) = 8.48046 m/s, and the best speed at x = 0.5
  // (REFERENCES.md section 7) N = 60 x 0.5 x 8.48046 / (pi x 0.070) = 1156.89 rpm. nu +-0.5 %
  // moves N by 0.03 rpm.
  const Plant p(plant_config(make_scenario()));
  EXPECT_NEAR(p.design_head_m(), 3.89713, 2e-4);
  EXPECT_NEAR(p.held_speed_rpm(), 1156.89, 0.05);
}

TEST(Plant, HeldRunnerAtHalfTheDesignHeadLosesToTheSpeedRatio) {
  // Hand computation: at half the head the jet is 1/sqrt(2) as fast, so the held runner works
  // at x = 1/sqrt(2); the ideal curve 4x(1 - x) (REFERENCES.md section 7) gives 2 sqrt(2) - 2
  // = 0.828427 of the peak.
  const Scenario s = runner_under_a_column();
  const Plant p(plant_config(s));
  const PlantPower w = p.power(1e-4, 1.5);
  EXPECT_NEAR(w.speed_ratio, 0.707107, 1e-6);
  EXPECT_NEAR(w.shaft_W / w.jet_W, 0.828427 * s.turbine.peak_efficiency, 1e-6);
}

TEST(Plant, GeneratorLoadsTheRunnerOnlyAboveTheBatteryVoltage) {
  // Hand computation: 12 V / 0.008 V/rpm = 1500 rpm, above the held 1015 rpm, so the runner
  // turns at 1500 rpm: x = pi x 0.070 x 1500 / 60 / 7.440596 = 0.738891, and 4x(1 - x) =
  // 0.771725 of the peak.
  const Scenario s = runner_on_a_12V_battery(0.008);
  const Plant p(plant_config(s));
  EXPECT_DOUBLE_EQ(p.conduction_speed_rpm(), 1500.0);
  const PlantPower w = p.power(1e-4, 3.0);
  EXPECT_NEAR(runner_speed_for_ratio_rpm(0.070, w.speed_ratio, w.jet_velocity_m_per_s), 1500.0,
              1e-9);
  EXPECT_NEAR(w.speed_ratio, 0.738891, 1e-6);
  EXPECT_NEAR(w.shaft_W / w.jet_W, 0.771725 * s.turbine.peak_efficiency, 1e-6);
}

TEST(Plant, GeneratorBelowTheBatteryVoltageAtRunawayChargesNothing) {
  // Hand computation: runaway (x = 1) at 3.0 m is 60 x 7.440596 / (pi x 0.070) = 2030.07 rpm;
  // 12 V / 0.005 V/rpm = 2400 rpm is never reached, so nothing is delivered.
  const Scenario s = runner_on_a_12V_battery(0.005);
  const Plant p(plant_config(s));
  const PlantPower w = p.power(1e-4, 3.0);
  EXPECT_GT(w.jet_W, 0.0);
  EXPECT_EQ(w.shaft_W, 0.0);
  EXPECT_EQ(w.electrical_W, 0.0);
}

TEST(Plant, PowerChainMultipliesTheEfficiencies) {
  Scenario s = make_scenario();
  s.turbine.best_at_every_head = true;
  const Plant p(plant_config(s));
  const double q = 1.5e-4;
  const double head = 3.0;
  const PlantPower w = p.power(q, head);
  // Jet V = Cv sqrt(2 g H), P = rho Q V^2 / 2 (REFERENCES.md section 5), so P = Cv^2 rho g Q H;
  // by hand at 15 C (rho 999.101 kg/m3, REFERENCES.md section 2, 0.05 %): 0.97^2 x 999.101 x
  // 9.80665 x 1.5e-4 x 3 = 4.148452 W; electrical 0.65 x 0.7 of it = 1.887546 W.
  EXPECT_NEAR(w.jet_W, 4.148452, 4.148452 * 5e-4);
  EXPECT_NEAR(w.electrical_W, 1.887546, 1.887546 * 5e-4);
}

TEST(Plant, NoFlowOrNoHeadGivesNoPower) {
  const Plant p(plant_config(make_scenario()));
  const PlantPower a = p.power(0.0, 3.0);
  const PlantPower b = p.power(1e-4, 0.0);
  EXPECT_EQ(a.jet_W, 0.0);
  EXPECT_EQ(a.electrical_W, 0.0);
  EXPECT_EQ(b.jet_W, 0.0);
  EXPECT_EQ(b.head_m, 0.0);
}

TEST(Plant, CarriesTheWaterPropertiesOfTheSiteTemperature) {
  Scenario s = make_scenario();
  s.site.temperature_C = 20.0;
  const Plant p(plant_config(s));
  // source: IAPWS-IF97 density and IAPWS 2008 viscosity, values from REFERENCES.md section 2:
  // 20 C -> 998.206 kg/m3 (0.05 %), 1.0034 mm2/s (0.5 %).
  EXPECT_LT(relative_error(p.density_kg_per_m3(), 998.206), 5e-4);
  EXPECT_LT(relative_error(p.kinematic_viscosity_m2_per_s(), 1.0034e-6), 5e-3);
  EXPECT_EQ(p.cut_in_W(), 0.0);
}

}  // namespace
}  // namespace gutterwatt::plant_test
