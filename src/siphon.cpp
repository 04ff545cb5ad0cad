#include "gutterwatt/siphon.hpp"

#include <algorithm>

#include "gutterwatt/hydraulics.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt {

BellSiphon::BellSiphon(const ReleaseConfig& config)
    : lip_m_(config.trigger_level_m),
      rim_m_(config.break_level_m),
      lip_length_m_(kPi * config.standpipe_diameter_m),
      lip_coefficient_(config.lip_coefficient),
      priming_flow_m3_per_s_(config.priming_flow_m3_per_s) {}

double BellSiphon::lip_flow_m3_per_s(double level_m) const {
  // The standpipe lip is a circular sharp-crested weir of length pi d, Q = C pi d h^1.5
  // (Rehbock form; C ~ 0.6 (2/3) sqrt(2 g) = 1.77 m^0.5/s, Bos 1989).
  return weir_flow_m3_per_s(lip_coefficient_, lip_length_m_, level_m - lip_m_);
}

double BellSiphon::priming_level_m() const {
  return lip_m_ + weir_head_for_flow_m(lip_coefficient_, lip_length_m_, priming_flow_m3_per_s_);
}

ReleaseState BellSiphon::initial_state(double level_m) const {
  return level_m > lip_m_ + kHoldHead_m ? ReleaseState::dribble : ReleaseState::idle;
}

double BellSiphon::outflow_m3_per_s(ReleaseState state, double level_m,
                                    double full_flow_m3_per_s) const {
  switch (state) {
    case ReleaseState::dribble:
      return std::min(lip_flow_m3_per_s(level_m), full_flow_m3_per_s);
    case ReleaseState::running:
      return full_flow_m3_per_s;
    default:
      return 0.0;
  }
}

int BellSiphon::guards(ReleaseState state, double level_m, Guard* out) const {
  switch (state) {
    case ReleaseState::idle:
      out[0] = {lip_m_ + kHoldHead_m - level_m, ReleaseState::dribble};
      return 1;
    case ReleaseState::dribble:
      // Seals once the dribble reaches the priming flow; stops when the head over the lip falls
      // to half the hold head (the hysteresis keeps the two switches apart).
      out[0] = {priming_flow_m3_per_s_ - lip_flow_m3_per_s(level_m), ReleaseState::running};
      out[1] = {level_m - lip_m_ - 0.5 * kHoldHead_m, ReleaseState::idle};
      return 2;
    case ReleaseState::running:
      out[0] = {level_m - rim_m_, ReleaseState::idle};
      return 1;
    default:
      return 0;
  }
}

double BellSiphon::rest_ceiling_m(ReleaseState state) const {
  return state == ReleaseState::idle ? lip_m_ + kHoldHead_m : -1.0;
}

}  // namespace gutterwatt
