// Tests of the design figures `gutterwatt check` prints, against hand calculations from the
// published relations.

#include "gutterwatt/design.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <sstream>
#include <string>
#include <vector>

#include "gutterwatt/fragments.hpp"
#include "gutterwatt/hydraulics.hpp"
#include "gutterwatt/simulation.hpp"
#include "test_support.hpp"

namespace gutterwatt::design_test {
namespace {

using test_support::make_scenario;

// A drop pipe long enough that a gutter 8 m long cannot feed the siphon below its rim.
constexpr double kLongDrop_m = 80.0;

constexpr double kG = 9.80665;

TEST(Design, StorageOfARectangularGutterIsWidthTimesLengthTimesTheLevelSpan) {
  Scenario s = make_scenario();
  s.release.kind = ReleaseKind::float_valve;
  const DesignFigures d = evaluate_design(s, nullptr);
  ASSERT_TRUE(d.storage_m3);
  // Prism volume, 0.1 m x 8 m x (0.050 - 0.008) m.
  EXPECT_NEAR(*d.storage_m3, 0.1 * 8.0 * 0.042, 1e-12);
}

TEST(Design, BellStorageRunsToThePrimingLevel) {
  const Scenario s = make_scenario();
  const DesignFigures d = evaluate_design(s, nullptr);
  ASSERT_TRUE(d.priming_level_m);
  // Weir head of the priming flow over the lip (ISO 1438 form), by hand h = (Q / (C pi d))^(2/3)
  // = (5e-5 / (1.77 pi 0.019))^(2/3) = 6.072891 mm; storage 0.8 m2 x 48.072891 mm = 38.458313 L.
  EXPECT_NEAR(*d.priming_level_m, 0.056072891, 1e-9);
  EXPECT_NEAR(*d.storage_m3, 38.458313e-3, 1e-9);
}

TEST(Design, PrimingFlowAsRainIntensityFollowsTheRationalMethod) {
  Scenario s = make_scenario();
  s.roof.runoff_coefficient = 0.9;
  s.release.priming_flow_m3_per_s = 2e-3 / 60.0;
  const DesignFigures d = evaluate_design(s, nullptr);
  // Rational method Q = C i A (ASCE/WPCF 1969 as in Chow et al. 1988): i = Q / (C A);
  // 2 L/min on 0.9 x 40 m2 is 3.333 mm/h.
  EXPECT_NEAR(*d.priming_intensity_m_per_s * 3.6e6, 3.3333333333, 1e-9);
}

TEST(Design, HeadColumnRunningFlowMatchesTheFullBoreSiphonWorkedCheck) {
  // REFERENCES.md section 4 (C): free outfall, dH 1.5 m, D 40 mm, L 3 m, K 1.1, 20 C: 3.684 L/s.
  Scenario s = make_scenario();
  s.site.temperature_C = 20.0;
  s.release.kind = ReleaseKind::float_valve;
  s.release.orifice_diameter_m = 0.2;  // wide open: the pipe controls
  s.release.orifice_coefficient = 1.0;
  s.drop_pipe = Pipe{0.040, 3.0, 0.0015e-3, 1.1};
  s.head_column = HeadColumnConfig{0.2, 1.0};
  s.drop_m = 1.5 + 1.0 - 0.050;  // level at trigger + drop - column height = 1.5 m
  s.nozzle = Nozzle{0.020, 0.95, 0.97};
  const DesignFigures d = evaluate_design(s, nullptr);
  EXPECT_NEAR(d.running_flow_trigger_m3_per_s * 1e3, 3.684, 0.005 * 3.684);
}

TEST(Design, NozzleFiguresAtTheColumnHeadFollowTorricelli) {
  Scenario s = make_scenario();
  s.head_column = HeadColumnConfig{0.12, 3.0};
  const DesignFigures d = evaluate_design(s, nullptr);
  EXPECT_DOUBLE_EQ(d.design_head_m, 3.0);
  // Q = Cd A sqrt(2 g H), V = Cv sqrt(2 g H): Torricelli with coefficients (REFERENCES.md 5), by
  // hand for the 5 mm nozzle under 3 m: Q = 0.95 x 1.963495e-5 x 7.670720 = 0.1430835 L/s,
  // V = 0.97 x 7.670720 = 7.440596 m/s.
  EXPECT_NEAR(d.nozzle_flow_m3_per_s, 0.1430835e-3, 1e-10);
  EXPECT_NEAR(d.jet_velocity_m_per_s, 7.440596, 1e-6);
  // Jet power rho Q V^2 / 2 at 15 C (rho 999.101 kg/m3, REFERENCES.md section 2, 0.05 %) =
  // 3.957166 W; electrical = best-speed peak efficiency x generator efficiency, 0.7 x 0.65 of it
  // = 1.800510 W.
  EXPECT_NEAR(d.jet_power_W, 3.957166, 3.957166 * 5e-4);
  EXPECT_NEAR(d.electrical_power_W, 1.800510, 1.800510 * 5e-4);
}

TEST(Design, EnergyPerCycleIsTheStoredWaterTimesHeadTimesTheChainEfficiency) {
  // A tall drop makes the head nearly constant over the cycle, so E ~ rho g V H eta (hand
  // calculation; the quadrature must agree within 1 %). V = 0.1 m x 8 m x (0.050 - 0.008) m =
  // 0.0336 m3; H = the 20 m drop: the 8-50 mm of water above it adds at most 0.25 %, and the pipe
  // loses less (5 mm nozzle, Q ~ 0.95 x 1.96e-5 m2 x sqrt(2 g 20 m) = 0.37 L/s, 0.19 m/s in the
  // 50 mm pipe, a velocity head of 1.8 mm).
  Scenario s = make_scenario();
  s.release.kind = ReleaseKind::float_valve;
  s.release.orifice_diameter_m = 0.05;
  s.release.orifice_coefficient = 1.0;
  s.drop_m = 20.0;
  s.drop_pipe = Pipe{0.05, 20.0, 0.0015e-3, 0.5};
  const DesignFigures d = evaluate_design(s, nullptr);
  ASSERT_TRUE(d.energy_per_cycle_J);
  const double rho = 999.101;  // 15 C, REFERENCES.md section 2
  const double eta = 0.97 * 0.97 * 0.7 * 0.65;
  const double e = rho * kG * 0.0336 * 20.0 * eta;
  EXPECT_NEAR(*d.energy_per_cycle_J, e, 0.01 * e);
  // Drain time of a prism at nearly constant outflow: V / Q.
  EXPECT_NEAR(*d.cycle_drain_s, *d.storage_m3 / d.running_flow_trigger_m3_per_s,
              0.01 * *d.cycle_drain_s);
}

TEST(Design, RunnerSpeedAtTheDesignHeadIsTheHeldBestSpeed) {
  // Hand computation: V_j = 0.97 sqrt(2 x 9.80665 x 3.0) = 7.440596 m/s, N = 60 x 0.5 x V_j /
  // (pi x 0.070 m) = 1015.035 rpm at speed ratio 0.5 (REFERENCES.md section 7).
  Scenario s = make_scenario();
  s.head_column = HeadColumnConfig{0.12, 3.0};
  const DesignFigures d = evaluate_design(s, nullptr);
  EXPECT_NEAR(d.runner_speed_rpm, 1015.035, 0.001);
  EXPECT_NEAR(d.speed_ratio, 0.5, 1e-12);
}

TEST(Design, AnOrificeReleaseHoldsTheRunnerForTheHeadItsOpeningAllows) {
  // Regression: the held speed was set for the pipe's full flow, a head the nozzle never sees
  // behind a small orifice (speed ratio 6, no power). Hand computation (REFERENCES.md section 5,
  // Q = Cd a sqrt(2 g h)): a 6 mm orifice, Cd 0.61, under the 62 mm rim passes
  // 0.61 x 2.827433e-5 m2 x sqrt(2 x 9.80665 x 0.062) = 1.901925e-5 m3/s; the 5 mm nozzle, Cd 0.95,
  // passes it at H = (Q / (0.95 x 1.963495e-5 m2))^2 / (2 x 9.80665) = 0.0530065 m; held at speed
  // ratio 0.5 (section 7): N = 60 x 0.5 x 0.97 sqrt(2 g H) / (pi x 0.070 m) = 134.9227 rpm.
  Scenario s = make_scenario();
  s.release.kind = ReleaseKind::orifice;
  s.release.orifice_diameter_m = 0.006;
  const DesignFigures d = evaluate_design(s, nullptr);
  EXPECT_NEAR(d.design_head_m, 0.0530065, 1e-6);
  EXPECT_NEAR(d.runner_speed_rpm, 134.9227, 1e-3);
  EXPECT_NEAR(d.speed_ratio, 0.5, 1e-9);
}

TEST(Design, WarnsWhenTheGeneratorNeverReachesTheBatteryVoltage) {
  // 12 V / 0.005 V/rpm = 2400 rpm, above the runaway 2030 rpm of the 3.0 m jet.
  Scenario s = make_scenario();
  s.head_column = HeadColumnConfig{0.12, 3.0};
  s.generator.volts_per_rpm = 0.005;
  s.battery.voltage_V = 12.0;
  const DesignFigures d = evaluate_design(s, nullptr);
  EXPECT_EQ(d.electrical_power_W, 0.0);
  const std::string expected =
      "The generator reaches the battery's voltage only at 2400 rpm, faster than the jet at the "
      "design head can drive the runner: it will not charge. A generator with more volts per rpm, "
      "a smaller runner or more head would.";
  EXPECT_NE(std::find(d.warnings.begin(), d.warnings.end(), expected), d.warnings.end());
}

TEST(Design, WarnsWhenWaterStandsLongerThanAWeek) {
  // Lip 50 mm: the water up to it stands (below the 8 mm bell rim too) until it is under 1 mm
  // deep, which a level pool reaches at the evaporation rate whatever its section: 49 / 4.5 =
  // 10.9 days (> 7); at 8 mm/day, 6.1 days (no warning).
  Scenario s = make_scenario();
  s.reservoir.evaporation_m_per_s = {4.5e-3 / 86400.0};
  const std::string expected =
      "Between storms the reservoir holds water up to the standpipe lip (50 mm), which only "
      "evaporation lowers: even at the highest evaporation given (4.5 mm/day) that takes 10.9 "
      "days. Mosquitoes breed in standing water in about 7 days (common practice): screen every "
      "opening or empty it weekly.";
  const DesignFigures d = evaluate_design(s, nullptr);
  EXPECT_NE(std::find(d.warnings.begin(), d.warnings.end(), expected), d.warnings.end());
  s.reservoir.evaporation_m_per_s = {8e-3 / 86400.0};
  const DesignFigures quick = evaluate_design(s, nullptr);
  for (const std::string& w : quick.warnings)
    EXPECT_EQ(w.find("Between storms"), std::string::npos);
}

TEST(Design, WarnsWhenCutInExceedsTheDesignPower) {
  Scenario s = make_scenario();
  s.generator.cut_in_W = 1000.0;
  const DesignFigures d = evaluate_design(s, nullptr);
  ASSERT_FALSE(d.warnings.empty());
  EXPECT_NE(d.warnings.back().find("cut-in power (1000 W) is above the design power"),
            std::string::npos);
}

TEST(Design, WarnsWhenPrimingNeedsMoreThanTheRecordsUsualRain) {
  const Scenario s = make_scenario();
  // 1 mm/h light rain for a day: below the 4.5 mm/h that primes 3 L/min on 40 m2.
  const RainSeries rain = test_support::block_rain(
      test_support::kStart, test_support::kStart + 86400,
      {{test_support::kStart, test_support::kStart + 86400, 1e-3 / 3600.0}}, 300);
  const DesignFigures d = evaluate_design(s, &rain);
  ASSERT_TRUE(d.record && d.record->priming_exceedance);
  EXPECT_EQ(*d.record->priming_exceedance, 0.0);
  EXPECT_EQ(*d.record->volume_below_priming, 1.0);
  ASSERT_FALSE(d.warnings.empty());
  EXPECT_EQ(d.warnings.front().rfind("The siphon needs 4.5 mm/h of rain to prime", 0), 0u)
      << d.warnings.front();
}

TEST(Design, SharesTheRecordsRainVolumeAtThePrimingIntensity) {
  // Invented: an hour at 1 mm/h, an hour at 2 mm/h, half an hour at 10 mm/h (1 + 2 + 5 mm).
  const Instant t0 = test_support::kStart;
  constexpr double kMmPerHour = 1e-3 / 3600.0;
  const RainSeries rain = test_support::block_rain(t0, t0 + 86400,
                                                   {{t0, t0 + 3600, 1.0 * kMmPerHour},
                                                    {t0 + 3600, t0 + 7200, 2.0 * kMmPerHour},
                                                    {t0 + 7200, t0 + 9000, 10.0 * kMmPerHour}},
                                                   1800);
  const RecordFigures f = record_figures(rain, 4.5 * kMmPerHour, 0);
  // Hand-computed: below 4.5 mm/h fall 1 + 2 of the 8 mm (37.5 %); 0.5 h of the 2.5 wet hours
  // are at or above it (20 %); half the wet time (1.25 h) is reached inside the 2 mm/h hour.
  EXPECT_DOUBLE_EQ(*f.volume_below_priming, 0.375);
  EXPECT_DOUBLE_EQ(*f.priming_exceedance, 0.2);
  EXPECT_DOUBLE_EQ(f.median_intensity_m_per_s, 2.0 * kMmPerHour);
  EXPECT_DOUBLE_EQ(f.peak_intensity_m_per_s, 10.0 * kMmPerHour);
  EXPECT_EQ(f.step_s, 1800);
  EXPECT_FALSE(record_figures(rain, std::nullopt, 0).volume_below_priming);
}

TEST(Design, PrintsTheRecordAsReadBesideItsDisaggregation) {
  Scenario s = make_scenario();
  s.rain.disaggregate.emplace();
  s.rain.disaggregate->method = DisaggregationMethod::cascade;
  const Instant t0 = test_support::kStart;
  const RainSeries as_read =
      test_support::block_rain(t0, t0 + 86400, {{t0, t0 + 86400, 0.5e-3 / 3600.0}}, 86400);
  const RainSeries rain =
      test_support::block_rain(t0, t0 + 86400, {{t0, t0 + 3600, 12e-3 / 3600.0}}, 300);
  std::ostringstream out;
  write_design(out, s, evaluate_design(s, &rain, &as_read));
  const std::string text = out.str();
  for (const char* line : {
           "  record as read, 1d steps\n"
           "    median wet intensity                                        0.5  mm/h\n"
           "    rain volume below the priming intensity                     100  %\n",
           "  record disaggregated by cascade, 5min steps\n"
           "    median wet intensity                                         12  mm/h\n"
           "    rain volume below the priming intensity                       0  %\n",
       }) {
    EXPECT_NE(text.find(line), std::string::npos) << text;
  }
}

// A library of `length_s` whose wet intervals hold `depths_m`.
FragmentLibrary library_of(Instant length_s, const std::vector<double>& depths_m) {
  FragmentLibrary library;
  library.length_s = length_s;
  for (const double d : depths_m) {
    Fragment f;
    f.depth_m = d;
    library.intervals.push_back(f);
  }
  return library;
}

TEST(Design, CountsTheIntervalsAtOrAboveThePrimingDepth) {
  // Invented: priming at 2^-20 m/s (3.43 mm/h), so the priming depth of an hour, 3600 * 2^-20 m,
  // is exact in binary and an interval can hold exactly it.
  constexpr double kPriming = 0x1p-20;
  constexpr double kDepth = 3600.0 * kPriming;
  const Instant t0 = test_support::kStart;
  // Hourly record: below, exactly at, above, below, far above the priming depth.
  const RainSeries as_read = test_support::block_rain(t0, t0 + 5 * 3600,
                                                      {{t0, t0 + 3600, 0.5 * kPriming},
                                                       {t0 + 3600, t0 + 7200, kPriming},
                                                       {t0 + 7200, t0 + 10800, 1.5 * kPriming},
                                                       {t0 + 10800, t0 + 14400, 0.99 * kPriming},
                                                       {t0 + 14400, t0 + 18000, 4.0 * kPriming}},
                                                      3600);
  Disaggregation how;
  how.method = DisaggregationMethod::fragments;
  // The hourly library: 2 at or above (one exactly at); the daily one is another length.
  how.fragments = {library_of(86400, {kDepth, kDepth, kDepth}),
                   library_of(3600, {0.2 * kDepth, kDepth, 0.999 * kDepth, 3.0 * kDepth})};
  const std::optional<PrimingIntervals> p = priming_intervals(as_read, how, kPriming);
  ASSERT_TRUE(p);
  EXPECT_EQ(p->length_s, 3600);
  EXPECT_EQ(p->depth_m, kDepth);
  EXPECT_EQ(p->record, 3u);  // at, 1.5 times, 4 times
  EXPECT_EQ(p->calibration, 2u);
  // No library of the record's step, or another method: nothing to count.
  how.fragments.pop_back();
  EXPECT_FALSE(priming_intervals(as_read, how, kPriming));
  how.method = DisaggregationMethod::cascade;
  EXPECT_FALSE(priming_intervals(as_read, how, kPriming));
}

// The warning when the calibration holds fewer than kFewDeepCalibrationIntervals as deep as
// the record's that prime on their own, and the lines check prints.
TEST(Design, WarnsWhenFewCalibrationIntervalsAreDeepEnoughToPrime) {
  Scenario s = make_scenario();  // primes at 4.5 mm/h: 4.5 mm in an hour
  s.rain.disaggregate.emplace();
  s.rain.disaggregate->method = DisaggregationMethod::fragments;
  const Instant t0 = test_support::kStart;
  constexpr double kMmPerHour = 1e-3 / 3600.0;
  const RainSeries as_read = test_support::block_rain(
      t0, t0 + 3 * 3600, {{t0, t0 + 3600, 10.0 * kMmPerHour}, {t0 + 3600, t0 + 7200, kMmPerHour}},
      3600);
  const RainSeries rain =
      test_support::block_rain(t0, t0 + 3 * 3600, {{t0, t0 + 900, 40.0 * kMmPerHour}}, 300);
  const auto warned = [](const DesignFigures& d) {
    return std::any_of(d.warnings.begin(), d.warnings.end(), [](const std::string& w) {
      return w.find("prime the siphon on their own and make most of the energy") !=
             std::string::npos;
    });
  };
  std::vector<double> depths(kFewDeepCalibrationIntervals - 1, 6e-3);  // 9 of 6 mm
  depths.push_back(1e-3);
  s.rain.disaggregate->fragments = {library_of(3600, depths)};
  const DesignFigures few = evaluate_design(s, &rain, &as_read);
  ASSERT_TRUE(few.priming_intervals);
  EXPECT_EQ(few.priming_intervals->record, 1u);
  EXPECT_EQ(few.priming_intervals->calibration, kFewDeepCalibrationIntervals - 1);
  EXPECT_TRUE(warned(few));
  std::ostringstream out;
  write_design(out, s, few);
  EXPECT_NE(
      out.str().find("  1h intervals deep enough to prime on their own (4.5 mm or more)\n"
                     "    in the record as read                                         1  \n"
                     "    in the calibration record                                     9  \n"),
      std::string::npos)
      << out.str();
  depths.back() = 6e-3;  // 10 of 6 mm
  s.rain.disaggregate->fragments = {library_of(3600, depths)};
  EXPECT_FALSE(warned(evaluate_design(s, &rain, &as_read)));
  // The record as read, or spread by the cascade: no count, no line, no warning.
  const DesignFigures read = evaluate_design(s, &as_read);
  EXPECT_FALSE(read.priming_intervals);
  s.rain.disaggregate->method = DisaggregationMethod::cascade;
  const DesignFigures cascade = evaluate_design(s, &rain, &as_read);
  EXPECT_FALSE(cascade.priming_intervals);
  EXPECT_FALSE(warned(cascade));
  for (const DesignFigures& d : {read, cascade}) {
    std::ostringstream text;
    write_design(text, s, d);
    EXPECT_EQ(text.str().find("deep enough to prime"), std::string::npos) << text.str();
  }
}

TEST(Design, PrintsEveryFigureOfASystemWithoutColumnOrRecordAndTheCautions) {
  std::ostringstream out;
  const Scenario s = make_scenario();
  write_design(out, s, evaluate_design(s, nullptr));
  const std::string text = out.str();
  for (const char* label :
       {"storage between the set-points", "priming level (lip + head on the standpipe)",
        "priming flow as steady rain", "running flow at the set-point",
        "running flow where the release ends", "running time per cycle", "design head",
        "nozzle flow at design head", "jet velocity", "jet power", "runner speed at design head",
        "speed ratio (bucket / jet speed)", "electrical power at design head",
        "rain that overflows the rim", "energy per cycle", "Cautions", "Working at height"}) {
    EXPECT_NE(text.find(label), std::string::npos) << label;
  }
}

TEST(Design, ALongLevelGutterPrintsItsDeliveryAndWarnsWhereItCannotFeedTheRelease) {
  Scenario s = make_scenario();
  s.reservoir.shape = ReservoirShape::half_round;
  s.reservoir.width_m = 0.125;
  s.reservoir.length_m = 8.0;
  const DesignFigures d = evaluate_design(s, nullptr);
  // Brim-full (closed end at the 62 mm rim): 0.9184 x F_L(8 / 0.062 = 129.0: 0.88935) x
  // sqrt(g A^3 / T) of the 125 mm half-round at 62 / sqrt(3) = 35.80 mm = 1.1897 L/s (C).
  ASSERT_TRUE(d.gutter_delivery_brim_m3_per_s.has_value());
  EXPECT_NEAR(*d.gutter_delivery_brim_m3_per_s * 1e3, 1.1897, 1e-3);
  ASSERT_TRUE(d.gutter_delivery_trigger_m3_per_s.has_value());
  ASSERT_TRUE(d.release_ends_level_m.has_value());
  // The siphon draws about 0.43 L/s, which the gutter feeds only above some level between the
  // bell rim and the lip: the release ends there.
  EXPECT_GT(*d.release_ends_level_m, s.release.break_level_m + 1e-3);
  EXPECT_LT(*d.release_ends_level_m, s.release.trigger_level_m);
  std::ostringstream out;
  write_design(out, s, d);
  for (const char* text : {"gutter delivery to the outlet at the set-point",
                           "gutter delivery brim-full", "level at which the running release ends",
                           "the gutter delivers to its outlet less than the release running full "
                           "takes"}) {
    EXPECT_NE(out.str().find(text), std::string::npos) << text;
  }
  // A tank is a level pool: none of it.
  const DesignFigures pool = evaluate_design(make_scenario(), nullptr);
  EXPECT_FALSE(pool.gutter_delivery_brim_m3_per_s.has_value());
  EXPECT_FALSE(pool.release_ends_level_m.has_value());
}

TEST(Design, ALevelGutterThatFeedsItsReleaseOnlyOverItsRimSaysWhatRainStartsIt) {
  // The gutter of the test above with a drop pipe long enough that the siphon, running full and
  // drawing the pipe's volume, takes more than the gutter delivers below its rim.
  Scenario s = make_scenario();
  s.reservoir.shape = ReservoirShape::half_round;
  s.reservoir.width_m = 0.125;
  s.reservoir.length_m = 8.0;
  s.drop_pipe.length_m = kLongDrop_m;
  s.drop_m = kLongDrop_m;
  const DesignFigures d = evaluate_design(s, nullptr);
  ASSERT_TRUE(d.release_starts_level_m.has_value());
  ASSERT_TRUE(d.release_start_intensity_m_per_s.has_value());
  EXPECT_GT(*d.release_starts_level_m, s.reservoir.rim_m);
  EXPECT_TRUE(std::any_of(d.warnings.begin(), d.warnings.end(), [](const std::string& w) {
    return w.rfind("Below its rim (62 mm) the gutter cannot deliver", 0) == 0;
  }));
  // The run takes its start from the same guard, and holds the level by the same overflow: six
  // hours of steady rain a fifth below that intensity start no cycle, a fifth above start some.
  const double starts = *d.release_start_intensity_m_per_s;
  // By hand: the rim's weir, Q = 1.7 x 8 m x (h - 62 mm)^1.5 (ISO 3846 form, the scenario's
  // coefficient and length), is the steady rain on 40 m2 at runoff coefficient 1: i = Q / 40.
  const double over_rim_m = *d.release_starts_level_m - 0.062;
  EXPECT_NEAR(starts, 1.7 * 8.0 * over_rim_m * std::sqrt(over_rim_m) / 40.0, 1e-12);
  test_support::RecordingObserver below;
  test_support::RecordingObserver above;
  EXPECT_EQ(
      simulate(s,
               test_support::constant_rain(test_support::kStart, *s.simulation.end, 0.8 * starts),
               below)
          .cycles,
      0);
  EXPECT_GE(
      simulate(s,
               test_support::constant_rain(test_support::kStart, *s.simulation.end, 1.25 * starts),
               above)
          .cycles,
      1);
  // The gutter of the test above, with the usual drop pipe, feeds it where it starts.
  Scenario fed = s;
  fed.drop_pipe.length_m = make_scenario().drop_pipe.length_m;
  fed.drop_m = make_scenario().drop_m;
  const DesignFigures fed_d = evaluate_design(fed, nullptr);
  ASSERT_TRUE(fed_d.release_starts_level_m.has_value());
  EXPECT_LE(*fed_d.release_starts_level_m, fed.reservoir.rim_m);
  EXPECT_FALSE(fed_d.release_start_intensity_m_per_s.has_value());
}

TEST(Design, PointsToTheBenchTestUntilThePrimingFlowIsMeasured) {
  Scenario s = test_support::make_scenario();
  std::ostringstream guessed;
  write_design(guessed, s, evaluate_design(s, nullptr));
  EXPECT_NE(guessed.str().find("\nBench test\n" + std::string(kBenchTestNote) + "\n"),
            std::string::npos);
  s.release.priming_flow_measured_by = "bench.csv";
  std::ostringstream measured;
  write_design(measured, s, evaluate_design(s, nullptr));
  EXPECT_EQ(measured.str().find("Bench test"), std::string::npos);
}

}  // namespace
}  // namespace gutterwatt::design_test
