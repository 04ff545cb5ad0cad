#include "gutterwatt/fit_logs.hpp"

#include <algorithm>
#include <map>
#include <string_view>

#include "detail.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/rain_input.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt {
namespace {

/// The columns a bench log may have, each with what one unit of it is in SI.
struct Column {
  std::string_view name;
  double si_per_unit;
};

constexpr Column kColumns[] = {
    {"inflow_L_per_min", kLitrePerMinute_m3_per_s},
    {"inflow_gpm", kLitresPerUsGallon* kLitrePerMinute_m3_per_s},
    {"fill_volume_L", kCubicMetresPerLitre},
    {"fill_volume_gal", kLitresPerUsGallon* kCubicMetresPerLitre},
    {"fill_time_s", 1.0},
    {"outcome", 1.0},
    {"time_to_prime_s", 1.0},
    {"drain_time_s", 1.0},
    {"cycle_period_s", 1.0},
    {"nozzle_volume_L", kCubicMetresPerLitre},
    {"nozzle_volume_gal", kLitresPerUsGallon* kCubicMetresPerLitre},
    {"nozzle_time_s", 1.0},
    {"note", 1.0},
};

std::string column_list() {
  std::string out;
  for (const Column& c : kColumns) out += (out.empty() ? "" : ", ") + std::string(c.name);
  return out;
}

double si_per_unit(std::string_view name) {
  for (const Column& c : kColumns) {
    if (c.name == name) return c.si_per_unit;
  }
  return 1.0;
}

/// One data row of the log by column name, with the checks every cell shares.
class Cells {
 public:
  Cells(const std::string& file, int line, const std::vector<std::string>& header,
        const std::vector<std::string_view>& fields)
      : file_(file), line_(line) {
    for (std::size_t i = 0; i < header.size(); ++i) {
      if (!fields[i].empty()) cells_.emplace(header[i], fields[i]);
    }
  }

  bool has(const std::string& name) const { return cells_.count(name) > 0; }

  [[noreturn]] void fail(const std::string& column, const std::string& message) const {
    throw InputError(file_, line_, column, message);
  }

  /// The positive number in `name` in SI, or nullopt when the cell is empty or absent.
  std::optional<double> positive(const std::string& name) const {
    const auto it = cells_.find(name);
    if (it == cells_.end()) return std::nullopt;
    const std::string_view text = it->second;
    const std::optional<double> x = detail::to_number(text);
    if (!x) fail(name, "expected a number, got \"" + std::string(text) + "\"");
    if (!(*x > 0.0)) fail(name, "must be > 0 (got " + std::string(text) + ")");
    return *x * si_per_unit(name);
  }

  std::string_view text(const std::string& name) const {
    const auto it = cells_.find(name);
    return it == cells_.end() ? std::string_view{} : it->second;
  }

  /// The one quantity given by whichever of `forms` the row fills: fails when two are filled.
  /// Returns the name of the form used, or empty.
  std::string one_of(std::initializer_list<std::string> forms, const std::string& what) const {
    std::string used;
    for (const std::string& form : forms) {
      if (!has(form)) continue;
      if (!used.empty()) {
        fail(form,
             what + " is given twice on this row (" + used + " and " + form + "); give it once");
      }
      used = form;
    }
    return used;
  }

  /// A volume over the time it took, both required together.
  std::optional<double> timed(const std::string& volume_column, const std::string& time_column,
                              const std::string& container) const {
    if (volume_column.empty()) {
      if (has(time_column)) fail(time_column, "missing: the volume of " + container);
      return std::nullopt;
    }
    if (!has(time_column)) fail(time_column, "missing: the time " + container + " took to fill");
    return *positive(volume_column) / *positive(time_column);
  }

 private:
  std::string file_;
  int line_;
  std::map<std::string, std::string_view> cells_;
};

std::vector<std::string> read_header(std::string_view text, const std::string& file, int line) {
  std::vector<std::string> header;
  for (std::string_view field : detail::split_fields(text)) {
    const std::string name(field);
    const bool known = std::any_of(std::begin(kColumns), std::end(kColumns),
                                   [&](const Column& c) { return c.name == name; });
    if (!known) {
      throw InputError(file, line, name, "unknown column; expected any of " + column_list());
    }
    if (std::find(header.begin(), header.end(), name) != header.end()) {
      throw InputError(file, line, name, "column given twice");
    }
    header.push_back(name);
  }
  const auto has = [&](std::string_view name) {
    return std::find(header.begin(), header.end(), name) != header.end();
  };
  if (!has("outcome")) {
    throw InputError(file, line, "outcome", "missing column (primed or dribbled, per row)");
  }
  if (!has("inflow_L_per_min") && !has("inflow_gpm") && !has("fill_volume_L") &&
      !has("fill_volume_gal")) {
    throw InputError(file, line, "inflow_L_per_min",
                     "missing column: give the inflow as inflow_L_per_min, inflow_gpm, or "
                     "fill_volume_L with fill_time_s");
  }
  const auto pair = [&](std::string_view a, std::string_view b, std::string_view time) {
    if ((has(a) || has(b)) && !has(time)) {
      throw InputError(
          file, line, std::string(time),
          "missing column: " + std::string(has(a) ? a : b) + " needs " + std::string(time));
    }
    if (has(time) && !has(a) && !has(b)) {
      throw InputError(file, line, std::string(a),
                       "missing column: " + std::string(time) + " needs " + std::string(a));
    }
  };
  pair("fill_volume_L", "fill_volume_gal", "fill_time_s");
  pair("nozzle_volume_L", "nozzle_volume_gal", "nozzle_time_s");
  return header;
}

BenchRow read_row(const Cells& cells, int line) {
  BenchRow row;
  row.line = line;
  const std::string_view outcome = cells.text("outcome");
  if (outcome == "primed" || outcome == "dribbled") {
    row.primed = outcome == "primed";
  } else if (outcome.empty()) {
    cells.fail("outcome", "missing: primed or dribbled");
  } else {
    cells.fail("outcome", "expected primed or dribbled, got \"" + std::string(outcome) + "\"");
  }
  const std::string inflow = cells.one_of(
      {"inflow_L_per_min", "inflow_gpm", "fill_volume_L", "fill_volume_gal"}, "the inflow");
  if (inflow.empty()) cells.fail("inflow_L_per_min", "missing: the inflow of this test");
  row.inflow_m3_per_s = inflow.starts_with("fill_")
                            ? *cells.timed(inflow, "fill_time_s", "the hose container")
                            : *cells.positive(inflow);
  if (!inflow.starts_with("fill_") && cells.has("fill_time_s")) {
    cells.fail("fill_time_s", "the inflow is given twice on this row (" + inflow +
                                  " and a timed container); give it once");
  }
  row.time_to_prime_s = cells.positive("time_to_prime_s");
  row.drain_time_s = cells.positive("drain_time_s");
  row.cycle_period_s = cells.positive("cycle_period_s");
  const std::string nozzle =
      cells.one_of({"nozzle_volume_L", "nozzle_volume_gal"}, "the nozzle volume");
  row.nozzle_flow_m3_per_s = cells.timed(nozzle, "nozzle_time_s", "the nozzle container");
  if (!row.primed) {
    for (const char* column : {"time_to_prime_s", "drain_time_s", "cycle_period_s",
                               "nozzle_volume_L", "nozzle_volume_gal", "nozzle_time_s"}) {
      if (cells.has(column)) {
        cells.fail(column, "a test that only dribbled has no cycle to time; leave it empty");
      }
    }
  }
  return row;
}

}  // namespace

std::vector<BenchRow> read_bench_log(std::istream& in, const std::string& file_label) {
  std::vector<BenchRow> rows;
  std::vector<std::string> header;
  detail::LineReader reader(in);
  int line_number = 0;
  std::string_view text;
  while (detail::next_data_line(reader, line_number, text)) {
    if (header.empty()) {
      header = read_header(text, file_label, line_number);
      continue;
    }
    const std::vector<std::string_view> fields = detail::split_fields(text);
    if (fields.size() != header.size()) {
      throw InputError(file_label, line_number, "",
                       "expected " + std::to_string(header.size()) +
                           " fields, one per column (got " + std::to_string(fields.size()) + ")");
    }
    rows.push_back(read_row(Cells(file_label, line_number, header, fields), line_number));
  }
  detail::check_read_to_end(reader, file_label, line_number, "a bench log");
  if (header.empty()) throw InputError(file_label, 0, "", "the bench log has no header");
  if (rows.empty()) throw InputError(file_label, line_number, "", "the bench log has no tests");
  return rows;
}

CycleLog read_cycle_log(std::istream& in, const std::string& file_label,
                        const SeriesFormat& rain_format) {
  // The rows are read as a tipping-bucket log is (one stamp a row, the same file rules and
  // messages); two cycles cannot start in the same second, which a tip log allows.
  SeriesFormat fmt;
  fmt.time_column = "time";
  fmt.zone = rain_format.zone;
  fmt.time_format = rain_format.time_format;
  const TipLog tips = read_tip_log(in, file_label, fmt);
  for (std::size_t k = 1; k < tips.times.size(); ++k) {
    if (tips.times[k] == tips.times[k - 1]) {
      throw InputError(file_label, tips.lines[k], fmt.time_column,
                       "the same instant as the cycle on line " +
                           std::to_string(tips.lines[k - 1]) +
                           "; one row per cycle, each cycle once");
    }
  }
  return {tips.times, tips.lines};
}

}  // namespace gutterwatt
