#pragma once
/// The automatic bell siphon: idle below the standpipe lip, dribbling over the lip, running full
/// once the dribble reaches the priming flow, breaking back to idle when the level falls to the
/// bell rim. Below the priming flow it never primes: the level settles where dribble equals inflow.

#include "gutterwatt/release.hpp"

namespace gutterwatt {

/// Flow into an open vertical standpipe of diameter `diameter_m` with the water `head_m` above
/// its lip: a circular weir, Q = C_w pi d h^1.5, at small heads; an orifice of the pipe's bore,
/// Q = C_d (pi d^2 / 4) sqrt(2 g h), once the mouth drowns. The smaller of the two controls, so
/// the law is continuous where they meet (standpipe_transition_head_m). 0 for h <= 0.
double standpipe_inflow_m3_per_s(double weir_coefficient_m05_per_s, double mouth_coefficient,
                                 double diameter_m, double head_m);

/// Head over the lip at which the weir and orifice laws give the same flow:
/// h_t = C_d d sqrt(2 g) / (4 C_w).
double standpipe_transition_head_m(double weir_coefficient_m05_per_s, double mouth_coefficient,
                                   double diameter_m);

/// Head over the lip at which the standpipe takes `flow_m3_per_s`: the inverse of
/// standpipe_inflow_m3_per_s (the larger of the weir and orifice heads). 0 for flow <= 0.
double standpipe_head_for_flow_m(double weir_coefficient_m05_per_s, double mouth_coefficient,
                                 double diameter_m, double flow_m3_per_s);

class BellSiphon final : public Release {
 public:
  explicit BellSiphon(const ReleaseConfig& config);

  ReleaseState initial_state(double level_m) const override;
  double outflow_m3_per_s(ReleaseState state, double level_m,
                          double full_flow_m3_per_s) const override;
  int guards(ReleaseState state, double level_m, Guard* out) const override;
  bool is_running(ReleaseState state) const override { return state == ReleaseState::running; }
  double rest_ceiling_m(ReleaseState state) const override;

  /// Flow into the standpipe at `level_m` (see standpipe_inflow_m3_per_s); 0 at or below the lip.
  double lip_flow_m3_per_s(double level_m) const;
  /// The level at which the lip flow equals the priming flow.
  double priming_level_m() const;

 private:
  double lip_m_;
  double rim_m_;
  double lip_coefficient_;
  double mouth_coefficient_;
  double standpipe_diameter_m_;
  double priming_flow_m3_per_s_;
};

}  // namespace gutterwatt
