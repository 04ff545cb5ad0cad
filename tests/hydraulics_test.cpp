#include "gutterwatt/hydraulics.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <initializer_list>

#include "gutterwatt/units.hpp"

namespace gutterwatt::hydraulics_test {
namespace {

constexpr double kLitre = 1e-3;  // m3

struct WaterRow {
  double temperature_C;
  double density_kg_per_m3;
  double viscosity_mPa_s;
  double kinematic_viscosity_mm2_per_s;
};

// source: IAPWS-IF97 (density) and IAPWS 2008 (viscosity), values from REFERENCES.md section 2
constexpr std::array<WaterRow, 5> kWaterTable = {{
    {5.0, 999.967, 1.5182, 1.5182},
    {10.0, 999.702, 1.3059, 1.3063},
    {15.0, 999.101, 1.1376, 1.1386},
    {20.0, 998.206, 1.0016, 1.0034},
    {25.0, 997.048, 0.8900, 0.8927},
}};

struct FrictionRow {
  double reynolds;
  double relative_roughness;
  double colebrook;
  double swamee_jain;
};

// source: Colebrook (1939) and Swamee and Jain (1976), values from REFERENCES.md section 3
constexpr std::array<FrictionRow, 9> kFrictionTable = {{
    {4000.0, 0.0, 0.03991, 0.04055},
    {1e5, 0.0, 0.01799, 0.01786},
    {1e6, 0.0, 0.01165, 0.01161},
    {1e4, 1e-3, 0.03238, 0.03267},
    {1e5, 1e-4, 0.01851, 0.01845},
    {1e5, 1e-3, 0.02217, 0.02234},
    {1e5, 1e-2, 0.03850, 0.03875},
    {1e6, 1e-4, 0.01344, 0.01351},
    {1e8, 0.05, 0.07155, 0.07155},
}};

// The table gives 4 significant digits: half a unit in the last digit is at most 5e-4 relative.
constexpr double kFourDigits = 5e-4;

double relative_error(double actual, double expected) {
  return std::abs(actual - expected) / std::abs(expected);
}

Pipe smooth_pipe(double diameter_m, double length_m, double minor_loss_k) {
  // source: epsilon of PVC / drawn tubing 0.0015 mm, White Table 6.1, from REFERENCES.md section 4
  return Pipe{diameter_m, length_m, 0.0015e-3, minor_loss_k};
}

TEST(WaterProperties, ViscosityReproducesIapwsCheckValue) {
  // source: IAPWS (2008) viscosity release, check value mu(998 kg/m3, 298.15 K) = 889.735100 uPa s
  const double mu = detail::iapws2008_viscosity_Pa_s(998.0, 298.15);
  EXPECT_LT(relative_error(mu, 889.735100e-6), 1e-6);
}

TEST(WaterProperties, DensityMatchesTabulatedValues) {
  for (const WaterRow& row : kWaterTable) {
    // source: REFERENCES.md section 2, tolerance 0.05 %
    EXPECT_LT(relative_error(water_density_kg_per_m3(row.temperature_C), row.density_kg_per_m3),
              5e-4)
        << row.temperature_C << " C";
  }
}

TEST(WaterProperties, ViscosityMatchesTabulatedValues) {
  for (const WaterRow& row : kWaterTable) {
    // source: REFERENCES.md section 2; its table allows 0.5 %, and 0.01 % when IAPWS 2008 is
    // implemented directly, as here
    EXPECT_LT(relative_error(water_viscosity_Pa_s(row.temperature_C), row.viscosity_mPa_s * 1e-3),
              1e-4)
        << row.temperature_C << " C";
  }
}

TEST(WaterProperties, KinematicViscosityMatchesTabulatedValues) {
  for (const WaterRow& row : kWaterTable) {
    // source: REFERENCES.md section 2 (nu = mu / rho), tolerance as for the viscosity
    EXPECT_LT(relative_error(water_kinematic_viscosity_m2_per_s(row.temperature_C),
                             row.kinematic_viscosity_mm2_per_s * 1e-6),
              1e-4)
        << row.temperature_C << " C";
  }
}

TEST(WaterProperties, KinematicViscosityIsViscosityOverDensity) {
  for (double t = 0.0; t <= 40.0; t += 2.5) {
    EXPECT_DOUBLE_EQ(water_kinematic_viscosity_m2_per_s(t),
                     water_viscosity_Pa_s(t) / water_density_kg_per_m3(t));
  }
}

TEST(WaterProperties, DensityPeaksNearFourCelsius) {
  // Water is densest near 3.98 C (the a1 of the CIPM formula) // from memory
  EXPECT_GT(water_density_kg_per_m3(3.98), water_density_kg_per_m3(0.0));
  EXPECT_GT(water_density_kg_per_m3(3.98), water_density_kg_per_m3(3.5));
  EXPECT_GT(water_density_kg_per_m3(3.98), water_density_kg_per_m3(4.5));
  EXPECT_GT(water_density_kg_per_m3(3.98), water_density_kg_per_m3(40.0));
}

TEST(FrictionFactor, ColebrookMatchesTabulatedValues) {
  for (const FrictionRow& row : kFrictionTable) {
    EXPECT_LT(relative_error(friction_factor_colebrook(row.reynolds, row.relative_roughness),
                             row.colebrook),
              kFourDigits)
        << "Re " << row.reynolds << ", e/D " << row.relative_roughness;
  }
}

TEST(FrictionFactor, ColebrookSolvesItsEquationToMachinePrecision) {
  for (double re : {2000.0, 4000.0, 1e4, 1e5, 1e6, 1e7, 1e8}) {
    for (double rr : {0.0, 1e-6, 1e-4, 1e-3, 1e-2, 0.05}) {
      const double f = friction_factor_colebrook(re, rr);
      const double lhs = 1.0 / std::sqrt(f);
      const double rhs = -2.0 * std::log10(rr / 3.7 + 2.51 / (re * std::sqrt(f)));
      EXPECT_LT(std::abs(lhs - rhs), 1e-14 * lhs) << "Re " << re << ", e/D " << rr;
    }
  }
}

TEST(FrictionFactor, SwameeJainMatchesTabulatedValues) {
  for (const FrictionRow& row : kFrictionTable) {
    EXPECT_LT(relative_error(friction_factor_swamee_jain(row.reynolds, row.relative_roughness),
                             row.swamee_jain),
              kFourDigits)
        << "Re " << row.reynolds << ", e/D " << row.relative_roughness;
  }
}

TEST(FrictionFactor, SwameeJainWithinThreePercentOfColebrook) {
  for (const FrictionRow& row : kFrictionTable) {
    // source: REFERENCES.md section 3, Swamee-Jain tolerance 3 %
    EXPECT_LT(relative_error(friction_factor_swamee_jain(row.reynolds, row.relative_roughness),
                             friction_factor_colebrook(row.reynolds, row.relative_roughness)),
              0.03)
        << "Re " << row.reynolds << ", e/D " << row.relative_roughness;
  }
}

TEST(FrictionFactor, ColebrookWithinMoodyChartAccuracyOfSmoothPipeLaw) {
  // Moody (1944) gives his chart +-5 % for smooth pipes (REFERENCES.md section 3); the smooth line
  // below Re 1e5 is Blasius' law f = 0.3164 Re^-0.25 // from memory (Blasius 1913)
  for (double re = 4000.0; re <= 1e5; re *= 1.25) {
    EXPECT_LT(relative_error(friction_factor_colebrook(re, 0.0), 0.3164 * std::pow(re, -0.25)),
              0.05)
        << "Re " << re;
  }
  // source: Blasius at Re 1e5 = 0.01779, REFERENCES.md section 3
  EXPECT_NEAR(0.3164 * std::pow(1e5, -0.25), 0.01779, 0.000005);
}

TEST(FrictionFactor, ColebrookWithinMoodyChartAccuracyOfFullyRoughLaw) {
  // Moody (1944) gives his chart +-10 % for rough pipes (REFERENCES.md section 3); at high Re the
  // rough line is 1/sqrt(f) = -2 log10(e/(3.7 D)), the Re -> infinity limit of Colebrook (1939)
  for (double rr : {1e-3, 1e-2, 0.05}) {
    const double x = -2.0 * std::log10(rr / 3.7);
    EXPECT_LT(relative_error(friction_factor_colebrook(1e8, rr), 1.0 / (x * x)), 0.10)
        << "e/D " << rr;
  }
}

TEST(FrictionFactor, LaminarIsSixtyFourOverReynolds) {
  // source: Hagen-Poiseuille, values from REFERENCES.md section 3 (exact)
  EXPECT_DOUBLE_EQ(friction_factor(FrictionLaw::colebrook, 1000.0, 1e-3), 0.064);
  EXPECT_DOUBLE_EQ(friction_factor(FrictionLaw::swamee_jain, 1000.0, 0.0), 0.064);
  EXPECT_DOUBLE_EQ(friction_factor(FrictionLaw::colebrook, 2000.0, 0.0), 0.032);
  EXPECT_DOUBLE_EQ(friction_factor(FrictionLaw::colebrook, 16.0, 0.0), 4.0);
}

TEST(FrictionFactor, ZeroWithoutFlow) {
  EXPECT_EQ(friction_factor(FrictionLaw::colebrook, 0.0, 1e-3), 0.0);
  EXPECT_EQ(friction_factor(FrictionLaw::swamee_jain, 0.0, 0.0), 0.0);
}

TEST(FrictionFactor, UsesChosenTurbulentLawAboveTransition) {
  EXPECT_EQ(friction_factor(FrictionLaw::colebrook, 1e5, 1e-3),
            friction_factor_colebrook(1e5, 1e-3));
  EXPECT_EQ(friction_factor(FrictionLaw::swamee_jain, 1e5, 1e-3),
            friction_factor_swamee_jain(1e5, 1e-3));
  EXPECT_EQ(friction_factor(FrictionLaw::colebrook, 4000.0, 0.0),
            friction_factor_colebrook(4000.0, 0.0));
}

TEST(FrictionFactor, BlendsLinearlyInReynoldsBetweenLaminarAndTurbulent) {
  for (FrictionLaw law : {FrictionLaw::colebrook, FrictionLaw::swamee_jain}) {
    const double f_turbulent = friction_factor(law, 4000.0, 1e-3);
    EXPECT_DOUBLE_EQ(friction_factor(law, 3000.0, 1e-3), 0.5 * (0.032 + f_turbulent));
    EXPECT_DOUBLE_EQ(friction_factor(law, 2500.0, 1e-3), 0.75 * 0.032 + 0.25 * f_turbulent);
    // Continuous at both ends of the blend.
    EXPECT_NEAR(friction_factor(law, std::nextafter(2000.0, 0.0), 1e-3),
                friction_factor(law, 2000.0, 1e-3), 1e-12);
    EXPECT_NEAR(friction_factor(law, std::nextafter(4000.0, 1e5), 1e-3), f_turbulent, 1e-12);
  }
}

TEST(PipeFlow, HeadLossMatchesWorkedPenstock) {
  // source: REFERENCES.md section 4, penstock D 50 mm, L 10 m, Q 2.0 L/s at 20 C: V 1.0186 m/s,
  // Re 50 757, f 0.02093, h_f 0.2214 m (checked to the table's digits)
  const Pipe pipe = smooth_pipe(0.05, 10.0, 0.0);
  const double nu = water_kinematic_viscosity_m2_per_s(20.0);
  const double q = 2.0 * kLitre;
  const double v = q / circle_area_m2(pipe.diameter_m);
  EXPECT_NEAR(v, 1.0186, 0.00005);
  EXPECT_NEAR(v * pipe.diameter_m / nu, 50757.0, 0.5);
  EXPECT_NEAR(friction_factor_colebrook(v * pipe.diameter_m / nu, pipe.roughness_m / 0.05), 0.02093,
              0.000005);
  EXPECT_NEAR(pipe_head_loss_m(pipe, q, nu), 0.2214, 0.00005);
}

TEST(PipeFlow, HeadLossOfFittingsIsKTimesVelocityHead) {
  const Pipe fittings = smooth_pipe(0.04, 0.0, 1.1);
  const double q = 3.0 * kLitre;
  const double v = q / circle_area_m2(0.04);
  EXPECT_DOUBLE_EQ(pipe_head_loss_m(fittings, q, 1e-6), 1.1 * v * v / (2.0 * kGravity_m_per_s2));
}

TEST(PipeFlow, HeadLossIsZeroWithoutFlow) {
  EXPECT_EQ(pipe_head_loss_m(smooth_pipe(0.02, 5.0, 2.0), 0.0, 1e-6), 0.0);
}

TEST(PipeFlow, FreeOutfallMatchesWorkedSiphon) {
  // source: REFERENCES.md section 4, full-bore siphon, free outfall, dH 1.5 m, D 40 mm, L 3 m,
  // sum K = 0.5 + 2 x 0.3 at 20 C: V 2.932 m/s, Q 3.684 L/s (checked to the table's digits)
  const Pipe pipe = smooth_pipe(0.04, 3.0, 1.1);
  const double q = free_outfall_flow_m3_per_s(pipe, 1.5, water_kinematic_viscosity_m2_per_s(20.0));
  EXPECT_NEAR(q / kLitre, 3.684, 0.0005);
  EXPECT_NEAR(q / circle_area_m2(0.04), 2.932, 0.0005);
}

TEST(PipeFlow, FreeOutfallSpendsHeadOnLossesAndExitVelocity) {
  const double nu = water_kinematic_viscosity_m2_per_s(15.0);
  for (double head : {0.05, 0.5, 1.5, 6.0}) {
    const Pipe pipe = smooth_pipe(0.04, 3.0, 1.1);
    const double q = free_outfall_flow_m3_per_s(pipe, head, nu);
    const double v = q / circle_area_m2(0.04);
    EXPECT_NEAR(pipe_head_loss_m(pipe, q, nu) + v * v / (2.0 * kGravity_m_per_s2), head,
                1e-9 * head);
  }
}

TEST(PipeFlow, NoFlowWithoutHead) {
  const Pipe pipe = smooth_pipe(0.019, 4.5, 2.0);
  const Nozzle nozzle{0.005, 0.95, 0.97};
  for (double head : {0.0, -1.0}) {
    EXPECT_EQ(free_outfall_flow_m3_per_s(pipe, head, 1e-6), 0.0);
    EXPECT_EQ(nozzle_controlled_flow_m3_per_s(pipe, nozzle, head, 1e-6), 0.0);
  }
}

TEST(PipeFlow, NozzleControlledFlowClosesEnergyEquation) {
  const double nu = water_kinematic_viscosity_m2_per_s(15.0);
  for (FrictionLaw law : {FrictionLaw::colebrook, FrictionLaw::swamee_jain}) {
    for (double pipe_d : {0.012, 0.019, 0.05}) {
      for (double nozzle_d : {0.002, 0.005, 0.011}) {
        for (double head : {1e-4, 0.01, 0.3, 4.0, 40.0}) {
          for (double roughness : {0.0, 0.0015e-3, 0.26e-3}) {
            const Pipe pipe{pipe_d, 4.5, roughness, 2.0, law};
            const Nozzle nozzle{nozzle_d, 0.95, 0.97};
            const double q = nozzle_controlled_flow_m3_per_s(pipe, nozzle, head, nu);
            EXPECT_NEAR(pipe_head_loss_m(pipe, q, nu) + nozzle_head_for_flow_m(nozzle, q), head,
                        1e-9 * head)
                << "D " << pipe_d << ", d " << nozzle_d << ", H " << head << ", e " << roughness;
          }
        }
      }
    }
  }
}

TEST(PipeFlow, FullPipeFlowConvergesInFewEvaluations) {
  // The solver is on the simulator's hot path: laminar, transitional and turbulent flows, smooth
  // and rough, short and long pipes, small and large nozzles must all converge quickly.
  const double nu = water_kinematic_viscosity_m2_per_s(15.0);
  int worst = 0;
  std::array<int, 3> regimes = {0, 0, 0};  // laminar, transition, turbulent
  for (FrictionLaw law : {FrictionLaw::colebrook, FrictionLaw::swamee_jain}) {
    for (double roughness : {0.0, 0.0015e-3, 0.26e-3}) {
      for (double pipe_d : {0.006, 0.019, 0.1}) {
        for (double length : {0.1, 4.5, 100.0, 1000.0}) {
          for (double nozzle_d : {0.001, 0.005, 0.019}) {
            for (double head = 1e-6; head < 300.0; head *= 1.6) {
              const Pipe pipe{pipe_d, length, roughness, 2.0, law};
              const double effective_area = 0.95 * circle_area_m2(nozzle_d);
              const detail::FullPipeFlow solution = detail::solve_full_pipe_flow(
                  pipe, head, 1.0 / (effective_area * effective_area), nu);
              worst = std::max(worst, solution.evaluations);
              const double q = solution.flow_m3_per_s;
              const double reynolds = q / circle_area_m2(pipe_d) * pipe_d / nu;
              ++regimes[reynolds < 2000.0 ? 0 : reynolds <= 4000.0 ? 1 : 2];
              const Nozzle nozzle{nozzle_d, 0.95, 0.97};
              EXPECT_NEAR(pipe_head_loss_m(pipe, q, nu) + nozzle_head_for_flow_m(nozzle, q), head,
                          1e-9 * head);
            }
          }
        }
      }
    }
  }
  EXPECT_LE(worst, 16);
  for (int count : regimes) EXPECT_GT(count, 100);
}

TEST(PipeFlow, NozzleAloneGivesOrificeFlow) {
  const Pipe no_pipe = smooth_pipe(0.019, 0.0, 0.0);
  const Nozzle nozzle{0.005, 0.95, 0.97};
  EXPECT_NEAR(nozzle_controlled_flow_m3_per_s(no_pipe, nozzle, 4.0, 1e-6),
              orifice_flow_m3_per_s(0.95, circle_area_m2(0.005), 4.0), 1e-15);
}

TEST(Orifice, TorricelliVelocity) {
  // source: REFERENCES.md section 5, h 2.0 m -> v = sqrt(2 g h) = 6.2631 m/s
  EXPECT_NEAR(jet_velocity_m_per_s(1.0, 2.0), 6.2631, 0.00005);
}

TEST(Orifice, FlowMatchesWorkedExample) {
  // source: REFERENCES.md section 5, d 20 mm, h 2.0 m, Cd 0.61 -> 1.2002 L/s (ideal 1.9676)
  const double area = circle_area_m2(0.020);
  EXPECT_NEAR(orifice_flow_m3_per_s(0.61, area, 2.0) / kLitre, 1.2002, 0.00005);
  EXPECT_NEAR(orifice_flow_m3_per_s(1.0, area, 2.0) / kLitre, 1.9676, 0.00005);
}

TEST(Orifice, NoFlowWithoutHead) {
  EXPECT_EQ(orifice_flow_m3_per_s(0.61, 1e-3, 0.0), 0.0);
  EXPECT_EQ(orifice_flow_m3_per_s(0.61, 1e-3, -0.5), 0.0);
}

TEST(Nozzle, HeadForFlowInvertsOrificeFlow) {
  const Nozzle nozzle{0.005, 0.95, 0.97};
  for (double head : {0.01, 1.0, 3.5, 20.0}) {
    const double q = orifice_flow_m3_per_s(0.95, circle_area_m2(0.005), head);
    EXPECT_NEAR(nozzle_head_for_flow_m(nozzle, q), head, 1e-12 * head);
  }
  EXPECT_EQ(nozzle_head_for_flow_m(nozzle, 0.0), 0.0);
}

TEST(Nozzle, JetVelocityMatchesWorkedExample) {
  // source: REFERENCES.md section 5, H_net 10 m, Cv 0.98 -> V = 13.7247 m/s
  EXPECT_NEAR(jet_velocity_m_per_s(0.98, 10.0), 13.7247, 0.00005);
}

TEST(Nozzle, NoJetWithoutHead) {
  EXPECT_EQ(jet_velocity_m_per_s(0.98, 0.0), 0.0);
  EXPECT_EQ(jet_velocity_m_per_s(0.98, -2.0), 0.0);
}

TEST(Nozzle, JetPowerIsVelocityCoefficientSquaredOfHydraulicPower) {
  // source: REFERENCES.md section 5, P_jet / P_hyd = Cv^2 = 0.9604; 1 L/s at 20 C under 10 m:
  // 97.89 W hydraulic, 94.01 W in the jet
  const double rho = water_density_kg_per_m3(20.0);
  const double q = 1.0 * kLitre;
  const double hydraulic_power = rho * kGravity_m_per_s2 * q * 10.0;
  const double jet_power = jet_power_W(rho, q, jet_velocity_m_per_s(0.98, 10.0));
  EXPECT_NEAR(jet_power / hydraulic_power, 0.9604, 1e-12);
  EXPECT_NEAR(hydraulic_power, 97.89, 0.005);
  EXPECT_NEAR(jet_power, 94.01, 0.005);
}

TEST(Weir, BroadCrestedMatchesWorkedExample) {
  // source: ISO 3846 form Q = Cd (2/3)^1.5 sqrt(g) b H^1.5, b 0.5 m, H 0.10 m, Cd 1 -> 26.95 L/s
  // (REFERENCES.md section 6). The project's lumped C = 1.7 m^0.5/s is that form at
  // Cd = 1.7 / ((2/3)^1.5 sqrt(9.80665)) = 1.7 / 1.704604 = 0.99730, so by hand
  // 26.95 x 0.99730 = 26.88 L/s, and directly 1.7 x 0.5 x 0.1^1.5 = 26.879360 L/s.
  EXPECT_NEAR(weir_flow_m3_per_s(1.7, 0.5, 0.10) / kLitre, 26.879360, 1e-6);
  EXPECT_NEAR(weir_flow_m3_per_s(1.7, 0.5, 0.10) / kLitre, 26.95 * 0.99730, 0.005);
}

TEST(Weir, HeadForFlowInvertsWeirFlow) {
  for (double head : {0.001, 0.02, 0.1, 0.7}) {
    const double q = weir_flow_m3_per_s(1.7, 0.06, head);
    EXPECT_NEAR(weir_head_for_flow_m(1.7, 0.06, q), head, 1e-12 * head);
  }
}

TEST(Weir, NoFlowBelowCrest) {
  EXPECT_EQ(weir_flow_m3_per_s(1.7, 0.5, 0.0), 0.0);
  EXPECT_EQ(weir_flow_m3_per_s(1.7, 0.5, -0.01), 0.0);
  EXPECT_EQ(weir_head_for_flow_m(1.7, 0.5, 0.0), 0.0);
}

TEST(ImpulseTurbine, EfficiencyFollowsIdealCurve) {
  // source: 4x(1-x) from Dixon and Hall with k = 1, phi = 0; values from REFERENCES.md section 7
  EXPECT_NEAR(impulse_efficiency(0.3, 1.0), 0.84, 1e-9);
  EXPECT_NEAR(impulse_efficiency(0.4, 1.0), 0.96, 1e-9);
  EXPECT_NEAR(impulse_efficiency(0.5, 1.0), 1.0, 1e-9);
  EXPECT_NEAR(impulse_efficiency(0.6, 1.0), 0.96, 1e-9);
  EXPECT_NEAR(impulse_efficiency(1.0, 1.0), 0.0, 1e-9);
}

TEST(ImpulseTurbine, EfficiencyPeaksAtHalfJetSpeedForAnyPeak) {
  // source: argmax x = 0.5, REFERENCES.md section 7
  for (double peak : {0.1, 0.7, 0.93, 1.0}) {
    double best_x = 0.0;
    double best = -1.0;
    for (int i = 0; i <= 1000; ++i) {
      const double x = i / 1000.0;
      if (impulse_efficiency(x, peak) > best) {
        best = impulse_efficiency(x, peak);
        best_x = x;
      }
    }
    EXPECT_DOUBLE_EQ(best_x, 0.5) << "peak " << peak;
    EXPECT_DOUBLE_EQ(best, peak) << "peak " << peak;
  }
}

TEST(ImpulseTurbine, NoEfficiencyOutsideWorkingRange) {
  EXPECT_EQ(impulse_efficiency(0.0, 0.7), 0.0);
  EXPECT_EQ(impulse_efficiency(-0.2, 0.7), 0.0);
  EXPECT_EQ(impulse_efficiency(1.0, 0.7), 0.0);
  EXPECT_EQ(impulse_efficiency(1.3, 0.7), 0.0);
}

TEST(Hydraulics, VelocityHeadIsTheSpeedSquaredOverTwoG) {
  // By hand: 3 m/s gives 9 / (2 x 9.80665) = 0.458872 m.
  EXPECT_NEAR(velocity_head_m(3.0), 0.458872, 1e-6);
  EXPECT_EQ(velocity_head_m(0.0), 0.0);
}

TEST(ImpulseTurbine, BucketSpeedIsThePitchCircleSpeed) {
  // u = pi D N / 60: D 70 mm at 1000 rpm, 3.6652 m/s (by hand: 0.07 x 3.14159 x 1000 / 60)
  EXPECT_NEAR(bucket_speed_m_per_s(0.07, 1000.0), 3.6652, 1e-4);
}

}  // namespace
}  // namespace gutterwatt::hydraulics_test
