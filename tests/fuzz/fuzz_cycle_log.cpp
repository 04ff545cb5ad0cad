// libFuzzer target: the cycle log reader of `fit --cycles` (read_cycle_log) on arbitrary bytes.
// Any exception other than InputError, a broken promise of the log it returns (fit_logs.hpp) or
// a sanitizer report is a crash.

#include <cstddef>
#include <cstdint>
#include <sstream>
#include <string>

#include "fuzz_checks.hpp"
#include "gutterwatt/fit_logs.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace gutterwatt;
  const std::string label = "fuzz-cycles.csv";
  std::istringstream in(std::string(reinterpret_cast<const char*>(data), size));
  try {
    SeriesFormat rain_format;
    rain_format.zone = 3600;
    const CycleLog log = read_cycle_log(in, label, rain_format);
    fuzz::require(!log.starts.empty(), "a cycle log read has cycles");
    fuzz::require(log.starts.size() == log.lines.size(), "every start has its line");
    for (std::size_t k = 1; k < log.starts.size(); ++k) {
      fuzz::require(log.starts[k - 1] < log.starts[k], "starts strictly increase");
      fuzz::require(log.lines[k - 1] < log.lines[k], "lines increase");
    }
  } catch (const InputError& e) {
    fuzz::check_error(e, label);
  }
  return 0;
}
