#pragma once
/// The release: what lets water out of the reservoir into the drop pipe. Each kind is a small
/// state machine over the reservoir level; the simulation locates its switches as events.

#include <memory>
#include <string>
#include <string_view>

namespace gutterwatt {

enum class ReleaseKind { bell, float_valve, orifice, none };

struct ReleaseConfig {
  ReleaseKind kind = ReleaseKind::bell;
  double trigger_level_m = 0.0;  ///< bell: standpipe lip; float_valve: opening level
  double break_level_m = 0.0;    ///< bell: bell rim; float_valve: closing level
  double standpipe_diameter_m = 0.0;
  double priming_flow_m3_per_s = 0.0;
  std::string priming_flow_measured_by;  ///< bell: the log or test it comes from; empty: a guess
  double lip_coefficient = 1.77;         ///< weir C over the standpipe lip, m^0.5/s
  double mouth_coefficient = 0.61;       ///< orifice Cd of the standpipe mouth once drowned
  double orifice_diameter_m = 0.0;       ///< float_valve and orifice
  double orifice_coefficient = 0.61;
};

enum class ReleaseState { idle, dribble, running, closed, open };

/// The name written to outputs: `idle`, `dribble`, `running`, `closed`, `open`.
std::string_view release_state_name(ReleaseState state);

/// A way out of the current state: the switch happens when `value` falls below zero.
struct Guard {
  double value;
  ReleaseState next;
};

/// Head over a lip or rim below which no water passes: surface tension holds it. Flow over a weir
/// decays towards its crest without ever reaching it, so some such threshold is needed for
/// a dribble or an overflow to end; at 0.01 mm the flow it cuts off is below 1e-8 m3/s per metre.
inline constexpr double kHoldHead_m = 1e-5;

class Release {
 public:
  static constexpr int kMaxGuards = 2;
  virtual ~Release() = default;

  /// State at the start of a run with the reservoir at `level_m`.
  virtual ReleaseState initial_state(double level_m) const = 0;
  /// Outflow into the drop pipe in `state` at `level_m`; `full_flow_m3_per_s` is what the
  /// conveyance carries running full at that level. It is the release's own law capped at the
  /// full flow (or the full flow itself): called with infinity, a result at or below the full flow
  /// is the result with it.
  virtual double outflow_m3_per_s(ReleaseState state, double level_m,
                                  double full_flow_m3_per_s) const = 0;
  /// Writes the guards active in `state` into `out` and returns how many (0..kMaxGuards).
  virtual int guards(ReleaseState state, double level_m, Guard* out) const = 0;
  /// True when outflow in `state` is a deliberate release rather than dribble.
  virtual bool is_running(ReleaseState state) const = 0;
  /// The level below which `state` passes no water and does not change by itself; negative when
  /// `state` always passes water. A dry reservoir that cannot rise above it is at rest.
  virtual double rest_ceiling_m(ReleaseState state) const = 0;
};

/// Outflow through an open orifice in the reservoir floor into the drop pipe: orifice flow at
/// `level_m` (Q = Cd a sqrt(2 g h)), limited by what the conveyance carries running full.
double floor_orifice_flow_m3_per_s(double coefficient, double area_m2, double level_m,
                                   double full_flow_m3_per_s);

/// Outflow of `release` in whichever state it runs in (`running` for a siphon, `open` for a
/// valve or orifice) at `level_m`, given what the conveyance carries running full there; pass
/// infinity for the release's own limit alone.
double running_outflow_m3_per_s(const Release& release, double level_m, double full_flow_m3_per_s);

/// The release of the kind the configuration names.
std::unique_ptr<Release> make_release(const ReleaseConfig& config);

}  // namespace gutterwatt
