#include "gutterwatt/column_trickle.hpp"

#include <algorithm>
#include <array>
#include <cmath>

#include "gutterwatt/phi_functions.hpp"

namespace gutterwatt {
namespace {

// Substeps shorter than this are taken whatever their error estimate: the flows are then
// constant to rounding over them.
constexpr double kMinSubstep_s = 1e-6;

}  // namespace

TrickleWater trickle_water_after(const Plant& plant, double volume_m3, const StepInflow& inflow,
                                 double dt_s, double rtol, double scale_m3,
                                 double first_substep_s) {
  TrickleWater out{volume_m3, first_substep_s};
  if (!(dt_s > 0.0) || (volume_m3 <= 0.0 && inflow.start_m3_per_s <= 0.0 &&
                        inflow.end_m3_per_s <= 0.0 && inflow.mean_m3_per_s <= 0.0)) {
    return out;
  }
  // Q(u) = q0 + a u - b u^2 on u = t / dt: through the ends, with the mean (its integral).
  const double q0 = inflow.start_m3_per_s;
  const double b = 6.0 * (inflow.mean_m3_per_s - 0.5 * (q0 + inflow.end_m3_per_s));
  const double a = inflow.end_m3_per_s - q0 + b;
  // Below the join (kNozzleLinearHead_m) the drain is linear, Qn = k V; above it the orifice law,
  // whose slope is Qn / (2 V).
  const double join_m3 = plant.column_join_m3();
  const double linear_rate_per_s = plant.column_linear_drain_per_s();
  // Step-size control for a local error of order h^3 (Hairer, Norsett & Wanner, Solving ODEs I,
  // II.4), growing at most fivefold: the cube root is taken only where it is not capped.
  constexpr double kMaxGrowth = 5.0;
  constexpr double kSafety = 0.9;
  constexpr double kCappedRatio =
      (kMaxGrowth / kSafety) * (kMaxGrowth / kSafety) * (kMaxGrowth / kSafety);
  double t = 0.0;
  double v = std::max(0.0, volume_m3);
  double h = first_substep_s > 0.0 ? std::min(first_substep_s, dt_s) : dt_s;
  while (t < dt_s) {
    h = std::min(h, dt_s - t);
    // The inflow over the substep as q + dq s + c s^2 in its own time s.
    const double u = t / dt_s;
    const double q = q0 + (a - b * u) * u;
    const double dq = (a - 2.0 * b * u) / dt_s;
    const double c = -b / (dt_s * dt_s);
    // exprb32 (Hochbruck, Ostermann & Schweitzer 2009, SIAM J. Numer. Anal. 47(1), 786-803; from
    // memory) on dV/dt = -lambda (V - V0) + Q(t) - Qn(V0) + N(V), lambda = Qn'(V0): the first
    // stage solves the linear part exactly, Q's quadratic included (h^k phi_k weights); N, the
    // drain law's departure from its tangent, vanishes with its slope at V0, so it enters the
    // second stage as 2 h phi_3 N(U). The second stage's size is the first's error estimate.
    // Where V0 and the stage both lie below the join, N is nil: the stage is exact.
    const double drain = plant.column_nozzle_flow_m3_per_s(v);
    const double lambda = v < join_m3 ? linear_rate_per_s : drain / (2.0 * v);
    const auto [p1, p2, p3] = phi_functions<3>(-lambda * h);
    const double stage =
        std::max(0.0, v + h * p1 * (q - drain) + h * h * p2 * dq + 2.0 * h * h * h * p3 * c);
    const double correction =
        v < join_m3 && stage < join_m3
            ? 0.0
            : 2.0 * h * p3 *
                  (drain + lambda * (stage - v) - plant.column_nozzle_flow_m3_per_s(stage));
    const double error = std::abs(correction);
    const double tolerance = rtol * (scale_m3 + v);
    const double factor = error * kCappedRatio <= tolerance
                              ? kMaxGrowth
                              : std::max(0.2, kSafety * std::cbrt(tolerance / error));
    if (error <= tolerance || h <= kMinSubstep_s) {
      t += h;
      v = std::max(0.0, stage + correction);
      out.substep_s = h * factor;
    }
    h *= factor;
  }
  const double arrived_m3 = std::max(0.0, inflow.mean_m3_per_s) * dt_s;
  out.volume_m3 = std::min(v, std::max(0.0, volume_m3) + arrived_m3);
  return out;
}

}  // namespace gutterwatt
