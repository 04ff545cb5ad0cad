#pragma once
/// The siphon as built: the model fitted to a bench log of hose tests (read by fit_logs). The
/// priming flow comes from the bracket between the largest inflow that only dribbled and the
/// smallest that primed; the running loss (drop_pipe.minor_loss_k) and the nozzle's discharge
/// coefficient come from least squares (Levenberg-Marquardt) over the timed rows, each prediction a
/// simulated bench run of the same scenario.

#include <initializer_list>
#include <istream>
#include <optional>
#include <ostream>
#include <string>
#include <string_view>
#include <vector>

#include "gutterwatt/fit_logs.hpp"
#include "gutterwatt/scenario.hpp"

namespace gutterwatt {

/// What one simulated bench run gives at one inflow: the first cycle from a break (nullopt
/// where the model does not prime, or does not break within the time allowed).
struct BenchPrediction {
  std::optional<double> time_to_prime_s;
  std::optional<double> drain_time_s;
  std::optional<double> nozzle_flow_m3_per_s;  ///< volume of the cycle over its drain time
};

/// Simulates the bench: `scenario`'s reservoir, release and conveyance fed a steady
/// `inflow_m3_per_s` straight into the reservoir (no roof, no first flush), starting idle with
/// the level at the bell rim, until the first cycle ends or `limit_s` has passed.
BenchPrediction simulate_bench(const Scenario& scenario, double inflow_m3_per_s, double limit_s);

/// A fitted (or kept) scenario value.
struct FittedValue {
  std::string key;  ///< e.g. `drop_pipe.minor_loss_k`
  double before = 0.0;
  double value = 0.0;           ///< the fitted value, or `before` where not fitted
  std::optional<double> sigma;  ///< one standard uncertainty, where it could be had
  bool fitted = false;
};

/// One measured quantity of one row against the model.
struct BenchResidual {
  int line = 0;
  std::string quantity;  ///< the log's column: time_to_prime_s, drain_time_s, ...
  double measured = 0.0;
  double model = 0.0;
  double relative() const { return (model - measured) / measured; }
};

struct BenchFit {
  std::optional<double> dribbled_max_m3_per_s;  ///< largest inflow that only dribbled
  std::optional<double> primed_min_m3_per_s;    ///< smallest inflow that primed
  FittedValue priming_flow;                     ///< release.priming_flow_L_per_min, in m3/s
  FittedValue minor_loss_k;                     ///< drop_pipe.minor_loss_k
  FittedValue discharge_coefficient;            ///< nozzle.discharge_coefficient
  std::vector<BenchResidual> residuals;         ///< at the fitted values
  double rms_relative = 0.0;                    ///< root mean square of the relative residuals
  int iterations = 0;
  std::vector<std::string> warnings;  ///< where the log cannot determine a value, and why
};

/// Fits `scenario` (a bell siphon) to `rows`. The priming flow is the bracket's midpoint. The
/// loss and the discharge coefficient minimise the sum of squared relative residuals
/// (model - measured) / measured over every time and nozzle flow in the log, by
/// Levenberg-Marquardt with a forward-difference Jacobian; their uncertainty is the square root
/// of the diagonal of s^2 (J^T J)^-1, s^2 = the sum of squares over (measurements - values
/// fitted). A value the log cannot determine (no dribbled row, no timed row, a loss and a nozzle
/// the times cannot tell apart) is left as it was, with a warning. Throws InputError naming
/// `log_label` when the scenario's release is not a bell siphon or the log has no rows.
BenchFit fit_bench(const Scenario& scenario, const std::vector<BenchRow>& rows,
                   const std::string& log_label);

/// `scenario` with the fitted values in place.
Scenario apply_fit(Scenario scenario, const BenchFit& fit);

/// Prints the fit for a person: the bracket, every value with its uncertainty (or why it was
/// kept), each measurement against the model, the warnings, and a build entry to paste into
/// `release.builds`.
void write_bench_fit(std::ostream& out, const BenchFit& fit);

/// Prints one value for a person, in the unit a person reads (L/min for the priming flow):
/// `  key: value +- sigma (was before)`, or `  key: value (kept: see the warnings)`.
void write_fitted_value(std::ostream& out, const FittedValue& v);

/// One value of a build entry: its key in `release.builds` and the value fitted for it.
struct BuildValue {
  std::string_view build_key;
  const FittedValue& value;
};

/// Prints how a fit's printout ends: its warnings (when there are any), then a build entry with
/// `values` to paste into `release.builds`: `  - {name: NAME, key: value, ...}`.
void write_warnings_and_build(std::ostream& out, const std::vector<std::string>& warnings,
                              std::initializer_list<BuildValue> values);

/// The text written into a scenario for a fitted value: four significant digits, in the key's
/// unit.
std::string fitted_value_text(const FittedValue& v);

/// `scenario_text` with the fitted ones of `values` written in place of the old ones (everything
/// else as written) and a first comment line naming the log (`log_name` says what kind of log);
/// a fitted priming flow also sets `release.priming_flow_measured_by` to the log's name.
std::string fitted_scenario_text(std::string_view scenario_text,
                                 const std::vector<FittedValue>& values,
                                 const std::string& log_name, const std::string& log_label,
                                 const std::string& scenario_label);

/// The same for a bench fit.
std::string fitted_scenario_text(std::string_view scenario_text, const BenchFit& fit,
                                 const std::string& log_label, const std::string& scenario_label);

}  // namespace gutterwatt
