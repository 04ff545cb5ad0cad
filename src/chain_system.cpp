#include "gutterwatt/chain_system.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <sstream>
#include <stdexcept>

#include "detail.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt {

namespace {

// The trickle limit of `plant`'s column: trickle_head_m, or `asked_m` where that is > 0.
double trickle_limit_for(const Plant& plant, double asked_m) {
  const double natural_m = trickle_head_m(plant);
  if (asked_m <= 0.0) return natural_m;
  if (asked_m > natural_m) {
    throw std::invalid_argument("trickle limit " + std::to_string(asked_m) +
                                " m is above this column's " + std::to_string(natural_m) + " m");
  }
  return asked_m;
}

}  // namespace

ChainSystem::ChainSystem(const Scenario& scenario, double trickle_limit_m)
    : sc_(scenario),
      geometry_(scenario.reservoir),
      delivery_(gutter_delivery(scenario.reservoir)),
      plant_(plant_config(scenario)),
      release_(make_release(scenario.release)),
      trickle_volume_m3_(plant_.has_column()
                             ? plant_.column_area_m2() * trickle_limit_for(plant_, trickle_limit_m)
                             : 0.0),
      trickle_flow_m3_per_s_(plant_.column_nozzle_flow_m3_per_s(trickle_volume_m3_)),
      self_discharge_per_s_(self_discharge_rate_per_s(scenario.battery)),
      pipe_volume_m3_(circle_area_m2(scenario.drop_pipe.diameter_m) * scenario.drop_pipe.length_m) {
}

double trickle_head_m(const Plant& plant) {
  const auto jet_W = [&](double head_m) {
    const double volume_m3 = plant.column_area_m2() * head_m;
    return plant.power(plant.column_nozzle_flow_m3_per_s(volume_m3), head_m).jet_W;
  };
  const double cut_in = plant.cut_in_W();
  if (jet_W(kTrickleHeadMax_m) <= cut_in) return kTrickleHeadMax_m;
  if (jet_W(kTrickleHeadMin_m) >= cut_in) return kTrickleHeadMin_m;
  // The jet's power rises with the head: bisection to a micrometre.
  return detail::narrow_to_onset([&](double head_m) { return jet_W(head_m) > cut_in; },
                                 kTrickleHeadMin_m, kTrickleHeadMax_m, 1e-6)
      .first;
}

namespace {

// Evaporation from the reservoir's water surface at `level_m` under forcing `f` (none without a
// rate): the one place rates() and the spans at rest take it from.
double evaporation_at_m3_per_s(const ReservoirGeometry& geometry, double level_m,
                               const Forcing& f) {
  if (f.evaporation_m_per_s <= 0.0) return 0.0;
  return evaporation_m3_per_s(f.evaporation_m_per_s, geometry.surface_area_m2(level_m), level_m);
}

}  // namespace

double ChainSystem::evaporation_m3_per_s(double volume_m3, const Forcing& f) const {
  if (f.evaporation_m_per_s <= 0.0) return 0.0;
  return evaporation_at_m3_per_s(geometry_, geometry_.level_m(std::max(0.0, volume_m3)), f);
}

ChainRates ChainSystem::rates(const ChainState& x, const ChainMode& m, const Forcing& f) const {
  ChainRates r;
  ChainState dxdt;
  rates(x, m, f, r, dxdt);
  return r;
}

void ChainSystem::rates(const ChainState& x, const ChainMode& m, const Forcing& f, ChainRates& r,
                        ChainState& d) const {
  d.fill(0.0);
  r.column_overflow = 0.0;
  // Reservoir, release and overflow; the roof's inflow is added by the stepper (RoofSpan).
  r.level_m = geometry_.level_m(x[kReservoir]);
  // The release's own law capped at the full flow (Release::outflow_m3_per_s): the full flow,
  // a table lookup on the level, is asked for only where the cap may bite (above its floor),
  // which a dribble hardly reaches.
  r.release =
      release_->outflow_m3_per_s(m.release, r.level_m, std::numeric_limits<double>::infinity());
  if (r.release > plant_.full_flow_floor_m3_per_s()) {
    r.release =
        release_->outflow_m3_per_s(m.release, r.level_m, plant_.full_flow_m3_per_s(r.level_m));
  }
  r.outlet_level_m = r.level_m;
  if (delivery_) {
    // A level gutter delivers no more than its water-surface profile allows (gutter_flow.hpp):
    // a siphon drawing more uncovers its bell. A dribble or a closed valve draws too little to
    // lower the outlet: their switches stay on the level.
    // A siphon or a float valve running ends on the depth at the outlet for what it draws,
    // within 1 / kOutletDrawdownRamp of what the gutter delivers: it is not capped, which would
    // put a kink in the rates that a step could straddle just before the switch. An orifice,
    // always open, and a dribble take what the gutter delivers.
    const bool ends_on_outlet =
        sc_.release.kind != ReleaseKind::orifice && release_->is_running(m.release);
    if (ends_on_outlet) {
      r.outlet_level_m = delivery_->outlet_depth_m(x[kReservoir], r.level_m, r.release);
    } else {
      r.release = std::min(r.release, delivery_->max_flow_m3_per_s(x[kReservoir]));
    }
  }
  r.overflow = m.overflowing ? geometry_.overflow_m3_per_s(r.level_m) : 0.0;
  r.evaporation = evaporation_at_m3_per_s(geometry_, r.level_m, f);
  d[kReservoir] = -r.release - r.overflow - r.evaporation;
  d[kEvaporation] = r.evaporation;
  d[kReservoirOverflow] = r.overflow;
  d[kRelease] = r.release;

  // Conveyance and nozzle.
  if (plant_.has_column() && m.column == ColumnMode::trickle) {
    // The column's drain time constant at a few millimetres of head is seconds, against hours
    // for a dribble: integrating it would make the system stiff, so it passes the trickle on.
    r.nozzle = r.release;
    r.power = plant_.power_for_flow(r.nozzle);
  } else if (plant_.has_column()) {
    const double volume = m.column == ColumnMode::full ? plant_.column_capacity_m3() : x[kColumn];
    r.nozzle = plant_.column_nozzle_flow_m3_per_s(volume);
    r.power = plant_.power(r.nozzle, plant_.column_head_m(volume));
    if (m.column == ColumnMode::full) {
      r.column_overflow = std::max(0.0, r.release - r.nozzle);
    } else {
      d[kColumn] = r.release - r.nozzle;
    }
  } else {
    r.nozzle = r.release;
    r.power = plant_.power_for_flow(r.nozzle);
  }
  d[kNozzle] = r.nozzle;

  // Turbine, generator, battery.
  r.electrical_W = m.generator_on ? r.power.electrical_W : 0.0;
  r.battery = battery_flows(m.battery, r.electrical_W, f.load_W, x[kBattery], sc_.battery,
                            self_discharge_per_s_);
  d[kBattery] = r.battery.charge_W;
  d[kJet] = r.power.jet_W;
  d[kShaft] = r.power.shaft_W;
  d[kAccepted] = r.battery.accepted_W;
  d[kCurtailed] = r.battery.curtailed_W;
  d[kServed] = r.battery.served_W;
  d[kUnmet] = r.battery.unmet_W;
  d[kDrawn] = r.battery.drawn_W;
  d[kSelfDischarge] = r.battery.self_discharge_W;
}

double ChainSystem::start_shortfall_m(double volume_m3) const {
  if (!delivery_ || sc_.release.kind == ReleaseKind::orifice) {
    return -std::numeric_limits<double>::infinity();
  }
  const double filled_m3 = std::max(0.0, volume_m3 - pipe_volume_m3_);
  const double filled_level_m = geometry_.level_m(filled_m3);
  const double drawn = running_outflow_m3_per_s(*release_, filled_level_m,
                                                plant_.full_flow_m3_per_s(filled_level_m));
  const double outlet = delivery_->outlet_depth_m(filled_m3, filled_level_m, drawn);
  return sc_.release.break_level_m + kStartMargin_m - outlet;
}

void ChainSystem::guards(const ChainState& x, const ChainMode& m, const Forcing& f,
                         const ChainRates& r, Guards& g) const {
  constexpr double kInactive = 1.0;
  g.fill(kInactive);
  Guard rel[Release::kMaxGuards];
  const int n = release_->guards(m.release, r.outlet_level_m, rel);
  for (int k = 0; k < n; ++k) g[kGuardRelease0 + k] = rel[k].value;
  if (delivery_ && sc_.release.kind != ReleaseKind::orifice) {
    // A siphon or valve starts only where the gutter feeds it: it runs full only once its drop
    // pipe has filled, so the gutter must still feed it, its outlet kStartMargin_m above where
    // it would end, after giving the pipe's volume. Else it would end at once and start again
    // as soon as the (quasi-steady) profile refilled the outlet: thousands of empty burps.
    // The guard is below zero only where both are, so the shortfall is worked out only where the
    // release's own guard is not above zero (its sign, all a switch reads, is the same).
    for (int k = 0; k < n; ++k) {
      if (!release_->is_running(rel[k].next) || g[kGuardRelease0 + k] > 0.0) continue;
      g[kGuardRelease0 + k] = std::max(g[kGuardRelease0 + k], start_shortfall_m(x[kReservoir]));
    }
  }

  const double rim = geometry_.rim_m();
  g[kGuardOverflow] =
      m.overflowing ? r.level_m - rim - 0.5 * kHoldHead_m : rim + kHoldHead_m - r.level_m;
  if (plant_.has_column()) {
    const double q_lin = trickle_flow_m3_per_s_;
    switch (m.column) {
      case ColumnMode::trickle:
        g[kGuardColumn] = q_lin - r.release;
        break;
      case ColumnMode::partial: {
        g[kGuardColumn] = plant_.column_capacity_m3() - x[kColumn];
        const std::array<double, 2> terms = trickle_guard_terms(x, r);
        g[kGuardTrickle] = std::max(terms[0], terms[1]);
        break;
      }
      case ColumnMode::full:
        g[kGuardColumn] = r.release - r.nozzle;
        break;
    }
  }
  const double cut_in = sc_.generator.cut_in_W;
  g[kGuardGenerator] =
      m.generator_on ? r.power.electrical_W - cut_in : cut_in - r.power.electrical_W;
  // Normal ends at capacity while charging and at the minimum while serving the load; a battery
  // below its minimum (self-discharged there while the generator carried the load) is cut as
  // soon as the load exceeds the input. Full ends when the charge it can take no longer offsets
  // its self-discharge; a cut load reconnects at reconnect_soc.
  const BatteryConfig& bat = sc_.battery;
  const double surplus = r.electrical_W - f.load_W;
  switch (m.battery) {
    case BatteryMode::normal:
      if (r.battery.charge_W >= 0.0) {
        g[kGuardBattery] = bat.capacity_J - x[kBattery];
      } else if (surplus < 0.0) {
        g[kGuardBattery] = x[kBattery] - bat.min_soc * bat.capacity_J;
      }
      break;
    case BatteryMode::full:
      g[kGuardBattery] =
          bat.charge_efficiency * std::min(surplus, bat.max_charge_W) - r.battery.self_discharge_W;
      break;
    case BatteryMode::empty:
      g[kGuardBattery] = reconnect_soc(bat) * bat.capacity_J - x[kBattery];
      break;
  }
}

std::array<double, 2> ChainSystem::trickle_guard_terms(const ChainState& x,
                                                       const ChainRates& r) const {
  // Back to trickle once both the puddle and the inflow are small (half the threshold).
  const double q_lin = trickle_flow_m3_per_s_;
  return {(x[kColumn] - 0.5 * trickle_volume_m3_) / trickle_volume_m3_,
          (r.release - 0.5 * q_lin) / q_lin};
}

double ChainSystem::apply_switch(int k, ChainState& x, ChainMode& m, const Forcing& f,
                                 const ChainRates& r) const {
  const ChainMode before = m;
  double spilled_m3 = 0.0;
  switch (k) {
    case kGuardRelease0:
    case kGuardRelease1: {
      Guard rel[Release::kMaxGuards];
      release_->guards(m.release, r.outlet_level_m, rel);
      m.release = rel[k - kGuardRelease0].next;
      break;
    }
    case kGuardOverflow:
      m.overflowing = !m.overflowing;
      break;
    case kGuardTrickle:
      m.column = ColumnMode::trickle;
      break;
    case kGuardColumn:
      if (m.column == ColumnMode::trickle) {
        m.column = ColumnMode::partial;
      } else if (m.column == ColumnMode::partial) {
        // Brim-full: the excess over the brim leaves as column overflow, conserving water.
        const double excess = x[kColumn] - plant_.column_capacity_m3();
        spilled_m3 = excess;
        x[kColumn] = plant_.column_capacity_m3();
        m.column = ColumnMode::full;
      } else {
        m.column = ColumnMode::partial;
      }
      break;
    case kGuardGenerator:
      m.generator_on = !m.generator_on;
      break;
    case kGuardBattery:
      m.battery = battery_mode(x[kBattery], r.electrical_W, f.load_W, sc_.battery, before.battery);
      if (m.battery == before.battery) {
        m.battery = before.battery == BatteryMode::normal
                        ? (r.battery.charge_W >= 0.0 ? BatteryMode::full : BatteryMode::empty)
                        : BatteryMode::normal;
      }
      break;
    default:
      break;
  }
  return spilled_m3;
}

double ChainSystem::rest_capacity_m3(const ChainState& x, const ChainMode& m) const {
  constexpr double kNotAtRest = -1.0;
  if (m.overflowing) return kNotAtRest;
  if (plant_.has_column() && m.column != ColumnMode::trickle &&
      (m.column == ColumnMode::full || x[kColumn] > kColumnDry_m3)) {
    return kNotAtRest;
  }
  const double ceiling = release_->rest_ceiling_m(m.release);
  if (ceiling < 0.0) return kNotAtRest;
  return geometry_.volume_m3(std::min(ceiling, geometry_.rim_m() + kHoldHead_m));
}

ChainState ChainSystem::initial_state() const {
  ChainState x{};
  x[kReservoir] = geometry_.volume_m3(sc_.reservoir.initial_level_m);
  x[kBattery] = sc_.battery.initial_soc * sc_.battery.capacity_J;
  return x;
}

ChainMode ChainSystem::initial_mode(const ChainState& x) const {
  ChainMode m;
  m.release = release_->initial_state(sc_.reservoir.initial_level_m);
  m.overflowing = sc_.reservoir.initial_level_m > geometry_.rim_m() + kHoldHead_m;
  m.generator_on = sc_.generator.cut_in_W <= 0.0;
  m.battery = battery_mode(x[kBattery], 0.0, sc_.battery.load_W, sc_.battery);
  return m;
}

RoofSpan ChainSystem::roof_span(const ChainState& x, double rain_m_per_s) const {
  return RoofSpan(sc_.roof, sc_.first_flush, rain_m_per_s,
                  RoofStores{x[kDepression], x[kRoof], x[kFlush]});
}

void ChainSystem::set_roof(const RoofStores& s, ChainState& x) {
  x[kDepression] = s.loss_filled_m;
  x[kRoof] = s.roof_m3;
  x[kFlush] = s.diverted_m3;
}

std::string ChainSystem::describe(const ChainState& x, const ChainMode& m) const {
  std::ostringstream msg;
  msg.precision(6);
  msg << std::fixed << "mode: release " << release_state_name(m.release)
      << (m.overflowing ? ", overflowing" : "")
      << (m.column == ColumnMode::full ? ", column brim-full" : "") << "; state: level "
      << geometry_.level_m(x[kReservoir]) * 1e3 << " mm, reservoir " << x[kReservoir] * 1e3
      << " L, roof " << x[kRoof] * 1e3 << " L, column " << x[kColumn] * 1e3 << " L, battery "
      << x[kBattery] / kJoulesPerWh << " Wh";
  return msg.str();
}

}  // namespace gutterwatt
