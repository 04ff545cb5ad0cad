// libFuzzer target: the scenario loader (parse_scenario) on arbitrary bytes.
//
// Input: YAML text, then optionally `--set` overrides, each after a NUL byte
// (`yaml\0roof.area_m2=3\0release.kind=none`). Any exception other than InputError, a broken
// promise of the loaded scenario (scenario.hpp) or a sanitizer report is a crash.

#include <cmath>
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "fuzz_checks.hpp"
#include "gutterwatt/scenario.hpp"

namespace {

void check_scenario(const gutterwatt::Scenario& s) {
  using gutterwatt::ReleaseKind;
  using gutterwatt::fuzz::require;
  require(!s.rain.files.empty(), "a loaded scenario names a rain file");
  require(std::isfinite(s.roof.area_m2) && s.roof.area_m2 > 0.0, "the roof area is > 0");
  require(s.reservoir.rim_m > 0.0, "the rim is above the floor");
  require(s.reservoir.overflow_length_m > 0.0, "the overflow length is set");
  if (s.release.kind == ReleaseKind::bell || s.release.kind == ReleaseKind::float_valve) {
    require(s.release.break_level_m < s.release.trigger_level_m, "break below trigger");
    require(s.release.trigger_level_m <= s.reservoir.rim_m, "trigger not above the rim");
  }
  require(s.nozzle.diameter_m < s.drop_pipe.diameter_m, "nozzle smaller than the pipe");
  if (s.simulation.start && s.simulation.end) {
    require(*s.simulation.end > *s.simulation.start, "the period is not empty");
  }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  using namespace gutterwatt;
  const std::string_view all(reinterpret_cast<const char*>(data), size);
  const std::size_t nul = all.find('\0');
  const std::string_view yaml = all.substr(0, nul);
  std::vector<std::string> overrides;
  for (std::size_t at = nul; at != std::string_view::npos;) {
    const std::size_t next = all.find('\0', at + 1);
    overrides.emplace_back(all.substr(at + 1, next == all.npos ? all.npos : next - at - 1));
    at = next;
  }
  const std::string label = "fuzz.yaml";
  try {
    check_scenario(parse_scenario(yaml, label, "/fuzz", overrides));
  } catch (const InputError& e) {
    // Errors in an override name --set instead of the file.
    const std::string_view what = e.what();
    fuzz::require(what.substr(0, label.size()) == label || what.substr(0, 5) == "--set",
                  "a scenario error starts with the file label or --set");
    fuzz::require(!e.message().empty(), "a scenario error says what is wrong");
  }
  return 0;
}
