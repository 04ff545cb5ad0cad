// `merge` given an empty argument for its output folder or a shard: refused when the command line
// is read, naming the argument, as the command-line fuzz target promises (a merge to run has a
// folder and shards). It reached the file system before and failed there without a name.

#include <gtest/gtest.h>

#include <filesystem>
#include <string>

#include "cli_support.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt::cli_support;

TEST(MergeWithAnEmptyFolderName, IsRefusedNamingTheArgument) {
  const fs::path dir = scratch("merge-empty-name");
  const std::string help = " (see gutterwatt merge --help)";
  expect_bad(run_in(dir, "merge '' shard-1"), "out: an empty folder name" + help);
  expect_bad(run_in(dir, "merge merged shard-1 ''"), "shards: an empty folder name" + help);
  EXPECT_FALSE(fs::exists(dir / "merged"));
}
