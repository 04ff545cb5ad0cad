// Files of earlier results that a new set would stand beside go with its commit, so that a folder
// shows one set. A run with the trace off into a folder that holds an earlier run's trace.csv:
// the report would draw its close-ups from the other run (found while measuring what the trace
// costs, issue 16). A run or a sweep into a folder that holds a report.html: the page would
// describe other results than the files beside it; and a folder that holds both a run and a
// sweep gets no page, since which one it is meant for is not known (issue 16).

#include <gtest/gtest.h>

#include <filesystem>
#include <set>
#include <string>

#include "cli_support.hpp"
#include "gutterwatt/output_folder.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt;
using namespace gutterwatt::cli_support;

namespace {

// A scratch folder `name` with the demo's run in its out/, and the commands run from it.
struct DemoRun {
  explicit DemoRun(const std::string& name)
      : dir(scratch(name)), demo(source("scenarios/demo.yaml")), out(dir / "out") {
    EXPECT_EQ(command("run " + demo + " --out " + out.string() + " --quiet").status, 0);
  }
  Outcome command(const std::string& args) const { return run(args, dir); }
  // A two-combination sweep of the demo into `folder`.
  Outcome sweep(const fs::path& folder) const {
    return command("sweep " + demo + " --vary roof.area_m2=20,30 --jobs 1 --out " +
                   folder.string() + " --quiet");
  }
  fs::path dir;
  std::string demo;
  fs::path out;
};

}  // namespace

TEST(EarlierTraceIsRetired, RunWithTheTraceOffRemovesTheEarlierTrace) {
  const DemoRun d("retire-trace-run");
  const fs::path& out = d.out;
  ASSERT_TRUE(fs::exists(out / "trace.csv"));
  const auto off =
      d.command("run " + d.demo + " --set simulation.trace=off --out " + out.string() + " --quiet");
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

TEST(EarlierReportIsRetired, ARunRemovesTheEarlierPageAndSaysSo) {
  const DemoRun d("retire-report-run");
  const fs::path& out = d.out;
  ASSERT_EQ(d.command("report " + out.string()).status, 0);
  ASSERT_TRUE(fs::exists(out / "report.html"));
  const auto again = d.command("run " + d.demo + " --set roof.area_m2=20 --out " + out.string());
  ASSERT_EQ(again.status, 0) << again.err;
  EXPECT_FALSE(fs::exists(out / "report.html"));
  EXPECT_NE(again.out.find("removed " + (out / "report.html").string() +
                           ", drawn from the earlier results"),
            std::string::npos)
      << again.out;
  EXPECT_NE(again.out.find("gutterwatt report " + out.string() + " draws one from these"),
            std::string::npos);
  // With nothing to remove, nothing is said.
  const auto third = d.command("run " + d.demo + " --out " + out.string());
  ASSERT_EQ(third.status, 0) << third.err;
  EXPECT_EQ(third.out.find("report.html"), std::string::npos);
}

TEST(EarlierReportIsRetired, ASweepRemovesItAndAFolderOfBothGetsNoPage) {
  const DemoRun d("retire-report-sweep");
  const fs::path& out = d.out;
  ASSERT_EQ(d.command("report " + out.string()).status, 0);
  const auto sweep = d.sweep(out);
  ASSERT_EQ(sweep.status, 0) << sweep.err;
  EXPECT_FALSE(fs::exists(out / "report.html"));
  const auto page = d.command("report " + out.string());
  EXPECT_EQ(page.status, 2);
  EXPECT_NE(page.err.find("holds both a run (timeseries.csv) and a sweep (sweep.csv)"),
            std::string::npos)
      << page.err;
  EXPECT_FALSE(fs::exists(out / "report.html"));
  // The sweep's own folder gets its page as before.
  const fs::path alone = d.dir / "alone";
  ASSERT_EQ(d.sweep(alone).status, 0);
  EXPECT_EQ(d.command("report " + alone.string()).status, 0);
  EXPECT_TRUE(fs::exists(alone / "report.html"));
}
