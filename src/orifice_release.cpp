#include "gutterwatt/orifice_release.hpp"

#include "gutterwatt/hydraulics.hpp"

namespace gutterwatt {

OrificeRelease::OrificeRelease(const ReleaseConfig& config)
    : orifice_area_m2_(circle_area_m2(config.orifice_diameter_m)),
      orifice_coefficient_(config.orifice_coefficient) {}

ReleaseState OrificeRelease::initial_state(double level_m) const {
  return level_m > kHoldHead_m ? ReleaseState::open : ReleaseState::idle;
}

double OrificeRelease::outflow_m3_per_s(ReleaseState state, double level_m,
                                        double full_flow_m3_per_s) const {
  if (state != ReleaseState::open) return 0.0;
  return floor_orifice_flow_m3_per_s(orifice_coefficient_, orifice_area_m2_, level_m,
                                     full_flow_m3_per_s);
}

int OrificeRelease::guards(ReleaseState state, double level_m, Guard* out) const {
  if (state == ReleaseState::open) {
    out[0] = {level_m - 0.5 * kHoldHead_m, ReleaseState::idle};
  } else {
    out[0] = {kHoldHead_m - level_m, ReleaseState::open};
  }
  return 1;
}

double OrificeRelease::rest_ceiling_m(ReleaseState state) const {
  return state == ReleaseState::idle ? kHoldHead_m : -1.0;
}

}  // namespace gutterwatt
