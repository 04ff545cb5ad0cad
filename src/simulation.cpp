#include "gutterwatt/simulation.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <optional>
#include <span>
#include <sstream>

#include "detail.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/stepper.hpp"

namespace gutterwatt {
namespace detail {
namespace {

// A pulse's rain intensity, m/s: constant over the pulse.
double intensity_m_per_s(const RainPulse& p) {
  return p.depth_m / static_cast<double>(p.end - p.start);
}

// The run: walks the record segment by segment (constant rain and load between output, month,
// load-hour, diverter-reset and record boundaries), hands each segment to the stepper, samples
// the ledger at the boundaries and closes the water balance at the end.
class Engine {
 public:
  Engine(const Scenario& sc, RainView& rain, Observer& observer, const RunOptions& options)
      : sc_(sc),
        rain_(rain),
        observer_(observer),
        system_(sc, options.trickle_head_m),
        ledger_(system_, observer),
        stepper_(system_, ledger_, options),
        options_(options) {}

  RunResult run();

 private:
  /// The time from `from` on that the record does not cover, up to `end` when known.
  TimeSpan missing_from(Instant from, std::optional<Instant> end);
  [[noreturn]] void missing_data(const TimeSpan& gap, Instant start, Instant end) const;

  const Scenario& sc_;
  RainView& rain_;
  Observer& observer_;
  ChainSystem system_;
  Ledger ledger_;
  Stepper stepper_;
  const RunOptions& options_;
  double last_wet_s_ = -std::numeric_limits<double>::infinity();
  RunResult result_;
};

TimeSpan Engine::missing_from(Instant from, std::optional<Instant> end) {
  for (;;) {
    const std::vector<TimeSpan>& covered = rain_.covered();
    const auto next = std::upper_bound(covered.begin(), covered.end(), from,
                                       [](Instant t, const TimeSpan& c) { return t < c.start; });
    if (next != covered.end()) return {from, end ? std::min(next->start, *end) : next->start};
    if (rain_.complete()) return {from, end.value_or(covered.back().end)};
    rain_.need(rain_.final_before() + 1);
  }
}

void Engine::missing_data(const TimeSpan& gap, Instant start, Instant end) const {
  const std::vector<TimeSpan>& covered = rain_.covered();
  const TimeZone& off = sc_.site.zone;
  const bool before = gap.start == start && gap.start < covered.front().start;
  const bool after = gap.end == end && gap.start >= covered.back().end;
  const std::string field = before ? "simulation.start" : after ? "simulation.end" : "rain";
  throw InputError(sc_.file.string(), 0, field,
                   "the rain record has no data from " + format_iso8601(gap.start, off) + " to " +
                       format_iso8601(gap.end, off) +
                       "; move the period inside the record or set rain.gaps: zero or skip");
}

RunResult Engine::run() {
  rain_.need_data();
  if (rain_.covered().empty()) {
    throw InputError(sc_.file.string(), 0, "rain", "the rain record holds no data");
  }
  const Instant start = sc_.simulation.start.value_or(rain_.covered().front().start);
  // Without simulation.end the run ends with the record, which is known once it is complete.
  std::optional<Instant> end = sc_.simulation.end;
  const auto learn_end = [&] {
    if (!end && rain_.complete()) end = rain_.covered().back().end;
    if (end && *end <= start) {
      throw InputError(
          sc_.file.string(), 0, "simulation.end",
          "must be after simulation.start (" + format_iso8601(start, sc_.site.zone) + ")");
    }
  };
  learn_end();
  const GapPolicy policy = rain_.policy();
  if (policy == GapPolicy::error && rain_.complete()) {
    // A whole record: time it does not cover is known before the run, and reported at once.
    Instant cursor = start;
    for (const TimeSpan& c : rain_.covered()) {
      if (c.end <= cursor) continue;
      if (c.start > cursor || cursor >= *end) break;
      cursor = c.end;
    }
    if (cursor < *end) missing_data(missing_from(cursor, end), start, *end);
  }

  result_.start = start;
  ChainState& x = stepper_.state();
  ChainMode& mode = stepper_.mode();
  ledger_.start(x, mode, static_cast<double>(start));
  result_.initial = Ledger::storage(x);
  observer_.on_start(ledger_.sample(start, x, mode, false, false));

  const TimeZone& off = sc_.site.zone;
  const Instant output_step = std::max<Instant>(1, std::llround(sc_.simulation.output_interval_s));
  Instant next_output = start + output_step;
  const CivilTime c0 = to_civil(start, off);
  int month_year = c0.year;
  int month = c0.month;
  auto next_month_start = [&]() {
    int y = month_year, mo = month + 1;
    if (mo > 12) {
      mo = 1;
      ++y;
    }
    return month_start(y, mo, off);
  };
  Instant next_month = next_month_start();
  const bool hourly_load = sc_.battery.load_profile_W.size() == 24;

  std::size_t span = 0;  // the covered span at or after t
  Instant t = start;
  while (!end || t < *end) {
    if (options_.stop && options_.stop->load(std::memory_order_relaxed)) throw Interrupted();
    // The segment [t, next) ends at the first of: the end, an output, a month, a load hour, a
    // change of rain, a diverter reset, the edge of the record's data. The boundaries that do
    // not depend on the record come first; the record is then made final up to them, so that
    // how it arrives cannot move a boundary.
    Instant next = std::min(next_output, next_month);
    if (end) next = std::min(next, *end);
    Forcing f;
    if (hourly_load) {
      // The next full hour on the local clock, or the next change of its offset if sooner.
      Instant offset_until = 0;
      const Instant o = off.offset_s(t, &offset_until);
      const Instant hour =
          detail::floor_div(t + o, detail::kHour_s) * detail::kHour_s + detail::kHour_s - o;
      next = std::min({next, hour, offset_until});
      f.load_W = battery_load_W(sc_.battery, to_civil(t, off).hour);
    } else {
      f.load_W = sc_.battery.load_W;
    }
    f.evaporation_m_per_s = evaporation_rate_m_per_s(sc_.reservoir, month);
    rain_.need(next);
    learn_end();
    if (end) next = std::min(next, *end);

    const std::span<const RainPulse> pulses = rain_.pulses_from(t);
    if (!pulses.empty() && pulses.front().start <= t) {
      const RainPulse& p = pulses.front();
      f.rain_m_per_s = intensity_m_per_s(p);
      // Back-to-back intervals of the same intensity are one forcing: no solver restart between.
      std::size_t last = 0;
      while (last + 1 < pulses.size() && pulses[last].end < next &&
             pulses[last + 1].start == pulses[last].end &&
             intensity_m_per_s(pulses[last + 1]) == f.rain_m_per_s) {
        ++last;
      }
      next = std::min(next, pulses[last].end);
    } else if (!pulses.empty()) {
      next = std::min(next, pulses.front().start);
    }
    if (sc_.first_flush.volume_m3 > 0.0 && x[kFlush] > 0.0 && f.rain_m_per_s == 0.0) {
      const double reset_at = last_wet_s_ + sc_.first_flush.reset_after_dry_s;
      const Instant reset = static_cast<Instant>(std::ceil(reset_at));
      if (reset <= t) {
        // The diverter has drained to waste: the next event is diverted afresh.
        x[kFlush] = 0.0;
      } else {
        next = std::min(next, reset);
      }
    }

    bool frozen = false;
    if (policy != GapPolicy::zero) {
      const std::vector<TimeSpan>& covered = rain_.covered();
      while (span < covered.size() && covered[span].end <= t) ++span;
      if (span < covered.size() && covered[span].start <= t) {
        next = std::min(next, covered[span].end);
      } else {
        const TimeSpan gap = missing_from(t, end);
        if (policy == GapPolicy::error) {
          learn_end();
          missing_data(gap, start, *end);
        }
        frozen = true;
        next = std::min(next, gap.end);
      }
    }
    if (frozen) {
      stepper_.stats().skipped_s += static_cast<double>(next - t);
    } else {
      stepper_.advance(t, next, f);
      if (f.rain_m_per_s > 0.0) last_wet_s_ = static_cast<double>(next);
    }
    t = next;
    if (!end && rain_.final_before() <= t) {
      rain_.need(t + 1);
      learn_end();
    }
    const bool is_end = end && t >= *end;
    const bool is_output = t >= next_output || is_end;
    const bool is_month = t >= next_month || is_end;
    if (is_output || is_month) {
      if (is_end) ledger_.close_all(x, static_cast<double>(t));
      observer_.on_sample(ledger_.sample(t, x, mode, is_output, is_month));
    }
    while (next_output <= t) next_output += output_step;
    if (t >= next_month) {
      const CivilTime c = to_civil(t, off);
      month_year = c.year;
      month = c.month;
      next_month = next_month_start();
    }
  }
  result_.end = *end;

  result_.totals = ledger_.accounts(x);
  result_.final = Ledger::storage(x);
  static_cast<EpisodeCounts&>(result_) = ledger_.counts();
  result_.stats = stepper_.stats();
  const Accounts& a = result_.totals;
  const double out = a.roof_loss_m3 + a.first_flush_m3 + a.reservoir_overflow_m3 +
                     a.column_overflow_m3 + a.nozzle_m3 + a.evaporation_m3;
  const double stored = result_.final.water_m3() - result_.initial.water_m3();
  result_.balance_error_m3 = a.rain_m3 - out - stored;
  const double scale = std::max({a.rain_m3, std::abs(result_.initial.water_m3()), 1e-9});
  result_.balance_relative_error = std::abs(result_.balance_error_m3) / scale;
  if (!(result_.balance_relative_error <= kMaxBalanceError)) {
    std::ostringstream msg;
    msg << "the water balance does not close: error " << result_.balance_error_m3 * 1e3 << " L of "
        << a.rain_m3 * 1e3 << " L rain (relative " << result_.balance_relative_error << ", limit "
        << kMaxBalanceError << ")";
    stepper_.fail(msg.str(), static_cast<double>(t));
  }
  return result_;
}

}  // namespace
}  // namespace detail

RunResult simulate(const Scenario& scenario, RainView& rain, Observer& observer,
                   const RunOptions& options) {
  detail::Engine engine(scenario, rain, observer, options);
  return engine.run();
}

RunResult simulate(const Scenario& scenario, const RainSeries& rain, Observer& observer,
                   const RunOptions& options) {
  RainView view(rain);
  return simulate(scenario, view, observer, options);
}

}  // namespace gutterwatt
