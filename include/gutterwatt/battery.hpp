#pragma once
/// The battery behind the charger: energy store with a charge-power limit, charge and discharge
/// efficiencies, self-discharge and a minimum state of charge, serving a load. Energy it cannot
/// take is curtailed. At its minimum the charge controller disconnects the load (counted as
/// unmet) and the generator's whole output recharges the battery; the load reconnects only at a
/// higher state of charge (low-voltage disconnect and reconnect).

#include <optional>
#include <string_view>
#include <vector>

namespace gutterwatt {

/// `battery.chemistry`: a preset of efficiencies, self-discharge and minimum state of charge.
enum class BatteryChemistry { lead_acid, lifepo4 };

struct BatteryConfig {
  double capacity_J = 0.0;
  double initial_soc = 0.5;
  /// Without a chemistry: eta_c = eta_d = 0.9 (round trip 0.81), the worked values of the
  /// Peukert-free model in REFERENCES.md section 10; no self-discharge, no minimum.
  double charge_efficiency = 0.9;
  double discharge_efficiency = 0.9;
  double self_discharge_per_month = 0.0;  ///< share of the stored energy lost in a mean month
  double min_soc = 0.0;                   ///< at this the load is cut
  /// The state of charge at which a cut load reconnects (above min_soc); none: see reconnect_soc.
  std::optional<double> reconnect_soc;
  double max_charge_W = 1e9;
  double load_W = 0.0;
  double voltage_V = 0.0;  ///< nominal terminal voltage; 0: not given
  /// Optional 24 hourly loads (local time), replacing load_W when given.
  std::vector<double> load_profile_W;
  std::optional<BatteryChemistry> chemistry;
};

/// `lead_acid` or `lifepo4`.
std::string_view battery_chemistry_name(BatteryChemistry chemistry);

/// Sets the chemistry and its preset charge and discharge efficiencies, self-discharge, minimum
/// state of charge and reconnect state of charge (sources in battery.cpp); other fields are kept.
void apply_chemistry(BatteryChemistry chemistry, BatteryConfig& config);

/// How far above the minimum a cut load reconnects when neither `battery.reconnect_soc` nor a
/// chemistry sets it: a tenth of the capacity (common practice, no source).
inline constexpr double kReconnectMargin = 0.1;

/// The state of charge at which a cut load reconnects: the one given or preset, else min_soc +
/// kReconnectMargin, at most 1.
double reconnect_soc(const BatteryConfig& config);

/// A mean month, 365.25 / 12 days, in seconds: the period of `self_discharge_per_month`.
inline constexpr double kSecondsPerMeanMonth = 365.25 / 12.0 * 86400.0;

/// The self-discharge rate constant k (1/s) of dE/dt = -k E that loses the share
/// `self_discharge_per_month` of the stored energy in a mean month at rest.
double self_discharge_rate_per_s(const BatteryConfig& config);

/// `empty`: the load is cut (disconnected at the minimum) until the charge reaches reconnect_soc.
enum class BatteryMode { normal, full, empty };

/// Power flows at one instant, W. `charge_W` is the rate the stored energy changes:
/// eta_c accepted - drawn / eta_d - self-discharge.
struct BatteryFlows {
  double charge_W = 0.0;
  double accepted_W = 0.0;  ///< taken at the terminals, before the charge efficiency
  double curtailed_W = 0.0;
  double served_W = 0.0;  ///< load served, by the generator and the battery
  double unmet_W = 0.0;
  double drawn_W = 0.0;           ///< delivered by the battery to the load, at its terminals
  double self_discharge_W = 0.0;  ///< lost from the store by self-discharge
};

/// Flows for generator output `input_W` and load `load_W` in `mode` with `energy_J` stored. The
/// load is served first from the generator, then from the battery; the surplus charges the
/// battery up to `max_charge_W` (at the terminals) and the rest is curtailed. A full battery
/// takes only what holds it full against self-discharge. With the load cut (`empty`) none of it
/// is served and the whole input charges the battery, up to `max_charge_W`. `self_discharge_per_s`
/// is self_discharge_rate_per_s(config), which a caller on the solver's hot path works out once.
BatteryFlows battery_flows(BatteryMode mode, double input_W, double load_W, double energy_J,
                           const BatteryConfig& config, double self_discharge_per_s);

/// The mode a battery holding `energy_J` is in when offered `input_W` against `load_W`, after
/// `before`: full at capacity when the charge it can take offsets its self-discharge; cut
/// (`empty`) at or below its minimum while the load exceeds the input, and after a cut until the
/// charge reaches reconnect_soc; else normal.
BatteryMode battery_mode(double energy_J, double input_W, double load_W,
                         const BatteryConfig& config, BatteryMode before = BatteryMode::normal);

/// What a span of `span_s` without generation made of a battery serving a constant load, in
/// closed form: dE/dt = -k E - P/eta_d down to the minimum, then -k E with the load cut. A
/// battery whose load is already cut (`cut`) stays cut: without input it cannot reach its
/// reconnect charge.
struct BatteryRest {
  double energy_J = 0.0;  ///< at the end
  double drawn_J = 0.0;   ///< delivered to the load
  double unmet_J = 0.0;
  double self_discharge_J = 0.0;
  double below_half_s = 0.0;  ///< time with less than half the capacity stored
  double empty_s = 0.0;       ///< time at the minimum with the load cut
};
BatteryRest battery_at_rest(double energy_J, double load_W, double span_s,
                            const BatteryConfig& config, bool cut = false);

/// Time within a step of `dt_s` from `e0_J` to `e1_J` with less than half the capacity stored,
/// the energy taken as linear in time within the step.
double below_half_s(double e0_J, double e1_J, double dt_s, const BatteryConfig& config);

/// The load at `local_hour` (0..23): the hourly profile when there is one, else load_W.
double battery_load_W(const BatteryConfig& config, int local_hour);

}  // namespace gutterwatt
