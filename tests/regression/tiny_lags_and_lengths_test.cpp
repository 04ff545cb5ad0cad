// Tiny reservoir lengths that the solver cannot follow are refused at load, naming the key and
// why (issue 14, item 7), instead of a run ending in "the solver made no progress". Tiny roof
// lags were refused too until the roof stage went into closed form (issue 16): now they run.

#include <gtest/gtest.h>

#include <filesystem>
#include <string>

#include "cli_support.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt::cli_support;

TEST(TinyLagsAndLengths, EveryLagFromNoneToASecondRuns) {
  const fs::path site = fixture_site("tiny-lag-ok");
  for (const char* lag : {"0", "0.001", "0.01", "0.1", "1"}) {
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
