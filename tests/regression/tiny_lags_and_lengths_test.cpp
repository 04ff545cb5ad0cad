// Tiny roof lags and reservoir lengths that the solver cannot follow are refused at load, naming
// the key and why (issue 14, item 7), instead of a run ending in "the solver made no progress".

#include <gtest/gtest.h>

#include <filesystem>
#include <string>

#include "cli_support.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt::cli_support;

TEST(TinyLagsAndLengths, RoofLagOfAMillisecondIsRefusedAtLoad) {
  const fs::path site = fixture_site("tiny-lag");
  expect_bad(run("run " + (site / "shed.yaml").string() + " --set roof.lag_s=0.001 --out " +
                     (site / "out").string(),
                 site),
             "--set: roof.lag_s: must be 0 (no routing) or at least 1 s: a shorter lag makes the "
             "runoff equation too stiff for the solver (got 0.001)");
  EXPECT_FALSE(fs::exists(site / "out"));
}

TEST(TinyLagsAndLengths, NoRoutingAndOneSecondAreTaken) {
  const fs::path site = fixture_site("tiny-lag-ok");
  for (const char* lag : {"0", "1"}) {
    const Outcome r =
        run("run " + (site / "shed.yaml").string() + " --quiet --set roof.lag_s=" + lag +
                " --out " + (site / "out").string(),
            site);
    EXPECT_EQ(r.status, 0) << lag << ": " << r.err;
  }
}

TEST(TinyLagsAndLengths, ReservoirOfAMicrometreIsRefusedAtLoad) {
  const fs::path site = fixture_site("tiny-length");
  expect_bad(
      run("check --no-rain " + (site / "shed.yaml").string() + " --set reservoir.length_m=1e-6",
          site),
      "--set: reservoir.length_m: must be at least 0.1 m: a shorter reservoir fills and "
      "empties faster than the solver can follow (got 1e-6)");
}
