// A run's files are published as one set (issue 14, item 3): two runs into one folder at the same
// moment leave one run's timeseries.csv, events.csv and summary.json, never a mix, and a reader
// holding the folder's lock sees no set change under it.

#include <gtest/gtest.h>

#include <chrono>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <optional>
#include <sstream>
#include <string>

#include "cli_support.hpp"
#include "gutterwatt/output_folder.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt;
using namespace gutterwatt::cli_support;

namespace {

// Whether the three files of `out` come from one run: the electrical energy and the cycle count
// of summary.json against the last cum_energy_Wh of timeseries.csv and the cycle rows of
// events.csv.
void expect_one_set(const fs::path& out) {
  const nlohmann::json summary = nlohmann::json::parse(slurp(out / "summary.json"));
  std::istringstream series(slurp(out / "timeseries.csv"));
  std::string line, last;
  while (std::getline(series, line)) last = line;
  const double cum_energy_Wh =
      std::stod(last.substr(last.find_last_of(',', last.rfind(',') - 1) + 1));
  EXPECT_NEAR(cum_energy_Wh, summary["energy_Wh"]["electrical"].get<double>(), 1e-3) << last;
  std::istringstream events(slurp(out / "events.csv"));
  long cycles = 0;
  while (std::getline(events, line)) cycles += line.starts_with("cycle,");
  EXPECT_EQ(cycles, summary["siphon"]["cycles"].get<long>());
}

}  // namespace

TEST(AtomicOutputSet, PublishingWaitsForAReaderAndThenShowsTheWholeSet) {
  const fs::path site = fixture_site("atomic-reader");
  const fs::path out = site / "out";
  fs::create_directories(out);
  std::optional<FolderReadLock> reading(std::in_place, out);
  Child child({"run", (site / "shed.yaml").string(), "--quiet", "--out", out.string()}, site);
  ASSERT_TRUE(child.started());
  // The run stages summary.json, its last file, then blocks on the folder's lock.
  ASSERT_TRUE(wait_until_staged(out, "summary.json")) << child.outcome().err;
  ASSERT_TRUE(wait_until([&] { return flock_awaited(out); })) << child.outcome().err;
  EXPECT_FALSE(child.wait_for(std::chrono::milliseconds(0)));  // still waiting for the lock
  EXPECT_FALSE(fs::exists(out / "timeseries.csv"));
  reading.reset();
  ASSERT_EQ(child.wait_for(std::chrono::seconds(30)), 0) << child.outcome().err;
  EXPECT_EQ(names_in(out),
            (std::set<std::string>{"events.csv", "summary.json", "timeseries.csv", "trace.csv"}));
  expect_one_set(out);
}

TEST(AtomicOutputSet, WriterWaitingForAReaderCanStillBeEndedBySignals) {
  // A second SIGINT ends the process at once (README, "Signals"), a writer waiting for the
  // folder's lock too: it publishes nothing, and its staging folder stays for the next writer.
  const fs::path site = fixture_site("atomic-stopped");
  const fs::path out = site / "out";
  fs::create_directories(out);
  const FolderReadLock reading(out);
  Child child({"run", (site / "shed.yaml").string(), "--quiet", "--out", out.string()}, site);
  ASSERT_TRUE(child.started());
  ASSERT_TRUE(wait_until_staged(out, "summary.json")) << child.outcome().err;
  ASSERT_TRUE(wait_until([&] { return flock_awaited(out); })) << child.outcome().err;
  std::optional<int> status;
  for (int i = 0; i < 100 && !status; ++i) {
    child.signal(SIGINT);
    status = child.wait_for(std::chrono::milliseconds(100));
  }
  ASSERT_TRUE(status) << "still waiting for the lock after 100 signals";
  EXPECT_EQ(*status, -1);  // ended by the signal
  EXPECT_EQ(names_in(out).count("timeseries.csv"), 0u);
  EXPECT_FALSE(staging_folder(out).empty());
}

TEST(AtomicOutputSet, TwoConcurrentRunsIntoOneFolderLeaveOneRunsFiles) {
  const fs::path site = fixture_site("atomic-two-runs");
  const fs::path out = site / "out";
  for (int round = 0; round < 10; ++round) {
    const fs::path a = site / ("a" + std::to_string(round));
    const fs::path b = site / ("b" + std::to_string(round));
    fs::create_directories(a);
    fs::create_directories(b);
    Child small({"run", (site / "shed.yaml").string(), "--quiet", "--set", "roof.area_m2=20",
                 "--out", out.string()},
                a);
    Child large({"run", (site / "shed.yaml").string(), "--quiet", "--set", "roof.area_m2=60",
                 "--out", out.string()},
                b);
    ASSERT_EQ(small.wait_for(std::chrono::seconds(60)), 0) << small.outcome().err;
    ASSERT_EQ(large.wait_for(std::chrono::seconds(60)), 0) << large.outcome().err;
    EXPECT_EQ(names_in(out),
              (std::set<std::string>{"events.csv", "summary.json", "timeseries.csv", "trace.csv"}));
    expect_one_set(out);
  }
}
