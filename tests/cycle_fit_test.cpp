#include "gutterwatt/cycle_fit.hpp"

#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <string>
#include <vector>

#include "cli_support.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/scenario.hpp"
#include "siphon_reference.hpp"
#include "test_support.hpp"

namespace gutterwatt::cycle_fit_test {
namespace {

using test_support::block_rain;
using test_support::kStart;
using test_support::make_scenario;
using test_support::RainBlock;
using test_support::SiphonReference;

constexpr double kLPerMin = 1e-3 / 60.0;
constexpr double kRoof_m2 = 40.0;
constexpr Instant kHour = 3600;

// ---------------------------------------------------------------------------------------------
// A plain time-stepping reference of the field, written here from the relations of
// SiphonReference and sharing no code with the library: rain blocks fall on a roof that passes
// them straight on (runoff coefficient 1, no loss, no lag, no first flush) into the reservoir,
// which starts empty. The siphon idles below the lip (filling in closed form), dribbles above it
// until the standpipe takes the priming flow, runs until the level falls to the bell rim, and
// breaks. Dribbling and running are stepped by the midpoint rule at 0.05 s (1 s while dry, when
// nothing can prime); a start or a break is placed within its step by linear interpolation.
// ---------------------------------------------------------------------------------------------
std::vector<Instant> reference_cycle_starts(const SiphonReference& ref,
                                            const std::vector<RainBlock>& blocks, Instant start,
                                            Instant end) {
  std::vector<Instant> starts;
  const auto inflow = [&](double t) {
    for (const RainBlock& b : blocks) {
      if (t >= static_cast<double>(b.start) && t < static_cast<double>(b.end)) {
        return b.intensity_m_per_s * kRoof_m2;
      }
    }
    return 0.0;
  };
  const auto next_change = [&](double t) {
    double next = static_cast<double>(end);
    for (const RainBlock& b : blocks) {
      for (const Instant edge : {b.start, b.end}) {
        if (static_cast<double>(edge) > t) next = std::min(next, static_cast<double>(edge));
      }
    }
    return next;
  };
  enum { idle, dribble, running } mode = idle;
  double h = 0.0;
  double t = static_cast<double>(start);
  while (t < static_cast<double>(end)) {
    const double q = inflow(t);
    const double change = next_change(t);
    if (mode == idle) {
      if (q == 0.0) {
        t = change;
        continue;
      }
      const double to_lip = (ref.lip_m - h) * ref.area_m2 / q;
      if (t + to_lip < change) {
        t += to_lip;
        h = ref.lip_m;
        mode = dribble;
      } else {
        h += q * (change - t) / ref.area_m2;
        t = change;
      }
      continue;
    }
    const double dt = std::min(q > 0.0 || mode == running ? 0.05 : 1.0, change - t);
    const auto rate = [&](double level) {
      const double out =
          mode == running ? ref.running_flow(level) : ref.standpipe_flow(level - ref.lip_m);
      return (q - out) / ref.area_m2;
    };
    const double h1 = h + dt * rate(h + 0.5 * dt * rate(h));
    if (mode == dribble && ref.standpipe_flow(h1 - ref.lip_m) >= ref.priming_m3_per_s) {
      const double f0 = ref.standpipe_flow(h - ref.lip_m);
      const double f1 = ref.standpipe_flow(h1 - ref.lip_m);
      const double at = t + dt * (ref.priming_m3_per_s - f0) / (f1 - f0);
      starts.push_back(static_cast<Instant>(std::floor(at)));
      mode = running;
      h = h + (h1 - h) * (at - t) / dt;
      t = at;
      continue;
    }
    if (mode == running && h1 <= ref.rim_m) {
      t += dt * (h - ref.rim_m) / (h - h1);
      h = ref.rim_m;
      mode = idle;
      continue;
    }
    if (mode == dribble && h1 < ref.lip_m) {
      h = ref.lip_m;
      mode = idle;
    } else {
      h = h1;
    }
    t += dt;
  }
  return starts;
}

// The reference's system as a scenario: a 40 m2 roof that passes rain straight on.
Scenario field(double priming_L_per_min, double loss_k, Instant duration_s) {
  Scenario s = make_scenario(static_cast<double>(duration_s), 3600.0);
  s.drop_pipe.friction = FrictionLaw::swamee_jain;
  s.nozzle = Nozzle{0.010, 0.95, 0.97};
  s.roof.area_m2 = kRoof_m2;
  s.release.priming_flow_m3_per_s = priming_L_per_min * kLPerMin;
  s.drop_pipe.minor_loss_k = loss_k;
  return s;
}

// Five rain events of steady inflow 1.5, 2.2, 3, 5 and 8 L/min, 8 h or more apart.
std::vector<RainBlock> five_events() {
  const std::pair<Instant, double> events[] = {
      {0, 1.5}, {11 * kHour, 2.2}, {22 * kHour, 3.0}, {33 * kHour, 5.0}, {43 * kHour, 8.0}};
  std::vector<RainBlock> blocks;
  for (const auto& [at, q] : events) {
    const Instant length = q < 4.0 ? 3 * kHour : kHour + kHour / 2;
    blocks.push_back({kStart + at, kStart + at + length, q * kLPerMin / kRoof_m2});
  }
  return blocks;
}

constexpr Instant kFiveEvents_s = 52 * kHour;

SiphonReference reference(double priming_L_per_min, double loss_k) {
  SiphonReference ref;
  ref.priming_m3_per_s = priming_L_per_min * kLPerMin;
  ref.loss_k = loss_k;
  return ref;
}

CycleLog log_of(const std::vector<Instant>& starts) {
  CycleLog log;
  log.starts = starts;
  for (std::size_t k = 0; k < starts.size(); ++k) log.lines.push_back(static_cast<int>(k) + 2);
  return log;
}

TEST(CycleFit, SimulatedCycleStartsMatchThePlainReference) {
  const auto blocks = five_events();
  const RainSeries rain = block_rain(kStart, kStart + kFiveEvents_s, blocks);
  const std::vector<Instant> model =
      simulate_cycle_starts(field(2.5, 3.0, kFiveEvents_s), rain).starts;
  const std::vector<Instant> expected =
      reference_cycle_starts(reference(2.5, 3.0), blocks, kStart, kStart + kFiveEvents_s);
  // No cycle at 1.5 or 2.2 L/min (below the priming flow); a fill of 0.8 m2 x 47 mm takes
  // about 12 min at 3 L/min, so some 14 cycles in 3 h, more at 5 and 8 L/min.
  ASSERT_GT(expected.size(), 30u);
  ASSERT_EQ(model.size(), expected.size());
  EXPECT_GE(expected.front(), kStart + 22 * kHour);
  for (std::size_t k = 0; k < model.size(); ++k) {
    EXPECT_NEAR(static_cast<double>(model[k] - expected[k]), 0.0, 2.0) << "cycle " << k;
  }
}

TEST(CycleFit, RecoversThePrimingFlowAndTheLossFromAReferenceLog) {
  const auto blocks = five_events();
  const RainSeries rain = block_rain(kStart, kStart + kFiveEvents_s, blocks);
  const CycleLog log =
      log_of(reference_cycle_starts(reference(2.5, 3.0), blocks, kStart, kStart + kFiveEvents_s));
  const CycleFit fit = fit_cycles(field(1.5, 1.0, kFiveEvents_s), rain, log, "cycles.csv");
  for (const std::string& w : fit.warnings) ADD_FAILURE() << w;
  // The counts put the priming flow above the inflow that only dribbled (2.2 L/min) and below
  // the one that cycled (3 L/min); within that, the volume of each fill (the head the siphon
  // primes at) narrows it further.
  ASSERT_TRUE(fit.priming_low_m3_per_s && fit.priming_high_m3_per_s);
  EXPECT_GT(*fit.priming_low_m3_per_s / kLPerMin, 2.2);
  EXPECT_LT(*fit.priming_low_m3_per_s / kLPerMin, 2.5);
  EXPECT_GT(*fit.priming_high_m3_per_s / kLPerMin, 2.5);
  EXPECT_LT(*fit.priming_high_m3_per_s / kLPerMin, 3.0);
  EXPECT_TRUE(fit.priming_flow.fitted);
  EXPECT_NEAR(fit.priming_flow.value / kLPerMin, 2.5, 0.25);
  ASSERT_TRUE(fit.priming_flow.sigma);
  ASSERT_TRUE(fit.minor_loss_k.fitted);
  EXPECT_NEAR(fit.minor_loss_k.value, 3.0, 0.3);
  EXPECT_EQ(fit.after.unmatched, 0);
  EXPECT_EQ(fit.simulated, fit.observed);
  EXPECT_LT(fit.after.rms_s(), 5.0);
  EXPECT_GT(fit.before.unmatched, 0);  // at 1.5 L/min the 2.2 L/min event cycled too
}

TEST(CycleFit, RecoversItsOwnValuesFromAModelLog) {
  const auto blocks = five_events();
  const RainSeries rain = block_rain(kStart, kStart + kFiveEvents_s, blocks);
  const CycleLog log = log_of(simulate_cycle_starts(field(4.0, 6.0, kFiveEvents_s), rain).starts);
  const CycleFit fit = fit_cycles(field(2.0, 1.0, kFiveEvents_s), rain, log, "cycles.csv");
  ASSERT_TRUE(fit.priming_low_m3_per_s && fit.priming_high_m3_per_s);
  EXPECT_LT(*fit.priming_low_m3_per_s, 4.0 * kLPerMin);
  EXPECT_GT(*fit.priming_high_m3_per_s, 4.0 * kLPerMin);
  ASSERT_TRUE(fit.minor_loss_k.fitted);
  EXPECT_NEAR(fit.minor_loss_k.value, 6.0, 0.6);
  ASSERT_TRUE(fit.minor_loss_k.sigma);
  EXPECT_EQ(fit.after.unmatched, 0);
}

TEST(CycleFit, ALogWithoutCyclesLeavesBothValuesAsTheyWere) {
  // Only the 1.5 and 2.2 L/min events, which a siphon priming at 2.5 L/min never cycles in: the
  // log bounds the priming flow from below only, and has no start whose timing could tell the
  // loss.
  std::vector<RainBlock> blocks = five_events();
  blocks.resize(2);
  const RainSeries rain = block_rain(kStart, kStart + kFiveEvents_s, blocks);
  const CycleFit fit = fit_cycles(field(1.5, 3.0, kFiveEvents_s), rain, CycleLog{}, "cycles.csv");
  EXPECT_FALSE(fit.priming_flow.fitted);
  EXPECT_EQ(fit.priming_flow.value, 1.5 * kLPerMin);
  ASSERT_TRUE(fit.priming_low_m3_per_s);
  EXPECT_NEAR(*fit.priming_low_m3_per_s / kLPerMin, 2.2, 0.1);
  EXPECT_FALSE(fit.priming_high_m3_per_s);
  EXPECT_FALSE(fit.minor_loss_k.fitted);
  EXPECT_EQ(fit.minor_loss_k.value, 3.0);
  ASSERT_EQ(fit.warnings.size(), 2u);
  EXPECT_EQ(fit.warnings[0].substr(0, 84),
            "the log's cycles are reproduced as well by the largest priming flow the scenario "
            "all");
  EXPECT_EQ(fit.warnings[1].substr(0, 48), "neither the cycle counts nor the timing of the c");
}

TEST(CycleFit, RejectsACycleOutsideTheSimulatedPeriod) {
  const RainSeries rain = block_rain(kStart, kStart + kFiveEvents_s, five_events());
  CycleLog log = log_of({kStart + 23 * kHour, kStart + 60 * kHour});
  EXPECT_EQ(test_support::input_error_of(
                [&] { fit_cycles(field(2.5, 3.0, kFiveEvents_s), rain, log, "cycles.csv"); }),
            "cycles.csv:3: time: the cycle at 2025-03-03T12:00 is outside the simulated period, "
            "2025-03-01T00:00 to 2025-03-03T04:00; set simulation.start and simulation.end to "
            "the time the log covers");
}

TEST(CycleFit, PairsStartsInTimeOrderWithinEachEvent) {
  // Event 1: observed 10, 50 against simulated 12, 30, 55: pairing 10-12 and 50-55 costs
  // 4 + 25 = 29 s2 (10-12, 50-30 would cost 404; 10-30, 50-55 425), one simulated unpaired.
  // Event 2: observed 150 against 160, 170: 150-160, 100 s2, one unpaired.
  const CycleMatch m = match_cycles({10, 50, 150}, {12, 30, 55, 160, 170}, {{0, 100}, {100, 200}});
  EXPECT_EQ(m.unmatched, 2);
  EXPECT_EQ(m.pairs, 3);
  EXPECT_DOUBLE_EQ(m.sum_squares_s2, 129.0);
  EXPECT_DOUBLE_EQ(m.rms_s(), std::sqrt(43.0));
}

TEST(CycleFit, CountsComeBeforeTiming) {
  CycleMatch close{1, 5, 5.0};
  CycleMatch counted{0, 5, 5000.0};
  EXPECT_TRUE(counted.better_than(close));
  EXPECT_FALSE(close.better_than(counted));
}

TEST(CycleFit, RainEventsEndAfterSixDryHours) {
  RainSeries rain;
  rain.pulses = {{1000, 1300, 1e-3},
                 {1300 + 5 * kHour, 1600 + 5 * kHour, 1e-3},
                 {1600 + 11 * kHour, 1900 + 11 * kHour, 1e-3}};
  const std::vector<TimeSpan> w = rain_event_windows(rain, 0, 30 * kHour);
  ASSERT_EQ(w.size(), 2u);
  EXPECT_EQ(w[0].start, 0);
  EXPECT_EQ(w[0].end, 1600 + 11 * kHour);
  EXPECT_EQ(w[1].end, 30 * kHour);
}

cli_support::Outcome fit_field_demo_in(const std::filesystem::path& dir, const std::string& args) {
  return cli_support::run_in(
      dir, "fit " + cli_support::source("scenarios/field-demo.yaml") + " " + args);
}

TEST(FitCommand, BadCycleLogIsOneLineExitTwoNamingFileLineAndColumn) {
  using namespace cli_support;
  const std::filesystem::path dir = scratch("fit-bad-cycles");
  write_file(dir / "cycles.csv", "time\n2025-09-03T05:36\n2025-09-03T05:3x\n");
  expect_bad(fit_field_demo_in(dir, "--cycles cycles.csv"),
             "cycles.csv:3: time: not an ISO 8601 date-time such as 2025-03-01T00:05 (got "
             "\"2025-09-03T05:3x\")");
}

TEST(FitCommand, TakesOneLogNotBoth) {
  using namespace cli_support;
  const std::filesystem::path dir = scratch("fit-both-logs");
  expect_bad(fit_field_demo_in(dir, "--cycles a.csv --bench b.csv"),
             "--cycles: give one log: --bench or --cycles, not both");
}

TEST(FitCommand, FitsTheInventedFieldLogAndWritesAScenarioThatLoads) {
  using namespace cli_support;
  const std::filesystem::path dir = scratch("fit-field-demo");
  const Outcome r = fit_field_demo_in(
      dir, "--cycles " + source("data/demo/cycles-demo.csv") + " --out fitted.yaml");
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("wrote fitted.yaml"), std::string::npos);
  EXPECT_NE(r.out.find("  total                              86 "), std::string::npos) << r.out;
  const Scenario s = load_scenario(dir / "fitted.yaml");
  // The invented build primes at 1.3 L/min with a loss sum of 4.5 (tools/make_cycle_log.py).
  EXPECT_NEAR(s.release.priming_flow_m3_per_s / kLPerMin, 1.3, 0.05);
  EXPECT_NEAR(s.drop_pipe.minor_loss_k, 4.5, 0.45);
  EXPECT_EQ(s.release.priming_flow_measured_by, source("data/demo/cycles-demo.csv"));
  const std::string text = cli_support::slurp(dir / "fitted.yaml");
  EXPECT_EQ(text.substr(0, text.find('\n')),
            "# Fitted by gutterwatt fit to the cycle log " + source("data/demo/cycles-demo.csv") +
                ": release.priming_flow_L_per_min, drop_pipe.minor_loss_k.");
}

}  // namespace
}  // namespace gutterwatt::cycle_fit_test
