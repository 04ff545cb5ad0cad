// Huge outputs are announced and refused unless forced, and sub-second durations are treated one
// way everywhere: refused, never rounded (issue 14, item 8).

#include <gtest/gtest.h>

#include <filesystem>
#include <string>

#include "cli_support.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt::cli_support;

TEST(OutputSizeAndDurations, TenYearsAtOneSecondAreRefusedBeforeTheRun) {
  // 2025-06-01 to 2035-06-01: 3652 days (leap days in 2028 and 2032), 315,532,800 one-second
  // rows of about 100 bytes.
  const fs::path site = fixture_site("size-estimate");
  const fs::path out = site / "out";
  expect_bad(run("run " + (site / "shed.yaml").string() +
                     " --set simulation.output_interval=1s --from 2025-06-01T00:00 --to "
                     "2035-06-01T00:00 --out " +
                     out.string(),
                 site),
             (site / "shed.yaml").string() +
                 ": simulation.output_interval: the run would write about 32 GB of "
                 "timeseries.csv (315532800 rows of 1s); the limit is 1 GB: give a longer "
                 "output_interval or a shorter period, or run with --force");
  EXPECT_FALSE(fs::exists(out));
}

TEST(OutputSizeAndDurations, OneAndAHalfSecondsIsRefusedNotRounded) {
  const fs::path site = fixture_site("size-subsecond");
  expect_bad(run("check --no-rain " + (site / "shed.yaml").string() +
                     " --set simulation.output_interval=1.5s",
                 site),
             "--set: simulation.output_interval: must be a whole number of seconds (time is kept "
             "in whole seconds) (got 1.5s)");
}

TEST(OutputSizeAndDurations, RainStepOfHalfASecondHasTheSameRule) {
  const fs::path site = fixture_site("size-rain-step");
  expect_bad(
      run("check --no-rain " + (site / "shed.yaml").string() + " --set rain.step=0.5s", site),
      "--set: rain.step: must be a whole number of seconds (time is kept in whole "
      "seconds) (got 0.5s)");
}

TEST(OutputSizeAndDurations, CommandLineDurationsHaveTheSameRule) {
  const fs::path dir = scratch("size-storm-step");
  expect_bad(run("storm --kind block --depth 10 --duration 1h --step 1.5s", dir),
             "--step: must be a whole number of seconds (time is kept in whole seconds) (got "
             "1.5s)");
}
