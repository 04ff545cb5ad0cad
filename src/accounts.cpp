#include "gutterwatt/accounts.hpp"

#include <algorithm>
#include <cstddef>
#include <limits>

namespace gutterwatt {

namespace {

constexpr EpisodeKindInfo kEpisodeKinds[] = {
    {EpisodeKind::cycle, "cycle", "release cycles", true},
    {EpisodeKind::dribble, "dribble", "dribble episodes (release not sealed)", true},
    {EpisodeKind::overflow, "overflow", "overflow at the reservoir rim", false},
    {EpisodeKind::column_overflow, "column_overflow", "overflow at the head column", false},
};

const EpisodeKindInfo& info(EpisodeKind kind) {
  for (const EpisodeKindInfo& k : kEpisodeKinds) {
    if (k.kind == kind) return k;
  }
  return kEpisodeKinds[0];
}

}  // namespace

std::span<const EpisodeKindInfo> episode_kinds() { return kEpisodeKinds; }

std::string_view episode_kind_name(EpisodeKind kind) { return info(kind).name; }

std::optional<EpisodeKind> episode_kind_from_name(std::string_view name) {
  for (const EpisodeKindInfo& k : kEpisodeKinds) {
    if (k.name == name) return k.kind;
  }
  return std::nullopt;
}

bool episode_makes_energy(EpisodeKind kind) { return info(kind).makes_energy; }

void ObserverList::on_start(const Sample& s) {
  for (Observer* o : observers_) o->on_start(s);
}
void ObserverList::on_sample(const Sample& s) {
  for (Observer* o : observers_) o->on_sample(s);
}
void ObserverList::on_episode(const Episode& e) {
  for (Observer* o : observers_) o->on_episode(e);
}
bool ObserverList::wants_trace() const {
  return std::any_of(observers_.begin(), observers_.end(),
                     [](const Observer* o) { return o->wants_trace(); });
}
// The trace goes only to the observers that take it: for a point given by its state, the
// default works the rates out.
void ObserverList::on_trace(const TracePoint& p) {
  for (Observer* o : observers_) {
    if (o->wants_trace()) o->on_trace(p);
  }
}
void ObserverList::on_trace_state(const TraceState& s, const ChainSystem& system) {
  for (Observer* o : observers_) {
    if (o->wants_trace()) o->on_trace_state(s, system);
  }
}

TracePoint trace_point(double t, const ChainMode& m, const ChainRates& r) {
  TracePoint p;
  p.time_s = t;
  p.level_m = r.level_m;
  p.release = m.release;
  p.release_m3_per_s = r.release;
  p.overflow_m3_per_s = r.overflow + r.column_overflow;
  p.head_m = r.nozzle > 0.0 ? r.power.head_m : 0.0;
  p.power_W = r.electrical_W;
  return p;
}

TracePoint trace_point(const TraceState& s, const ChainSystem& system) {
  ChainState x{};
  for (std::size_t i = 0; i < kReadSlots.size(); ++i) x[kReadSlots[i]] = s.read[i];
  return trace_point(s.time_s, s.mode, system.rates(x, s.mode, s.forcing));
}

Ledger::Ledger(const ChainSystem& system, Observer& observer)
    : system_(system), observer_(observer), tracing_(observer.wants_trace()) {}

void Ledger::trace(double t, const ChainMode& m, const ChainRates& r) const {
  observer_.on_trace(trace_point(t, m, r));
}

void Ledger::trace_state(double t, const ChainMode& m, const ChainState& x,
                         const Forcing& f) const {
  TraceState s{t, m, {}, f};
  for (std::size_t i = 0; i < kReadSlots.size(); ++i) s.read[i] = x[kReadSlots[i]];
  observer_.on_trace_state(s, system_);
}

void Ledger::start(const ChainState& x, const ChainMode& m, double t) {
  if (system_.release().is_running(m.release)) open_episode(EpisodeKind::cycle, x, t);
  if (m.release == ReleaseState::dribble) open_episode(EpisodeKind::dribble, x, t);
  if (m.overflowing) open_episode(EpisodeKind::overflow, x, t);
  follow_standing(system_.level_m(x), m, t);
}

void Ledger::follow_standing(double level_m, const ChainMode& m, double t) {
  const bool standing = !system_.release().is_running(m.release) && level_m > kStandingDepth_m;
  if (standing == standing_) return;
  standing_ = standing;
  if (standing) {
    standing_since_s_ = t;
    return;
  }
  const double spell_s = t - standing_since_s_;
  counts_.standing_s += spell_s;
  counts_.standing_longest_s = std::max(counts_.standing_longest_s, spell_s);
  if (spell_s > kMosquitoSpell_s) ++counts_.standing_spells_over_week;
}

void Ledger::tally_step(const ChainState& x0, const ChainState& x1, double dt, const ChainMode& m) {
  const Scenario& sc = system_.scenario();
  const double released = x1[kRelease] - x0[kRelease];
  if (!system_.release().is_running(m.release)) tally_.dribble_m3 += released;
  if (system_.plant().has_column() && m.column == ColumnMode::full) {
    tally_.column_overflow_m3 += released - (x1[kNozzle] - x0[kNozzle]);
  }
  if (m.generator_on) tally_.electrical_J += sc.generator.efficiency * (x1[kShaft] - x0[kShaft]);
  tally_.battery_below_half_s += below_half_s(x0[kBattery], x1[kBattery], dt, sc.battery);
  if (m.battery == BatteryMode::empty) tally_.battery_empty_s += dt;
}

void Ledger::tally_roof(const RoofFlows& flows) {
  tally_.rain_m3 += flows.rain_m3;
  tally_.roof_loss_m3 += flows.loss_m3;
  tally_.roof_runoff_m3 += flows.runoff_m3;
  tally_.first_flush_m3 += flows.diverted_m3;
}

void Ledger::tally_battery(const BatteryRest& rest) {
  tally_.battery_below_half_s += rest.below_half_s;
  tally_.battery_empty_s += rest.empty_s;
}

// The account an episode's volume is measured on.
double Ledger::episode_account(EpisodeKind kind, const ChainState& x) const {
  switch (kind) {
    case EpisodeKind::cycle:
      return x[kRelease];
    case EpisodeKind::overflow:
      return x[kReservoirOverflow];
    case EpisodeKind::dribble:
      return tally_.dribble_m3;
    case EpisodeKind::column_overflow:
      return tally_.column_overflow_m3;
  }
  return x[kRelease];
}

void Ledger::open_episode(EpisodeKind kind, const ChainState& x, double t) {
  OpenEpisode& e = episodes_[static_cast<std::size_t>(kind)];
  e.open = true;
  e.start_s = t;
  e.peak = 0.0;
  e.top_level_m = -std::numeric_limits<double>::infinity();
  e.start_energy_J = tally_.electrical_J;
  e.start_volume_m3 = episode_account(kind, x);
}

void Ledger::close_episode(EpisodeKind kind, const ChainState& x, double t) {
  OpenEpisode& e = episodes_[static_cast<std::size_t>(kind)];
  if (!e.open) return;
  e.open = false;
  const double volume = episode_account(kind, x) - e.start_volume_m3;
  switch (kind) {
    case EpisodeKind::cycle:
      ++counts_.cycles;
      break;
    case EpisodeKind::overflow:
      ++counts_.overflow_events;
      counts_.overflow_s += t - e.start_s;
      break;
    case EpisodeKind::dribble:
      ++counts_.dribble_episodes;
      counts_.dribble_s += t - e.start_s;
      break;
    case EpisodeKind::column_overflow:
      break;
  }
  observer_.on_episode(
      Episode{kind, e.start_s, t, volume, e.peak, tally_.electrical_J - e.start_energy_J});
}

void Ledger::switched(const ChainMode& before, const ChainMode& after, const ChainState& x,
                      double spilled_m3, double t) {
  tally_.column_overflow_m3 += spilled_m3;
  // An episode of `kind` closes as its condition ends and opens as it begins.
  const auto follow = [&](EpisodeKind kind, bool was, bool is) {
    if (was && !is) close_episode(kind, x, t);
    if (!was && is) open_episode(kind, x, t);
  };
  const Release& release = system_.release();
  follow(EpisodeKind::cycle, release.is_running(before.release), release.is_running(after.release));
  follow(EpisodeKind::dribble, before.release == ReleaseState::dribble,
         after.release == ReleaseState::dribble);
  follow(EpisodeKind::overflow, before.overflowing, after.overflowing);
  follow(EpisodeKind::column_overflow, before.column == ColumnMode::full,
         after.column == ColumnMode::full);
}

void Ledger::update_peaks(const ChainRates& r) {
  auto bump = [&](EpisodeKind kind, double q) {
    OpenEpisode& e = episodes_[static_cast<std::size_t>(kind)];
    if (e.open) {
      e.peak = std::max(e.peak, q);
      e.top_level_m = std::max(e.top_level_m, r.level_m);
    }
  };
  bump(EpisodeKind::cycle, r.release);
  bump(EpisodeKind::dribble, r.release);
  bump(EpisodeKind::overflow, r.overflow);
  bump(EpisodeKind::column_overflow, r.column_overflow);
}

bool Ledger::following_peaks() const {
  return std::any_of(episodes_.begin(), episodes_.end(),
                     [](const OpenEpisode& e) { return e.open; });
}

bool Ledger::peak_may_rise(double level_m) const {
  return std::any_of(episodes_.begin(), episodes_.end(),
                     [level_m](const OpenEpisode& e) { return e.open && level_m > e.top_level_m; });
}

void Ledger::close_all(const ChainState& x, double t) {
  for (std::size_t k = 0; k < episodes_.size(); ++k) {
    close_episode(static_cast<EpisodeKind>(k), x, t);
  }
  if (standing_) follow_standing(0.0, ChainMode{}, t);  // the spell ends with the run
}

Storage Ledger::storage(const ChainState& x) {
  Storage s;
  s.roof_m3 = x[kRoof];
  s.reservoir_m3 = x[kReservoir];
  s.column_m3 = x[kColumn];
  s.battery_J = x[kBattery];
  return s;
}

Accounts Ledger::accounts(const ChainState& x) const {
  Accounts a = tally_;
  a.reservoir_overflow_m3 = x[kReservoirOverflow];
  a.release_m3 = x[kRelease];
  a.nozzle_m3 = x[kNozzle];
  a.evaporation_m3 = x[kEvaporation];
  a.jet_J = x[kJet];
  a.shaft_J = x[kShaft];
  a.accepted_J = x[kAccepted];
  const BatteryConfig& battery = system_.scenario().battery;
  a.stored_J = battery.charge_efficiency * x[kAccepted];
  a.curtailed_J = x[kCurtailed];
  a.served_J = x[kServed];
  a.unmet_J = x[kUnmet];
  a.drawn_J = x[kDrawn];
  a.discharge_loss_J = (1.0 / battery.discharge_efficiency - 1.0) * x[kDrawn];
  a.self_discharge_J = x[kSelfDischarge];
  return a;
}

Sample Ledger::sample(Instant t, const ChainState& x, const ChainMode& m, bool output,
                      bool month_end) const {
  Sample s;
  s.time = t;
  s.totals = accounts(x);
  s.storage = storage(x);
  const ChainRates r = system_.rates(x, m, Forcing{});
  s.level_m = r.level_m;
  s.release = m.release;
  s.head_m = r.nozzle > 0.0 ? r.power.head_m : 0.0;
  s.power_W = r.electrical_W;
  const double capacity_J = system_.scenario().battery.capacity_J;
  s.soc = capacity_J > 0.0 ? x[kBattery] / capacity_J : 0.0;
  s.output = output;
  s.month_end = month_end;
  return s;
}

}  // namespace gutterwatt
