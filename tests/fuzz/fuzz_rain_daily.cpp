// libFuzzer target: the daily-totals reader (read_rain_daily) and the disaggregation of what it
// reads, on arbitrary bytes.
//
// Input: a CSV of dates and depths. When the first byte is a control character other than tab,
// LF or CR, its low five bits choose the disaggregation and the gap policy and the CSV follows
// it; otherwise a block over the whole day with gaps as errors. Any exception other than
// InputError, a broken promise of the returned series or a sanitizer report is a crash.

#include <cstddef>
#include <cstdint>
#include <sstream>
#include <string>

#include "fuzz_checks.hpp"
#include "gutterwatt/disaggregation.hpp"
#include "gutterwatt/rain_input.hpp"

namespace {

bool is_options_byte(std::uint8_t b) { return b < 0x20 && b != '\t' && b != '\n' && b != '\r'; }

// Eight valid disaggregations: windows inside the day, steps that divide them.
gutterwatt::Disaggregation disaggregation(unsigned choice) {
  using gutterwatt::DisaggregationMethod;
  gutterwatt::Disaggregation how;
  switch (choice) {
    case 1:
      how.window = {6 * 3600, 2 * 3600};
      break;
    case 2:
      how.method = DisaggregationMethod::nrcs_ii;
      how.step_s = 300;
      break;
    case 3:
      how.method = DisaggregationMethod::nrcs_ii;
      how.step_s = 3600;
      break;
    case 4:
      how.method = DisaggregationMethod::cascade;
      how.step_s = 300;
      break;
    case 5:
      how.method = DisaggregationMethod::cascade;
      how.window = {3600, 7200};
      how.step_s = 600;
      how.seed = 12345;
      break;
    case 6:
      how.method = DisaggregationMethod::cascade;
      how.step_s = 1;
      how.intermittency = 1.0;
      break;
    case 7:
      how.method = DisaggregationMethod::cascade;
      how.step_s = 86400;
      how.intermittency = 0.0;
      break;
    default:
      break;
  }
  return how;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace gutterwatt;
  SeriesFormat fmt;
  Disaggregation how;
  if (size > 0 && is_options_byte(data[0])) {
    const unsigned o = data[0];
    how = disaggregation(o & 7u);
    const GapPolicy policies[] = {GapPolicy::error, GapPolicy::zero, GapPolicy::skip,
                                  GapPolicy::error};
    fmt.gaps = policies[(o >> 3) & 3u];
    ++data;
    --size;
  }
  const std::string label = "fuzz.csv";
  std::istringstream in(std::string(reinterpret_cast<const char*>(data), size));
  try {
    const RainSeries as_read = read_rain_daily(in, label, fmt, how.window);
    fuzz::check_series(as_read);
    fuzz::require(as_read.step_s == 86400, "a daily record's step is one day");
    const RainSeries rain = disaggregate(as_read, how);
    fuzz::check_series(rain);
    fuzz::require(rain.total_depth_m == as_read.total_depth_m, "disaggregation keeps the total");
  } catch (const InputError& e) {
    fuzz::check_error(e, label);
  }
  return 0;
}
