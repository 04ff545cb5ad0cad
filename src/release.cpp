#include "gutterwatt/release.hpp"

#include <algorithm>

#include "gutterwatt/float_valve.hpp"
#include "gutterwatt/hydraulics.hpp"
#include "gutterwatt/orifice_release.hpp"
#include "gutterwatt/siphon.hpp"

namespace gutterwatt {

std::string_view release_state_name(ReleaseState state) {
  switch (state) {
    case ReleaseState::idle:
      return "idle";
    case ReleaseState::dribble:
      return "dribble";
    case ReleaseState::running:
      return "running";
    case ReleaseState::closed:
      return "closed";
    case ReleaseState::open:
      return "open";
  }
  return "idle";
}

double floor_orifice_flow_m3_per_s(double coefficient, double area_m2, double level_m,
                                   double full_flow_m3_per_s) {
  return std::min(orifice_flow_m3_per_s(coefficient, area_m2, level_m), full_flow_m3_per_s);
}

double running_outflow_m3_per_s(const Release& release, double level_m, double full_flow_m3_per_s) {
  const ReleaseState running =
      release.is_running(ReleaseState::running) ? ReleaseState::running : ReleaseState::open;
  return release.outflow_m3_per_s(running, level_m, full_flow_m3_per_s);
}

std::unique_ptr<Release> make_release(const ReleaseConfig& config) {
  switch (config.kind) {
    case ReleaseKind::bell:
      return std::make_unique<BellSiphon>(config);
    case ReleaseKind::float_valve:
      return std::make_unique<FloatValve>(config);
    case ReleaseKind::orifice:
      return std::make_unique<OrificeRelease>(config);
    case ReleaseKind::none:
      return std::make_unique<NoRelease>();
  }
  return std::make_unique<NoRelease>();
}

}  // namespace gutterwatt
