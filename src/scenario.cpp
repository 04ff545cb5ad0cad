#include "gutterwatt/scenario.hpp"

#include <yaml-cpp/depthguard.h>
#include <yaml-cpp/yaml.h>

#include <algorithm>
#include <cerrno>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <fstream>
#include <initializer_list>
#include <limits>
#include <map>
#include <set>
#include <sstream>
#include <utility>

#include "detail.hpp"
#include "gutterwatt/disaggregation.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/siphon.hpp"
#include "gutterwatt/units.hpp"
#include "scenario_value.hpp"

namespace gutterwatt {
namespace {

/// Above a square kilometre a roof area is a unit mix-up, and much larger areas make the solver
/// crawl (common practice, no source).
constexpr double kMaxRoofArea_m2 = 1e6;

/// Shortest reservoir. Below it the level answers a litre with metres and the solver makes no
/// progress (1 mm fails on the sweep test site); relax it once the solver takes that (#13).
constexpr double kMinReservoirLength_m = 0.1;

using detail::apply_builds;
using detail::apply_disaggregate;
using detail::apply_overrides;
using detail::apply_where;
using detail::between;
using detail::check_line_ends;
using detail::kDay_s;
using detail::Key;
using detail::kFraction;
using detail::kNonNegative;
using detail::kOptional;
using detail::kOverrideLabel;
using detail::kPartShare;
using detail::kPositive;
using detail::kRequired;
using detail::kShare;
using detail::Limits;
using detail::read_entries;
using detail::reject_unknown_key;
using detail::Seen;
using detail::show;
using detail::tab_indented_line;
using detail::Value;
using detail::whole_seconds;

struct Section {
  std::string_view name;
  bool required;
  std::vector<Key> keys;
};

HeadColumnConfig& head_column(Scenario& s) {
  if (!s.head_column) s.head_column.emplace();
  return *s.head_column;
}

/// Most title lines rain.skip_lines passes over: a logger writes a few, never a thousand.
constexpr double kMaxSkipLines = 1000.0;
/// Most open-water evaporation a scenario may give, mm/day: a bound against unit mix-ups (a
/// value per month or per year given as per day), not a physical limit. Twice the 10-15 mm/day
/// a Class A pan loses on the hottest, driest summer days (from memory, no source), before the
/// pan coefficient of about 0.7 (reservoir.cpp): common practice, no source.
constexpr double kMaxEvaporation_mm_per_day = 30.0;

// The one list of sections and keys: names, whether they are required, and their conversion to SI.
// Sections are converted in this order (simulation times need the site's offset). Checks that
// involve more than one key are in check_combinations().
const std::vector<Section>& schema() {
  using V = const Value&;
  using S = Scenario&;
  static const std::vector<Section> kSchema = {
      {"site",
       kRequired,
       {
           {"name", kRequired, [](V v, S s) { s.site.name = v.text(); }},
           {"temperature_C", kOptional,
            [](V v, S s) { s.site.temperature_C = v.number(between(0.0, 40.0)); }},
           {"utc_offset", kOptional, [](V v, S s) { s.site.zone = v.utc_offset_s(); }},
           {"time_zone", kOptional, [](V v, S s) { s.site.zone = v.time_zone(); }},
           {"units", kOptional,
            [](V v, S s) {
              s.site.units = v.choice<UnitSystem>({{"si", UnitSystem::si}, {"us", UnitSystem::us}});
            }},
       }},
      {"rain",
       kRequired,
       {
           {"file", kOptional, [](V v, S s) { s.rain.files = {v.path_text()}; }},
           {"files", kOptional,
            [](V v, S s) {
              const auto files = v.path_texts();
              if (files.empty()) v.fail("must list at least one file");
              s.rain.files.assign(files.begin(), files.end());
            }},
           {"format", kOptional,
            [](V v, S s) {
              s.rain.format = v.choice<RainFormat>({{"series", RainFormat::series},
                                                    {"tips", RainFormat::tips},
                                                    {"daily", RainFormat::daily}});
            }},
           {"time_column", kOptional, [](V v, S s) { s.rain.series.time_column = v.text(); }},
           {"value_column", kOptional, [](V v, S s) { s.rain.series.value_column = v.text(); }},
           {"value", kOptional,
            [](V v, S s) {
              s.rain.series.value = v.choice<RainValue>(
                  {{"depth", RainValue::depth}, {"intensity", RainValue::intensity}});
            }},
           {"unit", kOptional,
            [](V v, S s) {
              s.rain.series.unit_m = v.choice<double>({{"mm", kMetresPerMm},
                                                       {"in", kMetresPerInch},
                                                       {"mm/h", kMetresPerMm},
                                                       {"in/h", kMetresPerInch}});
              s.rain.series.unit_name = v.raw();
            }},
           {"gaps", kOptional,
            [](V v, S s) {
              s.rain.series.gaps = v.choice<GapPolicy>({{"error", GapPolicy::error},
                                                        {"zero", GapPolicy::zero},
                                                        {"skip", GapPolicy::skip}});
            }},
           {"step", kOptional, [](V v, S s) { s.rain.series.step_s = v.duration_s(kPositive); }},
           {"utc_offset", kOptional,
            [](V v, S s) { s.rain.series.zone = v.utc_offset_s(); }},
           {"time_format", kOptional,
            [](V v, S s) {
              s.rain.series.time_format = v.text();
              v.expect(s.rain.series.time_format.find('%') != std::string::npos,
                       "expected a strftime-style format such as %m/%d/%Y %I:%M %p");
            }},
           {"delimiter", kOptional,
            [](V v, S s) {
              const std::string& text = v.raw();
              if (text != "," && text != ";" && text != "tab") {
                v.fail("expected \",\", \";\" or tab, got " + v.got());
              }
              s.rain.series.delimiter = text == "tab" ? '\t' : text.front();
            }},
           {"decimal", kOptional,
            [](V v, S s) {
              s.rain.series.decimal = v.choice<char>({{".", '.'}, {",", ','}});
            }},
           {"skip_lines", kOptional,
            [](V v, S s) {
              const double lines = v.number(between(0.0, kMaxSkipLines));
              v.expect(lines == std::floor(lines), "must be a whole number of lines");
              s.rain.series.skip_lines = static_cast<int>(lines);
            }},
           {"where", kOptional, apply_where},
           {"tip_depth", kOptional,
            [](V v, S s) { s.rain.tips.tip_depth_m = v.number(kPositive) * s.rain.series.unit_m; }},
           {"tip_cap", kOptional,
            [](V v, S s) { s.rain.tips.cap_s = whole_seconds(v, 1, kDay_s); }},
           {"disaggregate", kOptional, apply_disaggregate},
       }},
      {"roof",
       kRequired,
       {
           {"area_m2", kRequired,
            [](V v, S s) {
              s.roof.area_m2 = v.number(kPositive);
              v.expect(s.roof.area_m2 <= kMaxRoofArea_m2,
                       "must be at most " + v.shown(kMaxRoofArea_m2) + ", a square kilometre");
            }},
           {"runoff_coefficient", kOptional,
            [](V v, S s) { s.roof.runoff_coefficient = v.number(kFraction); }},
           {"initial_loss_mm", kOptional,
            [](V v, S s) { s.roof.initial_loss_m = v.number(kNonNegative) * kMetresPerMm; }},
           {"drying_mm_per_day", kOptional,
            [](V v, S s) {
              s.roof.drying_m_per_s = v.number(kNonNegative) * kMetresPerMm / kSecondsPerDay;
            }},
           {"lag_s", kOptional,
            [](V v, S s) { s.roof.lag_s = v.number(kNonNegative); }},
           {"lag", kOptional,
            [](V v, S s) { s.roof.lag_s = v.duration_s(kNonNegative); }},
       }},
      {"first_flush",
       kOptional,
       {
           {"volume_L", kOptional,
            [](V v, S s) {
              s.first_flush.volume_m3 = v.number(kNonNegative) * kCubicMetresPerLitre;
            }},
           {"reset_after_dry_h", kOptional,
            [](V v, S s) {
              s.first_flush.reset_after_dry_s = v.number(kNonNegative) * kSecondsPerHour;
            }},
       }},
      {"reservoir",
       kRequired,
       {
           {"shape", kOptional,
            [](V v, S s) {
              s.reservoir.shape =
                  v.choice<ReservoirShape>({{"half_round", ReservoirShape::half_round},
                                            {"k_style", ReservoirShape::k_style},
                                            {"box", ReservoirShape::box},
                                            {"trapezoid", ReservoirShape::trapezoid},
                                            {"rectangular", ReservoirShape::rectangular},
                                            {"table", ReservoirShape::table},
                                            {"tank", ReservoirShape::tank}});
            }},
           {"width_mm", kOptional,
            [](V v, S s) { s.reservoir.width_m = v.number(kPositive) * kMetresPerMm; }},
           {"size_mm", kOptional,
            [](V v, S s) { s.reservoir.width_m = v.number(kPositive) * kMetresPerMm; }},
           {"floor_width_mm", kOptional,
            [](V v, S s) { s.reservoir.floor_width_m = v.number(kNonNegative) * kMetresPerMm; }},
           {"depth_mm", kOptional,
            [](V v, S s) { s.reservoir.depth_m = v.number(kPositive) * kMetresPerMm; }},
           {"length_m", kOptional,
            [](V v, S s) {
              s.reservoir.length_m = v.number(kPositive);
              v.expect(s.reservoir.length_m >= kMinReservoirLength_m,
                       "must be at least " + v.shown_with_unit(kMinReservoirLength_m, "m") +
                           ": a shorter reservoir fills and empties faster than the solver can "
                           "follow");
            }},
           {"fall_mm", kOptional,
            [](V v, S s) { s.reservoir.fall_m = v.number(kNonNegative) * kMetresPerMm; }},
           {"rim_mm", kOptional,
            [](V v, S s) { s.reservoir.rim_m = v.number(kPositive) * kMetresPerMm; }},
           {"overflow_coefficient", kOptional,
            [](V v, S s) { s.reservoir.overflow_coefficient = v.number(kPositive); }},
           {"overflow_length_m", kOptional,
            [](V v, S s) { s.reservoir.overflow_length_m = v.number(kPositive); }},
           {"initial_level_mm", kOptional,
            [](V v, S s) { s.reservoir.initial_level_m = v.number(kNonNegative) * kMetresPerMm; }},
           {"evaporation_mm_per_day", kOptional,
            [](V v, S s) {
              const Limits limits = between(0.0, kMaxEvaporation_mm_per_day);
              std::vector<double> e =
                  v.node().IsSequence() ? v.numbers(limits) : std::vector{v.number(limits)};
              if (e.size() != 1 && e.size() != 12) {
                v.fail("must be one number or twelve, January to December (got " +
                       std::to_string(e.size()) + ")");
              }
              for (double& x : e) x *= kMetresPerMm / kSecondsPerDay;
              s.reservoir.evaporation_m_per_s = std::move(e);
            }},
           {"levels_mm", kOptional,
            [](V v, S s) {
              s.reservoir.table_level_m.clear();
              for (double level : v.numbers(kNonNegative)) {
                s.reservoir.table_level_m.push_back(level * kMetresPerMm);
              }
            }},
           {"areas_m2", kOptional,
            [](V v, S s) { s.reservoir.table_area_m2 = v.numbers(kPositive); }},
           {"area_m2", kOptional,
            [](V v, S s) { s.reservoir.tank_area_m2 = v.number(kPositive); }},
           {"diameter_mm", kOptional,
            [](V v, S s) {
              // A round tank or barrel: plan area pi d^2 / 4.
              const double d = v.number(kPositive) * kMetresPerMm;
              s.reservoir.tank_area_m2 = std::numbers::pi * d * d / 4.0;
            }},
       }},
      {"release",
       kRequired,
       {
           {"kind", kOptional,
            [](V v, S s) {
              s.release.kind = v.choice<ReleaseKind>({{"bell", ReleaseKind::bell},
                                                      {"float_valve", ReleaseKind::float_valve},
                                                      {"orifice", ReleaseKind::orifice},
                                                      {"none", ReleaseKind::none}});
            }},
           {"trigger_level_mm", kOptional,
            [](V v, S s) { s.release.trigger_level_m = v.number(kPositive) * kMetresPerMm; }},
           {"break_level_mm", kOptional,
            [](V v, S s) { s.release.break_level_m = v.number(kNonNegative) * kMetresPerMm; }},
           {"standpipe_diameter_mm", kOptional,
            [](V v, S s) { s.release.standpipe_diameter_m = v.number(kPositive) * kMetresPerMm; }},
           {"priming_flow_L_per_min", kOptional,
            [](V v, S s) {
              s.release.priming_flow_m3_per_s =
                  v.number(kPositive) * kCubicMetresPerLitre / kSecondsPerMinute;
            }},
           {"builds", kOptional, apply_builds},
           {"build", kOptional, [](V v, S s) { s.build = v.text(); }},
           {"priming_flow_measured_by", kOptional,
            [](V v, S s) { s.release.priming_flow_measured_by = v.text(); }},
           {"lip_coefficient", kOptional,
            [](V v, S s) { s.release.lip_coefficient = v.number(kPositive); }},
           {"mouth_coefficient", kOptional,
            [](V v, S s) { s.release.mouth_coefficient = v.number(kFraction); }},
           {"orifice_diameter_mm", kOptional,
            [](V v, S s) { s.release.orifice_diameter_m = v.number(kPositive) * kMetresPerMm; }},
           {"orifice_coefficient", kOptional,
            [](V v, S s) { s.release.orifice_coefficient = v.number(kFraction); }},
       }},
      {"drop_pipe",
       kRequired,
       {
           {"diameter_mm", kRequired,
            [](V v, S s) { s.drop_pipe.diameter_m = v.number(kPositive) * kMetresPerMm; }},
           {"length_m", kRequired, [](V v, S s) { s.drop_pipe.length_m = v.number(kPositive); }},
           {"roughness_mm", kOptional,
            [](V v, S s) { s.drop_pipe.roughness_m = v.number(kNonNegative) * kMetresPerMm; }},
           {"minor_loss_k", kOptional,
            [](V v, S s) { s.drop_pipe.minor_loss_k = v.number(kNonNegative); }},
           {"drop_m", kRequired, [](V v, S s) { s.drop_m = v.number(kPositive); }},
           {"friction", kOptional,
            [](V v, S s) {
              s.drop_pipe.friction =
                  v.choice<FrictionLaw>({{"colebrook", FrictionLaw::colebrook},
                                         {"swamee_jain", FrictionLaw::swamee_jain}});
            }},
       }},
      {"head_column",
       kOptional,
       {
           {"diameter_mm", kRequired,
            [](V v, S s) { head_column(s).diameter_m = v.number(kPositive) * kMetresPerMm; }},
           {"height_m", kRequired, [](V v, S s) { head_column(s).height_m = v.number(kPositive); }},
       }},
      {"nozzle",
       kRequired,
       {
           {"diameter_mm", kRequired,
            [](V v, S s) { s.nozzle.diameter_m = v.number(kPositive) * kMetresPerMm; }},
           {"discharge_coefficient", kOptional,
            [](V v, S s) { s.nozzle.discharge_coefficient = v.number(kFraction); }},
           {"velocity_coefficient", kOptional,
            [](V v, S s) { s.nozzle.velocity_coefficient = v.number(kFraction); }},
       }},
      {"turbine",
       kRequired,
       {
           {"kind", kOptional,
            [](V v, S s) {
              s.turbine.kind = v.choice<TurbineKind>({{"impulse", TurbineKind::impulse}});
            }},
           {"runner_diameter_mm", kRequired,
            [](V v, S s) { s.turbine.runner_diameter_m = v.number(kPositive) * kMetresPerMm; }},
           {"speed_rpm", kOptional,
            [](V v, S s) {
              s.turbine.speed_rpm = v.number_or("best", kPositive);
              s.turbine.best_at_every_head = !s.turbine.speed_rpm;
            }},
           {"peak_efficiency", kOptional,
            [](V v, S s) { s.turbine.peak_efficiency = v.number(kFraction); }},
       }},
      {"generator",
       kOptional,
       {
           {"efficiency", kOptional,
            [](V v, S s) { s.generator.efficiency = v.number(kFraction); }},
           {"cut_in_W", kOptional, [](V v, S s) { s.generator.cut_in_W = v.number(kNonNegative); }},
           {"volts_per_rpm", kOptional,
            [](V v, S s) { s.generator.volts_per_rpm = v.number(kPositive); }},
       }},
      {"battery",
       kRequired,
       {
           // First, so that the keys below override its presets.
           {"chemistry", kOptional,
            [](V v, S s) {
              apply_chemistry(v.choice<BatteryChemistry>({{"lead_acid", BatteryChemistry::lead_acid},
                                                          {"lifepo4", BatteryChemistry::lifepo4}}),
                              s.battery);
            }},
           {"capacity_Wh", kRequired,
            [](V v, S s) { s.battery.capacity_J = v.number(kPositive) * kJoulesPerWh; }},
           {"initial_soc", kOptional, [](V v, S s) { s.battery.initial_soc = v.number(kShare); }},
           {"charge_efficiency", kOptional,
            [](V v, S s) { s.battery.charge_efficiency = v.number(kFraction); }},
           {"discharge_efficiency", kOptional,
            [](V v, S s) { s.battery.discharge_efficiency = v.number(kFraction); }},
           {"self_discharge_per_month", kOptional,
            [](V v, S s) { s.battery.self_discharge_per_month = v.number(kPartShare); }},
           {"min_soc", kOptional, [](V v, S s) { s.battery.min_soc = v.number(kPartShare); }},
           {"reconnect_soc", kOptional,
            [](V v, S s) { s.battery.reconnect_soc = v.number(kShare); }},
           {"max_charge_W", kOptional,
            [](V v, S s) { s.battery.max_charge_W = v.number(kPositive); }},
           {"load_W", kOptional, [](V v, S s) { s.battery.load_W = v.number(kNonNegative); }},
           {"voltage_V", kOptional, [](V v, S s) { s.battery.voltage_V = v.number(kPositive); }},
           {"load_profile_W", kOptional,
            [](V v, S s) {
              s.battery.load_profile_W = v.numbers(kNonNegative);
              const std::size_t n = s.battery.load_profile_W.size();
              if (n != 24) {
                v.fail("must have exactly 24 values, one per hour (got " + std::to_string(n) + ")");
              }
            }},
       }},
      {"simulation",
       kOptional,
       {
           {"start", kOptional, [](V v, S s) { s.simulation.start = v.time(s.site.zone); }},
           {"end", kOptional, [](V v, S s) { s.simulation.end = v.time(s.site.zone); }},
           {"output_interval", kOptional,
            [](V v, S s) { s.simulation.output_interval_s = v.duration_s(kPositive); }},
           {"rtol", kOptional,
            [](V v, S s) { s.simulation.rtol = v.number(between(1e-10, 1e-3)); }},
           {"trace", kOptional,
            [](V v, S s) { s.simulation.trace = v.choice<bool>({{"on", true}, {"off", false}}); }},
       }},
  };
  return kSchema;
}

/// Walks the tree against the schema and fills a scenario.
class Loader {
 public:
  Loader(std::string label, std::set<std::string> overridden)
      : label_(std::move(label)), overridden_(std::move(overridden)) {}

  Scenario build(const YAML::Node& root) const {
    const Value top(root, "", label_, root.Mark().is_null() ? 0 : root.Mark().line + 1);
    if (root.IsNull()) top.fail("the scenario is empty");
    if (!root.IsMap()) top.fail("expected a section of keys at the top level, got " + top.got());
    std::vector<std::string_view> section_names;
    for (const Section& section : schema()) section_names.push_back(section.name);
    const auto sections = entries(top, section_names);

    Scenario s;
    s.drop_pipe.roughness_m = 0.0015 * kMetresPerMm;
    s.drop_pipe.minor_loss_k = 1.5;
    Seen seen;
    for (const Section& section : schema()) {
      const auto found = sections.find(std::string(section.name));
      if (found == sections.end()) {
        if (section.required) {
          throw InputError(label_, 0, std::string(section.name), "missing required section");
        }
        continue;
      }
      const Value& sec = found->second;
      if (!sec.node().IsMap() && !sec.node().IsNull()) {
        sec.fail("expected a section of keys, got " + sec.got());
      }
      seen.add(sec.path(), sec);
      std::vector<std::string_view> key_names;
      for (const Key& key : section.keys) key_names.push_back(key.name);
      const auto values = entries(sec, key_names);
      for (const Key& key : section.keys) {
        const auto value = values.find(std::string(key.name));
        if (value != values.end()) {
          key.apply(value->second, s);
          seen.add(sec.path() + "." + std::string(key.name), value->second);
        } else if (key.required) {
          throw InputError(sec.label(), sec.line(), sec.path() + "." + std::string(key.name),
                           "missing required key");
        }
      }
    }
    detail::check_combinations(seen, s);
    return s;
  }

 private:
  /// The entries of a section by name (see read_entries).
  std::map<std::string, Value> entries(const Value& section,
                                       const std::vector<std::string_view>& valid) const {
    return read_entries(section, valid,
                        [this](const Value& parent, const YAML::Node& key,
                               const YAML::Node& value) { return child(parent, key, value); });
  }

  Value child(const Value& parent, const YAML::Node& key, const YAML::Node& value) const {
    const int key_line = key.Mark().is_null() ? 0 : key.Mark().line + 1;
    if (!key.IsScalar()) {
      Value(key, parent.path(), parent.label(), key_line)
          .fail("expected a key name, got a " + std::string(key.IsMap() ? "section" : "list"));
    }
    const std::string path =
        parent.path().empty() ? key.Scalar() : parent.path() + "." + key.Scalar();
    if (parent.label() == kOverrideLabel || overridden_.count(path) > 0) {
      return Value(value, path, kOverrideLabel, 0);
    }
    return Value(value, path, label_, key_line);
  }

  std::string label_;
  std::set<std::string> overridden_;
};

}  // namespace

double design_level_m(const Scenario& scenario) {
  const ReleaseConfig& rel = scenario.release;
  switch (rel.kind) {
    case ReleaseKind::bell:
      return std::min(BellSiphon(rel).priming_level_m(), scenario.reservoir.rim_m);
    case ReleaseKind::float_valve:
      return rel.trigger_level_m;
    case ReleaseKind::orifice:
    case ReleaseKind::none:
      break;
  }
  return scenario.reservoir.rim_m;
}

PlantConfig plant_config(const Scenario& scenario) {
  return {scenario.drop_pipe,
          scenario.drop_m,
          scenario.head_column,
          scenario.nozzle,
          scenario.turbine,
          scenario.generator,
          scenario.site.temperature_C,
          std::max(scenario.reservoir.rim_m, scenario.release.trigger_level_m),
          design_level_m(scenario),
          running_outflow_m3_per_s(*make_release(scenario.release), design_level_m(scenario),
                                   std::numeric_limits<double>::infinity()),
          scenario.battery.voltage_V};
}

Scenario parse_scenario(std::string_view yaml_text, const std::string& file_label,
                        const std::filesystem::path& base_dir,
                        const std::vector<std::string>& overrides) {
  const std::size_t nul = yaml_text.find('\0');
  if (nul != std::string_view::npos) {
    const auto line = 1 + std::count(yaml_text.begin(), yaml_text.begin() + nul, '\n');
    throw InputError(file_label, static_cast<int>(line), "",
                     "binary data (a NUL byte on this line), not a YAML text file");
  }
  check_line_ends(yaml_text, file_label);
  YAML::Node root;
  try {
    root = YAML::Load(std::string(yaml_text));
  } catch (const YAML::DeepRecursion& e) {
    throw InputError(file_label, e.mark.is_null() ? 0 : e.mark.line + 1, "",
                     "nested more than " + std::to_string(e.depth()) +
                         " levels deep; a scenario's sections nest a few levels at most");
  } catch (const YAML::ParserException& e) {
    const int line = e.mark.is_null() ? 0 : e.mark.line + 1;
    if (const int tab_line = tab_indented_line(yaml_text, line)) {
      throw InputError(file_label, tab_line, "",
                       "a tab in the indentation; YAML indents with spaces only");
    }
    throw InputError(file_label, line, "", "YAML syntax error: " + e.msg);
  }
  const std::set<std::string> overridden = apply_overrides(root, overrides);
  Scenario s = Loader(file_label, overridden).build(root);
  s.file = file_label;
  for (std::filesystem::path& rain_file : s.rain.files) {
    rain_file = (base_dir / rain_file).lexically_normal();
  }
  if (s.rain.calibrate_with) {
    s.rain.calibrate_with->file = (base_dir / s.rain.calibrate_with->file).lexically_normal();
  }
  return s;
}

std::string read_scenario_text(const std::filesystem::path& file) {
  const std::string label = file.string();
  std::error_code ec;
  if (!std::filesystem::exists(file, ec)) throw InputError(label, 0, "", "no such scenario file");
  if (std::filesystem::is_directory(file, ec)) {
    throw InputError(label, 0, "", "is a folder, not a scenario file");
  }
  errno = 0;
  std::ifstream in(file, std::ios::binary);
  if (!in) {
    throw InputError(label, 0, "",
                     std::string("the scenario file cannot be opened (") +
                         (errno ? std::strerror(errno) : "unknown reason") + ")");
  }
  std::string text(kMaxScenarioBytes + 1, '\0');
  in.read(text.data(), static_cast<std::streamsize>(text.size()));
  if (in.bad()) throw InputError(label, 0, "", "the scenario file could not be read");
  text.resize(static_cast<std::size_t>(in.gcount()));
  if (text.size() > kMaxScenarioBytes) {
    const auto line = 1 + std::count(text.begin(), text.end() - 1, '\n');
    throw InputError(label, static_cast<int>(line), "",
                     "the scenario passes " + std::to_string(kMaxScenarioBytes / 1024) +
                         " KiB on this line; a scenario is a page of keys (is this a data file?)");
  }
  return text;
}

void check_scenario_key(const std::string& key, const std::string& label) {
  const std::size_t dot = key.find('.');
  const std::string section_name = key.substr(0, dot);
  std::vector<std::string_view> section_names;
  for (const Section& section : schema()) section_names.push_back(section.name);
  const Value where(YAML::Node(), key, label, 0);
  reject_unknown_key(where, section_name, section_names);
  if (dot == std::string::npos) where.fail("is a section; give one of its keys as " + key + ".KEY");
  const std::string name = key.substr(dot + 1, key.find('.', dot + 1) - dot - 1);
  for (const Section& section : schema()) {
    if (section.name != section_name) continue;
    std::vector<std::string_view> key_names;
    for (const Key& k : section.keys) key_names.push_back(k.name);
    reject_unknown_key(where, name, key_names);
  }
}

Scenario load_scenario(const std::filesystem::path& file,
                       const std::vector<std::string>& overrides) {
  return parse_scenario(read_scenario_text(file), file.string(), file.parent_path(), overrides);
}

}  // namespace gutterwatt
