// Unbounded input is refused before it costs unbounded memory (issue 14, item 4): a scenario past
// kMaxScenarioBytes, a scenario list past kMaxScenarioListItems and a rain line past 64 KiB each
// end with exit status 2 and one line naming the file and the line.

#include <gtest/gtest.h>

#include <algorithm>
#include <filesystem>
#include <string>

#include "cli_support.hpp"
#include "gutterwatt/scenario.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt;
using namespace gutterwatt::cli_support;

TEST(InputSizeLimits, ScenarioPastTheLimitIsRefusedAtTheLineWhereItPassesIt) {
  const fs::path site = fixture_site("limit-scenario-size");
  // The fixture's 24 lines, then comment lines of 1024 bytes each: the limit, 256 KiB, falls
  // inside comment line number (256 KiB - fixture) / 1024 + 1, counted from line 25.
  std::string text = slurp(site / "shed.yaml");
  ASSERT_EQ(std::count(text.begin(), text.end(), '\n'), 24);
  const std::size_t fixture = text.size();
  for (int i = 0; i < 300; ++i) text += "#" + std::string(1022, '-') + "\n";
  write_file(site / "shed.yaml", text);
  const std::size_t line = 24 + (kMaxScenarioBytes - fixture) / 1024 + 1;
  expect_bad(run("check --no-rain " + (site / "shed.yaml").string(), site),
             (site / "shed.yaml").string() + ":" + std::to_string(line) +
                 ": the scenario passes 256 KiB on this line; a scenario is a page of keys (is "
                 "this a data file?)");
}

TEST(InputSizeLimits, ScenarioListPastTheLimitIsRefusedNamingTheKey) {
  const fs::path site = fixture_site("limit-scenario-list");
  std::string list = "[0";
  for (std::size_t i = 1; i <= kMaxScenarioListItems; ++i) list += ",0";
  std::string text = slurp(site / "shed.yaml");
  const std::size_t at = text.find("battery: {");
  ASSERT_NE(at, std::string::npos);
  text.insert(at + 10, "load_profile_W: " + list + "], ");
  write_file(site / "shed.yaml", text);
  expect_bad(run("check --no-rain " + (site / "shed.yaml").string(), site),
             (site / "shed.yaml").string() +
                 ":23: battery.load_profile_W: a list of 10001 items; a scenario list holds at "
                 "most 10000");
}

TEST(InputSizeLimits, RainLinePastSixtyFourKibIsRefusedNamingTheLine) {
  const fs::path site = fixture_site("limit-rain-line");
  // Two good rows, then 8 MiB without a line end: refused after 64 KiB, not read whole.
  write_file(site / "rain-10min.csv", "time,rain_mm\n2025-06-01T00:10,0.0\n2025-06-01T00:20,0.0\n" +
                                          std::string(8 << 20, '7'));
  expect_bad(run("check " + (site / "shed.yaml").string(), site),
             (site / "rain-10min.csv").string() +
                 ":4: a line longer than 64 KiB; a rain record's lines are short (binary data, or "
                 "line ends other than LF or CRLF?)");
}
