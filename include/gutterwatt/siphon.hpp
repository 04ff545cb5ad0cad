#pragma once
/// The automatic bell siphon: idle below the standpipe lip, dribbling over the lip, running full
/// once the dribble reaches the priming flow, breaking back to idle when the level falls to the
/// bell rim. Below the priming flow it never primes: the level settles where dribble equals inflow.

#include "gutterwatt/release.hpp"

namespace gutterwatt {

class BellSiphon final : public Release {
 public:
  explicit BellSiphon(const ReleaseConfig& config);

  ReleaseState initial_state(double level_m) const override;
  double outflow_m3_per_s(ReleaseState state, double level_m,
                          double full_flow_m3_per_s) const override;
  int guards(ReleaseState state, double level_m, Guard* out) const override;
  bool is_running(ReleaseState state) const override { return state == ReleaseState::running; }
  double rest_ceiling_m(ReleaseState state) const override;

  /// Weir flow over the standpipe lip (circumference pi d) at `level_m`; 0 at or below the lip.
  double lip_flow_m3_per_s(double level_m) const;
  /// The level at which the lip flow equals the priming flow.
  double priming_level_m() const;

 private:
  double lip_m_;
  double rim_m_;
  double lip_length_m_;
  double lip_coefficient_;
  double priming_flow_m3_per_s_;
};

}  // namespace gutterwatt
