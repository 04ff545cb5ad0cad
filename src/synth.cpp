#include "gutterwatt/synth.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <random>
#include <string_view>
#include <vector>

#include "detail.hpp"
#include "gutterwatt/error.hpp"
#include "gutterwatt/storm.hpp"
#include "gutterwatt/units.hpp"

namespace gutterwatt {
namespace {

using detail::uniform_open;

// Exponential with the given mean, by inversion.
double exponential(std::mt19937_64& rng, double mean) {
  return -mean * std::log(uniform_open(rng));
}

struct Cell {
  double start_s;  ///< seconds after the record's start
  double end_s;
  double intensity_m_per_s;
};

// The local calendar months as spans of seconds after the record's start, one after another.
class MonthClock {
 public:
  MonthClock(Instant start, int utc_offset_s) : start_(start), offset_s_(utc_offset_s) {
    const CivilTime c = to_civil(start, utc_offset_s);
    year_ = c.year;
    month_ = c.month;
    end_ = month_start(year_, month_ + 1, offset_s_);
  }

  int index() const { return month_ - 1; }
  double end_s() const { return static_cast<double>(end_ - start_); }

  void advance() {
    if (++month_ > 12) {
      month_ = 1;
      ++year_;
    }
    end_ = month_start(year_, month_ + 1, offset_s_);
  }

 private:
  Instant start_;
  int offset_s_;
  int year_;
  int month_;
  Instant end_;
};

// Cells of the Poisson rectangular pulses model, started in time order.
class CellSource {
 public:
  CellSource(const PrpParameters& parameters, const SynthSpec& spec)
      : parameters_(parameters), rng_(spec.seed), clock_(spec.start, spec.utc_offset_s) {
    const auto wet = [](const PrpMonth& m) { return m.cell_rate_per_s > 0.0; };
    if (std::any_of(parameters.months.begin(), parameters.months.end(), wet)) {
      draw_next_start();
    } else {
      next_start_s_ = std::numeric_limits<double>::infinity();  // a record of dry months
    }
  }

  // Cells alive at the start: their number is Poisson with mean lambda / eta (counted as the
  // unit-rate arrivals before that mean), each with an exponential remaining life (the
  // exponential forgets its age) and its own intensity.
  std::vector<Cell> initial_cells() {
    const PrpMonth& m = parameters_.months[clock_first_index_];
    std::vector<Cell> cells;
    const double mean_count = m.cell_rate_per_s * m.mean_duration_s;
    for (double sum = exponential(rng_, 1.0); sum < mean_count; sum += exponential(rng_, 1.0)) {
      cells.push_back(
          {0.0, exponential(rng_, m.mean_duration_s), exponential(rng_, m.mean_intensity_m_per_s)});
    }
    return cells;
  }

  double next_start_s() const { return next_start_s_; }

  Cell take() {
    const PrpMonth& m = parameters_.months[next_month_];
    const double start = next_start_s_;
    const Cell cell{start, start + exponential(rng_, m.mean_duration_s),
                    exponential(rng_, m.mean_intensity_m_per_s)};
    draw_next_start();
    return cell;
  }

 private:
  // The next start of a Poisson process whose rate is constant within each month: a unit
  // exponential amount of the integrated rate, used up month by month.
  void draw_next_start() {
    double left = exponential(rng_, 1.0);
    for (;;) {
      const double rate = parameters_.months[clock_.index()].cell_rate_per_s;
      const double room = rate * (clock_.end_s() - now_s_);
      if (left < room) {
        now_s_ += left / rate;
        break;
      }
      left -= room;
      now_s_ = clock_.end_s();
      clock_.advance();
    }
    next_start_s_ = now_s_;
    next_month_ = clock_.index();
  }

  const PrpParameters& parameters_;
  std::mt19937_64 rng_;
  MonthClock clock_;
  int clock_first_index_ = clock_.index();
  double now_s_ = 0.0;
  double next_start_s_ = 0.0;
  int next_month_ = 0;
};

void check_spec(const SynthSpec& spec) {
  if (spec.step_s < 1) {
    throw InputError("", 0, "--step",
                     "must be at least 1s (got " + std::to_string(spec.step_s) + " s)");
  }
  if (spec.end <= spec.start || (spec.end - spec.start) % spec.step_s != 0) {
    throw InputError("", 0, "--end",
                     "must be a whole number of steps of " + format_duration(spec.step_s) +
                         " after the start (got " + format_duration(spec.end - spec.start) + ")");
  }
}

void check_parameters(const PrpParameters& parameters) {
  for (const PrpMonth& m : parameters.months) {
    if (!(m.cell_rate_per_s >= 0.0) || !(m.mean_duration_s > 0.0) ||
        !(m.mean_intensity_m_per_s >= 0.0) || !std::isfinite(m.cell_rate_per_s) ||
        !std::isfinite(m.mean_duration_s) || !std::isfinite(m.mean_intensity_m_per_s)) {
      throw InputError("", 0, "parameters",
                       "cell rates and intensities must be >= 0, mean durations > 0");
    }
  }
}

}  // namespace

double prp_mean_depth_m(const PrpMonth& m, double interval_s) {
  return m.cell_rate_per_s * m.mean_intensity_m_per_s * m.mean_duration_s * interval_s;
}

double prp_wet_probability(const PrpMonth& m, double interval_s) {
  return -std::expm1(-m.cell_rate_per_s * (interval_s + m.mean_duration_s));
}

double prp_depth_variance_m2(const PrpMonth& m, double interval_s) {
  const double eta = 1.0 / m.mean_duration_s;
  const double eh = eta * interval_s;
  return 4.0 * m.cell_rate_per_s * m.mean_intensity_m_per_s * m.mean_intensity_m_per_s *
         (eh + std::expm1(-eh)) / (eta * eta * eta);
}

PrpMonth prp_from_statistics(double mean_depth_m, double wet_probability, double interval_s,
                             double mean_duration_s) {
  PrpMonth m;
  m.mean_duration_s = mean_duration_s;
  if (mean_depth_m <= 0.0) {
    m.mean_intensity_m_per_s = 0.0;
    return m;
  }
  m.cell_rate_per_s = -std::log1p(-wet_probability) / (interval_s + mean_duration_s);
  m.mean_intensity_m_per_s = mean_depth_m / (m.cell_rate_per_s * mean_duration_s * interval_s);
  return m;
}

void generate_prp(const PrpParameters& parameters, const SynthSpec& spec,
                  const std::function<void(Instant step_end, double depth_m)>& sink) {
  check_spec(spec);
  check_parameters(parameters);
  CellSource source(parameters, spec);
  std::vector<Cell> alive = source.initial_cells();
  const Instant steps = (spec.end - spec.start) / spec.step_s;
  const auto step = static_cast<double>(spec.step_s);
  for (Instant k = 0; k < steps; ++k) {
    const double a = static_cast<double>(k) * step;
    const double b = a + step;
    while (source.next_start_s() < b) alive.push_back(source.take());
    double depth_m = 0.0;
    for (const Cell& c : alive) {
      depth_m += c.intensity_m_per_s * (std::min(c.end_s, b) - std::max(c.start_s, a));
    }
    alive.erase(
        std::remove_if(alive.begin(), alive.end(), [b](const Cell& c) { return c.end_s <= b; }),
        alive.end());
    sink(spec.start + (k + 1) * spec.step_s, depth_m);
  }
}

void write_synth_csv(std::ostream& out, const PrpParameters& parameters, const SynthSpec& spec) {
  RainCsvWriter csv(out, spec.utc_offset_s);
  generate_prp(parameters, spec, [&](Instant end, double depth_m) { csv.row(end, depth_m); });
}

namespace {

const std::vector<std::string> kModelColumns = {"month", "cells_per_day", "mean_duration_h",
                                                "mean_intensity_mm_per_h"};
const std::vector<std::string> kStatisticsColumns = {"month", "mean_mm_per_day", "wet_day_fraction",
                                                     "mean_duration_h"};

std::string joined(const std::vector<std::string>& names) {
  std::string out;
  for (const std::string& name : names) out += (out.empty() ? "" : ",") + name;
  return out;
}

}  // namespace

PrpParameters read_prp_parameters(std::istream& in, const std::string& file_label) {
  detail::LineReader reader(in);
  int line_number = 0;
  std::vector<std::string> columns;
  std::array<int, 12> line_of_month{};
  PrpParameters parameters;
  std::string_view text;
  while (detail::next_data_line(reader, line_number, text)) {
    const std::vector<std::string_view> fields = detail::split_fields(text);
    if (columns.empty()) {
      const std::vector<std::string> names(fields.begin(), fields.end());
      if (names != kModelColumns && names != kStatisticsColumns) {
        throw InputError(file_label, line_number, "",
                         "expected the header " + joined(kModelColumns) + " or " +
                             joined(kStatisticsColumns) + " (got " + std::string(text) + ")");
      }
      columns = names;
      continue;
    }
    if (fields.size() != columns.size()) {
      throw InputError(file_label, line_number, "",
                       "expected " + std::to_string(columns.size()) + " fields (got " +
                           std::to_string(fields.size()) + ")");
    }
    std::array<double, 4> values{};
    for (std::size_t c = 0; c < fields.size(); ++c) {
      const std::string_view f = fields[c];
      const std::optional<double> value = detail::to_number(f);
      if (!value) {
        throw InputError(file_label, line_number, columns[c],
                         "not a number (got \"" + std::string(f) + "\")");
      }
      values[c] = *value;
    }
    const double month = values[0];
    if (month != std::floor(month) || month < 1 || month > 12) {
      throw InputError(file_label, line_number, "month",
                       "must be a whole number from 1 to 12 (got " + std::string(fields[0]) + ")");
    }
    const auto index = static_cast<std::size_t>(month) - 1;
    if (line_of_month[index] != 0) {
      throw InputError(file_label, line_number, "month",
                       "month " + std::string(fields[0]) + " is already given on line " +
                           std::to_string(line_of_month[index]));
    }
    line_of_month[index] = line_number;
    const auto require = [&](std::size_t c, bool ok, const std::string& rule) {
      if (!ok) {
        throw InputError(file_label, line_number, columns[c],
                         rule + " (got " + std::string(fields[c]) + ")");
      }
    };
    PrpMonth& m = parameters.months[index];
    if (columns == kModelColumns) {
      require(1, values[1] >= 0.0, "must be >= 0");
      require(2, values[2] > 0.0, "must be > 0");
      require(3, values[3] > 0.0, "must be > 0");
      m.cell_rate_per_s = values[1] / kSecondsPerDay;
      m.mean_duration_s = values[2] * kSecondsPerHour;
      m.mean_intensity_m_per_s = values[3] * kMetresPerMm / kSecondsPerHour;
    } else {
      require(1, values[1] >= 0.0, "must be >= 0");
      require(2, values[1] == 0.0 || (values[2] > 0.0 && values[2] < 1.0),
              "must be between 0 and 1, both excluded, for a month with rain");
      require(3, values[3] > 0.0, "must be > 0");
      m = prp_from_statistics(values[1] * kMetresPerMm, values[2], kSecondsPerDay,
                              values[3] * kSecondsPerHour);
    }
  }
  detail::check_read_to_end(reader, file_label, line_number, "a parameter file");
  if (columns.empty()) {
    throw InputError(file_label, 1, "",
                     "empty file (expected the header " + joined(kModelColumns) + " or " +
                         joined(kStatisticsColumns) + ")");
  }
  std::string missing;
  for (std::size_t i = 0; i < 12; ++i) {
    if (line_of_month[i] == 0) missing += (missing.empty() ? "" : ", ") + std::to_string(i + 1);
  }
  if (!missing.empty()) {
    throw InputError(file_label, line_number, "month",
                     "every month 1 to 12 needs a row (missing " + missing + ")");
  }
  return parameters;
}

}  // namespace gutterwatt
