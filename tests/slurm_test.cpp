// A regional study on a real batch scheduler (issue 18): a one-node Slurm cluster started here
// by tools/slurm/local-cluster (Debian's munged, slurmctld and slurmd), the sharded sweep
// submitted as an array job by tools/slurm/run-study, merged, and compared byte for byte with
// the same sweep run on one machine. Needs root and the slurm-wlm and munge packages
// (tools/setup installs them); skipped, saying why, where they are missing, except under CI
// (CI=true), where it must run.

#include <gtest/gtest.h>
#include <signal.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>

#include "cli_support.hpp"

namespace gutterwatt::slurm_test {
namespace {

namespace fs = std::filesystem;
using cli_support::fixture_site;
using cli_support::run_in;
using cli_support::shell;
using cli_support::slurp;
using cli_support::source;
using cli_support::write_file;

/// The first of the cluster's programs that cannot be found, or an empty string.
std::string missing_program() {
  for (const char* program :
       {"munged", "mungekey", "slurmctld", "slurmd", "sbatch", "squeue", "sinfo", "scancel"}) {
    const std::string probe =
        std::string("PATH=\"$PATH:/usr/sbin:/sbin\" command -v ") + program + " >/dev/null 2>&1";
    if (std::system(probe.c_str()) != 0) return program;
  }
  return "";
}

/// Kills what is left of the daemons listed in DIR/pids (local-cluster removes the list once it
/// has stopped them; a list left behind means it was killed before it could).
void stop_leftover_daemons(const fs::path& cluster) {
  std::ifstream pids(cluster / "pids");
  for (long pid = 0; pids >> pid;) {
    if (pid > 1) ::kill(static_cast<pid_t>(pid), SIGKILL);
  }
}

TEST(Slurm, AShardedStudyOnALocalClusterMergesIntoTheOneMachineSweep) {
  const bool ci = std::getenv("CI") != nullptr && std::string(std::getenv("CI")) == "true";
  std::string why;
  if (::geteuid() != 0) {
    why = "not root (the local cluster starts munged and slurmd as root)";
  } else if (const std::string program = missing_program(); !program.empty()) {
    why = program + " not found (install slurm-wlm and munge: tools/setup)";
  }
  if (!why.empty()) {
    if (ci) FAIL() << "CI=true but the Slurm test cannot run: " << why;
    GTEST_SKIP() << "no local Slurm cluster: " << why;
  }

  const fs::path dir = fixture_site("slurm-study");
  write_file(dir / "sites.csv",
             "site,rain.file,roof.area_m2\n"
             "Upper yard (invented),rain-10min.csv,40\n"
             "Mill lane (invented),rain-10min.csv,25\n"
             "Low barn (invented),rain-10min.csv,60\n");
  const std::string vary =
      " --vary release.trigger_level_mm=30,40,50,70 --vary release.kind=bell,float_valve";
  const auto one = run_in(dir, "sweep shed.yaml --sites sites.csv" + vary + " --out one --quiet");
  ASSERT_EQ(one.status, 0) << one.err;

  // Each step has its time limit: the cluster's command 60 s, the whole script 90 s (its traps
  // then stop the daemons), so nothing here can hang.
  const fs::path cluster = dir / "cluster";
  const std::string command = "cd " + dir.string() + " && GUTTERWATT=" + GUTTERWATT_EXE +
                              " GUTTERWATT_CLUSTER_TIMEOUT=60 timeout 90 " +
                              source("tools/slurm/local-cluster") + " " + cluster.string() + " " +
                              source("tools/slurm/run-study") + " study 3 shed.yaml sites.csv" +
                              vary;
  const auto study = shell(command, dir);
  stop_leftover_daemons(cluster);
  ASSERT_EQ(study.status, 0) << study.out << study.err << slurp(cluster / "log" / "slurmctld.log");
  EXPECT_FALSE(fs::exists(cluster / "pids")) << "local-cluster did not stop its daemons";
  for (const char* file : {"sweep.csv", "skipped.csv", "sweep.json"}) {
    EXPECT_EQ(slurp(dir / "study" / "merged" / file), slurp(dir / "one" / file)) << file;
  }
  for (int k = 1; k <= 3; ++k) {
    EXPECT_TRUE(fs::exists(dir / "study" / ("shard-" + std::to_string(k)) / "shard.json")) << k;
  }
}

}  // namespace
}  // namespace gutterwatt::slurm_test
