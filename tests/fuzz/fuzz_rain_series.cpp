// libFuzzer target: the series CSV reader (read_rain_series) on arbitrary bytes.
//
// Input: a CSV file. When the first byte is a control character other than tab, LF or CR (text
// a CSV does not start with), its low five bits choose the format options and the CSV follows
// it; otherwise the defaults apply. Any exception other than InputError, a broken promise of the
// returned series or a sanitizer report is a crash.

#include <cstddef>
#include <cstdint>
#include <sstream>
#include <string>

#include "fuzz_checks.hpp"
#include "gutterwatt/rain_input.hpp"

namespace {

bool is_options_byte(std::uint8_t b) { return b < 0x20 && b != '\t' && b != '\n' && b != '\r'; }

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace gutterwatt;
  SeriesFormat fmt;
  if (size > 0 && is_options_byte(data[0])) {
    const unsigned o = data[0];
    if (o & 1u) {
      fmt.value = RainValue::intensity;
      fmt.unit_name = "mm/h";
    }
    const GapPolicy policies[] = {GapPolicy::error, GapPolicy::zero, GapPolicy::skip,
                                  GapPolicy::error};
    fmt.gaps = policies[(o >> 1) & 3u];
    if (o & 8u) fmt.step_s = 300.0;
    if (o & 16u) {
      fmt.unit_m = 0.0254;
      fmt.unit_name = fmt.value == RainValue::intensity ? "in/h" : "in";
      fmt.zone = -5 * 3600;
    }
    ++data;
    --size;
  }
  const std::string label = "fuzz.csv";
  std::istringstream in(std::string(reinterpret_cast<const char*>(data), size));
  try {
    fuzz::check_series(read_rain_series(in, label, fmt));
  } catch (const InputError& e) {
    fuzz::check_error(e, label);
  }
  return 0;
}
