// The floor of the speed benchmark (issue 7, tools/bench): the least work any reader of a
// `time,rain_mm` record must do. It reads the whole file, splits it into lines (skipping `#`
// comment lines before the header and the header itself), turns each
// `YYYY-MM-DDThh:mm` stamp into seconds since the epoch and each value into a double, and sums
// them. It checks nothing beyond what it needs to find the two fields, keeps no rows and knows
// nothing of gaps, steps or units, so a full run of the simulator can be judged against it.
//
// Usage: parse_bench FILE [Google Benchmark flags]

#include <benchmark/benchmark.h>

#include <algorithm>
#include <charconv>
#include <cstdint>
#include <cstdio>
#include <stdexcept>
#include <string>
#include <string_view>

namespace {

struct ParseTotals {
  long rows = 0;
  double depth = 0.0;
  std::int64_t stamp_s = 0;
};

std::string read_file(const std::string& path) {
  std::FILE* f = std::fopen(path.c_str(), "rb");
  if (f == nullptr) throw std::runtime_error(path + ": cannot open");
  std::string text;
  char buffer[1 << 16];
  std::size_t n;
  while ((n = std::fread(buffer, 1, sizeof buffer, f)) > 0) text.append(buffer, n);
  std::fclose(f);
  return text;
}

bool is_leap(std::int64_t y) { return (y % 4 == 0 && y % 100 != 0) || y % 400 == 0; }

// Days from 1970-01-01 to the first of January of `year` (year >= 1970), Gregorian calendar.
std::int64_t days_before_year(std::int64_t year) {
  const auto leaps_before = [](std::int64_t y) { return y / 4 - y / 100 + y / 400; };
  return 365 * (year - 1970) + leaps_before(year - 1) - leaps_before(1969);
}

constexpr int kDaysBeforeMonth[12] = {0, 31, 59, 90, 120, 151, 181, 212, 243, 273, 304, 334};

// Reads the unsigned integer that starts at `p`, stops at the first non-digit.
const char* read_int(const char* p, const char* end, std::int64_t& value) {
  const auto [next, ec] = std::from_chars(p, end, value);
  if (ec != std::errc()) throw std::runtime_error("a stamp field is not a number");
  return next;
}

// Seconds since the epoch of a naive `YYYY-MM-DDThh:mm` stamp.
std::int64_t stamp_seconds(const char* p, const char* end) {
  std::int64_t year, month, day, hour, minute;
  p = read_int(p, end, year) + 1;
  p = read_int(p, end, month) + 1;
  p = read_int(p, end, day) + 1;
  p = read_int(p, end, hour) + 1;
  read_int(p, end, minute);
  std::int64_t days = days_before_year(year) + kDaysBeforeMonth[month - 1] + day - 1;
  if (month > 2 && is_leap(year)) ++days;
  return days * 86400 + hour * 3600 + minute * 60;
}

// Where the line that starts at `begin` ends (its newline, or the end of the text).
std::size_t line_end(std::string_view text, std::size_t begin) {
  return std::min(text.find('\n', begin), text.size());
}

ParseTotals parse_record(std::string_view text) {
  ParseTotals totals;
  std::size_t begin = 0;
  while (begin < text.size() && text[begin] == '#') begin = line_end(text, begin) + 1;
  begin = line_end(text, begin) + 1;  // the header
  while (begin < text.size()) {
    const std::size_t stop = line_end(text, begin);
    const std::string_view line = text.substr(begin, stop - begin);
    begin = stop + 1;
    const std::size_t comma = line.find(',');
    if (comma == std::string_view::npos) throw std::runtime_error("a row without a comma");
    double value = 0.0;
    const auto [next, ec] =
        std::from_chars(line.data() + comma + 1, line.data() + line.size(), value);
    if (ec != std::errc()) throw std::runtime_error("a value is not a number");
    totals.stamp_s += stamp_seconds(line.data(), line.data() + comma);
    totals.depth += value;
    ++totals.rows;
  }
  return totals;
}

void bare_parse(benchmark::State& state, const std::string& path) {
  ParseTotals totals;
  std::size_t bytes = 0;
  for (auto _ : state) {
    try {
      const std::string text = read_file(path);
      bytes = text.size();
      totals = parse_record(text);
    } catch (const std::exception& e) {
      state.SkipWithError(e.what());
      break;
    }
    benchmark::DoNotOptimize(totals);
  }
  state.SetBytesProcessed(static_cast<std::int64_t>(bytes) * state.iterations());
  state.counters["rows"] = static_cast<double>(totals.rows);
  state.counters["total_mm"] = totals.depth;
}

}  // namespace

int main(int argc, char** argv) {
  benchmark::Initialize(&argc, argv);
  if (argc != 2) {
    std::fprintf(stderr, "usage: %s FILE [Google Benchmark flags]\n", argv[0]);
    return 2;
  }
  const std::string path = argv[1];
  benchmark::RegisterBenchmark("BareParse", bare_parse, path)
      ->Unit(benchmark::kMillisecond)
      ->UseRealTime();
  benchmark::RunSpecifiedBenchmarks();
  benchmark::Shutdown();
  return 0;
}
