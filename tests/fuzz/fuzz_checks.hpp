#pragma once
/// Checks shared by the libFuzzer targets: what a reader promises about the series it returns
/// and about the errors it throws. A broken promise aborts, which libFuzzer reports as a crash.

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <string>
#include <string_view>

#include "gutterwatt/error.hpp"
#include "gutterwatt/rain_input.hpp"

namespace gutterwatt::fuzz {

[[noreturn]] inline void broken(const char* promise) {
  std::fprintf(stderr, "broken promise: %s\n", promise);
  std::abort();
}

inline void require(bool ok, const char* promise) {
  if (!ok) broken(promise);
}

/// The contract of RainSeries (rain_input.hpp): sorted, non-overlapping pulses with depth > 0
/// inside the covered spans; sorted, merged spans; a finite total equal to the pulses' sum.
inline void check_series(const RainSeries& rain) {
  double sum = 0.0;
  for (std::size_t k = 0; k < rain.pulses.size(); ++k) {
    const RainPulse& p = rain.pulses[k];
    require(p.start < p.end, "a pulse ends after it starts");
    require(std::isfinite(p.depth_m) && p.depth_m > 0.0, "a pulse depth is finite and > 0");
    if (k > 0) require(rain.pulses[k - 1].end <= p.start, "pulses are sorted, not overlapping");
    sum += p.depth_m;
  }
  for (std::size_t k = 0; k < rain.covered.size(); ++k) {
    require(rain.covered[k].start < rain.covered[k].end, "a covered span is not empty");
    if (k > 0) {
      require(rain.covered[k - 1].end < rain.covered[k].start, "covered spans are merged, sorted");
    }
  }
  for (std::size_t k = 1; k < rain.gaps.size(); ++k) {
    require(rain.gaps[k - 1].end <= rain.gaps[k].start, "gaps are sorted");
  }
  std::size_t span = 0;
  for (const RainPulse& p : rain.pulses) {
    while (span < rain.covered.size() && rain.covered[span].end < p.end) ++span;
    require(span < rain.covered.size() && rain.covered[span].start <= p.start,
            "every pulse lies inside a covered span");
  }
  require(std::isfinite(rain.total_depth_m) && rain.total_depth_m >= 0.0, "the total is finite");
  require(std::abs(rain.total_depth_m - sum) <= 1e-9 * (sum + 1e-300) + 1e-300,
          "the total is the sum of the pulses");
}

/// An input error names the file first and fits on one line.
inline void check_error(const InputError& e, std::string_view label) {
  const std::string_view what = e.what();
  require(what.substr(0, label.size()) == label, "an input error starts with the file label");
  require(what.find('\n') == std::string_view::npos, "an input error is one line");
  require(!e.message().empty(), "an input error says what is wrong");
}

}  // namespace gutterwatt::fuzz
