#include "gutterwatt/battery.hpp"

#include <algorithm>

namespace gutterwatt {

BatteryFlows battery_flows(BatteryMode mode, double input_W, double load_W,
                           const BatteryConfig& config) {
  // Energy bookkeeping of a charge controller without Peukert effects (see REFERENCES.md §10):
  // dE/dt = eta_c P_accepted - P_discharge.
  BatteryFlows f;
  const double surplus_W = input_W - load_W;
  if (surplus_W >= 0.0) {
    f.served_W = load_W;
    f.accepted_W = mode == BatteryMode::full ? 0.0 : std::min(surplus_W, config.max_charge_W);
    f.curtailed_W = surplus_W - f.accepted_W;
    f.charge_W = config.charge_efficiency * f.accepted_W;
  } else if (mode == BatteryMode::empty) {
    f.served_W = input_W;
    f.unmet_W = -surplus_W;
  } else {
    f.served_W = load_W;
    f.charge_W = surplus_W;
  }
  return f;
}

BatteryMode battery_mode(double energy_J, double input_W, double load_W,
                         const BatteryConfig& config) {
  const double surplus_W = input_W - load_W;
  if (energy_J >= config.capacity_J && surplus_W >= 0.0) return BatteryMode::full;
  if (energy_J <= 0.0 && surplus_W < 0.0) return BatteryMode::empty;
  return BatteryMode::normal;
}

double battery_load_W(const BatteryConfig& config, int local_hour) {
  if (config.load_profile_W.size() == 24) {
    return config.load_profile_W[static_cast<std::size_t>(std::clamp(local_hour, 0, 23))];
  }
  return config.load_W;
}

}  // namespace gutterwatt
