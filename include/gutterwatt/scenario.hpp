#pragma once
/// The scenario: one site's system and run settings, loaded from YAML, checked, and converted to
/// SI once. Every key, its unit and its default is listed in README.md ("Scenario keys").

#include <filesystem>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "gutterwatt/battery.hpp"
#include "gutterwatt/calendar.hpp"
#include "gutterwatt/disaggregation_config.hpp"
#include "gutterwatt/hydraulics.hpp"
#include "gutterwatt/plant.hpp"
#include "gutterwatt/rain_input.hpp"
#include "gutterwatt/release.hpp"
#include "gutterwatt/reservoir.hpp"
#include "gutterwatt/roof.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt {

struct SiteConfig {
  std::string name;
  double temperature_C = 15.0;
  TimeZone zone;  ///< local time for months, seasons, load hours and output stamps
  /// The units of the terminal tables, the CSV columns and the report (`site.units`; the
  /// command line's --units overrides it). summary.json is SI whatever it says.
  UnitSystem units = UnitSystem::si;
};

enum class RainFormat { series, tips, daily };

/// rain.disaggregate.calibrate_with: a short fine record whose cascade parameters are estimated
/// (estimate_cascade) and used for the coarse one.
struct CalibrationRecord {
  std::filesystem::path file;  ///< resolved against the scenario file's folder
  SeriesFormat format;         ///< time_column, value_column, unit; depth values
  int line = 0;                ///< of the key, for messages
  std::string label;           ///< the scenario file, for messages
};

struct RainConfig {
  std::vector<std::filesystem::path> files;  ///< resolved against the scenario file's folder
  RainFormat format = RainFormat::series;
  SeriesFormat series;  ///< columns, value kind, unit, step, gaps, offset
  TipSpreading tips;    ///< format tips: depth of one tip (rain.tip_depth), rain.tip_cap
  /// rain.disaggregate: required by format daily, optional for series (spreads intervals longer
  /// than its step), not used by tips.
  std::optional<Disaggregation> disaggregate;
  std::optional<CalibrationRecord> calibrate_with;  ///< rain.disaggregate.calibrate_with
};

struct SimulationConfig {
  std::optional<Instant> start;  ///< nullopt: the start of the rain record
  std::optional<Instant> end;    ///< nullopt: the end of the rain record
  double output_interval_s = 3600.0;
  double rtol = 1e-6;
  bool trace = true;  ///< simulation.trace: write trace.csv (`on`, the default, or `off`)
};

/// A measured bell-siphon build (release.builds): its priming flow and, where measured, its
/// running loss and nozzle. Picking it (release.build) puts these values in place.
struct SiphonBuild {
  std::string name;
  double priming_flow_m3_per_s = 0.0;
  std::optional<double> minor_loss_k;
  std::optional<double> nozzle_diameter_m;
  std::optional<double> nozzle_discharge_coefficient;
  std::string measured_by;  ///< the log or test it comes from
};

struct Scenario {
  std::filesystem::path file;  ///< where it was loaded from (for messages)
  SiteConfig site;
  RainConfig rain;
  RoofConfig roof;
  FirstFlushConfig first_flush;
  ReservoirConfig reservoir;
  ReleaseConfig release;
  Pipe drop_pipe{0.0, 0.0, 0.0, 0.0};
  double drop_m = 0.0;  ///< vertical fall from the reservoir floor to the nozzle
  std::optional<HeadColumnConfig> head_column;
  Nozzle nozzle{0.0, 0.95, 0.97};
  TurbineConfig turbine;
  GeneratorConfig generator;
  BatteryConfig battery;
  SimulationConfig simulation;
  std::vector<SiphonBuild> builds;  ///< release.builds
  std::string build;                ///< release.build: the name of the build in place, or empty
};

/// The reservoir level at which the release starts to run: a bell's priming level (lip plus the
/// weir head of the priming flow, at most the rim), a float valve's opening level, else the rim.
double design_level_m(const Scenario& scenario);

/// The plant's part of the scenario, for Plant.
PlantConfig plant_config(const Scenario& scenario);

/// Largest scenario file read: a scenario is a page of keys, and a file past this (a data file
/// given as the scenario, a runaway list) would take seconds and a lot of memory to parse
/// (a project choice, no source).
inline constexpr std::size_t kMaxScenarioBytes = 256 * 1024;

/// Most items in one list of a scenario (rain files, a level-area table, a load profile).
inline constexpr std::size_t kMaxScenarioListItems = 10000;

/// Loads `file`, applies `overrides` (each `key.path=value`, in order), checks and converts.
/// Throws InputError naming the file, the line and the key (and the nearest valid key for an
/// unknown one); an override's error names `--set` instead of a file.
///
/// After a successful load `rain.files` holds at least one path (not checked for existence),
/// `reservoir.overflow_length_m` is set, and every key the release kind and reservoir shape need
/// is present. Keys that the chosen kind or shape does not use are accepted and left unused, so
/// `--set release.kind=none` works on a file written for a bell siphon.
Scenario load_scenario(const std::filesystem::path& file,
                       const std::vector<std::string>& overrides = {});

/// The text of a scenario file. Throws InputError naming the file when it does not exist, is a
/// folder, cannot be opened (with the system's reason), fails part way, or is longer than
/// kMaxScenarioBytes (naming the line where it passes the limit).
std::string read_scenario_text(const std::filesystem::path& file);

/// As load_scenario, from text already read: `file_label` is used in messages and relative rain
/// paths resolve against `base_dir`. A sweep parses the text once per combination.
Scenario parse_scenario(std::string_view yaml_text, const std::string& file_label,
                        const std::filesystem::path& base_dir,
                        const std::vector<std::string>& overrides = {});

/// Throws InputError (`label: key: unknown key; did you mean ...?`) unless `key` names a key of
/// the scenario file as `section.key` (deeper parts, inside a key's own value, are not checked).
/// Lets a command reject a key before it loads anything, e.g. a sweep's `--vary` keys.
void check_scenario_key(const std::string& key, const std::string& label);

}  // namespace gutterwatt
