#pragma once
/// A float-operated valve at the reservoir floor: opens when the level rises to the opening level,
/// closes when it falls to the closing level; orifice flow through the open valve, limited by what
/// the conveyance carries.

#include "gutterwatt/release.hpp"

namespace gutterwatt {

class FloatValve final : public Release {
 public:
  explicit FloatValve(const ReleaseConfig& config);

  ReleaseState initial_state(double level_m) const override;
  double outflow_m3_per_s(ReleaseState state, double level_m,
                          double full_flow_m3_per_s) const override;
  int guards(ReleaseState state, double level_m, Guard* out) const override;
  bool is_running(ReleaseState state) const override { return state == ReleaseState::open; }
  double rest_ceiling_m(ReleaseState state) const override;

 private:
  double open_level_m_;
  double close_level_m_;
  double orifice_area_m2_;
  double orifice_coefficient_;
};

}  // namespace gutterwatt
