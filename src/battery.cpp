#include "gutterwatt/battery.hpp"

#include <algorithm>
#include <cmath>

namespace gutterwatt {

std::string_view battery_chemistry_name(BatteryChemistry chemistry) {
  return chemistry == BatteryChemistry::lead_acid ? "lead_acid" : "lifepo4";
}

void apply_chemistry(BatteryChemistry chemistry, BatteryConfig& config) {
  struct Preset {
    double efficiency;  // charge and discharge alike
    double self_discharge_per_month;
    double min_soc;
    double reconnect_soc;
  };
  // Lead-acid: round trip 0.9 x 0.9 = 0.81, inside the 0.70-0.85 of REFERENCES.md section 10
  // (M, vendor data); self-discharge 3 %/month, the middle of its 2-5 % (M); kept above half
  // charge (50 % depth of discharge) for its cycle life: common practice, no source.
  // LiFePO4: round trip 0.97 x 0.97 = 0.9409, inside the 0.92-0.97 of REFERENCES.md section 10
  // (M); self-discharge 2 %/month, the middle of its 1-3 % (M); cut at 10 % (90 % depth of
  // discharge): common practice, no source.
  // Reconnect: a charge controller's low-voltage disconnect reconnects the load at a higher
  // voltage, so that the load does not toggle at the cut (common practice, no source; one
  // controller's defaults, LVD 11.5 V and LVR 12.6 V on a 12 V lead-acid battery, from its
  // manual). Taken here as 20 points of charge above the cut for both: common practice, no
  // source.
  const Preset p = chemistry == BatteryChemistry::lead_acid ? Preset{0.9, 0.03, 0.5, 0.7}
                                                            : Preset{0.97, 0.02, 0.1, 0.3};
  config.chemistry = chemistry;
  config.charge_efficiency = p.efficiency;
  config.discharge_efficiency = p.efficiency;
  config.self_discharge_per_month = p.self_discharge_per_month;
  config.min_soc = p.min_soc;
  config.reconnect_soc = p.reconnect_soc;
}

double reconnect_soc(const BatteryConfig& config) {
  return config.reconnect_soc ? *config.reconnect_soc
                              : std::min(1.0, config.min_soc + kReconnectMargin);
}

double self_discharge_rate_per_s(const BatteryConfig& config) {
  // E(t) = E0 exp(-k t) loses the share s in a month: k = -ln(1 - s) / month (the continuous
  // form of E <- E (1 - sigma dt), REFERENCES.md section 10).
  return -std::log1p(-config.self_discharge_per_month) / kSecondsPerMeanMonth;
}

BatteryFlows battery_flows(BatteryMode mode, double input_W, double load_W, double energy_J,
                           const BatteryConfig& config, double self_discharge_per_s) {
  // Energy bookkeeping of a charge controller without Peukert effects (REFERENCES.md section
  // 10): dE/dt = eta_c P_accepted - P_drawn / eta_d - k E.
  BatteryFlows f;
  f.self_discharge_W = self_discharge_per_s * std::max(0.0, energy_J);
  const double surplus_W = input_W - load_W;
  if (mode == BatteryMode::empty) {
    // The load is disconnected: the whole input goes to recharging (a low-voltage disconnect
    // cuts the load terminals, not the charging; common practice, no source).
    f.unmet_W = load_W;
    f.accepted_W = std::min(input_W, config.max_charge_W);
    f.curtailed_W = input_W - f.accepted_W;
    f.charge_W = config.charge_efficiency * f.accepted_W - f.self_discharge_W;
  } else if (surplus_W >= 0.0) {
    f.served_W = load_W;
    f.accepted_W = std::min(surplus_W, config.max_charge_W);
    // Full: the charger holds the charge, taking only what the self-discharge loses.
    if (mode == BatteryMode::full) {
      f.accepted_W = std::min(f.accepted_W, f.self_discharge_W / config.charge_efficiency);
    }
    f.curtailed_W = surplus_W - f.accepted_W;
    f.charge_W = config.charge_efficiency * f.accepted_W - f.self_discharge_W;
  } else {
    f.served_W = load_W;
    f.drawn_W = -surplus_W;
    f.charge_W = -f.drawn_W / config.discharge_efficiency - f.self_discharge_W;
  }
  return f;
}

BatteryMode battery_mode(double energy_J, double input_W, double load_W,
                         const BatteryConfig& config, BatteryMode before) {
  const double surplus_W = input_W - load_W;
  const double holding_W = self_discharge_rate_per_s(config) * energy_J;
  if (energy_J >= config.capacity_J && surplus_W >= 0.0 &&
      config.charge_efficiency * std::min(surplus_W, config.max_charge_W) >= holding_W) {
    return BatteryMode::full;
  }
  if (energy_J <= config.min_soc * config.capacity_J && surplus_W < 0.0) return BatteryMode::empty;
  if (before == BatteryMode::empty && energy_J < reconnect_soc(config) * config.capacity_J) {
    return BatteryMode::empty;
  }
  return BatteryMode::normal;
}

namespace {

// Time for dE/dt = -k E - p (k >= 0, p >= 0) to take E from `from_J` down to `to_J` (<= from):
// ln((from + p/k) / (to + p/k)) / k, or (from - to) / p without self-discharge; infinite when
// the level is never reached.
double time_to_fall_s(double from_J, double to_J, double k, double p) {
  if (to_J >= from_J) return 0.0;
  if (k > 0.0) {
    const double c = p / k;
    if (to_J + c <= 0.0) return INFINITY;
    return std::log((from_J + c) / (to_J + c)) / k;
  }
  return p > 0.0 ? (from_J - to_J) / p : INFINITY;
}

// E(t) of the same equation from `from_J`.
double energy_after(double from_J, double t, double k, double p) {
  if (k > 0.0) {
    const double c = p / k;
    return (from_J + c) * std::exp(-k * t) - c;
  }
  return from_J - p * t;
}

}  // namespace

BatteryRest battery_at_rest(double energy_J, double load_W, double span_s,
                            const BatteryConfig& config, bool cut) {
  const double k = self_discharge_rate_per_s(config);
  const double e_min = config.min_soc * config.capacity_J;
  const double half = 0.5 * config.capacity_J;
  const double p = load_W / config.discharge_efficiency;  // the store's loss serving the load
  BatteryRest r;
  // Serving the load down to the minimum (none of it when the battery starts there).
  double serve_s = span_s;
  double e1 = energy_after(energy_J, span_s, k, p);
  if (load_W > 0.0) {
    const double reach_s = energy_J > e_min && !cut ? time_to_fall_s(energy_J, e_min, k, p) : 0.0;
    if (reach_s < span_s) {
      serve_s = reach_s;
      e1 = reach_s > 0.0 ? e_min : energy_J;
    }
  }
  r.drawn_J = load_W * serve_s;
  // Then at the minimum with the load cut, self-discharging.
  r.empty_s = span_s - serve_s;
  r.unmet_J = load_W * r.empty_s;
  r.energy_J = energy_after(e1, r.empty_s, k, 0.0);
  r.self_discharge_J = energy_J - r.energy_J - r.drawn_J / config.discharge_efficiency;
  // E falls monotonically: the time below half is the span after it reaches half.
  if (energy_J < half) {
    r.below_half_s = span_s;
  } else if (r.energy_J < half) {
    const double reach_s = e1 <= half ? time_to_fall_s(energy_J, half, k, p)
                                      : serve_s + time_to_fall_s(e1, half, k, 0.0);
    r.below_half_s = std::max(0.0, span_s - reach_s);
  }
  return r;
}

double below_half_s(double e0_J, double e1_J, double dt_s, const BatteryConfig& config) {
  const double half = 0.5 * config.capacity_J;
  const bool below0 = e0_J < half;
  const bool below1 = e1_J < half;
  if (below0 == below1) return below0 ? dt_s : 0.0;
  const double crossing_s = dt_s * (half - e0_J) / (e1_J - e0_J);
  return below0 ? crossing_s : dt_s - crossing_s;
}

double battery_load_W(const BatteryConfig& config, int local_hour) {
  if (config.load_profile_W.size() == 24) {
    return config.load_profile_W[static_cast<std::size_t>(std::clamp(local_hour, 0, 23))];
  }
  return config.load_W;
}

}  // namespace gutterwatt
