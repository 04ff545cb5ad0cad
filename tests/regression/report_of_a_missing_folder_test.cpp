// `report` on a folder that is not there (issue 14, item 11): one clear line on stderr, nothing on
// stdout, and no mention of an option the command does not have.

#include <gtest/gtest.h>

#include <filesystem>
#include <string>

#include "cli_support.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt::cli_support;

TEST(ReportOfAMissingFolder, PrintsOneErrorAndNothingOnStdout) {
  const fs::path dir = scratch("report-missing");
  expect_bad(run("report " + (dir / "none").string(), dir),
             (dir / "none").string() + ": no such directory");
  EXPECT_FALSE(fs::exists(dir / "none"));
}

TEST(ReportOfAMissingFolder, FileInsteadOfAFolderIsNamedAsSuch) {
  const fs::path dir = scratch("report-file");
  write_file(dir / "summary.json", "{}\n");
  expect_bad(
      run("report " + (dir / "summary.json").string(), dir),
      (dir / "summary.json").string() + ": is a file; give the output folder of a run or sweep");
}

TEST(ReportOfAMissingFolder, EmptyFolderNamesWhatItLacksNotAnOption) {
  const fs::path dir = scratch("report-empty");
  fs::create_directories(dir / "empty");
  expect_bad(
      run("report " + (dir / "empty").string(), dir),
      (dir / "empty").string() + ": holds neither timeseries.csv (a run) nor sweep.csv (a sweep)");
  EXPECT_EQ(names_in(dir / "empty"), std::set<std::string>{});
}
