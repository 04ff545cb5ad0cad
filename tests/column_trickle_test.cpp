#include "gutterwatt/column_trickle.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "gutterwatt/chain_system.hpp"
#include "gutterwatt/hydraulics.hpp"
#include "gutterwatt/scenario.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt {
namespace {

// The demo design's plant (invented): a 120 mm head column over a 6 mm nozzle, Cd 0.95.
const Plant& demo_plant() {
  static const Scenario sc =
      load_scenario(std::string(GUTTERWATT_SOURCE_DIR) + "/scenarios/demo.yaml", {});
  static const Plant plant(plant_config(sc));
  return plant;
}

constexpr double kColumnDiameter_m = 0.120;
constexpr double kNozzleDiameter_m = 0.006;
constexpr double kCd = 0.95;

// The tank drain of REFERENCES.md section 5 (Torricelli's law; status C there): a tank of 0.5 m2
// over a 20 mm orifice with Cd 0.61 falls from 1.0 m to a quarter of it in 589.1 s
// (t = (A / (Cd a)) (sqrt(2 H0 / g) - sqrt(2 H1 / g))). Here the tank is a head column of that
// plan area over a nozzle of that size and coefficient.
TEST(ColumnTrickle, DrainsAsTheReferenceTankDoes) {
  Scenario sc = load_scenario(std::string(GUTTERWATT_SOURCE_DIR) + "/scenarios/demo.yaml", {});
  sc.head_column->diameter_m = std::sqrt(4.0 * 0.5 / kPi);
  sc.nozzle.diameter_m = 0.020;
  sc.nozzle.discharge_coefficient = 0.61;
  const Plant plant(plant_config(sc));
  ASSERT_NEAR(plant.column_area_m2(), 0.5, 1e-12);
  const TrickleWater after =
      trickle_water_after(plant, 0.5 * 1.0, StepInflow{}, 589.1, 1e-6, 0.05, 0.0);
  // 589.1 s is given to 0.05 s, in which the head moves by 4e-5 m.
  EXPECT_NEAR(after.volume_m3 / 0.5, 0.25, 5e-5);
}

// Under a steady inflow Q the column settles where the nozzle passes Q: the orifice equation
// Q = Cd a sqrt(2 g H) solved for H, H = (Q / (Cd a))^2 / (2 g).
TEST(ColumnTrickle, SettlesWhereTheNozzlePassesTheInflow) {
  const double area = circle_area_m2(kColumnDiameter_m);
  const double q = 2.0 / 60'000.0;  // 2 L/min
  const double h =
      std::pow(q / (kCd * circle_area_m2(kNozzleDiameter_m)), 2) / (2.0 * kGravity_m_per_s2);
  for (double start_m : {0.0, 0.3}) {
    const TrickleWater after = trickle_water_after(demo_plant(), area * start_m,
                                                   StepInflow{q, q, q}, 3600.0, 1e-6, 1e-4, 0.0);
    EXPECT_NEAR(after.volume_m3 / area, h, 1e-9) << "from " << start_m << " m";
  }
}

// Below the join (10 mm) the nozzle's law is linear, Qn = k V, and the exponential method solves
// it exactly: from V0 with nothing arriving, V0 e^(-k t), in one substep.
TEST(ColumnTrickle, SolvesTheLinearDrainExactlyInOneSubstep) {
  const Plant& plant = demo_plant();
  // k = Qn(join) / V(join) = Cd a sqrt(2 g h) / (A h) at h = 10 mm; by hand, (6 / 120)^2 x 0.95
  // x sqrt(2 x 9.80665 x 0.01) / 0.01 = 0.10518 /s.
  const double area = circle_area_m2(kColumnDiameter_m);
  const double h = kNozzleLinearHead_m;
  const double k =
      kCd * circle_area_m2(kNozzleDiameter_m) * std::sqrt(2.0 * kGravity_m_per_s2 * h) / (area * h);
  EXPECT_NEAR(k, 0.10518, 1e-5);
  const double join = area * h;
  const double v0 = 0.5 * join;
  const double t = 30.0;
  const TrickleWater after = trickle_water_after(plant, v0, StepInflow{}, t, 1e-6, join, 0.0);
  EXPECT_NEAR(after.volume_m3, v0 * std::exp(-k * t), 1e-15 * v0);
  EXPECT_GE(after.substep_s, t);
}

// Against classic Runge-Kutta at a thousandth of a second (written out here), from empty and from
// half a metre, under an inflow that rises through a minute as a dribble's does before a siphon
// primes (a quadratic through the step's ends with the step's mean): the end of the step within
// the tolerance asked, relative to the scale (measured: 0.2 to 0.45 of it).
TEST(ColumnTrickle, AgreesWithAFineFixedStepIntegration) {
  const Plant& plant = demo_plant();
  const double area = circle_area_m2(kColumnDiameter_m);
  const double scale = area * 0.1;
  const StepInflow rising{0.2 / 60'000.0, 2.0 / 60'000.0, 0.8 / 60'000.0};
  const double dt = 60.0;
  const auto inflow_at = [&](double t) {
    const double u = t / dt;
    const double b =
        6.0 * (rising.mean_m3_per_s - 0.5 * (rising.start_m3_per_s + rising.end_m3_per_s));
    return rising.start_m3_per_s + (rising.end_m3_per_s - rising.start_m3_per_s) * u +
           b * u * (1.0 - u);
  };
  for (double start_m : {0.0, 0.5}) {
    double v = area * start_m;
    const double h = 1e-3;
    for (int i = 0; i < 60'000; ++i) {
      const double t = i * h;
      const auto f = [&](double s, double w) {
        return inflow_at(s) - plant.column_nozzle_flow_m3_per_s(w);
      };
      const double k1 = f(t, v);
      const double k2 = f(t + 0.5 * h, v + 0.5 * h * k1);
      const double k3 = f(t + 0.5 * h, v + 0.5 * h * k2);
      const double k4 = f(t + h, v + h * k3);
      v += h / 6.0 * (k1 + 2.0 * k2 + 2.0 * k3 + k4);
    }
    for (double rtol : {1e-4, 1e-6}) {
      const TrickleWater after =
          trickle_water_after(plant, area * start_m, rising, dt, rtol, scale, 0.0);
      EXPECT_NEAR(after.volume_m3, v, rtol * scale) << "from " << start_m << " m, rtol " << rtol;
    }
  }
}

// The column cannot hold more than it held plus what arrived, nor less than nothing.
TEST(ColumnTrickle, HoldsNoMoreThanArrivedAndNeverLessThanNothing) {
  const Plant& plant = demo_plant();
  const double area = circle_area_m2(kColumnDiameter_m);
  const StepInflow q{1e-4, 1e-4, 1e-4};
  const TrickleWater filled = trickle_water_after(plant, 0.0, q, 5.0, 1e-3, area * 0.1, 0.0);
  EXPECT_LE(filled.volume_m3, 5.0 * 1e-4);
  EXPECT_GT(filled.volume_m3, 0.0);
  const TrickleWater drained =
      trickle_water_after(plant, area * 0.02, StepInflow{}, 86'400.0, 1e-3, area * 0.1, 0.0);
  EXPECT_GE(drained.volume_m3, 0.0);
  EXPECT_LT(drained.volume_m3, 1e-12);
}

// The head below which a column passes a trickle on: 0.1 m for the demo design, whose jet there
// (0.035 W: P = rho Q V^2 / 2 with Q = Cd a sqrt(2 g H) and V = Cv sqrt(2 g H), so rho g Cd Cv^2
// a sqrt(2 g) H^1.5) is far below its 0.3 W cut-in; at a cut-in of that jet's power at 0.05 m,
// 0.05 m; with none, the floor.
TEST(ColumnTrickle, TrickleHeadStaysWhereTheJetCannotRunTheGenerator) {
  const double jet_coefficient = demo_plant().density_kg_per_m3() * kGravity_m_per_s2 * kCd * 0.97 *
                                 0.97 * circle_area_m2(kNozzleDiameter_m) *
                                 std::sqrt(2.0 * kGravity_m_per_s2);
  EXPECT_NEAR(jet_coefficient * std::pow(kTrickleHeadMax_m, 1.5), 0.035, 5e-4);
  EXPECT_DOUBLE_EQ(trickle_head_m(demo_plant()), kTrickleHeadMax_m);
  Scenario sc = load_scenario(std::string(GUTTERWATT_SOURCE_DIR) + "/scenarios/demo.yaml", {});
  sc.generator.cut_in_W = jet_coefficient * std::pow(0.05, 1.5);
  EXPECT_NEAR(trickle_head_m(Plant(plant_config(sc))), 0.05, 2e-6);
  sc.generator.cut_in_W = 0.0;
  EXPECT_DOUBLE_EQ(trickle_head_m(Plant(plant_config(sc))), kTrickleHeadMin_m);
}

}  // namespace
}  // namespace gutterwatt
