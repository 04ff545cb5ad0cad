#pragma once
/// Shared helpers of the tests: a scenario built in code, rain series built in code and an
/// observer that keeps every record. The system below is invented for the tests.

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <stdexcept>
#include <string>
#include <vector>

#include "gutterwatt/calendar.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/rain_input.hpp"
#include "gutterwatt/scenario.hpp"
#include "gutterwatt/simulation.hpp"

namespace gutterwatt::test_support {

/// A file of the pinned public data that tools/setup fetches with `npm pack` into the build
/// folder (never committed), e.g. "vega-datasets-3.2.1/data/seattle-weather.csv". Throws, naming
/// the command that fetches it, when it is not there.
inline std::filesystem::path public_data_file(const std::string& relative) {
  const std::filesystem::path path = std::filesystem::path(GUTTERWATT_PUBLIC_DATA_DIR) / relative;
  if (!std::filesystem::exists(path))
    throw std::runtime_error(path.string() + " is missing: run tools/setup (it fetches the " +
                             "pinned public data with npm pack)");
  return path;
}

/// The required keys of an invented system from the roof to the turbine (those of
/// tests/data/scenario/minimal.yaml), for tests that write the rest of a scenario: site, rain
/// and battery.
inline constexpr const char* kMinimalSystemYaml =
    "roof: {area_m2: 12}\n"
    "reservoir: {width_mm: 100, length_m: 4, rim_mm: 50}\n"
    "release: {trigger_level_mm: 40, break_level_mm: 5, standpipe_diameter_mm: 15,\n"
    "          priming_flow_L_per_min: 2}\n"
    "drop_pipe: {diameter_mm: 15, length_m: 3, drop_m: 2.5}\n"
    "nozzle: {diameter_mm: 4}\n"
    "turbine: {runner_diameter_mm: 60}\n";

/// 2025-03-01T00:00Z, the start of every test run.
inline constexpr Instant kStart = 1740787200;

inline constexpr double kLitre_m3 = 1e-3;
inline constexpr double kPerMinute = 1.0 / 60.0;

/// An invented bell-siphon system on a level pool (a tank of the plan area of a gutter 0.1 m wide
/// and 8 m long, 0.8 m2, spilling over 8 m of rim) with the roof as plain as it gets: roof
/// lag 0, no initial loss, runoff coefficient 1, no first flush, generator cut-in 0, no load.
/// Inflow to the reservoir is therefore rain intensity times roof area. The run covers
/// [kStart, kStart + duration_s) with a sample every `output_interval_s`.
inline Scenario make_scenario(double duration_s = 6.0 * 3600.0, double output_interval_s = 60.0) {
  Scenario s;
  s.file = "test.yaml";
  s.site.name = "test site";
  s.site.temperature_C = 15.0;
  s.roof.area_m2 = 40.0;
  s.roof.runoff_coefficient = 1.0;
  s.roof.initial_loss_m = 0.0;
  s.roof.drying_m_per_s = 3e-3 / 86400.0;
  s.roof.lag_s = 0.0;
  s.first_flush.volume_m3 = 0.0;
  s.reservoir.shape = ReservoirShape::tank;
  s.reservoir.tank_area_m2 = 0.1 * 8.0;
  s.reservoir.rim_m = 0.062;
  s.reservoir.overflow_coefficient = 1.7;
  s.reservoir.overflow_length_m = 8.0;
  s.reservoir.initial_level_m = 0.0;
  s.release.kind = ReleaseKind::bell;
  s.release.trigger_level_m = 0.050;
  s.release.break_level_m = 0.008;
  s.release.standpipe_diameter_m = 0.019;
  s.release.priming_flow_m3_per_s = 3.0 * kLitre_m3 * kPerMinute;
  s.release.lip_coefficient = 1.77;
  s.release.orifice_diameter_m = 0.010;
  s.release.orifice_coefficient = 0.61;
  s.drop_pipe = Pipe{0.019, 4.5, 0.0015e-3, 2.0};
  s.drop_m = 4.0;
  s.nozzle = Nozzle{0.005, 0.95, 0.97};
  s.turbine.runner_diameter_m = 0.070;
  s.turbine.peak_efficiency = 0.7;
  s.generator.efficiency = 0.65;
  s.generator.cut_in_W = 0.0;
  s.battery.capacity_J = 60.0 * 3600.0;
  s.battery.initial_soc = 0.5;
  s.battery.charge_efficiency = 0.9;
  s.battery.max_charge_W = 30.0;
  s.battery.load_W = 0.0;
  s.simulation.start = kStart;
  s.simulation.end = kStart + static_cast<Instant>(std::llround(duration_s));
  s.simulation.output_interval_s = output_interval_s;
  s.simulation.rtol = 1e-6;
  return s;
}

/// Rain of constant intensity over [start, end).
struct RainBlock {
  Instant start;
  Instant end;
  double intensity_m_per_s;
};

/// A record covering [start, end) with rain in `blocks` (sorted, not overlapping), in pulses of
/// `step_s` like a reader makes them (the last pulse of a block may be shorter), dry elsewhere.
inline RainSeries block_rain(Instant start, Instant end, const std::vector<RainBlock>& blocks,
                             Instant step_s = 300) {
  RainSeries rain;
  rain.covered.push_back({start, end});
  rain.step_s = step_s;
  for (const RainBlock& b : blocks) {
    if (!(b.intensity_m_per_s > 0.0)) continue;
    for (Instant t = b.start; t < b.end; t += step_s) {
      const Instant t1 = std::min(b.end, t + step_s);
      rain.pulses.push_back({t, t1, b.intensity_m_per_s * static_cast<double>(t1 - t)});
      rain.total_depth_m += rain.pulses.back().depth_m;
    }
  }
  return rain;
}

/// A record covering [start, end) with rain of constant `intensity_m_per_s` throughout.
inline RainSeries constant_rain(Instant start, Instant end, double intensity_m_per_s,
                                Instant step_s = 300) {
  return block_rain(start, end, {{start, end, intensity_m_per_s}}, step_s);
}

/// A record of the scenario's whole run with the constant intensity that brings `inflow` to the
/// reservoir of `scenario` (runoff coefficient 1, no losses).
inline RainSeries constant_inflow(const Scenario& scenario, double inflow_m3_per_s) {
  return constant_rain(*scenario.simulation.start, *scenario.simulation.end,
                       inflow_m3_per_s / scenario.roof.area_m2);
}

/// Keeps every record of a run; the fine trace too when `record_trace` is set.
class RecordingObserver : public Observer {
 public:
  void on_start(const Sample& s) override { start = s; }
  void on_sample(const Sample& s) override { samples.push_back(s); }
  void on_episode(const Episode& e) override { episodes.push_back(e); }
  bool wants_trace() const override { return record_trace; }
  void on_trace(const TracePoint& p) override { trace.push_back(p); }

  /// The times traced twice in a row: each mode switch (traced in the mode before it and in the
  /// mode after), but also a point of the grid where the chain then comes to rest. A test that
  /// takes these for the switches checks their count against the run's (SolverStats::switches).
  std::vector<double> switch_times() const {
    std::vector<double> out;
    for (std::size_t k = 1; k < trace.size(); ++k) {
      if (trace[k].time_s == trace[k - 1].time_s) out.push_back(trace[k].time_s);
    }
    return out;
  }

  /// The episodes of one kind, in order.
  std::vector<Episode> of_kind(EpisodeKind kind) const {
    std::vector<Episode> out;
    for (const Episode& e : episodes) {
      if (e.kind == kind) out.push_back(e);
    }
    return out;
  }

  /// The sample at `time`, or nullptr when there is none.
  const Sample* at(Instant time) const {
    for (const Sample& s : samples) {
      if (s.time == time) return &s;
    }
    return nullptr;
  }

  bool record_trace = false;
  Sample start;
  std::vector<Sample> samples;
  std::vector<Episode> episodes;
  std::vector<TracePoint> trace;
};

/// The whole message of the InputError that `f()` throws, or "no error".
template <class F>
std::string input_error_of(F f) {
  try {
    f();
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

/// Composite Simpson rule of `f` over [a, b] with `n` (made even) intervals.
template <class F>
double simpson(F f, double a, double b, int n) {
  if (n % 2 != 0) ++n;
  const double h = (b - a) / n;
  double sum = f(a) + f(b);
  for (int k = 1; k < n; ++k) sum += (k % 2 != 0 ? 4.0 : 2.0) * f(a + k * h);
  return sum * h / 3.0;
}

}  // namespace gutterwatt::test_support
