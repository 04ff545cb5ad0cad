// End-to-end tests: the built gutterwatt executable run as a user would run it.

#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <string>

#include "cli_support.hpp"

namespace fs = std::filesystem;
using namespace gutterwatt::cli_support;

TEST(Cli, DemoRunWritesThreeFilesWithEnergyAndAClosedBalance) {
  const fs::path dir = scratch("cli-demo");
  const Outcome r =
      run("run " + source("scenarios/demo.yaml") + " --out " + (dir / "out").string(), dir);
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("siphon cycles"), std::string::npos);
  for (const char* f : {"timeseries.csv", "events.csv", "summary.json"}) {
    EXPECT_TRUE(fs::exists(dir / "out" / f)) << f;
  }
  const auto summary = nlohmann::json::parse(slurp(dir / "out" / "summary.json"));
  EXPECT_GT(summary["energy_Wh"]["electrical"].get<double>(), 1.0);
  EXPECT_GT(summary["siphon"]["cycles"].get<int>(), 10);
  EXPECT_GT(summary["water_L"]["dribble"].get<double>(), 0.0);
  EXPECT_GT(summary["overflow"]["events"].get<int>(), 0);
  EXPECT_LT(summary["water_L"]["balance_relative_error"].get<double>(), 1e-9);
  const auto& w = summary["water_L"];
  const double closing = w["rain"].get<double>() - w["roof_loss"].get<double>() -
                         w["first_flush"].get<double>() - w["reservoir_overflow"].get<double>() -
                         w["column_overflow"].get<double>() - w["through_nozzle"].get<double>() -
                         w["storage_change"].get<double>();
  EXPECT_NEAR(closing, 0.0, 1e-3);  // the printed accounts are rounded to 1e-6 L each
  EXPECT_EQ(summary["months"].size(), 9u);
  const std::string ts = slurp(dir / "out" / "timeseries.csv");
  EXPECT_EQ(ts.substr(0, ts.find('\n')),
            "time,rain_mm,roof_runoff_L,reservoir_level_mm,release_state,release_L,"
            "reservoir_overflow_L,column_overflow_L,nozzle_L,head_m,power_W,energy_Wh,battery_soc,"
            "cum_energy_Wh,cum_overflow_L");
  // 2025-03-01T00:00 to 2025-11-30T23:55 at 1 h: 275 days, 6599 full hours and a last
  // partial row.
  EXPECT_EQ(lines(ts), 1 + 6600);
  const std::string ev = slurp(dir / "out" / "events.csv");
  EXPECT_EQ(ev.substr(0, ev.find('\n')),
            "kind,start,end,duration_s,volume_L,peak_flow_L_per_s,energy_Wh");
  EXPECT_NE(ev.find("\ncycle,"), std::string::npos);
  EXPECT_NE(ev.find("\ndribble,"), std::string::npos);
  EXPECT_NE(ev.find("\noverflow,"), std::string::npos);
}

TEST(Cli, CheckShowsADailyRecordAsReadAndAsDisaggregated) {
  const fs::path dir = scratch("cli-check-daily");
  const Outcome r = run("check " + source("scenarios/daily-demo.yaml"), dir);
  ASSERT_EQ(r.status, 0) << r.err;
  // No day of the invented season averages the 3.33 mm/h that primes the siphon.
  EXPECT_NE(r.out.find("  record as read, 1d steps\n"
                       "    median wet intensity                                       0.20  mm/h\n"
                       "    rain volume below the priming intensity                   100.0  %\n"),
            std::string::npos)
      << r.out;
  EXPECT_NE(r.out.find("  record disaggregated by cascade, 5min steps\n"), std::string::npos);
}

TEST(Cli, CheckPrintsFiguresWarningsAndCautions) {
  const fs::path dir = scratch("cli-check");
  const Outcome r = run("check " + source("scenarios/demo.yaml"), dir);
  ASSERT_EQ(r.status, 0) << r.err;
  for (const char* s :
       {"storage between the set-points", "priming flow as steady rain",
        "running flow at the set-point", "nozzle flow at design head", "jet velocity",
        "electrical power at design head", "rain that overflows the rim", "Warnings", "Cautions",
        "Working at height", "Local building"}) {
    EXPECT_NE(r.out.find(s), std::string::npos) << s;
  }
}

TEST(Cli, MisspeltKeyIsOneLineExitTwoNamingFileLineAndKey) {
  const fs::path dir = scratch("cli-misspelt");
  std::string text = slurp(source("scenarios/demo.yaml"));
  const std::string good = "runoff_coefficient";
  text.replace(text.find(good), good.size(), "runof_coefficient");
  std::ofstream(dir / "bad.yaml") << text;
  const Outcome r =
      run("run " + (dir / "bad.yaml").string() + " --out " + (dir / "out").string(), dir);
  EXPECT_EQ(r.status, 2);
  EXPECT_EQ(lines(r.err), 1) << r.err;
  EXPECT_NE(r.err.find("bad.yaml:11: roof.runof_coefficient: unknown key; did you mean "
                       "runoff_coefficient?"),
            std::string::npos)
      << r.err;
}

TEST(Cli, FailedRunLeavesEarlierResultsUntouched) {
  const fs::path dir = scratch("cli-untouched");
  const fs::path out = dir / "out";
  ASSERT_EQ(
      run("run " + source("scenarios/demo.yaml") + " --quiet --out " + out.string(), dir).status,
      0);
  const std::string before = slurp(out / "summary.json");
  const Outcome r = run(
      "run " + source("scenarios/demo.yaml") + " --set roof.area_m2=-3 --out " + out.string(), dir);
  EXPECT_EQ(r.status, 2);
  EXPECT_EQ(r.err, "gutterwatt: error: --set: roof.area_m2: must be > 0 (got -3)\n");
  EXPECT_EQ(slurp(out / "summary.json"), before);
  for (const auto& entry : fs::directory_iterator(out)) {
    EXPECT_EQ(entry.path().filename().string().find(".tmp"), std::string::npos) << entry.path();
  }
}

TEST(Cli, UnknownCommandIsExitTwo) {
  const fs::path dir = scratch("cli-unknown");
  const Outcome r = run("simulate x.yaml", dir);
  EXPECT_EQ(r.status, 2);
  EXPECT_EQ(lines(r.err), 1) << r.err;
}

TEST(Cli, StormFileRunsUnchangedAsARainFile) {
  const fs::path dir = scratch("cli-storm");
  ASSERT_EQ(run("storm --kind nrcs-II --depth 40 --duration 24h --step 5min --start "
                "2025-06-01T00:00 --out " +
                    (dir / "storm.csv").string(),
                dir)
                .status,
            0);
  const Outcome r = run(
      "run " + source("scenarios/demo.yaml") + " --rain " + (dir / "storm.csv").string() +
          " --from 2025-06-01T00:00 --to 2025-06-02T00:00 --quiet --out " + (dir / "out").string(),
      dir);
  ASSERT_EQ(r.status, 0) << r.err;
  const auto summary = nlohmann::json::parse(slurp(dir / "out" / "summary.json"));
  EXPECT_NEAR(summary["rain"]["depth_mm"].get<double>(), 40.0, 1e-6);
  EXPECT_GT(summary["siphon"]["cycles"].get<int>(), 0);
}
