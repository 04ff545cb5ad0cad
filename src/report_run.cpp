// The run page (see report_run.hpp): one function per section, in page order.

#include "report_run.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <map>
#include <optional>
#include <utility>

#include "chart.hpp"
#include "detail.hpp"
#include "gutterwatt/accounts.hpp"
#include "report_files.hpp"
#include "report_format.hpp"
#include "report_page.hpp"
#include "report_run_figures.hpp"

namespace gutterwatt::detail {
namespace {

namespace fs = std::filesystem;

struct EventStats {
  std::size_t count = 0;
  double volume_L = 0.0, energy_Wh = 0.0, longest_s = 0.0, largest_L = 0.0;
};

/// What a run folder holds, read once, and what every section derives from it.
struct Run {
  Timeseries ts;
  std::vector<Event> events;
  Summary summary;
  std::optional<Trace> trace;  ///< absent under simulation.trace: off
  std::string step;            ///< the output interval, as text
  Window all;                  ///< every row
  bool thinned;                ///< more rows than display columns
  std::string folder;
  std::string title;  ///< the scenario and the period it covers
  UnitSystem units;   ///< of the page
};

std::string title_section(const Run& run) {
  const Timeseries& ts = run.ts;
  const Summary& s = run.summary;
  const std::string& step = run.step;
  std::string body;
  body += "<header>\n<h1>" + escape(run.title) + "</h1>\n<p>" + escape(s.site) + " &middot; " +
          escape(s.start) + " to " + escape(s.end) + " &middot; " + std::to_string(ts.size()) +
          " rows of " + step + "</p>\n</header>\n";
  return body;
}

/// Every warning of the run and of the design check, near the top: what may make the figures
/// below wrong.
std::string warnings_section(const Run& run) {
  const Summary& s = run.summary;
  std::string body = "<section class=\"first\" id=\"warnings\">\n<h2>Warnings</h2>\n";
  if (s.run_warnings.empty() && s.design_warnings.empty()) {
    return body +
           "<p class=\"note\">The run and the design check gave no warnings.</p>\n"
           "</section>\n";
  }
  const auto list = [&](const std::vector<std::string>& items, const std::string& lead) {
    if (items.empty()) return;
    body += "<p>" + lead + "</p>\n<ul class=\"warnings\">\n";
    for (const std::string& w : items) body += "<li>" + escape(w) + "</li>\n";
    body += "</ul>\n";
  };
  list(s.run_warnings, "From the run (the rain record and how it was read):");
  list(s.design_warnings, "From the design check (as <code>gutterwatt check</code> gives them):");
  return body + "</section>\n";
}

std::string headline_section(const Run& run) {
  const Summary& s = run.summary;
  std::string body;
  const double overflow_L = s.reservoir_overflow_L + s.column_overflow_L;
  const double reached_L = s.roof_runoff_L - s.first_flush_L;
  // Every share on the page is of roof runoff, as in the terminal's table.
  const auto share = [&](double litres) { return percent_of(litres, s.roof_runoff_L); };
  body +=
      "<section class=\"first\" id=\"headline\">\n<h2>Headline</h2>\n<p class=\"lead\">The "
      "system delivered <strong>" +
      with_unit(s.electrical_Wh, "Wh") + "</strong> of electrical energy in <strong>" +
      pretty(s.cycles) + "</strong> release cycles. Of " + quantity(run.units, s.rain_L, "L") +
      " of rain on the roof, " + quantity(run.units, s.roof_runoff_L, "L") +
      " ran off it. Of that roof runoff, " + quantity(run.units, s.through_nozzle_L, "L") + " (" +
      share(s.through_nozzle_L) + ") passed the nozzle, " + quantity(run.units, overflow_L, "L") +
      " (" + share(overflow_L) + ") overflowed and " + quantity(run.units, s.dribble_L, "L") +
      " (" + share(s.dribble_L) + ") dribbled through at low head." +
      (s.realizations ? " This is the first of " + pretty(s.realizations->draws.n) +
                            " disaggregations of the record: their median and range, the figures "
                            "to quote, are under <a href=\"#range\">How sure</a>."
                      : std::string()) +
      "</p>\n";
  body += "<div class=\"tables\">\n<table>\n<caption>Energy</caption>\n<tbody>\n";
  body += row_html("Electrical energy generated", with_unit(s.electrical_Wh, "Wh"));
  body += row_html("stored in the battery", with_unit(s.stored_Wh, "Wh"), "", true);
  body += row_html("curtailed (battery full or at its charge limit)",
                   with_unit(s.curtailed_Wh, "Wh"), "", true);
  body += row_html("Jet energy at the nozzle", with_unit(s.jet_Wh, "Wh"));
  body += row_html("Load not served", with_unit(s.unmet_load_Wh, "Wh"));
  if (s.load_served_share) {
    body +=
        row_html("share of the load served", pretty(*s.load_served_share * 100.0) + " %", "", true);
  }
  if (s.discharge_loss_Wh) {
    body += row_html("Battery discharge loss", with_unit(*s.discharge_loss_Wh, "Wh"));
  }
  if (s.self_discharge_Wh) {
    body += row_html("Battery self-discharge", with_unit(*s.self_discharge_Wh, "Wh"));
  }
  if (s.battery_hours_below_half) {
    body += row_html("Battery below half charge", with_unit(*s.battery_hours_below_half, "h"));
  }
  if (s.battery_hours_empty) {
    body += row_html("Battery empty (load cut)", with_unit(*s.battery_hours_empty, "h"));
  }
  body += row_html("Release cycles", pretty(s.cycles));
  body += row_html("Overflow episodes", pretty(s.overflow_events));
  body += row_html("hours overflowing", with_unit(s.overflow_hours, "h"), "", true);
  if (s.evaporation_L) body += row_html("Evaporated", quantity(run.units, *s.evaporation_L, "L"));
  if (s.standing_days_total) {
    body +=
        row_html("Water standing (release not running)", with_unit(*s.standing_days_total, "days"));
  }
  if (s.standing_longest_days) {
    body += row_html("longest spell", with_unit(*s.standing_longest_days, "days"), "", true);
  }
  if (s.standing_spells_over_7_days) {
    body += row_html("spells over 7 days (mosquitoes breed in about 7)",
                     pretty(*s.standing_spells_over_7_days), "", true);
  }
  if (s.trigger_mm) body += row_html("Trigger level", quantity(run.units, *s.trigger_mm, "mm"));
  if (s.break_mm) body += row_html("Break level", quantity(run.units, *s.break_mm, "mm"));
  if (s.rim_mm) body += row_html("Rim level", quantity(run.units, *s.rim_mm, "mm"));
  body +=
      "</tbody>\n</table>\n<table>\n<caption>Water</caption>\n<thead><tr><th></th><th "
      "class=\"n\">volume</th><th class=\"n\">share of roof runoff</th></tr></thead>\n"
      "<tbody>\n";
  body += row_html("Rain on the roof", quantity(run.units, s.rain_L, "L"));
  body +=
      row_html("roof loss (wetting, drying)", quantity(run.units, s.roof_loss_L, "L"), "", true);
  body +=
      row_html("Roof runoff", quantity(run.units, s.roof_runoff_L, "L"), share(s.roof_runoff_L));
  body += row_html("first flush diverted", quantity(run.units, s.first_flush_L, "L"),
                   share(s.first_flush_L), true);
  body += row_html("reached the reservoir", quantity(run.units, reached_L, "L"), share(reached_L),
                   true);
  body += row_html("Through the nozzle", quantity(run.units, s.through_nozzle_L, "L"),
                   share(s.through_nozzle_L));
  body += row_html("of which dribble (release not running)", quantity(run.units, s.dribble_L, "L"),
                   share(s.dribble_L), true);
  body += row_html("Overflow at the reservoir rim",
                   quantity(run.units, s.reservoir_overflow_L, "L"), share(s.reservoir_overflow_L));
  body += row_html("Overflow at the head column", quantity(run.units, s.column_overflow_L, "L"),
                   share(s.column_overflow_L));
  body += row_html("Change in storage", quantity(run.units, s.storage_change_L, "L"),
                   share(s.storage_change_L));
  body += row_html("Balance error", quantity(run.units, s.balance_error_L, "L"),
                   share(s.balance_error_L));
  body += "</tbody>\n</table>\n</div>\n</section>\n";
  return body;
}

// After several realizations: this run's figures beside the realizations' median and P10 to
// P90, and those with the calibration record resampled (the range to quote) when there are some.
std::string range_section(const Run& run) {
  const Summary& s = run.summary;
  if (!s.realizations) return "";
  const RealizationRanges& r = *s.realizations;
  const auto value = [&](const RealizationColumn& c, double v) {
    return c.unit == "L"    ? quantity(run.units, v, "L")
           : c.unit.empty() ? pretty(v)
                            : with_unit(v, std::string(c.unit).c_str());
  };
  const auto range = [&](const RealizationColumn& c, const Spread& x) {
    return value(c, x.p10) + " to " + value(c, x.p90);
  };
  const bool resampled = r.resampled.has_value();
  std::string body =
      "<section id=\"range\">\n<h2>How sure</h2>\n<p>The record was disaggregated " +
      pretty(r.draws.n) +
      " times, each with its own seed; this page shows the first. The median and the P10 to P90 "
      "range of those runs spread the draws only.";
  if (resampled) {
    body += " " + pretty(r.resampled->n) +
            " more runs, with the same seeds, each drew on a resample of the calibration record's "
            "wet spells: their range also holds what one short calibration record leaves unknown, "
            "and is <strong>the range to quote</strong>. Measured against long invented records, "
            "even that range often missed the true value (README, \"How sure the range is\"): "
            "read it as the least the estimate is unsure by.";
  }
  body +=
      "</p>\n<table>\n<thead><tr><th></th><th class=\"n\">this run</th><th "
      "class=\"n\">median</th><th class=\"n\">P10 to P90</th>";
  if (resampled) {
    body +=
        "<th class=\"n\">median, calibration resampled</th><th class=\"n\">P10 to P90, "
        "calibration resampled</th>";
  }
  body += "</tr></thead>\n<tbody>\n";
  for (std::size_t i = 0; i < std::size(kRealizationColumns); ++i) {
    const RealizationColumn& c = kRealizationColumns[i];
    const Spread& draws = r.draws.spreads[i];
    body += "<tr><td>" + std::string(c.label) + "</td><td class=\"n\">" + value(c, r.own[i]) +
            "</td><td class=\"n\">" + value(c, draws.p50) + "</td><td class=\"n\">" +
            range(c, draws) + "</td>";
    if (resampled) {
      const Spread& more = r.resampled->spreads[i];
      body += "<td class=\"n\">" + value(c, more.p50) + "</td><td class=\"n\">" + range(c, more) +
              "</td>";
    }
    body += "</tr>\n";
  }
  body += "</tbody>\n</table>\n</section>\n";
  return body;
}

std::string season_section(const Run& run, std::vector<std::string>& charts) {
  const Timeseries& ts = run.ts;
  const std::vector<Event>& events = run.events;
  const Summary& s = run.summary;
  const std::string& step = run.step;
  const Window& all = run.all;
  const bool thinned = run.thinned;
  std::string body;
  TimeFigure fig(all.t_lo, all.t_hi);
  add_rain_and_level(fig, ts, s, events, all, step, 110.0, 200.0, run.units);
  charts.push_back("chart-rain-level");
  body += "<section id=\"season\">\n<h2>Rain, reservoir level and release state</h2>\n";
  body +=
      figure(fig.svg("chart-rain-level", "Rain and reservoir level over the run"),
             "Rain per output interval above the reservoir level at the end of each "
             "interval. Dashed lines: the release trigger and break levels; solid: the "
             "overflow rim. Shading: the release state at the end of each interval; ticks along "
             "the top: the start of each release cycle (events.csv)." +
                 std::string(thinned ? " Thinned for display (min/max per bucket, see "
                                       "<a href=\"#reading\">Reading the charts</a>)."
                                     : ""));
  body += "</section>\n";
  return body;
}

std::string energy_section(const Run& run, std::vector<std::string>& charts) {
  const Timeseries& ts = run.ts;
  const Summary& s = run.summary;
  const Window& all = run.all;
  std::string body;
  TimeFigure fig(all.t_lo, all.t_hi);
  Panel& p = fig.add("Electrical power, W (mean over each interval)", 150.0);
  p.lines.push_back(line_of(ts, ts.power_W, all, kVermillion, 1.2));
  Panel& c = fig.add("Cumulative electrical energy, Wh", 150.0);
  c.lines.push_back(line_of(ts, ts.cum_energy_Wh, all, kVermillion, 1.8));
  charts.push_back("chart-energy");
  body += "<section id=\"energy\">\n<h2>Power and energy</h2>\n";
  body += figure(fig.svg("chart-energy", "Electrical power and cumulative energy"),
                 "Power delivered by the generator and the energy summed from the start of the "
                 "run. Season total: " +
                     with_unit(s.electrical_Wh, "Wh") + ".");
  TimeFigure bat(all.t_lo, all.t_hi);
  Panel& b = bat.add("Battery state of charge, %", 130.0);
  b.y_top = 100.0;
  b.lines.push_back(line_of(ts, ts.battery_soc, all, kGreen, 1.6, 100.0));
  charts.push_back("chart-battery");
  body += figure(bat.svg("chart-battery", "Battery state of charge"),
                 "State of charge at the end of each interval. Curtailed while full: " +
                     with_unit(s.curtailed_Wh, "Wh") +
                     "; load not served while empty: " + with_unit(s.unmet_load_Wh, "Wh") + ".");
  body += "</section>\n";
  return body;
}

std::string months_section(const Run& run, std::vector<std::string>& charts) {
  const Summary& s = run.summary;
  std::string body;
  body += "<section id=\"months\">\n<h2>Month by month</h2>\n";
  if (s.months.empty()) {
    body += "<p class=\"note\">summary.json lists no months.</p>\n";
  } else {
    charts.push_back("chart-monthly");
    const UnitSystem units = run.units;
    body += figure(monthly_svg(s.months, units),
                   "Electrical energy and overflow in each calendar month.");
    body += "<table>\n<thead><tr><th>month</th><th class=\"n\">rain, " + unit_in(units, "mm") +
            "</th><th class=\"n\">energy, Wh</th><th class=\"n\">overflow, " + unit_in(units, "L") +
            "</th><th class=\"n\">cycles</th></tr></thead>\n<tbody>\n";
    for (const auto& m : s.months) {
      body += "<tr><td>" + escape(m.month) + "</td><td class=\"n\">" +
              pretty(in_units(units, m.rain_mm, "mm").value) + "</td><td class=\"n\">" +
              pretty(m.energy_Wh) + "</td><td class=\"n\">" +
              pretty(in_units(units, m.overflow_L, "L").value) + "</td><td class=\"n\">" +
              pretty(m.cycles) + "</td></tr>\n";
    }
    body += "</tbody>\n</table>\n";
  }
  body += "</section>\n";
  return body;
}

/// The busiest day, drawn from the trace (from every row of timeseries.csv without one); a note
/// when the run has none.
std::string busiest_day_closeup(const Run& run, std::vector<std::string>& charts) {
  const Timeseries& ts = run.ts;
  const std::vector<Event>& events = run.events;
  std::string body;
  if (const auto day = busiest_day(ts)) {
    const double t_lo = static_cast<double>(*day);
    const Window w = window_of(ts, t_lo, t_lo + kDay_s);
    double energy = 0.0, rain = 0.0;
    for (std::size_t i = w.i0; i < w.i1; ++i) {
      energy += ts.energy_Wh[i];
      rain += ts.rain_mm[i];
    }
    std::size_t cycles = 0;
    for (const auto& e : events) {
      if (e.kind == EpisodeKind::cycle && e.start >= *day && e.start < *day + kDay_s) ++cycles;
    }
    TimeFigure fig(w.t_lo, w.t_hi);
    if (run.trace) {
      add_rain(fig, ts, w, run.step, 90.0, run.units);
      add_trace_level(fig, *run.trace, run.summary, events, w.t_lo, w.t_hi, 160.0, run.units);
      add_trace_power(fig, *run.trace, w.t_lo, w.t_hi, 110.0);
    } else {
      add_rain_and_level(fig, ts, run.summary, events, w, run.step, 90.0, 160.0, run.units);
      Panel& p = fig.add("Electrical power, W (mean over each interval)", 110.0);
      p.lines.push_back(line_of(ts, ts.power_W, w, kVermillion, 1.4));
    }
    charts.push_back("chart-busiest-day");
    body += "<div class=\"closeup\">\n<h3>Busiest day: " + date_label(*day) + "</h3>\n";
    body += figure(fig.svg("chart-busiest-day", "The busiest day, " + date_label(*day)),
                   "The day with the most electrical energy (" + with_unit(energy, "Wh") + ", " +
                       std::to_string(cycles) + " cycles starting that day, " +
                       quantity(run.units, rain, "mm") + " of rain).") +
            "</div>\n";
  } else {
    body += "<p class=\"note\">No rain and no energy in this run: there is no busiest day.</p>\n";
  }
  return body;
}

/// The largest overflow episode with the hours around it, drawn from the trace (from every row
/// of timeseries.csv without one); a note when the run has none.
std::string overflow_closeup(const Run& run, std::vector<std::string>& charts) {
  const Timeseries& ts = run.ts;
  const std::vector<Event>& events = run.events;
  const std::string& step = run.step;
  std::string body;
  const Event* largest = nullptr;
  for (const auto& e : events) {
    if (!episode_makes_energy(e.kind) && (largest == nullptr || e.volume_L > largest->volume_L)) {
      largest = &e;
    }
  }
  if (largest != nullptr) {
    const double pad =
        std::max(6.0 * kHour_s, 0.5 * static_cast<double>(largest->end - largest->start));
    const double t_lo = std::max(static_cast<double>(largest->start) - pad, run.all.t_lo);
    const double t_hi = std::min(static_cast<double>(largest->end) + pad, run.all.t_hi);
    const Window w = window_of(ts, t_lo, std::max(t_hi, t_lo + 1.0));
    std::vector<double> spill(ts.size(), 0.0);
    for (std::size_t i = 0; i < ts.size(); ++i) {
      spill[i] = ts.reservoir_overflow_L[i] + ts.column_overflow_L[i];
    }
    TimeFigure fig(w.t_lo, w.t_hi);
    Panel* flows = nullptr;
    if (run.trace) {
      add_rain(fig, ts, w, step, 90.0, run.units);
      add_trace_level(fig, *run.trace, run.summary, events, w.t_lo, w.t_hi, 160.0, run.units);
      flows = &add_trace_flows(fig, *run.trace, w.t_lo, w.t_hi, 130.0, run.units);
    } else {
      add_rain_and_level(fig, ts, run.summary, events, w, step, 90.0, 160.0, run.units);
      double bucket_s = 0.0;
      BarSet bars = bars_of(ts, values_in(run.units, spill, "L"), w, kBlue, &bucket_s);
      flows = &fig.add("Overflow (reservoir rim and head column), " + unit_in(run.units, "L") +
                           " per " + step + " interval" +
                           (bucket_s > 0.0 ? " (" + thinning_note(bucket_s) + ")" : ""),
                       110.0);
      flows->bars.push_back(std::move(bars));
    }
    Panel& p = *flows;
    p.bands.push_back(
        {{static_cast<double>(largest->start)}, {static_cast<double>(largest->end)}, kBlack, 0.10});
    p.legend.push_back({LegendEntry::kBand, kBlack, "", "the episode", 0.10});
    charts.push_back("chart-overflow-episode");
    const std::string where =
        largest->kind == EpisodeKind::overflow ? "reservoir rim" : "head column";
    body +=
        "<div class=\"closeup\">\n<h3>Largest overflow episode: " + stamp_label(largest->start) +
        " to " + stamp_label(largest->end) + "</h3>\n";
    body += figure(fig.svg("chart-overflow-episode", "The largest overflow episode"),
                   quantity(run.units, largest->volume_L, "L") + " over the " + where + " in " +
                       duration_text(largest->duration_s) + ", peak " +
                       quantity(run.units, largest->peak_flow_L_per_s, "L_per_s") +
                       ", shown with the hours around it.") +
            "</div>\n";
  } else {
    body += "<p class=\"note\">No overflow episode in this run.</p>\n";
  }
  return body;
}

/// The typical cycle: of the release cycles, the one of median volume (the earlier of two), from
/// the end of the cycle before it (at most three hours back) to a little after its break.
const Event* typical_cycle(const std::vector<Event>& events) {
  std::vector<const Event*> cycles;
  for (const auto& e : events) {
    if (e.kind == EpisodeKind::cycle) cycles.push_back(&e);
  }
  if (cycles.empty()) return nullptr;
  std::vector<const Event*> by_volume = cycles;
  std::stable_sort(by_volume.begin(), by_volume.end(),
                   [](const Event* a, const Event* b) { return a->volume_L < b->volume_L; });
  return by_volume[(by_volume.size() - 1) / 2];
}

/// One typical release cycle from the trace: the fill, any dribble, the start (priming), the run
/// at full bore and the break, with the set-points; a note without a cycle or a trace.
std::string typical_cycle_closeup(const Run& run, std::vector<std::string>& charts) {
  const Event* cycle = typical_cycle(run.events);
  if (cycle == nullptr) return "<p class=\"note\">No release cycle in this run.</p>\n";
  if (!run.trace) {
    return "<p class=\"note\">No trace.csv in this folder (simulation.trace: off): the typical "
           "cycle cannot be drawn.</p>\n";
  }
  // The fill: from the end of the cycle before (at most three hours back).
  const auto start = static_cast<double>(cycle->start);
  const auto end = static_cast<double>(cycle->end);
  double fill_from = std::max(start - 3.0 * kHour_s, run.all.t_lo);
  for (const auto& e : run.events) {
    if (e.kind == EpisodeKind::cycle && e.end <= cycle->start) {
      fill_from = std::max(fill_from, static_cast<double>(e.end));
    }
  }
  const double t_lo = std::max(fill_from - 0.1 * (start - fill_from), run.all.t_lo);
  const double t_hi = std::min(end + std::max(0.25 * (end - t_lo), 300.0), run.all.t_hi);
  TimeFigure fig(t_lo, t_hi);
  add_trace_level(fig, *run.trace, run.summary, run.events, t_lo, t_hi, 180.0, run.units);
  Panel& flows = add_trace_flows(fig, *run.trace, t_lo, t_hi, 130.0, run.units);
  flows.bands.push_back({{start}, {end}, kBlack, 0.08});
  flows.legend.push_back({LegendEntry::kBand, kBlack, "", "the cycle", 0.08});
  add_trace_power(fig, *run.trace, t_lo, t_hi, 110.0);
  charts.push_back("chart-typical-cycle");
  std::string body = "<div class=\"closeup\">\n<h3>A typical cycle: " + stamp_label(cycle->start) +
                     " to " + stamp_label(cycle->end) + "</h3>\n";
  body += figure(
      fig.svg("chart-typical-cycle", "A typical release cycle"),
      "The cycle of median volume (" + quantity(run.units, cycle->volume_L, "L") + " in " +
          duration_text(cycle->duration_s) + ", " + with_unit(cycle->energy_Wh, "Wh") +
          "). Read from left to right: the reservoir fills; where the level passes the lip "
          "water dribbles through unsealed (orange); once the flow primes the release it runs "
          "at full bore (green) and the level falls until it breaks at the break level, and "
          "the fill starts again. Drawn from trace.csv: every switch, and a point at least "
          "every minute while anything moves.");
  return body + "</div>\n";
}

std::string closeups_section(const Run& run, std::vector<std::string>& charts) {
  std::string body = "<section id=\"closeups\">\n<h2>Close-ups</h2>\n";
  body += typical_cycle_closeup(run, charts);
  body += busiest_day_closeup(run, charts);
  body += overflow_closeup(run, charts);
  return body + "</section>\n";
}

std::string events_section(const Run& run) {
  const std::vector<Event>& events = run.events;
  std::string body;
  std::map<EpisodeKind, EventStats> by_kind;
  for (const auto& e : events) {
    EventStats& st = by_kind[e.kind];
    ++st.count;
    st.volume_L += e.volume_L;
    if (!std::isnan(e.energy_Wh)) st.energy_Wh += e.energy_Wh;
    st.longest_s = std::max(st.longest_s, e.duration_s);
    st.largest_L = std::max(st.largest_L, e.volume_L);
  }
  body +=
      "<section id=\"events\">\n<h2>Events</h2>\n<table>\n<thead><tr><th>kind</th><th "
      "class=\"n\">count</th><th class=\"n\">volume, " +
      unit_in(run.units, "L") + "</th><th class=\"n\">largest, " + unit_in(run.units, "L") +
      "</th><th class=\"n\">longest</th><th class=\"n\">energy, Wh</th></tr></thead>\n"
      "<tbody>\n";
  for (const EpisodeKindInfo& kind : episode_kinds()) {
    const EventStats st = by_kind.count(kind.kind) ? by_kind.at(kind.kind) : EventStats{};
    body += "<tr><td>" + std::string(kind.words) + "</td><td class=\"n\">" +
            std::to_string(st.count) + "</td><td class=\"n\">" +
            pretty(in_units(run.units, st.volume_L, "L").value) + "</td><td class=\"n\">" +
            pretty(in_units(run.units, st.largest_L, "L").value) + "</td><td class=\"n\">" +
            (st.count > 0 ? duration_text(st.longest_s) : "&ndash;") + "</td><td class=\"n\">" +
            (kind.makes_energy ? pretty(st.energy_Wh) : "&ndash;") + "</td></tr>\n";
  }
  body += "</tbody>\n</table>\n</section>\n";
  return body;
}

std::string reading_section(const Run& run) {
  const Timeseries& ts = run.ts;
  const std::vector<Event>& events = run.events;
  const bool thinned = run.thinned;
  std::string body;
  body += "<section id=\"reading\">\n<h2>Reading the charts</h2>\n";
  body +=
      "<p>Every value belongs to the interval that ends at its time stamp (period-ending); "
      "times read as they do in the files. Release-state shading shows the state at the end "
      "of each interval: green for full-bore flow (a running siphon or an open valve), orange "
      "for dribble, none for idle or closed.</p>\n";
  body += "<p><strong>Thinning.</strong> A chart with more intervals than about " +
          std::to_string(kBuckets) +
          " display columns is thinned by the <em>min/max-per-bucket</em> method: the time axis "
          "is cut into equal buckets; a line keeps the lowest and the highest value in each "
          "bucket (and the first and last), and a bar shows the tallest single interval in its "
          "bucket, so peaks and troughs stay in view while the page stays small. In a thinned "
          "chart a bucket is shaded green if full-bore flow occurs in it at all, else orange if "
          "dribble does. ";
  body += thinned
              ? "The season charts here are thinned (" + std::to_string(ts.size()) + " rows).</p>\n"
              : "This run is short enough that every row is drawn.</p>\n";
  body += run.trace ? "<p><strong>Close-ups.</strong> The close-ups draw the level, the flows "
                      "and the power from trace.csv (" +
                          std::to_string(run.trace->size()) +
                          " points): the state at every switch of mode and at least every "
                          "minute while anything moves; nothing is written while the chain "
                          "rests, where the lines run straight. Rain is per output "
                          "interval.</p>\n"
                    : "<p><strong>Close-ups.</strong> This folder has no trace.csv "
                      "(simulation.trace: off), so the close-ups are drawn from every row of "
                      "timeseries.csv: a release cycle of minutes does not show at that "
                      "step.</p>\n";
  body +=
      "<p>Colours follow a palette chosen to stay distinct with common colour-vision "
      "deficiencies. Inputs: timeseries.csv (" +
      std::to_string(ts.size()) + " rows), events.csv (" + std::to_string(events.size()) +
      " events) and summary.json in " + escape(run.folder) + ".</p>\n</section>\n";
  return body;
}

}  // namespace

std::string render_run(const fs::path& dir, std::optional<UnitSystem> units) {
  std::error_code ec;
  std::optional<Trace> trace;
  if (fs::exists(dir / "trace.csv", ec)) trace = read_trace(dir / "trace.csv");
  Run run{read_timeseries(dir / "timeseries.csv"),
          read_events(dir / "events.csv"),
          read_summary(dir / "summary.json"),
          std::move(trace),
          "",
          {},
          false,
          dir.filename().string(),
          "",
          UnitSystem::si};
  run.units = units.value_or(run.ts.units);
  const Timeseries& ts = run.ts;
  run.step = duration_text(*std::max_element(ts.dt_s.begin(), ts.dt_s.end()));
  run.all = {0, ts.size(), static_cast<double>(ts.t.front()) - ts.dt_s.front(),
             static_cast<double>(ts.t.back())};
  run.thinned = ts.size() > kBuckets;
  run.title = run.summary.scenario + ": " +
              period_label(static_cast<std::int64_t>(run.all.t_lo), ts.t.back());

  std::vector<std::string> charts;
  std::string body = title_section(run);
  body += warnings_section(run);
  body += headline_section(run);
  body += range_section(run);
  body += season_section(run, charts);
  body += energy_section(run, charts);
  body += months_section(run, charts);
  body += closeups_section(run, charts);
  body += events_section(run);
  body += reading_section(run);
  return page_open(run.title, charts) + body + page_close();
}

}  // namespace gutterwatt::detail
