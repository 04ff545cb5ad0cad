#include "gutterwatt/bench_fit.hpp"

#include <Eigen/Dense>
#include <algorithm>
#include <atomic>
#include <cmath>
#include <map>
#include <string_view>

#include "detail.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/scenario_edit.hpp"
#include "gutterwatt/simulation.hpp"
#include "gutterwatt/units.hpp"
#include "report_format.hpp"

namespace gutterwatt {
namespace {

using detail::litres_per_minute;

/// Keeps the first siphon cycle and asks the run to stop once it has ended.
class FirstCycle : public Observer {
 public:
  explicit FirstCycle(std::atomic<bool>& stop) : stop_(stop) {}
  void on_episode(const Episode& e) override {
    if (e.kind != EpisodeKind::cycle || cycle) return;
    cycle = e;
    stop_.store(true);
  }
  std::optional<Episode> cycle;

 private:
  std::atomic<bool>& stop_;
};

}  // namespace

BenchPrediction simulate_bench(const Scenario& scenario, double inflow_m3_per_s, double limit_s) {
  // The hose fills the reservoir directly: a roof of 1 m2 that passes all its rain at once, with
  // no first flush, so the reservoir's inflow is the rain intensity times 1 m2.
  Scenario bench = scenario;
  bench.roof.area_m2 = 1.0;
  bench.roof.runoff_coefficient = 1.0;
  bench.roof.initial_loss_m = 0.0;
  bench.roof.lag_s = 0.0;
  bench.first_flush.volume_m3 = 0.0;
  bench.reservoir.initial_level_m = scenario.release.break_level_m;
  bench.battery.load_W = 0.0;
  bench.battery.load_profile_W.clear();
  bench.simulation.rtol = std::min(scenario.simulation.rtol, 1e-8);
  const Instant end = static_cast<Instant>(std::ceil(limit_s));
  bench.simulation.start = 0;
  bench.simulation.end = end;
  bench.simulation.output_interval_s = static_cast<double>(end);
  RainSeries hose;
  hose.covered.push_back({0, end});
  hose.step_s = end;
  hose.pulses.push_back({0, end, inflow_m3_per_s * static_cast<double>(end)});
  hose.total_depth_m = hose.pulses.back().depth_m;

  std::atomic<bool> stop{false};
  FirstCycle first(stop);
  RunOptions options;
  options.stop = &stop;
  try {
    simulate(bench, hose, first, options);
  } catch (const Interrupted&) {
    // The first cycle has ended: the rest of the run is not needed.
  }
  BenchPrediction p;
  if (first.cycle) {
    const Episode& c = *first.cycle;
    p.time_to_prime_s = c.start_s;
    p.drain_time_s = c.end_s - c.start_s;
    if (*p.drain_time_s > 0.0) p.nozzle_flow_m3_per_s = c.volume_m3 / *p.drain_time_s;
  }
  return p;
}

namespace {

/// One measurement of the log: a row's inflow and one of its timed quantities.
struct Measurement {
  const BenchRow* row;
  std::string quantity;
  double value;
};

std::vector<Measurement> measurements(const std::vector<BenchRow>& rows) {
  std::vector<Measurement> out;
  for (const BenchRow& row : rows) {
    if (row.time_to_prime_s) out.push_back({&row, "time_to_prime_s", *row.time_to_prime_s});
    if (row.drain_time_s) out.push_back({&row, "drain_time_s", *row.drain_time_s});
    if (row.cycle_period_s) out.push_back({&row, "cycle_period_s", *row.cycle_period_s});
    if (row.nozzle_flow_m3_per_s) {
      out.push_back({&row, "nozzle_flow_L_per_min", *row.nozzle_flow_m3_per_s});
    }
  }
  return out;
}

/// The model's value of a measured quantity, or nullopt.
std::optional<double> predicted(const BenchPrediction& p, const std::string& quantity) {
  if (quantity == "time_to_prime_s") return p.time_to_prime_s;
  if (quantity == "drain_time_s") return p.drain_time_s;
  if (quantity == "cycle_period_s" && p.time_to_prime_s && p.drain_time_s) {
    return *p.time_to_prime_s + *p.drain_time_s;
  }
  if (quantity == "nozzle_flow_L_per_min") return p.nozzle_flow_m3_per_s;
  return std::nullopt;
}

/// Longest bench run simulated for a row: five times its longest measured time, at least 2 h.
double limit_for(const BenchRow& row) {
  double longest = 0.0;
  for (const auto& t : {row.time_to_prime_s, row.drain_time_s, row.cycle_period_s}) {
    if (t) longest = std::max(longest, *t);
  }
  return std::max(2.0 * kSecondsPerHour, 5.0 * longest);
}

/// The fitted parameters in a fixed order.
enum Parameter { kLoss = 0, kDischarge = 1 };

const char* parameter_key(int p) {
  return p == kLoss ? "drop_pipe.minor_loss_k" : "nozzle.discharge_coefficient";
}

/// Evaluates the model for a choice of parameter values: one bench run per row, the relative
/// residual of every measurement; nullopt when the model misses a measured quantity.
class BenchModel {
 public:
  BenchModel(Scenario base, const std::vector<Measurement>& data)
      : base_(std::move(base)), data_(data) {}

  Scenario with(const Eigen::VectorXd& theta, const std::vector<int>& params) const {
    Scenario s = base_;
    for (std::size_t j = 0; j < params.size(); ++j) {
      if (params[j] == kLoss) s.drop_pipe.minor_loss_k = theta[static_cast<Eigen::Index>(j)];
      if (params[j] == kDischarge)
        s.nozzle.discharge_coefficient = theta[static_cast<Eigen::Index>(j)];
    }
    return s;
  }

  /// Model values, one per measurement (NaN where the model has none).
  std::vector<double> values(const Scenario& s) const {
    std::map<const BenchRow*, BenchPrediction> runs;
    std::vector<double> out;
    for (const Measurement& m : data_) {
      auto it = runs.find(m.row);
      if (it == runs.end()) {
        it =
            runs.emplace(m.row, simulate_bench(s, m.row->inflow_m3_per_s, limit_for(*m.row))).first;
      }
      const auto v = predicted(it->second, m.quantity);
      out.push_back(v ? *v : std::nan(""));
    }
    return out;
  }

  std::optional<Eigen::VectorXd> residuals(const Eigen::VectorXd& theta,
                                           const std::vector<int>& params) const {
    const std::vector<double> v = values(with(theta, params));
    Eigen::VectorXd r(static_cast<Eigen::Index>(v.size()));
    for (std::size_t i = 0; i < v.size(); ++i) {
      if (std::isnan(v[i])) return std::nullopt;
      r[static_cast<Eigen::Index>(i)] = (v[i] - data_[i].value) / data_[i].value;
    }
    return r;
  }

 private:
  Scenario base_;
  const std::vector<Measurement>& data_;
};

/// The bounds of each parameter: K >= 0; 0 < Cd <= Cv.
double clamp_parameter(int p, double x, const Scenario& s) {
  if (p == kLoss) return std::max(0.0, x);
  return std::clamp(x, 1e-3, s.nozzle.velocity_coefficient);
}

/// Forward-difference Jacobian of the residuals; a step that would leave the bounds is taken
/// backwards instead. nullopt when a stepped model misses a quantity.
std::optional<Eigen::MatrixXd> jacobian(const BenchModel& model, const Eigen::VectorXd& theta,
                                        const Eigen::VectorXd& r, const std::vector<int>& params,
                                        const Scenario& s) {
  Eigen::MatrixXd J(r.size(), theta.size());
  for (Eigen::Index j = 0; j < theta.size(); ++j) {
    const int p = params[static_cast<std::size_t>(j)];
    double h = 1e-4 * std::max(std::abs(theta[j]), 0.1);
    if (clamp_parameter(p, theta[j] + h, s) != theta[j] + h) h = -h;
    Eigen::VectorXd stepped = theta;
    stepped[j] += h;
    const auto rj = model.residuals(stepped, params);
    if (!rj) return std::nullopt;
    J.col(j) = (*rj - r) / h;
  }
  return J;
}

/// The priming flow from the bracket; a warning and the value as it was where there is none.
void fit_priming(const std::vector<BenchRow>& rows, BenchFit& fit) {
  for (const BenchRow& row : rows) {
    auto& bound = row.primed ? fit.primed_min_m3_per_s : fit.dribbled_max_m3_per_s;
    const double q = row.inflow_m3_per_s;
    if (!bound || (row.primed ? q < *bound : q > *bound)) bound = q;
  }
  const std::string kept =
      "; release.priming_flow_L_per_min left at " + litres_per_minute(fit.priming_flow.before);
  const auto& lo = fit.dribbled_max_m3_per_s;
  const auto& hi = fit.primed_min_m3_per_s;
  if (!lo) {
    fit.warnings.push_back(
        "every test primed: the priming flow is below the smallest inflow tried, " +
        litres_per_minute(*hi) + ", but the log does not say how far" + kept +
        " (add tests at smaller inflows until one only dribbles)");
    return;
  }
  if (!hi) {
    fit.warnings.push_back("no test primed: the priming flow is above the largest inflow tried, " +
                           litres_per_minute(*lo) + kept +
                           " (add tests at larger inflows until one primes)");
    return;
  }
  if (*lo >= *hi) {
    fit.warnings.push_back("the log contradicts itself: a test dribbled at " +
                           litres_per_minute(*lo) + " but another primed at " +
                           litres_per_minute(*hi) +
                           " (did the build change, or did a test stop too early?)" + kept);
    return;
  }
  fit.priming_flow.value = 0.5 * (*lo + *hi);
  // The midpoint of a bracket with nothing known inside it: a rectangular distribution, whose
  // standard uncertainty is the half-width over sqrt(3) (JCGM 100:2008, GUM, 4.3.7).
  fit.priming_flow.sigma = 0.5 * (*hi - *lo) / std::sqrt(3.0);
  fit.priming_flow.fitted = true;
}

}  // namespace

BenchFit fit_bench(const Scenario& scenario, const std::vector<BenchRow>& rows,
                   const std::string& log_label) {
  if (scenario.release.kind != ReleaseKind::bell) {
    throw InputError(scenario.file.string(), 0, "release.kind",
                     "a bench log fits a bell siphon; this scenario's release is not one");
  }
  if (rows.empty()) throw InputError(log_label, 0, "", "the bench log has no tests");
  BenchFit fit;
  fit.priming_flow = {"release.priming_flow_L_per_min", scenario.release.priming_flow_m3_per_s,
                      scenario.release.priming_flow_m3_per_s, std::nullopt, false};
  fit.minor_loss_k = {parameter_key(kLoss), scenario.drop_pipe.minor_loss_k,
                      scenario.drop_pipe.minor_loss_k, std::nullopt, false};
  fit.discharge_coefficient = {parameter_key(kDischarge), scenario.nozzle.discharge_coefficient,
                               scenario.nozzle.discharge_coefficient, std::nullopt, false};
  fit_priming(rows, fit);

  Scenario base = scenario;
  base.release.priming_flow_m3_per_s = fit.priming_flow.value;
  std::vector<Measurement> data = measurements(rows);
  // Rows the model at the starting values cannot reproduce at all are left out, with a warning.
  {
    const std::vector<double> v = BenchModel(base, data).values(base);
    std::vector<Measurement> kept;
    for (std::size_t i = 0; i < data.size(); ++i) {
      if (!std::isnan(v[i])) {
        kept.push_back(data[i]);
        continue;
      }
      fit.warnings.push_back("line " + std::to_string(data[i].row->line) + ": the model gives no " +
                             data[i].quantity + " at " +
                             litres_per_minute(data[i].row->inflow_m3_per_s) +
                             " (it does not prime, or does not break, there); left out of the fit");
    }
    data = kept;
  }
  const BenchModel model(base, data);
  const std::string no_times =
      "no test carries a drain time, a cycle period or a nozzle container, so the log cannot "
      "determine ";

  // Which values the data can determine: a parameter the residuals do not move, or one that
  // moves them only as another does, is left as it was.
  std::vector<int> params = {kLoss, kDischarge};
  Eigen::VectorXd theta(2);
  theta << base.drop_pipe.minor_loss_k, base.nozzle.discharge_coefficient;
  auto r = model.residuals(theta, params);
  std::optional<Eigen::MatrixXd> J;
  if (r && r->size() > 0) J = jacobian(model, theta, *r, params, base);
  if (!J) {
    fit.warnings.push_back(
        no_times +
        "drop_pipe.minor_loss_k or nozzle.discharge_coefficient; both left as they were");
    return fit;
  }
  // How far the relative residuals move for a relative change of each value. A value that moves
  // them by less than 0.1 % when doubled cannot be read from times taken with a stopwatch, and
  // the simulated runs' own noise (tolerance 1e-8 over a step of 1e-4) reaches about 1e-5 here:
  // with a head column the nozzle's coefficient moves nothing but that noise, and a lower bar
  // fitted it to the noise (to its bound, 0.001). Common practice, no source.
  constexpr double kUndetermined = 1e-3;
  Eigen::VectorXd scaled(2);
  for (Eigen::Index j = 0; j < 2; ++j)
    scaled[j] = J->col(j).norm() * std::max(std::abs(theta[j]), 0.1);
  const bool loss_moves = scaled[0] > kUndetermined;
  const bool nozzle_moves = scaled[1] > kUndetermined;
  const double cosine = loss_moves && nozzle_moves ? std::abs(J->col(0).dot(J->col(1))) /
                                                         (J->col(0).norm() * J->col(1).norm())
                                                   : 0.0;
  std::vector<int> chosen;
  if (loss_moves) chosen.push_back(kLoss);
  if (nozzle_moves && cosine < 0.999) chosen.push_back(kDischarge);
  if (!loss_moves) {
    fit.warnings.push_back(no_times + "drop_pipe.minor_loss_k; left at " +
                           detail::on_terminal(fit.minor_loss_k.before));
  }
  if (nozzle_moves && cosine >= 0.999) {
    fit.warnings.push_back(
        "the times cannot tell the nozzle's discharge coefficient from the running loss (both "
        "act as a loss on the square of the flow); fitted drop_pipe.minor_loss_k alone and left "
        "nozzle.discharge_coefficient at " +
        detail::on_terminal(fit.discharge_coefficient.before));
  } else if (!nozzle_moves) {
    fit.warnings.push_back(
        "nothing in the log depends on the nozzle's discharge coefficient (with a head "
        "column the release does not see the nozzle); left at " +
        detail::on_terminal(fit.discharge_coefficient.before));
  }
  const auto record_residuals = [&](const Scenario& at) {
    const std::vector<double> v = model.values(at);
    double sum = 0.0;
    for (std::size_t i = 0; i < data.size(); ++i) {
      fit.residuals.push_back({data[i].row->line, data[i].quantity, data[i].value, v[i]});
      sum += fit.residuals.back().relative() * fit.residuals.back().relative();
    }
    fit.rms_relative = std::sqrt(sum / static_cast<double>(data.size()));
  };
  if (chosen.empty()) {
    record_residuals(base);
    return fit;
  }

  // Levenberg-Marquardt (Marquardt 1963, J. SIAM 11(2), 431-441) on the chosen parameters,
  // damping by the diagonal of J^T J, within the bounds.
  // At the starting values the residuals and the chosen columns of J are those already had.
  Eigen::VectorXd x(static_cast<Eigen::Index>(chosen.size()));
  std::optional<Eigen::MatrixXd> Jx = Eigen::MatrixXd(J->rows(), x.size());
  for (std::size_t j = 0; j < chosen.size(); ++j) {
    x[static_cast<Eigen::Index>(j)] = theta[chosen[j]];
    Jx->col(static_cast<Eigen::Index>(j)) = J->col(chosen[j]);
  }
  params = chosen;
  double cost = r->squaredNorm();
  double lambda = 1e-3;
  for (fit.iterations = 0; Jx && fit.iterations < 50; ++fit.iterations) {
    const Eigen::MatrixXd A = Jx->transpose() * *Jx;
    const Eigen::VectorXd g = Jx->transpose() * *r;
    bool improved = false;
    double step = 0.0;
    while (lambda < 1e10) {
      Eigen::MatrixXd damped = A;
      damped.diagonal() += lambda * A.diagonal().cwiseMax(1e-12);
      const Eigen::VectorXd delta = damped.ldlt().solve(-g);
      Eigen::VectorXd trial = x + delta;
      for (Eigen::Index j = 0; j < trial.size(); ++j) {
        trial[j] = clamp_parameter(params[static_cast<std::size_t>(j)], trial[j], base);
      }
      const auto rt = model.residuals(trial, params);
      if (rt && rt->squaredNorm() < cost) {
        step = (trial - x).cwiseAbs().maxCoeff();
        x = trial;
        r = rt;
        const double previous = cost;
        cost = rt->squaredNorm();
        lambda = std::max(lambda / 10.0, 1e-12);
        improved = previous - cost > 1e-12 * (1.0 + previous);
        // J at the new values: for the next step, or for the uncertainty if this is the last.
        Jx = jacobian(model, x, *r, params, base);
        break;
      }
      lambda *= 10.0;
    }
    if (!improved || step < 1e-9) break;
  }

  const Eigen::Index m = r->size();
  const Eigen::Index p = x.size();
  std::optional<Eigen::VectorXd> sigma;
  if (m > p && Jx) {
    const double s2 = cost / static_cast<double>(m - p);
    const Eigen::MatrixXd cov = s2 * (Jx->transpose() * *Jx).inverse();
    sigma = cov.diagonal().cwiseMax(0.0).cwiseSqrt();
  } else {
    fit.warnings.push_back("as many measurements as fitted values: no uncertainty can be given");
  }
  for (std::size_t j = 0; j < params.size(); ++j) {
    FittedValue& v = params[j] == kLoss ? fit.minor_loss_k : fit.discharge_coefficient;
    v.value = x[static_cast<Eigen::Index>(j)];
    v.fitted = true;
    if (sigma) v.sigma = (*sigma)[static_cast<Eigen::Index>(j)];
  }
  record_residuals(model.with(x, params));
  return fit;
}

Scenario apply_fit(Scenario scenario, const BenchFit& fit) {
  scenario.release.priming_flow_m3_per_s = fit.priming_flow.value;
  scenario.drop_pipe.minor_loss_k = fit.minor_loss_k.value;
  scenario.nozzle.discharge_coefficient = fit.discharge_coefficient.value;
  return scenario;
}

namespace {

/// `value` in the unit a person reads for `key`: L/min for the priming flow, as is otherwise.
double shown(const FittedValue& v, double x) {
  return v.key == "release.priming_flow_L_per_min" ? x / kLitrePerMinute_m3_per_s : x;
}

/// `text` as a double-quoted YAML scalar.
std::string yaml_quoted(const std::string& text) {
  std::string out = "\"";
  for (const char c : text) {
    if (c == '"' || c == '\\') out += '\\';
    out += c;
  }
  return out + "\"";
}

}  // namespace

// Written into the scenario (not a figure to read): four significant figures, as measured.
std::string fitted_value_text(const FittedValue& v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.4g", shown(v, v.value));
  return buf;
}

void write_fitted_value(std::ostream& out, const FittedValue& v) {
  out << "  " << v.key << ": ";
  if (!v.fitted) {
    out << detail::on_terminal(shown(v, v.value)) << " (kept: see the warnings)\n";
    return;
  }
  out << detail::on_terminal(shown(v, v.value));
  if (v.sigma) out << " +- " << detail::on_terminal(shown(v, *v.sigma));
  out << " (was " << detail::on_terminal(shown(v, v.before)) << ")\n";
}

void write_bench_fit(std::ostream& out, const BenchFit& fit) {
  out << "Priming flow bracket\n";
  out << "  largest inflow that only dribbled: "
      << (fit.dribbled_max_m3_per_s ? litres_per_minute(*fit.dribbled_max_m3_per_s) : "none")
      << "\n";
  out << "  smallest inflow that primed:       "
      << (fit.primed_min_m3_per_s ? litres_per_minute(*fit.primed_min_m3_per_s) : "none") << "\n";
  out << "Fitted values (+- one standard uncertainty)\n";
  write_fitted_value(out, fit.priming_flow);
  write_fitted_value(out, fit.minor_loss_k);
  write_fitted_value(out, fit.discharge_coefficient);
  if (!fit.residuals.empty()) {
    out << "Measurements against the fitted model\n";
    char buf[160];
    std::snprintf(buf, sizeof buf, "  %-6s %-22s %12s %12s %9s\n", "line", "quantity", "measured",
                  "model", "residual");
    out << buf;
    for (const BenchResidual& r : fit.residuals) {
      const bool flow = r.quantity == "nozzle_flow_L_per_min";
      const double scale = flow ? 1.0 / kLitrePerMinute_m3_per_s : 1.0;
      std::snprintf(buf, sizeof buf, "  %-6d %-22s %12s %12s %8s%%\n", r.line, r.quantity.c_str(),
                    detail::on_terminal(r.measured * scale).c_str(),
                    detail::on_terminal(r.model * scale).c_str(),
                    detail::on_terminal(100.0 * r.relative()).c_str());
      out << buf;
    }
    out << "  root mean square of the residuals: " << detail::on_terminal(100.0 * fit.rms_relative)
        << "% (" << fit.iterations << " iterations)\n";
  }
  write_warnings_and_build(out, fit.warnings,
                           {{"priming_flow_L_per_min", fit.priming_flow},
                            {"minor_loss_k", fit.minor_loss_k},
                            {"nozzle_discharge_coefficient", fit.discharge_coefficient}});
}

void write_warnings_and_build(std::ostream& out, const std::vector<std::string>& warnings,
                              std::initializer_list<BuildValue> values) {
  if (!warnings.empty()) {
    out << "Warnings\n";
    for (const std::string& w : warnings) out << "  - " << w << "\n";
  }
  out << "As a build for release.builds:\n  - {name: NAME";
  for (const BuildValue& v : values)
    out << ", " << v.build_key << ": " << fitted_value_text(v.value);
  out << "}\n";
}

std::string fitted_scenario_text(std::string_view scenario_text,
                                 const std::vector<FittedValue>& values,
                                 const std::string& log_name, const std::string& log_label,
                                 const std::string& scenario_label) {
  std::string text(scenario_text);
  std::string names;
  for (const FittedValue& v : values) {
    if (!v.fitted) continue;
    text = set_scenario_value(text, v.key, fitted_value_text(v), scenario_label);
    names += (names.empty() ? "" : ", ") + v.key;
    if (v.key == "release.priming_flow_L_per_min") {
      text = set_scenario_value(text, "release.priming_flow_measured_by", yaml_quoted(log_label),
                                scenario_label);
    }
  }
  return "# Fitted by gutterwatt fit to the " + log_name + " " + log_label + ": " +
         (names.empty() ? "nothing could be fitted" : names) + ".\n" + text;
}

std::string fitted_scenario_text(std::string_view scenario_text, const BenchFit& fit,
                                 const std::string& log_label, const std::string& scenario_label) {
  return fitted_scenario_text(scenario_text,
                              {fit.priming_flow, fit.minor_loss_k, fit.discharge_coefficient},
                              "bench log", log_label, scenario_label);
}

}  // namespace gutterwatt
