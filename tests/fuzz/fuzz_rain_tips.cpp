// libFuzzer target: the tipping-bucket reader (read_rain_tips) on arbitrary bytes.
//
// Input: a CSV log of tips. When the first byte is a control character other than tab, LF or
// CR, its low four bits choose the tip depth and the spreading cap and the CSV follows it;
// otherwise a 0.2 mm bucket with the default cap. Any exception other than InputError, a broken
// promise of the returned series or a sanitizer report is a crash.

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
  TipSpreading tips{0.2e-3, kDefaultTipCap_s};
  if (size > 0 && is_options_byte(data[0])) {
    const unsigned o = data[0];
    const double depths_m[] = {0.2e-3, 0.254e-3, 0.01e-3, 5e-3};
    const Instant caps_s[] = {kDefaultTipCap_s, 1, 60, 86400};
    tips.tip_depth_m = depths_m[o & 3u];
    tips.cap_s = caps_s[(o >> 2) & 3u];
    ++data;
    --size;
  }
  const std::string label = "fuzz.csv";
  std::istringstream in(std::string(reinterpret_cast<const char*>(data), size));
  try {
    const RainSeries rain = read_rain_tips(in, label, fmt, tips);
    fuzz::check_series(rain);
    fuzz::require(rain.covered.size() <= 1, "a tip log covers one span without gaps");
  } catch (const InputError& e) {
    fuzz::check_error(e, label);
  }
  return 0;
}
