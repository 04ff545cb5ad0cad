// libFuzzer target: the bench log reader of `fit --bench` (read_bench_log) on arbitrary bytes.
// Any exception other than InputError, a broken promise of the rows it returns (fit_logs.hpp) or
// a sanitizer report is a crash.

#include <cmath>
#include <cstddef>
#include <cstdint>
#include <optional>
#include <sstream>
#include <string>

#include "fuzz_checks.hpp"
#include "gutterwatt/fit_logs.hpp"

namespace {

using gutterwatt::fuzz::require;

void check_positive(const std::optional<double>& x) {
  if (x) require(std::isfinite(*x) && *x > 0.0, "a measured value is finite and > 0");
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace gutterwatt;
  const std::string label = "fuzz-bench.csv";
  std::istringstream in(std::string(reinterpret_cast<const char*>(data), size));
  try {
    const std::vector<BenchRow> rows = read_bench_log(in, label);
    require(!rows.empty(), "a bench log read has tests");
    int line = 0;
    for (const BenchRow& r : rows) {
      require(r.line > line, "rows are in the order of their lines");
      line = r.line;
      require(std::isfinite(r.inflow_m3_per_s) && r.inflow_m3_per_s > 0.0,
              "every test has a finite inflow > 0");
      for (const auto& t :
           {r.time_to_prime_s, r.drain_time_s, r.cycle_period_s, r.nozzle_flow_m3_per_s}) {
        check_positive(t);
        require(r.primed || !t, "a test that dribbled carries no times");
      }
    }
  } catch (const InputError& e) {
    fuzz::check_error(e, label);
  }
  return 0;
}
