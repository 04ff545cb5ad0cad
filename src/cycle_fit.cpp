#include "gutterwatt/cycle_fit.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <functional>
#include <limits>

#include "detail.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/plant.hpp"
#include "gutterwatt/simulation.hpp"
#include "gutterwatt/units.hpp"
#include "report_format.hpp"

namespace gutterwatt {
namespace {

using detail::litres_per_minute;

/// Collects the start of every siphon cycle of a run.
class CycleStarts : public Observer {
 public:
  void on_episode(const Episode& e) override {
    if (e.kind == EpisodeKind::cycle) starts.push_back(static_cast<Instant>(std::floor(e.start_s)));
  }
  std::vector<Instant> starts;
};

/// The least sum of squared differences of `a` paired in order with part of `b` (a.size() <=
/// b.size(), both sorted), by dynamic programming: best[j] after row i is the least cost of
/// pairing a[0..i] with b[0..j] .
double least_squares_pairing(const std::vector<double>& a, const std::vector<double>& b) {
  const double inf = std::numeric_limits<double>::infinity();
  std::vector<double> best(b.size() + 1, 0.0);  // row 0: nothing paired costs nothing
  for (std::size_t i = 1; i <= a.size(); ++i) {
    std::vector<double> next(b.size() + 1, inf);
    for (std::size_t j = i; j <= b.size(); ++j) {
      const double d = a[i - 1] - b[j - 1];
      next[j] = std::min(next[j - 1], best[j - 1] + d * d);
    }
    best = std::move(next);
  }
  return best.back();
}

/// The priming flows searched: log-spaced from the running flow at the trigger level (times
/// kPrimingTop: the loader refuses one at or above it) down by a factor kPrimingSpan, wide
/// enough for any build that primes at all; first on a coarse grid, then on a fine one between
/// the best coarse flow's neighbours, crossed with every loss of kLossGrid.
constexpr int kCoarseGrid = 24;
constexpr int kFineGrid = 12;
constexpr double kPrimingSpan = 1000.0;
constexpr double kPrimingTop = 0.98;
/// The ends of the range of priming flows that reproduce the counts best are found by steps of
/// this ratio outwards, then by bisection to kEdgeRatio.
constexpr double kEdgeStep = 1.25;
constexpr double kEdgeRatio = 1.01;

/// Losses tried: from a smooth bend-free pipe to a throttled one (REFERENCES.md section 4: an
/// entrance 0.5, elbows 0.3 to 1.5, an exit 1.0 each).
constexpr double kLossGrid[] = {0.0, 0.25, 0.5, 1.0, 2.0, 4.0, 8.0, 16.0, 32.0};
constexpr int kGoldenSteps = 12;
constexpr int kSimplexRuns = 80;
/// Timing that moves by less than this over the whole loss grid does not determine the loss:
/// about the resolution of a float-switch logger or a camera's clock (common practice, no
/// source).
constexpr double kTimingResolution_s = 1.0;

/// Runs the model at a priming flow and a loss, and scores it against the log.
class CycleModel {
 public:
  CycleModel(const Scenario& base, const RainSeries& rain, const CycleLog& log,
             std::vector<TimeSpan> windows, int& runs)
      : base_(base), rain_(rain), log_(log), windows_(std::move(windows)), runs_(runs) {}

  Scenario with(double priming_m3_per_s, double loss_k) const {
    Scenario s = base_;
    s.release.priming_flow_m3_per_s = priming_m3_per_s;
    s.drop_pipe.minor_loss_k = loss_k;
    return s;
  }

  /// The priming flow must stay below the running flow at the trigger level with this loss.
  double priming_ceiling(double loss_k) const {
    const Scenario s = with(base_.release.priming_flow_m3_per_s, loss_k);
    return kPrimingTop * running_flow_m3_per_s(plant_config(s), s.release.trigger_level_m);
  }

  std::vector<Instant> starts(double priming_m3_per_s, double loss_k) const {
    ++runs_;
    return simulate_cycle_starts(with(priming_m3_per_s, loss_k), rain_).starts;
  }

  CycleMatch score(double priming_m3_per_s, double loss_k) const {
    return match_cycles(log_.starts, starts(priming_m3_per_s, loss_k), windows_);
  }

  const std::vector<TimeSpan>& windows() const { return windows_; }

 private:
  const Scenario& base_;
  const RainSeries& rain_;
  const CycleLog& log_;
  std::vector<TimeSpan> windows_;
  int& runs_;
};

/// The best point a one-dimensional search found, and its score.
struct Best {
  double x = 0.0;
  CycleMatch match;
};

/// Golden-section search (Kiefer 1953, Proc. AMS 4(3), 502-506) for the best `score` on [a, b],
/// comparing counts first and timing second; starts from `start`, a point already scored inside.
Best golden(double a, double b, const std::function<CycleMatch(double)>& score, Best start) {
  const double invphi = (std::sqrt(5.0) - 1.0) / 2.0;
  double c = b - invphi * (b - a);
  double d = a + invphi * (b - a);
  CycleMatch fc = score(c);
  CycleMatch fd = score(d);
  for (int step = 0; step < kGoldenSteps && b - a > 1e-3 * std::max(1.0, std::abs(b)); ++step) {
    if (fd.better_than(fc)) {
      a = c;
      c = d;
      fc = fd;
      d = a + invphi * (b - a);
      fd = score(d);
    } else {
      b = d;
      d = c;
      fd = fc;
      c = b - invphi * (b - a);
      fc = score(c);
    }
  }
  for (const Best& b : {Best{c, fc}, Best{d, fd}}) {
    if (b.match.better_than(start.match)) start = b;
  }
  return start;
}

/// `n` flows log-spaced from `low` to `high`.
std::vector<double> log_spaced(double low, double high, int n) {
  std::vector<double> out;
  for (int i = 0; i < n; ++i) {
    out.push_back(low * std::pow(high / low, static_cast<double>(i) / (n - 1)));
  }
  return out;
}

/// The range of priming flows around `p` that, at loss `k`, leave as many cycles unpaired as `p`
/// does: steps outwards by kEdgeStep until the count changes, then bisects to kEdgeRatio. An end
/// is nullopt where the range reaches `bottom` or `top`.
struct CountRange {
  std::optional<double> low;
  std::optional<double> high;
  bool several = false;  ///< the count returns beyond an end (separate ranges do as well)
};

CountRange count_range(const CycleModel& model, double p, double k, int target, double bottom,
                       double top) {
  CountRange r;
  const auto same = [&](double x) { return model.score(x, k).unmatched == target; };
  for (const double step : {1.0 / kEdgeStep, kEdgeStep}) {
    const double bound = step < 1.0 ? bottom : top;
    double inside = p;
    std::optional<double> outside;
    while (!outside) {
      const double next =
          step < 1.0 ? std::max(inside * step, bound) : std::min(inside * step, bound);
      if (same(next)) {
        inside = next;
        if (next == bound) break;
      } else {
        outside = next;
      }
    }
    if (!outside) continue;
    if (same(step < 1.0 ? *outside / kEdgeStep : *outside * kEdgeStep)) r.several = true;
    while (std::max(inside, *outside) / std::min(inside, *outside) > kEdgeRatio) {
      const double mid = std::sqrt(inside * *outside);
      (same(mid) ? inside : *outside) = mid;
    }
    (step < 1.0 ? r.low : r.high) = std::sqrt(inside * *outside);
  }
  return r;
}

/// Nelder-Mead simplex search (Nelder and Mead 1965, Computer Journal 7(4), 308-313) for the
/// best pair (ln priming flow, loss), comparing counts first and timing second (the method only
/// compares values, so that order will do). Starts from `start` with steps of 5 % in the priming
/// flow and a fifth in the loss (at least 0.25); stops after `budget` runs or once the simplex
/// spans less than 0.3 % and 0.01.
struct Vertex {
  double u;  ///< ln of the priming flow
  double k;
  CycleMatch m;
};

Vertex nelder_mead(const std::function<CycleMatch(double, double)>& score, double p, double k,
                   int budget) {
  const auto at = [&](double u, double kk) { return Vertex{u, kk, score(std::exp(u), kk)}; };
  const double u0 = std::log(p);
  std::vector<Vertex> v = {at(u0, k), at(u0 + 0.05, k), at(u0, k + std::max(0.25, 0.2 * k))};
  int runs = 3;
  const auto worse = [](const Vertex& a, const Vertex& b) { return b.m.better_than(a.m); };
  const auto mix = [&](const Vertex& a, const Vertex& b, double t) {
    ++runs;
    return at(a.u + t * (b.u - a.u), a.k + t * (b.k - a.k));
  };
  while (runs < budget) {
    std::sort(v.begin(), v.end(), [&](const Vertex& a, const Vertex& b) { return worse(b, a); });
    if (std::abs(v[2].u - v[0].u) < 3e-3 && std::abs(v[1].u - v[0].u) < 3e-3 &&
        std::abs(v[2].k - v[0].k) < 1e-2 && std::abs(v[1].k - v[0].k) < 1e-2) {
      break;
    }
    const Vertex c{0.5 * (v[0].u + v[1].u), 0.5 * (v[0].k + v[1].k), {}};
    const Vertex r = mix(c, v[2], -1.0);
    if (r.m.better_than(v[0].m)) {
      const Vertex e = mix(c, v[2], -2.0);
      v[2] = e.m.better_than(r.m) ? e : r;
    } else if (r.m.better_than(v[1].m)) {
      v[2] = r;
    } else {
      const bool outside = r.m.better_than(v[2].m);
      const Vertex ct = mix(c, outside ? r : v[2], 0.5);
      if (ct.m.better_than(outside ? r.m : v[2].m)) {
        v[2] = ct;
      } else {
        v[1] = mix(v[0], v[1], 0.5);
        v[2] = mix(v[0], v[2], 0.5);
      }
    }
  }
  std::sort(v.begin(), v.end(), [&](const Vertex& a, const Vertex& b) { return worse(b, a); });
  return v[0];
}

/// One standard uncertainty of the loss from the curvature of the sum of squares S of the timing
/// at its least, in (ln priming flow, loss): covariance 2 s^2 H^-1 with H the Hessian of S and
/// s^2 = S / (pairs - 2), the form s^2 (J^T J)^-1 with H = 2 J^T J of a least-squares fit (e.g.
/// Press et al. 2007, Numerical Recipes, 3rd ed., section 15.5); the loss's variance is its
/// diagonal entry, so it includes what the priming flow could trade for it. The least often lies
/// where the counts change (the timing would fit better past it, at a cost in counts), so H comes
/// from one-sided differences towards whichever quadrant keeps the counts, with steps `hu` (in ln
/// priming flow) and a twentieth of the loss, halved up to three times. nullopt where no quadrant
/// keeps them, or S is not curved upwards there.
std::optional<double> loss_sigma(const std::function<CycleMatch(double, double)>& score, double p,
                                 double k, double hu) {
  double hk = std::max(0.05 * k, 0.05);
  const double u0 = std::log(p);
  const CycleMatch m0 = score(p, k);
  for (int tries = 0; tries < 4; ++tries, hu /= 2.0, hk /= 2.0) {
    for (const auto& [su, sk] : {std::pair{1.0, 1.0}, {1.0, -1.0}, {-1.0, 1.0}, {-1.0, -1.0}}) {
      if (k + 2.0 * sk * hk < 0.0) continue;
      // S at (i, j) steps of (su hu, sk hk) from the least: (1,0) (2,0) (0,1) (0,2) (1,1).
      double sum[3][3] = {};
      sum[0][0] = m0.sum_squares_s2;
      bool same = true;
      for (const auto& [i, j] : {std::pair{1, 0}, {2, 0}, {0, 1}, {0, 2}, {1, 1}}) {
        const CycleMatch m = score(std::exp(u0 + i * su * hu), k + j * sk * hk);
        same = m.unmatched == m0.unmatched && m.pairs == m0.pairs;
        if (!same) break;
        sum[i][j] = m.sum_squares_s2;
      }
      if (!same) continue;
      const double huu = (sum[2][0] - 2.0 * sum[1][0] + sum[0][0]) / (hu * hu);
      const double hkk = (sum[0][2] - 2.0 * sum[0][1] + sum[0][0]) / (hk * hk);
      const double huk = su * sk * (sum[1][1] - sum[1][0] - sum[0][1] + sum[0][0]) / (hu * hk);
      const double det = huu * hkk - huk * huk;
      if (m0.pairs < 3) return std::nullopt;
      if (!(huu > 0.0) || !(det > 0.0)) continue;
      const double s2 = m0.sum_squares_s2 / (m0.pairs - 2);
      return std::sqrt(2.0 * s2 * huu / det);
    }
  }
  return std::nullopt;
}

}  // namespace

bool CycleMatch::better_than(const CycleMatch& other) const {
  if (unmatched != other.unmatched) return unmatched < other.unmatched;
  if (pairs == 0 || other.pairs == 0) return pairs > other.pairs;
  return rms_s() < other.rms_s();
}

SimulatedCycles simulate_cycle_starts(const Scenario& scenario, const RainSeries& rain) {
  CycleStarts observer;
  const RunResult result = simulate(scenario, rain, observer);
  return {std::move(observer.starts), result.start, result.end};
}

std::vector<TimeSpan> rain_event_windows(const RainSeries& rain, Instant start, Instant end) {
  std::vector<Instant> firsts;
  std::optional<Instant> last_rain;
  for (const RainPulse& p : rain.pulses) {
    if (p.end <= start || p.start >= end) continue;
    if (!last_rain || p.start - *last_rain >= kRainEventGap_s) {
      firsts.push_back(std::max(p.start, start));
    }
    last_rain = p.end;
  }
  if (firsts.empty()) return {{start, end}};
  firsts.front() = start;
  std::vector<TimeSpan> windows;
  for (std::size_t k = 0; k < firsts.size(); ++k) {
    windows.push_back({firsts[k], k + 1 < firsts.size() ? firsts[k + 1] : end});
  }
  return windows;
}

CycleMatch match_cycles(const std::vector<Instant>& observed, const std::vector<Instant>& simulated,
                        const std::vector<TimeSpan>& windows) {
  CycleMatch m;
  std::size_t o = 0;
  std::size_t s = 0;
  for (const TimeSpan& w : windows) {
    std::vector<double> obs;
    std::vector<double> sim;
    for (; o < observed.size() && observed[o] < w.end; ++o) {
      if (observed[o] >= w.start) obs.push_back(static_cast<double>(observed[o] - w.start));
    }
    for (; s < simulated.size() && simulated[s] < w.end; ++s) {
      if (simulated[s] >= w.start) sim.push_back(static_cast<double>(simulated[s] - w.start));
    }
    m.unmatched += static_cast<int>(obs.size() > sim.size() ? obs.size() - sim.size()
                                                            : sim.size() - obs.size());
    m.pairs += static_cast<int>(std::min(obs.size(), sim.size()));
    m.sum_squares_s2 += obs.size() <= sim.size() ? least_squares_pairing(obs, sim)
                                                 : least_squares_pairing(sim, obs);
  }
  return m;
}

CycleFit fit_cycles(const Scenario& scenario, const RainSeries& rain, const CycleLog& log,
                    const std::string& log_label) {
  if (scenario.release.kind != ReleaseKind::bell) {
    throw InputError(scenario.file.string(), 0, "release.kind",
                     "a cycle log fits a bell siphon; this scenario's release is not one");
  }
  CycleFit fit;
  fit.priming_flow = {"release.priming_flow_L_per_min", scenario.release.priming_flow_m3_per_s,
                      scenario.release.priming_flow_m3_per_s, std::nullopt, false};
  fit.minor_loss_k = {"drop_pipe.minor_loss_k", scenario.drop_pipe.minor_loss_k,
                      scenario.drop_pipe.minor_loss_k, std::nullopt, false};

  ++fit.runs;
  const SimulatedCycles before = simulate_cycle_starts(scenario, rain);
  fit.start = before.start;
  fit.end = before.end;
  for (std::size_t k = 0; k < log.starts.size(); ++k) {
    if (log.starts[k] >= fit.start && log.starts[k] < fit.end) continue;
    throw InputError(log_label, log.lines[k], "time",
                     "the cycle at " + format_iso8601(log.starts[k], scenario.site.zone) +
                         " is outside the simulated period, " +
                         format_iso8601(fit.start, scenario.site.zone) + " to " +
                         format_iso8601(fit.end, scenario.site.zone) +
                         "; set simulation.start and simulation.end to the time the log covers");
  }
  const CycleModel model(scenario, rain, log, rain_event_windows(rain, fit.start, fit.end),
                         fit.runs);
  fit.before = match_cycles(log.starts, before.starts, model.windows());

  const double p0 = scenario.release.priming_flow_m3_per_s;
  const double k0 = scenario.drop_pipe.minor_loss_k;
  const std::string kept_priming =
      "; release.priming_flow_L_per_min left at " + litres_per_minute(p0);

  // The priming flow and the loss are searched together: the counts of a long event move with
  // the volume of each fill, which the priming flow sets (through the head it primes at) as the
  // loss sets the volume that flows in while it drains; the timing moves with both.
  const double top = model.priming_ceiling(0.0);
  const double bottom = top / kPrimingSpan;
  const auto score = [&](double p, double k) {
    // A pair the loader would refuse (a priming flow at or above the running flow) is worst.
    // A loss below 0 is no loss.
    if (k < 0.0 || p >= model.priming_ceiling(k)) {
      return CycleMatch{std::numeric_limits<int>::max(), 0, 0.0};
    }
    return model.score(p, k);
  };
  // 1. A coarse grid of priming flows at the scenario's loss finds the neighbourhood ...
  const std::vector<double> coarse = log_spaced(bottom, top, kCoarseGrid);
  std::size_t b = 0;
  {
    std::vector<CycleMatch> m;
    for (const double p : coarse) m.push_back(score(p, k0));
    for (std::size_t i = 1; i < m.size(); ++i) {
      if (m[i].better_than(m[b])) b = i;
    }
  }
  // 2. ... a fine grid there, crossed with every loss of the grid, the best pair ...
  const std::vector<double> fine =
      log_spaced(coarse[b > 0 ? b - 1 : b], coarse[std::min(b + 1, coarse.size() - 1)], kFineGrid);
  std::size_t bp = 0;
  std::size_t bk = 0;
  std::vector<std::vector<CycleMatch>> grid(fine.size());
  for (std::size_t i = 0; i < fine.size(); ++i) {
    for (const double k : kLossGrid) grid[i].push_back(score(fine[i], k));
    for (std::size_t j = 0; j < grid[i].size(); ++j) {
      if (grid[i][j].better_than(grid[bp][bk])) {
        bp = i;
        bk = j;
      }
    }
  }
  double p = fine[bp];
  double k = kLossGrid[bk];
  // The loss is told by the log where it moves the counts, or moves the timing of paired starts
  // by more than a clock can tell among the losses that leave as many cycles unpaired; it must
  // not sit at the top of the grid.
  const CycleMatch& best = grid[bp][bk];
  double lowest = std::numeric_limits<double>::infinity();
  double highest = 0.0;
  bool counts_move = false;
  for (const CycleMatch& m : grid[bp]) {
    if (m.unmatched == std::numeric_limits<int>::max()) continue;  // refused by the loader
    if (m.unmatched != best.unmatched) counts_move = true;
    if (m.unmatched != best.unmatched || m.pairs == 0) continue;
    lowest = std::min(lowest, m.rms_s());
    highest = std::max(highest, m.rms_s());
  }
  const bool loss_determined =
      best.pairs > 0 && (counts_move || highest - lowest >= kTimingResolution_s);
  const std::size_t last = std::size(kLossGrid) - 1;
  const bool loss_at_top = loss_determined && bk == last;
  if (!loss_determined || loss_at_top) k = k0;
  // 3. ... refined: both together by a simplex search where the timing tells the loss (its
  // valley runs across both), else the priming flow alone by golden section.
  if (loss_determined && !loss_at_top) {
    const Vertex v = nelder_mead(score, p, k, kSimplexRuns);
    p = std::exp(v.u);
    k = v.k;
  } else {
    p = golden(fine[bp > 0 ? bp - 1 : bp], fine[std::min(bp + 1, fine.size() - 1)],
               [&](double x) { return score(x, k); }, {p, score(p, k)})
            .x;
  }
  // 4. The range of priming flows that leave as many cycles unpaired at the fitted loss.
  const CycleMatch at = score(p, k);
  const CountRange range = count_range(model, p, k, at.unmatched, bottom, model.priming_ceiling(k));
  fit.priming_low_m3_per_s = range.low;
  fit.priming_high_m3_per_s = range.high;
  const bool priming_determined = !log.starts.empty() && range.low && range.high;
  if (priming_determined) {
    fit.priming_flow.value = p;
    fit.priming_flow.fitted = true;
    // The counts bound the priming flow; the timing picks it within the bounds. As its
    // uncertainty, the range as a rectangular distribution: standard uncertainty the half-width
    // over sqrt(3) (JCGM 100:2008, GUM, 4.3.7), as for the bench bracket.
    fit.priming_flow.sigma = 0.5 * (*range.high - *range.low) / std::sqrt(3.0);
  }
  if (!priming_determined && loss_determined && !loss_at_top) {
    // The priming flow stays as it was: the loss is read again at that flow.
    const auto at_p0 = [&](double x) { return score(p0, x); };
    Best kb{kLossGrid[0], at_p0(kLossGrid[0])};
    std::size_t kb_index = 0;
    for (std::size_t j = 1; j < std::size(kLossGrid); ++j) {
      const CycleMatch m = at_p0(kLossGrid[j]);
      if (m.better_than(kb.match)) {
        kb = {kLossGrid[j], m};
        kb_index = j;
      }
    }
    k = golden(kLossGrid[kb_index > 0 ? kb_index - 1 : kb_index],
               kLossGrid[std::min(kb_index + 1, last)], at_p0, kb)
            .x;
  }
  if (loss_determined && !loss_at_top) {
    // The step in the priming flow: a fifth of the range, where the range is known.
    double hu = 0.01;
    if (range.low && range.high) hu = std::max(1e-3, 0.2 * std::log(*range.high / *range.low));
    fit.minor_loss_k.value = k;
    fit.minor_loss_k.fitted = true;
    fit.minor_loss_k.sigma = loss_sigma(score, fit.priming_flow.value, k, hu);
  }

  // Warnings where the log cannot say.
  if (log.starts.empty() || !range.high) {
    fit.warnings.push_back(
        "the log's cycles are reproduced as well by the largest priming flow the scenario "
        "allows, " +
        litres_per_minute(model.priming_ceiling(k)) +
        " (near the running flow at the trigger level): the log does not bound the priming flow "
        "from above" +
        kept_priming);
  } else if (!range.low) {
    fit.warnings.push_back(
        "the log's cycles are reproduced as well by the smallest priming flow tried, " +
        litres_per_minute(bottom) +
        ": no rain event shows the siphon dribbling where a lower priming flow would have "
        "cycled, so the log says only that the priming flow is below " +
        litres_per_minute(*range.high) + kept_priming);
  }
  if (range.several) {
    fit.warnings.push_back(
        "separate ranges of priming flow reproduce the cycle counts equally well; took the one "
        "whose timing fits best");
  }
  if (!loss_determined) {
    fit.warnings.push_back(
        "neither the cycle counts nor the timing of the cycle starts move (by " +
        detail::on_terminal(kTimingResolution_s) +
        " s) over losses from 0 to 32, or no cycle could be paired, so the log cannot determine "
        "drop_pipe.minor_loss_k; left at " +
        detail::on_terminal(k0));
  } else if (loss_at_top) {
    fit.warnings.push_back(
        "the timing asks for a loss at or above 32, the largest tried (a blocked pipe, or a "
        "cause the model does not hold such as air in the pipe); drop_pipe.minor_loss_k left at " +
        detail::on_terminal(k0));
  }
  if (fit.minor_loss_k.fitted && !fit.minor_loss_k.sigma) {
    fit.warnings.push_back(
        "the cycle counts change right beside the fitted values (or the timing is flat there), so "
        "no uncertainty can be given for drop_pipe.minor_loss_k");
  }

  const std::vector<Instant> after = model.starts(fit.priming_flow.value, fit.minor_loss_k.value);
  fit.after = match_cycles(log.starts, after, model.windows());
  fit.observed = static_cast<int>(log.starts.size());
  fit.simulated_before = static_cast<int>(before.starts.size());
  fit.simulated = static_cast<int>(after.size());
  const auto count_in = [](const std::vector<Instant>& t, const TimeSpan& w) {
    return static_cast<int>(std::lower_bound(t.begin(), t.end(), w.end) -
                            std::lower_bound(t.begin(), t.end(), w.start));
  };
  for (const TimeSpan& w : model.windows()) {
    CycleEvent e{w, 0.0, count_in(log.starts, w), count_in(before.starts, w), count_in(after, w)};
    if (e.observed + e.simulated_before + e.simulated == 0) continue;
    for (const RainPulse& p : rain.pulses) {
      if (p.start >= w.start && p.start < w.end) e.rain_m += p.depth_m;
    }
    fit.events.push_back(e);
  }
  return fit;
}

void write_cycle_fit(std::ostream& out, const CycleFit& fit, const TimeZone& zone) {
  out << "Cycle log against the simulated period " << format_iso8601(fit.start, zone) << " to "
      << format_iso8601(fit.end, zone) << " (" << fit.runs << " runs)\n";
  out << "Priming flows that reproduce the cycle counts best\n  from "
      << (fit.priming_low_m3_per_s ? litres_per_minute(*fit.priming_low_m3_per_s)
                                   : "(the smallest tried)")
      << " to "
      << (fit.priming_high_m3_per_s ? litres_per_minute(*fit.priming_high_m3_per_s)
                                    : "(the largest tried)")
      << "\n";
  out << "Fitted values (+- one standard uncertainty)\n";
  write_fitted_value(out, fit.priming_flow);
  write_fitted_value(out, fit.minor_loss_k);
  out << "Cycles observed against simulated, by rain event\n";
  char buf[160];
  std::snprintf(buf, sizeof buf, "  %-18s %8s %9s %10s %10s\n", "event from", "rain_mm", "observed",
                "before", "fitted");
  out << buf;
  for (const CycleEvent& e : fit.events) {
    std::snprintf(buf, sizeof buf, "  %-18s %8s %9d %10d %10d\n",
                  format_iso8601(e.window.start, zone).c_str(),
                  detail::on_terminal(e.rain_m / kMetresPerMm).c_str(), e.observed,
                  e.simulated_before, e.simulated);
    out << buf;
  }
  std::snprintf(buf, sizeof buf, "  %-18s %8s %9d %10d %10d\n", "total", "", fit.observed,
                fit.simulated_before, fit.simulated);
  out << buf;
  for (const auto& [name, m] : {std::pair{"before", fit.before}, std::pair{"fitted", fit.after}}) {
    std::snprintf(buf, sizeof buf,
                  "  %s: %d cycles unpaired; %d starts paired, root mean square difference %s s\n",
                  name, m.unmatched, m.pairs, detail::on_terminal(m.rms_s()).c_str());
    out << buf;
  }
  write_warnings_and_build(
      out, fit.warnings,
      {{"priming_flow_L_per_min", fit.priming_flow}, {"minor_loss_k", fit.minor_loss_k}});
}

}  // namespace gutterwatt
