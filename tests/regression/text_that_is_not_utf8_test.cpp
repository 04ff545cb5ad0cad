// Text that is not UTF-8 (issue 14, item 6): checked at load where it is shown or written (file,
// line, key), while file names may hold any bytes the system takes.

#include <gtest/gtest.h>

#include <filesystem>
#include <nlohmann/json.hpp>
#include <string>

#include "cli_support.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt::cli_support;

TEST(TextThatIsNotUtf8, SiteNameInLatin1IsRefusedAtLoadNamingLineAndKey) {
  const fs::path site = fixture_site("utf8-name");
  std::string text = slurp(site / "shed.yaml");
  text.replace(text.find("Sweep test shed"), 15, "Caf\xE9 shed");
  write_file(site / "shed.yaml", text);
  expect_bad(run("check --no-rain " + (site / "shed.yaml").string(), site),
             (site / "shed.yaml").string() +
                 ":2: site.name: not UTF-8 text (byte \\xE9 after \"Caf\"); save the scenario as "
                 "UTF-8");
}

TEST(TextThatIsNotUtf8, ScenarioWhoseFileNameHoldsALatin1ByteRuns) {
  const fs::path site = fixture_site("utf8-file-name");
  const fs::path scenario = site / "caf\xE9.yaml";
  fs::rename(site / "shed.yaml", scenario);
  const fs::path out = site / "out";
  const Outcome r = run("run '" + scenario.string() + "' --quiet --out " + out.string(), site);
  ASSERT_EQ(r.status, 0) << r.err;
  const nlohmann::json summary = nlohmann::json::parse(slurp(out / "summary.json"));
  EXPECT_EQ(summary["scenario"], "caf\xEF\xBF\xBD.yaml");  // U+FFFD in place of the byte
}

TEST(TextThatIsNotUtf8, RainFileWhoseNameHoldsALatin1ByteIsRead) {
  const fs::path site = fixture_site("utf8-rain-name");
  fs::rename(site / "rain-10min.csv", site / "pluie-\xE9t\xE9.csv");
  std::string text = slurp(site / "shed.yaml");
  text.replace(text.find("rain-10min.csv"), 14, "pluie-\xE9t\xE9.csv");
  write_file(site / "shed.yaml", text);
  const Outcome r = run(
      "run " + (site / "shed.yaml").string() + " --quiet --out " + (site / "out").string(), site);
  EXPECT_EQ(r.status, 0) << r.err;
}
