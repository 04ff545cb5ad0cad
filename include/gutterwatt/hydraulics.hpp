#pragma once
/// Water properties, pipe friction, orifices, weirs, nozzles and the impulse turbine: small pure
/// functions in SI units. Formulas and their sources are in src/hydraulics.cpp.

namespace gutterwatt {

/// Density of liquid water at 0.101325 MPa, kg/m3, for 0..40 C (Tanaka et al. 2001).
double water_density_kg_per_m3(double temperature_C);

/// Dynamic viscosity of liquid water at 0.101325 MPa, Pa s, for 0..40 C (IAPWS 2008 without the
/// critical enhancement, evaluated at the density above).
double water_viscosity_Pa_s(double temperature_C);

/// Kinematic viscosity, m2/s.
double water_kinematic_viscosity_m2_per_s(double temperature_C);

enum class FrictionLaw { colebrook, swamee_jain };

/// Darcy friction factor by Colebrook-White, solved to machine precision. Re > 0.
double friction_factor_colebrook(double reynolds, double relative_roughness);
/// Darcy friction factor by the explicit Swamee-Jain (1976) approximation.
double friction_factor_swamee_jain(double reynolds, double relative_roughness);
/// Darcy friction factor for any Re >= 0: 64/Re below 2000, the chosen turbulent law above 4000,
/// linear in Re between (a blending rule of this project; no standard value exists there).
/// Returns 0 at Re = 0 (no flow, no friction loss).
double friction_factor(FrictionLaw law, double reynolds, double relative_roughness);

/// A straight drop pipe with its fittings.
struct Pipe {
  double diameter_m;
  double length_m;
  double roughness_m;
  double minor_loss_k;  ///< sum of the minor-loss coefficients (entrance, bends, ...)
  FrictionLaw friction = FrictionLaw::colebrook;
};

/// A nozzle: discharge and velocity coefficients on its outlet area.
struct Nozzle {
  double diameter_m;
  double discharge_coefficient;
  double velocity_coefficient;
};

double circle_area_m2(double diameter_m);

/// Friction plus minor head loss for `flow` through `pipe`, m: (f L/D + K) V^2 / (2 g).
double pipe_head_loss_m(const Pipe& pipe, double flow_m3_per_s,
                        double kinematic_viscosity_m2_per_s);

/// Flow through a full pipe that ends in the nozzle, with `total_head_m` from the supply surface
/// to the nozzle; the nozzle controls: H = h_loss(Q) + (Q / (Cd A_n))^2 / (2 g). 0 for H <= 0.
double nozzle_controlled_flow_m3_per_s(const Pipe& pipe, const Nozzle& nozzle, double total_head_m,
                                       double kinematic_viscosity_m2_per_s);

/// Flow through a full pipe discharging freely into air at its outlet, `head_m` from the supply
/// surface to the outlet: H = (1 + f L/D + K) V^2 / (2 g). 0 for H <= 0.
double free_outfall_flow_m3_per_s(const Pipe& pipe, double head_m,
                                  double kinematic_viscosity_m2_per_s);

/// Orifice (and nozzle) flow Q = Cd A sqrt(2 g h); 0 for h <= 0.
double orifice_flow_m3_per_s(double discharge_coefficient, double area_m2, double head_m);

/// Head upstream of a nozzle passing `flow`: h = (Q / (Cd A))^2 / (2 g).
double nozzle_head_for_flow_m(const Nozzle& nozzle, double flow_m3_per_s);
/// The velocity head V^2 / (2 g), m, of a speed `velocity_m_per_s`.
double velocity_head_m(double velocity_m_per_s);

/// Weir flow Q = C L h^1.5 with C in m^0.5/s; 0 for h <= 0.
double weir_flow_m3_per_s(double coefficient_m05_per_s, double length_m, double head_m);

/// Head over a weir passing `flow`: the inverse of weir_flow_m3_per_s.
double weir_head_for_flow_m(double coefficient_m05_per_s, double length_m, double flow_m3_per_s);

/// Jet velocity V = Cv sqrt(2 g H); 0 for H <= 0.
double jet_velocity_m_per_s(double velocity_coefficient, double head_m);

/// Kinetic power of a jet, rho Q V^2 / 2, W.
double jet_power_W(double density_kg_per_m3, double flow_m3_per_s, double jet_velocity_m_per_s);

/// Impulse-runner efficiency from the bucket-to-jet speed ratio x = u / V_jet: the ideal curve
/// 4 x (1 - x), peaking at x = 0.5, scaled to `peak_efficiency`; 0 outside 0 < x < 1.
double impulse_efficiency(double speed_ratio, double peak_efficiency);

/// The bucket's speed at the pitch circle of a runner of pitch diameter `runner_diameter_m`
/// turning at `speed_rpm`, m/s: over the jet's velocity, the speed ratio.
double bucket_speed_m_per_s(double runner_diameter_m, double speed_rpm);

namespace detail {

/// IAPWS 2008 viscosity of ordinary water without the critical enhancement (mu0 * mu1), Pa s, at
/// `density_kg_per_m3` and `temperature_K`. Exposed so tests can check the release's own values.
double iapws2008_viscosity_Pa_s(double density_kg_per_m3, double temperature_K);

/// Result of the full-pipe energy equation: the flow and how many times the fixed-point map
/// (one friction-factor evaluation each) was evaluated to reach it.
struct FullPipeFlow {
  double flow_m3_per_s;
  int evaluations;
};

/// Solves H = (f(Q) L/D + K) Q^2 / (2 g A^2) + outlet_term Q^2 / (2 g) for Q, where f depends on
/// Q through Re. `outlet_term_per_m4` is 1/(Cd A_n)^2 for a nozzle, 1/A^2 for a free outfall.
/// Flow 0 (with 0 evaluations) for H <= 0.
FullPipeFlow solve_full_pipe_flow(const Pipe& pipe, double head_m, double outlet_term_per_m4,
                                  double kinematic_viscosity_m2_per_s);

}  // namespace detail

}  // namespace gutterwatt
