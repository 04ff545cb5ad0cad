// Temporaries of an output folder (issue 14, item 1): names nobody can guess in advance, made with
// O_CREAT | O_EXCL | O_NOFOLLOW inside a private folder, never written through a symbolic link;
// and (item 5) the staging folders a killed process left behind go at the next write there.

#include <gtest/gtest.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <filesystem>
#include <optional>
#include <string>

#include "cli_support.hpp"
#include "gutterwatt/output_folder.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt;
using namespace gutterwatt::cli_support;

namespace {

// A process id that no process has: a child that has ended and been waited for.
pid_t dead_pid() {
  const pid_t pid = ::fork();
  if (pid == 0) ::_exit(0);
  ::waitpid(pid, nullptr, 0);
  return pid;
}

}  // namespace

TEST(OutputTemporaries, AreMadeInAPrivateFolderWithAnUnpredictableName) {
  const fs::path dir = scratch("tmp-private");
  OutputFolder folder(dir);
  folder.open("summary.json") << "{}\n";
  const fs::path stage = staging_folder(dir);
  ASSERT_FALSE(stage.empty());
  const std::string name = stage.filename().string();
  const std::string pid = std::to_string(::getpid());
  EXPECT_EQ(name.substr(0, kStagingPrefix.size() + pid.size() + 1),
            std::string(kStagingPrefix) + pid + "-");
  EXPECT_EQ(name.size(), kStagingPrefix.size() + pid.size() + 1 + 6);  // mkdtemp's XXXXXX
  struct stat st {};
  ASSERT_EQ(::lstat(stage.c_str(), &st), 0);
  EXPECT_TRUE(S_ISDIR(st.st_mode));
  EXPECT_EQ(st.st_mode & 0777, 0700u);
  EXPECT_TRUE(fs::is_regular_file(fs::symlink_status(stage / "summary.json")));
  folder.commit();
  EXPECT_EQ(names_in(dir), std::set<std::string>{"summary.json"});
}

TEST(OutputTemporaries, LinkPlantedUnderTheOldTemporaryNameIsNotFollowed) {
  // Before issue 14 the temporary was `.NAME.tmp-PID`: a link there sent the output to its target.
  const fs::path dir = scratch("tmp-planted");
  const fs::path victim = dir / "victim.txt";
  write_file(victim, "precious\n");
  const fs::path out = dir / "out";
  fs::create_directories(out);
  const std::string planted = ".timeseries.csv.tmp-" + std::to_string(::getpid());
  fs::create_symlink(victim, out / planted);
  {
    OutputFolder folder(out);
    folder.open("timeseries.csv") << "time,rain_mm\n";
    folder.commit();
  }
  EXPECT_EQ(slurp(victim), "precious\n");
  EXPECT_TRUE(fs::is_symlink(out / planted));
  EXPECT_EQ(slurp(out / "timeseries.csv"), "time,rain_mm\n");
}

TEST(OutputTemporaries, LinkAtTheFinalNameIsReplacedNotWrittenThrough) {
  const fs::path dir = scratch("tmp-final-link");
  const fs::path victim = dir / "victim.txt";
  write_file(victim, "precious\n");
  const fs::path out = dir / "out";
  fs::create_directories(out);
  fs::create_symlink(victim, out / "events.csv");
  {
    OutputFolder folder(out);
    folder.open("events.csv") << "kind,start\n";
    folder.commit();
  }
  EXPECT_EQ(slurp(victim), "precious\n");
  EXPECT_FALSE(fs::is_symlink(out / "events.csv"));
  EXPECT_EQ(slurp(out / "events.csv"), "kind,start\n");
}

TEST(OutputTemporaries, UncommittedWriterLeavesNothingBehind) {
  const fs::path dir = scratch("tmp-uncommitted");
  write_file(dir / "summary.json", "earlier\n");
  {
    OutputFolder folder(dir);
    folder.open("summary.json") << "new\n";
  }
  EXPECT_EQ(names_in(dir), std::set<std::string>{"summary.json"});
  EXPECT_EQ(slurp(dir / "summary.json"), "earlier\n");
}

TEST(OutputTemporaries, StagingFolderOfADeadProcessIsRemovedByTheNextWriter) {
  const fs::path dir = scratch("tmp-dead");
  const fs::path dead =
      dir / (std::string(kStagingPrefix) + std::to_string(dead_pid()) + "-a1b2c3");
  fs::create_directories(dead);
  write_file(dead / "timeseries.csv", "half a run\n");
  // The parent of this test is alive: its staging folder stays.
  const fs::path live =
      dir / (std::string(kStagingPrefix) + std::to_string(::getppid()) + "-d4e5f6");
  fs::create_directories(live);
  {
    OutputFolder folder(dir);
    folder.open("summary.json") << "{}\n";
    folder.commit();
  }
  EXPECT_FALSE(fs::exists(dead));
  EXPECT_TRUE(fs::exists(live));
}

TEST(OutputTemporaries, StagingFolderInUseIsKeptWhateverItsProcessId) {
  // A writer in another PID namespace sharing the folder: its process id names no process here,
  // but it holds its staging folder locked (the test's lock stands in for it).
  const fs::path dir = scratch("tmp-in-use");
  const fs::path busy =
      dir / (std::string(kStagingPrefix) + std::to_string(dead_pid()) + "-g7h8i9");
  fs::create_directories(busy);
  write_file(busy / "timeseries.csv", "a run still writing\n");
  const FolderReadLock in_use(busy);
  {
    OutputFolder folder(dir);
    folder.open("summary.json") << "{}\n";
    folder.commit();
  }
  EXPECT_EQ(slurp(busy / "timeseries.csv"), "a run still writing\n");
}

TEST(OutputTemporaries, LinkNamedLikeADeadStagingFolderIsNotFollowed) {
  const fs::path dir = scratch("tmp-dead-link");
  const fs::path keep = dir / "keep";
  fs::create_directories(keep);
  write_file(keep / "data.csv", "precious\n");
  const fs::path out = dir / "out";
  fs::create_directories(out);
  const fs::path link =
      out / (std::string(kStagingPrefix) + std::to_string(dead_pid()) + "-zzzzzz");
  fs::create_directory_symlink(keep, link);
  {
    OutputFolder folder(out);
    folder.open("summary.json") << "{}\n";
    folder.commit();
  }
  EXPECT_EQ(slurp(keep / "data.csv"), "precious\n");
  EXPECT_TRUE(fs::is_symlink(link));
}

TEST(OutputTemporaries, KilledRunsTemporariesGoAtTheNextRun) {
  // SIGKILL cannot be caught, so the staging folder stays until the next run into that folder.
  // The test holds the folder's read lock, so the run waits to publish with its set staged.
  const fs::path site = fixture_site("tmp-killed");
  const fs::path out = site / "out";
  fs::create_directories(out);
  std::optional<FolderReadLock> reading(std::in_place, out);
  Child child({"run", (site / "shed.yaml").string(), "--quiet", "--out", out.string()}, site);
  ASSERT_TRUE(child.started());
  ASSERT_TRUE(wait_until_staged(out, "summary.json")) << child.outcome().err;
  child.signal(SIGKILL);
  ASSERT_TRUE(child.wait_for(std::chrono::seconds(10)));
  EXPECT_FALSE(staging_folder(out).empty());  // left behind
  reading.reset();
  const Outcome r =
      run("run " + (site / "shed.yaml").string() + " --quiet --out " + out.string(), site);
  EXPECT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(names_in(out),
            (std::set<std::string>{"events.csv", "summary.json", "timeseries.csv", "trace.csv"}));
}
