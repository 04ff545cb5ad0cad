#pragma once
/// An always-open orifice in the reservoir floor: no set-points, orifice flow limited by what the
/// conveyance carries. It idles only when the reservoir is empty (level below the hold head).

#include "gutterwatt/release.hpp"

namespace gutterwatt {

class OrificeRelease final : public Release {
 public:
  explicit OrificeRelease(const ReleaseConfig& config);

  ReleaseState initial_state(double level_m) const override;
  double outflow_m3_per_s(ReleaseState state, double level_m,
                          double full_flow_m3_per_s) const override;
  int guards(ReleaseState state, double level_m, Guard* out) const override;
  bool is_running(ReleaseState state) const override { return state == ReleaseState::open; }
  double rest_ceiling_m(ReleaseState state) const override;

 private:
  double orifice_area_m2_;
  double orifice_coefficient_;
};

/// No release at all: the reservoir only overflows. Its one state is `closed`.
class NoRelease final : public Release {
 public:
  ReleaseState initial_state(double) const override { return ReleaseState::closed; }
  double outflow_m3_per_s(ReleaseState, double, double) const override { return 0.0; }
  int guards(ReleaseState, double, Guard*) const override { return 0; }
  bool is_running(ReleaseState) const override { return false; }
  double rest_ceiling_m(ReleaseState) const override { return 1e300; }
};

}  // namespace gutterwatt
