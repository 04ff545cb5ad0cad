#include "gutterwatt/float_valve.hpp"

#include "gutterwatt/hydraulics.hpp"

namespace gutterwatt {

FloatValve::FloatValve(const ReleaseConfig& config)
    : open_level_m_(config.trigger_level_m),
      close_level_m_(config.break_level_m),
      orifice_area_m2_(circle_area_m2(config.orifice_diameter_m)),
      orifice_coefficient_(config.orifice_coefficient) {}

ReleaseState FloatValve::initial_state(double level_m) const {
  return level_m >= open_level_m_ ? ReleaseState::open : ReleaseState::closed;
}

double FloatValve::outflow_m3_per_s(ReleaseState state, double level_m,
                                    double full_flow_m3_per_s) const {
  if (state != ReleaseState::open) return 0.0;
  return floor_orifice_flow_m3_per_s(orifice_coefficient_, orifice_area_m2_, level_m,
                                     full_flow_m3_per_s);
}

int FloatValve::guards(ReleaseState state, double level_m, Guard* out) const {
  if (state == ReleaseState::open) {
    out[0] = {level_m - close_level_m_, ReleaseState::closed};
  } else {
    out[0] = {open_level_m_ - level_m, ReleaseState::open};
  }
  return 1;
}

double FloatValve::rest_ceiling_m(ReleaseState state) const {
  return state == ReleaseState::closed ? open_level_m_ : -1.0;
}

}  // namespace gutterwatt
