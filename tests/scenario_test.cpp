#include "gutterwatt/scenario.hpp"

#include <gtest/gtest.h>

#include <algorithm>
#include <fstream>
#include <regex>
#include <sstream>

#include "gutterwatt/error.hpp"

namespace gutterwatt::scenario_test {
namespace {

const std::filesystem::path kFixtures =
    std::filesystem::path(GUTTERWATT_SOURCE_DIR) / "tests/data/scenario";

std::string read_file(const std::filesystem::path& path) {
  std::ifstream in(path);
  std::ostringstream text;
  text << in.rdbuf();
  return text.str();
}

/// tests/data/scenario/minimal.yaml with the first `from` replaced by `to`.
std::string minimal_with(std::string_view from, std::string_view to) {
  std::string text = read_file(kFixtures / "minimal.yaml");
  const std::size_t at = text.find(from);
  EXPECT_NE(at, std::string::npos) << from;
  if (at != std::string::npos) text.replace(at, from.size(), to);
  return text;
}

Scenario parse(const std::string& text, const std::vector<std::string>& overrides = {}) {
  return parse_scenario(text, "demo.yaml", "base", overrides);
}

/// The message of the InputError that loading `text` throws.
std::string error_of(const std::string& text, const std::vector<std::string>& overrides = {}) {
  try {
    parse(text, overrides);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

std::string minimal() { return minimal_with("", ""); }

TEST(Scenario, LoadsEveryKeyOfACompleteFileInSiUnits) {
  const Scenario s = load_scenario(kFixtures / "complete.yaml");
  EXPECT_EQ(s.file, kFixtures / "complete.yaml");
  EXPECT_EQ(s.site.name, "Test shed");
  EXPECT_DOUBLE_EQ(s.site.temperature_C, 20.0);
  EXPECT_EQ(s.site.zone.offset_s(0), 7200);

  EXPECT_EQ(s.rain.format, RainFormat::series);
  EXPECT_EQ(s.rain.series.time_column, "stamp");
  EXPECT_EQ(s.rain.series.value_column, "intensity_in_h");
  EXPECT_EQ(s.rain.series.value, RainValue::intensity);
  EXPECT_DOUBLE_EQ(s.rain.series.unit_m, 0.0254);
  EXPECT_EQ(s.rain.series.unit_name, "in/h");
  EXPECT_EQ(s.rain.series.gaps, GapPolicy::zero);
  EXPECT_EQ(s.rain.series.step_s, 300.0);
  EXPECT_EQ(s.rain.series.zone.offset_s(0), -18000);

  EXPECT_DOUBLE_EQ(s.roof.area_m2, 40.0);
  EXPECT_DOUBLE_EQ(s.roof.runoff_coefficient, 0.8);
  EXPECT_DOUBLE_EQ(s.roof.initial_loss_m, 1.5e-3);
  EXPECT_DOUBLE_EQ(s.roof.drying_m_per_s, 5e-8);  // 4.32 mm a day
  EXPECT_DOUBLE_EQ(s.roof.lag_s, 120.0);

  EXPECT_DOUBLE_EQ(s.first_flush.volume_m3, 0.01);
  EXPECT_DOUBLE_EQ(s.first_flush.reset_after_dry_s, 6 * 3600.0);

  EXPECT_EQ(s.reservoir.shape, ReservoirShape::half_round);
  EXPECT_DOUBLE_EQ(s.reservoir.width_m, 0.125);
  EXPECT_DOUBLE_EQ(s.reservoir.length_m, 8.0);
  EXPECT_DOUBLE_EQ(s.reservoir.rim_m, 0.062);
  EXPECT_DOUBLE_EQ(s.reservoir.overflow_coefficient, 1.6);
  EXPECT_DOUBLE_EQ(s.reservoir.overflow_length_m, 0.5);
  EXPECT_DOUBLE_EQ(s.reservoir.initial_level_m, 0.010);

  EXPECT_EQ(s.release.kind, ReleaseKind::bell);
  EXPECT_DOUBLE_EQ(s.release.trigger_level_m, 0.050);
  EXPECT_DOUBLE_EQ(s.release.break_level_m, 0.008);
  EXPECT_DOUBLE_EQ(s.release.standpipe_diameter_m, 0.019);
  EXPECT_DOUBLE_EQ(s.release.priming_flow_m3_per_s, 5e-5);  // 3 L/min
  EXPECT_DOUBLE_EQ(s.release.lip_coefficient, 1.8);
  EXPECT_DOUBLE_EQ(s.release.orifice_diameter_m, 0.012);
  EXPECT_DOUBLE_EQ(s.release.orifice_coefficient, 0.6);

  EXPECT_DOUBLE_EQ(s.drop_pipe.diameter_m, 0.019);
  EXPECT_DOUBLE_EQ(s.drop_pipe.length_m, 4.5);
  EXPECT_DOUBLE_EQ(s.drop_pipe.roughness_m, 2e-6);
  EXPECT_DOUBLE_EQ(s.drop_pipe.minor_loss_k, 2.0);
  EXPECT_EQ(s.drop_pipe.friction, FrictionLaw::swamee_jain);
  EXPECT_DOUBLE_EQ(s.drop_m, 4.0);

  ASSERT_TRUE(s.head_column.has_value());
  EXPECT_DOUBLE_EQ(s.head_column->diameter_m, 0.040);
  EXPECT_DOUBLE_EQ(s.head_column->height_m, 3.5);

  EXPECT_DOUBLE_EQ(s.nozzle.diameter_m, 0.005);
  EXPECT_DOUBLE_EQ(s.nozzle.discharge_coefficient, 0.9);
  EXPECT_DOUBLE_EQ(s.nozzle.velocity_coefficient, 0.96);

  EXPECT_EQ(s.turbine.kind, TurbineKind::impulse);
  EXPECT_DOUBLE_EQ(s.turbine.runner_diameter_m, 0.070);
  ASSERT_TRUE(s.turbine.speed_rpm.has_value());
  EXPECT_DOUBLE_EQ(*s.turbine.speed_rpm, 1500.0);
  EXPECT_DOUBLE_EQ(s.turbine.peak_efficiency, 0.75);

  EXPECT_DOUBLE_EQ(s.generator.efficiency, 0.6);
  EXPECT_DOUBLE_EQ(s.generator.cut_in_W, 0.3);

  EXPECT_DOUBLE_EQ(s.battery.capacity_J, 60 * 3600.0);
  EXPECT_DOUBLE_EQ(s.battery.initial_soc, 0.25);
  EXPECT_DOUBLE_EQ(s.battery.charge_efficiency, 0.85);
  EXPECT_DOUBLE_EQ(s.battery.max_charge_W, 30.0);
  EXPECT_DOUBLE_EQ(s.battery.load_W, 0.1);
  ASSERT_EQ(s.battery.load_profile_W.size(), 24u);
  EXPECT_DOUBLE_EQ(s.battery.load_profile_W[18], 0.5);

  // Naive stamps are local time at the site's +02:00.
  EXPECT_EQ(s.simulation.start, Instant{1740780000});  // 2025-02-28T22:00Z
  EXPECT_EQ(s.simulation.end, Instant{1764539940});    // 2025-11-30T21:59Z
  EXPECT_DOUBLE_EQ(s.simulation.output_interval_s, 1800.0);
  EXPECT_DOUBLE_EQ(s.simulation.rtol, 1e-8);
}

TEST(Scenario, ResolvesRainPathsAgainstTheScenarioFolder) {
  const Scenario s = load_scenario(kFixtures / "complete.yaml");
  ASSERT_EQ(s.rain.files.size(), 2u);
  EXPECT_EQ(s.rain.files[0], kFixtures / "rain-2024.csv");
  EXPECT_EQ(s.rain.files[1], (kFixtures / "../shared/rain-2025.csv").lexically_normal());
}

TEST(Scenario, KeepsAnAbsoluteRainPath) {
  const Scenario s = parse(minimal_with("file: rain.csv", "file: /data/rain.csv"));
  ASSERT_EQ(s.rain.files.size(), 1u);
  EXPECT_EQ(s.rain.files[0], std::filesystem::path("/data/rain.csv"));
}

TEST(Scenario, FillsDefaultsForEveryOptionalKey) {
  const Scenario s = load_scenario(kFixtures / "minimal.yaml");
  EXPECT_DOUBLE_EQ(s.site.temperature_C, 15.0);
  EXPECT_EQ(s.site.zone.offset_s(0), 0);
  ASSERT_EQ(s.rain.files.size(), 1u);
  EXPECT_EQ(s.rain.files[0], kFixtures / "rain.csv");
  EXPECT_EQ(s.rain.format, RainFormat::series);
  EXPECT_EQ(s.rain.series.time_column, "time");
  EXPECT_EQ(s.rain.series.value_column, "rain_mm");
  EXPECT_EQ(s.rain.series.value, RainValue::depth);
  EXPECT_DOUBLE_EQ(s.rain.series.unit_m, 1e-3);
  EXPECT_EQ(s.rain.series.unit_name, "mm");
  EXPECT_EQ(s.rain.series.gaps, GapPolicy::error);
  EXPECT_FALSE(s.rain.series.step_s.has_value());
  EXPECT_DOUBLE_EQ(s.roof.runoff_coefficient, 0.9);
  EXPECT_DOUBLE_EQ(s.roof.initial_loss_m, 0.5e-3);
  EXPECT_DOUBLE_EQ(s.roof.drying_m_per_s, 3e-3 / 86400.0);
  EXPECT_DOUBLE_EQ(s.roof.lag_s, 60.0);
  EXPECT_DOUBLE_EQ(s.first_flush.volume_m3, 0.0);
  EXPECT_DOUBLE_EQ(s.first_flush.reset_after_dry_s, 12 * 3600.0);
  EXPECT_EQ(s.reservoir.shape, ReservoirShape::half_round);
  EXPECT_DOUBLE_EQ(s.reservoir.overflow_coefficient, 1.7);
  EXPECT_DOUBLE_EQ(s.reservoir.overflow_length_m, 4.0);  // the reservoir's length
  EXPECT_DOUBLE_EQ(s.reservoir.initial_level_m, 0.0);
  EXPECT_EQ(s.release.kind, ReleaseKind::bell);
  EXPECT_DOUBLE_EQ(s.release.lip_coefficient, 1.77);
  EXPECT_DOUBLE_EQ(s.release.orifice_coefficient, 0.61);
  EXPECT_DOUBLE_EQ(s.drop_pipe.roughness_m, 0.0015e-3);
  EXPECT_DOUBLE_EQ(s.drop_pipe.minor_loss_k, 1.5);
  EXPECT_EQ(s.drop_pipe.friction, FrictionLaw::colebrook);
  EXPECT_FALSE(s.head_column.has_value());
  EXPECT_DOUBLE_EQ(s.nozzle.discharge_coefficient, 0.95);
  EXPECT_DOUBLE_EQ(s.nozzle.velocity_coefficient, 0.97);
  EXPECT_FALSE(s.turbine.speed_rpm.has_value());
  EXPECT_FALSE(s.turbine.best_at_every_head);
  EXPECT_DOUBLE_EQ(s.turbine.peak_efficiency, 0.7);
  EXPECT_DOUBLE_EQ(s.generator.volts_per_rpm, 0.0);
  EXPECT_DOUBLE_EQ(s.battery.voltage_V, 0.0);
  EXPECT_DOUBLE_EQ(s.generator.efficiency, 0.65);
  EXPECT_DOUBLE_EQ(s.generator.cut_in_W, 0.0);
  EXPECT_DOUBLE_EQ(s.battery.initial_soc, 0.5);
  EXPECT_DOUBLE_EQ(s.battery.charge_efficiency, 0.9);
  EXPECT_DOUBLE_EQ(s.battery.discharge_efficiency, 0.9);
  EXPECT_DOUBLE_EQ(s.battery.self_discharge_per_month, 0.0);
  EXPECT_DOUBLE_EQ(s.battery.min_soc, 0.0);
  EXPECT_FALSE(s.battery.chemistry.has_value());
  EXPECT_DOUBLE_EQ(s.battery.max_charge_W, 1e9);
  EXPECT_DOUBLE_EQ(s.battery.load_W, 0.0);
  EXPECT_TRUE(s.battery.load_profile_W.empty());
  EXPECT_FALSE(s.simulation.start.has_value());
  EXPECT_FALSE(s.simulation.end.has_value());
  EXPECT_DOUBLE_EQ(s.simulation.output_interval_s, 3600.0);
  EXPECT_DOUBLE_EQ(s.simulation.rtol, 1e-6);
}

TEST(Scenario, ReadsBestAsTheBestRunnerSpeed) {
  const Scenario s = parse(
      minimal_with("  runner_diameter_mm: 60", "  runner_diameter_mm: 60\n  speed_rpm: best"));
  EXPECT_FALSE(s.turbine.speed_rpm.has_value());
  EXPECT_TRUE(s.turbine.best_at_every_head);
}

TEST(Scenario, BatteryChemistrySetsPresetsThatItsKeysOverride) {
  const Scenario lead = parse(minimal(), {"battery.min_soc=0.4", "battery.chemistry=lead_acid"});
  EXPECT_EQ(lead.battery.chemistry, BatteryChemistry::lead_acid);
  EXPECT_DOUBLE_EQ(lead.battery.self_discharge_per_month, 0.03);
  EXPECT_DOUBLE_EQ(lead.battery.min_soc, 0.4);  // given, whatever the order
  const Scenario lfp = parse(minimal(), {"battery.chemistry=lifepo4"});
  EXPECT_DOUBLE_EQ(lfp.battery.discharge_efficiency, 0.97);
  EXPECT_EQ(error_of(minimal(), {"battery.chemistry=nickel"}),
            "--set: battery.chemistry: expected one of lead_acid or lifepo4, got \"nickel\"");
  EXPECT_EQ(error_of(minimal(), {"battery.self_discharge_per_month=1"}),
            "--set: battery.self_discharge_per_month: must be >= 0 and < 1 (got 1)");
}

TEST(Scenario, ACutLoadReconnectsAboveTheCut) {
  const Scenario lead = parse(minimal(), {"battery.chemistry=lead_acid"});
  EXPECT_EQ(lead.battery.reconnect_soc, 0.7);  // the preset
  const Scenario given =
      parse(minimal(), {"battery.chemistry=lead_acid", "battery.reconnect_soc=0.6"});
  EXPECT_EQ(given.battery.reconnect_soc, 0.6);
  EXPECT_EQ(error_of(minimal(), {"battery.chemistry=lead_acid", "battery.reconnect_soc=0.5"}),
            "--set: battery.reconnect_soc: must be above battery.min_soc = 0.5 (got 0.5)");
  EXPECT_EQ(error_of(minimal(), {"battery.chemistry=lifepo4", "battery.min_soc=0.3"}),
            "--set: battery.min_soc: must be below 0.3, the reconnect charge of battery.chemistry "
            "(or set battery.reconnect_soc above it) (got 0.3)");
}

TEST(Scenario, EvaporationIsOneNumberOrTwelve) {
  const Scenario one = parse(minimal(), {"reservoir.evaporation_mm_per_day=3"});
  ASSERT_EQ(one.reservoir.evaporation_m_per_s.size(), 1u);
  EXPECT_DOUBLE_EQ(one.reservoir.evaporation_m_per_s[0], 3e-3 / 86400.0);
  const Scenario twelve = parse(
      minimal(), {"reservoir.evaporation_mm_per_day=[0.5, 1, 1.5, 2, 3, 4, 5, 4, 3, 2, 1, 0.5]"});
  ASSERT_EQ(twelve.reservoir.evaporation_m_per_s.size(), 12u);
  EXPECT_DOUBLE_EQ(twelve.reservoir.evaporation_m_per_s[6], 5e-3 / 86400.0);
  EXPECT_EQ(error_of(minimal(), {"reservoir.evaporation_mm_per_day=[1, 2, 3]"}),
            "--set: reservoir.evaporation_mm_per_day: must be one number or twelve, January to "
            "December (got 3)");
  // Open water evaporates some mm a day at most (REFERENCES.md section 13): 300 is a unit slip.
  EXPECT_EQ(error_of(minimal(), {"reservoir.evaporation_mm_per_day=300"}),
            "--set: reservoir.evaporation_mm_per_day: must be between 0 and 30 (got 300)");
  EXPECT_EQ(error_of(minimal(), {"reservoir.evaporation_mm_per_day=[1, 2, 3, 4, 5, 6, 7, 8, 9, 10, "
                                 "11, 1e9]"}),
            "--set: reservoir.evaporation_mm_per_day[11]: must be between 0 and 30 (got 1e9)");
}

TEST(Scenario, GeneratorVoltsPerRpmNeedTheBatteryVoltage) {
  EXPECT_EQ(error_of(minimal(), {"generator.volts_per_rpm=0.01"}),
            "demo.yaml:25: battery.voltage_V: missing required key (needed by "
            "generator.volts_per_rpm)");
  const Scenario s = parse(minimal(), {"generator.volts_per_rpm=0.01", "battery.voltage_V=12"});
  EXPECT_DOUBLE_EQ(s.generator.volts_per_rpm, 0.01);
  EXPECT_DOUBLE_EQ(s.battery.voltage_V, 12.0);
}

TEST(Scenario, RejectsARunnerSpeedThatIsNeitherANumberNorBest) {
  EXPECT_EQ(error_of(minimal_with("  runner_diameter_mm: 60",
                                  "  runner_diameter_mm: 60\n  speed_rpm: fast")),
            "demo.yaml:25: turbine.speed_rpm: expected a number or best, got \"fast\"");
}

// Running flow of minimal.yaml at the trigger level, worked outside the code (Colebrook solved by
// fixed-point iteration in a separate script, nu 1.1386 mm2/s at 15 C from REFERENCES.md
// section 2): H = 0.040 + 2.5 m through a 15 mm pipe 3 m long, K 1.5, into a 4 mm nozzle at
// Cd 0.95: Q = 4.9596 L/min (Re 6162).
TEST(Scenario, RejectsAPrimingFlowAtOrAboveTheRunningFlow) {
  EXPECT_EQ(error_of(minimal_with("priming_flow_L_per_min: 2", "priming_flow_L_per_min: 6")),
            "demo.yaml:16: release.priming_flow_L_per_min: the priming flow 6 L/min must be below "
            "the running flow at release.trigger_level_mm, 4.96 L/min (got 6)");
  EXPECT_NO_THROW(parse(minimal_with("priming_flow_L_per_min: 2", "priming_flow_L_per_min: 4.9")));
}

TEST(Scenario, RejectsANozzleDischargeCoefficientAboveItsVelocityCoefficient) {
  EXPECT_EQ(
      error_of(minimal_with("  diameter_mm: 4", "  diameter_mm: 4\n  discharge_coefficient: 0.98")),
      "demo.yaml:23: nozzle.discharge_coefficient: the discharge coefficient 0.98 must not "
      "exceed nozzle.velocity_coefficient = 0.97, as Cd = Cc Cv with Cc <= 1 (got 0.98)");
  EXPECT_EQ(
      error_of(minimal_with("  diameter_mm: 4", "  diameter_mm: 4\n  velocity_coefficient: 0.9")),
      "demo.yaml:23: nozzle.velocity_coefficient: must be at least "
      "nozzle.discharge_coefficient = 0.95, as Cd = Cc Cv with Cc <= 1 (got 0.9)");
}

const char* kTwoBuilds =
    "  priming_flow_L_per_min: 2\n"
    "  builds:\n"
    "    - {name: open, priming_flow_L_per_min: 3, measured_by: bench-a.csv}\n"
    "    - name: restricted\n"
    "      priming_flow_L_per_min: 1.2\n"
    "      minor_loss_k: 6\n"
    "      nozzle_discharge_coefficient: 0.9\n";

TEST(Scenario, PutsThePickedBuildInPlace) {
  const std::string text = minimal_with("  priming_flow_L_per_min: 2\n", kTwoBuilds);
  const Scenario none = parse(text);
  EXPECT_EQ(none.builds.size(), 2u);
  EXPECT_DOUBLE_EQ(none.release.priming_flow_m3_per_s, 2e-3 / 60.0);
  EXPECT_EQ(none.release.priming_flow_measured_by, "");
  const Scenario open = parse(text, {"release.build=open"});
  EXPECT_DOUBLE_EQ(open.release.priming_flow_m3_per_s, 3e-3 / 60.0);
  EXPECT_DOUBLE_EQ(open.drop_pipe.minor_loss_k, 1.5);  // the default, as the build has none
  EXPECT_EQ(open.release.priming_flow_measured_by, "bench-a.csv");
  const Scenario restricted = parse(text, {"release.build=restricted"});
  EXPECT_DOUBLE_EQ(restricted.release.priming_flow_m3_per_s, 1.2e-3 / 60.0);
  EXPECT_DOUBLE_EQ(restricted.drop_pipe.minor_loss_k, 6.0);
  EXPECT_DOUBLE_EQ(restricted.nozzle.discharge_coefficient, 0.9);
  EXPECT_EQ(restricted.release.priming_flow_measured_by, "build restricted");
}

TEST(Scenario, ReadsABuildGivenInUsUnits) {
  // A build's keys take their customary twins as every other key does. By hand (NIST HB 44,
  // appendix C): 0.5 gpm = 0.5 * 3.785411784 L = 1.892705892 L/min; 1/8 in = 3.175 mm.
  const std::string text =
      minimal_with("  priming_flow_L_per_min: 2\n",
                   "  priming_flow_L_per_min: 2\n  builds:\n"
                   "    - {name: us, priming_flow_gpm: 0.5, nozzle_diameter_in: 1/8}\n");
  const Scenario s = parse(text, {"release.build=us"});
  EXPECT_DOUBLE_EQ(s.release.priming_flow_m3_per_s, 1.892705892e-3 / 60.0);
  EXPECT_DOUBLE_EQ(s.nozzle.diameter_m, 3.175e-3);
  EXPECT_EQ(error_of(minimal_with("  priming_flow_L_per_min: 2\n",
                                  "  priming_flow_L_per_min: 2\n  builds:\n"
                                  "    - {name: a, priming_flow_L_per_min: 1,\n"
                                  "       priming_flow_gpm: 0.3}\n")),
            "demo.yaml:19: release.builds[0].priming_flow_gpm: give either "
            "release.builds[0].priming_flow_L_per_min (line 18) or "
            "release.builds[0].priming_flow_gpm (line 19), not both");
}

TEST(Scenario, RejectsAnUnknownBuild) {
  const std::string text = minimal_with("  priming_flow_L_per_min: 2\n", kTwoBuilds);
  EXPECT_EQ(error_of(text, {"release.build=tight"}),
            "--set: release.build: unknown build; expected one of open, restricted (got tight)");
  EXPECT_EQ(error_of(minimal(), {"release.build=open"}),
            "--set: release.build: names a build, but release.builds lists none (got open)");
}

TEST(Scenario, RejectsABuildWithoutAPrimingFlowOrWithTwoNames) {
  EXPECT_EQ(error_of(minimal_with("  priming_flow_L_per_min: 2\n",
                                  "  priming_flow_L_per_min: 2\n  builds: [{name: a}]\n")),
            "demo.yaml:17: release.builds[0].priming_flow_L_per_min: missing required key");
  EXPECT_EQ(error_of(minimal_with("  priming_flow_L_per_min: 2\n",
                                  "  priming_flow_L_per_min: 2\n  builds:\n"
                                  "    - {name: a, priming_flow_L_per_min: 1}\n"
                                  "    - {name: a, priming_flow_L_per_min: 2}\n")),
            "demo.yaml:19: release.builds[1].name: names another build already "
            "(release.builds[0]) (got a)");
}

TEST(Scenario, RejectsABuildThatPrimesAboveItsRunningFlow) {
  // minimal.yaml runs at 4.96 L/min at the trigger level (see the test above).
  const std::string text = minimal_with("  priming_flow_L_per_min: 2\n",
                                        "  builds: [{name: big, priming_flow_L_per_min: 5.5}]\n");
  EXPECT_EQ(error_of(text, {"release.build=big"}),
            "--set: release.build: the priming flow 5.5 L/min must be below the running flow at "
            "release.trigger_level_mm, 4.96 L/min (got big)");
}

TEST(Scenario, ReadsLagInSecondsOrAsADuration) {
  EXPECT_DOUBLE_EQ(parse(minimal(), {"roof.lag_s=90"}).roof.lag_s, 90.0);
  EXPECT_DOUBLE_EQ(parse(minimal(), {"roof.lag=1.5min"}).roof.lag_s, 90.0);
}

TEST(Scenario, RejectsLagGivenTwice) {
  EXPECT_EQ(error_of(minimal_with("  area_m2: 12", "  area_m2: 12\n  lag_s: 60\n  lag: 1min")),
            "demo.yaml:9: roof.lag: give either roof.lag_s or roof.lag, not both");
}

TEST(Scenario, TakesMillimetresWithIntensityAsPerHour) {
  const Scenario s = parse(minimal(), {"rain.value=intensity", "rain.unit=mm"});
  EXPECT_EQ(s.rain.series.value, RainValue::intensity);
  EXPECT_DOUBLE_EQ(s.rain.series.unit_m, 1e-3);
  EXPECT_EQ(s.rain.series.unit_name, "mm/h");
}

TEST(Scenario, RejectsAnIntensityUnitForDepths) {
  EXPECT_EQ(error_of(minimal_with("  file: rain.csv", "  file: rain.csv\n  unit: mm/h")),
            "demo.yaml:6: rain.unit: must be mm or in with value: depth (got mm/h)");
}

TEST(Scenario, RainOffsetDefaultsToTheSiteOffset) {
  const Scenario s = parse(minimal(), {"site.utc_offset=+05:30"});
  EXPECT_EQ(s.site.zone.offset_s(0), 19800);
  EXPECT_EQ(s.rain.series.zone.offset_s(0), 19800);
}

TEST(Scenario, KeepsAnOffsetWrittenInASimulationStamp) {
  const Scenario s =
      parse(minimal(), {"site.utc_offset=+02:00", "simulation.start=2025-06-01T00:00Z"});
  EXPECT_EQ(s.simulation.start, Instant{1748736000});
}

TEST(Scenario, ReadsALevelAreaTable) {
  const Scenario s =
      parse(minimal_with("  width_mm: 100\n  length_m: 4\n",
                         "  shape: table\n  levels_mm: [0, 100, 300]\n  areas_m2: [0.2, 0.5, 0.5]\n"
                         "  overflow_length_m: 0.3\n"));
  EXPECT_EQ(s.reservoir.shape, ReservoirShape::table);
  EXPECT_EQ(s.reservoir.table_level_m, (std::vector<double>{0.0, 0.1, 0.3}));
  EXPECT_EQ(s.reservoir.table_area_m2, (std::vector<double>{0.2, 0.5, 0.5}));
  EXPECT_DOUBLE_EQ(s.reservoir.overflow_length_m, 0.3);
}

TEST(Scenario, ReadsATankByItsAreaOrItsDiameter) {
  const std::string area = "  shape: tank\n  area_m2: 0.25\n  overflow_length_m: 2\n";
  const Scenario s = parse(minimal_with("  width_mm: 100\n  length_m: 4\n", area));
  EXPECT_EQ(s.reservoir.shape, ReservoirShape::tank);
  EXPECT_DOUBLE_EQ(s.reservoir.tank_area_m2, 0.25);
  EXPECT_DOUBLE_EQ(s.reservoir.overflow_length_m, 2.0);
  // A 580 mm barrel: plan area pi d^2 / 4 = 0.264208 m2, the rim pi d = 1.822124 m long (C).
  const Scenario b = parse(
      minimal_with("  width_mm: 100\n  length_m: 4\n", "  shape: tank\n  diameter_mm: 580\n"));
  EXPECT_NEAR(b.reservoir.tank_area_m2, 0.264208, 1e-6);
  EXPECT_NEAR(b.reservoir.overflow_length_m, 1.822124, 1e-6);
  const Scenario t = parse(minimal_with(
      "  width_mm: 100\n  length_m: 4\n",
      "  shape: tank\n  levels_mm: [0, 300]\n  areas_m2: [0.2, 0.3]\n  overflow_length_m: 2\n"));
  EXPECT_EQ(t.reservoir.table_area_m2, (std::vector<double>{0.2, 0.3}));
}

TEST(Scenario, RefusesATankWithoutASectionOrWithAGuttersKeys) {
  EXPECT_EQ(error_of(minimal_with("  width_mm: 100\n  length_m: 4\n", "  shape: tank\n")),
            "demo.yaml:8: reservoir.levels_mm: missing required key (needed by shape: tank (or "
            "area_m2 or diameter_mm))");
  EXPECT_EQ(error_of(minimal_with("  width_mm: 100\n", "  shape: tank\n  diameter_mm: 500\n")),
            "demo.yaml:11: reservoir.length_m: not used by shape: tank");
  EXPECT_EQ(error_of(minimal_with("  width_mm: 100\n  length_m: 4\n",
                                  "  shape: tank\n  diameter_mm: 500\n  area_m2: 0.2\n")),
            "demo.yaml:10: reservoir.diameter_mm: give either reservoir.area_m2 or "
            "reservoir.diameter_mm, not both");
  EXPECT_EQ(error_of(minimal_with("  length_m: 4\n", "  length_m: 4\n  area_m2: 0.2\n")),
            "demo.yaml:11: reservoir.area_m2: not used by shape: half_round");
}

TEST(Scenario, ReadsAKStyleGutterByItsSizeWithTheRimAtItsDepth) {
  const Scenario s = parse(minimal_with("  width_mm: 100\n  length_m: 4\n  rim_mm: 50\n",
                                        "  shape: k_style\n  size_mm: 127\n  length_m: 12\n"
                                        "  fall_mm: 10\n"));
  EXPECT_EQ(s.reservoir.shape, ReservoirShape::k_style);
  EXPECT_DOUBLE_EQ(s.reservoir.width_m, 0.127);
  EXPECT_DOUBLE_EQ(s.reservoir.fall_m, 0.010);
  // The 5-inch profile is 3 3/8 in deep: 85.725 mm.
  EXPECT_DOUBLE_EQ(s.reservoir.rim_m, 0.085725);
}

TEST(Scenario, RejectsAKStyleSizeWithoutAProfile) {
  EXPECT_EQ(error_of(minimal_with("  width_mm: 100\n", "  shape: k_style\n  size_mm: 100\n")),
            "demo.yaml:10: reservoir.size_mm: must be a trade size of shape: k_style, 5 or 6 in "
            "(127 or 152.4 mm) or 125 or 150 mm (got 100)");
}

TEST(Scenario, ReadsATrapezoid) {
  const Scenario s =
      parse(minimal_with("  width_mm: 100\n  length_m: 4\n  rim_mm: 50\n",
                         "  shape: trapezoid\n  width_mm: 100\n  floor_width_mm: 60\n"
                         "  depth_mm: 80\n  length_m: 4\n"));
  const CrossSection section = section_of(s.reservoir);
  EXPECT_DOUBLE_EQ(section.area_m2(0.080), 6400e-6);
  EXPECT_DOUBLE_EQ(s.reservoir.rim_m, 0.080);
}

TEST(Scenario, ATrapezoidNeedsItsFloorWidth) {
  EXPECT_EQ(error_of(minimal_with("  width_mm: 100\n",
                                  "  shape: trapezoid\n  width_mm: 100\n"
                                  "  depth_mm: 80\n")),
            "demo.yaml:8: reservoir.floor_width_mm: missing required key (needed by shape: "
            "trapezoid)");
}

TEST(Scenario, RejectsAKeyTheShapeDoesNotUse) {
  EXPECT_EQ(error_of(minimal_with("  width_mm: 100\n", "  width_mm: 100\n  floor_width_mm: 60\n")),
            "demo.yaml:10: reservoir.floor_width_mm: not used by shape: half_round");
}

TEST(Scenario, ReadsAHalfRoundBySize) {
  const Scenario s = parse(minimal_with("  width_mm: 100\n", "  size_mm: 150\n"));
  EXPECT_DOUBLE_EQ(s.reservoir.width_m, 0.150);
}

// Each customary twin against its SI key: the SI value is the twin's by the exact factors of
// NIST Handbook 44 (1 in = 25.4 mm, 1 ft = 0.3048 m, 1 US gal = 3.785411784 L), worked by hand.
struct TwinCase {
  std::string si;
  std::string twin;
  double (*field)(const Scenario&);
};

TEST(Scenario, EveryTwinGivesTheSiKeysResult) {
  const std::vector<TwinCase> cases = {
      {"site.temperature_C=10", "site.temperature_F=50",
       [](const Scenario& s) { return s.site.temperature_C; }},
      {"roof.area_m2=55.741824", "roof.area_ft2=600",
       [](const Scenario& s) { return s.roof.area_m2; }},
      {"roof.initial_loss_mm=12.7", "roof.initial_loss_in=1/2",
       [](const Scenario& s) { return s.roof.initial_loss_m; }},
      {"roof.drying_mm_per_day=2.54", "roof.drying_in_per_day=0.1",
       [](const Scenario& s) { return s.roof.drying_m_per_s; }},
      {"first_flush.volume_L=18.92705892", "first_flush.volume_gal=5",
       [](const Scenario& s) { return s.first_flush.volume_m3; }},
      {"reservoir.width_mm=127", "reservoir.width_in=5",
       [](const Scenario& s) { return s.reservoir.width_m; }},
      {"reservoir.length_m=12.192", "reservoir.length_ft=40",
       [](const Scenario& s) { return s.reservoir.length_m; }},
      {"reservoir.rim_mm=47.625", "reservoir.rim_in=1 7/8",
       [](const Scenario& s) { return s.reservoir.rim_m; }},
      {"reservoir.fall_mm=6.35", "reservoir.fall_in=1/4",
       [](const Scenario& s) { return s.reservoir.fall_m; }},
      {"release.trigger_level_mm=38.1", "release.trigger_level_in=1.5",
       [](const Scenario& s) { return s.release.trigger_level_m; }},
      {"release.break_level_mm=3.175", "release.break_level_in=1/8",
       [](const Scenario& s) { return s.release.break_level_m; }},
      {"release.standpipe_diameter_mm=19.05", "release.standpipe_diameter_in=3/4",
       [](const Scenario& s) { return s.release.standpipe_diameter_m; }},
      {"release.priming_flow_L_per_min=1.892705892", "release.priming_flow_gpm=0.5",
       [](const Scenario& s) { return s.release.priming_flow_m3_per_s; }},
      {"drop_pipe.diameter_mm=31.75", "drop_pipe.diameter_in=1 1/4",
       [](const Scenario& s) { return s.drop_pipe.diameter_m; }},
      {"drop_pipe.length_m=3.6576", "drop_pipe.length_ft=12",
       [](const Scenario& s) { return s.drop_pipe.length_m; }},
      {"drop_pipe.drop_m=2.4384", "drop_pipe.drop_ft=8",
       [](const Scenario& s) { return s.drop_m; }},
      {"nozzle.diameter_mm=6.35", "nozzle.diameter_in=1/4",
       [](const Scenario& s) { return s.nozzle.diameter_m; }},
      {"turbine.runner_diameter_mm=76.2", "turbine.runner_diameter_in=3",
       [](const Scenario& s) { return s.turbine.runner_diameter_m; }},
      {"battery.capacity_Wh=84", "battery.capacity_Ah=7",
       [](const Scenario& s) { return s.battery.capacity_J; }},
  };
  for (const TwinCase& c : cases) {
    const std::vector<std::string> extra = {"battery.voltage_V=12"};
    std::vector<std::string> si = {c.si};
    std::vector<std::string> twin = {c.twin, extra[0]};
    const double expected = c.field(parse(minimal(), si));
    EXPECT_NEAR(c.field(parse(minimal(), twin)), expected, 1e-12 * std::abs(expected)) << c.twin;
  }
}

TEST(Scenario, ATwinInTheFileGivesTheSameScenario) {
  const Scenario si = parse(minimal_with("  area_m2: 12", "  area_m2: 55.741824"));
  const Scenario us = parse(minimal_with("  area_m2: 12", "  area_ft2: 600"));
  EXPECT_NEAR(us.roof.area_m2, si.roof.area_m2, 1e-12 * si.roof.area_m2);
}

TEST(Scenario, RejectsBothTwinsNamingBothLines) {
  EXPECT_EQ(error_of(minimal_with("  rim_mm: 50\n", "  rim_mm: 50\n  rim_in: 2\n")),
            "demo.yaml:12: reservoir.rim_in: give either reservoir.rim_mm (line 11) or "
            "reservoir.rim_in (line 12), not both");
}

TEST(Scenario, ATwinSetOnTheCommandLineReplacesTheFilesKey) {
  const Scenario s = parse(minimal(), {"reservoir.rim_in=1 7/8"});
  EXPECT_NEAR(s.reservoir.rim_m, 0.047625, 1e-15);
}

TEST(Scenario, RejectsAnUnknownUnitSuffix) {
  EXPECT_EQ(error_of(minimal_with("  rim_mm: 50", "  rim_cm: 5")),
            "demo.yaml:11: reservoir.rim_cm: unknown unit suffix _cm; give rim_mm or rim_in");
}

TEST(Scenario, RejectsAFractionWhereNoneBelongs) {
  EXPECT_EQ(
      error_of(minimal_with("  length_m: 3\n", "  length_m: 3/4\n")),
      "demo.yaml:19: drop_pipe.length_m: expected a number, got \"3/4\" (fractions such as 3/4 "
      "are read only for inches, keys ending in _in)");
}

TEST(Scenario, LimitsOfATwinAreShownInItsUnit) {
  EXPECT_EQ(error_of(minimal_with("  name: Minimal shed\n",
                                  "  name: Minimal shed\n  temperature_F: 120\n")),
            "demo.yaml:4: site.temperature_F: must be between 32 and 104 (got 120)");
}

TEST(Scenario, LimitsAcrossKeysOfATwinAreShownInItsUnit) {
  // By hand: minimal.yaml's half-round is 100 mm across, 50 mm deep: 50 / 25.4 =
  // 1.96850393701 in; the shortest reservoir, 0.1 m, is 0.1 / 0.3048 = 0.328083989501 ft.
  EXPECT_EQ(error_of(minimal_with("  rim_mm: 50", "  rim_in: 5")),
            "demo.yaml:11: reservoir.rim_in: must be <= the depth of shape: half_round, "
            "1.96850393701 in (got 5)");
  EXPECT_EQ(error_of(minimal_with("  length_m: 4", "  length_ft: 0.2")),
            "demo.yaml:10: reservoir.length_ft: must be at least 0.328083989501 ft: a shorter "
            "reservoir fills and empties faster than the solver can follow (got 0.2)");
  EXPECT_EQ(error_of(minimal_with("  length_m: 4", "  length_m: 0.05")),
            "demo.yaml:10: reservoir.length_m: must be at least 0.1 m: a shorter reservoir fills "
            "and empties faster than the solver can follow (got 0.05)");
}

TEST(Scenario, AmpereHoursNeedTheBatteryVoltage) {
  EXPECT_EQ(error_of(minimal_with("  capacity_Wh: 20", "  capacity_Ah: 7")),
            "demo.yaml:26: battery.capacity_Ah: needs battery.voltage_V to turn ampere-hours into "
            "watt-hours");
}

TEST(Scenario, NeedsOnlyAnOrificeForAnOrificeRelease) {
  const Scenario s = parse(
      minimal_with("  trigger_level_mm: 40\n  break_level_mm: 5\n  standpipe_diameter_mm: 15\n"
                   "  priming_flow_L_per_min: 2\n",
                   "  kind: orifice\n  orifice_diameter_mm: 6\n"));
  EXPECT_EQ(s.release.kind, ReleaseKind::orifice);
  EXPECT_DOUBLE_EQ(s.release.orifice_diameter_m, 0.006);
}

TEST(Scenario, NeedsNothingForNoRelease) {
  const Scenario s = parse(
      minimal_with("  trigger_level_mm: 40\n  break_level_mm: 5\n  standpipe_diameter_mm: 15\n"
                   "  priming_flow_L_per_min: 2\n",
                   "  kind: none\n"));
  EXPECT_EQ(s.release.kind, ReleaseKind::none);
}

// Errors: syntax, keys, types, ranges, choices and combinations.

TEST(Scenario, ReportsAYamlSyntaxErrorWithItsLine) {
  EXPECT_EQ(error_of(minimal_with("  area_m2: 12", "  area_m2: [12, 13")),
            "demo.yaml:8: YAML syntax error: end of sequence flow not found");
}

TEST(Scenario, SuggestsTheNearestKeyForAnUnknownOne) {
  EXPECT_EQ(error_of(minimal_with("  area_m2: 12", "  runof_coefficient: 0.9\n  area_m2: 12")),
            "demo.yaml:7: roof.runof_coefficient: unknown key; did you mean runoff_coefficient?");
}

TEST(Scenario, SuggestsTheNearestSectionForAnUnknownOne) {
  EXPECT_EQ(error_of(minimal_with("battery:", "batery:")),
            "demo.yaml:25: batery: unknown key; did you mean battery?");
}

TEST(Scenario, RejectsARepeatedKey) {
  EXPECT_EQ(error_of(minimal_with("  area_m2: 12", "  area_m2: 12\n  area_m2: 13")),
            "demo.yaml:8: roof.area_m2: duplicate key (first given on line 7)");
}

TEST(Scenario, ReportsAMissingKeyAtItsSection) {
  EXPECT_EQ(error_of(minimal_with("  area_m2: 12\n", "  runoff_coefficient: 0.8\n")),
            "demo.yaml:6: roof.area_m2: missing required key");
}

TEST(Scenario, ReportsAMissingSection) {
  EXPECT_EQ(error_of(minimal_with("battery:\n  capacity_Wh: 20\n", "")),
            "demo.yaml: battery: missing required section");
}

TEST(Scenario, ReportsAnEmptyFile) {
  EXPECT_EQ(error_of("# nothing here\n"), "demo.yaml: the scenario is empty");
}

TEST(Scenario, RejectsTextWhereANumberBelongs) {
  EXPECT_EQ(error_of(minimal_with("area_m2: 12", "area_m2: abc")),
            "demo.yaml:7: roof.area_m2: expected a number, got \"abc\"");
}

TEST(Scenario, RejectsAListWhereANumberBelongs) {
  EXPECT_EQ(error_of(minimal_with("area_m2: 12", "area_m2: [1, 2]")),
            "demo.yaml:7: roof.area_m2: expected a number, got a list");
}

TEST(Scenario, RejectsAValueWhereASectionBelongs) {
  EXPECT_EQ(error_of(minimal_with("roof:\n  area_m2: 12\n", "roof: 12\n")),
            "demo.yaml:6: roof: expected a section of keys, got \"12\"");
}

TEST(Scenario, RejectsANumberOutOfRange) {
  EXPECT_EQ(error_of(minimal_with("area_m2: 12", "area_m2: -2")),
            "demo.yaml:7: roof.area_m2: must be > 0 (got -2)");
  EXPECT_EQ(error_of(minimal(), {"site.temperature_C=55"}),
            "--set: site.temperature_C: must be between 0 and 40 (got 55)");
  EXPECT_EQ(error_of(minimal(), {"nozzle.discharge_coefficient=1.2"}),
            "--set: nozzle.discharge_coefficient: must be > 0 and <= 1 (got 1.2)");
  EXPECT_EQ(error_of(minimal(), {"simulation.rtol=0.1"}),
            "--set: simulation.rtol: must be between 1e-10 and 0.001 (got 0.1)");
}

TEST(Scenario, ListsTheAllowedValuesOfAChoice) {
  EXPECT_EQ(error_of(minimal_with("  width_mm: 100", "  shape: round\n  width_mm: 100")),
            "demo.yaml:9: reservoir.shape: expected one of half_round, k_style, box, trapezoid, "
            "rectangular, table or tank, got "
            "\"round\"");
  EXPECT_EQ(error_of(minimal(), {"turbine.kind=crossflow"}),
            "--set: turbine.kind: expected impulse, got \"crossflow\"");
}

TEST(Scenario, RejectsADurationWithoutAUnit) {
  EXPECT_EQ(error_of(minimal(), {"simulation.output_interval=60"}),
            "--set: simulation.output_interval: expected a duration with a unit such as 30s, 5min, "
            "1h or 1d, got \"60\"");
}

TEST(Scenario, RejectsABadStampAndABadOffset) {
  EXPECT_EQ(error_of(minimal(), {"simulation.start=2025-02-30"}),
            "--set: simulation.start: expected an ISO 8601 date-time such as 2025-03-01T00:00, got "
            "\"2025-02-30\"");
  EXPECT_EQ(error_of(minimal(), {"site.utc_offset=east"}),
            "--set: site.utc_offset: expected a UTC offset such as +02:00, got \"east\"");
}

TEST(Scenario, RejectsAnEndBeforeTheStart) {
  EXPECT_EQ(error_of(minimal() + "simulation:\n  start: 2025-03-01\n  end: 2025-02-01\n"),
            "demo.yaml:29: simulation.end: must be after simulation.start = 2025-03-01 (got "
            "2025-02-01)");
}

TEST(Scenario, RejectsABreakLevelAtOrAboveTheTrigger) {
  EXPECT_EQ(error_of(minimal_with("break_level_mm: 5", "break_level_mm: 40")),
            "demo.yaml:14: release.break_level_mm: must be below release.trigger_level_mm = 40 "
            "(got 40)");
}

TEST(Scenario, RejectsATriggerAboveTheRim) {
  EXPECT_EQ(error_of(minimal_with("trigger_level_mm: 40", "trigger_level_mm: 55")),
            "demo.yaml:13: release.trigger_level_mm: must not be above reservoir.rim_mm = 50 (got "
            "55)");
}

TEST(Scenario, RejectsARimAboveHalfTheWidthOfAHalfRound) {
  EXPECT_EQ(error_of(minimal_with("rim_mm: 50", "rim_mm: 60")),
            "demo.yaml:11: reservoir.rim_mm: must be <= the depth of shape: half_round, 50 mm (got "
            "60)");
  EXPECT_NO_THROW(parse(minimal_with("rim_mm: 50", "rim_mm: 60"), {"reservoir.shape=rectangular"}));
}

TEST(Scenario, RejectsAnInitialLevelAboveTheRim) {
  EXPECT_EQ(error_of(minimal(), {"reservoir.initial_level_mm=51"}),
            "--set: reservoir.initial_level_mm: must not be above reservoir.rim_mm = 50 (got 51)");
}

TEST(Scenario, RejectsALevelTableThatDoesNotRise) {
  const std::string table = minimal_with("  width_mm: 100\n  length_m: 4\n",
                                         "  shape: table\n  overflow_length_m: 0.3\n  levels_mm: "
                                         "[0, 30,\n    20]\n  areas_m2: [1, 1, 1]\n");
  EXPECT_EQ(error_of(table),
            "demo.yaml:12: reservoir.levels_mm[2]: must be above the level before it, 30 (got 20)");
  EXPECT_EQ(error_of(table, {"reservoir.levels_mm=[5, 30, 60]"}),
            "--set: reservoir.levels_mm[0]: must be 0, the reservoir floor (got 5)");
  EXPECT_EQ(error_of(table, {"reservoir.levels_mm=[0, 30, 60]", "reservoir.areas_m2=[1, 1]"}),
            "--set: reservoir.areas_m2: must have one value per level in reservoir.levels_mm, 3 "
            "(got 2)");
  EXPECT_EQ(error_of(table, {"reservoir.levels_mm=[0, 30, 40]"}),
            "demo.yaml:14: reservoir.rim_mm: must not be above the top of reservoir.levels_mm, 40 "
            "(got 50)");
}

TEST(Scenario, NamesTheKeysAReleaseKindNeeds) {
  EXPECT_EQ(error_of(minimal_with("  priming_flow_L_per_min: 2\n", "")),
            "demo.yaml:12: release.priming_flow_L_per_min: missing required key (needed by kind: "
            "bell)");
  EXPECT_EQ(error_of(minimal(), {"release.kind=float_valve"}),
            "demo.yaml:12: release.orifice_diameter_mm: missing required key (needed by kind: "
            "float_valve)");
}

TEST(Scenario, RejectsANozzleAsWideAsTheDropPipe) {
  EXPECT_EQ(error_of(minimal(), {"nozzle.diameter_mm=15"}),
            "--set: nozzle.diameter_mm: must be smaller than drop_pipe.diameter_mm = 15 (got 15)");
}

TEST(Scenario, RejectsAHeadColumnTallerThanTheDrop) {
  EXPECT_EQ(error_of(minimal(), {"head_column.diameter_mm=40", "head_column.height_m=2.5"}),
            "--set: head_column.height_m: must be below drop_pipe.drop_m = 2.5 (got 2.5)");
}

TEST(Scenario, DropPipeWithAHeadColumnNeedsOnlyReachTheColumnsTop) {
  // drop 2.5 m, column 1.0 m: the pipe ends 1.5 m below the floor, so 2 m is enough.
  const std::vector<std::string> column = {"head_column.diameter_mm=40", "head_column.height_m=1"};
  const Scenario s = parse(minimal_with("length_m: 3", "length_m: 2"), column);
  EXPECT_DOUBLE_EQ(s.drop_pipe.length_m, 2.0);
  EXPECT_EQ(error_of(minimal_with("length_m: 3", "length_m: 1"), column),
            "demo.yaml:19: drop_pipe.length_m: must be >= drop_pipe.drop_m - head_column.height_m "
            "= 1.5, the fall to the column's top (got 1)");
  // A pipe exactly as long as the fall passes, though 3.1 - 0.7 is 2.4000000000000004 in binary.
  const Scenario exact =
      parse(minimal(), {"drop_pipe.drop_m=3.1", "drop_pipe.length_m=2.4",
                        "head_column.diameter_mm=40", "head_column.height_m=0.7"});
  EXPECT_DOUBLE_EQ(exact.drop_pipe.length_m, 2.4);
}

TEST(Scenario, RejectsADropPipeShorterThanItsDrop) {
  EXPECT_EQ(error_of(minimal_with("length_m: 3", "length_m: 2")),
            "demo.yaml:19: drop_pipe.length_m: must be >= drop_pipe.drop_m = 2.5 (got 2)");
}

TEST(Scenario, NeedsTwentyFourHourlyLoads) {
  EXPECT_EQ(error_of(minimal(), {"battery.load_profile_W=[1, 2, 3]"}),
            "--set: battery.load_profile_W: must have exactly 24 values, one per hour (got 3)");
}

TEST(Scenario, RejectsBothRainFileAndFiles) {
  EXPECT_EQ(error_of(minimal_with("  file: rain.csv", "  file: rain.csv\n  files: [a.csv]")),
            "demo.yaml:6: rain.files: give either rain.file or rain.files, not both");
  EXPECT_EQ(error_of(minimal_with("  file: rain.csv", "  format: series")),
            "demo.yaml:4: rain.file: missing required key (or give rain.files)");
}

// Overrides.

TEST(Scenario, OverrideReplacesAValue) {
  const Scenario s = parse(minimal(), {"roof.area_m2=25", "site.name=Shed two"});
  EXPECT_DOUBLE_EQ(s.roof.area_m2, 25.0);
  EXPECT_EQ(s.site.name, "Shed two");
}

TEST(Scenario, LaterOverrideWins) {
  EXPECT_DOUBLE_EQ(parse(minimal(), {"roof.area_m2=25", "roof.area_m2=30"}).roof.area_m2, 30.0);
}

TEST(Scenario, OverrideCreatesAMissingSection) {
  const Scenario s = parse(minimal(), {"head_column.diameter_mm=40", "head_column.height_m=2"});
  ASSERT_TRUE(s.head_column.has_value());
  EXPECT_DOUBLE_EQ(s.head_column->height_m, 2.0);
}

TEST(Scenario, OverrideSetsAList) {
  const Scenario s =
      parse(minimal_with("file: rain.csv", "files: [x.csv]"), {"rain.files=[a.csv, b.csv]"});
  ASSERT_EQ(s.rain.files.size(), 2u);
  EXPECT_EQ(s.rain.files[1], std::filesystem::path("base/b.csv"));
}

TEST(Scenario, OverrideErrorsNameSet) {
  EXPECT_EQ(error_of(minimal(), {"roof.area_m2=big"}),
            "--set: roof.area_m2: expected a number, got \"big\"");
  EXPECT_EQ(error_of(minimal(), {"roof.area=5"}),
            "--set: roof.area: unknown key; did you mean area_m2?");
  EXPECT_EQ(error_of(minimal(), {"rooff.area_m2=5"}),
            "--set: rooff: unknown key; did you mean roof?");
  EXPECT_EQ(error_of(minimal(), {"head_column.diameter_mm=40"}),
            "--set: head_column.height_m: missing required key");
  EXPECT_EQ(error_of(minimal(), {"roof=5"}), "--set: roof: expected a section of keys, got \"5\"");
  EXPECT_EQ(error_of(minimal(), {"battery.load_profile_W=[1, x]"}),
            "--set: battery.load_profile_W[1]: expected a number, got \"x\"");
}

TEST(Scenario, RejectsAMalformedOverride) {
  EXPECT_EQ(error_of(minimal(), {"roof.area_m2"}),
            "--set: expected key.path=value, got \"roof.area_m2\"");
  EXPECT_EQ(error_of(minimal(), {"roof..area_m2=3"}),
            "--set: expected key.path=value, got \"roof..area_m2=3\"");
  EXPECT_EQ(error_of(minimal(), {"roof.area_m2.x=3"}),
            "--set: roof.area_m2.x: roof.area_m2 is a single value, not a section");
  EXPECT_EQ(error_of(minimal(), {"roof.area_m2={a: 1}"}),
            "--set: roof.area_m2: expected a single value or a list such as [1, 2], got a section");
}

TEST(Scenario, ReportsAScenarioFileThatCannotBeRead) {
  const std::filesystem::path missing = kFixtures / "no-such-file.yaml";
  try {
    load_scenario(missing);
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_EQ(std::string(e.what()), missing.string() + ": no such scenario file");
  }
}

TEST(Scenario, ReadsATimeZoneAndTimesOnItsClock) {
  const Scenario s =
      parse(minimal_with("  name: Minimal shed\n",
                         "  name: Minimal shed\n  time_zone: America/Los_Angeles\n") +
            "simulation: {start: 2025-03-09T03:00, end: 2025-11-02T01:30}\n");
  EXPECT_EQ(s.site.zone.name(), "America/Los_Angeles");
  EXPECT_EQ(s.rain.series.zone.name(), "America/Los_Angeles");
  // 2025-03-09T03:00 PDT = 10:00Z; 2025-11-02T01:30 first happens at 08:30Z (PDT). Worked by
  // hand from 2025-03-01T00:00Z = 1740787200 (POSIX.1-2017 4.16) and the US rule (Energy Policy
  // Act of 2005, sec. 110).
  EXPECT_EQ(*s.simulation.start, 1740787200 + 8 * 86400 + 10 * 3600);
  EXPECT_EQ(*s.simulation.end, 1740787200 + 246 * 86400 + 8 * 3600 + 1800);
}

TEST(Scenario, RejectsAnUnknownTimeZone) {
  EXPECT_EQ(error_of(minimal_with("  name: Minimal shed\n",
                                  "  name: Minimal shed\n  time_zone: Pacific/Atlantis\n")),
            "demo.yaml:4: site.time_zone: unknown time zone \"Pacific/Atlantis\"; give an IANA "
            "name such as America/Los_Angeles (the system's tz database)");
}

TEST(Scenario, RejectsATimeZoneBesideAnOffset) {
  EXPECT_EQ(error_of(minimal_with("  name: Minimal shed\n",
                                  "  name: Minimal shed\n  utc_offset: \"-08:00\"\n"
                                  "  time_zone: America/Los_Angeles\n")),
            "demo.yaml:5: site.time_zone: give either site.utc_offset or site.time_zone, not both");
}

TEST(Scenario, RejectsAStartTheClocksSkip) {
  const std::string text = minimal();
  EXPECT_EQ(error_of(minimal_with("  name: Minimal shed\n",
                                  "  name: Minimal shed\n  time_zone: America/Los_Angeles\n") +
                     "simulation: {start: 2025-03-09T02:30}\n"),
            "demo.yaml:" + std::to_string(std::count(text.begin(), text.end(), '\n') + 2) +
                ": simulation.start: is not a time in America/Los_Angeles: the clocks skip it "
                "(got 2025-03-09T02:30)");
}

TEST(Scenario, TheUsDemoIsWrittenWhollyInUsUnits) {
  const std::filesystem::path file =
      std::filesystem::path(GUTTERWATT_SOURCE_DIR) / "scenarios" / "us-demo.yaml";
  const std::string text = read_file(file);
  // No key in an SI unit: every unit suffix is a customary one (or W, Wh, V, s, rpm).
  const std::regex si_key(R"((^|[{,\s])\w+_(mm|m|m2|L|L_per_min|C|Wh|mm_per_h|mm_per_day)\s*:)");
  EXPECT_FALSE(std::regex_search(text, si_key));
  const Scenario s = load_scenario(file);
  // 430 ft2 = 430 x 0.09290304 m2 (NIST Handbook 44: 1 ft = 0.3048 m); 1 Ah at 12 V = 12 Wh.
  EXPECT_NEAR(s.roof.area_m2, 39.9483072, 1e-12);
  EXPECT_EQ(s.site.zone.name(), "America/Chicago");
  EXPECT_EQ(s.rain.series.skip_lines, 2);
  EXPECT_EQ(s.rain.tips.tip_depth_m, 0.01 * 0.0254);
}

}  // namespace
}  // namespace gutterwatt::scenario_test
