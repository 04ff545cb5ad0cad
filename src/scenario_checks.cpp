// The scenario's checks across keys (see scenario_value.hpp): each reads the keys it needs from
// what the loader saw and fails on the key to blame.

#include <cmath>
#include <numbers>
#include <string>
#include <vector>

#include "gutterwatt/plant.hpp"
#include "gutterwatt/reservoir.hpp"
#include "gutterwatt/units.hpp"
#include "report_format.hpp"
#include "scenario_value.hpp"

namespace gutterwatt::detail {
namespace {

void check_rain(const Seen& seen, Scenario& s) {
  seen.exclusive("site.utc_offset", "site.time_zone");
  seen.exclusive("rain.file", "rain.files");
  if (!seen.has("rain.files")) seen.require("rain.file", "or give rain.files");
  SeriesFormat& series = s.rain.series;
  const bool per_hour = series.unit_name.ends_with("/h");
  if (seen.has("rain.unit")) {
    seen.at("rain.unit")
        .expect(series.value == RainValue::intensity || !per_hour,
                "must be mm or in with value: depth");
  }
  if (series.value == RainValue::intensity && !per_hour) series.unit_name += "/h";
  if (!seen.has("rain.utc_offset")) series.zone = s.site.zone;
  // A calibration record's naive stamps are on the record's clock, so that its days are cut
  // as the record's are.
  if (s.rain.calibrate_with) s.rain.calibrate_with->format.zone = series.zone;
  if (series.decimal == ',' && series.delimiter == ',') {
    seen.at("rain.decimal")
        .fail(
            "a decimal comma needs fields separated by another character: set rain.delimiter "
            "to ; or tab");
  }
  if (s.rain.format == RainFormat::tips) seen.require("rain.tip_depth", "needed by format: tips");
  if (s.rain.format == RainFormat::daily) {
    seen.require("rain.disaggregate", "needed by format: daily");
    if (seen.has("rain.value")) {
      seen.at("rain.value")
          .expect(series.value == RainValue::depth, "must be depth for format: daily");
    }
    if (!seen.has("rain.time_column")) series.time_column = "date";
  }
}

void check_level_table(const Seen& seen) {
  const Value& levels_key = seen.at("reservoir.levels_mm");
  const std::vector<Value> levels = levels_key.items();
  if (levels.size() < 2) {
    levels_key.fail("must have at least 2 levels (got " + std::to_string(levels.size()) + ")");
  }
  levels.front().expect(levels.front().number() == 0.0, "must be 0, the reservoir floor");
  for (std::size_t i = 1; i < levels.size(); ++i) {
    levels[i].expect(levels[i].number() > levels[i - 1].number(),
                     "must be above the level before it, " + levels[i - 1].raw());
  }
  const Value& areas = seen.at("reservoir.areas_m2");
  const std::size_t n_areas = areas.items().size();
  if (n_areas != levels.size()) {
    areas.fail("must have one value per level in " + levels_key.path() + ", " +
               std::to_string(levels.size()) + " (got " + std::to_string(n_areas) + ")");
  }
  const Value& rim = seen.at("reservoir.rim_mm");
  rim.expect(rim.number() <= levels.back().number(),
             "must not be above the top of " + levels_key.path() + ", " + levels.back().raw());
}

/// The rim as the checks of other keys name it: the key as written, or the depth it defaults to.
std::string rim_text(const Seen& seen, const Scenario& s) {
  if (seen.has("reservoir.rim_mm")) return seen.at("reservoir.rim_mm").named();
  return "the rim, " + show(s.reservoir.rim_m / kMetresPerMm) +
         " mm (the depth of shape: " + seen.text_or("reservoir.shape", "half_round") + ")";
}

void check_reservoir(const Seen& seen, Scenario& s) {
  ReservoirConfig& r = s.reservoir;
  const std::string shape = seen.text_or("reservoir.shape", "half_round");
  const std::string why = "needed by shape: " + shape;
  const auto not_for_shape = [&](const std::string& key) {
    if (seen.has(key)) seen.at(key).fail("not used by shape: " + shape);
  };
  const bool tank = r.shape == ReservoirShape::tank;
  const bool tabulated =
      r.shape == ReservoirShape::table ||
      (tank && !seen.has("reservoir.area_m2") && !seen.has("reservoir.diameter_mm"));
  if (tank) {
    seen.exclusive("reservoir.area_m2", "reservoir.diameter_mm");
    for (const char* key : {"reservoir.area_m2", "reservoir.diameter_mm"}) {
      if (seen.has(key)) {
        seen.exclusive(key, "reservoir.levels_mm");
        seen.exclusive(key, "reservoir.areas_m2");
      }
    }
    if (tabulated) seen.require("reservoir.levels_mm", why + " (or area_m2 or diameter_mm)");
    not_for_shape("reservoir.length_m");
    if (!seen.has("reservoir.diameter_mm")) seen.require("reservoir.overflow_length_m", why);
  } else {
    not_for_shape("reservoir.area_m2");
    not_for_shape("reservoir.diameter_mm");
  }
  if (tabulated) {
    seen.require("reservoir.levels_mm", why);
    seen.require("reservoir.areas_m2", why);
    if (!seen.has("reservoir.length_m")) seen.require("reservoir.overflow_length_m", why);
    seen.require("reservoir.rim_mm", why);
    check_level_table(seen);
  } else if (!tank) {
    seen.require("reservoir.length_m", why);
  }
  if (tabulated || tank) {
    not_for_shape("reservoir.fall_mm");
    seen.require("reservoir.rim_mm", why);
  }
  seen.exclusive("reservoir.width_mm", "reservoir.size_mm");
  if (r.shape == ReservoirShape::k_style) {
    seen.require("reservoir.size_mm", why);
    const Value& size = seen.at("reservoir.size_mm");
    size.expect(k_style_section(r.width_m).has_value(),
                "must be a trade size of shape: k_style, 5 or 6 in (127 or 152.4 mm) or 125 or "
                "150 mm");
  } else if (r.shape == ReservoirShape::half_round) {
    if (!seen.has("reservoir.size_mm")) seen.require("reservoir.width_mm", why + " (or size_mm)");
  } else if (r.shape != ReservoirShape::table && !tank) {
    seen.require("reservoir.width_mm", why);
    not_for_shape("reservoir.size_mm");
  } else {
    not_for_shape("reservoir.width_mm");
    not_for_shape("reservoir.size_mm");
  }
  if (r.shape == ReservoirShape::trapezoid) {
    seen.require("reservoir.floor_width_mm", why);
    seen.require("reservoir.depth_mm", why);
  } else {
    not_for_shape("reservoir.floor_width_mm");
    if (r.shape != ReservoirShape::box) not_for_shape("reservoir.depth_mm");
  }
  const bool has_depth = r.shape == ReservoirShape::half_round ||
                         r.shape == ReservoirShape::k_style || seen.has("reservoir.depth_mm");
  if (has_depth) {
    const double depth_m = section_of(r).depth_m();
    const double depth_mm = depth_m / kMetresPerMm;
    if (seen.has("reservoir.rim_mm")) {
      const Value& rim = seen.at("reservoir.rim_mm");
      rim.expect(
          rim.number() <= depth_mm * (1.0 + 1e-12),
          "must be <= the depth of shape: " + shape + ", " + rim.shown_with_unit(depth_mm, "mm"));
    } else {
      r.rim_m = depth_m;
    }
  } else {
    seen.require("reservoir.rim_mm", why);
  }
  if (seen.has("reservoir.initial_level_mm")) {
    const Value& initial = seen.at("reservoir.initial_level_mm");
    initial.expect(initial.number() * kMetresPerMm <= r.rim_m * (1.0 + 1e-12),
                   "must not be above " + rim_text(seen, s));
  }
  if (!seen.has("reservoir.overflow_length_m")) {
    // A round tank spills over its whole rim, pi d = sqrt(4 pi A) long.
    r.overflow_length_m = seen.has("reservoir.diameter_mm")
                              ? std::sqrt(4.0 * std::numbers::pi * r.tank_area_m2)
                              : r.length_m;
  }
}

void check_release(const Seen& seen, const Scenario& s) {
  const ReleaseKind kind = s.release.kind;
  std::vector<std::string> needs;
  if (kind == ReleaseKind::bell) {
    needs = {"trigger_level_mm", "break_level_mm", "standpipe_diameter_mm"};
    // A picked build brings its own priming flow.
    if (!seen.has("release.build")) needs.push_back("priming_flow_L_per_min");
  } else if (kind == ReleaseKind::float_valve) {
    needs = {"trigger_level_mm", "break_level_mm", "orifice_diameter_mm"};
  } else if (kind == ReleaseKind::orifice) {
    needs = {"orifice_diameter_mm"};
  }
  const std::string why = "needed by kind: " + seen.text_or("release.kind", "bell");
  for (const std::string& key : needs) seen.require("release." + key, why);
  if (kind != ReleaseKind::bell && kind != ReleaseKind::float_valve) return;
  const Value& trigger = seen.at("release.trigger_level_mm");
  const Value& brk = seen.at("release.break_level_mm");
  brk.expect(brk.number() < trigger.number(), "must be below " + trigger.named());
  trigger.expect(trigger.number() * kMetresPerMm <= s.reservoir.rim_m * (1.0 + 1e-12),
                 "must not be above " + rim_text(seen, s));
}

void check_conveyance(const Seen& seen) {
  const Value& drop = seen.at("drop_pipe.drop_m");
  const Value& length = seen.at("drop_pipe.length_m");
  if (seen.has("head_column.height_m")) {
    // With a head column the drop pipe ends at the column's top, drop - height below the floor.
    const Value& height = seen.at("head_column.height_m");
    height.expect(height.number() < drop.number(), "must be below " + drop.named());
    const double fall = drop.number() - height.number();
    // Lengths that agree to a nanometre are equal: the difference is rounded (3.1 - 0.7 =
    // 2.4000000000000004), and a pipe as long as the fall must pass.
    constexpr double kSameLength_m = 1e-9;
    length.expect(length.number() >= fall - kSameLength_m,
                  "must be >= drop_pipe.drop_m - head_column.height_m = " + show(fall) +
                      ", the fall to the column's top");
  } else {
    length.expect(length.number() >= drop.number(), "must be >= " + drop.named());
  }
  const Value& pipe = seen.at("drop_pipe.diameter_mm");
  const Value& nozzle = seen.at("nozzle.diameter_mm");
  nozzle.expect(nozzle.number() < pipe.number(), "must be smaller than " + pipe.named());
}

/// release.build: the named build's values in place of the scenario's.
void apply_build(const Seen& seen, Scenario& s) {
  if (!seen.has("release.build")) return;
  const Value& v = seen.at("release.build");
  std::string names;
  for (const SiphonBuild& b : s.builds) {
    names += (names.empty() ? "" : ", ") + b.name;
    if (b.name != s.build) continue;
    s.release.priming_flow_m3_per_s = b.priming_flow_m3_per_s;
    if (b.minor_loss_k) s.drop_pipe.minor_loss_k = *b.minor_loss_k;
    if (b.nozzle_diameter_m) s.nozzle.diameter_m = *b.nozzle_diameter_m;
    if (b.nozzle_discharge_coefficient) {
      s.nozzle.discharge_coefficient = *b.nozzle_discharge_coefficient;
    }
    s.release.priming_flow_measured_by = b.measured_by.empty() ? "build " + b.name : b.measured_by;
    v.expect(s.nozzle.diameter_m < s.drop_pipe.diameter_m,
             "the build's nozzle must be smaller than drop_pipe.diameter_mm");
    return;
  }
  v.expect(false, names.empty() ? "names a build, but release.builds lists none"
                                : "unknown build; expected one of " + names);
}

/// The key to blame for a value that a picked build may have set.
const Value& blame(const Seen& seen, const Scenario& s, bool from_build, const std::string& key) {
  return !s.build.empty() && from_build ? seen.at("release.build") : seen.at(key);
}

const SiphonBuild* picked_build(const Scenario& s) {
  for (const SiphonBuild& b : s.builds) {
    if (!s.build.empty() && b.name == s.build) return &b;
  }
  return nullptr;
}

void check_nozzle(const Seen& seen, const Scenario& s) {
  // Cd = Cc Cv with a contraction coefficient Cc <= 1 (REFERENCES.md section 5), so Cd <= Cv.
  const Nozzle& n = s.nozzle;
  if (n.discharge_coefficient <= n.velocity_coefficient) return;
  const SiphonBuild* build = picked_build(s);
  if ((build && build->nozzle_discharge_coefficient) || seen.has("nozzle.discharge_coefficient")) {
    blame(seen, s, build && build->nozzle_discharge_coefficient, "nozzle.discharge_coefficient")
        .expect(false, "the discharge coefficient " + show(n.discharge_coefficient) +
                           " must not exceed nozzle.velocity_coefficient = " +
                           show(n.velocity_coefficient) + ", as Cd = Cc Cv with Cc <= 1");
  }
  seen.at("nozzle.velocity_coefficient")
      .expect(false, "must be at least nozzle.discharge_coefficient = " +
                         show(n.discharge_coefficient) + ", as Cd = Cc Cv with Cc <= 1");
}

/// A bell siphon that primes must run faster than it fills at the trigger level, or it would
/// never drain below the lip once sealed.
void check_priming_flow(const Seen& seen, const Scenario& s) {
  if (s.release.kind != ReleaseKind::bell) return;
  const double running = running_flow_m3_per_s(plant_config(s), s.release.trigger_level_m);
  if (s.release.priming_flow_m3_per_s < running) return;
  const double per_minute = kSecondsPerMinute / kCubicMetresPerLitre;
  blame(seen, s, true, "release.priming_flow_L_per_min")
      .expect(false, "the priming flow " +
                         on_terminal(s.release.priming_flow_m3_per_s * per_minute) +
                         " L/min must be below the running flow at release.trigger_level_mm, " +
                         on_terminal(running * per_minute) + " L/min");
}

void check_generator(const Seen& seen) {
  if (seen.has("generator.volts_per_rpm")) {
    seen.require("battery.voltage_V", "needed by generator.volts_per_rpm");
  }
}

/// A cut load reconnects above the cut, or it would toggle there. The presets keep this, so a
/// reconnect charge not given comes from battery.chemistry and battery.min_soc is to blame.
void check_battery(const Seen& seen, const Scenario& s) {
  const BatteryConfig& b = s.battery;
  if (!b.reconnect_soc || *b.reconnect_soc > b.min_soc) return;
  if (seen.has("battery.reconnect_soc")) {
    seen.at("battery.reconnect_soc")
        .expect(false, "must be above battery.min_soc = " + show(b.min_soc));
  }
  seen.at("battery.min_soc")
      .expect(false, "must be below " + show(*b.reconnect_soc) +
                         ", the reconnect charge of battery.chemistry (or set "
                         "battery.reconnect_soc above it)");
}

void check_simulation(const Seen& seen, const Scenario& s) {
  const auto& sim = s.simulation;
  if (sim.start && sim.end) {
    seen.at("simulation.end")
        .expect(*sim.end > *sim.start,
                "must be after simulation.start = " + seen.at("simulation.start").raw());
  }
}

}  // namespace

/// Checks that involve several keys, and defaults that depend on other keys.
void check_combinations(const Seen& seen, Scenario& s) {
  check_rain(seen, s);
  seen.exclusive("roof.lag_s", "roof.lag");
  check_reservoir(seen, s);
  apply_build(seen, s);
  check_release(seen, s);
  check_conveyance(seen);
  check_nozzle(seen, s);
  check_priming_flow(seen, s);
  check_generator(seen);
  check_battery(seen, s);
  check_simulation(seen, s);
}

}  // namespace gutterwatt::detail
