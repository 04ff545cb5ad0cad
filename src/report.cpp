// The report page and its charts. The SVG is written here by hand rather than through a plotting
// program or a charting library: the page then needs no external process at report time and no
// runtime dependency (a missing plotter cannot break `gutterwatt report`), the same inputs give a
// byte-identical page (testable, diff-able), and inline SVG prints as vectors at any size. The
// charts needed are few and plain (bars, lines, bands, heat maps), so a little code serves.

#include "gutterwatt/report.hpp"

#include <algorithm>
#include <array>
#include <charconv>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <limits>
#include <map>
#include <nlohmann/json.hpp>
#include <optional>
#include <sstream>
#include <string>
#include <string_view>
#include <system_error>
#include <utility>
#include <vector>

#include "gutterwatt/calendar.hpp"
#include "gutterwatt/design.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/output.hpp"
#include "gutterwatt/output_folder.hpp"
#include "gutterwatt/release.hpp"
#include "gutterwatt/sweep.hpp"

namespace gutterwatt {
namespace {

namespace fs = std::filesystem;
using Json = nlohmann::json;

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
// Whole seconds, for calendar arithmetic on wall-clock stamps.
constexpr std::int64_t kDaySeconds = 86400;
constexpr std::int64_t kHourSeconds = 3600;

// ---------------------------------------------------------------------------------------------
// Reading

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

std::string_view trim(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t' || s.back() == '\r'))
    s.remove_suffix(1);
  return s;
}

/// A CSV file as text cells, with the line each row came from (for messages).
struct Csv {
  std::string file;
  std::vector<std::string> header;
  std::vector<std::vector<std::string>> rows;
  std::vector<int> lines;

  int find(std::string_view name) const {
    for (std::size_t i = 0; i < header.size(); ++i) {
      if (header[i] == name) return static_cast<int>(i);
    }
    return -1;
  }
  std::size_t require(std::string_view name) const {
    const int i = find(name);
    if (i < 0) throw InputError(file, 1, std::string(name), "missing column");
    return static_cast<std::size_t>(i);
  }
};

// RFC 4180 style: comma separated, fields may be quoted with "" for a quote inside. A UTF-8
// byte-order mark, CRLF line ends and blank lines are accepted.
Csv parse_csv(std::string_view text, const std::string& file) {
  Csv csv;
  csv.file = file;
  if (text.substr(0, 3) == "\xEF\xBB\xBF") text.remove_prefix(3);
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
      } else if (c == '"' && trim(field).empty()) {
        quoted = true;
        was_quoted = true;
        field.clear();
      } else if (c == ',') {
        fields.emplace_back(was_quoted ? field : std::string(trim(field)));
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
    fields.emplace_back(was_quoted ? field : std::string(trim(field)));
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
  double value = 0.0;
  const char* begin = cell.data();
  const char* end = cell.data() + cell.size();
  if (*begin == '+') ++begin;
  const auto [ptr, ec] = std::from_chars(begin, end, value);
  if (ec != std::errc() || ptr != end) {
    throw InputError(file, line, field, "not a number: \"" + cell + "\"");
  }
  return value;
}

std::optional<double> try_number(const std::string& cell) {
  if (cell.empty()) return std::nullopt;
  double value = 0.0;
  const char* begin = cell.data();
  const char* end = cell.data() + cell.size();
  if (*begin == '+') ++begin;
  const auto [ptr, ec] = std::from_chars(begin, end, value);
  if (ec != std::errc() || ptr != end || !std::isfinite(value)) return std::nullopt;
  return value;
}

std::int64_t floor_div(std::int64_t a, std::int64_t b) {
  return a / b - ((a % b != 0) && ((a < 0) != (b < 0)) ? 1 : 0);
}

// Wall-clock seconds since 1970-01-01T00:00 of an ISO 8601 stamp, as written: a trailing `Z` or
// UTC offset is accepted and left out, so every label on the page reads as the file does.
std::optional<std::int64_t> parse_stamp(std::string_view s) {
  const std::optional<ParsedTime> p = parse_iso8601(s, 0);
  if (!p) return std::nullopt;
  return p->instant + p->offset_s;
}

std::int64_t parse_time_cell(const std::string& cell, const std::string& file, int line,
                             const std::string& field) {
  const auto t = parse_stamp(cell);
  if (!t) {
    throw InputError(file, line, field, "not a time: \"" + cell + "\" (expected YYYY-MM-DDThh:mm)");
  }
  return *t;
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

/// timeseries.csv, one entry a row; `t` is the end of each row's interval, `dt_s` its length.
struct Timeseries {
  std::vector<std::int64_t> t;
  std::vector<double> dt_s;
  std::vector<double> rain_mm, level_mm, release_L, reservoir_overflow_L, column_overflow_L,
      nozzle_L, power_W, energy_Wh, battery_soc, cum_energy_Wh, cum_overflow_L;
  std::vector<ReleaseState> state;
  std::size_t size() const { return t.size(); }
};

Timeseries read_timeseries(const fs::path& path) {
  const std::string file = path.string();
  const Csv csv = parse_csv(read_text(path), file);
  const std::size_t c_time = csv.require("time");
  const std::size_t c_state = csv.require("release_state");
  Timeseries ts;
  struct Column {
    const char* name;
    std::vector<double>* values;
  };
  const std::array<Column, 11> numbers{{{"rain_mm", &ts.rain_mm},
                                        {"reservoir_level_mm", &ts.level_mm},
                                        {"release_L", &ts.release_L},
                                        {"reservoir_overflow_L", &ts.reservoir_overflow_L},
                                        {"column_overflow_L", &ts.column_overflow_L},
                                        {"nozzle_L", &ts.nozzle_L},
                                        {"power_W", &ts.power_W},
                                        {"energy_Wh", &ts.energy_Wh},
                                        {"battery_soc", &ts.battery_soc},
                                        {"cum_energy_Wh", &ts.cum_energy_Wh},
                                        {"cum_overflow_L", &ts.cum_overflow_L}}};
  // Columns the page does not draw must still be there: the header is a contract.
  for (const char* name : {"roof_runoff_L", "head_m"}) csv.require(name);
  std::array<std::size_t, 11> index{};
  for (std::size_t k = 0; k < numbers.size(); ++k) index[k] = csv.require(numbers[k].name);
  if (csv.rows.empty()) throw InputError(file, 0, "", "no data rows");
  for (std::size_t r = 0; r < csv.rows.size(); ++r) {
    const auto& row = csv.rows[r];
    const int line = csv.lines[r];
    const std::int64_t t = parse_time_cell(row[c_time], file, line, "time");
    if (!ts.t.empty() && t <= ts.t.back()) {
      throw InputError(file, line, "time", "not after the previous row (\"" + row[c_time] + "\")");
    }
    ts.t.push_back(t);
    ts.state.push_back(parse_state(row[c_state], file, line));
    for (std::size_t k = 0; k < numbers.size(); ++k) {
      numbers[k].values->push_back(parse_number(row[index[k]], file, line, numbers[k].name));
    }
  }
  ts.dt_s.resize(ts.size());
  for (std::size_t i = 0; i < ts.size(); ++i) {
    if (i > 0) {
      ts.dt_s[i] = static_cast<double>(ts.t[i] - ts.t[i - 1]);
    } else {
      ts.dt_s[i] = ts.size() > 1 ? static_cast<double>(ts.t[1] - ts.t[0]) : 3600.0;
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

struct Event {
  std::string kind;
  std::int64_t start = 0;
  std::int64_t end = 0;
  double duration_s = 0.0, volume_L = 0.0, peak_flow_L_per_s = 0.0, energy_Wh = 0.0;
};

std::vector<Event> read_events(const fs::path& path) {
  const std::string file = path.string();
  const Csv csv = parse_csv(read_text(path), file);
  const std::size_t c_kind = csv.require("kind");
  const std::size_t c_start = csv.require("start");
  const std::size_t c_end = csv.require("end");
  const std::size_t c_duration = csv.require("duration_s");
  const std::size_t c_volume = csv.require("volume_L");
  const std::size_t c_peak = csv.require("peak_flow_L_per_s");
  const std::size_t c_energy = csv.require("energy_Wh");
  std::vector<Event> events;
  for (std::size_t r = 0; r < csv.rows.size(); ++r) {
    const auto& row = csv.rows[r];
    const int line = csv.lines[r];
    Event e;
    e.kind = row[c_kind];
    if (e.kind != "cycle" && e.kind != "overflow" && e.kind != "dribble" &&
        e.kind != "column_overflow") {
      throw InputError(
          file, line, "kind",
          "unknown kind \"" + e.kind + "\" (expected cycle, overflow, dribble or column_overflow)");
    }
    e.start = parse_time_cell(row[c_start], file, line, "start");
    e.end = parse_time_cell(row[c_end], file, line, "end");
    e.duration_s = parse_number(row[c_duration], file, line, "duration_s");
    e.volume_L = parse_number(row[c_volume], file, line, "volume_L");
    e.peak_flow_L_per_s = parse_number(row[c_peak], file, line, "peak_flow_L_per_s");
    e.energy_Wh = parse_number(row[c_energy], file, line, "energy_Wh");
    events.push_back(std::move(e));
  }
  return events;
}

struct MonthRow {
  std::string month;
  double rain_mm = 0.0, energy_Wh = 0.0, overflow_L = 0.0, cycles = 0.0;
};

struct Summary {
  std::string scenario, site, start, end;
  double rain_L = 0, roof_loss_L = 0, first_flush_L = 0, reservoir_overflow_L = 0,
         column_overflow_L = 0, dribble_L = 0, through_nozzle_L = 0, storage_change_L = 0,
         balance_error_L = 0;
  double jet_Wh = 0, electrical_Wh = 0, stored_Wh = 0, curtailed_Wh = 0, unmet_load_Wh = 0;
  double cycles = 0, overflow_events = 0, overflow_hours = 0;
  std::optional<double> trigger_mm, break_mm, rim_mm;
  std::vector<MonthRow> months;
};

/// Looks up `a.b.c` in a JSON object, or nullptr when any part is absent.
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
                   const std::string& label = "") {
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
                        const std::string& label = "") {
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
  s.rain_L = json_number(root, "water_L.rain", file);
  s.roof_loss_L = json_number(root, "water_L.roof_loss", file);
  s.first_flush_L = json_number(root, "water_L.first_flush", file);
  s.reservoir_overflow_L = json_number(root, "water_L.reservoir_overflow", file);
  s.column_overflow_L = json_number(root, "water_L.column_overflow", file);
  s.dribble_L = json_number(root, "water_L.dribble", file);
  s.through_nozzle_L = json_number(root, "water_L.through_nozzle", file);
  s.storage_change_L = json_number(root, "water_L.storage_change", file);
  s.balance_error_L = json_number(root, "water_L.balance_error", file);
  s.jet_Wh = json_number(root, "energy_Wh.jet", file);
  s.electrical_Wh = json_number(root, "energy_Wh.electrical", file);
  s.stored_Wh = json_number(root, "energy_Wh.stored", file);
  s.curtailed_Wh = json_number(root, "energy_Wh.curtailed", file);
  s.unmet_load_Wh = json_number(root, "energy_Wh.unmet_load", file);
  s.cycles = json_number(root, "siphon.cycles", file);
  s.overflow_events = json_number(root, "overflow.events", file);
  s.overflow_hours = json_number(root, "overflow.hours", file);
  s.trigger_mm = json_optional_number(root, "levels_mm.trigger", file);
  s.break_mm = json_optional_number(root, "levels_mm.break", file);
  s.rim_mm = json_optional_number(root, "levels_mm.rim", file);
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

/// sweep.csv (and sweep.json when present): the first `keys` columns are the varied keys.
struct Sweep {
  std::string scenario;
  std::string rank = "energy_Wh";
  std::string site;   ///< from sweep.json, when given
  std::string order;  ///< `ascending` or `descending`, from sweep.json, when given
  std::optional<double> skipped, failed;  ///< combinations that did not run, when given
  Csv csv;
  std::vector<std::size_t> keys;         ///< column indices of the varied keys
  std::vector<bool> numeric_key;         ///< per entry of `keys`
  std::vector<std::vector<double>> num;  ///< numeric value of every cell, NaN for text
};

Sweep read_sweep(const fs::path& dir) {
  Sweep sw;
  const fs::path csv_path = dir / "sweep.csv";
  const std::string file = csv_path.string();
  sw.csv = parse_csv(read_text(csv_path), file);
  const std::size_t c_energy = sw.csv.require("energy_Wh");
  sw.csv.require("overflow_L");
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
  if (vary.empty()) {
    for (std::size_t c = 0; c < c_energy; ++c) sw.keys.push_back(c);
  } else {
    for (const auto& key : vary) sw.keys.push_back(static_cast<std::size_t>(sw.csv.find(key)));
  }
  if (sw.csv.rows.empty()) throw InputError(file, 0, "", "no data rows");
  const std::size_t ncol = sw.csv.header.size();
  // The metric columns the sweep writes; the page checks their values are numbers.
  const std::vector<std::string> metrics = sweep_metric_names();
  sw.num.assign(sw.csv.rows.size(), std::vector<double>(ncol, kNaN));
  for (std::size_t r = 0; r < sw.csv.rows.size(); ++r) {
    for (std::size_t c = 0; c < ncol; ++c) {
      const std::string& cell = sw.csv.rows[r][c];
      const bool metric =
          std::find(metrics.begin(), metrics.end(), sw.csv.header[c]) != metrics.end();
      if (metric && !cell.empty()) {
        sw.num[r][c] = parse_number(cell, file, sw.csv.lines[r], sw.csv.header[c]);
      } else if (const auto v = try_number(cell)) {
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

// ---------------------------------------------------------------------------------------------
// Text

std::string escape(std::string_view s) {
  std::string out;
  out.reserve(s.size());
  for (const char c : s) {
    switch (c) {
      case '&':
        out += "&amp;";
        break;
      case '<':
        out += "&lt;";
        break;
      case '>':
        out += "&gt;";
        break;
      case '"':
        out += "&quot;";
        break;
      case '\'':
        out += "&#39;";
        break;
      default:
        out += c;
    }
  }
  return out;
}

std::string fixed(double v, int decimals) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  std::string out = buf;
  if (out.find_first_not_of("-0.") == std::string::npos && out[0] == '-') out.erase(0, 1);
  return out;
}

// Digits grouped in threes by a narrow no-break space (U+202F), as SI writing does.
std::string grouped(double v, int decimals) {
  std::string out = fixed(v, decimals);
  const std::size_t start = out[0] == '-' ? 1 : 0;
  std::size_t point = out.find('.');
  if (point == std::string::npos) point = out.size();
  for (std::size_t i = point; i > start + 3; i -= 3) out.insert(i - 3, "\xE2\x80\xAF");
  return out;
}

// A value to read, not to compute with: three or four significant figures. `html` allows a
// power of ten with <sup> for very small values; in SVG text `e` notation is used instead.
std::string pretty(double v, bool html = true) {
  if (std::isnan(v)) return html ? "&ndash;" : "-";
  const double a = std::fabs(v);
  if (a == 0.0) return "0";
  if (a >= 1000.0 || (a < 1e15 && v == std::round(v))) return grouped(v, 0);
  if (a >= 100.0) return fixed(v, 0);
  if (a >= 10.0) return fixed(v, 1);
  if (a >= 1.0) return fixed(v, 2);
  if (a >= 0.001) return fixed(v, 2 - static_cast<int>(std::floor(std::log10(a))));
  const int exponent = static_cast<int>(std::floor(std::log10(a)));
  const std::string mantissa = fixed(v / std::pow(10.0, exponent), 1);
  if (!html) return mantissa + "e" + std::to_string(exponent);
  return mantissa + "&times;10<sup>" + std::to_string(exponent) + "</sup>";
}

std::string px(double v) { return fixed(v, 1); }

constexpr const char* kNbsp = "\xC2\xA0";  // U+00A0, valid in HTML text and in SVG text

std::string percent_of(double part, double whole) {
  if (!(whole > 0.0)) return "&ndash;";
  return pretty(100.0 * part / whole) + kNbsp + "%";
}

std::string duration_text(double seconds) {
  const auto s = static_cast<std::int64_t>(std::llround(seconds));
  if (s > 0 && s % kDaySeconds == 0)
    return std::to_string(s / kDaySeconds) + std::string(kNbsp) + "d";
  if (s > 0 && s % kHourSeconds == 0)
    return std::to_string(s / kHourSeconds) + std::string(kNbsp) + "h";
  if (seconds >= 2.0 * kHourSeconds)
    return pretty(seconds / kHourSeconds) + std::string(kNbsp) + "h";
  if (s > 0 && s % 60 == 0) return std::to_string(s / 60) + std::string(kNbsp) + "min";
  if (seconds >= 120.0) return pretty(seconds / 60.0) + std::string(kNbsp) + "min";
  return pretty(seconds) + std::string(kNbsp) + "s";
}

// ---------------------------------------------------------------------------------------------
// Calendar labels (wall clock, as in the files)

constexpr std::array<const char*, 12> kMonthNames{"Jan", "Feb", "Mar", "Apr", "May", "Jun",
                                                  "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"};

std::string day_label(std::int64_t t) {
  const CivilTime c = to_civil(t);
  return std::to_string(c.day) + " " + kMonthNames[c.month - 1];
}

std::string date_label(std::int64_t t) {
  return day_label(t) + " " + std::to_string(to_civil(t).year);
}

std::string clock_label(std::int64_t t) {
  const CivilTime c = to_civil(t);
  char buf[8];
  std::snprintf(buf, sizeof buf, "%02d:%02d", c.hour, c.minute);
  return buf;
}

std::string stamp_label(std::int64_t t) { return date_label(t) + " " + clock_label(t); }

struct TimeTick {
  std::int64_t t;
  std::string label;
};

// Ticks on calendar boundaries (hours, days, weeks, months, years), the finest step that gives
// at most `max_ticks`.
std::vector<TimeTick> time_ticks(std::int64_t lo, std::int64_t hi, std::size_t max_ticks) {
  const std::int64_t span = std::max<std::int64_t>(hi - lo, 1);
  const auto fits = [&](double step_s) { return span / step_s <= static_cast<double>(max_ticks); };
  std::vector<TimeTick> ticks;
  for (const std::int64_t step : {900, 1800, 3600, 7200, 10800, 21600, 43200}) {
    if (!fits(static_cast<double>(step))) continue;
    for (std::int64_t t = floor_div(lo + step - 1, step) * step; t <= hi; t += step) {
      ticks.push_back({t, t % kDaySeconds == 0 ? day_label(t) : clock_label(t)});
    }
    return ticks;
  }
  for (const std::int64_t k : {1, 2}) {
    if (!fits(static_cast<double>(k * kDaySeconds))) continue;
    for (std::int64_t d = floor_div(lo + kDaySeconds - 1, kDaySeconds); d * kDaySeconds <= hi;
         ++d) {
      if (floor_div(d, k) * k == d) ticks.push_back({d * kDaySeconds, day_label(d * kDaySeconds)});
    }
    return ticks;
  }
  if (fits(7.0 * kDaySeconds)) {
    for (std::int64_t d = floor_div(lo + kDaySeconds - 1, kDaySeconds); d * kDaySeconds <= hi;
         ++d) {
      const unsigned dom = to_civil(d * kDaySeconds).day;
      if (dom == 1 || dom == 8 || dom == 15 || dom == 22) {
        ticks.push_back({d * kDaySeconds, day_label(d * kDaySeconds)});
      }
    }
    if (ticks.size() <= max_ticks) return ticks;
    ticks.clear();
  }
  const CivilTime first = to_civil(lo);
  for (const int k : {1, 2, 3, 6, 12, 24, 60, 120}) {
    if (!fits(k * 30.4 * kDaySeconds)) continue;
    for (int index = first.year * 12 + static_cast<int>(first.month) - 1;; ++index) {
      const int year = floor_div(index, 12);
      const auto month = static_cast<unsigned>(index - year * 12 + 1);
      const std::int64_t t = month_start(year, month);
      if (t > hi) break;
      if (t < lo || index % k != 0) continue;
      std::string label = std::to_string(year);
      if (k < 12) {
        label = kMonthNames[month - 1];
        if (ticks.empty() || month == 1) label += " " + std::to_string(year);
      }
      ticks.push_back({t, label});
    }
    if (ticks.size() <= max_ticks) return ticks;
    ticks.clear();
  }
  return ticks;
}

// ---------------------------------------------------------------------------------------------
// Charts

// Okabe & Ito (2008), "Color Universal Design": eight colours told apart with every common
// colour-vision deficiency.
constexpr const char* kBlack = "#000000";
constexpr const char* kOrange = "#E69F00";
constexpr const char* kSkyBlue = "#56B4E9";
constexpr const char* kGreen = "#009E73";
constexpr const char* kBlue = "#0072B2";
constexpr const char* kVermillion = "#D55E00";
constexpr const char* kGrid = "#e3e3e3";
constexpr const char* kAxis = "#555555";

constexpr double kFigureWidth = 1100.0;
constexpr double kPlotLeft = 70.0;
constexpr double kPlotRight = kFigureWidth - 125.0;  // the margin holds reference-line labels
constexpr double kPanelHeader = 30.0;
constexpr double kPanelGap = 14.0;
constexpr double kTimeAxisHeight = 48.0;
constexpr double kCharWidth = 6.6;     // mean advance of 12 px sans-serif, for laying out legends
constexpr std::size_t kBuckets = 450;  // display columns of a full-width chart, about 2 px each

struct Linear {
  double d0, d1, r0, r1;
  double operator()(double v) const {
    return d1 == d0 ? r0 : r0 + (v - d0) * (r1 - r0) / (d1 - d0);
  }
};

struct Ticks {
  std::vector<double> values;
  int decimals = 0;
  double top = 1.0;
};

// Ticks at 1, 2, 2.5 or 5 times a power of ten from 0 (or `lo`) up to the first tick at or
// above `hi`, about `target` of them.
Ticks nice_ticks(double lo, double hi, int target) {
  if (!(hi > lo)) hi = lo + 1.0;
  const double raw = (hi - lo) / target;
  const double magnitude = std::pow(10.0, std::floor(std::log10(raw)));
  double step = 10.0 * magnitude;
  for (const double m : {1.0, 2.0, 2.5, 5.0}) {
    if (m * magnitude >= raw * (1.0 - 1e-9)) {
      step = m * magnitude;
      break;
    }
  }
  Ticks ticks;
  while (ticks.decimals < 8) {
    const double scaled = step * std::pow(10.0, ticks.decimals);
    if (std::fabs(scaled - std::round(scaled)) < 1e-6) break;
    ++ticks.decimals;
  }
  const double first = std::ceil(lo / step - 1e-9) * step;
  ticks.top = std::ceil(hi / step - 1e-9) * step;
  for (double v = first; v <= ticks.top + step * 1e-6; v += step) ticks.values.push_back(v);
  return ticks;
}

// The top of a value axis from 0: a little headroom over the largest value, and a unit axis
// when everything is zero.
double axis_top(double max) { return max > 0.0 ? max * 1.04 : 1.0; }

struct BarSet {
  std::vector<double> x0, x1, v;
  const char* colour;
};

struct LineSet {
  std::vector<double> x, v;
  std::vector<bool> pen_up;  ///< start a new stroke here (after missing values)
  const char* colour;
  double width = 1.4;
  std::string dash;
  bool markers = false;
};

struct RefLine {
  double value;
  const char* colour;
  std::string dash;
  std::string label;
};

struct BandSet {
  std::vector<double> x0, x1;
  const char* colour;
  double opacity;
};

struct LegendEntry {
  enum Kind { kBar, kLine, kBand, kMark } kind;
  const char* colour;
  std::string dash;
  std::string label;
  double opacity = 1.0;
};

struct Panel {
  std::string title;
  double height = 150.0;
  std::optional<double> y_top;
  std::string tick_suffix;
  std::vector<BandSet> bands;
  std::vector<BarSet> bars;
  std::vector<LineSet> lines;
  std::vector<RefLine> refs;
  std::vector<double> marks;  ///< times marked by a short tick along the top (event starts)
  const char* mark_colour = kBlack;
  std::vector<LegendEntry> legend;

  double data_max() const {
    double m = 0.0;
    for (const auto& b : bars) {
      for (const double v : b.v) m = std::max(m, v);
    }
    for (const auto& l : lines) {
      for (const double v : l.v) {
        if (!std::isnan(v)) m = std::max(m, v);
      }
    }
    for (const auto& r : refs) m = std::max(m, r.value);
    return m;
  }
};

void svg_open(std::string& out, const std::string& id, double height, const std::string& label) {
  out += "<svg id=\"" + id + "\" class=\"chart\" viewBox=\"0 0 " + px(kFigureWidth) + " " +
         px(height) + "\" role=\"img\" aria-labelledby=\"" + id + "-t\"><title id=\"" + id +
         "-t\">" + escape(label) + "</title>\n";
}

void svg_text(std::string& out, double x, double y, const std::string& text,
              const char* anchor = "start", const char* cls = nullptr) {
  out += "<text x=\"" + px(x) + "\" y=\"" + px(y) + "\"";
  if (std::string_view(anchor) != "start") out += std::string(" text-anchor=\"") + anchor + "\"";
  if (cls != nullptr) out += std::string(" class=\"") + cls + "\"";
  out += ">" + text + "</text>";
}

void svg_line(std::string& out, double x1, double y1, double x2, double y2, const char* colour,
              double width, const std::string& dash = "") {
  out += "<line x1=\"" + px(x1) + "\" y1=\"" + px(y1) + "\" x2=\"" + px(x2) + "\" y2=\"" + px(y2) +
         "\" stroke=\"" + colour + "\" stroke-width=\"" + fixed(width, 1) + "\"";
  if (!dash.empty()) out += " stroke-dasharray=\"" + dash + "\"";
  out += "/>";
}

void svg_rect(std::string& out, double x, double y, double w, double h, const char* fill,
              double opacity = 1.0) {
  out += "<rect x=\"" + px(x) + "\" y=\"" + px(y) + "\" width=\"" + px(std::max(w, 0.0)) +
         "\" height=\"" + px(std::max(h, 0.0)) + "\" fill=\"" + fill + "\"";
  if (opacity < 1.0) out += " fill-opacity=\"" + fixed(opacity, 2) + "\"";
  out += "/>";
}

double text_width(const std::string& s) {
  // Entities and multi-byte characters count as one glyph each.
  double n = 0.0;
  for (std::size_t i = 0; i < s.size(); ++i) {
    const auto c = static_cast<unsigned char>(s[i]);
    if (c == '&') {
      i = s.find(';', i);
      if (i == std::string::npos) break;
    } else if ((c & 0xC0) == 0x80) {
      continue;
    }
    n += 1.0;
  }
  return n * kCharWidth;
}

// Legend entries laid out right-aligned, ending at `right`, on one row at baseline `y`.
void svg_legend(std::string& out, const std::vector<LegendEntry>& entries, double right, double y) {
  double width = 0.0;
  for (const auto& e : entries) width += 18.0 + 5.0 + text_width(e.label) + 16.0;
  double x = right - width + 16.0;
  for (const auto& e : entries) {
    switch (e.kind) {
      case LegendEntry::kBar:
        svg_rect(out, x + 3, y - 10, 12, 11, e.colour);
        break;
      case LegendEntry::kBand:
        svg_rect(out, x, y - 11, 18, 13, e.colour, e.opacity);
        break;
      case LegendEntry::kMark:
        svg_line(out, x + 9, y - 11, x + 9, y + 1, e.colour, 2.0);
        break;
      case LegendEntry::kLine:
        svg_line(out, x, y - 4, x + 18, y - 4, e.colour, 2.0, e.dash);
        break;
    }
    svg_text(out, x + 23, y, escape(e.label), "start", "legend");
    x += 18.0 + 5.0 + text_width(e.label) + 16.0;
  }
}

double legend_width(const std::vector<LegendEntry>& entries) {
  double width = 0.0;
  for (const auto& e : entries) width += 18.0 + 5.0 + text_width(e.label) + 16.0;
  return width;
}

/// Stacked panels over one time axis.
class TimeFigure {
 public:
  TimeFigure(double t_lo, double t_hi) : t_lo_(t_lo), t_hi_(t_hi) {}
  Panel& add(std::string title, double height) {
    panels_.push_back(Panel{});
    panels_.back().title = std::move(title);
    panels_.back().height = height;
    return panels_.back();
  }
  std::string svg(const std::string& id, const std::string& label) const;

 private:
  double t_lo_, t_hi_;
  std::vector<Panel> panels_;
};

std::string TimeFigure::svg(const std::string& id, const std::string& label) const {
  std::vector<double> headers;
  double height = 0.0;
  for (const auto& p : panels_) {
    const bool wrap = text_width(p.title) + 24.0 + legend_width(p.legend) > kPlotRight - 8.0;
    headers.push_back(wrap ? 2.0 * kPanelHeader - 6.0 : kPanelHeader);
    height += headers.back() + p.height + kPanelGap;
  }
  height += kTimeAxisHeight - kPanelGap;
  std::string out;
  svg_open(out, id, height, label);
  const Linear x{t_lo_, t_hi_, kPlotLeft, kPlotRight};
  const auto ticks = time_ticks(static_cast<std::int64_t>(std::ceil(t_lo_)),
                                static_cast<std::int64_t>(std::floor(t_hi_)), 10);
  double y = 0.0;
  for (std::size_t k = 0; k < panels_.size(); ++k) {
    const Panel& p = panels_[k];
    svg_text(out, 8.0, y + 17.0, escape(p.title), "start", "ptitle");
    if (!p.legend.empty()) {
      svg_legend(out, p.legend, kPlotRight,
                 y + headers[k] - (headers[k] > kPanelHeader ? 8.0 : 9.0));
    }
    const double top = y + headers[k];
    const double bottom = top + p.height;
    const Ticks yt = nice_ticks(0.0, p.y_top ? *p.y_top : axis_top(p.data_max()), 4);
    const Linear ys{0.0, p.y_top ? *p.y_top : yt.top, bottom, top};
    const std::string clip = id + "-c" + std::to_string(k);
    out += "<clipPath id=\"" + clip + "\"><rect x=\"" + px(kPlotLeft) + "\" y=\"" + px(top - 1) +
           "\" width=\"" + px(kPlotRight - kPlotLeft) + "\" height=\"" + px(p.height + 1) +
           "\"/></clipPath>\n";
    for (const double v : yt.values) {
      if (p.y_top && v > *p.y_top + 1e-9) continue;
      if (v != 0.0) svg_line(out, kPlotLeft, ys(v), kPlotRight, ys(v), kGrid, 1.0);
      svg_text(out, kPlotLeft - 7.0, ys(v) + 4.0, fixed(v, yt.decimals) + p.tick_suffix, "end",
               "tick");
    }
    for (const auto& tick : ticks) {
      svg_line(out, x(static_cast<double>(tick.t)), top, x(static_cast<double>(tick.t)), bottom,
               kGrid, 1.0);
    }
    out += "<g clip-path=\"url(#" + clip + ")\">";
    for (const auto& b : p.bands) {
      for (std::size_t i = 0; i < b.x0.size(); ++i) {
        const double x0 = x(b.x0[i]);
        svg_rect(out, x0, top, std::max(x(b.x1[i]) - x0, 0.6), p.height, b.colour, b.opacity);
      }
    }
    for (const auto& b : p.bars) {
      for (std::size_t i = 0; i < b.v.size(); ++i) {
        const double x0 = x(b.x0[i]);
        const double w = x(b.x1[i]) - x0;
        const double gap = w > 4.0 ? 0.18 * w : 0.0;
        svg_rect(out, x0 + gap / 2.0, ys(b.v[i]), std::max(w - gap, 0.7), bottom - ys(b.v[i]),
                 b.colour);
      }
    }
    for (const auto& l : p.lines) {
      std::string d;
      for (std::size_t i = 0; i < l.v.size(); ++i) {
        d += (d.empty() || l.pen_up[i]) ? "M" : "L";
        d += px(x(l.x[i])) + " " + px(ys(l.v[i]));
      }
      if (!d.empty()) {
        out += "<path d=\"" + d + "\" fill=\"none\" stroke=\"" + l.colour + "\" stroke-width=\"" +
               fixed(l.width, 1) + "\" stroke-linejoin=\"round\"";
        if (!l.dash.empty()) out += " stroke-dasharray=\"" + l.dash + "\"";
        out += "/>";
      }
    }
    if (!p.marks.empty()) {
      // One tick per half pixel at most, however many events fall there.
      std::string d;
      double last = -1.0;
      for (const double m : p.marks) {
        const double mx = std::round(x(m) * 2.0) / 2.0;
        if (mx == last) continue;
        last = mx;
        d += "M" + px(mx) + " " + px(top) + "V" + px(top + 10.0);
      }
      out += "<path d=\"" + d + "\" stroke=\"" + p.mark_colour + "\" stroke-width=\"1.6\"/>";
    }
    out += "</g>\n";
    // Reference lines run across the plot and are named in the right margin; the names are
    // nudged apart when lines lie close together.
    std::vector<std::pair<double, std::size_t>> label_y;
    for (std::size_t i = 0; i < p.refs.size(); ++i) {
      const RefLine& r = p.refs[i];
      svg_line(out, kPlotLeft, ys(r.value), kPlotRight, ys(r.value), r.colour, 1.6, r.dash);
      label_y.emplace_back(ys(r.value) + 4.0, i);
    }
    std::sort(label_y.begin(), label_y.end());
    for (std::size_t i = 1; i < label_y.size(); ++i) {
      label_y[i].first = std::max(label_y[i].first, label_y[i - 1].first + 14.0);
    }
    for (const auto& [ly, i] : label_y) {
      svg_text(out, kPlotRight + 8.0, ly, escape(p.refs[i].label), "start", "reflabel");
    }
    svg_line(out, kPlotLeft, bottom, kPlotRight, bottom, kAxis, 1.0);
    y = bottom + kPanelGap;
  }
  const double axis = y - kPanelGap;
  for (const auto& tick : ticks) {
    const double tx = x(static_cast<double>(tick.t));
    svg_line(out, tx, axis, tx, axis + 5.0, kAxis, 1.0);
    svg_text(out, tx, axis + 19.0, escape(tick.label), "middle", "tick");
  }
  svg_text(out, (kPlotLeft + kPlotRight) / 2.0, axis + 40.0,
           "date and time (each value belongs to the interval that ends there)", "middle", "axis");
  out += "</svg>\n";
  return out;
}

/// Rows [i0, i1) of the run shown over [t_lo, t_hi].
struct Window {
  std::size_t i0, i1;
  double t_lo, t_hi;
};

/// Per interval bars, or, with more intervals than display columns, the largest interval value
/// in each column (so a downpour keeps its height). `bucket_s` receives the column width.
BarSet bars_of(const Timeseries& ts, const std::vector<double>& v, const Window& w,
               const char* colour, double* bucket_s) {
  BarSet b{{}, {}, {}, colour};
  if (w.i1 - w.i0 <= kBuckets) {
    for (std::size_t i = w.i0; i < w.i1; ++i) {
      if (v[i] > 0.0) {
        b.x0.push_back(static_cast<double>(ts.t[i]) - ts.dt_s[i]);
        b.x1.push_back(static_cast<double>(ts.t[i]));
        b.v.push_back(v[i]);
      }
    }
    return b;
  }
  const double width = (w.t_hi - w.t_lo) / kBuckets;
  if (bucket_s != nullptr) *bucket_s = width;
  std::vector<double> peak(kBuckets, 0.0);
  for (std::size_t i = w.i0; i < w.i1; ++i) {
    const double mid = static_cast<double>(ts.t[i]) - ts.dt_s[i] / 2.0;
    const auto k = static_cast<std::size_t>(
        std::clamp(std::floor((mid - w.t_lo) / width), 0.0, static_cast<double>(kBuckets - 1)));
    if (!std::isnan(v[i])) peak[k] = std::max(peak[k], v[i]);
  }
  for (std::size_t k = 0; k < kBuckets; ++k) {
    if (peak[k] > 0.0) {
      b.x0.push_back(w.t_lo + static_cast<double>(k) * width);
      b.x1.push_back(w.t_lo + static_cast<double>(k + 1) * width);
      b.v.push_back(peak[k]);
    }
  }
  return b;
}

LineSet line_of(const Timeseries& ts, const std::vector<double>& v, const Window& w,
                const char* colour, double width, double scale = 1.0) {
  LineSet l{{}, {}, {}, colour, width, "", false};
  const std::vector<double> part(v.begin() + static_cast<long>(w.i0),
                                 v.begin() + static_cast<long>(w.i1));
  std::vector<std::size_t> nan_before(part.size() + 1, 0);
  for (std::size_t i = 0; i < part.size(); ++i) {
    nan_before[i + 1] = nan_before[i] + (std::isnan(part[i]) ? 1 : 0);
  }
  std::size_t previous = 0;
  bool have_previous = false;
  for (const std::size_t i : thin_min_max(part, kBuckets)) {
    l.x.push_back(static_cast<double>(ts.t[w.i0 + i]));
    l.v.push_back(part[i] * scale);
    l.pen_up.push_back(have_previous && nan_before[i] != nan_before[previous + 1]);
    previous = i;
    have_previous = true;
  }
  return l;
}

/// Shading for the release state at the end of each interval: full-bore flow (running, open) in
/// green, dribble in orange. With more intervals than display columns, each column takes the
/// most telling state found in it, full-bore flow first, then dribble.
std::vector<BandSet> bands_of(const Timeseries& ts, const Window& w, bool* saw_running,
                              bool* saw_open, bool* saw_dribble) {
  BandSet flowing{{}, {}, kGreen, 0.17};
  BandSet dribble{{}, {}, kOrange, 0.30};
  auto grade = [&](ReleaseState s) {
    if (s == ReleaseState::running) *saw_running = true;
    if (s == ReleaseState::open) *saw_open = true;
    if (s == ReleaseState::dribble) *saw_dribble = true;
    return s == ReleaseState::running || s == ReleaseState::open ? 2
           : s == ReleaseState::dribble                          ? 1
                                                                 : 0;
  };
  auto add = [&](int g, double x0, double x1) {
    if (g == 0) return;
    BandSet& set = g == 2 ? flowing : dribble;
    if (!set.x1.empty() && std::fabs(set.x1.back() - x0) < 1e-6) {
      set.x1.back() = x1;
    } else {
      set.x0.push_back(x0);
      set.x1.push_back(x1);
    }
  };
  if (w.i1 - w.i0 <= kBuckets) {
    for (std::size_t i = w.i0; i < w.i1; ++i) {
      add(grade(ts.state[i]), static_cast<double>(ts.t[i]) - ts.dt_s[i],
          static_cast<double>(ts.t[i]));
    }
  } else {
    const double width = (w.t_hi - w.t_lo) / kBuckets;
    std::vector<int> best(kBuckets, 0);
    for (std::size_t i = w.i0; i < w.i1; ++i) {
      const double mid = static_cast<double>(ts.t[i]) - ts.dt_s[i] / 2.0;
      const auto k = static_cast<std::size_t>(
          std::clamp(std::floor((mid - w.t_lo) / width), 0.0, static_cast<double>(kBuckets - 1)));
      best[k] = std::max(best[k], grade(ts.state[i]));
    }
    for (std::size_t k = 0; k < kBuckets; ++k) {
      add(best[k], w.t_lo + static_cast<double>(k) * width,
          w.t_lo + static_cast<double>(k + 1) * width);
    }
  }
  return {flowing, dribble};
}

struct MonthLabel {
  std::string month;
  std::string year;
};

MonthLabel month_label_of(const std::string& text) {
  if (text.size() >= 7 && text[4] == '-') {
    const auto m = try_number(text.substr(5, 2));
    if (m && *m >= 1 && *m <= 12) {
      return {kMonthNames[static_cast<std::size_t>(*m) - 1], text.substr(0, 4)};
    }
  }
  return {text, ""};
}

std::string monthly_svg(const std::vector<MonthRow>& months) {
  const double height = 282.0;
  const double top = 40.0;
  const double bottom = 222.0;
  struct Half {
    std::string title;
    const char* colour;
    double left, right;
    double MonthRow::*field;
  };
  const std::array<Half, 2> halves{
      {{"Electrical energy, Wh per month", kVermillion, 70.0, 520.0, &MonthRow::energy_Wh},
       {"Overflow (reservoir rim and head column), L per month", kBlue, 620.0, 1070.0,
        &MonthRow::overflow_L}}};
  std::string out;
  svg_open(out, "chart-monthly", height, "Monthly electrical energy and overflow");
  const double n = static_cast<double>(months.size());
  for (const Half& h : halves) {
    double max = 0.0;
    for (const auto& m : months) max = std::max(max, m.*(h.field));
    const Ticks yt = nice_ticks(0.0, axis_top(max), 4);
    const Linear ys{0.0, yt.top, bottom, top};
    svg_text(out, h.left - 62.0, 18.0, escape(h.title), "start", "ptitle");
    for (const double v : yt.values) {
      if (v != 0.0) svg_line(out, h.left, ys(v), h.right, ys(v), kGrid, 1.0);
      svg_text(out, h.left - 7.0, ys(v) + 4.0, fixed(v, yt.decimals), "end", "tick");
    }
    const double slot = (h.right - h.left) / std::max(n, 1.0);
    const auto every = static_cast<std::size_t>(std::max(1.0, std::ceil(30.0 / slot)));
    for (std::size_t i = 0; i < months.size(); ++i) {
      const double v = months[i].*(h.field);
      const double x0 = h.left + slot * static_cast<double>(i);
      svg_rect(out, x0 + slot * 0.17, ys(v), slot * 0.66, bottom - ys(v), h.colour);
      if (slot >= 34.0) {
        svg_text(out, x0 + slot / 2.0, ys(v) - 5.0, pretty(v, false), "middle", "val");
      }
      if (i % every == 0) {
        const MonthLabel label = month_label_of(months[i].month);
        svg_text(out, x0 + slot / 2.0, bottom + 17.0, escape(label.month), "middle", "tick");
        const bool new_year = i == 0 || month_label_of(months[i - every].month).year != label.year;
        if (new_year && !label.year.empty()) {
          svg_text(out, x0 + slot / 2.0, bottom + 32.0, label.year, "middle", "tick");
        }
      }
    }
    svg_line(out, h.left, bottom, h.right, bottom, kAxis, 1.0);
    svg_text(out, (h.left + h.right) / 2.0, bottom + 52.0, "month", "middle", "axis");
  }
  out += "</svg>\n";
  return out;
}

struct Rgb {
  double r, g, b;
};

Rgb hex_rgb(const char* hex) {
  const unsigned v = static_cast<unsigned>(std::strtoul(hex + 1, nullptr, 16));
  return {static_cast<double>((v >> 16) & 0xFF), static_cast<double>((v >> 8) & 0xFF),
          static_cast<double>(v & 0xFF)};
}

// Sequential ramps for the heat maps, both readable with colour-vision deficiencies and in grey:
// energy on the viridis ramp (van der Walt & Smith (2015), perceptually uniform), overflow on a
// single-hue blue ramp from pale to dark.
constexpr std::array<const char*, 9> kEnergyRamp{"#440154", "#472d7b", "#3b528b",
                                                 "#2c728e", "#21918c", "#28ae80",
                                                 "#5ec962", "#addc30", "#fde725"};
constexpr std::array<const char*, 9> kOverflowRamp{"#f7fbff", "#deebf7", "#c6dbef",
                                                   "#9ecae1", "#6baed6", "#4292c6",
                                                   "#2171b5", "#08519c", "#08306b"};

Rgb ramp_at(const std::array<const char*, 9>& ramp, double u) {
  u = std::clamp(u, 0.0, 1.0) * static_cast<double>(ramp.size() - 1);
  const auto i = std::min(static_cast<std::size_t>(u), ramp.size() - 2);
  const double f = u - static_cast<double>(i);
  const Rgb a = hex_rgb(ramp[i]);
  const Rgb b = hex_rgb(ramp[i + 1]);
  return {a.r + f * (b.r - a.r), a.g + f * (b.g - a.g), a.b + f * (b.b - a.b)};
}

std::string css_colour(const Rgb& c) {
  char buf[8];
  std::snprintf(buf, sizeof buf, "#%02x%02x%02x", static_cast<unsigned>(std::lround(c.r)),
                static_cast<unsigned>(std::lround(c.g)), static_cast<unsigned>(std::lround(c.b)));
  return buf;
}

bool is_dark(const Rgb& c) { return 0.299 * c.r + 0.587 * c.g + 0.114 * c.b < 140.0; }

std::string number_label(double v) {
  if (std::fabs(v - std::round(v)) < 1e-9 && std::fabs(v) < 1e15) return fixed(v, 0);
  return pretty(v, false);
}

// Labels for the values of a varied key with the decimals they share (1, 1.5, 2 print as 1.0, 1.5,
// 2.0), so an axis reads evenly.
std::vector<std::string> shared_decimal_labels(const std::vector<double>& values) {
  int decimals = 0;
  for (; decimals < 6; ++decimals) {
    const double scale = std::pow(10.0, decimals);
    bool exact = true;
    for (double v : values) exact = exact && std::fabs(v * scale - std::round(v * scale)) < 1e-6;
    if (exact) break;
  }
  std::vector<std::string> labels;
  for (double v : values) labels.push_back(decimals < 6 ? fixed(v, decimals) : number_label(v));
  return labels;
}

struct HeatGrid {
  std::string x_name, y_name;
  std::vector<double> xs, ys;
  std::vector<std::vector<double>> value;  ///< [y][x], NaN where there is no combination
  std::size_t best_x = 0, best_y = 0;
};

/// `decimals`: for the values written in the cells.
std::string heat_svg(const std::string& id, const std::string& title, const std::string& unit,
                     const HeatGrid& grid, const std::array<const char*, 9>& ramp, int decimals) {
  const std::vector<std::string> x_labels = shared_decimal_labels(grid.xs);
  const std::vector<std::string> y_labels = shared_decimal_labels(grid.ys);
  const std::size_t nx = grid.xs.size();
  const std::size_t ny = grid.ys.size();
  const double left = 130.0;
  const double top = 62.0;
  const double cell_w = std::min(110.0, (kFigureWidth - left - 190.0) / static_cast<double>(nx));
  const double cell_h = std::clamp(360.0 / static_cast<double>(ny), 12.0, 44.0);
  const double plot_w = cell_w * static_cast<double>(nx);
  const double plot_h = cell_h * static_cast<double>(ny);
  const double height = top + plot_h + 66.0;
  double lo = std::numeric_limits<double>::infinity();
  double hi = -lo;
  for (const auto& row : grid.value) {
    for (const double v : row) {
      if (!std::isnan(v)) {
        lo = std::min(lo, v);
        hi = std::max(hi, v);
      }
    }
  }
  if (!std::isfinite(lo)) lo = hi = 0.0;
  const auto u_of = [&](double v) { return hi > lo ? (v - lo) / (hi - lo) : 0.5; };
  std::string out;
  svg_open(out, id, height, title);
  svg_text(out, 8.0, 18.0, escape(title), "start", "ptitle");
  svg_text(out, 8.0, top - 12.0, escape(grid.y_name) + " &#8593;", "start", "axis");
  const bool values = cell_w >= 46.0 && cell_h >= 17.0;
  const auto x_every = static_cast<std::size_t>(std::max(1.0, std::ceil(48.0 / cell_w)));
  const auto y_every = static_cast<std::size_t>(std::max(1.0, std::ceil(15.0 / cell_h)));
  for (std::size_t yi = 0; yi < ny; ++yi) {
    const double y0 = top + plot_h - cell_h * static_cast<double>(yi + 1);
    if (yi % y_every == 0) {
      svg_text(out, left - 8.0, y0 + cell_h / 2.0 + 4.0, y_labels[yi], "end", "tick");
    }
    for (std::size_t xi = 0; xi < nx; ++xi) {
      const double x0 = left + cell_w * static_cast<double>(xi);
      const double v = grid.value[yi][xi];
      if (std::isnan(v)) {
        svg_rect(out, x0, y0, cell_w, cell_h, "#f0f0f0");
        continue;
      }
      const Rgb c = ramp_at(ramp, u_of(v));
      const std::string fill = css_colour(c);
      svg_rect(out, x0, y0, cell_w, cell_h, fill.c_str());
      if (values) {
        out += "<text x=\"" + px(x0 + cell_w / 2.0) + "\" y=\"" + px(y0 + cell_h / 2.0 + 4.0) +
               "\" text-anchor=\"middle\" class=\"" + (is_dark(c) ? "cell light" : "cell") + "\">" +
               grouped(v, decimals) + "</text>";
      }
    }
  }
  for (std::size_t xi = 0; xi < nx; xi += x_every) {
    svg_text(out, left + cell_w * (static_cast<double>(xi) + 0.5), top + plot_h + 17.0,
             x_labels[xi], "middle", "tick");
  }
  svg_text(out, left + plot_w / 2.0, top + plot_h + 40.0, escape(grid.x_name) + " &#8594;",
           "middle", "axis");
  // The best-ranked combination is outlined on both maps.
  out += "<rect x=\"" + px(left + cell_w * static_cast<double>(grid.best_x) + 1.5) + "\" y=\"" +
         px(top + plot_h - cell_h * static_cast<double>(grid.best_y + 1) + 1.5) + "\" width=\"" +
         px(cell_w - 3.0) + "\" height=\"" + px(cell_h - 3.0) +
         "\" fill=\"none\" stroke=\"#000000\" stroke-width=\"3\"/>";
  out += "<rect x=\"" + px(left + cell_w * static_cast<double>(grid.best_x) + 4.0) + "\" y=\"" +
         px(top + plot_h - cell_h * static_cast<double>(grid.best_y + 1) + 4.0) + "\" width=\"" +
         px(cell_w - 8.0) + "\" height=\"" + px(cell_h - 8.0) +
         "\" fill=\"none\" stroke=\"#ffffff\" stroke-width=\"1.5\"/>";
  // Colour key.
  const double kx = left + plot_w + 40.0;
  const double key_h = std::max(plot_h, 120.0);
  const Linear ky{lo, hi > lo ? hi : lo + 1.0, top + key_h, top};
  constexpr int kSteps = 48;
  for (int i = 0; i < kSteps; ++i) {
    const double u = (i + 0.5) / kSteps;
    const std::string fill = css_colour(ramp_at(ramp, u));
    svg_rect(out, kx, top + key_h * (1.0 - static_cast<double>(i + 1) / kSteps), 18.0,
             key_h / kSteps + 0.4, fill.c_str());
  }
  svg_text(out, kx, top - 10.0, escape(unit), "start", "axis");
  if (hi > lo) {
    const Ticks kt = nice_ticks(lo, hi, 4);
    for (const double v : kt.values) {
      if (v < lo - 1e-9 || v > hi + 1e-9) continue;
      svg_line(out, kx + 18.0, ky(v), kx + 23.0, ky(v), kAxis, 1.0);
      svg_text(out, kx + 27.0, ky(v) + 4.0, grouped(v, kt.decimals), "start", "tick");
    }
  } else {
    svg_text(out, kx + 27.0, top + key_h / 2.0 + 4.0, pretty(lo, false), "start", "tick");
  }
  out += "</svg>\n";
  return out;
}

/// One varied numeric key: energy and overflow against it.
std::string sweep_line_svg(const std::string& key, const std::vector<double>& x,
                           const std::vector<double>& energy, const std::vector<double>& overflow) {
  const double panel_h = 150.0;
  const double height = 2.0 * (kPanelHeader + panel_h) + kPanelGap + kTimeAxisHeight;
  double x_lo = *std::min_element(x.begin(), x.end());
  double x_hi = *std::max_element(x.begin(), x.end());
  if (x_hi == x_lo) {
    x_lo -= 1.0;
    x_hi += 1.0;
  }
  const Linear xs{x_lo, x_hi, kPlotLeft + 12.0, kPlotRight - 12.0};
  const Ticks xt = nice_ticks(x_lo, x_hi, 8);
  std::string out;
  svg_open(out, "chart-sweep-line", height, "Energy and overflow against " + key);
  struct Series {
    std::string title;
    const std::vector<double>* v;
    const char* colour;
  };
  const std::array<Series, 2> series{
      {{"Electrical energy, Wh", &energy, kVermillion}, {"Overflow, L", &overflow, kBlue}}};
  double y = 0.0;
  for (const Series& s : series) {
    svg_text(out, 8.0, y + 17.0, escape(s.title), "start", "ptitle");
    const double top = y + kPanelHeader;
    const double bottom = top + panel_h;
    double max = 0.0;
    for (const double v : *s.v) {
      if (!std::isnan(v)) max = std::max(max, v);
    }
    const Ticks yt = nice_ticks(0.0, axis_top(max), 4);
    const Linear ys{0.0, yt.top, bottom, top};
    for (const double v : yt.values) {
      if (v != 0.0) svg_line(out, kPlotLeft, ys(v), kPlotRight, ys(v), kGrid, 1.0);
      svg_text(out, kPlotLeft - 7.0, ys(v) + 4.0, fixed(v, yt.decimals), "end", "tick");
    }
    for (const double v : xt.values) {
      if (v >= x_lo - 1e-9 && v <= x_hi + 1e-9) {
        svg_line(out, xs(v), top, xs(v), bottom, kGrid, 1.0);
      }
    }
    std::string d;
    for (std::size_t i = 0; i < x.size(); ++i) {
      if (std::isnan((*s.v)[i])) continue;
      d += (d.empty() ? "M" : "L") + px(xs(x[i])) + " " + px(ys((*s.v)[i]));
    }
    out += "<path d=\"" + d + "\" fill=\"none\" stroke=\"" + s.colour +
           "\" stroke-width=\"1.8\" stroke-linejoin=\"round\"/>";
    for (std::size_t i = 0; i < x.size(); ++i) {
      if (std::isnan((*s.v)[i])) continue;
      out += "<circle cx=\"" + px(xs(x[i])) + "\" cy=\"" + px(ys((*s.v)[i])) +
             "\" r=\"3.5\" fill=\"" + s.colour + "\"/>";
    }
    svg_line(out, kPlotLeft, bottom, kPlotRight, bottom, kAxis, 1.0);
    y = bottom + kPanelGap;
  }
  const double axis = y - kPanelGap;
  for (const double v : xt.values) {
    if (v < x_lo - 1e-9 || v > x_hi + 1e-9) continue;
    svg_line(out, xs(v), axis, xs(v), axis + 5.0, kAxis, 1.0);
    svg_text(out, xs(v), axis + 19.0, fixed(v, xt.decimals), "middle", "tick");
  }
  svg_text(out, (kPlotLeft + kPlotRight) / 2.0, axis + 40.0, escape(key), "middle", "axis");
  out += "</svg>\n";
  return out;
}

// ---------------------------------------------------------------------------------------------
// The page

constexpr const char* kStyle = R"css(
:root { color-scheme: light; }
* { box-sizing: border-box; }
body { font: 15px/1.45 sans-serif; color: #1b1b1b; background: #ffffff; margin: 0 auto;
  max-width: 1160px; padding: 20px 24px 48px; }
header h1 { font-size: 1.65em; margin: 0 0 .15em; }
header p { margin: 0; color: #444; }
h2 { font-size: 1.25em; margin: 1.8em 0 .5em; padding-bottom: .2em; border-bottom: 1px solid #cfcfcf; }
h3 { font-size: 1.05em; margin: 1.3em 0 .3em; }
p { max-width: 60em; }
.lead { font-size: 1.05em; }
.tables { display: flex; flex-wrap: wrap; gap: 10px 48px; align-items: flex-start; }
table { border-collapse: collapse; font-variant-numeric: tabular-nums; margin: .4em 0 .8em; }
caption { text-align: left; font-weight: 600; padding-bottom: .3em; }
th, td { padding: 3px 12px 3px 0; border-bottom: 1px solid #e6e6e6; text-align: left;
  vertical-align: baseline; }
thead th { border-bottom: 1.5px solid #999; font-weight: 600; }
td.n, th.n { text-align: right; padding-left: 12px; }
td.sub { padding-left: 1.2em; color: #444; }
tr.best td { font-weight: 600; }
.wide { overflow-x: auto; }
.ranked { font-size: .92em; }
.ranked thead th { vertical-align: bottom; }
.ranked.many { font-size: .8em; }
.ranked.many th, .ranked.many td { padding-right: 6px; padding-left: 6px; }
.ranked th.rank, .ranked td.rank { background: #f4f4f4; }
figure { margin: 1em 0 1.4em; }
figcaption { font-size: .9em; color: #3a3a3a; margin-top: .3em; max-width: 60em; }
svg.chart { display: block; width: 100%; max-width: 1100px; height: auto; }
svg text { font-family: sans-serif; font-size: 12px; fill: #222222; }
svg text.ptitle { font-size: 13px; font-weight: 600; }
svg text.tick { fill: #3a3a3a; }
svg text.axis { fill: #3a3a3a; font-size: 12.5px; }
svg text.val { font-size: 11px; fill: #333333; }
svg text.cell { font-size: 12px; fill: #111111; }
svg text.cell.light { fill: #ffffff; }
.note { color: #444; font-style: italic; }
.cautions { border-left: 4px solid #D55E00; background: #fbf4ee; padding: .6em 1.2em .8em; }
.cautions li { margin: .35em 0; }
footer { margin-top: 2em; font-size: .85em; color: #555; }
@media print {
  @page { size: A4 landscape; margin: 12mm 14mm; }
  body { max-width: none; padding: 0; font-size: 10pt; }
  section { break-before: page; }
  section.first { break-before: auto; }
  h2 { break-after: avoid; margin-top: 0; }
  figure, table, .cautions, .closeup { break-inside: avoid; }
  h3 { break-after: avoid; }
  svg.chart { max-width: 100%; }
  .wide { overflow: visible; }
  * { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
}
)css";

std::string page_open(const std::string& title, const std::vector<std::string>& charts) {
  std::string ids;
  for (const auto& c : charts) ids += (ids.empty() ? "" : " ") + c;
  return "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
         "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
         "<meta name=\"generator\" content=\"gutterwatt report\">\n"
         "<meta name=\"gutterwatt-charts\" content=\"" +
         ids + "\">\n<title>" + escape(title) + "</title>\n<style>" + kStyle +
         "</style>\n</head>\n<body>\n";
}

std::string cautions_section() {
  std::string html = "<section id=\"cautions\">\n<h2>Cautions</h2>\n<div class=\"cautions\">\n<p>" +
                     escape(kCautionsPreface) + "</p>\n<ul>\n";
  for (const Caution& c : safety_cautions()) {
    html += "<li><strong>" + escape(c.title) + ".</strong> " + escape(c.text) + "</li>\n";
  }
  return html + "</ul>\n</div>\n</section>\n";
}

std::string page_close() {
  return cautions_section() +
         "<footer>Written by <code>gutterwatt report</code> from the files in the output folder. "
         "The page is self-contained: it loads nothing from "
         "elsewhere.</footer>\n</body>\n</html>\n";
}

// A table row: label, value and, when `extra` is not empty, a third cell (pass " " for an empty
// one in a three-column table).
std::string row_html(const std::string& label, const std::string& value,
                     const std::string& extra = "", bool sub = false) {
  return std::string("<tr><td") + (sub ? " class=\"sub\"" : "") + ">" + label +
         "</td><td class=\"n\">" + value + "</td>" +
         (extra.empty() ? "" : "<td class=\"n\">" + extra + "</td>") + "</tr>\n";
}

std::string with_unit(double v, const char* unit) { return pretty(v) + kNbsp + unit; }

/// The busiest day: the most electrical energy, else the most rain. Day of each row by the
/// middle of its interval. Returns the day's first second, or nullopt for a dry, idle run.
std::optional<std::int64_t> busiest_day(const Timeseries& ts) {
  std::map<std::int64_t, std::pair<double, double>> days;  // day -> (energy, rain)
  for (std::size_t i = 0; i < ts.size(); ++i) {
    const auto mid = ts.t[i] - static_cast<std::int64_t>(ts.dt_s[i] / 2.0);
    auto& d = days[floor_div(mid, kDaySeconds)];
    d.first += ts.energy_Wh[i];
    d.second += ts.rain_mm[i];
  }
  std::optional<std::int64_t> best;
  std::pair<double, double> best_value{0.0, 0.0};
  for (const auto& [day, value] : days) {
    if (value > best_value) {
      best_value = value;
      best = day;
    }
  }
  if (best) return *best * kDaySeconds;
  return std::nullopt;
}

Window window_of(const Timeseries& ts, double t_lo, double t_hi) {
  Window w{0, 0, t_lo, t_hi};
  while (w.i0 < ts.size() && static_cast<double>(ts.t[w.i0]) <= t_lo) ++w.i0;
  w.i1 = w.i0;
  while (w.i1 < ts.size() && static_cast<double>(ts.t[w.i1]) - ts.dt_s[w.i1] < t_hi) ++w.i1;
  return w;
}

std::string thinning_note(double bucket_s) {
  return "tallest interval in each " + duration_text(bucket_s) + " column";
}

/// Rain bars and the reservoir level with its set-points and the release state.
/// Release cycles last minutes, so an hourly row rarely ends in one; their starts from events.csv
/// are marked along the top of the level panel.
void add_rain_and_level(TimeFigure& fig, const Timeseries& ts, const Summary& s,
                        const std::vector<Event>& events, const Window& w, const std::string& step,
                        double rain_h, double level_h) {
  double bucket_s = 0.0;
  BarSet rain = bars_of(ts, ts.rain_mm, w, kSkyBlue, &bucket_s);
  std::string title = "Rain, mm per " + step + " interval";
  if (bucket_s > 0.0) title += " (" + thinning_note(bucket_s) + ")";
  Panel& r = fig.add(title, rain_h);
  r.bars.push_back(std::move(rain));
  Panel& l = fig.add("Reservoir level, mm above the floor", level_h);
  bool running = false, open = false, dribble = false;
  l.bands = bands_of(ts, w, &running, &open, &dribble);
  l.lines.push_back(line_of(ts, ts.level_mm, w, kBlue, 1.6));
  l.legend.push_back({LegendEntry::kLine, kBlue, "", "level"});
  if (running || open) {
    std::string label = running && open ? "running / open"
                        : running       ? "running (siphon full bore)"
                                        : "open (valve)";
    l.legend.push_back({LegendEntry::kBand, kGreen, "", label, 0.17});
  }
  if (dribble) {
    l.legend.push_back({LegendEntry::kBand, kOrange, "", "dribble (not sealed)", 0.30});
  }
  for (const auto& e : events) {
    const auto t = static_cast<double>(e.start);
    if (e.kind == "cycle" && t >= w.t_lo && t <= w.t_hi) l.marks.push_back(t);
  }
  l.mark_colour = kGreen;
  if (!l.marks.empty()) l.legend.push_back({LegendEntry::kMark, kGreen, "", "cycle start"});
  if (s.rim_mm)
    l.refs.push_back({*s.rim_mm, kVermillion, "", "rim " + pretty(*s.rim_mm, false) + " mm"});
  if (s.trigger_mm) {
    l.refs.push_back(
        {*s.trigger_mm, kGreen, "7 4", "trigger " + pretty(*s.trigger_mm, false) + " mm"});
  }
  if (s.break_mm) {
    l.refs.push_back({*s.break_mm, kOrange, "3 3", "break " + pretty(*s.break_mm, false) + " mm"});
  }
}

std::string figure(const std::string& svg, const std::string& caption) {
  return "<figure>\n" + svg + "<figcaption>" + caption + "</figcaption>\n</figure>\n";
}

struct EventStats {
  std::size_t count = 0;
  double volume_L = 0.0, energy_Wh = 0.0, longest_s = 0.0, largest_L = 0.0;
};

std::string render_run(const fs::path& dir) {
  const Timeseries ts = read_timeseries(dir / "timeseries.csv");
  const std::vector<Event> events = read_events(dir / "events.csv");
  const Summary s = read_summary(dir / "summary.json");

  const double step_s = *std::max_element(ts.dt_s.begin(), ts.dt_s.end());
  const std::string step = duration_text(step_s);
  const Window all{0, ts.size(), static_cast<double>(ts.t.front()) - ts.dt_s.front(),
                   static_cast<double>(ts.t.back())};
  const bool thinned = ts.size() > kBuckets;

  std::string body;
  std::vector<std::string> charts;

  // Headline.
  const double overflow_L = s.reservoir_overflow_L + s.column_overflow_L;
  const double reached_L = s.rain_L - s.roof_loss_L - s.first_flush_L;
  body += "<header>\n<h1>" + escape(s.scenario) + ": season report</h1>\n<p>" + escape(s.site) +
          " &middot; " + escape(s.start) + " to " + escape(s.end) + " &middot; " +
          std::to_string(ts.size()) + " rows of " + step + "</p>\n</header>\n";
  body +=
      "<section class=\"first\" id=\"headline\">\n<h2>Headline</h2>\n<p class=\"lead\">The "
      "system delivered <strong>" +
      with_unit(s.electrical_Wh, "Wh") + "</strong> of electrical energy in <strong>" +
      pretty(s.cycles) + "</strong> release cycles. Of " + with_unit(s.rain_L, "L") +
      " of rain on the roof, " + with_unit(s.through_nozzle_L, "L") + " (" +
      percent_of(s.through_nozzle_L, s.rain_L) + ") passed the nozzle, " +
      with_unit(overflow_L, "L") + " (" + percent_of(overflow_L, s.rain_L) + ") overflowed and " +
      with_unit(s.dribble_L, "L") + " (" + percent_of(s.dribble_L, s.rain_L) +
      ") dribbled through at low head.</p>\n";
  body += "<div class=\"tables\">\n<table>\n<caption>Energy</caption>\n<tbody>\n";
  body += row_html("Electrical energy generated", with_unit(s.electrical_Wh, "Wh"));
  body += row_html("stored in the battery", with_unit(s.stored_Wh, "Wh"), "", true);
  body += row_html("curtailed (battery full or at its charge limit)",
                   with_unit(s.curtailed_Wh, "Wh"), "", true);
  body += row_html("Jet energy at the nozzle", with_unit(s.jet_Wh, "Wh"));
  body += row_html("Load not served", with_unit(s.unmet_load_Wh, "Wh"));
  body += row_html("Release cycles", pretty(s.cycles));
  body += row_html("Overflow episodes", pretty(s.overflow_events));
  body += row_html("hours overflowing", with_unit(s.overflow_hours, "h"), "", true);
  if (s.trigger_mm) body += row_html("Trigger level", with_unit(*s.trigger_mm, "mm"));
  if (s.break_mm) body += row_html("Break level", with_unit(*s.break_mm, "mm"));
  if (s.rim_mm) body += row_html("Rim level", with_unit(*s.rim_mm, "mm"));
  body +=
      "</tbody>\n</table>\n<table>\n<caption>Water</caption>\n<thead><tr><th></th><th "
      "class=\"n\">volume</th><th class=\"n\">of rain</th></tr></thead>\n<tbody>\n";
  body += row_html("Rain on the roof", with_unit(s.rain_L, "L"), "100&nbsp;%");
  body += row_html("roof loss (wetting, drying)", with_unit(s.roof_loss_L, "L"),
                   percent_of(s.roof_loss_L, s.rain_L), true);
  body += row_html("first flush diverted", with_unit(s.first_flush_L, "L"),
                   percent_of(s.first_flush_L, s.rain_L), true);
  body += row_html("reached the reservoir", with_unit(reached_L, "L"),
                   percent_of(reached_L, s.rain_L), true);
  body += row_html("Through the nozzle", with_unit(s.through_nozzle_L, "L"),
                   percent_of(s.through_nozzle_L, s.rain_L));
  body += row_html("of which dribble (release not running)", with_unit(s.dribble_L, "L"),
                   percent_of(s.dribble_L, s.rain_L), true);
  body += row_html("Overflow at the reservoir rim", with_unit(s.reservoir_overflow_L, "L"),
                   percent_of(s.reservoir_overflow_L, s.rain_L));
  body += row_html("Overflow at the head column", with_unit(s.column_overflow_L, "L"),
                   percent_of(s.column_overflow_L, s.rain_L));
  body += row_html("Change in storage", with_unit(s.storage_change_L, "L"),
                   percent_of(s.storage_change_L, s.rain_L));
  body += row_html("Balance error", with_unit(s.balance_error_L, "L"),
                   s.rain_L > 0.0 ? pretty(s.balance_error_L / s.rain_L) + " of rain" : "");
  body += "</tbody>\n</table>\n</div>\n</section>\n";

  // The season.
  {
    TimeFigure fig(all.t_lo, all.t_hi);
    add_rain_and_level(fig, ts, s, events, all, step, 110.0, 200.0);
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
  }

  // Energy and battery.
  {
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
  }

  // Months.
  body += "<section id=\"months\">\n<h2>Month by month</h2>\n";
  if (s.months.empty()) {
    body += "<p class=\"note\">summary.json lists no months.</p>\n";
  } else {
    charts.push_back("chart-monthly");
    body += figure(monthly_svg(s.months), "Electrical energy and overflow in each calendar month.");
    body +=
        "<table>\n<thead><tr><th>month</th><th class=\"n\">rain, mm</th><th class=\"n\">"
        "energy, Wh</th><th class=\"n\">overflow, L</th><th class=\"n\">cycles</th></tr>"
        "</thead>\n<tbody>\n";
    for (const auto& m : s.months) {
      body += "<tr><td>" + escape(m.month) + "</td><td class=\"n\">" + pretty(m.rain_mm) +
              "</td><td class=\"n\">" + pretty(m.energy_Wh) + "</td><td class=\"n\">" +
              pretty(m.overflow_L) + "</td><td class=\"n\">" + pretty(m.cycles) + "</td></tr>\n";
    }
    body += "</tbody>\n</table>\n";
  }
  body += "</section>\n";

  // Close-ups, drawn from every row.
  body += "<section id=\"closeups\">\n<h2>Close-ups</h2>\n";
  if (const auto day = busiest_day(ts)) {
    const double t_lo = static_cast<double>(*day);
    const Window w = window_of(ts, t_lo, t_lo + kDaySeconds);
    double energy = 0.0, rain = 0.0;
    for (std::size_t i = w.i0; i < w.i1; ++i) {
      energy += ts.energy_Wh[i];
      rain += ts.rain_mm[i];
    }
    std::size_t cycles = 0;
    for (const auto& e : events) {
      if (e.kind == "cycle" && e.start >= *day && e.start < *day + kDaySeconds) ++cycles;
    }
    TimeFigure fig(w.t_lo, w.t_hi);
    add_rain_and_level(fig, ts, s, events, w, step, 90.0, 160.0);
    Panel& p = fig.add("Electrical power, W", 110.0);
    p.lines.push_back(line_of(ts, ts.power_W, w, kVermillion, 1.4));
    charts.push_back("chart-busiest-day");
    body += "<div class=\"closeup\">\n<h3>Busiest day: " + date_label(*day) + "</h3>\n";
    body += figure(fig.svg("chart-busiest-day", "The busiest day, " + date_label(*day)),
                   "The day with the most electrical energy (" + with_unit(energy, "Wh") + ", " +
                       std::to_string(cycles) + " cycles starting that day, " +
                       with_unit(rain, "mm") + " of rain).") +
            "</div>\n";
  } else {
    body += "<p class=\"note\">No rain and no energy in this run: there is no busiest day.</p>\n";
  }
  const Event* largest = nullptr;
  for (const auto& e : events) {
    if ((e.kind == "overflow" || e.kind == "column_overflow") &&
        (largest == nullptr || e.volume_L > largest->volume_L)) {
      largest = &e;
    }
  }
  if (largest != nullptr) {
    const double pad =
        std::max(6.0 * kHourSeconds, 0.5 * static_cast<double>(largest->end - largest->start));
    const double t_lo = std::max(static_cast<double>(largest->start) - pad, all.t_lo);
    const double t_hi = std::min(static_cast<double>(largest->end) + pad, all.t_hi);
    const Window w = window_of(ts, t_lo, std::max(t_hi, t_lo + 1.0));
    std::vector<double> spill(ts.size(), 0.0);
    for (std::size_t i = 0; i < ts.size(); ++i) {
      spill[i] = ts.reservoir_overflow_L[i] + ts.column_overflow_L[i];
    }
    TimeFigure fig(w.t_lo, w.t_hi);
    add_rain_and_level(fig, ts, s, events, w, step, 90.0, 160.0);
    double bucket_s = 0.0;
    BarSet bars = bars_of(ts, spill, w, kBlue, &bucket_s);
    Panel& p = fig.add("Overflow (reservoir rim and head column), L per " + step + " interval" +
                           (bucket_s > 0.0 ? " (" + thinning_note(bucket_s) + ")" : ""),
                       110.0);
    p.bars.push_back(std::move(bars));
    p.bands.push_back(
        {{static_cast<double>(largest->start)}, {static_cast<double>(largest->end)}, kBlack, 0.10});
    p.legend.push_back({LegendEntry::kBand, kBlack, "", "the episode", 0.10});
    charts.push_back("chart-overflow-episode");
    const std::string where = largest->kind == "overflow" ? "reservoir rim" : "head column";
    body +=
        "<div class=\"closeup\">\n<h3>Largest overflow episode: " + stamp_label(largest->start) +
        " to " + stamp_label(largest->end) + "</h3>\n";
    body += figure(fig.svg("chart-overflow-episode", "The largest overflow episode"),
                   with_unit(largest->volume_L, "L") + " over the " + where + " in " +
                       duration_text(largest->duration_s) + ", peak " +
                       with_unit(largest->peak_flow_L_per_s, "L/s") +
                       ", shown with the hours around it.") +
            "</div>\n";
  } else {
    body += "<p class=\"note\">No overflow episode in this run.</p>\n";
  }
  body += "</section>\n";

  // Events.
  {
    std::map<std::string, EventStats> by_kind;
    for (const auto& e : events) {
      EventStats& st = by_kind[e.kind];
      ++st.count;
      st.volume_L += e.volume_L;
      st.energy_Wh += e.energy_Wh;
      st.longest_s = std::max(st.longest_s, e.duration_s);
      st.largest_L = std::max(st.largest_L, e.volume_L);
    }
    const std::array<std::pair<const char*, const char*>, 4> kinds{
        {{"cycle", "release cycles"},
         {"dribble", "dribble episodes (release not sealed)"},
         {"overflow", "overflow at the reservoir rim"},
         {"column_overflow", "overflow at the head column"}}};
    body +=
        "<section id=\"events\">\n<h2>Events</h2>\n<table>\n<thead><tr><th>kind</th><th "
        "class=\"n\">count</th><th class=\"n\">volume, L</th><th class=\"n\">largest, L</th>"
        "<th class=\"n\">longest</th><th class=\"n\">energy, Wh</th></tr></thead>\n<tbody>\n";
    for (const auto& [kind, label] : kinds) {
      const EventStats st = by_kind.count(kind) ? by_kind.at(kind) : EventStats{};
      body += std::string("<tr><td>") + label + "</td><td class=\"n\">" + std::to_string(st.count) +
              "</td><td class=\"n\">" + pretty(st.volume_L) + "</td><td class=\"n\">" +
              pretty(st.largest_L) + "</td><td class=\"n\">" +
              (st.count > 0 ? duration_text(st.longest_s) : "&ndash;") + "</td><td class=\"n\">" +
              pretty(st.energy_Wh) + "</td></tr>\n";
    }
    body += "</tbody>\n</table>\n</section>\n";
  }

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
  body += thinned ? "The season charts here are thinned (" + std::to_string(ts.size()) +
                        " rows); the close-ups are drawn from every row unless they say "
                        "otherwise.</p>\n"
                  : "This run is short enough that every row is drawn.</p>\n";
  body +=
      "<p>Colours follow a palette chosen to stay distinct with common colour-vision "
      "deficiencies. Inputs: timeseries.csv (" +
      std::to_string(ts.size()) + " rows), events.csv (" + std::to_string(events.size()) +
      " events) and summary.json in " + escape(dir.filename().string()) + ".</p>\n</section>\n";

  return page_open(s.scenario + ": season report", charts) + body + page_close();
}

// Decimals for a table column: none when every value is whole, else four significant figures at
// the column's median magnitude (enough to tell close-ranked rows apart), so the digits of one
// column line up.
int column_decimals(const Sweep& sw, std::size_t c) {
  std::vector<double> magnitudes;
  bool whole = true;
  for (const auto& row : sw.num) {
    if (std::isnan(row[c])) continue;
    whole = whole && row[c] == std::round(row[c]);
    if (row[c] != 0.0) magnitudes.push_back(std::fabs(row[c]));
  }
  if (whole || magnitudes.empty()) return 0;
  std::nth_element(magnitudes.begin(),
                   magnitudes.begin() + static_cast<long>(magnitudes.size() / 2), magnitudes.end());
  const double median = magnitudes[magnitudes.size() / 2];
  return std::clamp(3 - static_cast<int>(std::floor(std::log10(median))), 0, 4);
}

// The class attribute of a ranked-table cell: numbers align right, the rank column is shaded.
std::string cell_class(bool number, bool rank) {
  if (!number && !rank) return "";
  return std::string(" class=\"") + (number ? "n" : "") + (number && rank ? " " : "") +
         (rank ? "rank" : "") + "\"";
}

// A column name that may break after its dots and underscores.
std::string breakable(const std::string& name) {
  std::string out;
  for (const char c : escape(name)) {
    out += c;
    if (c == '.' || c == '_') out += "<wbr>";
  }
  return out;
}

std::string render_sweep(const fs::path& dir) {
  const Sweep sw = read_sweep(dir);
  const Csv& csv = sw.csv;
  const std::size_t n = csv.rows.size();
  const std::string title =
      (sw.scenario.empty() ? std::string("Sweep") : sw.scenario) + ": sweep report";
  std::vector<std::string> charts;
  std::string body;
  std::string keys_text;
  for (std::size_t k = 0; k < sw.keys.size(); ++k) {
    keys_text += (k == 0                    ? ""
                  : k + 1 == sw.keys.size() ? " and "
                                            : ", ") +
                 ("<code>" + escape(csv.header[sw.keys[k]]) + "</code>");
  }
  std::string not_run;
  if (sw.skipped.value_or(0.0) > 0.0 || sw.failed.value_or(0.0) > 0.0) {
    not_run = " &middot; not in the table: " + pretty(sw.skipped.value_or(0.0)) + " skipped, " +
              pretty(sw.failed.value_or(0.0)) + " failed (see skipped.csv)";
  }
  body += "<header>\n<h1>" + escape(title) + "</h1>\n<p>" +
          (sw.site.empty() ? "" : escape(sw.site) + " &middot; ") + std::to_string(n) +
          " combinations" + (keys_text.empty() ? "" : " of " + keys_text) + ", ranked by <code>" +
          escape(sw.rank) + "</code>" + (sw.order.empty() ? "" : " (" + escape(sw.order) + ")") +
          ", best first" + not_run + "</p>\n</header>\n";

  std::vector<int> decimals;
  for (std::size_t c = 0; c < csv.header.size(); ++c) decimals.push_back(column_decimals(sw, c));
  const auto cell_text = [&](std::size_t r, std::size_t c) {
    if (!std::isnan(sw.num[r][c])) return grouped(sw.num[r][c], decimals[c]);
    return csv.rows[r][c].empty() ? std::string("&ndash;") : escape(csv.rows[r][c]);
  };

  // The best combination.
  body +=
      "<section class=\"first\" id=\"headline\">\n<h2>Best combination</h2>\n<table>\n<tbody>\n";
  for (std::size_t c = 0; c < csv.header.size(); ++c) {
    const bool is_key = std::find(sw.keys.begin(), sw.keys.end(), c) != sw.keys.end();
    const std::string value = cell_text(0, c);
    body += std::string("<tr><td>") + (is_key ? "<strong>" : "") + "<code>" +
            escape(csv.header[c]) + "</code>" + (is_key ? "</strong>" : "") +
            "</td><td class=\"n\">" + value + "</td></tr>\n";
  }
  body += "</tbody>\n</table>\n</section>\n";

  // Maps or a line over the numeric keys.
  std::vector<std::size_t> numeric;
  for (std::size_t k = 0; k < sw.keys.size(); ++k) {
    if (sw.numeric_key[k]) numeric.push_back(sw.keys[k]);
  }
  const std::size_t c_energy = csv.require("energy_Wh");
  const std::size_t c_overflow = csv.require("overflow_L");
  if (numeric.size() >= 2) {
    HeatGrid grid;
    const std::size_t cx = numeric[0];
    const std::size_t cy = numeric[1];
    grid.x_name = csv.header[cx];
    grid.y_name = csv.header[cy];
    for (std::size_t r = 0; r < n; ++r) {
      grid.xs.push_back(sw.num[r][cx]);
      grid.ys.push_back(sw.num[r][cy]);
    }
    for (auto* v : {&grid.xs, &grid.ys}) {
      std::sort(v->begin(), v->end());
      v->erase(std::unique(v->begin(), v->end()), v->end());
    }
    const auto index = [](const std::vector<double>& v, double x) {
      return static_cast<std::size_t>(std::lower_bound(v.begin(), v.end(), x) - v.begin());
    };
    // Rows come best first, so the first row seen for a cell is the best one for it.
    std::vector<std::vector<long>> row_of(grid.ys.size(), std::vector<long>(grid.xs.size(), -1));
    for (std::size_t r = 0; r < n; ++r) {
      long& cell = row_of[index(grid.ys, sw.num[r][cy])][index(grid.xs, sw.num[r][cx])];
      if (cell < 0) cell = static_cast<long>(r);
    }
    grid.best_x = index(grid.xs, sw.num[0][cx]);
    grid.best_y = index(grid.ys, sw.num[0][cy]);
    const auto grid_of = [&](std::size_t column) {
      std::vector<std::vector<double>> v(grid.ys.size(), std::vector<double>(grid.xs.size(), kNaN));
      for (std::size_t yi = 0; yi < grid.ys.size(); ++yi) {
        for (std::size_t xi = 0; xi < grid.xs.size(); ++xi) {
          if (row_of[yi][xi] >= 0)
            v[yi][xi] = sw.num[static_cast<std::size_t>(row_of[yi][xi])][column];
        }
      }
      return v;
    };
    std::string others;
    for (const std::size_t c : sw.keys) {
      if (c != cx && c != cy)
        others += (others.empty() ? "" : ", ") + ("<code>" + escape(csv.header[c]) + "</code>");
    }
    const std::string note =
        " The outlined cell is the best-ranked combination." +
        (others.empty() ? std::string()
                        : " Where " + others +
                              " also vary, each cell shows the best-ranked combination among "
                              "them.") +
        " Grey cells: no combination.";
    body += "<section id=\"maps\">\n<h2>Energy and overflow over " + escape(grid.x_name) + " and " +
            escape(grid.y_name) + "</h2>\n";
    grid.value = grid_of(c_energy);
    charts.push_back("chart-heat-energy");
    body += figure(heat_svg("chart-heat-energy", "Electrical energy, Wh", "energy, Wh", grid,
                            kEnergyRamp, decimals[c_energy]),
                   "Season electrical energy for each pair of values; brighter is more." + note);
    grid.value = grid_of(c_overflow);
    charts.push_back("chart-heat-overflow");
    body += figure(heat_svg("chart-heat-overflow", "Overflow, L", "overflow, L", grid,
                            kOverflowRamp, decimals[c_overflow]),
                   "Water lost over the rim (and the head column) for each pair of values; darker "
                   "is more." +
                       note);
    body += "</section>\n";
  } else if (numeric.size() == 1 && sw.keys.size() == 1) {
    std::vector<std::size_t> order(n);
    for (std::size_t r = 0; r < n; ++r) order[r] = r;
    const std::size_t cx = numeric[0];
    std::sort(order.begin(), order.end(),
              [&](std::size_t a, std::size_t b) { return sw.num[a][cx] < sw.num[b][cx]; });
    std::vector<double> x, energy, overflow;
    for (const std::size_t r : order) {
      x.push_back(sw.num[r][cx]);
      energy.push_back(sw.num[r][c_energy]);
      overflow.push_back(sw.num[r][c_overflow]);
    }
    charts.push_back("chart-sweep-line");
    body += "<section id=\"maps\">\n<h2>Energy and overflow against " + escape(csv.header[cx]) +
            "</h2>\n";
    body += figure(sweep_line_svg(csv.header[cx], x, energy, overflow),
                   "Season electrical energy and overflow for each value of the varied key.");
    body += "</section>\n";
  } else {
    body +=
        "<section id=\"maps\">\n<h2>Maps</h2>\n<p class=\"note\">Heat maps need two varied "
        "keys with numeric values; this sweep has " +
        std::to_string(numeric.size()) + ".</p>\n</section>\n";
  }

  // The ranked table.
  constexpr std::size_t kMaxRows = 200;
  body += "<section id=\"ranked\">\n<h2>Ranked combinations</h2>\n";
  if (n > kMaxRows) {
    body += "<p class=\"note\">The best " + std::to_string(kMaxRows) + " of " + std::to_string(n) +
            " combinations; sweep.csv has them all.</p>\n";
  }
  body += std::string("<div class=\"wide\"><table class=\"ranked") +
          (csv.header.size() > 11 ? " many" : "") + "\">\n<thead><tr><th class=\"n\">#</th>";
  for (std::size_t c = 0; c < csv.header.size(); ++c) {
    const bool is_rank = csv.header[c] == sw.rank;
    body += "<th" + cell_class(!std::isnan(sw.num[0][c]), is_rank) + ">" +
            breakable(csv.header[c]) + "</th>";
  }
  body += "</tr></thead>\n<tbody>\n";
  for (std::size_t r = 0; r < std::min(n, kMaxRows); ++r) {
    body += std::string("<tr") + (r == 0 ? " class=\"best\"" : "") + "><td class=\"n\">" +
            std::to_string(r + 1) + "</td>";
    for (std::size_t c = 0; c < csv.header.size(); ++c) {
      const bool is_rank = csv.header[c] == sw.rank;
      body +=
          "<td" + cell_class(!std::isnan(sw.num[r][c]), is_rank) + ">" + cell_text(r, c) + "</td>";
    }
    body += "</tr>\n";
  }
  body += "</tbody>\n</table></div>\n</section>\n";
  return page_open(title, charts) + body + page_close();
}

}  // namespace

std::vector<std::size_t> thin_min_max(const std::vector<double>& values, std::size_t buckets) {
  std::vector<std::size_t> kept;
  const std::size_t n = values.size();
  if (buckets == 0 || n <= 2 * buckets) {
    for (std::size_t i = 0; i < n; ++i) {
      if (!std::isnan(values[i])) kept.push_back(i);
    }
    return kept;
  }
  std::size_t first = 0;
  while (first < n && std::isnan(values[first])) ++first;
  std::size_t last = n;
  while (last > first && std::isnan(values[last - 1])) --last;
  if (first == n) return kept;
  kept.reserve(2 * buckets + 2);
  kept.push_back(first);
  const auto keep = [&](std::size_t i) {
    if (kept.back() != i) kept.push_back(i);
  };
  for (std::size_t b = 0; b < buckets; ++b) {
    const std::size_t lo = b * n / buckets;
    const std::size_t hi = (b + 1) * n / buckets;
    std::size_t i_min = n, i_max = n;
    for (std::size_t i = lo; i < hi; ++i) {
      if (std::isnan(values[i])) continue;
      if (i_min == n || values[i] < values[i_min]) i_min = i;
      if (i_max == n || values[i] > values[i_max]) i_max = i;
    }
    if (i_min == n) continue;
    keep(std::min(i_min, i_max));
    keep(std::max(i_min, i_max));
  }
  keep(last - 1);
  return kept;
}

std::string render_report(const std::filesystem::path& dir) {
  std::error_code ec;
  if (fs::exists(dir / "timeseries.csv", ec)) return render_run(dir);
  if (fs::exists(dir / "sweep.csv", ec)) return render_sweep(dir);
  if (!fs::exists(dir, ec)) throw InputError(dir.string(), 0, "", "no such directory");
  if (!fs::is_directory(dir, ec)) {
    throw InputError(dir.string(), 0, "", "is a file; give the output folder of a run or sweep");
  }
  throw InputError(dir.string(), 0, "",
                   "holds neither timeseries.csv (a run) nor sweep.csv (a sweep)");
}

std::filesystem::path write_report(const std::filesystem::path& dir) {
  std::string page;
  {
    const FolderReadLock reading(dir);
    page = render_report(dir);
  }
  OutputFolder folder(dir, "");
  folder.open("report.html") << page;
  folder.commit();
  return dir / "report.html";
}

}  // namespace gutterwatt
