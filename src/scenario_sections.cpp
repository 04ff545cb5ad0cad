// The scenario's nested sections (see scenario_value.hpp): rain.where, rain.disaggregate with its
// calibrate_with and idf, and release.builds, each read against its own short list of keys.

#include <charconv>
#include <cmath>
#include <cstdint>
#include <map>
#include <string>
#include <vector>

#include "gutterwatt/disaggregation.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/units.hpp"
#include "scenario_value.hpp"

namespace gutterwatt::detail {
namespace {

/// Reads the keys of a small section nested in a key's value (rain.disaggregate, an item of
/// release.builds) against `keys`, with the same messages as the loader's; returns them by name.
std::map<std::string, Value> apply_nested(const Value& v, const std::vector<Key>& keys,
                                          Scenario& s) {
  std::vector<std::string_view> names;
  for (const Key& key : keys) names.push_back(key.name);
  const auto child = [](const Value& parent, const YAML::Node& key, const YAML::Node& value) {
    if (!key.IsScalar()) parent.fail("expected a key name, got a section or a list");
    // Keys written by --set have no place in the file.
    const bool from_override = parent.label() == kOverrideLabel || key.Mark().is_null();
    return Value(value, parent.path() + "." + key.Scalar(),
                 from_override ? kOverrideLabel : parent.label(),
                 from_override ? 0 : key.Mark().line + 1);
  };
  const std::map<std::string, Value> given = read_entries(v, names, child);
  for (const Key& key : keys) {
    const auto found = given.find(std::string(key.name));
    if (found != given.end()) {
      key.apply(found->second, s);
    } else if (key.required) {
      throw InputError(v.label(), v.line(), v.path() + "." + std::string(key.name),
                       "missing required key");
    }
  }
  return given;
}

Disaggregation& disaggregation(Scenario& s) {
  if (!s.rain.disaggregate) s.rain.disaggregate.emplace();
  return *s.rain.disaggregate;
}

/// rain.disaggregate.calibrate_with: the fine record's file and columns.
void apply_calibrate_with(const Value& v, Scenario& s) {
  using V = const Value&;
  using S = Scenario&;
  static const std::vector<Key> kKeys = {
      {"file", kRequired, [](V v, S s) { s.rain.calibrate_with->file = v.path_text(); }},
      {"time_column", kOptional,
       [](V v, S s) { s.rain.calibrate_with->format.time_column = v.text(); }},
      {"value_column", kOptional,
       [](V v, S s) { s.rain.calibrate_with->format.value_column = v.text(); }},
      {"unit", kOptional,
       [](V v, S s) {
         s.rain.calibrate_with->format.unit_m =
             v.choice<double>({{"mm", kMetresPerMm}, {"in", kMetresPerInch}});
         s.rain.calibrate_with->format.unit_name = v.raw();
       }},
  };
  if (!v.node().IsMap()) {
    v.fail("expected a section of keys such as {file: gauge-5min.csv}, got " + v.got());
  }
  s.rain.calibrate_with.emplace();
  s.rain.calibrate_with->line = v.line();
  s.rain.calibrate_with->label = v.label();
  apply_nested(v, kKeys, s);
}

/// rain.disaggregate.idf: {a, b, c} of i = a / (t + b)^c, mm/h and minutes, each > 0, c <= 1.
void apply_idf(const Value& v, Scenario& s) {
  using V = const Value&;
  using S = Scenario&;
  static const std::vector<Key> kKeys = {
      {"a", kRequired, [](V v, S s) { disaggregation(s).idf->a = v.number(kPositive); }},
      {"b", kRequired, [](V v, S s) { disaggregation(s).idf->b_min = v.number(kPositive); }},
      {"c", kRequired,
       [](V v, S s) {
         disaggregation(s).idf->c = v.number(Limits{0.0, 1.0, true, false});
       }},
  };
  if (!v.node().IsMap()) {
    v.fail("expected a section of keys such as {a: 1500, b: 10, c: 0.75}, got " + v.got());
  }
  disaggregation(s).idf.emplace(IdfCurve{0.0, 0.0, 0.0});
  apply_nested(v, kKeys, s);
}

}  // namespace

Instant whole_seconds(const Value& v, Instant lo_s, Instant hi_s) {
  const double d = v.duration_s(kPositive);
  v.expect(d == std::floor(d) && d >= static_cast<double>(lo_s) && d <= static_cast<double>(hi_s),
           "must be a whole number of seconds from " + format_duration(lo_s) + " to " +
               format_duration(hi_s));
  return static_cast<Instant>(d);
}

Instant hours_as_seconds(const Value& v, const Limits& limits) {
  const double s = v.number(limits) * kSecondsPerHour;
  v.expect(s == std::floor(s), "must be a whole number of seconds");
  return static_cast<Instant>(s);
}

void apply_builds(const Value& v, Scenario& s) {
  using V = const Value&;
  using S = Scenario&;
  static const std::vector<Key> kKeys = {
      {"name", kRequired, [](V v, S s) { s.builds.back().name = v.text(); }},
      {"priming_flow_L_per_min", kRequired,
       [](V v, S s) {
         s.builds.back().priming_flow_m3_per_s =
             v.number(kPositive) * kCubicMetresPerLitre / kSecondsPerMinute;
       }},
      {"minor_loss_k", kOptional,
       [](V v, S s) { s.builds.back().minor_loss_k = v.number(kNonNegative); }},
      {"nozzle_diameter_mm", kOptional,
       [](V v, S s) { s.builds.back().nozzle_diameter_m = v.number(kPositive) * kMetresPerMm; }},
      {"nozzle_discharge_coefficient", kOptional,
       [](V v, S s) { s.builds.back().nozzle_discharge_coefficient = v.number(kFraction); }},
      {"measured_by", kOptional, [](V v, S s) { s.builds.back().measured_by = v.text(); }},
  };
  s.builds.clear();
  for (const Value& item : v.items()) {
    if (!item.node().IsMap()) {
      item.fail("expected a build such as {name: open, priming_flow_L_per_min: 2.5}, got " +
                item.got());
    }
    s.builds.emplace_back();
    const auto given = apply_nested(item, kKeys, s);
    for (std::size_t i = 0; i + 1 < s.builds.size(); ++i) {
      given.at("name").expect(
          s.builds[i].name != s.builds.back().name,
          "names another build already (release.builds[" + std::to_string(i) + "])");
    }
  }
}

void apply_where(const Value& v, Scenario& s) {
  if (!v.node().IsMap() || v.node().size() == 0) {
    v.fail("expected a section of columns and values such as {location: Seattle}, got " + v.got());
  }
  auto& where = s.rain.series.where;
  where.clear();
  for (auto it = v.node().begin(); it != v.node().end(); ++it) {
    if (!it->first.IsScalar()) v.fail("expected a column name, got a section or a list");
    const std::string& column = it->first.Scalar();
    const bool from_override = v.label() == kOverrideLabel || it->first.Mark().is_null();
    const Value item(it->second, v.path() + "." + column,
                     from_override ? kOverrideLabel : v.label(),
                     from_override ? 0 : it->first.Mark().line + 1);
    for (const auto& [earlier, value] : where) {
      if (earlier == column) item.fail("duplicate column");
    }
    where.emplace_back(column, item.text());
  }
}

void apply_disaggregate(const Value& v, Scenario& s) {
  using V = const Value&;
  using S = Scenario&;
  static const std::vector<Key> kKeys = {
      {"method", kRequired,
       [](V v, S s) {
         std::vector<std::pair<std::string_view, DisaggregationMethod>> names;
         for (const DisaggregationMethod m : kDisaggregationMethods) {
           names.emplace_back(method_name(m), m);
         }
         disaggregation(s).method = v.choice<DisaggregationMethod>(names);
       }},
      {"duration_h", kOptional,
       [](V v, S s) {
         disaggregation(s).window.duration_s = hours_as_seconds(v, {0.0, 24.0, true, false});
       }},
      {"start_hour", kOptional,
       [](V v, S s) {
         disaggregation(s).window.start_s = hours_as_seconds(v, {0.0, 24.0, false, true});
       }},
      {"step", kOptional, [](V v, S s) { disaggregation(s).step_s = whole_seconds(v, 1, kDay_s); }},
      {"seed", kOptional,
       [](V v, S s) {
         std::uint64_t seed = 0;
         const std::string& text = v.raw();
         const auto result = std::from_chars(text.data(), text.data() + text.size(), seed);
         if (text.empty() || result.ec != std::errc() || result.ptr != text.data() + text.size()) {
           v.fail("expected a whole number from 0 to 18446744073709551615, got " + v.got());
         }
         disaggregation(s).seed = seed;
       }},
      {"intermittency", kOptional,
       [](V v, S s) { disaggregation(s).intermittency = v.number(kShare); }},
      {"calibrate_with", kOptional, apply_calibrate_with},
      {"idf", kOptional, apply_idf},
  };
  if (!v.node().IsMap()) {
    v.fail("expected a section of keys such as {method: cascade, step: 5min}, got " + v.got());
  }
  if (s.rain.format == RainFormat::tips) {
    v.fail("not used by format: tips (a tip log is spread by rain.tip_cap)");
  }
  disaggregation(s);
  const std::map<std::string, Value> given = apply_nested(v, kKeys, s);
  const Disaggregation& d = *s.rain.disaggregate;
  const auto at = [&](const std::string& name) { return given.find(name); };
  const bool nrcs = d.method != DisaggregationMethod::block && !is_random(d.method);
  const std::string method = "method: " + std::string(method_name(d.method));
  if (at("calibrate_with") != given.end() && !is_random(d.method)) {
    at("calibrate_with")
        ->second.fail("is for method: cascade or fragments only (got " + method + ")");
  }
  if (at("idf") != given.end() && d.method != DisaggregationMethod::cascade) {
    at("idf")->second.fail("is for method: cascade only (got " + method + ")");
  }
  if (d.method == DisaggregationMethod::fragments && at("calibrate_with") == given.end()) {
    at("method")->second.fail(
        "fragments needs rain.disaggregate.calibrate_with: a fine record whose intervals lend "
        "their patterns");
  }
  if (at("calibrate_with") != given.end() && at("idf") != given.end()) {
    at("idf")->second.fail(
        "give either rain.disaggregate.calibrate_with or "
        "rain.disaggregate.idf, not both");
  }
  if (s.rain.format == RainFormat::series) {
    // A series interval is spread over itself: the day's window has no meaning there.
    for (const char* key : {"start_hour", "duration_h"}) {
      if (at(key) != given.end()) {
        at(key)->second.fail(
            "only for format: daily (an interval of a series is spread over "
            "itself)");
      }
    }
    at("method")->second.expect(!nrcs,
                                "is a 24-hour shape, for format: daily only; use cascade "
                                "or block for a series");
    return;
  }
  if (nrcs) {
    // TR-55 gives its shapes for 24 hours only; they are not stretched or cut here.
    if (at("duration_h") != given.end()) {
      at("duration_h")
          ->second.expect(d.window.duration_s == kDay_s,
                          "must be 24 for " + method + ", a 24-hour shape");
    }
    if (at("start_hour") != given.end()) {
      at("start_hour")
          ->second.expect(d.window.start_s == 0, "must be 0 for " + method + ", a 24-hour shape");
    }
  }
  if (d.window.start_s + d.window.duration_s > kDay_s) {
    // Each day's rain stays in its own day.
    if (at("duration_h") != given.end()) {
      at("duration_h")
          ->second.expect(
              false, "must be <= 24 - rain.disaggregate.start_hour = " +
                         show(static_cast<double>(kDay_s - d.window.start_s) / kSecondsPerHour) +
                         ", so that each day's rain stays in its day");
    }
    at("start_hour")
        ->second.expect(false,
                        "must be 0 with the default duration_h of 24, so that each "
                        "day's rain stays in its day");
  }
  if (d.method != DisaggregationMethod::block && d.window.duration_s % d.step_s != 0) {
    const std::string duration = show(static_cast<double>(d.window.duration_s) / kSecondsPerHour);
    if (at("step") == given.end()) {
      v.fail("the default step of " + format_duration(d.step_s) + " does not divide duration_h = " +
             duration + " into whole steps; give rain.disaggregate.step");
    }
    at("step")->second.expect(
        false, "must divide rain.disaggregate.duration_h = " + duration + " into whole steps");
  }
}

}  // namespace gutterwatt::detail
