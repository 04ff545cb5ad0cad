#pragma once
/// A plain reference model of a bell siphon at a steady inflow, shared by the fit tests. It is
/// written from the textbook relations and shares no code with the library.

#include <algorithm>
#include <cmath>

namespace gutterwatt::test_support {

// ---------------------------------------------------------------------------------------------
// A plain reference model of the bench, written here from the textbook relations and sharing no
// code with the library: a rectangular reservoir of plan area A filled at a steady q from the bell
// rim; no outflow up to the lip; then outflow into the standpipe, the smaller of the lip weir
// C_w pi d h^1.5 and the mouth orifice C_m (pi d^2/4) sqrt(2 g h), until it reaches the priming
// flow P; then the running flow Q(H) of the energy equation H = (f L/D + K) V^2/2g +
// (Q / (Cd a_n))^2 / 2g (Swamee-Jain f, 1976) until the level falls back to the rim. Times are
// plain midpoint-rule quadratures of dt = A dh / (net inflow).
// ---------------------------------------------------------------------------------------------
struct SiphonReference {
  double area_m2 = 0.8;  // 0.1 m x 8 m
  double lip_m = 0.050;
  double rim_m = 0.008;
  double standpipe_m = 0.019;
  double weir_c = 1.77;
  double mouth_cd = 0.61;
  double priming_m3_per_s = 0.0;
  double pipe_d_m = 0.019;
  double pipe_l_m = 4.5;
  double roughness_m = 0.0015e-3;
  double loss_k = 0.0;
  double drop_m = 4.0;
  double nozzle_d_m = 0.010;
  double nozzle_cd = 0.95;
  double nu_m2_per_s = 1.1386e-6;  // water at 15 C, REFERENCES.md section 2
  double g = 9.80665;
  double pi = 3.14159265358979323846;

  double standpipe_flow(double head) const {
    if (head <= 0.0) return 0.0;
    const double weir = weir_c * pi * standpipe_m * std::pow(head, 1.5);
    const double orifice =
        mouth_cd * pi * standpipe_m * standpipe_m / 4.0 * std::sqrt(2 * g * head);
    return std::min(weir, orifice);
  }
  double priming_head() const {
    const double weir = std::pow(priming_m3_per_s / (weir_c * pi * standpipe_m), 2.0 / 3.0);
    const double a = mouth_cd * pi * standpipe_m * standpipe_m / 4.0;
    const double orifice = std::pow(priming_m3_per_s / a, 2) / (2 * g);
    return std::max(weir, orifice);
  }
  double running_flow(double level) const {
    const double a_pipe = pi * pipe_d_m * pipe_d_m / 4.0;
    const double a_nozzle = nozzle_cd * pi * nozzle_d_m * nozzle_d_m / 4.0;
    const double head = level + drop_m;
    double q = 1e-4;
    for (int i = 0; i < 40; ++i) {  // a fixed-point iteration, converged to rounding well before
      const double re = q / a_pipe * pipe_d_m / nu_m2_per_s;
      const double lg = std::log10(roughness_m / (3.7 * pipe_d_m) + 5.74 / std::pow(re, 0.9));
      const double f = 0.25 / (lg * lg);
      q = std::sqrt(
          2 * g * head /
          ((f * pipe_l_m / pipe_d_m + loss_k) / (a_pipe * a_pipe) + 1.0 / (a_nozzle * a_nozzle)));
    }
    return q;
  }
  struct Times {
    double to_prime_s;
    double drain_s;
    double nozzle_m3_per_s;
  };
  Times bench(double q) const {
    const double h_prime = priming_head();
    double t_prime = area_m2 * (lip_m - rim_m) / q;
    const int n = 40000;
    for (int i = 0; i < n; ++i) {
      const double h = (i + 0.5) * h_prime / n;
      t_prime += area_m2 * (h_prime / n) / (q - standpipe_flow(h));
    }
    double t_drain = 0.0;
    const double top = lip_m + h_prime;
    const int m = 4000;
    for (int i = 0; i < m; ++i) {
      const double h = rim_m + (i + 0.5) * (top - rim_m) / m;
      t_drain += area_m2 * ((top - rim_m) / m) / (running_flow(h) - q);
    }
    const double volume = area_m2 * (top - rim_m) + q * t_drain;
    return {t_prime, t_drain, volume / t_drain};
  }
};

}  // namespace gutterwatt::test_support
