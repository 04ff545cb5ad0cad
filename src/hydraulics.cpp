#include "gutterwatt/hydraulics.hpp"

#include <array>
#include <cassert>
#include <cmath>
#include <limits>

#include "gutterwatt/units.hpp"

namespace gutterwatt {
namespace {

// Reduced variables of IAPWS (2008), Release on the IAPWS Formulation 2008 for the Viscosity of
// Ordinary Water Substance, reference constants: T* = 647.096 K, rho* = 322 kg/m3,
// mu* = 1e-6 Pa s.
constexpr double kReferenceTemperature_K = 647.096;
constexpr double kReferenceDensity_kg_per_m3 = 322.0;
constexpr double kReferenceViscosity_Pa_s = 1e-6;

// IAPWS (2008), Table 1: coefficients H_i of the dilute-gas part mu0 (from memory; confirmed by
// the release's check value in the tests).
constexpr std::array<double, 4> kDiluteGasH = {1.67752, 2.20462, 0.6366564, -0.241605};

// IAPWS (2008), Table 2: coefficients H_ij of the residual part mu1, row i (powers of 1/T - 1),
// column j (powers of rho - 1); unlisted entries are zero (from memory; confirmed as above).
constexpr std::array<std::array<double, 7>, 6> kResidualH = {{
    {5.20094e-1, 2.22531e-1, -2.81378e-1, 1.61913e-1, -3.25372e-2, 0.0, 0.0},
    {8.50895e-2, 9.99115e-1, -9.06851e-1, 2.57399e-1, 0.0, 0.0, 0.0},
    {-1.08374, 1.88797, -7.72479e-1, 0.0, 0.0, 0.0, 0.0},
    {-2.89555e-1, 1.26613, -4.89837e-1, 0.0, 6.98452e-2, 0.0, -4.35673e-3},
    {0.0, 0.0, -2.57040e-1, 0.0, 0.0, 8.72102e-3, 0.0},
    {0.0, 1.20573e-1, 0.0, 0.0, 0.0, 0.0, -5.93264e-4},
}};

// Friction-factor regimes of friction_factor(): laminar below, turbulent above, blended between.
constexpr double kLaminarLimitRe = 2000.0;
constexpr double kTurbulentLimitRe = 4000.0;

// Upper bound on the evaluations of the fixed-point map in solve_full_pipe_flow; the safeguarded
// secant iteration typically needs 3 to 6, at most about 15 next to the kink at Re = 2000.
constexpr int kMaxFlowEvaluations = 50;
constexpr double kFlowRelativeTolerance = 1e-12;

double laminar_friction_factor(double reynolds) { return 64.0 / reynolds; }

double turbulent_friction_factor(FrictionLaw law, double reynolds, double relative_roughness) {
  switch (law) {
    case FrictionLaw::swamee_jain:
      return friction_factor_swamee_jain(reynolds, relative_roughness);
    case FrictionLaw::colebrook:
      break;
  }
  return friction_factor_colebrook(reynolds, relative_roughness);
}

}  // namespace

double water_density_kg_per_m3(double temperature_C) {
  assert(temperature_C >= 0.0 && temperature_C <= 40.0);
  // CIPM formula for air-free water: rho = kA5 [1 - (t + kA1)^2 (t + kA2) / (kA3 (t + kA4))],
  // Tanaka, Girard, Davis, Peuto, Bignell (2001), Metrologia 38:301 (coefficients from
  // memory; confirmed against REFERENCES.md section 2 in the tests).
  constexpr double kA1 = -3.983035;   // C
  constexpr double kA2 = 301.797;     // C
  constexpr double kA3 = 522528.9;    // C^2
  constexpr double kA4 = 69.34881;    // C
  constexpr double kA5 = 999.974950;  // kg/m3
  const double t = temperature_C;
  return kA5 * (1.0 - (t + kA1) * (t + kA1) * (t + kA2) / (kA3 * (t + kA4)));
}

double detail::iapws2008_viscosity_Pa_s(double density_kg_per_m3, double temperature_K) {
  assert(density_kg_per_m3 > 0.0 && temperature_K > 0.0);
  const double t = temperature_K / kReferenceTemperature_K;
  const double rho = density_kg_per_m3 / kReferenceDensity_kg_per_m3;

  // Dilute-gas part, IAPWS (2008): mu0 = 100 sqrt(T) / sum_i H_i / T^i.
  double dilute_sum = 0.0;
  double inverse_t_power = 1.0;
  for (const double h : kDiluteGasH) {
    dilute_sum += h * inverse_t_power;
    inverse_t_power /= t;
  }
  const double mu0 = 100.0 * std::sqrt(t) / dilute_sum;

  // Residual part, IAPWS (2008):
  // mu1 = exp(rho sum_i (1/T - 1)^i sum_j H_ij (rho - 1)^j).
  const double x = 1.0 / t - 1.0;
  const double y = rho - 1.0;
  double outer = 0.0;
  double x_power = 1.0;
  for (const auto& row : kResidualH) {
    double inner = 0.0;
    double y_power = 1.0;
    for (const double h : row) {
      inner += h * y_power;
      y_power *= y;
    }
    outer += x_power * inner;
    x_power *= x;
  }
  const double mu1 = std::exp(rho * outer);

  // The critical enhancement mu2 differs from 1 only near the critical point, far from liquid
  // water at ambient conditions; the release allows mu2 = 1 for industrial use.
  return mu0 * mu1 * kReferenceViscosity_Pa_s;
}

double water_viscosity_Pa_s(double temperature_C) {
  return detail::iapws2008_viscosity_Pa_s(water_density_kg_per_m3(temperature_C),
                                          temperature_C + kZeroCelsius_K);
}

double water_kinematic_viscosity_m2_per_s(double temperature_C) {
  return water_viscosity_Pa_s(temperature_C) / water_density_kg_per_m3(temperature_C);
}

double friction_factor_swamee_jain(double reynolds, double relative_roughness) {
  assert(reynolds > 0.0 && relative_roughness >= 0.0);
  // f = 0.25 / [log10(e/(3.7 D) + 5.74 / Re^0.9)]^2: Swamee and Jain (1976), J. Hydraul. Div.
  // ASCE 102(HY5):657.
  const double l = std::log10(relative_roughness / 3.7 + 5.74 / std::pow(reynolds, 0.9));
  return 0.25 / (l * l);
}

double friction_factor_colebrook(double reynolds, double relative_roughness) {
  assert(reynolds > 0.0 && relative_roughness >= 0.0);
  // Colebrook (1939), J. Inst. Civ. Eng. 11:133 (from memory): 1/sqrt(f) = -2 log10(e/(3.7 D)
  // + 2.51 / (Re sqrt(f))). With x = 1/sqrt(f), g(x) = x + 2 log10(a + b x) is increasing and
  // concave, so Newton's method from the Swamee-Jain estimate converges quadratically (after one
  // step, from below).
  const double a = relative_roughness / 3.7;
  const double b = 2.51 / reynolds;
  constexpr double kTwoOverLn10 = 2.0 / 2.30258509299404568402;
  constexpr int kMaxNewtonSteps = 20;
  constexpr double kTolerance = 2.0 * std::numeric_limits<double>::epsilon();
  double x = 1.0 / std::sqrt(friction_factor_swamee_jain(reynolds, relative_roughness));
  for (int step = 0; step < kMaxNewtonSteps; ++step) {
    const double s = a + b * x;
    const double g = x + 2.0 * std::log10(s);
    const double dg = 1.0 + kTwoOverLn10 * b / s;
    double next = x - g / dg;
    // At very low Re a full step could land at x <= 0, outside the domain: halve x instead.
    if (!(next > 0.0)) next = 0.5 * x;
    const bool converged = std::abs(next - x) <= kTolerance * next;
    x = next;
    if (converged) break;
  }
  return 1.0 / (x * x);
}

double friction_factor(FrictionLaw law, double reynolds, double relative_roughness) {
  assert(reynolds >= 0.0);
  if (reynolds <= 0.0) return 0.0;
  // Laminar Hagen-Poiseuille flow, f = 64/Re: e.g. White, Fluid Mechanics, ch. 6.
  if (reynolds < kLaminarLimitRe) return laminar_friction_factor(reynolds);
  if (reynolds > kTurbulentLimitRe) {
    return turbulent_friction_factor(law, reynolds, relative_roughness);
  }
  // Transition: linear in Re between the two laws (this project's rule, no published source).
  const double f_low = laminar_friction_factor(kLaminarLimitRe);
  const double f_high = turbulent_friction_factor(law, kTurbulentLimitRe, relative_roughness);
  const double w = (reynolds - kLaminarLimitRe) / (kTurbulentLimitRe - kLaminarLimitRe);
  return f_low + w * (f_high - f_low);
}

double circle_area_m2(double diameter_m) { return 0.25 * kPi * diameter_m * diameter_m; }

double pipe_head_loss_m(const Pipe& pipe, double flow_m3_per_s,
                        double kinematic_viscosity_m2_per_s) {
  assert(flow_m3_per_s >= 0.0 && kinematic_viscosity_m2_per_s > 0.0);
  // Darcy-Weisbach friction plus minor losses, h = (f L/D + K) V^2 / (2 g): e.g. White, Fluid
  // Mechanics, ch. 6.
  const double velocity = flow_m3_per_s / circle_area_m2(pipe.diameter_m);
  const double reynolds = velocity * pipe.diameter_m / kinematic_viscosity_m2_per_s;
  const double f = friction_factor(pipe.friction, reynolds, pipe.roughness_m / pipe.diameter_m);
  return (f * pipe.length_m / pipe.diameter_m + pipe.minor_loss_k) * velocity * velocity /
         (2.0 * kGravity_m_per_s2);
}

detail::FullPipeFlow detail::solve_full_pipe_flow(const Pipe& pipe, double head_m,
                                                  double outlet_term_per_m4,
                                                  double kinematic_viscosity_m2_per_s) {
  assert(outlet_term_per_m4 > 0.0 && kinematic_viscosity_m2_per_s > 0.0);
  if (!(head_m > 0.0)) return {0.0, 0};
  // Energy equation (Bernoulli with Darcy-Weisbach losses) solved for Q as the fixed point
  // Q = G(Q) = sqrt(2 g H / (f(Re(Q)) L/(D A^2) + K/A^2 + outlet_term)).
  const double area = circle_area_m2(pipe.diameter_m);
  const double friction_term = pipe.length_m / (pipe.diameter_m * area * area);
  const double fixed_term = pipe.minor_loss_k / (area * area) + outlet_term_per_m4;
  const double two_g_h = 2.0 * kGravity_m_per_s2 * head_m;
  const double reynolds_per_flow = pipe.diameter_m / (area * kinematic_viscosity_m2_per_s);
  const double relative_roughness = pipe.roughness_m / pipe.diameter_m;
  int evaluations = 0;
  // Works on s = ln Q, where the fixed-point map is close to linear (exactly so for laminar flow
  // with friction dominating), so that secant steps converge in a few evaluations from afar.
  const auto residual = [&](double s) {
    ++evaluations;
    const double q = std::exp(s);
    const double f = friction_factor(pipe.friction, reynolds_per_flow * q, relative_roughness);
    return 0.5 * std::log(two_g_h / ((friction_term * f + fixed_term) * q * q));
  };

  // r(s) = ln G(e^s) - s decreases strictly, as |d ln G / d ln Q| < 1 in every regime (at most
  // 1/2 laminar, about 1/8 turbulent, 1 - 0.032/f(4000) in the blend), so its root is unique and
  // bracketed: r > 0 below it, r < 0 above. The frictionless flow is an upper
  // bound. Secant steps on r, kept inside the bracket, fall back to the plain fixed-point step or
  // to bisection.
  double s_prev = 0.5 * std::log(two_g_h / fixed_term);
  double r_prev = residual(s_prev);
  double low = -std::numeric_limits<double>::infinity();
  double high = s_prev;
  double s = s_prev + r_prev;
  if (r_prev == 0.0) return {std::exp(s), evaluations};
  while (evaluations < kMaxFlowEvaluations) {
    const double r = residual(s);
    if (r == 0.0) break;
    if (r > 0.0) {
      low = s;
    } else {
      high = s;
    }
    const double fixed_point = s + r;
    double next = r != r_prev ? s - r * (s - s_prev) / (r - r_prev) : fixed_point;
    // Closed bracket: next to the root a step can round to zero, landing on the end just set.
    if (!(next >= low && next <= high)) {
      next = fixed_point >= low && fixed_point <= high ? fixed_point : 0.5 * (low + high);
    }
    // A change of ln Q is the relative change of Q.
    const bool converged = std::abs(next - s) < kFlowRelativeTolerance;
    s_prev = s;
    r_prev = r;
    s = next;
    if (converged) break;
  }
  return {std::exp(s), evaluations};
}

double nozzle_controlled_flow_m3_per_s(const Pipe& pipe, const Nozzle& nozzle, double total_head_m,
                                       double kinematic_viscosity_m2_per_s) {
  const double effective_area = nozzle.discharge_coefficient * circle_area_m2(nozzle.diameter_m);
  return detail::solve_full_pipe_flow(pipe, total_head_m, 1.0 / (effective_area * effective_area),
                                      kinematic_viscosity_m2_per_s)
      .flow_m3_per_s;
}

double free_outfall_flow_m3_per_s(const Pipe& pipe, double head_m,
                                  double kinematic_viscosity_m2_per_s) {
  // The exit velocity head leaves with the jet: the "1 +" of H = (1 + f L/D + K) V^2 / (2 g).
  const double area = circle_area_m2(pipe.diameter_m);
  return detail::solve_full_pipe_flow(pipe, head_m, 1.0 / (area * area),
                                      kinematic_viscosity_m2_per_s)
      .flow_m3_per_s;
}

double orifice_flow_m3_per_s(double discharge_coefficient, double area_m2, double head_m) {
  if (!(head_m > 0.0)) return 0.0;
  // Torricelli's theorem with a discharge coefficient, Q = Cd A sqrt(2 g h): e.g. White, Fluid
  // Mechanics, ch. 3 (Bernoulli) and ch. 6 (flow meters).
  return discharge_coefficient * area_m2 * std::sqrt(2.0 * kGravity_m_per_s2 * head_m);
}

double nozzle_head_for_flow_m(const Nozzle& nozzle, double flow_m3_per_s) {
  // Inverse of the orifice equation, h = (Q / (Cd A))^2 / (2 g).
  return velocity_head_m(flow_m3_per_s /
                         (nozzle.discharge_coefficient * circle_area_m2(nozzle.diameter_m)));
}

double velocity_head_m(double velocity_m_per_s) {
  // Bernoulli's velocity head, e.g. White, Fluid Mechanics, ch. 3.
  return velocity_m_per_s * velocity_m_per_s / (2.0 * kGravity_m_per_s2);
}

double weir_flow_m3_per_s(double coefficient_m05_per_s, double length_m, double head_m) {
  if (!(head_m > 0.0)) return 0.0;
  // Weir equation Q = C L h^1.5 (e.g. ISO 1438:2008 and ISO 3846 in this form, C absorbing
  // Cd (2/3) sqrt(2 g) or Cd (2/3)^1.5 sqrt(g)).
  return coefficient_m05_per_s * length_m * head_m * std::sqrt(head_m);
}

double weir_head_for_flow_m(double coefficient_m05_per_s, double length_m, double flow_m3_per_s) {
  if (!(flow_m3_per_s > 0.0)) return 0.0;
  return std::pow(flow_m3_per_s / (coefficient_m05_per_s * length_m), 2.0 / 3.0);
}

double jet_velocity_m_per_s(double velocity_coefficient, double head_m) {
  if (!(head_m > 0.0)) return 0.0;
  // V = Cv sqrt(2 g H): Torricelli with a velocity coefficient, e.g. Dixon and Hall, Fluid
  // Mechanics and Thermodynamics of Turbomachinery, chapter on hydraulic turbines.
  return velocity_coefficient * std::sqrt(2.0 * kGravity_m_per_s2 * head_m);
}

double jet_power_W(double density_kg_per_m3, double flow_m3_per_s, double jet_velocity_m_per_s) {
  // Kinetic-energy flux of a uniform jet, P = rho Q V^2 / 2.
  return 0.5 * density_kg_per_m3 * flow_m3_per_s * jet_velocity_m_per_s * jet_velocity_m_per_s;
}

double impulse_efficiency(double speed_ratio, double peak_efficiency) {
  if (!(speed_ratio > 0.0 && speed_ratio < 1.0)) return 0.0;
  // Ideal impulse-runner efficiency 2x(1-x)(1 + k cos phi) with k = 1, phi = 0, i.e. 4x(1-x):
  // Dixon and Hall, Fluid Mechanics and Thermodynamics of Turbomachinery (Pelton wheel analysis).
  return peak_efficiency * 4.0 * speed_ratio * (1.0 - speed_ratio);
}

double bucket_speed_m_per_s(double runner_diameter_m, double speed_rpm) {
  // Bucket speed at the pitch circle, u = pi D N / 60.
  return kPi * runner_diameter_m * speed_rpm / kSecondsPerMinute;
}

}  // namespace gutterwatt
