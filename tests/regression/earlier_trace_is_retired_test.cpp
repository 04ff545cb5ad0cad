// A run with the trace off into a folder that holds an earlier run's trace.csv: the earlier trace
// goes with the commit, so the folder shows one run's set and the report does not draw its
// close-ups from the other run. Found while measuring what the trace costs (issue 16).

#include <gtest/gtest.h>

#include <filesystem>
#include <set>
#include <string>

#include "cli_support.hpp"
#include "gutterwatt/output_folder.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt;
using namespace gutterwatt::cli_support;

TEST(EarlierTraceIsRetired, RunWithTheTraceOffRemovesTheEarlierTrace) {
  const fs::path dir = scratch("retire-trace-run");
  const std::string demo = source("scenarios/demo.yaml");
  const fs::path out = dir / "out";
  ASSERT_EQ(run("run " + demo + " --out " + out.string() + " --quiet", dir).status, 0);
  ASSERT_TRUE(fs::exists(out / "trace.csv"));
  const auto off =
      run("run " + demo + " --set simulation.trace=off --out " + out.string() + " --quiet", dir);
  ASSERT_EQ(off.status, 0) << off.err;
  EXPECT_EQ(names_in(out), (std::set<std::string>{"events.csv", "summary.json", "timeseries.csv"}));
}

TEST(EarlierTraceIsRetired, OnlyAtCommitAndNeverThroughALinkOrAFolder) {
  const fs::path dir = scratch("retire-trace-folder");
  const fs::path victim = dir / "victim.txt";
  write_file(victim, "precious\n");
  const fs::path out = dir / "out";
  fs::create_directories(out / "trace.csv");  // a folder of that name: left
  fs::create_symlink(victim, out / "old.csv");
  write_file(out / "summary.json", "earlier\n");
  {
    OutputFolder folder(out);
    folder.open("summary.json") << "new\n";
    folder.retire("trace.csv");
    folder.retire("old.csv");
    folder.retire("none.csv");  // not there: nothing to do
  }
  // Not committed: the earlier set stays whole.
  EXPECT_TRUE(fs::is_symlink(out / "old.csv"));
  EXPECT_EQ(slurp(out / "summary.json"), "earlier\n");
  {
    OutputFolder folder(out);
    folder.open("summary.json") << "new\n";
    folder.retire("trace.csv");
    folder.retire("old.csv");
    folder.commit();
  }
  EXPECT_EQ(names_in(out), (std::set<std::string>{"summary.json", "trace.csv"}));
  EXPECT_TRUE(fs::is_directory(out / "trace.csv"));
  EXPECT_EQ(slurp(victim), "precious\n");  // the link went, not what it pointed to
  EXPECT_EQ(slurp(out / "summary.json"), "new\n");
}
