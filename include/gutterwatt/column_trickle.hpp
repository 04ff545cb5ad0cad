#pragma once
/// The head column's water while it passes a trickle on (ColumnMode::trickle). The nozzle then
/// passes what arrives at the head that flow needs, so no rate reads the column's water and the
/// solver does not step it: it is advanced beside the solver, one solver step at a time, by its
/// own law. It fills with what arrives and drains through the nozzle, dV/dt = Q(t) - Qn(V), so
/// that the column holds what it would when the inflow grows and the column fills again: held
/// still instead, the water left at a cycle's end was carried into the next cycle at full head.

#include "gutterwatt/plant.hpp"

namespace gutterwatt {

/// What reaches the column over a step of `dt`: the flow at its start and end and the mean (the
/// volume over dt), m3/s; taken as the quadratic in time through the ends with that mean.
struct StepInflow {
  double start_m3_per_s = 0.0;
  double end_m3_per_s = 0.0;
  double mean_m3_per_s = 0.0;
};

/// The column's water after a step, and the substep to try first in the next.
struct TrickleWater {
  double volume_m3 = 0.0;
  double substep_s = 0.0;
};

/// The column's water after `dt_s` from `volume_m3`, dV/dt = Q(t) - Qn(V) with Qn the nozzle's
/// law (Plant::column_nozzle_flow_m3_per_s) and Q the quadratic of `inflow`. Substeps of an
/// exponential Rosenbrock method, exact where the drain is linear, each one's error estimate held
/// within `rtol` times (`scale_m3` plus the water); the first substep tried is
/// `first_substep_s` (or the step). Never more than the water held plus what arrived, never
/// below zero.
TrickleWater trickle_water_after(const Plant& plant, double volume_m3, const StepInflow& inflow,
                                 double dt_s, double rtol, double scale_m3, double first_substep_s);

}  // namespace gutterwatt
