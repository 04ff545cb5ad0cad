#pragma once
/// The battery behind the charger: energy store with a charge-power limit and charge efficiency,
/// serving a load. Energy it cannot take is curtailed; load it cannot serve is unmet.

#include <vector>

namespace gutterwatt {

struct BatteryConfig {
  double capacity_J = 0.0;
  double initial_soc = 0.5;
  double charge_efficiency = 0.9;
  double max_charge_W = 1e9;
  double load_W = 0.0;
  double voltage_V = 0.0;  ///< nominal terminal voltage; 0: not given
  /// Optional 24 hourly loads (local time), replacing load_W when given.
  std::vector<double> load_profile_W;
};

enum class BatteryMode { normal, full, empty };

/// Power flows at one instant, W. `charge_W` is the rate the stored energy changes
/// (negative while discharging); accepted = stored / efficiency (stored plus the charge loss).
struct BatteryFlows {
  double charge_W = 0.0;
  double accepted_W = 0.0;
  double curtailed_W = 0.0;
  double served_W = 0.0;
  double unmet_W = 0.0;
};

/// Flows for generator output `input_W` and load `load_W` in `mode`. The load is served first
/// from the generator, then from the battery; the surplus charges the battery up to
/// `max_charge_W` (at the battery terminals, before the charge efficiency) and the rest is
/// curtailed. A full battery takes nothing; an empty one gives nothing.
BatteryFlows battery_flows(BatteryMode mode, double input_W, double load_W,
                           const BatteryConfig& config);

/// The mode a battery holding `energy_J` is in when offered `input_W` against `load_W`.
BatteryMode battery_mode(double energy_J, double input_W, double load_W,
                         const BatteryConfig& config);

/// The load at `local_hour` (0..23): the hourly profile when there is one, else load_W.
double battery_load_W(const BatteryConfig& config, int local_hour);

}  // namespace gutterwatt
