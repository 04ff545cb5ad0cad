// A decimal comma hidden by a spare column in the header (issue 14, item 10): `1,5` under
// `time,rain_mm,` would read as 1 mm with 5 in the unnamed column; it stops with the hint.

#include <gtest/gtest.h>

#include <filesystem>
#include <string>

#include "cli_support.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt::cli_support;

TEST(DecimalCommaInASpareColumn, IsRefusedWithTheHint) {
  const fs::path site = fixture_site("comma-spare");
  write_file(site / "rain-10min.csv",
             "time,rain_mm,\n2025-06-01T00:10,0.2,\n2025-06-01T00:20,1,5\n2025-06-01T00:30,0,\n");
  expect_bad(run("check " + (site / "shed.yaml").string(), site),
             (site / "rain-10min.csv").string() +
                 ":3: rain_mm: \"1\" and then \"5\" in the column without a name after it; a "
                 "decimal comma (1,5)? write decimals with a point, or separate the fields with "
                 "another character and set "
                 "rain.delimiter and rain.decimal: \",\"");
}

TEST(DecimalCommaInASpareColumn, NamedColumnAfterTheValueIsData) {
  // A named column is meant: 1 mm and a count of 5.
  const fs::path site = fixture_site("comma-named");
  write_file(site / "rain-10min.csv",
             "time,rain_mm,count\n2025-06-01T00:10,0.2,1\n2025-06-01T00:20,1,5\n"
             "2025-06-01T00:30,0,0\n");
  const Outcome r = run("check " + (site / "shed.yaml").string(), site);
  EXPECT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(r.err, "");
  // Read as 1 mm, not 1.5: 1 mm in a 10-minute step is 6 mm/h, the record's largest intensity.
  EXPECT_NE(r.out.find("2-year peak intensity (median annual max)                     6  mm/h\n"),
            std::string::npos)
      << r.out;
}
