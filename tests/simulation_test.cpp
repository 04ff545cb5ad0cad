#include "gutterwatt/simulation.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <atomic>
#include <cmath>
#include <initializer_list>
#include <sstream>
#include <string>

#include "gutterwatt/error.hpp"
#include "gutterwatt/hydraulics.hpp"
#include "gutterwatt/plant.hpp"
#include "gutterwatt/reservoir.hpp"
#include "gutterwatt/siphon.hpp"
#include "gutterwatt/units.hpp"
#include "test_support.hpp"

namespace gutterwatt::simulation_test {
namespace {

using test_support::constant_inflow;
using test_support::constant_rain;
using test_support::kLitre_m3;
using test_support::kPerMinute;
using test_support::kStart;
using test_support::make_scenario;
using test_support::RecordingObserver;
using test_support::simpson;

// The water balance of every run here closes far inside the run's own limit.
constexpr double kBalance = 1e-9;

double relative_error(double actual, double expected) {
  return std::abs(actual - expected) / std::abs(expected);
}

// The tank of REFERENCES.md section 5 (A_t 0.5 m2, 20 mm orifice at Cd 0.61), a vertical-sided
// tank with its rim out of reach, and a conveyance so large (100 mm pipe and
// nozzle) that the orifice controls the release.
Scenario orifice_tank(double duration_s, double output_interval_s) {
  Scenario s = make_scenario(duration_s, output_interval_s);
  s.reservoir.tank_area_m2 = 0.5;
  s.reservoir.rim_m = 1.2;
  s.reservoir.overflow_length_m = 1.0;
  s.release.kind = ReleaseKind::orifice;
  s.release.orifice_diameter_m = 0.020;
  s.release.orifice_coefficient = 0.61;
  s.drop_pipe = Pipe{0.100, 4.5, 0.0015e-3, 2.0};
  s.nozzle = Nozzle{0.100, 0.95, 0.97};
  return s;
}

// Cd a sqrt(2 g): the orifice law Q = k sqrt(h).
double orifice_constant(const Scenario& s) {
  return s.release.orifice_coefficient * circle_area_m2(s.release.orifice_diameter_m) *
         std::sqrt(2.0 * kGravity_m_per_s2);
}

double plan_area(const Scenario& s) { return s.reservoir.tank_area_m2; }

// Closed-form level of a prismatic tank draining through a floor orifice from `h0`:
// sqrt(h) = sqrt(h0) - k t / (2 A) (Torricelli; REFERENCES.md section 5, tank drain).
double torricelli_level(double h0, double k, double area, double t) {
  const double root = std::max(0.0, std::sqrt(h0) - k * t / (2.0 * area));
  return root * root;
}

TEST(Simulation, TankDrainsInTheTorricelliTime) {
  Scenario s = orifice_tank(1300.0, 10.0);
  s.reservoir.initial_level_m = 1.0;
  const double k = orifice_constant(s);
  const double area = plan_area(s);
  // source: tank drain of REFERENCES.md section 5: A_t 0.5 m2, d 20 mm, Cd 0.61, 1.0 m -> 0 in
  // 1178.3 s, to H/4 in 589.1 s.
  EXPECT_NEAR(2.0 * area / k, 1178.3, 0.05);
  EXPECT_NEAR(area / k, 589.1, 0.05);
  // The conveyance does not limit the release at any level.
  EXPECT_GT(Plant(plant_config(s)).full_flow_m3_per_s(0.0), 10.0 * k);

  RecordingObserver obs;
  const RunResult r = simulate(s, constant_rain(kStart, kStart + 1300, 0.0), obs);
  ASSERT_EQ(obs.samples.size(), 130u);
  int compared = 0;
  for (const Sample& sample : obs.samples) {
    const double t = static_cast<double>(sample.time - kStart);
    const double expected = torricelli_level(1.0, k, area, t);
    if (expected < 1e-3) continue;
    EXPECT_LT(relative_error(sample.level_m, expected), 1e-5) << "t = " << t;
    ++compared;
  }
  EXPECT_GT(compared, 100);
  const Sample* quarter = obs.at(kStart + 590);
  ASSERT_NE(quarter, nullptr);
  EXPECT_NEAR(quarter->level_m, torricelli_level(1.0, k, area, 590.0), 1e-6);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, OrificeIdlesAtTheHoldHeadAtTheClosedFormTime) {
  Scenario s = orifice_tank(1300.0, 10.0);
  s.reservoir.initial_level_m = 1.0;
  const double k = orifice_constant(s);
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_rain(kStart, kStart + 1300, 0.0), obs);
  // The orifice idles when the level falls to half the hold head, sqrt(h) = sqrt(H) - k t / 2A.
  const double t_idle = (1.0 - std::sqrt(0.5 * kHoldHead_m)) * 2.0 * plan_area(s) / k;
  const auto releases = obs.of_kind(EpisodeKind::cycle);
  ASSERT_EQ(releases.size(), 1u);
  EXPECT_EQ(releases[0].start_s, static_cast<double>(kStart));
  EXPECT_NEAR(releases[0].end_s - static_cast<double>(kStart), t_idle, 1e-3);
  EXPECT_NEAR(releases[0].volume_m3, 0.5, 1e-5);
  EXPECT_EQ(r.cycles, 1);
  EXPECT_EQ(obs.samples.back().release, ReleaseState::idle);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, SkipsTheDrySpellAfterTheTankEmpties) {
  Scenario s = orifice_tank(1300.0, 10.0);
  s.reservoir.initial_level_m = 1.0;
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_rain(kStart, kStart + 1300, 0.0), obs);
  // Idle from about 1175.6 s: the rest of the run is coasted in closed form.
  EXPECT_GT(r.stats.coasted_s, 120.0);
  EXPECT_LT(r.stats.coasted_s, 125.0);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, OrificeSettlesWhereOutflowEqualsInflow) {
  Scenario s = orifice_tank(6.0 * 3600.0, 600.0);
  const double inflow = 0.5 * kLitre_m3;
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_inflow(s, inflow), obs);
  // Q = k sqrt(h) = q_in at h = (q_in / k)^2; the time constant 2 A h / q_in is about 700 s.
  const double k = orifice_constant(s);
  const double expected = (inflow / k) * (inflow / k);
  EXPECT_LT(relative_error(obs.samples.back().level_m, expected), 1e-6);
  const Sample& a = obs.samples[obs.samples.size() - 7];
  const Sample& b = obs.samples.back();
  const double outflow = (b.totals.release_m3 - a.totals.release_m3) / (b.time - a.time);
  EXPECT_LT(relative_error(outflow, inflow), 1e-6);
  EXPECT_EQ(r.totals.reservoir_overflow_m3, 0.0);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, InflowBelowThePrimingFlowOnlyDribbles) {
  Scenario s = make_scenario(3.0 * 3600.0, 60.0);
  const double inflow = 2.0 * kLitre_m3 * kPerMinute;
  ASSERT_LT(inflow, s.release.priming_flow_m3_per_s);
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_inflow(s, inflow), obs);
  EXPECT_EQ(r.cycles, 0);
  EXPECT_TRUE(obs.of_kind(EpisodeKind::cycle).empty());
  EXPECT_EQ(r.dribble_episodes, 1);
  EXPECT_EQ(obs.samples.back().release, ReleaseState::dribble);
  // Everything released left as dribble, and all of it went through the nozzle.
  EXPECT_GT(r.totals.dribble_m3, 0.0);
  EXPECT_EQ(r.totals.dribble_m3, r.totals.release_m3);
  EXPECT_EQ(r.totals.nozzle_m3, r.totals.release_m3);
  EXPECT_EQ(r.totals.reservoir_overflow_m3, 0.0);
  // The level settles at lip + weir head of the inflow, by hand h = (q / (C pi d))^(2/3) =
  // (3.333333e-5 / (1.77 pi 0.019))^(2/3) = 4.634483 mm (ISO 1438 weir form).
  EXPECT_NEAR(obs.samples.back().level_m * 1e3, 54.634483, 1e-5);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

// Closed-form cycle of a bell siphon under constant inflow q, starting idle at the bell rim: fill
// at q to the lip plus the hold head (no outflow), then fill against the lip's weir flow to the
// priming level, then drain at Q_run(h) - q down to the rim; dV = A(h) dh with A the surface.
// Each is computed by hand outside the code (Simpson's rule on the published forms: weir law
// ISO 1438 form with C_w 1.77; Q_run from the energy equation with Darcy-Weisbach and Colebrook,
// REFERENCES.md sections 3-5, at 15 C with nu 1.1386 mm2/s from section 2). The viscosity's
// +-0.5 % moves a drain by at most 0.03 s; the integrator's own accuracy is accuracy_test's.
struct BellCycle {
  double fill_s;
  double drain_s;
  double period_s() const { return fill_s + drain_s; }
};

// Runs `s` under constant `inflow` from the bell rim and checks the cycles against `cycle`.
void expect_closed_form_cycles(Scenario s, double inflow, const BellCycle& cycle) {
  const double duration_s = static_cast<double>(*s.simulation.end - *s.simulation.start);
  s.reservoir.initial_level_m = s.release.break_level_m;
  s.simulation.rtol = 1e-9;
  ASSERT_GT(inflow, s.release.priming_flow_m3_per_s);

  RecordingObserver obs;
  const RunResult r = simulate(s, constant_inflow(s, inflow), obs);
  const auto cycles = obs.of_kind(EpisodeKind::cycle);
  // Primings at fill + n period, each cycle counted (the last one is closed by the end of the run).
  const long expected_cycles =
      static_cast<long>(std::floor((duration_s - cycle.fill_s) / cycle.period_s())) + 1;
  EXPECT_EQ(r.cycles, expected_cycles);
  ASSERT_EQ(static_cast<long>(cycles.size()), r.cycles);
  ASSERT_GE(cycles.size(), 3u);
  // The switch times are located, not rounded to a step.
  EXPECT_NEAR(cycles[0].start_s - static_cast<double>(kStart), cycle.fill_s, 2e-3);
  EXPECT_NEAR(cycles[0].end_s - cycles[0].start_s, cycle.drain_s, 0.05);
  for (std::size_t n = 1; n < cycles.size(); ++n) {
    EXPECT_NEAR(cycles[n].start_s - cycles[n - 1].start_s, cycle.period_s(), 0.05) << n;
  }
  // One dribble before each priming, and perhaps one still under way at the end.
  EXPECT_GE(r.dribble_episodes, r.cycles);
  EXPECT_LE(r.dribble_episodes, r.cycles + 1);
  EXPECT_EQ(r.totals.reservoir_overflow_m3, 0.0);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

// The default chain's box (0.1 m x 8 m = 0.8 m2) at q = 0.1 L/s, lip 50 mm, rim 8 mm, by hand:
// idle fill 0.8 (0.050 + 1e-5 - 0.008) / 1e-4 = 336.08 s; priming head (5e-5 / (1.77 pi
// 0.019))^(2/3) = 6.0729 mm (above the drowned mouth's 4.26 mm), dribble fill to it 63.108 s;
// drain from the priming level to the rim 614.420 s (Q_run 0.162958 L/s at 50 mm).
constexpr BellCycle kBoxCycle{399.1883, 614.4202};

TEST(Simulation, InflowAbovePrimingCyclesWithTheClosedFormPeriod) {
  expect_closed_form_cycles(make_scenario(6.0 * 3600.0, 60.0), 6.0 * kLitre_m3 * kPerMinute,
                            kBoxCycle);
}

TEST(Simulation, HalfRoundGutterSiphonEndsWhereTheGutterStopsFeedingIt) {
  // The 125 mm half-round, 8 m, at 7 L/min. The siphon runs at 0.160-0.163 L/s (Q_run 0.162958
  // L/s at 50 mm, above), which the gutter delivers only above a level pool's 20.44-20.63 mm
  // (gutter_flow.hpp: Beij's profile, 0.9184, F_L 0.88935; C): each cycle releases the
  // 32.07-32.21 L stored from the priming level 56.072891 mm down to there, times Q_run / (Q_run
  // - q) for the inflow during the drain: 112.8-118.9 L (C). A level pool drained to the bell
  // rim would release 150 L.
  Scenario s = make_scenario(6.0 * 3600.0, 60.0);
  s.reservoir.shape = ReservoirShape::half_round;
  s.reservoir.width_m = 0.125;
  s.reservoir.length_m = 8.0;
  s.reservoir.initial_level_m = s.release.break_level_m;
  s.simulation.rtol = 1e-9;
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_inflow(s, 7.0 * kLitre_m3 * kPerMinute), obs);
  const auto cycles = obs.of_kind(EpisodeKind::cycle);
  ASSERT_GE(cycles.size(), 3u);
  for (std::size_t k = 1; k + 1 < cycles.size(); ++k) {
    EXPECT_GT(cycles[k].volume_m3 * 1e3, 112.8 * 0.99) << k;
    EXPECT_LT(cycles[k].volume_m3 * 1e3, 118.9 * 1.01) << k;
  }
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, EachCycleReleasesTheStorageBetweenSetPointsPlusTheInflow) {
  Scenario s = make_scenario(2.0 * 3600.0, 60.0);
  s.reservoir.initial_level_m = s.release.break_level_m;
  s.simulation.rtol = 1e-9;
  const double inflow = 6.0 * kLitre_m3 * kPerMinute;
  RecordingObserver obs;
  simulate(s, constant_inflow(s, inflow), obs);
  const auto cycles = obs.of_kind(EpisodeKind::cycle);
  ASSERT_GE(cycles.size(), 2u);
  // By hand: 0.8 m2 x (56.072891 - 8) mm = 38.458313 L between the priming level and the rim,
  // plus 0.1 L/s over the 614.4202 s drain (kBoxCycle): 99.900335 L.
  for (std::size_t k = 0; k + 1 < cycles.size(); ++k) {
    EXPECT_NEAR(cycles[k].volume_m3 * 1e3, 99.900335, 5e-3) << k;
    EXPECT_GT(cycles[k].energy_J, 0.0) << k;
    EXPECT_GT(cycles[k].peak_flow_m3_per_s, inflow) << k;
  }
}

TEST(Simulation, InflowAboveTheRunningFlowOverflowsTheDifference) {
  Scenario s = make_scenario(3.0 * 3600.0, 60.0);
  s.simulation.rtol = 1e-9;
  const double inflow = 12.0 * kLitre_m3 * kPerMinute;
  const Plant plant(plant_config(s));
  ASSERT_GT(inflow, plant.full_flow_m3_per_s(s.reservoir.rim_m));
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_inflow(s, inflow), obs);
  // By hand (bisection outside the code on 1.7 x 8 (h - 0.062)^1.5 = q - Q_run(h), ISO 3846 weir
  // form and the Q_run of the cycles above): the level settles at 62.194167 mm, where the siphon
  // runs 0.1632038 L/s and 0.0367962 L/s overflows.
  EXPECT_NEAR(obs.samples.back().level_m * 1e3, 62.194167, 1e-4);
  EXPECT_EQ(obs.samples.back().release, ReleaseState::running);
  // Steady state over the last hour: overflow = inflow - running flow.
  const Sample& a = obs.samples[obs.samples.size() - 61];
  const Sample& b = obs.samples.back();
  const double span = static_cast<double>(b.time - a.time);
  const double overflow = (b.totals.reservoir_overflow_m3 - a.totals.reservoir_overflow_m3) / span;
  const double running = (b.totals.release_m3 - a.totals.release_m3) / span;
  EXPECT_NEAR(running * 1e3, 0.1632038, 1e-5);
  EXPECT_NEAR(overflow * 1e3, 0.0367962, 1e-5);
  EXPECT_EQ(r.cycles, 1);
  EXPECT_EQ(r.overflow_events, 1);
  EXPECT_EQ(obs.of_kind(EpisodeKind::overflow).size(), 1u);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, FloatValveCyclesWithTheClosedFormPeriod) {
  const double duration_s = 4.0 * 3600.0;
  Scenario s = orifice_tank(duration_s, 60.0);
  s.release.kind = ReleaseKind::float_valve;
  s.release.trigger_level_m = 0.300;
  s.release.break_level_m = 0.100;
  s.reservoir.initial_level_m = 0.100;
  s.simulation.rtol = 1e-9;
  const double inflow = 0.15 * kLitre_m3;
  const double k = orifice_constant(s);
  const double area = plan_area(s);
  const double s_open = std::sqrt(0.300);
  const double s_close = std::sqrt(0.100);
  ASSERT_GT(k * s_close, inflow);
  // Fill from the closing to the opening level at q; drain A dh / (k sqrt(h) - q), which with
  // h = s^2 integrates to (2A/k) [s + (q/k) ln(k s - q)].
  const double fill_s = area * (0.300 - 0.100) / inflow;
  const double drain_s =
      2.0 * area / k *
      (s_open - s_close + inflow / k * std::log((k * s_open - inflow) / (k * s_close - inflow)));

  RecordingObserver obs;
  const RunResult r = simulate(s, constant_inflow(s, inflow), obs);
  const auto openings = obs.of_kind(EpisodeKind::cycle);
  const long expected =
      static_cast<long>(std::floor((duration_s - fill_s) / (fill_s + drain_s))) + 1;
  EXPECT_EQ(r.cycles, expected);
  ASSERT_GE(openings.size(), 3u);
  EXPECT_NEAR(openings[0].start_s - static_cast<double>(kStart), fill_s, 1e-3);
  EXPECT_NEAR(openings[0].end_s - openings[0].start_s, drain_s, 1e-3);
  for (std::size_t n = 1; n < openings.size(); ++n) {
    EXPECT_LT(relative_error(openings[n].start_s - openings[n - 1].start_s, fill_s + drain_s), 1e-6)
        << n;
  }
  EXPECT_EQ(r.totals.dribble_m3, 0.0);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

// The same invented 5-minute record (2 h of rain, then 1 h dry) as CSV text in one unit.
std::string rain_csv(double scale) {
  // Depths in hundredths of an inch, so every unit below is exact in decimal.
  const int hundredths[] = {1, 3, 5, 4, 2, 6, 8, 3, 1, 0, 2, 7, 9, 5, 3, 2, 1, 4, 6, 3, 2, 1, 0, 1};
  std::ostringstream csv;
  csv.precision(12);
  csv << "time,rain\n";
  Instant t = kStart;
  for (int n = 0; n < 36; ++n) {
    t += 300;
    const int d = n < 24 ? hundredths[n] : 0;
    csv << format_iso8601(t) << "," << d * scale << "\n";
  }
  return csv.str();
}

RunResult run_rain(const std::string& csv, RainValue value, double unit_m) {
  SeriesFormat fmt;
  fmt.value_column = "rain";
  fmt.value = value;
  fmt.unit_m = unit_m;
  fmt.step_s = 300.0;
  std::istringstream in(csv);
  const RainSeries rain = read_rain_series(in, "rain.csv", fmt);
  RecordingObserver obs;
  return simulate(make_scenario(3.0 * 3600.0, 300.0), rain, obs);
}

void expect_same_run(const RunResult& a, const RunResult& b, const char* what) {
  EXPECT_EQ(a.cycles, b.cycles) << what;
  EXPECT_EQ(a.overflow_events, b.overflow_events) << what;
  EXPECT_EQ(a.dribble_episodes, b.dribble_episodes) << what;
  EXPECT_LT(relative_error(b.totals.rain_m3, a.totals.rain_m3), 1e-9) << what;
  EXPECT_LT(relative_error(b.totals.nozzle_m3, a.totals.nozzle_m3), 1e-9) << what;
  EXPECT_LT(relative_error(b.totals.dribble_m3, a.totals.dribble_m3), 1e-9) << what;
  EXPECT_LT(relative_error(b.totals.electrical_J, a.totals.electrical_J), 1e-9) << what;
  EXPECT_LT(relative_error(b.final.reservoir_m3, a.final.reservoir_m3), 1e-9) << what;
  EXPECT_LT(b.balance_relative_error, kBalance) << what;
}

TEST(Simulation, RainInMillimetresInchesOrIntensityGivesTheSameRun) {
  // 1 in = 25.4 mm exactly: source: 1959 yard and pound agreement, REFERENCES.md section 1.
  const RunResult mm = run_rain(rain_csv(0.254), RainValue::depth, 1e-3);
  const RunResult in = run_rain(rain_csv(0.01), RainValue::depth, 0.0254);
  // Intensity over 5-minute intervals: 12 times the depth per hour.
  const RunResult mm_h = run_rain(rain_csv(0.254 * 12.0), RainValue::intensity, 1e-3);
  const RunResult in_h = run_rain(rain_csv(0.12), RainValue::intensity, 0.0254);
  EXPECT_GT(mm.cycles, 0);
  EXPECT_NEAR(mm.totals.rain_m3, 79 * 0.254e-3 * 40.0, 1e-12);
  EXPECT_LT(mm.balance_relative_error, kBalance);
  expect_same_run(mm, in, "inches");
  expect_same_run(mm, mm_h, "mm/h");
  expect_same_run(mm, in_h, "in/h");
}

// The battery's balances (REFERENCES.md section 10): at the terminals, generator plus what the
// battery delivered = accepted + curtailed + served; in the store, its change = eta_c accepted -
// drawn / eta_d - self-discharge.
void expect_battery_balances(const Scenario& s, const RunResult& r) {
  const Accounts& a = r.totals;
  const double scale = 1e-9 * std::max(a.electrical_J, a.served_J);
  EXPECT_NEAR(a.electrical_J + a.drawn_J, a.accepted_J + a.curtailed_J + a.served_J, scale);
  EXPECT_NEAR(r.final.battery_J - r.initial.battery_J,
              a.stored_J - a.drawn_J - a.discharge_loss_J - a.self_discharge_J, scale);
  EXPECT_NEAR(a.stored_J, s.battery.charge_efficiency * a.accepted_J, 1e-9 * a.accepted_J);
  EXPECT_NEAR(a.discharge_loss_J, (1.0 / s.battery.discharge_efficiency - 1.0) * a.drawn_J,
              1e-9 * a.drawn_J);
}

TEST(Simulation, EnergyAccountsClose) {
  Scenario s = make_scenario(3.0 * 3600.0, 60.0);
  s.battery.capacity_J = 0.5 * kJoulesPerWh;  // small, so that it fills and curtails
  s.battery.load_W = 0.2;
  s.turbine.best_at_every_head = true;
  const double inflow = 6.0 * kLitre_m3 * kPerMinute;
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_inflow(s, inflow), obs);
  const Accounts& a = r.totals;
  EXPECT_GT(a.curtailed_J, 0.0);
  expect_battery_balances(s, r);
  EXPECT_NEAR(a.served_J + a.unmet_J, 0.2 * 3.0 * 3600.0, 1e-9 * 2160.0);
  // Best speed and no cut-in: shaft = peak jet, electrical = generator shaft.
  EXPECT_NEAR(a.shaft_J, 0.7 * a.jet_J, 1e-9 * a.jet_J);
  EXPECT_NEAR(a.electrical_J, 0.65 * a.shaft_J, 1e-9 * a.jet_J);
  EXPECT_LE(r.final.battery_J, s.battery.capacity_J * (1.0 + 1e-9));
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, LeadAcidBatteryBalancesWithItsLossesAndItsMinimum) {
  // A lead-acid battery started at its minimum, with a load above what the cycles make at times:
  // it charges, self-discharges, is drawn down to the minimum and cut.
  Scenario s = make_scenario(6.0 * 3600.0, 60.0);
  apply_chemistry(BatteryChemistry::lead_acid, s.battery);
  s.battery.capacity_J = 0.5 * kJoulesPerWh;
  s.battery.initial_soc = 0.5;
  s.battery.load_W = 1.0;
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_inflow(s, 6.0 * kLitre_m3 * kPerMinute), obs);
  const Accounts& a = r.totals;
  expect_battery_balances(s, r);
  EXPECT_GT(a.self_discharge_J, 0.0);
  EXPECT_GT(a.unmet_J, 0.0);
  EXPECT_GT(a.battery_empty_s, 0.0);
  EXPECT_GE(r.final.battery_J,
            0.25 * kJoulesPerWh * (1.0 - 1e-3));  // self-discharged a little below
  EXPECT_NEAR(a.served_J + a.unmet_J, 6.0 * 3600.0, 1e-9 * 21600.0);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, DryRecordCoastsAndServesTheLoadFromTheBattery) {
  // 86.4 kJ delivered through eta_d 0.9 takes 96 kJ of the 108 kJ stored (REFERENCES.md
  // section 10 model).
  Scenario s = make_scenario(86400.0, 3600.0);
  s.battery.load_W = 1.0;
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_rain(kStart, kStart + 86400, 0.0), obs);
  EXPECT_EQ(r.stats.coasted_s, 86400.0);
  EXPECT_EQ(r.stats.steps, 0);
  EXPECT_DOUBLE_EQ(r.totals.served_J, 86400.0);
  EXPECT_NEAR(r.final.battery_J, 12000.0, 1e-9);
  EXPECT_NEAR(r.totals.discharge_loss_J, 9600.0, 1e-9);
  EXPECT_EQ(r.totals.unmet_J, 0.0);
  EXPECT_EQ(r.totals.battery_below_half_s, 86400.0);  // from exactly half, falling at once
  EXPECT_EQ(r.balance_relative_error, 0.0);
}

TEST(Simulation, DryRecordLeavesLoadUnmetOnceTheBatteryIsEmpty) {
  // 172.8 kJ a day against 108 kJ stored, of which 0.9 x 108 = 97.2 kJ reach the load, in
  // 97 200 s / 2 W = 48 600 s; the other 37 800 s are cut.
  Scenario s = make_scenario(86400.0, 3600.0);
  s.battery.load_W = 2.0;
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_rain(kStart, kStart + 86400, 0.0), obs);
  EXPECT_NEAR(r.totals.served_J, 97200.0, 1e-9);
  EXPECT_NEAR(r.totals.unmet_J, 172800.0 - 97200.0, 1e-9);
  EXPECT_NEAR(r.totals.battery_empty_s, 37800.0, 1e-9);
  EXPECT_EQ(r.final.battery_J, 0.0);
  EXPECT_EQ(obs.samples.back().soc, 0.0);
}

TEST(Simulation, StandingWaterEvaporatesFromATankAtRest) {
  // A 0.1 x 8 m box (0.8 m2) holding 50 mm (40 L), no release, no rain, 5 mm/day: the level
  // falls 5 mm a day and reaches the 1 mm film after 49 / 5 = 9.8 days; below it the film
  // decays as exp(-5 t / 1 mm per day), 1e-3 x exp(-11) of a metre left after 12 days. So 40 L
  // evaporate (less 0.8 m2 x 1e-3 m x exp(-11) = 1.3e-5 L), and the water stands 9.8 days, timed to
  // the next output hour.
  Scenario s = make_scenario(12.0 * 86400.0, 3600.0);
  s.release.kind = ReleaseKind::none;
  s.reservoir.initial_level_m = 0.050;
  s.reservoir.evaporation_m_per_s = {5e-3 / 86400.0};
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_rain(kStart, kStart + 12 * 86400, 0.0), obs);
  EXPECT_NEAR(r.totals.evaporation_m3 * 1e3, 40.0, 1e-4);
  EXPECT_GE(r.standing_s, 9.8 * 86400.0);
  EXPECT_LE(r.standing_s, 9.8 * 86400.0 + 3600.0);
  EXPECT_EQ(r.standing_longest_s, r.standing_s);
  EXPECT_EQ(r.standing_spells_over_week, 1);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, WaterBelowTheBellRimStandsUntilItEvaporates) {
  // A bell siphon's tank holding 6 mm, below its 8 mm rim, no rain, 3 mm/day: the siphon never
  // runs, and the water stands (a mosquito sees it whatever the set-points) until it is 1 mm
  // deep, after (6 - 1) / 3 = 1.667 days = 40 h by hand, timed to the next output hour. Counted
  // only above the rim, as before, it would not stand at all.
  Scenario s = make_scenario(3.0 * 86400.0, 3600.0);
  s.reservoir.initial_level_m = 0.006;
  s.reservoir.evaporation_m_per_s = {3e-3 / 86400.0};
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_rain(kStart, kStart + 3 * 86400, 0.0), obs);
  EXPECT_EQ(r.cycles, 0);
  EXPECT_GE(r.standing_s, 40.0 * 3600.0);
  EXPECT_LE(r.standing_s, 41.0 * 3600.0);
  EXPECT_EQ(r.standing_spells_over_week, 0);
}

TEST(Simulation, ACutLoadWaitsForTheReconnectChargeWhileTheGeneratorRecharges) {
  // Dry record, 60 Wh battery at 0.9 discharge efficiency, minimum 0.5, reconnect 0.7, 1 W
  // load, starting at 31 Wh: by hand, 1 Wh of store serves 0.9 Wh in 0.9 h, then the load is cut
  // for the rest of the 24 h (23.1 Wh unmet); with no input it cannot reconnect.
  Scenario s = make_scenario(86400.0, 3600.0);
  s.battery.min_soc = 0.5;
  s.battery.reconnect_soc = 0.7;
  s.battery.initial_soc = 31.0 / 60.0;
  s.battery.load_W = 1.0;
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_rain(kStart, kStart + 86400, 0.0), obs);
  EXPECT_NEAR(r.totals.served_J / 3600.0, 0.9, 1e-9);
  EXPECT_NEAR(r.totals.unmet_J / 3600.0, 23.1, 1e-9);
  EXPECT_NEAR(r.totals.battery_empty_s / 3600.0, 23.1, 1e-9);
  EXPECT_NEAR(r.final.battery_J / 3600.0, 30.0, 1e-9);
}

TEST(Simulation, ACutLoadIsServedAgainOnlyAboveTheReconnectCharge) {
  // Steady cycling against a load larger than the generator's mean output: each time the load is
  // cut the generator recharges the battery, so the stored energy swings between the minimum
  // and the reconnect charge (common-practice hysteresis), never cutting at once again after a
  // reconnect; the balances hold.
  Scenario s = make_scenario(12.0 * 3600.0, 60.0);
  s.battery.capacity_J = 2.0 * kJoulesPerWh;
  s.battery.min_soc = 0.5;
  s.battery.reconnect_soc = 0.7;
  s.battery.initial_soc = 0.5;
  s.battery.load_W = 2.0;
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_inflow(s, 6.0 * kLitre_m3 * kPerMinute), obs);
  expect_battery_balances(s, r);
  EXPECT_GT(r.totals.served_J, 0.0);
  EXPECT_GT(r.totals.battery_empty_s, 0.0);
  double highest = 0.0;
  for (const Sample& x : obs.samples) highest = std::max(highest, x.soc);
  EXPECT_GE(highest, 0.7 - 0.02);  // sampled each minute: the 2 W load takes 1.7 % a minute
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, EvaporationWhileCyclingIsTheRateTimesTheSurface) {
  // The bell cycles between 50 and 8 mm in the 0.8 m2 box, never below the 1 mm film: at
  // 5 mm/day for 6 h, 5 x 0.25 x 0.8 = 1.0 L evaporates, whatever the cycles do.
  Scenario s = make_scenario(6.0 * 3600.0, 60.0);
  s.reservoir.initial_level_m = 0.008;
  s.reservoir.evaporation_m_per_s = {5e-3 / 86400.0};
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_inflow(s, 4.0 * kLitre_m3 * kPerMinute), obs);
  EXPECT_GT(r.cycles, 0);
  EXPECT_NEAR(r.totals.evaporation_m3 * 1e3, 1.0, 1e-6);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

// A switch is located to 1e-7 s; at the storms' 0.11 L/s that leaves 1e-11 m3 on either side.
constexpr double kSwitchVolume = 1e-10;

// Two invented storms of 10 mm in an hour each on the 40 m2 roof, the second `gap_h` hours after
// the first ends, with the roof's initial loss, runoff coefficient and a first-flush diverter.
RunResult two_storms(double gap_h, double lag_s, RecordingObserver& obs) {
  const double end_s = (2.0 + gap_h + 6.0) * 3600.0;
  Scenario s = make_scenario(end_s, 3600.0);
  s.roof.runoff_coefficient = 0.9;
  s.roof.initial_loss_m = 0.5e-3;
  s.roof.drying_m_per_s = 3e-3 / 86400.0;
  s.roof.lag_s = lag_s;
  s.first_flush.volume_m3 = 10.0 * kLitre_m3;
  s.first_flush.reset_after_dry_s = 12.0 * 3600.0;
  const double intensity = 10e-3 / 3600.0;
  const Instant second = kStart + static_cast<Instant>((1.0 + gap_h) * 3600.0);
  const RainSeries rain = test_support::block_rain(
      kStart, *s.simulation.end,
      {{kStart, kStart + 3600, intensity}, {second, second + 3600, intensity}});
  return simulate(s, rain, obs);
}

TEST(Simulation, InitialLossRefillsAfterDryingBetweenStorms) {
  RecordingObserver obs;
  const RunResult r = two_storms(2.0, 0.0, obs);
  // Two hours at 3 mm/day dry 0.25 mm of the 0.5 mm loss, so the second storm loses 0.25 mm
  // first; the runoff coefficient takes 10 % of the rest.
  const double area = 40.0;
  const double initial = (0.5e-3 + 0.25e-3) * area;
  const double rain = 20e-3 * area;
  EXPECT_NEAR(r.totals.rain_m3, rain, 1e-12 * rain);
  EXPECT_NEAR(r.totals.roof_loss_m3, initial + 0.1 * (rain - initial), kSwitchVolume);
  EXPECT_NEAR(r.totals.roof_runoff_m3, 0.9 * (rain - initial), kSwitchVolume);
  // Only two dry hours: the diverter does not reset, so it takes 10 L once.
  EXPECT_NEAR(r.totals.first_flush_m3, 10.0 * kLitre_m3, kSwitchVolume);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, FirstFlushResetsAfterTheDrySpell) {
  RecordingObserver obs;
  const RunResult r = two_storms(13.0, 0.0, obs);
  const double area = 40.0;
  // Thirteen dry hours dry the whole initial loss and reset the diverter.
  const double initial = 2.0 * 0.5e-3 * area;
  EXPECT_NEAR(r.totals.roof_loss_m3, initial + 0.1 * (20e-3 * area - initial), kSwitchVolume);
  EXPECT_NEAR(r.totals.first_flush_m3, 20.0 * kLitre_m3, kSwitchVolume);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, RoofLagDelaysButKeepsTheRunoff) {
  RecordingObserver obs;
  const RunResult r = two_storms(2.0, 120.0, obs);
  // Six dry hours after the second storm empty the linear reservoir (k = 120 s) to e^-180.
  const double initial = (0.5e-3 + 0.25e-3) * 40.0;
  EXPECT_NEAR(r.totals.roof_runoff_m3, 0.9 * (20e-3 * 40.0 - initial), kSwitchVolume);
  EXPECT_LT(r.final.roof_m3, 1e-15);
  EXPECT_GT(r.stats.coasted_s, 0.0);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, CutInDropsThePowerOfTheDribble) {
  Scenario s = make_scenario(3.0 * 3600.0, 60.0);
  s.turbine.best_at_every_head = true;  // a held runner gives the dribble's low head nothing
  const double inflow = 6.0 * kLitre_m3 * kPerMinute;
  RecordingObserver all;
  const RunResult free_run = simulate(s, constant_inflow(s, inflow), all);
  s.generator.cut_in_W = 0.5;  // above the dribble's power, below the running siphon's
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_inflow(s, inflow), obs);
  double cycles_J = 0.0;
  for (const Episode& e : obs.of_kind(EpisodeKind::cycle)) cycles_J += e.energy_J;
  EXPECT_GT(cycles_J, 0.0);
  EXPECT_NEAR(r.totals.electrical_J, cycles_J, 1e-9 * cycles_J);
  EXPECT_LT(r.totals.electrical_J, free_run.totals.electrical_J);
  EXPECT_EQ(r.totals.jet_J, free_run.totals.jet_J);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, HeadColumnPassesWhatItDoesNotSpill) {
  Scenario s = make_scenario(3.0 * 3600.0, 60.0);
  s.head_column = HeadColumnConfig{0.040, 3.5};
  const double inflow = 6.0 * kLitre_m3 * kPerMinute;
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_inflow(s, inflow), obs);
  const Accounts& a = r.totals;
  EXPECT_GT(r.cycles, 0);
  EXPECT_GT(a.column_overflow_m3, 0.0);
  const double column_change = r.final.column_m3 - r.initial.column_m3;
  EXPECT_NEAR(a.release_m3, a.nozzle_m3 + a.column_overflow_m3 + column_change,
              1e-9 * a.release_m3);
  EXPECT_LE(r.final.column_m3, Plant(plant_config(s)).column_capacity_m3() * (1.0 + 1e-12));
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, SkippedGapFreezesTheTank) {
  Scenario s = orifice_tank(1500.0, 10.0);
  s.reservoir.initial_level_m = 1.0;
  RainSeries rain = constant_rain(kStart, kStart + 1500, 0.0);
  rain.covered = {{kStart, kStart + 300}, {kStart + 900, kStart + 1500}};
  rain.gaps = {{kStart + 300, kStart + 900}};
  rain.policy = GapPolicy::skip;
  RecordingObserver obs;
  const RunResult r = simulate(s, rain, obs);
  EXPECT_EQ(r.stats.skipped_s, 600.0);
  // The drain stops for the 600 s the record leaves out and then goes on where it stopped.
  const double k = orifice_constant(s);
  const double area = plan_area(s);
  const Sample* in_gap = obs.at(kStart + 600);
  const Sample* after = obs.at(kStart + 1000);
  ASSERT_NE(in_gap, nullptr);
  ASSERT_NE(after, nullptr);
  EXPECT_LT(relative_error(in_gap->level_m, torricelli_level(1.0, k, area, 300.0)), 1e-6);
  EXPECT_LT(relative_error(after->level_m, torricelli_level(1.0, k, area, 400.0)), 1e-6);
  EXPECT_LT(r.balance_relative_error, kBalance);
}

TEST(Simulation, RejectsAPeriodBeforeTheRecord) {
  const Scenario s = make_scenario(86400.0, 3600.0);
  RecordingObserver obs;
  try {
    simulate(s, constant_rain(kStart + 3600, kStart + 86400, 0.0), obs);
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_STREQ(e.what(),
                 "test.yaml: simulation.start: the rain record has no data from 2025-03-01T00:00 "
                 "to 2025-03-01T01:00; move the period inside the record or set rain.gaps: zero "
                 "or skip");
  }
}

TEST(Simulation, RejectsAPeriodAfterTheRecord) {
  const Scenario s = make_scenario(86400.0, 3600.0);
  RecordingObserver obs;
  try {
    simulate(s, constant_rain(kStart, kStart + 3600, 0.0), obs);
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_STREQ(e.what(),
                 "test.yaml: simulation.end: the rain record has no data from 2025-03-01T01:00 "
                 "to 2025-03-02T00:00; move the period inside the record or set rain.gaps: zero "
                 "or skip");
  }
}

TEST(Simulation, RejectsAGapUnlessToldToFillOrSkipIt) {
  const Scenario s = make_scenario(86400.0, 3600.0);
  RainSeries rain = constant_rain(kStart, kStart + 86400, 0.0);
  rain.covered = {{kStart, kStart + 3600}, {kStart + 7200, kStart + 86400}};
  RecordingObserver obs;
  try {
    simulate(s, rain, obs);
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_STREQ(e.what(),
                 "test.yaml: rain: the rain record has no data from 2025-03-01T01:00 to "
                 "2025-03-01T02:00; move the period inside the record or set rain.gaps: zero or "
                 "skip");
  }
  rain.policy = GapPolicy::zero;
  EXPECT_EQ(simulate(s, rain, obs).stats.coasted_s, 86400.0);
}

TEST(Simulation, RejectsAnEndBeforeTheStart) {
  Scenario s = make_scenario(86400.0, 3600.0);
  s.simulation.end = kStart;
  RecordingObserver obs;
  try {
    simulate(s, constant_rain(kStart, kStart + 86400, 0.0), obs);
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_STREQ(e.what(),
                 "test.yaml: simulation.end: must be after simulation.start "
                 "(2025-03-01T00:00)");
  }
}

TEST(Simulation, RejectsAnEmptyRecord) {
  const Scenario s = make_scenario(86400.0, 3600.0);
  RecordingObserver obs;
  try {
    simulate(s, RainSeries{}, obs);
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_STREQ(e.what(), "test.yaml: rain: the rain record holds no data");
  }
}

TEST(Simulation, StopsWhenAskedEvenWhileCoasting) {
  const Scenario s = make_scenario(86400.0, 3600.0);
  std::atomic<bool> stop{true};
  RunOptions options;
  options.stop = &stop;
  RecordingObserver obs;
  EXPECT_THROW(simulate(s, constant_rain(kStart, kStart + 86400, 0.0), obs, options), Interrupted);
  EXPECT_THROW(simulate(s, constant_rain(kStart, kStart + 86400, 1e-6), obs, options), Interrupted);
}

TEST(Simulation, HourlyLoadProfileIsServedHourByHour) {
  Scenario s = make_scenario(86400.0, 3600.0);
  double daily_J = 0.0;
  for (int h = 0; h < 24; ++h) {
    s.battery.load_profile_W.push_back(0.05 * (h + 1));
    daily_J += 0.05 * (h + 1) * 3600.0;
  }
  RecordingObserver obs;
  const RunResult r = simulate(s, constant_rain(kStart, kStart + 86400, 0.0), obs);
  EXPECT_NEAR(r.totals.served_J, daily_J, 1e-9 * daily_J);
  // The first hour draws 0.05 W for 3600 s.
  EXPECT_NEAR(obs.samples[0].totals.served_J, 180.0, 1e-12);
  EXPECT_EQ(r.totals.unmet_J, 0.0);
}

TEST(Simulation, SamplesAtTheMonthBoundary) {
  Scenario s = make_scenario(4.0 * 3600.0, 3600.0);
  const Instant start = kStart + 30 * 86400 + 22 * 3600;  // 2025-03-31T22:00Z
  s.simulation.start = start;
  s.simulation.end = start + 4 * 3600;
  RecordingObserver obs;
  simulate(s, constant_rain(start, start + 4 * 3600, 0.0), obs);
  ASSERT_EQ(obs.samples.size(), 4u);
  EXPECT_EQ(format_iso8601(obs.samples[1].time), "2025-04-01T00:00");
  EXPECT_FALSE(obs.samples[0].month_end);
  EXPECT_TRUE(obs.samples[1].month_end);
  EXPECT_FALSE(obs.samples[2].month_end);
  EXPECT_TRUE(obs.samples[3].month_end);
}

TEST(Simulation, SamplesEveryOutputIntervalAndAtTheEnd) {
  Scenario s = make_scenario(3.0 * 3600.0 + 900.0, 3600.0);
  RecordingObserver obs;
  simulate(s, constant_inflow(s, 2.0 * kLitre_m3 * kPerMinute), obs);
  ASSERT_EQ(obs.samples.size(), 4u);
  EXPECT_EQ(obs.start.time, kStart);
  EXPECT_EQ(obs.samples[0].time, kStart + 3600);
  EXPECT_EQ(obs.samples[2].time, kStart + 3 * 3600);
  EXPECT_EQ(obs.samples[3].time, kStart + 3 * 3600 + 900);
  EXPECT_TRUE(obs.samples[3].output);
  EXPECT_TRUE(obs.samples[3].month_end);
  EXPECT_FALSE(obs.samples[0].month_end);
}

TEST(Simulation, StalledSolverIsASimulationErrorNotAHang) {
  // An absurd roof (1e20 m2, beyond what the loader accepts) makes the steps collapse; the
  // per-segment step budget turns that into a SimulationError naming time, mode and state.
  Scenario s = make_scenario(3600.0);
  s.roof.area_m2 = 1e20;
  const RainSeries rain = constant_rain(kStart, kStart + 3600, 1e-3 / 3600.0);
  RecordingObserver obs;
  try {
    simulate(s, rain, obs);
    FAIL() << "no SimulationError";
  } catch (const SimulationError& e) {
    const std::string what = e.what();
    EXPECT_EQ(what.rfind("simulation failed at 2025-03-01T00:", 0), 0u) << what;
    EXPECT_NE(what.find("the solver made no progress (100000 steps in one segment)"),
              std::string::npos)
        << what;
    EXPECT_NE(what.find("; mode: release "), std::string::npos) << what;
  }
}

}  // namespace
}  // namespace gutterwatt::simulation_test
