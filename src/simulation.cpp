#include "gutterwatt/simulation.hpp"

#include <algorithm>
#include <array>
#include <boost/numeric/odeint.hpp>
#include <cmath>
#include <limits>
#include <optional>
#include <span>
#include <sstream>

#include "gutterwatt/battery.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/plant.hpp"
#include "gutterwatt/reservoir.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt {

std::string_view episode_kind_name(EpisodeKind kind) {
  switch (kind) {
    case EpisodeKind::cycle:
      return "cycle";
    case EpisodeKind::overflow:
      return "overflow";
    case EpisodeKind::dribble:
      return "dribble";
    case EpisodeKind::column_overflow:
      return "column_overflow";
  }
  return "cycle";
}

void ObserverList::on_start(const Sample& s) {
  for (Observer* o : observers_) o->on_start(s);
}
void ObserverList::on_sample(const Sample& s) {
  for (Observer* o : observers_) o->on_sample(s);
}
void ObserverList::on_episode(const Episode& e) {
  for (Observer* o : observers_) o->on_episode(e);
}

namespace detail {
namespace {

namespace odeint = boost::numeric::odeint;

// Continuous state: storages first, then running integrals of the accounts whose rates are
// nonlinear in the state. The other accounts follow from these exactly (see tally_step).
enum Slot : std::size_t {
  kRoof,        // water on the roof's linear reservoir, m3
  kDepression,  // initial-loss store filled, m of depth
  kFlush,       // first-flush diverter fill, m3
  kReservoir,   // m3
  kColumn,      // head column, m3
  kBattery,     // J
  kReservoirOverflow,
  kRelease,
  kNozzle,
  kJet,
  kShaft,
  kAccepted,
  kCurtailed,
  kServed,
  kUnmet,
  kSlots
};

using State = std::array<double, kSlots>;

// The accounts kept outside the solver's state, in an Accounts whose other fields stay zero
// (tally_). Within one step the mode is fixed, and each of these grows by a constant rate times
// the time or by a fixed multiple of the change in a state slot, so they are exact (tally_step)
// and cost the solver nothing: rain and roof loss at constant rates, roof runoff as what entered
// the roof store less its change, the diverter's take as its change while filling, dribble as
// release while the release is not running, column overflow as release less nozzle while
// brim-full, electrical energy as the generator efficiency times shaft energy while it runs.
// Stored energy is the charge efficiency times the accepted energy.

enum class Depression { filling, full, drying, dry };
// A head column fills and drains (partial), spills over its top (full), or, nearly empty under a
// trickle, passes what arrives straight to the nozzle holding its puddle (trickle).
enum class ColumnMode { trickle, partial, full };

// Discrete state: which branch of each piecewise law is in force.
struct Mode {
  ReleaseState release = ReleaseState::idle;
  bool overflowing = false;
  Depression depression = Depression::dry;
  bool flush_full = false;
  ColumnMode column = ColumnMode::trickle;
  bool generator_on = false;
  BatteryMode battery = BatteryMode::normal;
};

// A pulse's rain intensity, m/s: constant over the pulse.
double intensity_m_per_s(const RainPulse& p) {
  return p.depth_m / static_cast<double>(p.end - p.start);
}

// What drives a segment: constant over it.
struct Forcing {
  double rain_m_per_s = 0.0;
  double load_W = 0.0;
};

// Every rate and intermediate value at one instant.
struct Rates {
  double level_m = 0.0;
  double full_flow = 0.0;
  double release = 0.0;
  double overflow = 0.0;
  double nozzle = 0.0;
  double column_overflow = 0.0;
  double head_m = 0.0;
  PlantPower power;
  double electrical_W = 0.0;
  BatteryFlows battery;
};

// Error norm with a scale per slot: err_i / (rtol (scale_i + |x_i| + dt |dxdt_i|)), the odeint
// default checker's form with per-slot absolute tolerances, except that the roof's error is
// measured against the water on the roof and in the reservoir together: an error on the roof
// only moves water that is on its way to the reservoir a little in time, and judged against the
// roof's own small, fast store alone it set the step for the whole chain.
struct ScaledErrorChecker {
  using value_type = double;
  using algebra_type = odeint::array_algebra;
  using operations_type = odeint::default_operations;

  double rtol = 1e-6;
  State scale{};

  template <class S, class D, class E, class T>
  double error(algebra_type&, const S& x_old, const D& dxdt_old, E& x_err, T dt) const {
    double worst = 0.0;
    for (std::size_t i = 0; i < kSlots; ++i) {
      const double size =
          i == kRoof ? std::abs(x_old[kRoof]) + std::abs(x_old[kReservoir]) : std::abs(x_old[i]);
      const double tol = rtol * (scale[i] + size + dt * std::abs(dxdt_old[i]));
      worst = std::max(worst, std::abs(x_err[i]) / tol);
    }
    return worst;
  }
};

using BaseStepper = odeint::runge_kutta_dopri5<State, double, State, double, odeint::array_algebra>;
using Controlled = odeint::controlled_runge_kutta<BaseStepper, ScaledErrorChecker,
                                                  odeint::default_step_adjuster<double, double>>;
using Dense = odeint::dense_output_runge_kutta<Controlled>;

// Guard k fires when g[k] falls below zero. The numbering is the switch table of apply_switch.
enum GuardId {
  kGuardRelease0,
  kGuardRelease1,
  kGuardOverflow,
  kGuardDepression,
  kGuardFlush,
  kGuardColumn,
  kGuardTrickle,
  kGuardGenerator,
  kGuardBattery,
  kGuardCount
};

using Guards = std::array<double, kGuardCount>;

// Head-column water height below which, with a trickle of inflow, the column passes the inflow
// straight to the nozzle: its drain time constant 2 A H / Q is then under a minute, which would
// make the solver's steps stability-bound for hours of dribble, while the power at such heads is
// far below any generator's cut-in.
constexpr double kTrickleHead_m = 0.05;
// Volume below which a head column counts as drained.
constexpr double kColumnDry_m3 = 1e-9;
// Largest solver step while it rains: a switch that happens and un-happens within one step would
// be missed, and rain can start and stop an overflow within minutes.
constexpr double kMaxWetStep_s = 120.0;
// Without rain the flows decay or drain; the one exception, a release cycle still running, moves
// on a time scale of a minute, which keeps the error-controlled steps far shorter than this.
constexpr double kMaxDryStep_s = 1800.0;
constexpr int kMaxSwitchesAtOnce = 16;
// Steps one segment may take before the run counts as stalled: a segment is at most an output
// interval or a month long and needs a few hundred steps even through a storm.
constexpr long kMaxStepsPerSegment = 100000;

class Engine {
 public:
  Engine(const Scenario& sc, RainView& rain, Observer& observer, const RunOptions& options)
      : sc_(sc),
        rain_(rain),
        observer_(observer),
        options_(options),
        geometry_(sc.reservoir),
        plant_(plant_config(sc)),
        release_(make_release(sc.release)),
        trickle_volume_m3_(plant_.column_area_m2() * kTrickleHead_m) {}

  RunResult run();

 private:
  // Physics at one instant.
  Rates rates(const State& x, const Mode& m, const Forcing& f) const {
    Rates r;
    State dxdt;
    rates(x, m, f, r, dxdt);
    return r;
  }
  /// Fills `r` and the derivative `d` (every field and slot) for state `x`: the solver's hot
  /// path, which must not copy Rates.
  void rates(const State& x, const Mode& m, const Forcing& f, Rates& r, State& d) const;
  void guards(const State& x, const Mode& m, const Forcing& f, const Rates& r, Guards& g) const;
  void apply_switch(int k, State& x, Mode& m, const Forcing& f, const Rates& r, double t);
  /// Applies every switch already due; returns the rates and guards of the settled state.
  Rates settle(State& x, Mode& m, const Forcing& f, double t, Guards& g, State& dxdt);
  bool at_rest(const State& x, const Mode& m, const Forcing& f, double span_s) const;

  // Time.
  void advance(Instant t0, Instant t1, const Forcing& f);
  void integrate(double t0, double t1, const Forcing& f);
  void integrate_fixed(double t0, double t1, const Forcing& f);
  bool coasted_to_end(double left_s, const Forcing& f, double t1);
  void accept_step(const State& x_end, double dt, const Rates& r, int fired, const Forcing& f,
                   double t_abs);
  void coast(double dt, const Forcing& f);

  // Records.
  void track_episodes(const Mode& before, const Mode& after, double t);
  void open_episode(EpisodeKind kind, double t);
  void close_episode(EpisodeKind kind, double t);
  void update_peaks(const Rates& r);
  /// Adds to tally_ what a step from x0 to x1 over dt in mode m made of its accounts.
  void tally_step(const State& x0, const State& x1, double dt, const Mode& m, const Forcing& f);
  double episode_account(EpisodeKind kind) const;
  Sample make_sample(Instant t, bool output, bool month_end) const;
  Storage storage(const State& x) const;
  Accounts accounts(const State& x) const;
  [[noreturn]] void fail(const std::string& what, double t) const;
  /// The time from `from` on that the record does not cover, up to `end` when known.
  TimeSpan missing_from(Instant from, std::optional<Instant> end);
  [[noreturn]] void missing_data(const TimeSpan& gap, Instant start, Instant end) const;

  struct OpenEpisode {
    bool open = false;
    double start_s = 0.0;
    double start_volume_m3 = 0.0;
    double start_energy_J = 0.0;
    double peak = 0.0;
  };

  const Scenario& sc_;
  RainView& rain_;
  Observer& observer_;
  const RunOptions& options_;
  ReservoirGeometry geometry_;
  Plant plant_;
  std::unique_ptr<Release> release_;
  double trickle_volume_m3_;  // head column: volume at kTrickleHead_m

  State x_{};
  Accounts tally_;  // the accounts tallied outside the state
  Mode mode_;
  double now_s_ = 0.0;  // absolute, seconds since the epoch
  double last_wet_s_ = -std::numeric_limits<double>::infinity();
  double last_step_s_ = 10.0;  // solver step carried from one segment into the next
  std::array<OpenEpisode, 4> episodes_{};
  RunResult result_;
  ScaledErrorChecker checker_;
};

void Engine::rates(const State& x, const Mode& m, const Forcing& f, Rates& r, State& d) const {
  d.fill(0.0);
  r.column_overflow = 0.0;
  const double area = sc_.roof.area_m2;
  const double rain = f.rain_m_per_s * area;

  // Roof: initial loss first, then the runoff coefficient on the remainder (rational method,
  // Q = C i A), routed through a linear reservoir dS/dt = I - S/k (Nash 1957 single reservoir).
  double effective = 0.0;
  switch (m.depression) {
    case Depression::filling:
      d[kDepression] = f.rain_m_per_s;
      break;
    case Depression::full:
      effective = sc_.roof.runoff_coefficient * rain;
      break;
    case Depression::drying:
      d[kDepression] = -sc_.roof.drying_m_per_s;
      break;
    case Depression::dry:
      break;
  }
  double runoff = effective;
  if (sc_.roof.lag_s > 0.0) {
    runoff = std::max(0.0, x[kRoof]) / sc_.roof.lag_s;
    d[kRoof] = effective - runoff;
  }

  // First flush: everything goes to the diverter until it holds volume_L.
  double inflow = runoff;
  if (sc_.first_flush.volume_m3 > 0.0 && !m.flush_full) {
    d[kFlush] = runoff;
    inflow = 0.0;
  }

  // Reservoir, release and overflow.
  r.level_m = geometry_.level_m(x[kReservoir]);
  const bool needs_full_flow = m.release != ReleaseState::idle && m.release != ReleaseState::closed;
  r.full_flow = needs_full_flow ? plant_.full_flow_m3_per_s(r.level_m) : 0.0;
  r.release = release_->outflow_m3_per_s(m.release, r.level_m, r.full_flow);
  r.overflow = m.overflowing ? geometry_.overflow_m3_per_s(r.level_m) : 0.0;
  d[kReservoir] = inflow - r.release - r.overflow;
  d[kReservoirOverflow] = r.overflow;
  d[kRelease] = r.release;

  // Conveyance and nozzle.
  if (plant_.has_column() && m.column == ColumnMode::trickle) {
    // The column's drain time constant at a few millimetres of head is seconds, against hours
    // for a dribble: integrating it would make the system stiff, so it passes the trickle on.
    r.nozzle = r.release;
    r.head_m = plant_.nozzle_head_for_flow_m(r.nozzle);
  } else if (plant_.has_column()) {
    const double volume = m.column == ColumnMode::full ? plant_.column_capacity_m3() : x[kColumn];
    r.nozzle = plant_.column_nozzle_flow_m3_per_s(volume);
    r.head_m = plant_.column_head_m(volume);
    if (m.column == ColumnMode::full) {
      r.column_overflow = std::max(0.0, r.release - r.nozzle);
    } else {
      d[kColumn] = r.release - r.nozzle;
    }
  } else {
    r.nozzle = r.release;
    r.head_m = plant_.nozzle_head_for_flow_m(r.nozzle);
  }
  d[kNozzle] = r.nozzle;

  // Turbine, generator, battery.
  r.power = plant_.power(r.nozzle, r.head_m);
  r.electrical_W = m.generator_on ? r.power.electrical_W : 0.0;
  r.battery = battery_flows(m.battery, r.electrical_W, f.load_W, sc_.battery);
  d[kBattery] = r.battery.charge_W;
  d[kJet] = r.power.jet_W;
  d[kShaft] = r.power.shaft_W;
  d[kAccepted] = r.battery.accepted_W;
  d[kCurtailed] = r.battery.curtailed_W;
  d[kServed] = r.battery.served_W;
  d[kUnmet] = r.battery.unmet_W;
}

void Engine::guards(const State& x, const Mode& m, const Forcing& f, const Rates& r,
                    Guards& g) const {
  constexpr double kInactive = 1.0;
  g.fill(kInactive);
  Guard rel[Release::kMaxGuards];
  const int n = release_->guards(m.release, r.level_m, rel);
  for (int k = 0; k < n; ++k) g[kGuardRelease0 + k] = rel[k].value;

  const double rim = geometry_.rim_m();
  g[kGuardOverflow] =
      m.overflowing ? r.level_m - rim - 0.5 * kHoldHead_m : rim + kHoldHead_m - r.level_m;
  if (m.depression == Depression::filling) {
    g[kGuardDepression] = sc_.roof.initial_loss_m - x[kDepression];
  } else if (m.depression == Depression::drying) {
    g[kGuardDepression] = x[kDepression];
  }
  if (sc_.first_flush.volume_m3 > 0.0 && !m.flush_full) {
    g[kGuardFlush] = sc_.first_flush.volume_m3 - x[kFlush];
  }
  if (plant_.has_column()) {
    const double q_lin = plant_.column_nozzle_flow_m3_per_s(trickle_volume_m3_);
    switch (m.column) {
      case ColumnMode::trickle:
        g[kGuardColumn] = q_lin - r.release;
        break;
      case ColumnMode::partial:
        g[kGuardColumn] = plant_.column_capacity_m3() - x[kColumn];
        // Back to trickle once both the puddle and the inflow are small (half the threshold).
        g[kGuardTrickle] = std::max((x[kColumn] - 0.5 * trickle_volume_m3_) / trickle_volume_m3_,
                                    (r.release - 0.5 * q_lin) / q_lin);
        break;
      case ColumnMode::full:
        g[kGuardColumn] = r.release - r.nozzle;
        break;
    }
  }
  const double cut_in = sc_.generator.cut_in_W;
  g[kGuardGenerator] =
      m.generator_on ? r.power.electrical_W - cut_in : cut_in - r.power.electrical_W;
  const double surplus = r.electrical_W - f.load_W;
  switch (m.battery) {
    case BatteryMode::normal:
      g[kGuardBattery] =
          r.battery.charge_W >= 0.0 ? sc_.battery.capacity_J - x[kBattery] : x[kBattery];
      break;
    case BatteryMode::full:
      g[kGuardBattery] = surplus;
      break;
    case BatteryMode::empty:
      g[kGuardBattery] = -surplus;
      break;
  }
}

void Engine::apply_switch(int k, State& x, Mode& m, const Forcing& f, const Rates& r, double t) {
  const Mode before = m;
  switch (k) {
    case kGuardRelease0:
    case kGuardRelease1: {
      Guard rel[Release::kMaxGuards];
      release_->guards(m.release, r.level_m, rel);
      m.release = rel[k - kGuardRelease0].next;
      break;
    }
    case kGuardOverflow:
      m.overflowing = !m.overflowing;
      break;
    case kGuardDepression:
      if (m.depression == Depression::filling) {
        m.depression = Depression::full;
        x[kDepression] = sc_.roof.initial_loss_m;
      } else {
        m.depression = Depression::dry;
        x[kDepression] = 0.0;
      }
      break;
    case kGuardFlush:
      m.flush_full = true;
      x[kFlush] = sc_.first_flush.volume_m3;
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
        tally_.column_overflow_m3 += excess;
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
      m.battery = battery_mode(x[kBattery], r.electrical_W, f.load_W, sc_.battery);
      if (m.battery == before.battery) {
        m.battery = before.battery == BatteryMode::normal
                        ? (r.battery.charge_W >= 0.0 ? BatteryMode::full : BatteryMode::empty)
                        : BatteryMode::normal;
      }
      break;
    default:
      break;
  }
  ++result_.stats.switches;
  track_episodes(before, m, t);
}

// Applies every switch whose guard is already below zero, so the mode matches the state.
Rates Engine::settle(State& x, Mode& m, const Forcing& f, double t, Guards& g, State& dxdt) {
  for (int pass = 0; pass < kMaxSwitchesAtOnce; ++pass) {
    Rates r;
    rates(x, m, f, r, dxdt);
    guards(x, m, f, r, g);
    int fired = -1;
    for (int k = 0; k < kGuardCount; ++k) {
      if (g[k] < 0.0) {
        fired = k;
        break;
      }
    }
    if (fired < 0) return r;
    apply_switch(fired, x, m, f, r, t);
  }
  fail("the modes do not settle (switches chatter)", t);
}

bool Engine::at_rest(const State& x, const Mode& m, const Forcing& f, double span_s) const {
  if (m.overflowing) return false;
  if (plant_.has_column() && m.column != ColumnMode::trickle &&
      (m.column == ColumnMode::full || x[kColumn] > kColumnDry_m3)) {
    return false;
  }
  const double ceiling = release_->rest_ceiling_m(m.release);
  if (ceiling < 0.0) return false;
  const double limit = std::min(ceiling, geometry_.rim_m() + kHoldHead_m);
  // All the water that can reach the reservoir within the span: what is on the roof now and
  // what the rain can add to it.
  const double arriving = std::max(0.0, x[kRoof]) +
                          sc_.roof.runoff_coefficient * f.rain_m_per_s * sc_.roof.area_m2 * span_s;
  return x[kReservoir] + arriving <= geometry_.volume_m3(limit);
}

// A span at rest in closed form: the release passes nothing and cannot start to, so the rest of
// the chain is linear. The initial loss fills at the rain rate (or dries at the drying rate), the
// roof's linear reservoir takes C i A once it is full and empties exponentially, the diverter
// takes the first of its runoff and the reservoir the rest, and the battery serves the load.
void Engine::coast(double dt, const Forcing& f) {
  State& x = x_;
  const double area = sc_.roof.area_m2;
  const double rain = f.rain_m_per_s * area;
  tally_.rain_m3 += rain * dt;
  double wet_s = 0.0;  // time within dt with the initial loss full
  if (f.rain_m_per_s > 0.0) {
    const double room = sc_.roof.initial_loss_m - x[kDepression];
    const double filling_s = mode_.depression == Depression::filling
                                 ? std::min(dt, std::max(0.0, room) / f.rain_m_per_s)
                                 : 0.0;
    if (mode_.depression == Depression::filling) {
      if (filling_s < dt) {
        x[kDepression] = sc_.roof.initial_loss_m;
        mode_.depression = Depression::full;
      } else {
        x[kDepression] += f.rain_m_per_s * dt;
      }
    }
    wet_s = dt - filling_s;
    tally_.roof_loss_m3 += rain * filling_s + (1.0 - sc_.roof.runoff_coefficient) * rain * wet_s;
  } else if (mode_.depression == Depression::drying) {
    x[kDepression] = std::max(0.0, x[kDepression] - sc_.roof.drying_m_per_s * dt);
    if (x[kDepression] <= 0.0) mode_.depression = Depression::dry;
  }
  const double effective = sc_.roof.runoff_coefficient * rain;
  double out = effective * wet_s;  // lag 0: runoff follows the rain
  if (sc_.roof.lag_s > 0.0) {
    // dS/dt = E - S/k: S decays alone while the loss fills, then relaxes towards E k.
    const double k = sc_.roof.lag_s;
    const double before = x[kRoof] * std::exp(-(dt - wet_s) / k);
    const double left = effective * k + (before - effective * k) * std::exp(-wet_s / k);
    out = x[kRoof] + effective * wet_s - left;
    x[kRoof] = left;
  }
  tally_.roof_runoff_m3 += out;
  double to_reservoir = out;
  if (sc_.first_flush.volume_m3 > 0.0 && !mode_.flush_full) {
    const double taken = std::min(out, sc_.first_flush.volume_m3 - x[kFlush]);
    x[kFlush] += taken;
    tally_.first_flush_m3 += taken;
    to_reservoir -= taken;
    if (x[kFlush] >= sc_.first_flush.volume_m3) {
      x[kFlush] = sc_.first_flush.volume_m3;
      mode_.flush_full = true;
    }
  }
  x[kReservoir] += to_reservoir;
  const double demand = f.load_W * dt;
  const double drawn = std::min(std::max(0.0, x[kBattery]), demand);
  x[kBattery] -= drawn;
  x[kServed] += drawn;
  x[kUnmet] += demand - drawn;
  mode_.battery = battery_mode(x[kBattery], 0.0, f.load_W, sc_.battery);
  result_.stats.coasted_s += dt;
}

void Engine::integrate(double t0, double t1, const Forcing& f) {
  // The last stage of a Dormand-Prince step is evaluated at the step's end state (FSAL); keeping
  // it spares the guard evaluation there a second call of the whole chain. The stage's time tells
  // it apart: odeint evaluates it last, at the time the step ends.
  // After a restart odeint first asks for the derivative at the state it starts from, which the
  // engine has just computed (settling the modes, or as the last stage of the step before):
  // `known` hands it over instead of a second evaluation.
  Rates last;
  double last_t = std::numeric_limits<double>::quiet_NaN();
  const State* last_dxdt = nullptr;  // odeint's buffer holding the last derivative
  bool known = false;
  State known_dxdt{};
  const auto system = [&](const State& x, State& dxdt, double t) {
    if (known) {
      known = false;
      dxdt = known_dxdt;
    } else {
      rates(x, mode_, f, last, dxdt);
    }
    last_t = t;
    last_dxdt = &dxdt;
  };
  const double span = t1 - t0;
  double t = 0.0;  // time within the segment, for precision
  const double max_step = f.rain_m_per_s > 0.0 ? kMaxWetStep_s : kMaxDryStep_s;
  Dense stepper(Controlled(checker_, odeint::default_step_adjuster<double, double>(max_step)));
  bool fresh = true;
  long segment_steps = 0;
  Guards g_prev{};
  while (t < span) {
    if (coasted_to_end(span - t, f, t1)) return;
    if (fresh) {
      last = settle(x_, mode_, f, now_s_, g_prev, known_dxdt);
      update_peaks(last);
      stepper.initialize(x_, t, std::min(last_step_s_, span - t));
      known = true;
      fresh = false;
    } else if (stepper.current_time() + stepper.current_time_step() > span) {
      known = last_t == t && last_dxdt != nullptr;
      if (known) known_dxdt = *last_dxdt;
      stepper.initialize(x_, t, span - t);
    }
    std::pair<double, double> step;
    try {
      step = stepper.do_step(system);
    } catch (const odeint::odeint_error& e) {
      fail(std::string("the solver made no progress (") + e.what() + ")", t0 + t);
    }
    ++result_.stats.steps;
    if (++segment_steps > kMaxStepsPerSegment) {
      fail("the solver made no progress (" + std::to_string(kMaxStepsPerSegment) +
               " steps in one segment)",
           t0 + t);
    }
    double t_end = std::min(step.second, span);
    State x_end;
    Rates r;
    if (t_end == step.second && last_t == step.second) {
      x_end = stepper.current_state();
      r = last;
    } else {
      stepper.calc_state(t_end, x_end);
      r = rates(x_end, mode_, f);
    }
    Guards g_end;
    guards(x_end, mode_, f, r, g_end);

    // Earliest guard that crossed zero within the step, located on the dense output.
    int first = -1;
    double t_switch = t_end;
    for (int k = 0; k < kGuardCount; ++k) {
      if (!(g_prev[k] >= 0.0 && g_end[k] < 0.0)) continue;
      const auto guard_at = [&](double tau) {
        State xs;
        stepper.calc_state(tau, xs);
        Guards gs;
        guards(xs, mode_, f, rates(xs, mode_, f), gs);
        return gs[k];
      };
      double lo = step.first;
      double hi = t_switch;
      double g_lo = g_prev[k];
      // At the step's end the guard is known; before an earlier switch it must be looked up.
      double g_hi = first < 0 ? g_end[k] : guard_at(hi);
      if (g_hi >= 0.0) continue;  // crosses only after an earlier switch
      // Illinois regula falsi on the dense output to 1e-10 s (Dowell & Jarratt 1971): a switch is
      // placed, not rounded to a step, and the accounts it splits move by less than 1e-9 of their
      // size. Bisection takes over when an interpolated point falls outside the bracket.
      int side = 0;
      for (int iter = 0; hi - lo > 1e-10; ++iter) {
        double mid = iter < 60 ? hi - g_hi * (hi - lo) / (g_hi - g_lo) : 0.5 * (lo + hi);
        if (!(mid > lo && mid < hi)) mid = 0.5 * (lo + hi);
        const double g_mid = guard_at(mid);
        if (g_mid < 0.0) {
          hi = mid;
          g_hi = g_mid;
          if (side == -1) g_lo *= 0.5;
          side = -1;
        } else {
          lo = mid;
          g_lo = g_mid;
          if (side == 1) g_hi *= 0.5;
          side = 1;
        }
      }
      t_switch = hi;
      first = k;
    }
    if (first >= 0) {
      t_end = t_switch;
      stepper.calc_state(t_end, x_end);
      r = rates(x_end, mode_, f);
    }
    accept_step(x_end, t_end - t, r, first, f, t0 + t_end);
    t = t_end;
    if (first >= 0) {
      fresh = true;
    } else {
      g_prev = g_end;
      if (step.second > span) break;
    }
    last_step_s_ = std::max(1e-3, stepper.current_time_step());
  }
  now_s_ = t1;
}

// Between steps: stops on request, and ends the segment in closed form once it is at rest.
bool Engine::coasted_to_end(double left_s, const Forcing& f, double t1) {
  if (options_.stop && options_.stop->load(std::memory_order_relaxed)) throw Interrupted();
  if (!at_rest(x_, mode_, f, left_s)) return false;
  coast(left_s, f);
  now_s_ = t1;
  return true;
}

// Makes the state at the end of a step (or at the switch `fired` inside it, -1 for none), reached
// at absolute time `t_abs` after `dt`, the engine's state, and applies the switch.
void Engine::accept_step(const State& x_end, double dt, const Rates& r, int fired, const Forcing& f,
                         double t_abs) {
  for (double v : x_end) {
    if (!std::isfinite(v)) {
      x_ = x_end;
      fail("the state is not finite", t_abs);
    }
  }
  tally_step(x_, x_end, dt, mode_, f);
  x_ = x_end;
  now_s_ = t_abs;
  update_peaks(r);
  if (fired >= 0) apply_switch(fired, x_, mode_, f, r, now_s_);
}

// The reference integration: classic Runge-Kutta (Kutta 1901) at a fixed step, every switch
// placed by bisection, re-taking the step from its start with a shorter step each time.
void Engine::integrate_fixed(double t0, double t1, const Forcing& f) {
  odeint::runge_kutta4<State, double, State, double, odeint::array_algebra> rk4;
  const auto system = [this, &f](const State& x, State& dxdt, double) {
    Rates r;
    rates(x, mode_, f, r, dxdt);
  };
  const auto step_to = [&](double h) {
    State out;
    rk4.do_step(system, x_, 0.0, out, h);
    return out;
  };
  const double span = t1 - t0;
  double t = 0.0;
  bool fresh = true;
  Guards g_prev{};
  while (t < span) {
    if (coasted_to_end(span - t, f, t1)) return;
    if (fresh) {
      State dxdt;
      update_peaks(settle(x_, mode_, f, now_s_, g_prev, dxdt));
      fresh = false;
    }
    double h = std::min(options_.fixed_step_s, span - t);
    State x_end = step_to(h);
    ++result_.stats.steps;
    Rates r = rates(x_end, mode_, f);
    Guards g_end;
    guards(x_end, mode_, f, r, g_end);
    int first = -1;
    for (int k = 0; k < kGuardCount; ++k) {
      if (!(g_prev[k] >= 0.0 && g_end[k] < 0.0)) continue;
      double lo = 0.0, hi = h;
      const auto guard_at = [&](double tau) {
        const State xs = step_to(tau);
        Guards gs;
        guards(xs, mode_, f, rates(xs, mode_, f), gs);
        return gs[k];
      };
      if (first >= 0 && guard_at(hi) >= 0.0) continue;  // crosses only after an earlier switch
      while (hi - lo > 1e-10) {
        const double mid = 0.5 * (lo + hi);
        (guard_at(mid) < 0.0 ? hi : lo) = mid;
      }
      h = hi;
      first = k;
    }
    if (first >= 0) {
      x_end = step_to(h);
      r = rates(x_end, mode_, f);
    }
    const double t_next = t + h;
    accept_step(x_end, h, r, first, f, t0 + t_next);
    t = t_next;
    if (first >= 0) {
      fresh = true;
    } else {
      g_prev = g_end;
    }
  }
  now_s_ = t1;
}

void Engine::advance(Instant t0, Instant t1, const Forcing& f) {
  if (t1 <= t0) return;
  ++result_.stats.segments;
  // The initial loss fills while it rains and dries otherwise.
  const double loss = sc_.roof.initial_loss_m;
  if (f.rain_m_per_s > 0.0) {
    mode_.depression = x_[kDepression] < loss ? Depression::filling : Depression::full;
  } else {
    mode_.depression = x_[kDepression] > 0.0 ? Depression::drying : Depression::dry;
  }
  now_s_ = static_cast<double>(t0);
  if (at_rest(x_, mode_, f, static_cast<double>(t1 - t0))) {
    coast(static_cast<double>(t1 - t0), f);
  } else if (options_.fixed_step_s > 0.0) {
    integrate_fixed(static_cast<double>(t0), static_cast<double>(t1), f);
  } else {
    integrate(static_cast<double>(t0), static_cast<double>(t1), f);
  }
  now_s_ = static_cast<double>(t1);
  if (f.rain_m_per_s > 0.0) last_wet_s_ = now_s_;
}

void Engine::tally_step(const State& x0, const State& x1, double dt, const Mode& m,
                        const Forcing& f) {
  const double rain = f.rain_m_per_s * sc_.roof.area_m2;
  tally_.rain_m3 += rain * dt;
  double effective = 0.0;
  if (m.depression == Depression::filling) {
    tally_.roof_loss_m3 += rain * dt;
  } else if (m.depression == Depression::full) {
    effective = sc_.roof.runoff_coefficient * rain;
    tally_.roof_loss_m3 += (rain - effective) * dt;
  }
  // dS/dt = effective - runoff on the roof (runoff = effective without a lag).
  const double runoff = effective * dt - (sc_.roof.lag_s > 0.0 ? x1[kRoof] - x0[kRoof] : 0.0);
  tally_.roof_runoff_m3 += runoff;
  if (sc_.first_flush.volume_m3 > 0.0 && !m.flush_full) {
    tally_.first_flush_m3 += x1[kFlush] - x0[kFlush];
  }
  const double released = x1[kRelease] - x0[kRelease];
  if (!release_->is_running(m.release)) tally_.dribble_m3 += released;
  if (plant_.has_column() && m.column == ColumnMode::full) {
    tally_.column_overflow_m3 += released - (x1[kNozzle] - x0[kNozzle]);
  }
  if (m.generator_on) tally_.electrical_J += sc_.generator.efficiency * (x1[kShaft] - x0[kShaft]);
}

// The account an episode's volume is measured on.
double Engine::episode_account(EpisodeKind kind) const {
  switch (kind) {
    case EpisodeKind::cycle:
      return x_[kRelease];
    case EpisodeKind::overflow:
      return x_[kReservoirOverflow];
    case EpisodeKind::dribble:
      return tally_.dribble_m3;
    case EpisodeKind::column_overflow:
      return tally_.column_overflow_m3;
  }
  return x_[kRelease];
}

void Engine::open_episode(EpisodeKind kind, double t) {
  OpenEpisode& e = episodes_[static_cast<std::size_t>(kind)];
  e.open = true;
  e.start_s = t;
  e.peak = 0.0;
  e.start_energy_J = tally_.electrical_J;
  e.start_volume_m3 = episode_account(kind);
}

void Engine::close_episode(EpisodeKind kind, double t) {
  OpenEpisode& e = episodes_[static_cast<std::size_t>(kind)];
  if (!e.open) return;
  e.open = false;
  const double volume = episode_account(kind) - e.start_volume_m3;
  switch (kind) {
    case EpisodeKind::cycle:
      ++result_.cycles;
      break;
    case EpisodeKind::overflow:
      ++result_.overflow_events;
      result_.overflow_s += t - e.start_s;
      break;
    case EpisodeKind::dribble:
      ++result_.dribble_episodes;
      result_.dribble_s += t - e.start_s;
      break;
    case EpisodeKind::column_overflow:
      break;
  }
  observer_.on_episode(
      Episode{kind, e.start_s, t, volume, e.peak, tally_.electrical_J - e.start_energy_J});
}

void Engine::track_episodes(const Mode& before, const Mode& after, double t) {
  const bool ran = release_->is_running(before.release);
  const bool runs = release_->is_running(after.release);
  if (ran && !runs) close_episode(EpisodeKind::cycle, t);
  if (!ran && runs) open_episode(EpisodeKind::cycle, t);
  const bool dribbled = before.release == ReleaseState::dribble;
  const bool dribbles = after.release == ReleaseState::dribble;
  if (dribbled && !dribbles) close_episode(EpisodeKind::dribble, t);
  if (!dribbled && dribbles) open_episode(EpisodeKind::dribble, t);
  if (before.overflowing && !after.overflowing) close_episode(EpisodeKind::overflow, t);
  if (!before.overflowing && after.overflowing) open_episode(EpisodeKind::overflow, t);
  const bool brim = before.column == ColumnMode::full;
  const bool brims = after.column == ColumnMode::full;
  if (brim && !brims) close_episode(EpisodeKind::column_overflow, t);
  if (!brim && brims) open_episode(EpisodeKind::column_overflow, t);
}

void Engine::update_peaks(const Rates& r) {
  auto bump = [&](EpisodeKind kind, double q) {
    OpenEpisode& e = episodes_[static_cast<std::size_t>(kind)];
    if (e.open) e.peak = std::max(e.peak, q);
  };
  bump(EpisodeKind::cycle, r.release);
  bump(EpisodeKind::dribble, r.release);
  bump(EpisodeKind::overflow, r.overflow);
  bump(EpisodeKind::column_overflow, r.column_overflow);
}

Storage Engine::storage(const State& x) const {
  Storage s;
  s.roof_m3 = x[kRoof];
  s.reservoir_m3 = x[kReservoir];
  s.column_m3 = x[kColumn];
  s.battery_J = x[kBattery];
  return s;
}

Accounts Engine::accounts(const State& x) const {
  Accounts a = tally_;
  a.reservoir_overflow_m3 = x[kReservoirOverflow];
  a.release_m3 = x[kRelease];
  a.nozzle_m3 = x[kNozzle];
  a.jet_J = x[kJet];
  a.shaft_J = x[kShaft];
  a.accepted_J = x[kAccepted];
  a.stored_J = sc_.battery.charge_efficiency * x[kAccepted];
  a.curtailed_J = x[kCurtailed];
  a.served_J = x[kServed];
  a.unmet_J = x[kUnmet];
  return a;
}

Sample Engine::make_sample(Instant t, bool output, bool month_end) const {
  Sample s;
  s.time = t;
  s.totals = accounts(x_);
  s.storage = storage(x_);
  const Rates r = rates(x_, mode_, Forcing{});
  s.level_m = r.level_m;
  s.release = mode_.release;
  s.head_m = r.nozzle > 0.0 ? r.head_m : 0.0;
  s.power_W = r.electrical_W;
  s.soc = sc_.battery.capacity_J > 0.0 ? x_[kBattery] / sc_.battery.capacity_J : 0.0;
  s.output = output;
  s.month_end = month_end;
  return s;
}

void Engine::fail(const std::string& what, double t) const {
  std::ostringstream msg;
  msg.precision(6);
  msg << "simulation failed at "
      << format_iso8601(static_cast<Instant>(std::floor(t)), sc_.site.utc_offset_s)
      << " (t = " << std::fixed << t << " s): " << what << "; mode: release "
      << release_state_name(mode_.release) << (mode_.overflowing ? ", overflowing" : "")
      << (mode_.column == ColumnMode::full ? ", column brim-full" : "") << "; state: level "
      << geometry_.level_m(x_[kReservoir]) * 1e3 << " mm, reservoir " << x_[kReservoir] * 1e3
      << " L, roof " << x_[kRoof] * 1e3 << " L, column " << x_[kColumn] * 1e3 << " L, battery "
      << x_[kBattery] / kJoulesPerWh << " Wh";
  throw SimulationError(msg.str());
}

TimeSpan Engine::missing_from(Instant from, std::optional<Instant> end) {
  for (;;) {
    const std::vector<TimeSpan>& covered = rain_.covered();
    const auto next = std::upper_bound(covered.begin(), covered.end(), from,
                                       [](Instant t, const TimeSpan& c) { return t < c.start; });
    if (next != covered.end()) return {from, end ? std::min(next->start, *end) : next->start};
    if (rain_.complete()) return {from, end.value_or(covered.back().end)};
    rain_.need(rain_.final_before() + 1);
  }
}

void Engine::missing_data(const TimeSpan& gap, Instant start, Instant end) const {
  const std::vector<TimeSpan>& covered = rain_.covered();
  const int off = sc_.site.utc_offset_s;
  const bool before = gap.start == start && gap.start < covered.front().start;
  const bool after = gap.end == end && gap.start >= covered.back().end;
  const std::string field = before ? "simulation.start" : after ? "simulation.end" : "rain";
  throw InputError(sc_.file.string(), 0, field,
                   "the rain record has no data from " + format_iso8601(gap.start, off) + " to " +
                       format_iso8601(gap.end, off) +
                       "; move the period inside the record or set rain.gaps: zero or skip");
}

RunResult Engine::run() {
  rain_.need_data();
  if (rain_.covered().empty()) {
    throw InputError(sc_.file.string(), 0, "rain", "the rain record holds no data");
  }
  const Instant start = sc_.simulation.start.value_or(rain_.covered().front().start);
  // Without simulation.end the run ends with the record, which is known once it is complete.
  std::optional<Instant> end = sc_.simulation.end;
  const auto learn_end = [&] {
    if (!end && rain_.complete()) end = rain_.covered().back().end;
    if (end && *end <= start) {
      throw InputError(
          sc_.file.string(), 0, "simulation.end",
          "must be after simulation.start (" + format_iso8601(start, sc_.site.utc_offset_s) + ")");
    }
  };
  learn_end();
  const GapPolicy policy = rain_.policy();
  if (policy == GapPolicy::error && rain_.complete()) {
    // A whole record: time it does not cover is known before the run, and reported at once.
    Instant cursor = start;
    for (const TimeSpan& c : rain_.covered()) {
      if (c.end <= cursor) continue;
      if (c.start > cursor || cursor >= *end) break;
      cursor = c.end;
    }
    if (cursor < *end) missing_data(missing_from(cursor, end), start, *end);
  }

  result_.start = start;
  checker_.rtol = sc_.simulation.rtol;
  checker_.scale.fill(1e-3);  // m3 (1 L) for volumes, m (1 mm) for depth
  for (std::size_t i = kJet; i <= kUnmet; ++i) checker_.scale[i] = 1.0;  // J
  checker_.scale[kBattery] = 1.0;

  x_[kReservoir] = geometry_.volume_m3(sc_.reservoir.initial_level_m);
  x_[kBattery] = sc_.battery.initial_soc * sc_.battery.capacity_J;
  mode_.release = release_->initial_state(sc_.reservoir.initial_level_m);
  mode_.overflowing = sc_.reservoir.initial_level_m > geometry_.rim_m() + kHoldHead_m;
  mode_.generator_on = sc_.generator.cut_in_W <= 0.0;
  mode_.battery = battery_mode(x_[kBattery], 0.0, sc_.battery.load_W, sc_.battery);
  now_s_ = static_cast<double>(start);
  if (release_->is_running(mode_.release)) open_episode(EpisodeKind::cycle, now_s_);
  if (mode_.release == ReleaseState::dribble) open_episode(EpisodeKind::dribble, now_s_);
  if (mode_.overflowing) open_episode(EpisodeKind::overflow, now_s_);
  result_.initial = storage(x_);
  observer_.on_start(make_sample(start, false, false));

  const int off = sc_.site.utc_offset_s;
  const Instant output_step = std::max<Instant>(1, std::llround(sc_.simulation.output_interval_s));
  Instant next_output = start + output_step;
  const CivilTime c0 = to_civil(start, off);
  int month_year = c0.year;
  int month = c0.month;
  auto next_month_start = [&]() {
    int y = month_year, mo = month + 1;
    if (mo > 12) {
      mo = 1;
      ++y;
    }
    return month_start(y, mo, off);
  };
  Instant next_month = next_month_start();
  const bool hourly_load = sc_.battery.load_profile_W.size() == 24;

  std::size_t span = 0;  // the covered span at or after t
  Instant t = start;
  while (!end || t < *end) {
    if (options_.stop && options_.stop->load(std::memory_order_relaxed)) throw Interrupted();
    // The segment [t, next) ends at the first of: the end, an output, a month, a load hour, a
    // change of rain, a diverter reset, the edge of the record's data. The boundaries that do
    // not depend on the record come first; the record is then made final up to them, so that
    // how it arrives cannot move a boundary.
    Instant next = std::min(next_output, next_month);
    if (end) next = std::min(next, *end);
    Forcing f;
    if (hourly_load) {
      const Instant hour = (t + off) - ((t + off) % 3600 + 3600) % 3600 + 3600 - off;
      next = std::min(next, hour);
      f.load_W = battery_load_W(sc_.battery, to_civil(t, off).hour);
    } else {
      f.load_W = sc_.battery.load_W;
    }
    rain_.need(next);
    learn_end();
    if (end) next = std::min(next, *end);

    const std::span<const RainPulse> pulses = rain_.pulses_from(t);
    if (!pulses.empty() && pulses.front().start <= t) {
      const RainPulse& p = pulses.front();
      f.rain_m_per_s = intensity_m_per_s(p);
      // Back-to-back intervals of the same intensity are one forcing: no solver restart between.
      std::size_t last = 0;
      while (last + 1 < pulses.size() && pulses[last].end < next &&
             pulses[last + 1].start == pulses[last].end &&
             intensity_m_per_s(pulses[last + 1]) == f.rain_m_per_s) {
        ++last;
      }
      next = std::min(next, pulses[last].end);
    } else if (!pulses.empty()) {
      next = std::min(next, pulses.front().start);
    }
    if (sc_.first_flush.volume_m3 > 0.0 && x_[kFlush] > 0.0 && f.rain_m_per_s == 0.0) {
      const double reset_at = last_wet_s_ + sc_.first_flush.reset_after_dry_s;
      const Instant reset = static_cast<Instant>(std::ceil(reset_at));
      if (reset <= t) {
        // The diverter has drained to waste: the next event is diverted afresh.
        x_[kFlush] = 0.0;
        mode_.flush_full = false;
      } else {
        next = std::min(next, reset);
      }
    }

    bool frozen = false;
    if (policy != GapPolicy::zero) {
      const std::vector<TimeSpan>& covered = rain_.covered();
      while (span < covered.size() && covered[span].end <= t) ++span;
      if (span < covered.size() && covered[span].start <= t) {
        next = std::min(next, covered[span].end);
      } else {
        const TimeSpan gap = missing_from(t, end);
        if (policy == GapPolicy::error) {
          learn_end();
          missing_data(gap, start, *end);
        }
        frozen = true;
        next = std::min(next, gap.end);
      }
    }
    if (frozen) {
      result_.stats.skipped_s += static_cast<double>(next - t);
    } else {
      advance(t, next, f);
    }
    t = next;
    now_s_ = static_cast<double>(t);
    if (!end && rain_.final_before() <= t) {
      rain_.need(t + 1);
      learn_end();
    }
    const bool is_end = end && t >= *end;
    const bool is_output = t >= next_output || is_end;
    const bool is_month = t >= next_month || is_end;
    if (is_output || is_month) {
      if (is_end) {
        for (std::size_t k = 0; k < episodes_.size(); ++k) {
          close_episode(static_cast<EpisodeKind>(k), now_s_);
        }
      }
      observer_.on_sample(make_sample(t, is_output, is_month));
    }
    while (next_output <= t) next_output += output_step;
    if (t >= next_month) {
      const CivilTime c = to_civil(t, off);
      month_year = c.year;
      month = c.month;
      next_month = next_month_start();
    }
  }
  result_.end = *end;

  result_.totals = accounts(x_);
  result_.final = storage(x_);
  const Accounts& a = result_.totals;
  const double out = a.roof_loss_m3 + a.first_flush_m3 + a.reservoir_overflow_m3 +
                     a.column_overflow_m3 + a.nozzle_m3;
  const double stored = result_.final.water_m3() - result_.initial.water_m3();
  result_.balance_error_m3 = a.rain_m3 - out - stored;
  const double scale = std::max({a.rain_m3, std::abs(result_.initial.water_m3()), 1e-9});
  result_.balance_relative_error = std::abs(result_.balance_error_m3) / scale;
  if (!(result_.balance_relative_error <= kMaxBalanceError)) {
    std::ostringstream msg;
    msg << "the water balance does not close: error " << result_.balance_error_m3 * 1e3 << " L of "
        << a.rain_m3 * 1e3 << " L rain (relative " << result_.balance_relative_error << ", limit "
        << kMaxBalanceError << ")";
    fail(msg.str(), now_s_);
  }
  return result_;
}

}  // namespace
}  // namespace detail

RunResult simulate(const Scenario& scenario, RainView& rain, Observer& observer,
                   const RunOptions& options) {
  detail::Engine engine(scenario, rain, observer, options);
  return engine.run();
}

RunResult simulate(const Scenario& scenario, const RainSeries& rain, Observer& observer,
                   const RunOptions& options) {
  RainView view(rain);
  return simulate(scenario, view, observer, options);
}

}  // namespace gutterwatt
