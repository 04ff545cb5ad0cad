#include "gutterwatt/design.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdio>
#include <limits>
#include <map>
#include <memory>
#include <string>

#include "detail.hpp"
#include "gutterwatt/chain_system.hpp"
#include "gutterwatt/disaggregation.hpp"
#include "gutterwatt/fragments.hpp"
#include "gutterwatt/gutter_flow.hpp"
#include "gutterwatt/hydraulics.hpp"
#include "gutterwatt/plant.hpp"
#include "gutterwatt/release.hpp"
#include "gutterwatt/reservoir.hpp"
#include "gutterwatt/simulation.hpp"
#include "gutterwatt/siphon.hpp"
#include "gutterwatt/units.hpp"
#include "report_format.hpp"

namespace gutterwatt {
namespace {

// How far over the rim the level at which a release on a long level gutter can start is looked
// for: 100 mm of head over an 8 m rim overflows some 10 L/s, beyond any roof's rain.
constexpr double kStartSearch_m = 0.1;

// A quantity given in SI (`si_unit` as in column names: L, mm_per_h) as a figure or a warning
// shows it, in `units`: `12.5 mm/h` or `0.492 in/h`.
std::string shown(UnitSystem units, double in_si, std::string_view si_unit) {
  const InUnits v = in_units(units, in_si, si_unit);
  return detail::on_terminal(v.value) + " " + unit_label(v.unit);
}

constexpr double kMmPerHourPerMPerS = 3.6e6;
constexpr double kLitresPerMinutePerM3PerS = 6e4;

// Composite Simpson's rule on n (even) panels.
template <class F>
double simpson(F f, double a, double b, int n = 400) {
  const double h = (b - a) / n;
  double s = f(a) + f(b);
  for (int k = 1; k < n; ++k) s += f(a + k * h) * (k % 2 ? 4.0 : 2.0);
  return s * h / 3.0;
}

// Steady rain intensity whose roof runoff equals `flow` (rational method Q = C i A).
double intensity_for_flow(const Scenario& sc, double flow_m3_per_s) {
  return flow_m3_per_s / (sc.roof.runoff_coefficient * sc.roof.area_m2);
}

double wet_intensity(const RainPulse& p) {
  return p.depth_m / static_cast<double>(p.end - p.start);
}

// Electrical energy of one release from the set-point with no inflow, simulated by the same
// engine as a run: the reservoir starts just above the set-point, the release runs to its break
// level, the head column (if any) drains. The energy is counted at the generator, so the battery
// only has to stay out of the way: too large to fill, with no load and no self-discharge, it
// never changes mode and adds nothing for the stepper to integrate.
double one_cycle_energy_J(const Scenario& sc, double set_point_m) {
  Scenario one = sc;
  constexpr Instant kStart = 0;
  constexpr Instant kSpan = 6 * 3600;
  one.reservoir.initial_level_m = std::min(set_point_m + 1e-6, sc.reservoir.rim_m);
  one.first_flush.volume_m3 = 0.0;
  one.battery.capacity_J = 1e12;
  one.battery.initial_soc = 0.5;
  one.battery.max_charge_W = 1e12;
  one.battery.self_discharge_per_month = 0.0;
  one.battery.load_W = 0.0;
  one.battery.load_profile_W.clear();
  one.simulation.start = kStart;
  one.simulation.end = kStart + kSpan;
  one.simulation.output_interval_s = static_cast<double>(kSpan);
  RainSeries dry;
  dry.covered.push_back({kStart, kStart + kSpan});
  Observer none;
  return simulate(one, dry, none).totals.electrical_J;
}

}  // namespace

std::span<const Caution> safety_cautions() {
  static constexpr std::array<Caution, 6> kCautions{{
      {"Working at height",
       "Roofs and gutters are reached by ladders and edges that people fall from. Use sound "
       "access equipment, keep three points of contact, do not work alone, and stay off wet, icy "
       "or windy roofs."},
      {"Batteries and electrics",
       "Even a small battery can deliver enough current to start a fire or cause burns when "
       "shorted. Fuse it close to its terminal, keep wiring and electronics dry and enclosed, "
       "vent batteries that give off gas, and leave any connection to mains wiring to a licensed "
       "electrician."},
      {"Overflow and water damage",
       "Water spilling over a gutter, tank or head column, or leaving the turbine, soaks walls "
       "and can wash out or undermine foundations. Lead every overflow and the tailwater to a "
       "drain or soakaway well away from the building."},
      {"Gutter loading",
       "A litre of water weighs a kilogram: a gutter held full as a reservoir, with a siphon and "
       "pipework hung from it, carries far more than one that only drains. Check that brackets, "
       "fascia and fixings are rated for the full load, plus debris and ice."},
      {"Standing water and mosquitoes",
       "Water that stands for about a week can breed mosquitoes (7 days, common practice): a "
       "gutter or tank held as a reservoir keeps water between storms, which `run` counts under "
       "standing water. Screen every opening, keep debris out, keep children and animals away "
       "from open tanks, and make sure reservoirs can drain fully."},
      {"Codes and practitioners",
       "Local building, plumbing and electrical codes and permits govern rainwater collection, "
       "roof work and electrical installations in many places. Follow local codes, and engage "
       "licensed practitioners where the rules call for them."},
  }};
  return kCautions;
}

RecordFigures record_figures(const RainSeries& rain,
                             std::optional<double> priming_intensity_m_per_s,
                             const TimeZone& zone) {
  RecordFigures f;
  f.step_s = rain.step_s;
  std::vector<std::pair<double, double>> wet;  // intensity, duration
  double wet_s = 0.0;
  std::map<int, double> annual_max;
  // The local year of the pulse before and, in a zone of fixed offset, its bounds: a year is
  // looked up again only for a pulse outside them (a record has many pulses a year; issue 16).
  double* year_max = nullptr;
  Instant year_begin = std::numeric_limits<Instant>::max();
  Instant year_end = std::numeric_limits<Instant>::min();
  wet.reserve(rain.pulses.size());
  for (const RainPulse& pulse : rain.pulses) {
    const double dur = static_cast<double>(pulse.end - pulse.start);
    wet.emplace_back(wet_intensity(pulse), dur);
    wet_s += dur;
    if (year_max == nullptr || pulse.start < year_begin || pulse.start >= year_end) {
      const int year = to_civil(pulse.start, zone).year;
      year_max = &annual_max[year];
      if (zone.fixed()) {
        year_begin = month_start(year, 1, zone);
        year_end = month_start(year + 1, 1, zone);
      }
    }
    *year_max = std::max(*year_max, wet_intensity(pulse));
  }
  if (!wet.empty()) f.median_intensity_m_per_s = detail::weighted_median(wet);
  // The 2-year event is the median of the annual maxima (return period 1/(1 - 0.5)).
  std::vector<double> maxima;
  for (const auto& [year, m] : annual_max) maxima.push_back(m);
  std::sort(maxima.begin(), maxima.end());
  const std::size_t n = maxima.size();
  f.peak_intensity_m_per_s = n % 2 ? maxima[n / 2] : 0.5 * (maxima[n / 2 - 1] + maxima[n / 2]);
  if (priming_intensity_m_per_s) {
    double above_s = 0.0;
    double below_m = 0.0;
    double all_m = 0.0;
    for (const auto& [i, dur] : wet) {
      if (i >= *priming_intensity_m_per_s) {
        above_s += dur;
      } else {
        below_m += i * dur;
      }
      all_m += i * dur;
    }
    f.priming_exceedance = above_s / wet_s;
    f.volume_below_priming = below_m / all_m;
  }
  return f;
}

std::optional<PrimingIntervals> priming_intervals(const RainSeries& as_read,
                                                  const Disaggregation& how,
                                                  double priming_intensity_m_per_s) {
  if (how.method != DisaggregationMethod::fragments || as_read.pulses.empty()) return std::nullopt;
  const FragmentLibrary* library = library_for(how, as_read.pulses.front().start, as_read.step_s);
  if (library == nullptr) return std::nullopt;
  PrimingIntervals p;
  p.length_s = as_read.step_s;
  p.depth_m = priming_intensity_m_per_s * static_cast<double>(as_read.step_s);
  p.record = static_cast<std::size_t>(
      std::count_if(as_read.pulses.begin(), as_read.pulses.end(),
                    [&](const RainPulse& r) { return r.depth_m >= p.depth_m; }));
  p.calibration = static_cast<std::size_t>(
      std::count_if(library->intervals.begin(), library->intervals.end(),
                    [&](const Fragment& f) { return f.depth_m >= p.depth_m; }));
  return p;
}

DesignFigures evaluate_design(const Scenario& sc, const RainSeries* rain,
                              const RainSeries* as_read) {
  DesignFigures d;
  const ReservoirGeometry geometry(sc.reservoir);
  const Plant plant(plant_config(sc));
  const ReleaseConfig& rel = sc.release;
  const bool has_set_points = rel.kind == ReleaseKind::bell || rel.kind == ReleaseKind::float_valve;
  const double top_m = design_level_m(sc);
  if (rel.kind == ReleaseKind::bell) {
    d.priming_level_m = top_m;
    d.priming_intensity_m_per_s = intensity_for_flow(sc, rel.priming_flow_m3_per_s);
  }
  const double bottom_m = has_set_points ? rel.break_level_m : 0.0;
  if (has_set_points) d.storage_m3 = geometry.volume_m3(top_m) - geometry.volume_m3(bottom_m);

  // Outflow with the release running, from the release itself (a valve's or orifice's opening
  // may limit it below what the conveyance carries; no release passes nothing).
  const std::unique_ptr<Release> release = make_release(rel);
  const std::optional<GutterDelivery> delivery = gutter_delivery(sc.reservoir);
  const auto drawn_flow = [&](double level_m) {
    return running_outflow_m3_per_s(*release, level_m, plant.full_flow_m3_per_s(level_m));
  };
  const auto release_flow = [&](double level_m) {
    const double q = drawn_flow(level_m);
    return delivery ? std::min(q, delivery->max_flow_m3_per_s(geometry.volume_m3(level_m))) : q;
  };
  double ends_m = bottom_m;  // the level at which a running release ends
  if (delivery) {
    d.gutter_delivery_trigger_m3_per_s = delivery->max_flow_m3_per_s(geometry.volume_m3(top_m));
    d.gutter_delivery_brim_m3_per_s = delivery->flow_with_closed_end_at_m3_per_s(geometry.rim_m());
    if (has_set_points) {
      // It breaks on the depth at the outlet for what it draws (gutter_flow.hpp), which rises
      // with the level: the level where that depth is the break level, by bisection.
      const auto outlet_m = [&](double h) {
        return delivery->outlet_depth_m(geometry.volume_m3(h), h, drawn_flow(h));
      };
      ends_m = detail::narrow_to_onset([&](double h) { return outlet_m(h) > bottom_m; }, bottom_m,
                                       top_m, 1e-9)
                   .second;
      d.release_ends_level_m = ends_m;
      // It starts where the gutter feeds it with the drop pipe's volume drawn, as the run's
      // guard has it: at the level it starts at or, only there, higher, over the rim where
      // rain heavy enough holds the level up by overflowing (up to kStartSearch_m over it).
      const ChainSystem system(sc);
      const auto feeds = [&](double h) {
        return system.start_shortfall_m(geometry.volume_m3(h)) <= 0.0;
      };
      const double highest_m = geometry.rim_m() + kStartSearch_m;
      if (feeds(top_m)) {
        d.release_starts_level_m = top_m;
      } else if (feeds(highest_m)) {
        const double above = detail::narrow_to_onset(feeds, top_m, highest_m, 1e-9).second;
        d.release_starts_level_m = above;
        if (above > geometry.rim_m()) {
          // Q = C i A of the roof into the overflow over the rim at that level, steady.
          d.release_start_intensity_m_per_s =
              intensity_for_flow(sc, geometry.overflow_m3_per_s(above));
        }
      }
    }
  }
  d.running_flow_trigger_m3_per_s = release_flow(top_m);
  d.running_flow_break_m3_per_s = release_flow(ends_m);
  d.overflow_intensity_m_per_s = intensity_for_flow(sc, release_flow(geometry.rim_m()));

  // The head the plant holds its runner for: the column's height, or the nozzle's head with the
  // release running from the trigger (the same flow as running_flow_trigger_m3_per_s).
  d.design_head_m = plant.design_head_m();
  d.nozzle_flow_m3_per_s = plant.has_column()
                               ? plant.column_nozzle_flow_m3_per_s(plant.column_capacity_m3())
                               : d.running_flow_trigger_m3_per_s;
  const PlantPower p = plant.power(d.nozzle_flow_m3_per_s, d.design_head_m);
  d.jet_velocity_m_per_s = p.jet_velocity_m_per_s;
  d.jet_power_W = p.jet_W;
  d.electrical_power_W = p.electrical_W;
  d.runner_speed_rpm = runner_speed_for_ratio_rpm(sc.turbine.runner_diameter_m, p.speed_ratio,
                                                  p.jet_velocity_m_per_s);
  d.speed_ratio = p.speed_ratio;

  if (has_set_points && d.running_flow_break_m3_per_s > 0.0) {
    // Drain time t = integral of A(h) dh / Q(h) from break to the set-point (level-pool).
    d.cycle_drain_s = simpson(
        [&](double h) { return geometry.surface_area_m2(h) / release_flow(h); }, ends_m, top_m);
    d.energy_per_cycle_J = one_cycle_energy_J(sc, top_m);
  }
  if (plant.has_column() && d.running_flow_trigger_m3_per_s > d.nozzle_flow_m3_per_s) {
    // Fill time of the column from empty, t = integral of dV / (Q_in - Q_nozzle(V)).
    const double q_in = d.running_flow_trigger_m3_per_s;
    d.column_fill_s =
        simpson([&](double v) { return 1.0 / (q_in - plant.column_nozzle_flow_m3_per_s(v)); }, 0.0,
                plant.column_capacity_m3());
  }
  if (rain && !rain->pulses.empty()) {
    d.record = record_figures(*rain, d.priming_intensity_m_per_s, sc.site.zone);
    if (as_read && !as_read->pulses.empty()) {
      d.record_as_read = record_figures(*as_read, d.priming_intensity_m_per_s, sc.site.zone);
      if (sc.rain.disaggregate) {
        d.disaggregation = method_name(sc.rain.disaggregate->method);
        if (d.priming_intensity_m_per_s) {
          d.priming_intervals =
              priming_intervals(*as_read, *sc.rain.disaggregate, *d.priming_intensity_m_per_s);
        }
      }
    }
  }

  // Warnings in plain words.
  const UnitSystem units = sc.site.units;
  const auto mmh = [&](double i) { return shown(units, i * kMmPerHourPerMPerS, "mm_per_h"); };
  if (d.priming_intensity_m_per_s && d.record &&
      *d.priming_intensity_m_per_s > d.record->median_intensity_m_per_s) {
    d.warnings.push_back(
        "The siphon needs " + mmh(*d.priming_intensity_m_per_s) +
        " of rain to prime, more than the record's usual (median) wet intensity of " +
        mmh(d.record->median_intensity_m_per_s) +
        ": in most rain it will dribble without cycling. A lower priming flow, a "
        "larger roof or a float valve would help.");
  }
  if (d.record && d.overflow_intensity_m_per_s < d.record->peak_intensity_m_per_s) {
    d.warnings.push_back(
        "The release running full carries the runoff of " + mmh(d.overflow_intensity_m_per_s) +
        " of rain, less than the record's 2-year peak of " + mmh(d.record->peak_intensity_m_per_s) +
        " (median of the annual maxima at the record's step): the reservoir will "
        "overflow in heavy rain. Lead the overflow somewhere safe.");
  }
  // The energy is made almost entirely in the intervals deep enough to prime the siphon on their
  // own, and one calibration year holds few (README, "What the calibration year does to the
  // estimate"): fewer than kFewDeepCalibrationIntervals and the estimate moves with the
  // calibration year beyond the draws' spread.
  if (const auto& p = d.priming_intervals;
      p && p->record > 0 && p->calibration < kFewDeepCalibrationIntervals) {
    d.warnings.push_back(
        format_duration(p->length_s) + " intervals of " +
        shown(units, p->depth_m / kMetresPerMm, "mm") +
        " or more prime the siphon on their own and make most of the energy: the record has " +
        std::to_string(p->record) + ", and their patterns are drawn from only " +
        std::to_string(p->calibration) +
        " calibration intervals that deep, so the result can move by more than the draws' "
        "P10-P90 range shows (15 to 23 points between calibration years, measured; README, "
        "\"What the calibration year does to the estimate\"). Quote the range with the "
        "calibration record resampled, which `run` prints beside it; a longer calibration "
        "record, or one with more such rain, narrows it.");
  }
  const std::string feed_it =
      " A shorter run to each outlet, a larger gutter, a tank, or a drop pipe that carries less "
      "would feed it.";
  if (d.release_ends_level_m && !d.release_starts_level_m) {
    d.warnings.push_back(
        "Even " + shown(units, kStartSearch_m / kMetresPerMm, "mm") +
        " over its rim the gutter cannot deliver to its outlet what the release takes running "
        "full while its drop pipe fills (" +
        shown(units, drawn_flow(top_m) * kLitresPerMinutePerM3PerS, "L_per_min") +
        " at the level it starts at): it never starts a cycle, and all the water dribbles or "
        "overflows." +
        feed_it);
  } else if (d.release_starts_level_m && *d.release_starts_level_m > geometry.rim_m()) {
    const double heavy = *d.release_start_intensity_m_per_s;
    const std::string rarely = d.record && heavy > d.record->peak_intensity_m_per_s
                                   ? ", more than the record's 2-year peak of " +
                                         mmh(d.record->peak_intensity_m_per_s) +
                                         ", so it will rarely if ever cycle"
                                   : std::string();
    d.warnings.push_back(
        "Below its rim (" + shown(units, geometry.rim_m() / kMetresPerMm, "mm") +
        ") the gutter cannot deliver to its outlet what the release takes running full while "
        "its drop pipe fills: it starts a cycle only once the level stands at " +
        shown(units, *d.release_starts_level_m / kMetresPerMm, "mm") +
        ", which takes rain of about " + mmh(heavy) + " overflowing the rim" + rarely +
        "; otherwise the water dribbles or overflows." + feed_it);
  } else if (d.release_starts_level_m && *d.release_starts_level_m > top_m) {
    d.warnings.push_back(
        "The gutter feeds the release running full, its drop pipe filling, only once the level "
        "reaches " +
        shown(units, *d.release_starts_level_m / kMetresPerMm, "mm") +
        ", above the level it starts at (" + shown(units, top_m / kMetresPerMm, "mm") +
        "): it starts a cycle only where the rain raises the level that far, and dribbles "
        "below." +
        feed_it);
  }
  // Where the release can start at all (release_starts_level_m is set only beside
  // release_ends_level_m), what the gutter holds below where each cycle ends.
  if (d.release_starts_level_m && *d.release_ends_level_m > bottom_m + 1e-3) {
    const double held_L = (geometry.volume_m3(ends_m) - geometry.volume_m3(bottom_m)) * 1e3;
    d.warnings.push_back(
        "Below " + shown(units, ends_m / kMetresPerMm, "mm") +
        " the gutter delivers to its outlet less than the release running full takes (" +
        shown(units, drawn_flow(ends_m) * kLitresPerMinutePerM3PerS, "L_per_min") +
        "): a long level gutter cannot feed it along its length, the outlet is drawn down and "
        "the release ends there, above its break level (" +
        shown(units, bottom_m / kMetresPerMm, "mm") + "), leaving " + shown(units, held_L, "L") +
        " of each cycle in the gutter. A shorter run to each outlet, a larger gutter or a tank "
        "would feed it.");
  }
  if (!plant.has_column() && d.running_flow_trigger_m3_per_s > 0.0) {
    const double total = top_m + sc.drop_m;
    const double loss = total - d.design_head_m;
    if (loss > 0.2 * total) {
      d.warnings.push_back("The drop pipe loses " + detail::on_terminal(100.0 * loss / total) +
                           " % of the head to friction and fittings: it starves the nozzle. A "
                           "wider pipe or a smaller nozzle would deliver more.");
    }
  }
  if (plant.has_column() && d.running_flow_trigger_m3_per_s < d.nozzle_flow_m3_per_s) {
    d.warnings.push_back(
        "The drop pipe carries " +
        shown(units, d.running_flow_trigger_m3_per_s * kLitresPerMinutePerM3PerS, "L_per_min") +
        ", less than the nozzle passes at the column's top (" +
        shown(units, d.nozzle_flow_m3_per_s * kLitresPerMinutePerM3PerS, "L_per_min") +
        "): the head column never fills and the nozzle runs starved.");
  }
  if (d.column_fill_s && d.cycle_drain_s && *d.column_fill_s < *d.cycle_drain_s) {
    d.warnings.push_back(
        "A cycle releases more water than the head column can hold while the "
        "nozzle runs: the column overflows every cycle. A taller or wider column, "
        "or a larger nozzle, would keep that water.");
  }
  if (plant.conduction_speed_rpm() > 0.0 && d.speed_ratio >= 1.0) {
    d.warnings.push_back(
        "The generator reaches the battery's voltage only at " +
        detail::on_terminal(plant.conduction_speed_rpm()) +
        " rpm, faster than the jet at the design head can drive the runner: it will not charge. "
        "A generator with more volts per rpm, a smaller runner or more head would.");
  }
  if (has_set_points) {
    // A level pool loses depth at the evaporation rate whatever its section (dV = A dh), so the
    // water held up to the trigger, which stands (Ledger::follow_standing) while over
    // kStandingDepth_m deep, lasts (trigger - kStandingDepth_m) / E at rate E: the release
    // leaves the water below its break level too.
    const auto& e = sc.reservoir.evaporation_m_per_s;
    const double fastest = e.empty() ? 0.0 : *std::max_element(e.begin(), e.end());
    const double held_m = rel.trigger_level_m - kStandingDepth_m;
    const std::string where =
        rel.kind == ReleaseKind::bell ? "the standpipe lip (" : "the valve's opening level (";
    const std::string lead = "Between storms the reservoir holds water up to " + where +
                             shown(units, rel.trigger_level_m / kMetresPerMm, "mm") +
                             "), which only evaporation lowers";
    const std::string tail =
        ". Mosquitoes breed in standing water in about 7 days (common practice): screen every "
        "opening or empty it weekly.";
    if (fastest <= 0.0) {
      d.warnings.push_back(lead + ", and none is given (reservoir.evaporation_mm_per_day)" + tail);
    } else if (held_m / fastest > kMosquitoSpell_s) {
      d.warnings.push_back(lead + ": even at the highest evaporation given (" +
                           shown(units, fastest / kMetresPerMm * kSecondsPerDay, "mm_per_day") +
                           ") that takes " +
                           detail::on_terminal(held_m / fastest / kSecondsPerDay) + " days" + tail);
    }
  }
  if (sc.turbine.best_at_every_head) {
    d.warnings.push_back(
        "turbine.speed_rpm: best turns the runner at its best speed at every head, which no "
        "runner on a fixed-voltage generator does: the energy is an upper bound.");
  }
  if (sc.generator.cut_in_W > d.electrical_power_W) {
    d.warnings.push_back(
        "The generator's cut-in power (" + detail::on_terminal(sc.generator.cut_in_W) +
        " W) is above the design power (" + detail::on_terminal(d.electrical_power_W) +
        " W): it will deliver little or nothing.");
  }
  return d;
}

void write_design(std::ostream& out, const Scenario& sc, const DesignFigures& d) {
  const auto line = [&](const std::string& label, const std::string& value,
                        const std::string& unit) {
    char buf[160];
    std::snprintf(buf, sizeof buf, "  %-52s %12s  %s\n", label.c_str(), value.c_str(),
                  unit.c_str());
    out << buf;
  };
  // A figure given in SI (`si_unit` as in column names), in the scenario's units.
  const auto figure = [&](const std::string& label, double in_si, std::string_view si_unit) {
    const InUnits v = in_units(sc.site.units, in_si, si_unit);
    line(label, detail::on_terminal(v.value), unit_label(v.unit));
  };
  const auto lpm = [&](const std::string& label, double q) {
    figure(label, q * kLitresPerMinutePerM3PerS, "L_per_min");
  };
  const auto mmh = [&](const std::string& label, double i) {
    figure(label, i * kMmPerHourPerMPerS, "mm_per_h");
  };
  out << "Design figures for " << sc.site.name << " (" << sc.file.filename().string() << ")\n";
  if (d.storage_m3) figure("storage between the set-points", *d.storage_m3 * 1e3, "L");
  if (d.priming_level_m)
    figure("priming level (lip + head on the standpipe)", *d.priming_level_m * 1e3, "mm");
  if (d.priming_intensity_m_per_s) {
    mmh("priming flow as steady rain on this roof", *d.priming_intensity_m_per_s);
  }
  lpm("running flow at the set-point", d.running_flow_trigger_m3_per_s);
  lpm("running flow where the release ends", d.running_flow_break_m3_per_s);
  if (d.gutter_delivery_trigger_m3_per_s) {
    lpm("gutter delivery to the outlet at the set-point", *d.gutter_delivery_trigger_m3_per_s);
  }
  if (d.gutter_delivery_brim_m3_per_s) {
    lpm("gutter delivery brim-full", *d.gutter_delivery_brim_m3_per_s);
  }
  if (d.release_ends_level_m) {
    figure("level at which the running release ends", *d.release_ends_level_m * 1e3, "mm");
  }
  if (d.release_starts_level_m && *d.release_starts_level_m > design_level_m(sc)) {
    figure("level at which the gutter lets the release start", *d.release_starts_level_m * 1e3,
           "mm");
  }
  if (d.cycle_drain_s)
    line("running time per cycle (no inflow)", detail::on_terminal(*d.cycle_drain_s), "s");
  if (d.column_fill_s)
    line("head column brim-full after", detail::on_terminal(*d.column_fill_s), "s");
  figure(sc.head_column ? "design head (head column brim-full)" : "design head at the nozzle",
         d.design_head_m, "m");
  lpm("nozzle flow at design head", d.nozzle_flow_m3_per_s);
  figure("jet velocity", d.jet_velocity_m_per_s, "m_per_s");
  line("jet power", detail::on_terminal(d.jet_power_W), "W");
  line(sc.turbine.best_at_every_head ? "runner speed at design head (best at every head)"
                                     : "runner speed at design head",
       detail::on_terminal(d.runner_speed_rpm), "rpm");
  line("  speed ratio (bucket / jet speed)", detail::on_terminal(d.speed_ratio), "");
  line("electrical power at design head", detail::on_terminal(d.electrical_power_W), "W");
  mmh("rain that overflows the rim while the release runs", d.overflow_intensity_m_per_s);
  if (d.energy_per_cycle_J)
    line("energy per cycle", detail::on_terminal(*d.energy_per_cycle_J / kJoulesPerWh), "Wh");
  const auto record = [&](const std::string& name, const RecordFigures& r) {
    out << "  " << name << ", " << format_duration(r.step_s) << " steps\n";
    mmh("  median wet intensity", r.median_intensity_m_per_s);
    if (r.volume_below_priming) {
      line("  rain volume below the priming intensity",
           detail::on_terminal(*r.volume_below_priming * 100.0), "%");
    }
    if (r.priming_exceedance) {
      line("  wet time at or above the priming intensity",
           detail::on_terminal(*r.priming_exceedance * 100.0), "%");
    }
    mmh("  2-year peak intensity (median annual max)", r.peak_intensity_m_per_s);
  };
  if (d.record_as_read) {
    record("record as read", *d.record_as_read);
    record("record disaggregated by " + d.disaggregation, *d.record);
    if (const auto& p = d.priming_intervals) {
      const InUnits depth = in_units(sc.site.units, p->depth_m / kMetresPerMm, "mm");
      out << "  " << format_duration(p->length_s)
          << " intervals deep enough to prime on their own (" << detail::on_terminal(depth.value)
          << ' ' << unit_label(depth.unit) << " or more)\n";
      line("  in the record as read", std::to_string(p->record), "");
      line("  in the calibration record", std::to_string(p->calibration), "");
    }
  } else if (d.record) {
    record("record", *d.record);
  }
  if (!d.warnings.empty()) {
    out << "\nWarnings\n";
    for (const std::string& w : d.warnings) out << "  - " << w << '\n';
  }
  if (sc.release.kind == ReleaseKind::bell && sc.release.priming_flow_measured_by.empty()) {
    out << "\nBench test\n" << kBenchTestNote << '\n';
  }
  out << "\nCautions\n" << kCautionsPreface << '\n';
  for (const Caution& c : safety_cautions()) out << "  - " << c.title << ": " << c.text << '\n';
}

}  // namespace gutterwatt
