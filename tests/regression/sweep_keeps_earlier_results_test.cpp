// A sweep in which nothing can run leaves the previous sweep as it was (issue 14, item 2): an
// unknown --vary key is refused before anything runs, naming --vary, and a sweep whose every
// combination is invalid writes nothing.

#include <gtest/gtest.h>

#include <filesystem>
#include <string>
#include <vector>

#include "cli_support.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt::cli_support;

namespace {

const std::vector<std::string> kSweepFiles = {"skipped.csv", "sweep.csv", "sweep.json"};

fs::path earlier_sweep(const fs::path& site) {
  const fs::path out = site / "out";
  fs::create_directories(out);
  for (const std::string& name : kSweepFiles) write_file(out / name, "earlier " + name + "\n");
  return out;
}

void expect_earlier_sweep(const fs::path& out) {
  EXPECT_EQ(names_in(out), std::set<std::string>(kSweepFiles.begin(), kSweepFiles.end()));
  for (const std::string& name : kSweepFiles) {
    EXPECT_EQ(slurp(out / name), "earlier " + name + "\n") << name;
  }
}

}  // namespace

TEST(SweepKeepsEarlierResults, UnknownVaryKeyIsRefusedBeforeRunningNamingVary) {
  const fs::path site = fixture_site("sweep-unknown-key");
  const fs::path out = earlier_sweep(site);
  expect_bad(run("sweep " + (site / "shed.yaml").string() + " --vary roof.areaa_m2=10,20 --out " +
                     out.string(),
                 site),
             "--vary: roof.areaa_m2: unknown key; did you mean area_m2?");
  expect_earlier_sweep(out);
}

TEST(SweepKeepsEarlierResults, UnknownVarySectionIsRefusedNamingVary) {
  const fs::path site = fixture_site("sweep-unknown-section");
  const fs::path out = earlier_sweep(site);
  expect_bad(run("sweep " + (site / "shed.yaml").string() + " --vary rof.area_m2=10,20 --out " +
                     out.string(),
                 site),
             "--vary: rof.area_m2: unknown key; did you mean roof?");
  expect_earlier_sweep(out);
}

TEST(SweepKeepsEarlierResults, SweepWhoseEveryCombinationIsInvalidWritesNothing) {
  const fs::path site = fixture_site("sweep-all-invalid");
  const fs::path out = earlier_sweep(site);
  expect_bad(run("sweep " + (site / "shed.yaml").string() + " --vary roof.area_m2=-10,-20 --out " +
                     out.string(),
                 site),
             "no combination ran (2 skipped as invalid, 0 failed); nothing written, earlier "
             "results in " +
                 out.string() + " kept; first reason: --set: roof.area_m2: must be > 0 (got -10)");
  expect_earlier_sweep(out);
}

TEST(SweepKeepsEarlierResults, SweepWithOneGoodCombinationReplacesTheSet) {
  const fs::path site = fixture_site("sweep-one-good");
  const fs::path out = earlier_sweep(site);
  const Outcome r = run("sweep " + (site / "shed.yaml").string() +
                            " --quiet --vary roof.area_m2=-10,40 --out " + out.string(),
                        site);
  EXPECT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(r.err,
            "gutterwatt: warning: 1 of 2 combinations skipped as invalid, 0 failed; "
            "reasons in " +
                (out / "skipped.csv").string() +
                "\ngutterwatt: warning: first reason: --set: roof.area_m2: must be > 0 "
                "(got -10)\n");
  for (const std::string& name : kSweepFiles) {
    EXPECT_NE(slurp(out / name), "earlier " + name + "\n") << name;
  }
  EXPECT_EQ(slurp(out / "skipped.csv"),
            "roof.area_m2,status,reason\n-10,skipped,--set: roof.area_m2: must be > 0 (got -10)\n");
}
