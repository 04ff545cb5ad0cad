#pragma once
/// Design-storm hyetographs: NRCS 24-hour distributions, Chicago storms and alternating blocks
/// from an IDF curve, and a constant block. A pure library; the only output is a CSV writer that
/// takes a stream.

#include <cstdint>
#include <functional>
#include <optional>
#include <ostream>
#include <string_view>
#include <vector>

#include "gutterwatt/calendar.hpp"

namespace gutterwatt {

enum class StormKind { nrcs_i, nrcs_ia, nrcs_ii, nrcs_iii, chicago, idf_block, block };

/// An intensity-duration-frequency curve i = a / (t + b)^c, with i in mm/h and t, b in minutes
/// (the units such curves are published in). Valid: a > 0, b >= 0 (b > 0 for a Chicago storm,
/// whose peak intensity is a / b^c), 0 <= c <= 1 (so that depth grows with duration).
struct IdfCurve {
  double a;
  double b_min;
  double c;
};

/// What storm to build.
///
/// Total depth: `depth_m` when it is > 0; when it is 0 ("not given"), the IDF depth for the
/// whole duration, which needs `idf`. Chicago and idf-block storms always take their shape from
/// `idf`; when `depth_m` is also given, that shape is scaled to `depth_m` (so the peak no longer
/// matches the IDF curve). An NRCS or block storm uses `idf` only for its depth.
///
/// `duration_s` must be a whole number of steps, `step_s` a whole number of seconds; an NRCS
/// storm must last exactly 24 h. `peak_position` (0..1) is the Chicago advancement ratio r and
/// the place of the largest alternating block; the other kinds ignore it.
struct StormSpec {
  StormKind kind = StormKind::block;
  double depth_m = 0.0;
  double duration_s = 0.0;
  double step_s = 0.0;
  Instant start = 0;  ///< start of the first step
  std::optional<IdfCurve> idf;
  double peak_position = 0.5;
};

/// The storm as one depth per step (metres on the plan area), in time order. The depths sum,
/// added left to right in double, to the storm's total depth exactly: the last step absorbs the
/// rounding. Throws InputError (file empty, line 0, field the command-line option: `--kind`,
/// `--depth`, `--duration`, `--step`, `--idf`, `--peak`) for a spec it cannot build.
std::vector<double> storm_depths_m(const StormSpec& spec);

/// The total depth `storm_depths_m` will produce, after the same checks.
double storm_total_depth_m(const StormSpec& spec);

/// Writes a period-ending rain record row by row: header `time,rain_mm`, then each row stamped
/// with the end of its interval (format_iso8601 at `utc_offset_s`) and its depth in mm to
/// 1e-6 mm, rounded on the running total so that the rows add up to the rounded total.
class RainCsvWriter {
 public:
  RainCsvWriter(std::ostream& out, int utc_offset_s);
  void row(Instant end, double depth_m);

 private:
  std::ostream& out_;
  int utc_offset_s_;
  double total_m_ = 0.0;
  std::int64_t printed_units_ = 0;  ///< of 1e-6 mm
};

/// Writes the storm as a rain record: header `time,rain_mm`, one row per step stamped with the
/// end of its step (format_iso8601 at `utc_offset_s`), depth in mm to 1e-6 mm. Values are
/// rounded on the running total, so the printed depths add up to the rounded total depth.
void write_storm_csv(std::ostream& out, const StormSpec& spec, int utc_offset_s);

/// Parses `nrcs-I`, `nrcs-IA`, `nrcs-II`, `nrcs-III`, `chicago`, `idf-block`, `block` (any
/// letter case). Throws InputError("", 0, "--kind", ...) listing the valid names otherwise.
StormKind parse_storm_kind(std::string_view text);

/// The name `parse_storm_kind` accepts for `kind`, e.g. `nrcs-II`.
std::string_view storm_kind_name(StormKind kind);

/// IDF intensity for a storm of `duration_s` (> 0), m/s.
double idf_intensity_m_per_s(const IdfCurve& idf, double duration_s);

/// IDF depth for a storm of `duration_s` (> 0): intensity times duration, metres.
double idf_depth_m(const IdfCurve& idf, double duration_s);

/// NRCS (TR-55) cumulative fraction P(t)/P24 of a 24-hour storm of an NRCS kind, `t_s` seconds
/// after its start; 0 before the start, 1 after the end. Monotone in t.
double nrcs_cumulative_fraction(StormKind kind, double t_s);

/// Chicago storm intensity, m/s, `t_s` seconds after the start of a storm of `duration_s` with
/// advancement ratio `peak_position`; the peak, at t = r T, is a / b^c.
double chicago_intensity_m_per_s(const IdfCurve& idf, double peak_position, double duration_s,
                                 double t_s);

/// Chicago storm depth fallen from the start to `t_s` (0..duration_s), metres. At the end it is
/// the IDF depth for the duration.
double chicago_cumulative_depth_m(const IdfCurve& idf, double peak_position, double duration_s,
                                  double t_s);

/// Alternating-block hyetograph of `blocks` steps of `step_s` from a depth-duration function
/// (metres for a duration in seconds, non-decreasing): the increments D(k dt) - D((k-1) dt),
/// the largest at block ceil(peak_position * blocks) (1-based), the next ones alternately to its
/// right and left, carried on along one side when the other is full. While both sides have room,
/// the central k blocks hold D(k dt). Not scaled and not renormalised.
std::vector<double> alternating_block_depths_m(const std::function<double(double)>& depth_m,
                                               int blocks, double step_s, double peak_position);

}  // namespace gutterwatt
