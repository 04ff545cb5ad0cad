#include "gutterwatt/stepper.hpp"

#include <algorithm>
#include <boost/numeric/odeint/stepper/runge_kutta4.hpp>
#include <cmath>
#include <limits>
#include <sstream>
#include <utility>

#include "gutterwatt/dormand_prince.hpp"
#include "gutterwatt/error.hpp"

namespace gutterwatt {
namespace {

namespace odeint = boost::numeric::odeint;

// Error norm with a scale per slot: err_i / (rtol (scale_i + |x_i| + dt |dxdt_i|)), the odeint
// default checker's form with per-slot absolute tolerances. The solver's reservoir slot holds the
// water less the roof's inflow since the segment began (Stepper::to_solver); its error is judged
// against the water itself, `offset_m3` (that inflow at the step's start) added back.
struct ScaledErrorChecker {
  double rtol = 1e-6;
  ChainState scale{};
  const double* offset_m3 = nullptr;

  double operator()(const ChainState& x_old, const ChainState& dxdt_old, const ChainState& x_err,
                    double dt) const {
    double worst = 0.0;
    for (std::size_t i = 0; i < kSlots; ++i) {
      const double size = i == kReservoir ? std::abs(x_old[i] + *offset_m3) : std::abs(x_old[i]);
      const double tol = rtol * (scale[i] + size + dt * std::abs(dxdt_old[i]));
      worst = std::max(worst, std::abs(x_err[i]) / tol);
    }
    return worst;
  }
};

using Dense = DormandPrince<kSlots, ScaledErrorChecker>;

// The solver's linear reference (DormandPrince::Reference) is the reservoir's: its outflow linear
// in its water, its inflow the roof's. The flows out of it are sloped by the same secant, so that
// the reservoir's balance holds; the nozzle takes the release's slope, so that the head column's
// holds (its water, the column's overflow and the battery are not sloped: in the modes where the
// nozzle does not pass the release on, the column's rate is release less nozzle, and the
// difference of their references is then the column's, 0).
constexpr std::array<std::size_t, 3> kReservoirOutflows = {kRelease, kReservoirOverflow,
                                                           kEvaporation};
constexpr std::array<std::array<std::size_t, 2>, 1> kSlopedAlike = {{{kNozzle, kRelease}}};

// Largest solver step while it rains: a switch that happens and un-happens within one step is
// looked for only where the reservoir's level turns, and rain can start and stop an overflow
// within minutes.
constexpr double kMaxWetStep_s = 120.0;
// Without rain the flows decay or drain; the one exception, a release cycle still running, moves
// on a time scale of a minute, which keeps the error-controlled steps far shorter than this.
constexpr double kMaxDryStep_s = 1800.0;
constexpr int kMaxSwitchesAtOnce = 16;
// Steps one segment may take before the run counts as stalled: a segment is at most an output
// interval or a month long and needs a few hundred steps even through a storm.
constexpr long kMaxStepsPerSegment = 100000;

// The first point of the trace's grid after `t` (absolute seconds).
double next_trace_time(double t) { return (std::floor(t / kTraceStep_s) + 1.0) * kTraceStep_s; }

// A bracket [lo, hi] of a zero of g, with g(lo) = g_lo >= 0 > g(hi) = g_hi.
struct Bracket {
  double lo, hi, g_lo, g_hi;
};

// Where g falls below zero within `b`: Illinois regula falsi (Dowell & Jarratt 1971) to a bracket
// narrower than `width`. Bisection takes over when an interpolated point falls outside the
// bracket, and after 60 tries.
template <class G>
Bracket narrow_to_zero(const G& g, Bracket b, double width) {
  int side = 0;
  for (int iter = 0; b.hi - b.lo > width; ++iter) {
    double mid =
        iter < 60 ? b.hi - b.g_hi * (b.hi - b.lo) / (b.g_hi - b.g_lo) : 0.5 * (b.lo + b.hi);
    if (!(mid > b.lo && mid < b.hi)) mid = 0.5 * (b.lo + b.hi);
    const double g_mid = g(mid);
    if (g_mid < 0.0) {
      b.hi = mid;
      b.g_hi = g_mid;
      if (side == -1) b.g_lo *= 0.5;
      side = -1;
    } else {
      b.lo = mid;
      b.g_lo = g_mid;
      if (side == 1) b.g_hi *= 0.5;
      side = 1;
    }
  }
  return b;
}

// How closely the reservoir's level turning inside a step is placed, as a share of the step, to
// look at the guards there, and to take an episode's peak there. The level and the flows are flat
// where it turns, so they are found to about the square of this.
constexpr double kTurnScreening = 0.05;
constexpr double kPeakPlacing = 1e-4;

// How far beyond the step's ends the level goes where it turns inside the step (m3): the larger of
// its rise over the start and over the end were the net inflow linear in time between its values
// at the ends, `rise_start` and `rise_end` (m3/s, of opposite signs), over the step `dt`.
double turn_reach_m3(double rise_start, double rise_end, double dt) {
  const double at = rise_start / (rise_start - rise_end);  // where the line crosses zero
  return 0.5 * dt * std::max(std::abs(rise_start) * at, std::abs(rise_end) * (1.0 - at));
}

// Whether a guard at or above zero at both ends of a step, `g_start` and `g_end`, where the
// reservoir holds `v_start` and `v_end`, may fall below zero where the level turns `reach_m3`
// beyond them: one may, were it a function of the level changing at the rate it changed over the
// step, within kReachMargin times that. A screen, not a bound: a guard that changes faster there,
// or with other slots, can pass it.
constexpr double kReachMargin = 4.0;
bool may_dip_at_turn(const Guards& g_start, const Guards& g_end, double v_start, double v_end,
                     double reach_m3) {
  for (int k = 0; k < kGuardCount; ++k) {
    if (g_start[k] >= 0.0 && g_end[k] >= 0.0 &&
        std::min(g_start[k], g_end[k]) * std::abs(v_end - v_start) <
            kReachMargin * std::abs(g_end[k] - g_start[k]) * reach_m3) {
      return true;
    }
  }
  return false;
}

// Where a guard that is the larger of two terms, `start` and `end` at the ends of a step over
// [t0, t1], falls below zero between them with both ends at or above zero: the term larger at the
// start falls below zero while the other has yet to rise above it (a head column's puddle
// draining while a dribble grows). Looked at just past where that term crosses zero, when the
// other starts below zero; each term is taken to change one way within the step, as the level is
// where it does not turn. `terms_at(t)` gives both terms at t. NaN where no dip is found.
struct TermsDip {
  double t = std::numeric_limits<double>::quiet_NaN();
  double g = 0.0;  // the guard there, below zero
};
template <class TermsAt>
TermsDip dip_of_larger_term(const TermsAt& terms_at, double t0, double t1,
                            const std::array<double, 2>& start, const std::array<double, 2>& end) {
  const std::size_t lead = start[0] >= start[1] ? 0 : 1;
  if (!(end[lead] < 0.0 && start[1 - lead] < 0.0)) return {};
  const Bracket crossed = narrow_to_zero([&](double t) { return terms_at(t)[lead]; },
                                         {t0, t1, start[lead], end[lead]}, 1e-10);
  const std::array<double, 2> there = terms_at(crossed.hi);
  if (!(there[1 - lead] < 0.0)) return {};
  return {crossed.hi, std::max(there[0], there[1])};
}

// The earliest guard that crosses zero within a step over [t0, t1], and where: one at or above
// zero at the start (`g_start`) and below zero at the end (`g_end`) or at a point inside it
// (`inside_t`, NaN where none is known, its value there `inside_g`). `guard_at(k, t)` is guard k
// on the dense output at t. Placed to 1e-10 s, not rounded to a step: the accounts it splits move
// by less than 1e-9 of their size. {-1, t1} where none crosses.
template <class GuardAt>
std::pair<int, double> earliest_switch(const Guards& g_start, const Guards& g_end,
                                       const std::array<double, kGuardCount>& inside_t,
                                       const Guards& inside_g, double t0, double t1,
                                       const GuardAt& guard_at) {
  int first = -1;
  double t_switch = t1;
  for (int k = 0; k < kGuardCount; ++k) {
    const bool dips = !std::isnan(inside_t[k]);
    if (!(g_start[k] >= 0.0 && (g_end[k] < 0.0 || dips))) continue;
    const auto guard_k = [&](double t) { return guard_at(k, t); };
    double hi = t_switch;
    double g_hi;
    if (dips && inside_t[k] < t_switch) {
      hi = inside_t[k];
      g_hi = inside_g[k];
    } else {
      // At the step's end the guard is known; before an earlier switch it must be looked up.
      g_hi = hi == t1 ? g_end[k] : guard_k(hi);
    }
    if (g_hi >= 0.0) continue;  // crosses only after an earlier switch
    t_switch = narrow_to_zero(guard_k, {t0, hi, g_start[k], g_hi}, 1e-10).hi;
    first = k;
  }
  return {first, t_switch};
}

// The trickle's column water's substeps (follow_trickle_water) hold their error estimate, relative
// to the trickle volume and the water, to 1,000 times the run's tolerance `rtol` but no looser
// than 1e-4 (100 times the default's). A project choice: the water matters to the energy only
// through what the column holds when it fills again. Held to the run's tolerance, to 100 times it
// or to 1,000 times it, the first year's energy of the bench's demo-like, 30 mm column and rtol
// 1e-8 designs is the same to 1e-7; at rtol 1e-8, 1,000 takes 4 % fewer instructions than 100. A
// fixed 1e-4 would hold the energy at rtol 1e-10 to about 2e-7 of the fixed-step reference; tied
// to the tolerance it converges with it.
double trickle_water_tolerance(double rtol) { return std::min(1e-4, 1000.0 * rtol); }

// A step's release is handed to the trickle water (follow_trickle_along) as the quadratic through
// its ends with its mean where that departs from the dense output by no more than this many times
// the trickle water's tolerance, relative to the flow; else the step is halved. A project choice,
// measured on the bench's first year against the 0.05 s fixed-step reference (38,934.6816 J):
// the electrical energy 5.7e-7 low at rtol 1e-6 and 1.3e-7 low at 1e-8. At once the tolerance,
// about 1.4e-6 high and the rtol 1e-8 run half again as long; never halved, 1.1e-5 low (the steps
// on the linear reference are up to 120 s long, over which the release is not a quadratic).
constexpr double kTrickleInflowFit = 10.0;

}  // namespace

Stepper::Stepper(const ChainSystem& system, Ledger& ledger, const RunOptions& options)
    : system_(system),
      ledger_(ledger),
      options_(options),
      x_(system.initial_state()),
      mode_(system.initial_mode(x_)),
      trickle_rtol_(trickle_water_tolerance(system.scenario().simulation.rtol)) {
  error_scale_.fill(1e-3);  // m3 (1 L) for volumes, m (1 mm) for depth
  for (std::size_t i = kJet; i <= kSelfDischarge; ++i) error_scale_[i] = 1.0;  // J
  error_scale_[kBattery] = 1.0;
}

void Stepper::fail(const std::string& what, double t) const {
  std::ostringstream msg;
  msg.precision(6);
  msg << "simulation failed at "
      << format_iso8601(static_cast<Instant>(std::floor(t)), system_.scenario().site.zone)
      << " (t = " << std::fixed << t << " s): " << what << "; " << system_.describe(x_, mode_);
  throw SimulationError(msg.str());
}

bool Stepper::step_end_current(const Forcing& f) const {
  const StepEnd& e = step_end_;
  return e.valid && e.x == x_ && e.mode == mode_ && e.load_W == f.load_W &&
         e.evaporation_m_per_s == f.evaporation_m_per_s;
}

// Applies every switch whose guard is already below zero, so the mode matches the state.
// The rates and guards do not read the rain: at the start of a segment that follows a step ended
// without a switch, in the same state, mode, load and evaporation, they are that step's.
ChainRates Stepper::settle(const Forcing& f, Guards& g, ChainState& dxdt) {
  const bool reuse = step_end_current(f);
  step_end_.valid = false;
  for (int pass = 0; pass < kMaxSwitchesAtOnce; ++pass) {
    ChainRates r;
    if (pass == 0 && reuse) {
      r = step_end_.r;
      dxdt = step_end_.dxdt;
      g = step_end_.g;
    } else {
      system_.rates(x_, mode_, f, r, dxdt);
      system_.guards(x_, mode_, f, r, g);
    }
    int fired = -1;
    for (int k = 0; k < kGuardCount; ++k) {
      if (g[k] < 0.0) {
        fired = k;
        break;
      }
    }
    if (fired < 0) {
      trickle_inflow_m3_per_s_ = r.release;
      return r;
    }
    switch_mode(fired, f, r);
  }
  fail("the modes do not settle (switches chatter)", now_s_);
}

// A span at rest in closed form: the release passes nothing and cannot start to, so the rest of
// the chain is linear. The reservoir takes what the roof stage hands it (RoofSpan) and the
// battery serves the load (battery_at_rest).
void Stepper::coast(double t, double span, const Forcing& f) {
  const Scenario& sc = system_.scenario();
  step_end_.valid = false;
  if (moving_) {
    // The chain comes to rest: the trace's last point before its pause.
    moving_ = false;
    trace_now(f);
  }
  const double dt = span - t;
  follow_trickle_water(x_, StepInflow{}, dt);
  x_[kReservoir] += roof_->to_reservoir_m3(span) - roof_->to_reservoir_m3(t);
  ChainSystem::set_roof(roof_->stores(span), x_);
  evaporate_at_rest(dt, f);
  const BatteryRest rest =
      battery_at_rest(x_[kBattery], f.load_W, dt, sc.battery, mode_.battery == BatteryMode::empty);
  x_[kBattery] = rest.energy_J;
  x_[kServed] += rest.drawn_J;
  x_[kDrawn] += rest.drawn_J;
  x_[kUnmet] += rest.unmet_J;
  x_[kSelfDischarge] += rest.self_discharge_J;
  ledger_.tally_battery(rest);
  mode_.battery = battery_mode(x_[kBattery], 0.0, f.load_W, sc.battery, mode_.battery);
  stats_.coasted_s += dt;
  ledger_.follow_standing(system_.level_m(x_), mode_, now_s_ + dt);
}

void Stepper::trace_now(const Forcing& f) const {
  if (ledger_.tracing()) ledger_.trace_state(now_s_, mode_, x_, f);
}

ChainState Stepper::to_solver(const ChainState& x, double t) const {
  ChainState w = x;
  w[kReservoir] -= roof_->to_reservoir_m3(t);
  return w;
}

void Stepper::from_solver(const ChainState& w, double t, ChainState& x) const {
  x = w;
  x[kReservoir] += roof_->to_reservoir_m3(t);
  ChainSystem::set_roof(roof_->stores(t), x);
}

// Evaporation over a span at rest, after the span's inflow: dV/dt = -E A(V), by the midpoint
// rule (second order) in sub-steps of at most an hour, never more than the water held. The level
// at rest moves by millimetres a day, so an hour's midpoint step is far within the run's
// tolerance; the water removed is exactly what is counted, so the balance still closes.
void Stepper::evaporate_at_rest(double dt, const Forcing& f) {
  if (f.evaporation_m_per_s <= 0.0) return;
  constexpr double kMaxSubstep_s = 3600.0;
  const int n = std::max(1, static_cast<int>(std::ceil(dt / kMaxSubstep_s)));
  const double h = dt / n;
  for (int i = 0; i < n; ++i) {
    const double v = x_[kReservoir];
    const double half = v - 0.5 * h * system_.evaporation_m3_per_s(v, f);
    const double lost = std::min(v, h * system_.evaporation_m3_per_s(half, f));
    x_[kReservoir] -= lost;
    x_[kEvaporation] += lost;
  }
}

void Stepper::integrate(double t0, double t1, const Forcing& f) {
  // The last stage of a Dormand-Prince step is evaluated at the step's end state (FSAL); keeping
  // its rates spares the guard evaluation there a second call of the whole chain. The stage's
  // time tells it apart: it is evaluated last, at the time the step ends.
  // After a restart the stepper is handed the derivative at the state it starts from, which the
  // engine has just computed (settling the modes, or as the last stage of the step before).
  ChainRates last;
  double last_t = std::numeric_limits<double>::quiet_NaN();
  const RoofSpan& roof = *roof_;
  // The engine's state at a stage: the rates read kReadSlots alone, so only those are set (the
  // stepper writes no other slot of a stage either).
  ChainState stage = x_;
  const auto system = [&](const ChainState& w, ChainState& dxdt, double t) {
    for (std::size_t i : kReadSlots) stage[i] = w[i];
    stage[kReservoir] += roof.to_reservoir_m3(t);
    system_.rates(stage, mode_, f, last, dxdt);
    last_t = t;
  };
  const double span = t1 - t0;
  double t = 0.0;  // time within the segment, for precision
  const double max_step = f.rain_m_per_s > 0.0 ? kMaxWetStep_s : kMaxDryStep_s;
  double offset_m3 = 0.0;
  const ScaledErrorChecker checker{system_.scenario().simulation.rtol, error_scale_, &offset_m3};
  Dense stepper(kReadSlots, checker, max_step,
                {kReservoir, kReservoirOutflows, kSlopedAlike, &slopes_});
  // The engine's state at `tau` within the last step, in the slots the rates and guards read
  // (the others are not needed there, nor the roof's stores): for the guards' zeros and the
  // trace's grid.
  ChainState probe = x_;
  const auto read_state_at = [&](double tau) -> const ChainState& {
    stepper.calc_read_state(tau, probe);
    probe[kReservoir] += roof.to_reservoir_m3(tau);
    return probe;
  };
  bool fresh = true;
  long segment_steps = 0;
  Guards g_prev{};
  // The terms of the trickle guard where the step now starting starts (trickle_guard_terms).
  std::array<double, 2> trickle_terms_prev{};
  // The reservoir's net inflow where the last step ended (NaN: not known).
  constexpr double kUnknown = std::numeric_limits<double>::quiet_NaN();
  double rise_before = kUnknown;
  while (t < span) {
    if (coasted_to_end(t, span, f)) return;
    if (!moving_) {
      moving_ = true;
      trace_now(f);
    }
    if (fresh) {
      rise_before = kUnknown;
      ChainState dxdt;
      last = settle(f, g_prev, dxdt);
      if (mode_.column == ColumnMode::partial) {
        trickle_terms_prev = system_.trickle_guard_terms(x_, last);
      }
      ledger_.update_peaks(last);
      stepper.initialize(to_solver(x_, t), t, std::min(last_step_s_, span - t), &dxdt);
      fresh = false;
    } else if (stepper.current_time() + stepper.current_time_step() > span) {
      // The last stage of the step just taken is the derivative here.
      const ChainState dxdt = stepper.current_deriv();
      stepper.initialize(to_solver(x_, t), t, span - t, &dxdt);
    }
    offset_m3 = roof.to_reservoir_m3(t);
    const std::array<double, 2> trend = roof.inflow_trend(t);
    stepper.set_inflow(roof.to_reservoir_m3_per_s(t), trend[0], trend[1]);
    std::pair<double, double> step;
    try {
      step = stepper.do_step(system);
    } catch (const StepSizeError& e) {
      fail(std::string("the solver made no progress (") + e.what() + ")", t0 + t);
    }
    ++stats_.steps;
    if (++segment_steps > kMaxStepsPerSegment) {
      fail("the solver made no progress (" + std::to_string(kMaxStepsPerSegment) +
               " steps in one segment)",
           t0 + t);
    }
    double t_end = std::min(step.second, span);
    ChainState x_end;
    ChainRates r;
    ChainState w_end;
    const bool fsal_end = t_end == step.second && last_t == step.second;
    if (fsal_end) {
      from_solver(stepper.current_state(), t_end, x_end);
      r = last;
    } else {
      stepper.calc_state(t_end, w_end);
      from_solver(w_end, t_end, x_end);
      r = system_.rates(x_end, mode_, f);
    }
    Guards g_end;
    system_.guards(x_end, mode_, f, r, g_end);

    // Where the reservoir's level turns inside the step, where the dense output's net inflow (its
    // rate of change, plus the roof's inflow) changes sign: its highest or lowest point, where a
    // switch can happen and un-happen between the step's ends. The net inflow where the step
    // starts is where the last one ended, unless the solver restarted.
    const auto rise_at = [&](double tau) {
      return stepper.calc_rate(tau, kReservoir) + roof.to_reservoir_m3_per_s(tau);
    };
    const double rise_end = rise_at(t_end);
    const double rise_start = std::isnan(rise_before) ? rise_at(step.first) : rise_before;
    rise_before = rise_end;
    const bool peaks = rise_start > 0.0 && rise_end < 0.0;
    const bool trough = rise_start < 0.0 && rise_end > 0.0;
    // The guards are looked at where the level turns, located roughly (kTurnScreening), when one
    // may fall below zero there. `turn_at` brackets the turn: the whole step, or narrowed so.
    const double sign = peaks ? 1.0 : -1.0;
    const auto net = [&](double tau) { return sign * rise_at(tau); };
    const double width = t_end - step.first;
    Bracket turn_at{step.first, t_end, sign * rise_start, sign * rise_end};
    // A point inside the step where a guard at or above zero at both ends is below zero (NaN
    // where none is known), and its value there.
    std::array<double, kGuardCount> inside_t;
    inside_t.fill(kUnknown);
    Guards inside_g{};
    if ((peaks || trough) && may_dip_at_turn(g_prev, g_end, x_[kReservoir], x_end[kReservoir],
                                             turn_reach_m3(rise_start, rise_end, width))) {
      turn_at = narrow_to_zero(net, turn_at, kTurnScreening * width);
      const ChainState& xs = read_state_at(turn_at.hi);
      system_.guards(xs, mode_, f, system_.rates(xs, mode_, f), inside_g);
      for (int k = 0; k < kGuardCount; ++k) {
        if (inside_g[k] < 0.0) inside_t[k] = turn_at.hi;
      }
    }
    // The trickle guard, the larger of two terms, can dip with both ends above zero.
    const bool partial = mode_.column == ColumnMode::partial;
    const std::array<double, 2> trickle_terms =
        partial ? system_.trickle_guard_terms(x_end, r) : std::array<double, 2>{};
    if (partial && g_prev[kGuardTrickle] >= 0.0 && g_end[kGuardTrickle] >= 0.0 &&
        std::isnan(inside_t[kGuardTrickle])) {
      const auto terms_at = [&](double tau) {
        const ChainState& xs = read_state_at(tau);
        return system_.trickle_guard_terms(xs, system_.rates(xs, mode_, f));
      };
      const TermsDip dip =
          dip_of_larger_term(terms_at, step.first, t_end, trickle_terms_prev, trickle_terms);
      inside_t[kGuardTrickle] = dip.t;
      inside_g[kGuardTrickle] = dip.g;
    }

    // Earliest guard that crossed zero within the step, located on the dense output: one below
    // zero at the step's end, or only inside the step.
    const auto guard_at = [&](int k, double tau) {
      const ChainState& xs = read_state_at(tau);
      Guards gs;
      system_.guards(xs, mode_, f, system_.rates(xs, mode_, f), gs);
      return gs[k];
    };
    const auto [first, t_switch] =
        earliest_switch(g_prev, g_end, inside_t, inside_g, step.first, t_end, guard_at);
    if (first >= 0) {
      t_end = t_switch;
      stepper.calc_state(t_end, w_end);
      from_solver(w_end, t_end, x_end);
      r = system_.rates(x_end, mode_, f);
    }
    // Every flow an episode follows rises with the reservoir's level, so where the level peaks
    // inside the step, so do they: an episode's peak flow does not depend on where the steps fall.
    // The peak is placed closely (kPeakPlacing) while an episode's peak may still rise there: the
    // level inside the step is at most where it started plus what the roof hands it meanwhile
    // (every outflow is >= 0), and no higher than an episode's highest so far, its peak cannot
    // rise. Before a switch the level rises up to it (it turns once in the step at most, as the
    // search above assumes), and the step's end counts.
    if (peaks && ledger_.following_peaks() &&
        ledger_.peak_may_rise(system_.level_m(x_[kReservoir] + roof.to_reservoir_m3(t_end) -
                                              roof.to_reservoir_m3(step.first)))) {
      const double peak = narrow_to_zero(net, turn_at, kPeakPlacing * width).hi;
      if (peak < t_end) ledger_.update_peaks(system_.rates(read_state_at(peak), mode_, f));
    }
    if (ledger_.tracing()) {
      // The trace's grid points within the step, on the dense output, their rates left to the
      // observer; one at the step's end (a segment's end, on a record of whole minutes) takes the
      // rates worked out there.
      for (double g = next_trace_time(t0 + t); g <= t0 + t_end; g += kTraceStep_s) {
        if (g == t0 + t_end) {
          ledger_.trace(g, mode_, r);
        } else {
          ledger_.trace_state(g, mode_, read_state_at(g - t0), f);
        }
      }
    }
    const ReleaseAlong along{t, [&](double tau) { return stepper.calc_rate(tau, kRelease); },
                             [&](double tau) { return stepper.calc_slot(tau, kRelease); }};
    const bool moved = accept_step(x_end, t_end - t, r, first, f, t0 + t_end, &along);
    t = t_end;
    if (first >= 0) {
      fresh = true;
    } else {
      g_prev = g_end;
      trickle_terms_prev = trickle_terms;
      if (moved && step.second <= span) {
        // The column's water, which the solver carries unchanged while it trickles, was moved
        // beside it: the solver goes on from the engine's state, its step and derivative kept
        // (no rate reads that water).
        const ChainState dxdt = stepper.current_deriv();
        stepper.initialize(to_solver(x_, t), t, stepper.current_time_step(), &dxdt);
      }
      if (t == span && fsal_end) {
        step_end_ = StepEnd{
            true, x_, mode_, f.load_W, f.evaporation_m_per_s, r, stepper.current_deriv(), g_end};
      }
      if (step.second > span) break;
    }
    last_step_s_ = std::max(1e-3, stepper.current_time_step());
  }
}

// Before each step at `t` within a segment of length `span`: stops on request, and ends the
// segment in closed form once it is at rest.
bool Stepper::coasted_to_end(double t, double span, const Forcing& f) {
  if (options_.stop && options_.stop->load(std::memory_order_relaxed)) throw Interrupted();
  // The water arriving is asked for only where the mode allows rest: while the release runs or
  // dribbles (most steps) it is not at rest whatever arrives.
  const double capacity = system_.rest_capacity_m3(x_, mode_);
  if (capacity < 0.0) return false;
  const double arriving = roof_->to_reservoir_m3(span) - roof_->to_reservoir_m3(t);
  if (!(x_[kReservoir] + arriving <= capacity)) return false;
  coast(t, span, f);
  return true;
}

// Makes the state at the end of a step (or at the switch `fired` inside it, -1 for none), reached
// at absolute time `t_abs` after `dt`, the engine's state, and applies the switch.
bool Stepper::accept_step(const ChainState& x_end, double dt, const ChainRates& r, int fired,
                          const Forcing& f, double t_abs, const ReleaseAlong* along) {
  for (double v : x_end) {
    if (!std::isfinite(v)) {
      x_ = x_end;
      fail("the state is not finite", t_abs);
    }
  }
  ChainState x1 = x_end;
  const bool moved =
      along ? follow_trickle_along(x1, *along, 0, {trickle_inflow_m3_per_s_, x_[kRelease]},
                                   {r.release, x_end[kRelease]}, dt)
            : follow_trickle_water(
                  x1,
                  StepInflow{trickle_inflow_m3_per_s_, r.release,
                             dt > 0.0 ? (x_end[kRelease] - x_[kRelease]) / dt : r.release},
                  dt);
  ledger_.tally_step(x_, x1, dt, mode_);
  x_ = x1;
  now_s_ = t_abs;
  trickle_inflow_m3_per_s_ = r.release;
  ledger_.update_peaks(r);
  if (fired >= 0) switch_mode(fired, f, r);
  ledger_.follow_standing(r.level_m, mode_, t_abs);
  return moved;
}

// The trickle's column water over the step from `a` within it to `a + dt`, the release's flow and
// account known at both ends (`start`, `end`). The trickle water takes the release over a span as
// the quadratic through its ends with its mean; where that departs from the dense output's flow at
// a quarter or three quarters of the span by more than the trickle's tolerance (relative to the
// flow), the span is halved, so that a long step on the linear reference, over which the release
// follows the reservoir's changes, is followed as closely as short ones.
bool Stepper::follow_trickle_along(ChainState& x, const ReleaseAlong& along, int depth,
                                   std::array<double, 2> start, std::array<double, 2> end,
                                   double dt, double a) {
  if (!system_.plant().has_column() || mode_.column != ColumnMode::trickle || !(dt > 0.0)) {
    return false;
  }
  const StepInflow inflow{start[0], end[0], (end[1] - start[1]) / dt};
  constexpr int kMaxHalvings = 8;
  const bool none = start[0] <= 0.0 && end[0] <= 0.0 && inflow.mean_m3_per_s <= 0.0;
  if (depth < kMaxHalvings && !none) {
    const double b = 6.0 * (inflow.mean_m3_per_s - 0.5 * (start[0] + end[0]));
    const double slope = end[0] - start[0] + b;
    // A cubic departure is opposite at a quarter and three quarters, a quartic alike: one of
    // them is looked at.
    {
      constexpr double u = 0.25;
      const double quadratic = start[0] + (slope - b * u) * u;
      const double dense = along.flow(along.step_start + a + u * dt);
      if (std::abs(quadratic - dense) >
          kTrickleInflowFit * trickle_rtol_ * (std::abs(inflow.mean_m3_per_s) + std::abs(dense))) {
        const double t_mid = along.step_start + a + 0.5 * dt;
        const std::array<double, 2> mid = {along.flow(t_mid), along.passed(t_mid)};
        const bool first = follow_trickle_along(x, along, depth + 1, start, mid, 0.5 * dt, a);
        const bool second =
            follow_trickle_along(x, along, depth + 1, mid, end, 0.5 * dt, a + 0.5 * dt);
        return first || second;
      }
    }
  }
  return follow_trickle_water(x, inflow, dt);
}

// The trickle's column water (column_trickle.hpp) over `dt` under `inflow`, the water it gains or
// loses taken from or given to the nozzle's account, so the balance holds.
bool Stepper::follow_trickle_water(ChainState& x, const StepInflow& inflow, double dt) {
  if (!system_.plant().has_column() || mode_.column != ColumnMode::trickle) return false;
  const TrickleWater after =
      trickle_water_after(system_.plant(), x[kColumn], inflow, dt, trickle_rtol_,
                          system_.trickle_volume_m3(), trickle_substep_s_);
  trickle_substep_s_ = after.substep_s;
  if (after.volume_m3 == x[kColumn]) return false;
  x[kNozzle] -= after.volume_m3 - x[kColumn];
  x[kColumn] = after.volume_m3;
  return true;
}

void Stepper::switch_mode(int k, const Forcing& f, const ChainRates& r) {
  slopes_.fill(0.0);  // another law: the solver's first step after it takes no slope
  const ChainMode before = mode_;
  if (ledger_.tracing()) ledger_.trace(now_s_, mode_, r);
  const double spilled_m3 = system_.apply_switch(k, x_, mode_, f, r);
  ++stats_.switches;
  ledger_.switched(before, mode_, x_, spilled_m3, now_s_);
  trace_now(f);
}

// The reference integration: classic Runge-Kutta (Kutta 1901) at a fixed step, every switch
// placed by bisection, re-taking the step from its start with a shorter step each time.
void Stepper::integrate_fixed(double t0, double t1, const Forcing& f) {
  odeint::runge_kutta4<ChainState, double, ChainState, double, odeint::array_algebra> rk4;
  const auto system = [this, &f](const ChainState& w, ChainState& dxdt, double t) {
    ChainState x = w;
    x[kReservoir] += roof_->to_reservoir_m3(t);
    ChainRates r;
    system_.rates(x, mode_, f, r, dxdt);
  };
  const double span = t1 - t0;
  double t = 0.0;
  const auto step_to = [&](double h) {
    ChainState out, x;
    rk4.do_step(system, to_solver(x_, t), t, out, h);
    from_solver(out, t + h, x);
    return x;
  };
  bool fresh = true;
  Guards g_prev{};
  while (t < span) {
    if (coasted_to_end(t, span, f)) return;
    if (fresh) {
      ChainState dxdt;
      ledger_.update_peaks(settle(f, g_prev, dxdt));
      fresh = false;
    }
    double h = std::min(options_.fixed_step_s, span - t);
    ChainState x_end = step_to(h);
    ++stats_.steps;
    ChainRates r = system_.rates(x_end, mode_, f);
    Guards g_end;
    system_.guards(x_end, mode_, f, r, g_end);
    int first = -1;
    for (int k = 0; k < kGuardCount; ++k) {
      if (!(g_prev[k] >= 0.0 && g_end[k] < 0.0)) continue;
      double lo = 0.0, hi = h;
      const auto guard_at = [&](double tau) {
        const ChainState xs = step_to(tau);
        Guards gs;
        system_.guards(xs, mode_, f, system_.rates(xs, mode_, f), gs);
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
      r = system_.rates(x_end, mode_, f);
    }
    const double t_next = t + h;
    // The reference's trace: the step's end, when it passes a point of the grid.
    if (ledger_.tracing() && next_trace_time(t0 + t) <= t0 + t_next) {
      ledger_.trace(t0 + t_next, mode_, r);
    }
    accept_step(x_end, h, r, first, f, t0 + t_next);
    t = t_next;
    if (first >= 0) {
      fresh = true;
    } else {
      g_prev = g_end;
    }
  }
}

void Stepper::advance(Instant t0, Instant t1, const Forcing& f) {
  if (t1 <= t0) return;
  ++stats_.segments;
  now_s_ = static_cast<double>(t0);
  roof_.emplace(system_.roof_span(x_, f.rain_m_per_s));
  // Both integrators coast a segment that is at rest from its start without taking a step.
  if (options_.fixed_step_s > 0.0) {
    integrate_fixed(static_cast<double>(t0), static_cast<double>(t1), f);
  } else {
    integrate(static_cast<double>(t0), static_cast<double>(t1), f);
  }
  ledger_.tally_roof(roof_->flows(static_cast<double>(t1 - t0)));
  now_s_ = static_cast<double>(t1);
}

}  // namespace gutterwatt
