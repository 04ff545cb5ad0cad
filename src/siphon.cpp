#include "gutterwatt/siphon.hpp"

#include <algorithm>
#include <cmath>

#include "gutterwatt/hydraulics.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt {

// The open top of a standpipe takes water as a weir over its lip while the head is small and as
// an orifice of its bore once the mouth is drowned; whichever passes less controls. This is the
// crest-control / orifice-control pair of a drop inlet or morning-glory spillway, USBR (1987),
// Design of Small Dams, 3rd ed., ch. 9 (from memory). The weir is the sharp-crested form of
// ISO 1438 (REFERENCES.md section 6) over the lip circumference pi d, C_w = C_e (2/3) sqrt(2 g)
// = 1.77 m^0.5/s for C_e = 0.6; the orifice is Torricelli's with the sharp-edged C_d = 0.61
// (REFERENCES.md section 5). A thin pipe wall projecting into the pool is nearer a re-entrant
// (Borda) mouth, C_d 0.52: release.mouth_coefficient lets a builder say so.
double standpipe_inflow_m3_per_s(double weir_coefficient_m05_per_s, double mouth_coefficient,
                                 double diameter_m, double head_m) {
  return std::min(weir_flow_m3_per_s(weir_coefficient_m05_per_s, kPi * diameter_m, head_m),
                  orifice_flow_m3_per_s(mouth_coefficient, circle_area_m2(diameter_m), head_m));
}

double standpipe_transition_head_m(double weir_coefficient_m05_per_s, double mouth_coefficient,
                                   double diameter_m) {
  // C_w pi d h^1.5 = C_d (pi d^2 / 4) sqrt(2 g h)  <=>  h = C_d d sqrt(2 g) / (4 C_w).
  return mouth_coefficient * diameter_m * std::sqrt(2.0 * kGravity_m_per_s2) /
         (4.0 * weir_coefficient_m05_per_s);
}

double standpipe_head_for_flow_m(double weir_coefficient_m05_per_s, double mouth_coefficient,
                                 double diameter_m, double flow_m3_per_s) {
  // The inverse of a minimum of two increasing laws is the maximum of their inverses.
  const Nozzle mouth{diameter_m, mouth_coefficient, 1.0};
  const double weir_head =
      weir_head_for_flow_m(weir_coefficient_m05_per_s, kPi * diameter_m, flow_m3_per_s);
  return flow_m3_per_s > 0.0 ? std::max(weir_head, nozzle_head_for_flow_m(mouth, flow_m3_per_s))
                             : 0.0;
}

BellSiphon::BellSiphon(const ReleaseConfig& config)
    : lip_m_(config.trigger_level_m),
      rim_m_(config.break_level_m),
      lip_coefficient_(config.lip_coefficient),
      mouth_coefficient_(config.mouth_coefficient),
      standpipe_diameter_m_(config.standpipe_diameter_m),
      priming_flow_m3_per_s_(config.priming_flow_m3_per_s) {}

double BellSiphon::lip_flow_m3_per_s(double level_m) const {
  return standpipe_inflow_m3_per_s(lip_coefficient_, mouth_coefficient_, standpipe_diameter_m_,
                                   level_m - lip_m_);
}

double BellSiphon::priming_level_m() const {
  return lip_m_ + standpipe_head_for_flow_m(lip_coefficient_, mouth_coefficient_,
                                            standpipe_diameter_m_, priming_flow_m3_per_s_);
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
