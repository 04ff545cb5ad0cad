// The report's readers (see report_files.hpp).

#include "report_files.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <fstream>
#include <limits>
#include <nlohmann/json.hpp>
#include <sstream>
#include <stdexcept>
#include <system_error>
#include <utility>

#include "detail.hpp"
#include "gutterwatt/accounts.hpp"
#include "gutterwatt/calendar.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/output.hpp"
#include "gutterwatt/sweep.hpp"

namespace gutterwatt::detail {

namespace fs = std::filesystem;

std::string read_text(const fs::path& path) {
  std::error_code ec;
  if (!fs::exists(path, ec)) throw InputError(path.string(), 0, "", "file not found");
  if (fs::is_directory(path, ec)) throw InputError(path.string(), 0, "", "is a directory");
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path.string(), 0, "", "cannot read file");
  std::ostringstream text;
  text << in.rdbuf();
  if (in.bad()) throw InputError(path.string(), 0, "", "cannot read file");
  return text.str();
}

int Csv::find(std::string_view name) const {
  for (std::size_t i = 0; i < header.size(); ++i) {
    if (header[i] == name) return static_cast<int>(i);
  }
  return -1;
}

std::size_t Csv::require(std::string_view name) const {
  const int i = find(name);
  if (i < 0) throw InputError(file, 1, std::string(name), "missing column");
  return static_cast<std::size_t>(i);
}

std::pair<std::size_t, UnitSystem> Csv::require_either(std::string_view si_name) const {
  for (const UnitSystem units : {UnitSystem::si, UnitSystem::us}) {
    const int i = find(column_name(units, si_name));
    if (i >= 0) return {static_cast<std::size_t>(i), units};
  }
  const std::string us = column_name(UnitSystem::us, si_name);
  throw InputError(
      file, 1, std::string(si_name),
      us == si_name ? "missing column" : "missing column (nor its US twin " + us + ")");
}

// RFC 4180 style: comma separated, fields may be quoted with "" for a quote inside. A UTF-8
// byte-order mark, CRLF line ends and blank lines are accepted.
Csv parse_csv(std::string_view text, const std::string& file) {
  Csv csv;
  csv.file = file;
  if (text.starts_with(kByteOrderMark)) text.remove_prefix(kByteOrderMark.size());
  std::size_t pos = 0;
  int line = 1;
  while (pos < text.size()) {
    const int row_line = line;
    std::vector<std::string> fields;
    std::string field;
    bool quoted = false;
    bool was_quoted = false;
    for (; pos < text.size(); ++pos) {
      const char c = text[pos];
      if (quoted) {
        if (c == '"' && pos + 1 < text.size() && text[pos + 1] == '"') {
          field += '"';
          ++pos;
        } else if (c == '"') {
          quoted = false;
        } else {
          if (c == '\n') ++line;
          field += c;
        }
      } else if (c == '"' && trim(field, " \t\r").empty()) {
        quoted = true;
        was_quoted = true;
        field.clear();
      } else if (c == ',') {
        fields.emplace_back(was_quoted ? field : std::string(trim(field, " \t\r")));
        field.clear();
        was_quoted = false;
      } else if (c == '\n') {
        break;
      } else {
        field += c;
      }
    }
    if (quoted) throw InputError(file, row_line, "", "unterminated quoted field");
    ++pos;
    ++line;
    fields.emplace_back(was_quoted ? field : std::string(trim(field, " \t\r")));
    if (fields.size() == 1 && fields[0].empty() && !was_quoted) continue;
    if (csv.header.empty()) {
      csv.header = std::move(fields);
      continue;
    }
    if (fields.size() != csv.header.size()) {
      throw InputError(file, row_line, "",
                       "expected " + std::to_string(csv.header.size()) + " fields, found " +
                           std::to_string(fields.size()));
    }
    csv.rows.push_back(std::move(fields));
    csv.lines.push_back(row_line);
  }
  if (csv.header.empty()) throw InputError(file, 0, "", "empty file (no header line)");
  return csv;
}

double parse_number(const std::string& cell, const std::string& file, int line,
                    const std::string& field) {
  if (cell.empty()) throw InputError(file, line, field, "empty value");
  const std::optional<double> value = parse_double(cell);
  if (!value) throw InputError(file, line, field, "not a number: \"" + cell + "\"");
  return *value;
}

std::optional<std::int64_t> parse_stamp(std::string_view s) {
  const std::optional<ParsedTime> p = parse_iso8601(s, 0);
  if (!p) return std::nullopt;
  return p->instant + p->offset_s;
}

namespace {

/// A stamp as the page labels it (wall clock) and as it orders (UTC, by its offset).
struct Stamp {
  std::int64_t wall;
  std::int64_t utc;
};

Stamp parse_stamp_cell(const std::string& cell, const std::string& file, int line,
                       const std::string& field) {
  const std::optional<ParsedTime> p = parse_iso8601(cell, 0);
  if (!p) {
    throw InputError(file, line, field, "not a time: \"" + cell + "\" (expected YYYY-MM-DDThh:mm)");
  }
  return {p->instant + p->offset_s, p->instant};
}

std::int64_t parse_time_cell(const std::string& cell, const std::string& file, int line,
                             const std::string& field) {
  return parse_stamp_cell(cell, file, line, field).wall;
}

ReleaseState parse_state(const std::string& cell, const std::string& file, int line) {
  for (ReleaseState state : {ReleaseState::idle, ReleaseState::dribble, ReleaseState::running,
                             ReleaseState::closed, ReleaseState::open}) {
    if (cell == release_state_name(state)) return state;
  }
  throw InputError(
      file, line, "release_state",
      "unknown state \"" + cell + "\" (expected idle, dribble, running, closed or open)");
}

}  // namespace

Timeseries read_timeseries(const fs::path& path) {
  const std::string file = path.string();
  const Csv csv = parse_csv(read_text(path), file);
  Timeseries ts;
  // The columns the page draws; every other column of the table must be there too (the header
  // is a contract) and hold numbers.
  const std::pair<std::string_view, std::vector<double>*> drawn[] = {
      {"rain_mm", &ts.rain_mm},
      {"reservoir_level_mm", &ts.level_mm},
      {"release_L", &ts.release_L},
      {"reservoir_overflow_L", &ts.reservoir_overflow_L},
      {"column_overflow_L", &ts.column_overflow_L},
      {"nozzle_L", &ts.nozzle_L},
      {"power_W", &ts.power_W},
      {"energy_Wh", &ts.energy_Wh},
      {"battery_soc", &ts.battery_soc},
      {"cum_energy_Wh", &ts.cum_energy_Wh},
      {"cum_overflow_L", &ts.cum_overflow_L}};
  struct Column {
    std::string_view name;
    std::string field;  ///< the name in the file
    std::size_t index;
    UnitSystem units;
    std::vector<double>* values;
  };
  std::vector<Column> numbers;
  std::vector<double> unused;
  std::vector<std::int64_t> utc;  // of each row
  const auto c_time = csv.require_either("time").first;
  const auto c_state = csv.require_either("release_state").first;
  for (const auto& c : timeseries_columns()) {
    const auto [index, units] = csv.require_either(c.name);
    if (c.value == nullptr) continue;
    if (c.name == "rain_mm") ts.units = units;
    std::vector<double>* values = &unused;
    for (const auto& [name, vector] : drawn) {
      if (name == c.name) values = vector;
    }
    numbers.push_back({c.name, column_name(units, c.name), index, units, values});
  }
  for (const auto& [name, vector] : drawn) {
    const auto read = [&](const Column& c) { return c.values == vector; };
    if (std::none_of(numbers.begin(), numbers.end(), read)) {
      throw std::logic_error("the page draws " + std::string(name) +
                             ", which is not a column of timeseries_columns()");
    }
  }
  if (csv.rows.empty()) throw InputError(file, 0, "", "no data rows");
  for (std::size_t r = 0; r < csv.rows.size(); ++r) {
    const auto& row = csv.rows[r];
    const int line = csv.lines[r];
    // Rows follow each other in time (UTC): a local clock repeats an hour in autumn.
    const Stamp t = parse_stamp_cell(row[c_time], file, line, "time");
    if (!utc.empty() && t.utc <= utc.back()) {
      throw InputError(file, line, "time", "not after the previous row (\"" + row[c_time] + "\")");
    }
    utc.push_back(t.utc);
    ts.t.push_back(t.wall);
    ts.state.push_back(parse_state(row[c_state], file, line));
    for (const Column& c : numbers) {
      const double v = parse_number(row[c.index], file, line, c.field);
      if (c.values != &unused) c.values->push_back(column_si_value(c.units, c.name, v));
    }
  }
  ts.dt_s.resize(ts.size());
  for (std::size_t i = 0; i < ts.size(); ++i) {
    if (i > 0) {
      ts.dt_s[i] = static_cast<double>(utc[i] - utc[i - 1]);
    } else {
      ts.dt_s[i] = ts.size() > 1 ? static_cast<double>(utc[1] - utc[0]) : 3600.0;
    }
  }
  // A gap in the record (a skipped dry spell) would make the row after it look like one long
  // interval; no interval is drawn longer than the usual step.
  std::vector<double> sorted = ts.dt_s;
  std::nth_element(sorted.begin(), sorted.begin() + sorted.size() / 2, sorted.end());
  const double step = sorted[sorted.size() / 2];
  for (double& dt : ts.dt_s) dt = std::min(dt, step);
  return ts;
}

Trace read_trace(const fs::path& path) {
  const std::string file = path.string();
  const Csv csv = parse_csv(read_text(path), file);
  Trace tr;
  // The columns the page draws, by their SI names in trace_columns().
  const std::pair<std::string_view, std::vector<double>*> drawn[] = {
      {"reservoir_level_mm", &tr.level_mm},
      {"release_L_per_s", &tr.release_L_per_s},
      {"overflow_L_per_s", &tr.overflow_L_per_s},
      {"head_m", &tr.head_m},
      {"power_W", &tr.power_W}};
  struct Column {
    std::string_view name;
    std::size_t index;
    UnitSystem units;
    std::vector<double>* values;
  };
  std::vector<Column> numbers;
  for (const auto& c : trace_columns()) {
    const auto [index, units] = csv.require_either(c.name);
    if (c.value == nullptr) continue;
    const auto it = std::find_if(std::begin(drawn), std::end(drawn),
                                 [&](const auto& d) { return d.first == c.name; });
    if (it == std::end(drawn)) {
      throw std::logic_error("trace_columns() has " + std::string(c.name) +
                             ", which the page does not read");
    }
    numbers.push_back({c.name, index, units, it->second});
  }
  const std::size_t c_time = csv.require("time");
  const std::size_t c_state = csv.require("release_state");
  std::int64_t last_utc = std::numeric_limits<std::int64_t>::min();
  for (std::size_t r = 0; r < csv.rows.size(); ++r) {
    const auto& row = csv.rows[r];
    const int line = csv.lines[r];
    const Stamp t = parse_stamp_cell(row[c_time], file, line, "time");
    if (t.utc < last_utc) {
      throw InputError(file, line, "time", "before the previous row (\"" + row[c_time] + "\")");
    }
    last_utc = t.utc;
    tr.t.push_back(t.wall);
    tr.state.push_back(parse_state(row[c_state], file, line));
    for (const Column& c : numbers) {
      const double v = parse_number(row[c.index], file, line, column_name(c.units, c.name));
      c.values->push_back(column_si_value(c.units, c.name, v));
    }
  }
  return tr;
}

std::vector<Event> read_events(const fs::path& path) {
  const std::string file = path.string();
  const Csv csv = parse_csv(read_text(path), file);
  const std::size_t c_kind = csv.require("kind");
  const std::size_t c_start = csv.require("start");
  const std::size_t c_end = csv.require("end");
  const auto [c_duration, u_duration] = csv.require_either("duration_s");
  const auto [c_volume, u_volume] = csv.require_either("volume_L");
  const auto [c_peak, u_peak] = csv.require_either("peak_flow_L_per_s");
  const auto [c_energy, u_energy] = csv.require_either("energy_Wh");
  // A number of column `si_name` found in `units`, in SI.
  const auto number = [&](const std::vector<std::string>& row, int line, std::size_t index,
                          UnitSystem units, std::string_view si_name) {
    const double v = parse_number(row[index], file, line, column_name(units, si_name));
    return column_si_value(units, si_name, v);
  };
  std::vector<Event> events;
  for (std::size_t r = 0; r < csv.rows.size(); ++r) {
    const auto& row = csv.rows[r];
    const int line = csv.lines[r];
    Event e;
    const std::optional<EpisodeKind> kind = episode_kind_from_name(row[c_kind]);
    if (!kind) {
      std::string names;
      for (const EpisodeKindInfo& k : episode_kinds()) {
        names += (names.empty()                   ? ""
                  : &k == &episode_kinds().back() ? " or "
                                                  : ", ") +
                 std::string(k.name);
      }
      throw InputError(file, line, "kind",
                       "unknown kind \"" + row[c_kind] + "\" (expected " + names + ")");
    }
    e.kind = *kind;
    e.start = parse_time_cell(row[c_start], file, line, "start");
    e.end = parse_time_cell(row[c_end], file, line, "end");
    e.duration_s = number(row, line, c_duration, u_duration, "duration_s");
    e.volume_L = number(row, line, c_volume, u_volume, "volume_L");
    e.peak_flow_L_per_s = number(row, line, c_peak, u_peak, "peak_flow_L_per_s");
    // An overflow makes no energy: its cell is empty (a number there, from an older run, is
    // energy made by a cycle at the same time, and is not the overflow's).
    e.energy_Wh = episode_makes_energy(*kind) ? number(row, line, c_energy, u_energy, "energy_Wh")
                                              : std::numeric_limits<double>::quiet_NaN();
    events.push_back(std::move(e));
  }
  return events;
}

const Json* find_key(const Json& root, std::string_view dotted) {
  const Json* node = &root;
  while (!dotted.empty()) {
    const std::size_t dot = dotted.find('.');
    const std::string part(dotted.substr(0, dot));
    if (!node->is_object()) return nullptr;
    const auto it = node->find(part);
    if (it == node->end()) return nullptr;
    node = &*it;
    dotted = dot == std::string_view::npos ? std::string_view{} : dotted.substr(dot + 1);
  }
  return node;
}

double json_number(const Json& root, const std::string& key, const std::string& file,
                   const std::string& label) {
  const std::string field = label.empty() ? key : label;
  const Json* node = find_key(root, key);
  if (node == nullptr) throw InputError(file, 0, field, "missing");
  if (!node->is_number()) throw InputError(file, 0, field, "expected a number");
  return node->get<double>();
}

std::optional<double> json_optional_number(const Json& root, const std::string& key,
                                           const std::string& file) {
  const Json* node = find_key(root, key);
  if (node == nullptr || node->is_null()) return std::nullopt;
  if (!node->is_number()) throw InputError(file, 0, key, "expected a number or null");
  return node->get<double>();
}

std::string json_string(const Json& root, const std::string& key, const std::string& file,
                        const std::string& label) {
  const std::string field = label.empty() ? key : label;
  const Json* node = find_key(root, key);
  if (node == nullptr) throw InputError(file, 0, field, "missing");
  if (!node->is_string()) throw InputError(file, 0, field, "expected a string");
  return node->get<std::string>();
}

Json parse_json(const fs::path& path) {
  const std::string text = read_text(path);
  try {
    return Json::parse(text);
  } catch (const Json::parse_error& e) {
    // nlohmann reports a byte offset; turn it into the line a person would look at.
    const std::size_t byte = std::min<std::size_t>(e.byte, text.size());
    const int line = 1 + static_cast<int>(std::count(text.begin(),
                                                     text.begin() + static_cast<long>(byte), '\n'));
    throw InputError(path.string(), line, "", "not valid JSON");
  }
}

Summary read_summary(const fs::path& path) {
  const std::string file = path.string();
  const Json root = parse_json(path);
  if (!root.is_object()) throw InputError(file, 0, "", "expected a JSON object");
  Summary s;
  s.scenario = json_string(root, "scenario", file);
  s.site = json_string(root, "site", file);
  s.start = json_string(root, "start", file);
  s.end = json_string(root, "end", file);
  // The numbers, by the keys summary_numbers() (output.hpp) defines: a key the writer does not
  // write throws std::out_of_range here, so the two cannot drift apart. The optional ones are
  // absent from summaries written before they were kept, or null where they do not apply.
  const std::pair<std::string_view, double Summary::*> required[] = {
      {"water_L.rain", &Summary::rain_L},
      {"water_L.roof_loss", &Summary::roof_loss_L},
      {"water_L.roof_runoff", &Summary::roof_runoff_L},
      {"water_L.first_flush", &Summary::first_flush_L},
      {"water_L.reservoir_overflow", &Summary::reservoir_overflow_L},
      {"water_L.column_overflow", &Summary::column_overflow_L},
      {"water_L.dribble", &Summary::dribble_L},
      {"water_L.through_nozzle", &Summary::through_nozzle_L},
      {"water_L.storage_change", &Summary::storage_change_L},
      {"water_L.balance_error", &Summary::balance_error_L},
      {"energy_Wh.jet", &Summary::jet_Wh},
      {"energy_Wh.electrical", &Summary::electrical_Wh},
      {"energy_Wh.stored", &Summary::stored_Wh},
      {"energy_Wh.curtailed", &Summary::curtailed_Wh},
      {"energy_Wh.unmet_load", &Summary::unmet_load_Wh},
      {"siphon.cycles", &Summary::cycles},
      {"overflow.events", &Summary::overflow_events},
      {"overflow.hours", &Summary::overflow_hours}};
  const std::pair<std::string_view, std::optional<double> Summary::*> optional[] = {
      {"levels_mm.trigger", &Summary::trigger_mm},
      {"levels_mm.break", &Summary::break_mm},
      {"levels_mm.rim", &Summary::rim_mm},
      {"energy_Wh.discharge_loss", &Summary::discharge_loss_Wh},
      {"energy_Wh.self_discharge", &Summary::self_discharge_Wh},
      {"battery.hours_below_half", &Summary::battery_hours_below_half},
      {"battery.hours_empty", &Summary::battery_hours_empty},
      {"battery.load_served_share", &Summary::load_served_share},
      {"water_L.evaporation", &Summary::evaporation_L},
      {"standing_water.longest_days", &Summary::standing_longest_days},
      {"standing_water.spells_over_7_days", &Summary::standing_spells_over_7_days},
      {"standing_water.days_total", &Summary::standing_days_total}};
  for (const auto& [key, member] : required) {
    s.*member = json_number(root, std::string(summary_number(key).key), file);
  }
  for (const auto& [key, member] : optional) {
    s.*member = json_optional_number(root, std::string(summary_number(key).key), file);
  }
  // Warnings: the run's and the design's; an older summary has only the record's.
  const auto strings = [&](const std::string& key, std::vector<std::string>& into) {
    const Json* list = find_key(root, key);
    if (list == nullptr || list->is_null()) return false;
    if (!list->is_array()) throw InputError(file, 0, key, "expected an array of texts");
    for (std::size_t i = 0; i < list->size(); ++i) {
      if (!(*list)[i].is_string()) {
        throw InputError(file, 0, key + "[" + std::to_string(i) + "]", "expected a text");
      }
      into.push_back((*list)[i].get<std::string>());
    }
    return true;
  };
  if (find_key(root, "realizations") != nullptr) {
    // The spreads, by the keys kRealizationColumns (realizations.hpp) defines.
    const auto set_at = [&](const std::string& block) {
      RealizationSet set;
      set.n = json_number(root, block + ".n", file);
      for (const RealizationColumn& c : kRealizationColumns) {
        const std::string key = block + "." + std::string(c.key) + ".";
        set.spreads.push_back({json_number(root, key + "p10", file),
                               json_number(root, key + "p50", file),
                               json_number(root, key + "p90", file)});
      }
      return set;
    };
    RealizationRanges& r = s.realizations.emplace();
    for (const RealizationColumn& c : kRealizationColumns) {
      r.own.push_back(json_number(root, std::string(summary_number(c.summary_key).key), file));
    }
    r.draws = set_at("realizations");
    if (find_key(root, "realizations.calibration_resampled") != nullptr) {
      r.resampled = set_at("realizations.calibration_resampled");
    }
  }
  if (!strings("warnings.run", s.run_warnings)) strings("rain.warnings", s.run_warnings);
  strings("warnings.design", s.design_warnings);
  const Json* months = find_key(root, "months");
  if (months == nullptr) throw InputError(file, 0, "months", "missing");
  if (!months->is_array()) throw InputError(file, 0, "months", "expected an array");
  for (std::size_t i = 0; i < months->size(); ++i) {
    const Json& m = (*months)[i];
    const std::string at = "months[" + std::to_string(i) + "].";
    if (!m.is_object())
      throw InputError(file, 0, "months[" + std::to_string(i) + "]", "expected an object");
    MonthRow row;
    row.month = json_string(m, "month", file, at + "month");
    row.rain_mm = json_number(m, "rain_mm", file, at + "rain_mm");
    row.energy_Wh = json_number(m, "energy_Wh", file, at + "energy_Wh");
    row.overflow_L = json_number(m, "overflow_L", file, at + "overflow_L");
    row.cycles = json_number(m, "cycles", file, at + "cycles");
    s.months.push_back(std::move(row));
  }
  return s;
}

Sweep read_sweep(const fs::path& dir, std::optional<UnitSystem> shown_in) {
  Sweep sw;
  const fs::path csv_path = dir / "sweep.csv";
  const std::string file = csv_path.string();
  sw.csv = parse_csv(read_text(csv_path), file);
  const std::size_t c_energy = sw.csv.require("energy_Wh");
  const UnitSystem written = sw.csv.require_either("overflow_L").second;
  sw.units = shown_in.value_or(written);
  std::vector<std::string> vary;
  const fs::path json_path = dir / "sweep.json";
  std::error_code ec;
  if (fs::exists(json_path, ec)) {
    const std::string jfile = json_path.string();
    const Json root = parse_json(json_path);
    if (!root.is_object()) throw InputError(jfile, 0, "", "expected a JSON object");
    if (const Json* s = find_key(root, "scenario"); s != nullptr && s->is_string()) {
      sw.scenario = s->get<std::string>();
    }
    if (const Json* v = find_key(root, "site"); v != nullptr && v->is_string()) {
      sw.site = v->get<std::string>();
    }
    if (const Json* v = find_key(root, "order"); v != nullptr && v->is_string()) {
      sw.order = v->get<std::string>();
    }
    if (const Json* v = find_key(root, "skipped"); v != nullptr && v->is_number()) {
      sw.skipped = v->get<double>();
    }
    if (const Json* v = find_key(root, "failed"); v != nullptr && v->is_number()) {
      sw.failed = v->get<double>();
    }
    if (const Json* r = find_key(root, "rank"); r != nullptr) {
      if (!r->is_string()) throw InputError(jfile, 0, "rank", "expected a string");
      sw.rank = r->get<std::string>();
    }
    if (const Json* v = find_key(root, "vary"); v != nullptr) {
      if (!v->is_array()) throw InputError(jfile, 0, "vary", "expected an array");
      for (std::size_t i = 0; i < v->size(); ++i) {
        const Json& item = (*v)[i];
        const std::string field = "vary[" + std::to_string(i) + "]";
        if (!item.is_string()) throw InputError(jfile, 0, field, "expected a key name");
        const std::string key = item.get<std::string>();
        if (sw.csv.find(key) < 0) {
          throw InputError(jfile, 0, field, "\"" + key + "\" is not a column of sweep.csv");
        }
        vary.push_back(key);
      }
    }
  }
  // The metric columns and the rank's spread, `si` their SI names, renamed and converted to the
  // units shown.
  std::vector<std::string> metrics = sweep_metric_names();
  const std::size_t n_metrics = metrics.size();
  const std::string rank_si = [&] {
    for (const std::string& m : metrics) {
      if (sw.rank == m || sw.rank == column_name(UnitSystem::us, m)) return m;
    }
    return sw.rank;
  }();
  metrics.push_back(rank_si + "_p10");
  metrics.push_back(rank_si + "_p90");
  const std::vector<std::string> written_header = sw.csv.header;
  std::vector<std::string> metric_si(sw.csv.header.size());
  for (std::size_t k = 0; k < metrics.size(); ++k) {
    const std::string& si = k < n_metrics ? metrics[k] : rank_si;
    const std::string suffix = k < n_metrics ? "" : metrics[k].substr(rank_si.size());
    const int c = sw.csv.find(column_name(written, si) + suffix);
    if (c < 0) continue;
    metric_si[static_cast<std::size_t>(c)] = si;
    sw.csv.header[static_cast<std::size_t>(c)] = column_name(sw.units, si) + suffix;
  }
  sw.rank = column_name(sw.units, rank_si);
  if (vary.empty()) {
    for (std::size_t c = 0; c < c_energy; ++c) sw.keys.push_back(c);
  } else {
    for (const auto& key : vary) sw.keys.push_back(static_cast<std::size_t>(sw.csv.find(key)));
  }
  if (sw.csv.rows.empty()) throw InputError(file, 0, "", "no data rows");
  const std::size_t ncol = sw.csv.header.size();
  // The metric columns the sweep writes; the page checks their values are numbers.
  sw.num.assign(sw.csv.rows.size(), std::vector<double>(ncol, kNaN));
  for (std::size_t r = 0; r < sw.csv.rows.size(); ++r) {
    for (std::size_t c = 0; c < ncol; ++c) {
      const std::string& cell = sw.csv.rows[r][c];
      const std::string& si = metric_si[c];
      if (!si.empty() && !cell.empty()) {
        const double v = parse_number(cell, file, sw.csv.lines[r], written_header[c]);
        sw.num[r][c] = column_value(sw.units, si, column_si_value(written, si, v));
      } else if (const auto v = to_number(cell)) {
        sw.num[r][c] = *v;
      }
    }
  }
  for (const std::size_t c : sw.keys) {
    bool numeric = true;
    for (std::size_t r = 0; r < sw.csv.rows.size(); ++r)
      numeric = numeric && !std::isnan(sw.num[r][c]);
    sw.numeric_key.push_back(numeric);
  }
  return sw;
}

}  // namespace gutterwatt::detail
